package model

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"junco/physics"
)

// matrixCell is one point of the analytic-numeric consistency matrix.
type matrixCell struct {
	mat      string
	temp     float64
	na, nd   float64 // m^-3
	bias     float64 // V
	kind     string  // "zero", "reverse", "forward"
	oneSided bool    // doping ratio >= 100
}

func (c matrixCell) String() string {
	return fmt.Sprintf("%s %g K Na %.0e Nd %.0e cm^-3 %s %.3f V", c.mat, c.temp, c.na/perCm3, c.nd/perCm3, c.kind, c.bias)
}

// matrixCells builds the grid: Si, Ge, GaAs, 4H-SiC; 300 K and one other
// temperature (400 K; Ge 250 K, where 1e15 cm^-3 is still extrinsic);
// symmetric 1e15 and 1e17 cm^-3 and one-sided 1e19/1e15 (p+n) and
// 1e16/1e18 (n+p) cm^-3; 0 V, -2 V and a low forward bias, the bias at
// which the minority density at the lighter side's edge reaches 1e-3 of
// its doping by the law of the junction (at most Vbi - 10 kT/q).
func matrixCells(t *testing.T) []matrixCell {
	var out []matrixCell
	for _, mt := range []struct {
		mat   string
		temps []float64
	}{{"si", []float64{300, 400}}, {"ge", []float64{300, 250}}, {"gaas", []float64{300, 400}}, {"4h-sic", []float64{300, 400}}} {
		m, err := physics.MaterialByName(mt.mat)
		if err != nil {
			t.Fatal(err)
		}
		for _, temp := range mt.temps {
			for _, d := range [][2]float64{{1e15, 1e15}, {1e17, 1e17}, {1e19, 1e15}, {1e16, 1e18}} {
				na, nd := d[0]*perCm3, d[1]*perCm3
				light := math.Min(na, nd)
				ni, vt := m.Ni(temp), physics.ThermalVoltage(temp)
				vbi := physics.BuiltInPotential(na, nd, ni, temp)
				vf := math.Min(vt*math.Log(1e-3*light*light/(ni*ni)), vbi-10*vt)
				one := math.Max(na, nd)/light >= 100
				for _, b := range []struct {
					v    float64
					kind string
				}{{0, "zero"}, {-2, "reverse"}, {vf, "forward"}} {
					out = append(out, matrixCell{mt.mat, temp, na, nd, b.v, b.kind, one})
				}
			}
		}
	}
	return out
}

// matrixBGN returns the band-gap narrowing of the two sides (eV) that the
// solver puts into its electrostatic barrier and `calc` still leaves out
// (physics.BandGapNarrowing, the Spec's default model; 0 without
// parameters).
func matrixBGN(m *physics.Material, na, nd float64) float64 {
	bm, _ := physics.ParseBGNModel("")
	dp, _ := physics.BandGapNarrowing(m, bm, na)
	dn, _ := physics.BandGapNarrowing(m, bm, nd)
	return dp + dn
}

// The analytic model (Evaluate, the `calc` path, every effect on) and the
// drift-diffusion solver (Solve) side by side over the grid of
// matrixCells, with the tolerance of each quantity and the reason for it.
// Cells outside the analytic model's validity are listed, not asserted.
//
//   - Vbi: within 2 mV plus half the band-gap narrowing of the two sides
//     (Sze & Ng 2007, eq. 2.8 with n_i,eff; `calc` leaves the narrowing
//     out of its electrostatic Vbi: pending analytic fix, issue item 5;
//     tighten to 2 mV after it). With every effect off the two agree to 1
//     mV (TestMatrixIdealBuiltIn).
//   - W and Cj at 0 V (doping ratio below 100) and at -2 V: the depletion
//     approximation against the solver's space-charge width and dQ/dV,
//     within the 2kT/q majority-tail correction (Sze & Ng 2007, section
//     2.2: a factor sqrt(1 - 2kT/(q(Vbi - V)))) plus 2 %, plus 2 % for
//     one-sided steps, whose heavy side spills majority carriers over an
//     ideally abrupt junction (not in the depletion approximation; the
//     solver's value is mesh-converged, TestPeakFieldMeshRefinement). The
//     correction is pending in `calc` (issue item 6): tighten to 2 % after
//     it. One-sided junctions at 0 V are outside the approximation (the
//     spill-over changes Cj by 5-40 %) and only listed.
//   - Current at the low forward bias (minority density 1e-3 of the
//     doping): Si and Ge, where it is the diffusion current, within 3 %
//     (symmetric) and 7 % (doping ratio 100); GaAs and 4H-SiC, where
//     depletion-region recombination is a large share, within 20 % and 30
//     % (`calc` uses the Sah-Noyce-Shockley current with its maximum-rate
//     approximation: a model difference). At doping ratio 1e4 the
//     recombination current of `calc` uses the heavy side's lifetime
//     across the depletion region, which lies in the light side (pending
//     analytic fix, issue item 3): within 80 %, the numeric current below
//     the analytic one; tighten to the ratio-100 tolerances after it.
//   - Reverse (generation) current at -2 V: symmetric within 10 % (Si
//     1e17 cm^-3: 8.4 %, the Sah-Noyce-Shockley integral against the
//     solver's full SRH rate); one-sided within 80 % (the numeric
//     magnitude down to a fifth of the analytic one: Si 1e19/1e15 gives a
//     factor 4.2, the figure of issue item 3) for the same pending
//     lifetime fix.
//
// Measured on this branch before the analytic fixes (largest |difference|
// per group): Vbi 0.0 % (no narrowing) to 4.5 % (Si 1e19/1e15, the
// narrowing); W, Cj and peak field at -2 V 0.5-4.5 %; forward current
// Si/Ge symmetric 1.8 %, GaAs/4H-SiC symmetric 17.6 %, ratio 1e4 -75 %;
// reverse current symmetric 8.4 %, one-sided +76 % (factor 4.2).
func TestAnalyticNumericMatrix(t *testing.T) {
	if testing.Short() {
		t.Skip("the matrix solves ~90 devices")
	}
	for _, c := range matrixCells(t) {
		s := DefaultSpec()
		s.Material, s.Temperature, s.AcceptorDensity, s.DonorDensity, s.Bias = c.mat, c.temp, c.na, c.nd, c.bias
		a, err := Evaluate(s)
		if err != nil {
			t.Errorf("%v: Evaluate: %v", c, err)
			continue
		}
		r, err := Solve(context.Background(), s, NumericSpec{}, nil)
		if err != nil {
			t.Errorf("%v: Solve: %v", c, err)
			continue
		}
		m := a.Static.Device.Material
		vt := a.Static.Vt
		diffs := map[string]Difference{}
		for _, d := range Compare(a, r) {
			diffs[d.Key] = d
		}
		check := func(key string, tol float64, why string) {
			d := diffs[key]
			if !(math.Abs(d.Relative) <= tol) {
				t.Errorf("%v: %s analytic %.5g, numeric %.5g (%+.2f %%), tolerance %.2f %% (%s)", c, key, d.Analytic, d.Numeric, 100*d.Relative, 100*tol, why)
			}
		}
		// Vbi.
		vbiTol := (2e-3 + matrixBGN(m, c.na, c.nd)/2) / diffs["built_in_potential_V"].Analytic
		check("built_in_potential_V", vbiTol, "2 mV + half the narrowing, pending in calc")
		// W and Cj.
		if c.kind != "forward" && !(c.kind == "zero" && c.oneSided) {
			barrier := r.BuiltInPotential - c.bias
			corr := 1/math.Sqrt(1-2*vt/barrier) - 1
			tol := corr + 0.02
			if c.oneSided {
				tol += 0.02
			}
			check("depletion_width_m", tol, "2kT/q correction pending in calc")
			check("junction_capacitance_F", tol, "2kT/q correction pending in calc")
			check("peak_field_V_per_m", tol, "2kT/q correction pending in calc")
		}
		// Currents.
		ratio := math.Max(c.na, c.nd) / math.Min(c.na, c.nd)
		wide := c.mat == "gaas" || c.mat == "4h-sic"
		switch {
		case c.kind == "forward" && ratio >= 1e3:
			check("current_A", 0.8, "depletion-region recombination with the emitter's lifetime in calc, local lifetime pending")
		case c.kind == "forward" && wide:
			tol := 0.20
			if ratio >= 100 {
				tol = 0.30
			}
			check("current_A", tol, "recombination share, SNS maximum-rate approximation in calc")
		case c.kind == "forward":
			tol := 0.03
			if ratio >= 100 {
				tol = 0.07
			}
			check("current_A", tol, "low-injection diffusion current")
		case c.kind == "reverse" && !c.oneSided:
			check("current_A", 0.10, "generation current")
		case c.kind == "reverse":
			check("current_A", 0.8, "generation current, local lifetime pending in calc")
		}
		line := ""
		for _, k := range compareKeys {
			line += fmt.Sprintf(" %s %+.2f%%", k, 100*diffs[k].Relative)
		}
		t.Logf("%v:%s", c, line)
	}
}

// With every effect off, the analytic and numeric built-in potentials of
// the matrix's junctions agree within 1 mV (Sze & Ng 2007, eq. 2.8: both
// are (kT/q) ln(Na Nd / ni^2) for non-degenerate complete ionisation; the
// solver's is the potential difference of its neutral contacts).
func TestMatrixIdealBuiltIn(t *testing.T) {
	seen := map[string]bool{}
	for _, c := range matrixCells(t) {
		k := fmt.Sprint(c.mat, c.temp, c.na, c.nd)
		if seen[k] {
			continue
		}
		seen[k] = true
		s := DefaultSpec()
		s.Material, s.Temperature, s.AcceptorDensity, s.DonorDensity = c.mat, c.temp, c.na, c.nd
		s.Effects = IdealEffects()
		a := evaluateOK(t, s)
		_, sv, err := numericBuild(s, NumericSpec{}, 0)
		if err != nil {
			t.Fatal(err)
		}
		vbi, err := sv.BuiltInPotential()
		if err != nil {
			t.Fatal(err)
		}
		if d := math.Abs(vbi - a.Static.Vbi); d > 1e-3 {
			t.Errorf("%v: Vbi numeric %.5f V, analytic %.5f V", c, vbi, a.Static.Vbi)
		}
	}
}

// The high-frequency C-V (dopant occupation frozen while taking dQ/dV)
// says so in its JSON and lies below the low-frequency one for the deep
// Al acceptor of 4H-SiC, where part of the low-frequency signal charge is
// the occupation change at the depletion edge (an inequality from the
// frozen charge; common practice for deep levels).
func TestNumericCVHighFrequency(t *testing.T) {
	s := DefaultSpec()
	s.Material, s.AcceptorDensity, s.DonorDensity = "4h-sic", 1e17*perCm3, 1e19*perCm3
	s.Effects.NoIonisation = false
	r := Range{From: -10, To: -10, Step: 1}
	lf, err := NumericCV(context.Background(), s, NumericSpec{}, r, nil)
	if err != nil {
		t.Fatal(err)
	}
	hf, err := NumericCV(context.Background(), s, NumericSpec{CVMode: CVHighFrequency}, r, nil)
	if err != nil {
		t.Fatal(err)
	}
	if hf.Mode != CVHighFrequency || !strings.Contains(string(hf.JSON()), `"cv_mode": "high-frequency"`) {
		t.Errorf("mode %q, JSON %s", hf.Mode, hf.JSON())
	}
	c1, c2 := lf.Points[0].Capacitance, hf.Points[0].Capacitance
	if !(c2 < c1 && c2 > 0.8*c1) {
		t.Errorf("high-frequency C %.4g F, low-frequency %.4g F", c2, c1)
	}
}

// The difference table flags only real disagreements: an ideal Si p+n
// step (1e19/1e16 cm^-3) at -5 V, where the depletion approximation holds
// (Sze & Ng 2007, section 2.2), has no flagged electrostatic quantity
// (the former readout flagged the peak field at +31 %, the majority
// dipole of the ideal step), while at 0.7 V on a 1e17/1e16 cm^-3 step,
// 3 kT/q below flat band, where the approximation fails (mobile carriers
// in the depletion region; even with its 2kT/q correction it is 10 % off
// at 0.65 V, TestDepletionForwardBias), the width is flagged.
func TestCompareFlagsRealDisagreements(t *testing.T) {
	s := idealStep(1e19, 1e16, -5)
	for _, d := range Compare(evaluateOK(t, s), solveOK(t, s, NumericSpec{})) {
		if d.Key != "current_A" && d.Flagged {
			t.Errorf("ideal p+n at -5 V: %s flagged at %+.2f %% (tolerance %.0f %%)", d.Key, 100*d.Relative, 100*d.Tolerance)
		}
	}
	s = idealStep(1e17, 1e16, 0.7)
	for _, d := range Compare(evaluateOK(t, s), solveOK(t, s, NumericSpec{})) {
		if d.Key == "depletion_width_m" && !d.Flagged {
			t.Errorf("0.7 V: width %+.2f %% not flagged", 100*d.Relative)
		}
	}
}
