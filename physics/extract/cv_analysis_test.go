package extract

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"junco/physics"
)

// Test devices: silicon, eps_r 11.7 (Sze & Ng 2007, appendix G; from
// memory), a 0.1 mm^2 diode, so that Cj0 is a few tens of pF and the 2-10
// pF of a probe fixture is a large part of C in reverse bias.
var (
	cvEps  = 11.7 * physics.Eps0
	cvGeom = CVGeometry{AreaM2: 1e-7, PermittivityFm: 11.7 * physics.Eps0}
)

// gradedC is the depletion capacitance of a linearly graded junction with
// impurity gradient a (m^-4), C = A (q a eps^2 / (12 (Vbi - V)))^(1/3)
// (Sze & Ng 2007, sec. 2.2, linearly graded junction).
func gradedC(v, a, vbi, area, eps float64) float64 {
	return area * math.Cbrt(physics.Q*a*eps*eps/(12*(vbi-v)))
}

// cvSweep samples c(V) at n+1 biases from v0 to v1 and adds Gaussian noise
// of standard deviation rel*C + abs (the noise model a fit is told).
func cvSweep(c func(float64) float64, v0, v1 float64, n int, rel, abs float64, rng *rand.Rand) (vs, cs []float64) {
	for k := 0; k <= n; k++ {
		x := v0 + (v1-v0)*float64(k)/float64(n)
		y := c(x)
		vs = append(vs, x)
		cs = append(cs, y+(rel*y+abs)*rng.NormFloat64())
	}
	return vs, cs
}

// checkRecovered applies the task's tolerances (issue 14): Vbi within
// 50 mV, m within 0.03, N within 5 %, and each within 4 standard errors.
func checkRecovered(t *testing.T, label string, a *CVAnalysis, vbi, m, n float64) {
	t.Helper()
	b, g := a.BuiltInPotentialV, a.GradingCoefficient
	if !b.Determined || math.Abs(b.Value-vbi) > 0.05 || math.Abs(b.Value-vbi) > 4*b.StdErr {
		t.Errorf("%s: Vbi = %.4f +- %.4f V (%s), truth %.4f", label, b.Value, b.StdErr, b.Reason, vbi)
	}
	if !g.Fixed && (!g.Determined || math.Abs(g.Value-m) > 0.03 || math.Abs(g.Value-m) > 4*g.StdErr) {
		t.Errorf("%s: m = %.4f +- %.4f (%s), truth %.4f", label, g.Value, g.StdErr, g.Reason, m)
	}
	if n > 0 {
		d := a.DopingM3
		if !d.Determined || math.Abs(d.Value/n-1) > 0.05 || math.Abs(d.Value-n) > 4*d.StdErr {
			t.Errorf("%s: N = %.4g +- %.2g (%s), truth %.4g", label, d.Value, d.StdErr, d.Reason, n)
		}
	}
}

// Fixture capacitance: an abrupt p+n junction, C = A sqrt(q eps N /
// (2 (Vbi - V))) (abruptC; Sze & Ng 2007, sec. 2.2) plus 2, 5 and 10 pF in
// parallel, 0.2 % noise (a bench LCR meter; common practice), five noise
// draws each. The junction fit recovers Vbi, m, N and Cpar; the plain
// Mott-Schottky line of the same data, the old headline, misses Vbi by far
// more than 50 mV, which is the artefact this analysis removes.
func TestAnalyzeCVParasitic(t *testing.T) {
	const n, vbi = 1e22, 0.8
	for _, cpar := range []float64{2e-12, 5e-12, 10e-12} {
		for seed := uint64(1); seed <= 5; seed++ {
			rng := rand.New(rand.NewPCG(seed, uint64(cpar*1e15)))
			v, c := cvSweep(func(x float64) float64 { return abruptC(x, n, vbi, cvGeom.AreaM2, cvEps) + cpar }, -10, 0.3, 60, 0.002, 0, rng)
			a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{NoiseRel: 0.002}})
			if err != nil {
				t.Fatal(err)
			}
			checkRecovered(t, "parasitic", a, vbi, 0.5, n)
			if p := a.ParasiticCapacitanceF; !p.Determined || math.Abs(p.Value-cpar) > 4*p.StdErr || math.Abs(p.Value-cpar) > 1e-12 {
				t.Errorf("Cpar = %g +- %g F, truth %g", p.Value, p.StdErr, cpar)
			}
			if a.Line == nil || a.Line.Flagged || math.Abs(a.Line.ParasiticF-cpar) > 1e-12 {
				t.Errorf("Cpar %g: line %+v", cpar, a.Line)
			}
			if seed == 1 {
				ms, err := MottSchottky(v, c, cvGeom, Window{})
				if err != nil {
					t.Fatal(err)
				}
				if math.Abs(ms.BuiltInV-vbi) < 0.2 {
					t.Errorf("Cpar %g: the uncorrected line gives Vbi = %g V; the artefact should be visible", cpar, ms.BuiltInV)
				}
			}
		}
	}
}

// Graded junction: a linearly graded junction (gradedC, m = 1/3; Sze & Ng
// 2007, sec. 2.2) with and without 5 pF of fixture capacitance, 0.2 %
// noise. Vbi and m are recovered; the doping is withheld because m is not
// 1/2, and the Mott-Schottky line is flagged. Cj0 is checked against the
// closed form at V = 0.
func TestAnalyzeCVGraded(t *testing.T) {
	const grad, vbi = 1e28, 0.7 // impurity gradient 1e20 cm^-4, V
	for _, cpar := range []float64{0, 5e-12} {
		for seed := uint64(1); seed <= 5; seed++ {
			rng := rand.New(rand.NewPCG(seed, 33))
			v, c := cvSweep(func(x float64) float64 { return gradedC(x, grad, vbi, 1e-7, cvEps) + cpar }, -10, 0.3, 60, 0.002, 0, rng)
			a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: CVGeometry{AreaM2: 1e-7, PermittivityFm: cvEps}, Fit: CVOptions{NoiseRel: 0.002}})
			if err != nil {
				t.Fatal(err)
			}
			checkRecovered(t, "graded", a, vbi, 1.0/3, 0)
			cj0 := gradedC(0, grad, vbi, 1e-7, cvEps)
			if z := a.ZeroBiasCapacitanceF; math.Abs(z.Value/cj0-1) > 0.05 || math.Abs(z.Value-cj0) > 4*z.StdErr {
				t.Errorf("Cj0 = %g, closed form %g", z.Value, cj0)
			}
			if a.DopingM3.Determined || !strings.Contains(a.DopingM3.Reason, "not consistent with 1/2") {
				t.Errorf("graded: doping %+v must be withheld", a.DopingM3)
			}
			if a.Line == nil || !a.Line.Flagged {
				t.Errorf("graded, Cpar %g: the m = 1/2 line must be flagged: %+v", cpar, a.Line)
			}
		}
	}
}

// Abrupt junction, no fixture capacitance, noise 0.1 % and 0.3 % relative
// plus an absolute floor of 5 fF (an LCR meter's accuracy is a relative
// term plus an offset; common practice), fitted with the true noise model.
func TestAnalyzeCVAbruptNoise(t *testing.T) {
	const n, vbi = 3e21, 0.75
	for _, rel := range []float64{0.001, 0.003} {
		for seed := uint64(1); seed <= 5; seed++ {
			rng := rand.New(rand.NewPCG(seed, uint64(rel*1e4)))
			v, c := cvSweep(func(x float64) float64 { return abruptC(x, n, vbi, cvGeom.AreaM2, cvEps) }, -8, 0.35, 80, rel, 5e-15, rng)
			a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{NoiseRel: rel, NoiseAbsF: 5e-15}})
			if err != nil {
				t.Fatal(err)
			}
			checkRecovered(t, "abrupt", a, vbi, 0.5, n)
			if a.Line == nil || a.Line.Flagged || a.Line.MisfitRatio > 1.2 {
				t.Errorf("abrupt: the line must fit as well as the junction fit: %+v", a.Line)
			}
			if chi := a.Junction.ReducedChiSquare; chi < 0.5 || chi > 1.6 {
				t.Errorf("reduced chi-square %g with the true noise model", chi)
			}
		}
	}
}

// Relaxed: at 1 % noise with Cpar free, the noise-weighted fit with the
// true noise model has se(Vbi) of about 30 mV and se(m) of about 0.03 (its
// own covariance, which the random-set checks above show is calibrated),
// so the task's tolerances (50 mV, 0.03) cannot be met on every draw by
// any such fit: Vbi and m are checked within 4 standard errors only, and
// the standard errors must be that large. Holding Cpar at its known value
// (0) restores the full tolerances, which is what holding Cpar is for.
func TestAnalyzeCVHighNoiseRelaxed(t *testing.T) {
	const n, vbi = 3e21, 0.75
	for seed := uint64(1); seed <= 5; seed++ {
		rng := rand.New(rand.NewPCG(seed, 100))
		v, c := cvSweep(func(x float64) float64 { return abruptC(x, n, vbi, cvGeom.AreaM2, cvEps) }, -8, 0.35, 80, 0.01, 0, rng)
		a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{NoiseRel: 0.01}})
		if err != nil {
			t.Fatal(err)
		}
		b, g := a.BuiltInPotentialV, a.GradingCoefficient
		if math.Abs(b.Value-vbi) > 4*b.StdErr || math.Abs(g.Value-0.5) > 4*g.StdErr || !(b.StdErr > 0.0125) || !(g.StdErr > 0.0075) {
			t.Errorf("1 %% noise: Vbi %g +- %g, m %g +- %g", b.Value, b.StdErr, g.Value, g.StdErr)
		}
		a, err = AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{NoiseRel: 0.01, FixParasitic: true}})
		if err != nil {
			t.Fatal(err)
		}
		checkRecovered(t, "1 % noise, Cpar held at 0", a, vbi, 0.5, n)
		if !a.ParasiticCapacitanceF.Fixed || !math.IsNaN(a.ParasiticCapacitanceF.StdErr) {
			t.Errorf("held Cpar: %+v", a.ParasiticCapacitanceF)
		}
	}
}

// Holding m: at 1/2 the doping comes from the (only) fit; held at 1/3 on
// graded data it is withheld with the reason; a held m is marked Fixed.
func TestAnalyzeCVHoldGrading(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 5))
	const n, vbi = 1e22, 0.8
	v, c := cvSweep(func(x float64) float64 { return abruptC(x, n, vbi, cvGeom.AreaM2, cvEps) + 3e-12 }, -10, 0.3, 60, 0.002, 0, rng)
	a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{NoiseRel: 0.002, FixGrading: true, Grading: 0.5}})
	if err != nil {
		t.Fatal(err)
	}
	checkRecovered(t, "m held at 1/2", a, vbi, 0.5, n)
	if !a.GradingCoefficient.Fixed || a.Line == nil || a.Line.Fit != a.Junction || a.Line.MisfitRatio != 1 {
		t.Errorf("held m: %+v, line %+v", a.GradingCoefficient, a.Line)
	}
	v, c = cvSweep(func(x float64) float64 { return gradedC(x, 1e28, 0.7, 1e-7, cvEps) }, -10, 0.3, 60, 0.002, 0, rng)
	a, err = AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{FixGrading: true, Grading: 1.0 / 3}})
	if err != nil {
		t.Fatal(err)
	}
	checkRecovered(t, "m held at 1/3", a, 0.7, 1.0/3, 0)
	if a.DopingM3.Determined || !strings.Contains(a.DopingM3.Reason, "held at") {
		t.Errorf("m held at 1/3: doping %+v", a.DopingM3)
	}
}

// No area: Cj0, Vbi and m are reported, the doping is not, with its reason.
func TestAnalyzeCVNoArea(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 8))
	v, c := cvSweep(func(x float64) float64 { return abruptC(x, 1e22, 0.8, cvGeom.AreaM2, cvEps) + 4e-12 }, -10, 0.3, 60, 0.002, 0, rng)
	a, err := AnalyzeCV(v, c, CVAnalysisOptions{ProfileHalfWindow: 2})
	if err != nil {
		t.Fatal(err)
	}
	checkRecovered(t, "no area", a, 0.8, 0.5, 0)
	if a.DopingM3.Determined || !math.IsNaN(a.DopingM3.Value) || !strings.Contains(a.DopingM3.Reason, "no area") || a.Profile != nil {
		t.Errorf("no area: doping %+v, profile %d points", a.DopingM3, len(a.Profile))
	}
}

// The doping profile is taken of C - Cpar: for uniform doping it is flat at
// N (Schroder 2006, ch. 2: the differential formula returns the uniform
// doping), while the profile of the uncorrected C is not.
func TestAnalyzeCVProfileCorrected(t *testing.T) {
	const n, vbi, cpar = 1e22, 0.8, 8e-12
	var v, c []float64
	for k := 0; k <= 80; k++ {
		x := -12 + 0.15*float64(k)
		v = append(v, x)
		c = append(c, abruptC(x, n, vbi, cvGeom.AreaM2, cvEps)+cpar)
	}
	a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, ProfileHalfWindow: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Profile) != 81-4 {
		t.Fatalf("%d profile points, notes %v", len(a.Profile), a.Notes)
	}
	for _, p := range a.Profile {
		if math.Abs(p.DopingM3/n-1) > 0.005 {
			t.Errorf("corrected profile: N(%g V) = %g, want %g", p.VoltageV, p.DopingM3, n)
		}
	}
	raw, err := DopingProfile(v, c, cvGeom, 2)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(raw[0].DopingM3/n-1) < 0.3 {
		t.Errorf("uncorrected profile at %g V: %g; the parasitic should distort it", raw[0].VoltageV, raw[0].DopingM3)
	}
}

// Item 6: a sweep far from the built-in potential (-20 to -15 V) with Cpar
// free cannot pin Vbi or m down; the result says so with a reason and
// withholds the doping. The two narrow sweeps run Vbi to its upper bound.
func TestAnalyzeCVNotDetermined(t *testing.T) {
	j := JunctionCV{30e-12, 0.8, 0.5, 5e-12} // Sze & Ng 2007, sec. 2.2 form
	for i, r := range []struct{ v0, v1, rel float64 }{{-20, -15, 0.005}, {-3, -2.5, 0.01}, {-20, -18, 0.001}} {
		rng := rand.New(rand.NewPCG(3, 3))
		v, c := cvSweep(j.Capacitance, r.v0, r.v1, 40, r.rel, 0, rng)
		a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom})
		if err != nil {
			t.Fatal(err)
		}
		for name, q := range map[string]CVQuantity{"Vbi": a.BuiltInPotentialV, "m": a.GradingCoefficient, "N": a.DopingM3} {
			if q.Determined || q.Reason == "" {
				t.Errorf("%g..%g V: %s = %+v must be not determined, with a reason", r.v0, r.v1, name, q)
			}
		}
		if i > 0 && !strings.Contains(a.BuiltInPotentialV.Reason, "upper bound") {
			t.Errorf("%g..%g V: Vbi reason %q, want the upper bound", r.v0, r.v1, a.BuiltInPotentialV.Reason)
		}
	}
}

// The status rules on a clean set: everything determined, nothing held.
func TestAnalyzeCVStatusClean(t *testing.T) {
	j := JunctionCV{30e-12, 0.8, 0.5, 5e-12}
	rng := rand.New(rand.NewPCG(4, 4))
	v, c := cvSweep(j.Capacitance, -10, 0.3, 60, 0.001, 0, rng)
	a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom})
	if err != nil {
		t.Fatal(err)
	}
	for name, q := range map[string]CVQuantity{"Cj0": a.ZeroBiasCapacitanceF, "Vbi": a.BuiltInPotentialV, "m": a.GradingCoefficient, "Cpar": a.ParasiticCapacitanceF, "N": a.DopingM3} {
		if !q.Determined || q.Fixed || q.Reason != "" || !(q.StdErr > 0) {
			t.Errorf("%s = %+v", name, q)
		}
	}
}

func TestAnalyzeCVErrors(t *testing.T) {
	v := []float64{-3, -2, -1, 0, 0.2}
	c := []float64{1e-12, 1.1e-12, 1.3e-12, 1.6e-12, 1.8e-12}
	checks := []struct {
		name  string
		field string
		opt   CVAnalysisOptions
	}{
		{"negative area", "AreaM2", CVAnalysisOptions{Geometry: CVGeometry{AreaM2: -1, PermittivityFm: 1e-10}}},
		{"no permittivity", "PermittivityFm", CVAnalysisOptions{Geometry: CVGeometry{AreaM2: 1e-8}}},
		{"profile window", "ProfileHalfWindow", CVAnalysisOptions{ProfileHalfWindow: -1}},
		{"grading", "Grading", CVAnalysisOptions{Fit: CVOptions{FixGrading: true, Grading: 5}}},
		{"noise", "NoiseRel", CVAnalysisOptions{Fit: CVOptions{NoiseRel: -0.01}}},
		{"noise floor", "NoiseAbsF", CVAnalysisOptions{Fit: CVOptions{NoiseAbsF: math.Inf(1)}}},
		{"parasitic", "ParasiticF", CVAnalysisOptions{Fit: CVOptions{FixParasitic: true, ParasiticF: math.NaN()}}},
	}
	for _, ch := range checks {
		_, err := AnalyzeCV(v, c, ch.opt)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != ch.field || !errors.Is(err, ErrInput) {
			t.Errorf("%s: got %v, want an *InputError on %s", ch.name, err, ch.field)
		}
	}
	if _, err := AnalyzeCV([]float64{1, 2, 3, 4, 7}, c, CVAnalysisOptions{}); !errors.Is(err, ErrInput) {
		t.Errorf("biases above %g V: %v", CVMaxBuiltInV, err)
	}
}

// Calibration of the standard errors over random sets (Cj0 1-100 pF, Vbi
// 0.5-1.2 V, m 0.3-0.55, Cpar 0-10 pF, 0.1-0.5 % noise, sweeps from -5..-20
// V to 0..0.4 V): for a Gaussian estimator |z| <= 2 holds for 95 % of
// draws (a property of the normal distribution); at least 85 % is asked
// here, and no |z| above 5.
func TestAnalyzeCVCalibration(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	const sets = 80
	within, worst := 0, 0.0
	for i := 0; i < sets; i++ {
		j := JunctionCV{math.Exp(math.Log(1e-12) + rng.Float64()*math.Log(100)), 0.5 + 0.7*rng.Float64(), 0.3 + 0.25*rng.Float64(), 10e-12 * rng.Float64()}
		rel := 0.001 + 0.004*rng.Float64()
		v0, v1 := -5-15*rng.Float64(), 0.4*rng.Float64()
		v, c := cvSweep(j.Capacitance, v0, v1, 60, rel, 0, rng)
		a, err := AnalyzeCV(v, c, CVAnalysisOptions{Fit: CVOptions{NoiseRel: rel}})
		if err != nil {
			t.Fatalf("set %d: %v", i, err)
		}
		zv := math.Abs(a.BuiltInPotentialV.Value-j.BuiltInPotentialV) / a.BuiltInPotentialV.StdErr
		zm := math.Abs(a.GradingCoefficient.Value-j.GradingCoefficient) / a.GradingCoefficient.StdErr
		for _, z := range []float64{zv, zm} {
			if z <= 2 {
				within++
			}
			if !(z <= worst) {
				worst = z
			}
		}
	}
	frac := float64(within) / (2 * sets)
	t.Logf("|z| <= 2 for %.1f %% of Vbi and m over %d sets, worst |z| %.2f", 100*frac, sets, worst)
	if frac < 0.85 || worst > 5 {
		t.Errorf("|z| <= 2 for %.0f %% of Vbi and m, worst |z| %.2f", 100*frac, worst)
	}
}

// Forward bias beyond the depletion region: a diffusion capacitance
// tau I/Vt = C1 exp(V/Vt) (Sze & Ng 2007, sec. 2.3; from memory) rises on
// top of the junction capacitance above 0.5 V. Fitted up to 0.7 V, the
// junction fit runs Vbi to the largest bias and says so; restricted to the
// depletion biases it recovers Vbi.
func TestAnalyzeCVForwardDiffusion(t *testing.T) {
	j := JunctionCV{30e-12, 0.8, 0.5, 2e-12}
	vt := physics.ThermalVoltage(300)
	rng := rand.New(rand.NewPCG(1, 1))
	v, c := cvSweep(func(x float64) float64 { return j.Capacitance(x) + 5e-12*math.Exp((x-0.5)/vt) }, -5, 0.7, 60, 0.002, 0, rng)
	a, err := AnalyzeCV(v, c, CVAnalysisOptions{Fit: CVOptions{NoiseRel: 0.002}})
	if err != nil {
		t.Fatal(err)
	}
	if b := a.BuiltInPotentialV; b.Determined || !strings.Contains(b.Reason, "narrow the window") {
		t.Errorf("forward data: Vbi %+v must be not determined (bound)", b)
	}
	a, err = AnalyzeCV(v, c, CVAnalysisOptions{Fit: CVOptions{NoiseRel: 0.002, Window: Window{MinV: -5, MaxV: 0.3}}})
	if err != nil {
		t.Fatal(err)
	}
	checkRecovered(t, "window to 0.3 V", a, 0.8, 0.5, 0)
}

// BenchmarkAnalyzeCV times the whole analysis of a 61-point sweep with
// 5 pF of fixture capacitance (two junction fits of three starts each, and
// the profile).
func BenchmarkAnalyzeCV(b *testing.B) {
	j := JunctionCV{30e-12, 0.8, 0.5, 5e-12}
	v, c := cvSweep(j.Capacitance, -10, 0.3, 60, 0.002, 0, rand.New(rand.NewPCG(1, 2)))
	b.ReportAllocs()
	var sink *CVAnalysis
	for i := 0; i < b.N; i++ {
		a, err := AnalyzeCV(v, c, CVAnalysisOptions{Geometry: cvGeom, Fit: CVOptions{NoiseRel: 0.002}, ProfileHalfWindow: 2})
		if err != nil {
			b.Fatal(err)
		}
		sink = a
	}
	_ = sink
}

// A cancelled context stops the analysis with the context's error, before
// and during the fits (a 200 000-point sweep takes long enough to cancel
// part-way).
func TestAnalyzeCVCancel(t *testing.T) {
	j := JunctionCV{30e-12, 0.8, 0.5, 5e-12}
	v, c := cvSweep(j.Capacitance, -10, 0.3, 200000, 0.002, 0, rand.New(rand.NewPCG(1, 3)))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := AnalyzeCVContext(ctx, v, c, CVAnalysisOptions{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled before: %v", err)
	}
	ctx, cancel = context.WithTimeout(context.Background(), 5*time.Millisecond)
	defer cancel()
	if _, err := AnalyzeCVContext(ctx, v, c, CVAnalysisOptions{}); !errors.Is(err, context.DeadlineExceeded) {
		t.Errorf("cancelled part-way: %v", err)
	}
}
