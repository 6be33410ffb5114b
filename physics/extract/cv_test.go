package extract

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"junco/physics"
)

// Neamen, Semiconductor Physics and Devices, 4th ed. (2012), Example 7.6:
// p+n junction, 1/C'^2 vs V line with intercept Vbi = 0.725 V and slope
// 6.15e15 (F/cm^2)^-2 V^-1 (per unit area); eps_r = 11.7, eps0 = 8.85e-14
// F/cm and q = 1.6e-19 C (the book's rounded constants, injected) give
// Nd = 1.96e15 cm^-3.
func TestMottSchottkyNeamenExample(t *testing.T) {
	g := CVGeometry{AreaM2: 1, PermittivityFm: 11.7 * 8.85e-14, ChargeC: 1.6e-19} // cm units
	n, err := DopingFromSlope(-6.15e15, g)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(n/1.96e15-1) > 0.005 {
		t.Errorf("Nd = %.4g cm^-3, Neamen Example 7.6 gives 1.96e15", n)
	}
	// The same line sampled over reverse bias goes through the fit.
	var v, c []float64
	for k := 0; k <= 20; k++ {
		x := -5 + 0.25*float64(k)
		v = append(v, x)
		c = append(c, 1/math.Sqrt(6.15e15*(0.725-x)))
	}
	ms, err := MottSchottky(v, c, g, Window{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(ms.BuiltInV-0.725) > 1e-9 || math.Abs(ms.DopingM3/1.96e15-1) > 0.005 {
		t.Errorf("Vbi = %g V (want 0.725), Nd = %g (want 1.96e15)", ms.BuiltInV, ms.DopingM3)
	}
}

// abruptC is the depletion capacitance of a one-sided abrupt junction,
// C = A sqrt(q eps N / (2 (Vbi - V))) (Sze & Ng 2007, sec. 2.2).
func abruptC(v, n, vbi, area, eps float64) float64 {
	return area * math.Sqrt(physics.Q*eps*n/(2*(vbi-v)))
}

func TestMottSchottkyNoisyRecovers(t *testing.T) {
	// Task criteria: doping within 5 %, Vbi within 50 mV, 1 % noise on C.
	eps := 11.7 * physics.Eps0 // Si, eps_r 11.7 (Sze & Ng 2007, appendix; from memory)
	const area, n, vbi = 1e-6, 1e22, 0.8
	rng := rand.New(rand.NewPCG(42, 1))
	var v, c []float64
	for k := 0; k <= 100; k++ {
		x := -5 + 0.053*float64(k)
		v = append(v, x)
		c = append(c, abruptC(x, n, vbi, area, eps)*(1+0.01*rng.NormFloat64()))
	}
	ms, err := MottSchottky(v, c, CVGeometry{AreaM2: area, PermittivityFm: eps}, Window{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(ms.DopingM3/n-1) > 0.05 || math.Abs(ms.BuiltInV-vbi) > 0.05 {
		t.Errorf("N = %g (want %g), Vbi = %g (want %g)", ms.DopingM3, n, ms.BuiltInV, vbi)
	}
	if !(ms.StdErrV > 0 && ms.StdErrV < 0.05) || math.Abs(ms.BuiltInV-vbi) > 4*ms.StdErrV {
		t.Errorf("se(Vbi) = %g, error %g", ms.StdErrV, ms.BuiltInV-vbi)
	}
	if !(ms.StdErrM3 > 0) || math.Abs(ms.DopingM3-n) > 4*ms.StdErrM3 {
		t.Errorf("se(N) = %g, error %g", ms.StdErrM3, ms.DopingM3-n)
	}
}

func TestDopingProfileFlatAndStep(t *testing.T) {
	eps := 11.7 * physics.Eps0
	const area, vbi = 1e-6, 0.8
	g := CVGeometry{AreaM2: area, PermittivityFm: eps}
	// Uniform doping: flat profile.
	var v, c []float64
	for k := 0; k <= 60; k++ {
		x := -6 + 0.1*float64(k)
		v = append(v, x)
		c = append(c, abruptC(x, 3e21, vbi, area, eps))
	}
	prof, err := DopingProfile(v, c, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	if len(prof) != 61-4 {
		t.Errorf("%d profile points", len(prof))
	}
	for _, p := range prof {
		if math.Abs(p.DopingM3/3e21-1) > 1e-3 {
			t.Errorf("flat profile: N(%g m) = %g", p.DepthM, p.DopingM3)
		}
	}
	// Step: N1 for x < x0, N2 beyond. Vbi - V = (q/eps) int_0^W x N dx,
	// inverted for W (Sze & Ng 2007, sec. 2.2, Poisson's equation).
	const n1, n2, x0 = 1e22, 1e23, 0.5e-6
	v, c = nil, nil
	v1 := physics.Q * n1 * x0 * x0 / (2 * eps)
	for k := 0; k <= 200; k++ {
		x := -10 + 0.05*float64(k)
		d := vbi - x
		var w float64
		if d <= v1 {
			w = math.Sqrt(2 * eps * d / (physics.Q * n1))
		} else {
			w = math.Sqrt(x0*x0 + 2*eps*(d-v1)/(physics.Q*n2))
		}
		v = append(v, x)
		c = append(c, eps*area/w)
	}
	prof, err = DopingProfile(v, c, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	shallow, deep := 0, 0
	for _, p := range prof {
		switch {
		case p.DepthM < 0.95*x0:
			shallow++
			if math.Abs(p.DopingM3/n1-1) > 0.02 {
				t.Errorf("step, shallow side: N(%g m) = %g, want %g", p.DepthM, p.DopingM3, n1)
			}
		case p.DepthM > 1.02*x0:
			deep++
			if math.Abs(p.DopingM3/n2-1) > 0.02 {
				t.Errorf("step, deep side: N(%g m) = %g, want %g", p.DepthM, p.DopingM3, n2)
			}
		}
	}
	if shallow < 10 || deep < 10 {
		t.Errorf("profile points: %d shallow, %d deep", shallow, deep)
	}
}

// The four-parameter model is strongly correlated (Vbi, m, Cpar), so 0.2 %
// capacitance noise is used, the level of a bench LCR meter (common
// practice); the fitted minimum must lie within 4 standard errors of the
// truth and Vbi within 50 mV (task criterion).
func TestFitJunctionCV(t *testing.T) {
	truth := JunctionCV{50e-12, 0.75, 0.45, 2e-12}
	rng := rand.New(rand.NewPCG(9, 9))
	var v, c []float64
	for k := 0; k <= 120; k++ {
		x := -10 + 0.085*float64(k)
		v = append(v, x)
		c = append(c, truth.Capacitance(x)*(1+0.002*rng.NormFloat64()))
	}
	f, err := FitJunctionCV(v, c, CVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	p := f.Params
	if math.Abs(p.BuiltInPotentialV-0.75) > 0.05 || math.Abs(p.GradingCoefficient/0.45-1) > 0.05 ||
		math.Abs(p.ZeroBiasCapacitanceF/50e-12-1) > 0.05 || math.Abs(p.ParasiticCapacitanceF-2e-12) > 1e-12 ||
		math.Abs(p.BuiltInPotentialV-0.75) > 4*f.StdErr.BuiltInPotentialV || math.Abs(p.GradingCoefficient-0.45) > 4*f.StdErr.GradingCoefficient {
		t.Errorf("fit %+v se %+v, truth %+v", p, f.StdErr, truth)
	}
	if f.RMSRelResidual > 0.003 || !(f.StdErr.BuiltInPotentialV > 0) {
		t.Errorf("rms %g se %+v", f.RMSRelResidual, f.StdErr)
	}
	// Fixed parasitic and grading: only Cj0 and Vbi are fitted.
	f, err = FitJunctionCV(v, c, CVOptions{FixParasitic: true, ParasiticF: 2e-12, FixGrading: true, Grading: 0.45})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.Params.BuiltInPotentialV-0.75) > 0.02 || !math.IsNaN(f.StdErr.GradingCoefficient) {
		t.Errorf("fixed fit %+v se %+v", f.Params, f.StdErr)
	}
}

func TestCVErrors(t *testing.T) {
	g := CVGeometry{AreaM2: 1e-6, PermittivityFm: 1e-10}
	v := []float64{-3, -2, -1, 0}
	c := []float64{1e-12, 1.1e-12, 1.3e-12, 1.6e-12}
	checks := []struct {
		name string
		err  error
	}{
		{"zero area", func() error { _, e := MottSchottky(v, c, CVGeometry{PermittivityFm: 1}, Window{}); return e }()},
		{"length", func() error { _, e := MottSchottky(v, c[:2], g, Window{}); return e }()},
		{"wrong sign", func() error {
			_, e := MottSchottky([]float64{0, -1, -2, -3}, c, g, Window{})
			return e
		}()},
		{"few points", func() error { _, e := MottSchottky(v, c, g, Window{-1.5, 0.5}); return e }()},
		{"profile window", func() error { _, e := DopingProfile(v, c, g, 5); return e }()},
		{"grading", func() error { _, e := FitJunctionCV(v, c, CVOptions{FixGrading: true}); return e }()},
		{"zero slope", func() error { _, e := DopingFromSlope(0, g); return e }()},
	}
	for _, ch := range checks {
		var ie *InputError
		if !errors.As(ch.err, &ie) || !errors.Is(ch.err, ErrInput) {
			t.Errorf("%s: got %v, want an *InputError", ch.name, ch.err)
		}
	}
}

func TestAnalyzeReverse(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e7}
	var v, i []float64
	for k := 0; k <= 275; k++ {
		x := -5 + 0.02*float64(k)
		v = append(v, x)
		i = append(i, d.Current(x, vt))
	}
	r, err := AnalyzeReverse(v, i, ReverseOptions{BiasV: -2.4})
	if err != nil {
		t.Fatal(err)
	}
	// Model leakage at -2.4 V (computed from the model directly); the
	// interpolation between samples is exact for the linear shunt part.
	if want := d.Current(-2.4, vt); math.Abs(r.LeakageCurrentA/want-1) > 1e-3 {
		t.Errorf("leakage %g, want %g", r.LeakageCurrentA, want)
	}
	// dI/dV at 0 = Is/(n Vt) + 1/Rsh for the single-diode model
	// (differentiating the model equation; Rs negligible here).
	want := 1 / (1e-12/(1.5*vt) + 1/1e7)
	if math.Abs(r.ShuntResistanceOhm/want-1) > 0.01 {
		t.Errorf("R0 = %g, want %g", r.ShuntResistanceOhm, want)
	}
	if _, err := AnalyzeReverse(v, i, ReverseOptions{BiasV: -20}); !errors.Is(err, ErrInput) {
		t.Errorf("extrapolation must fail: %v", err)
	}
	if _, err := AnalyzeReverse(v, i, ReverseOptions{BiasV: 1}); !errors.Is(err, ErrInput) {
		t.Errorf("positive bias must fail: %v", err)
	}
}
