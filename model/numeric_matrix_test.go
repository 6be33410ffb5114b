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
// its doping by the law of the junction (at most 0.6 Vbi).
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
				vf := math.Min(vt*math.Log(1e-3*light*light/(ni*ni)), 0.6*vbi)
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
//     (Sze & Ng 2007, eq. 2.8 with n_i,eff; `calc` still leaves the
//     narrowing out of its electrostatic Vbi: pending analytic fix, issue
//     item 5; tighten to 2 mV after it). With every effect off the two
//     agree to 1 mV (TestMatrixIdealBuiltIn).
//   - W, Cj and the peak field at -2 V: within 1 % for symmetric
//     junctions (the depletion approximation with its 2kT/q tail
//     correction, Sze & Ng 2007 section 2.2) and 4 % for one-sided ones,
//     whose heavy side spills majority carriers over an ideally abrupt
//     junction (not in the approximation; the solver's value is
//     mesh-converged, TestPeakFieldMeshRefinement). At 0 V: W and the
//     peak field within 1 % and Cj within 2 % for symmetric junctions
//     where ni < 0.01 N (above it the depletion region's own carriers,
//     n = p ~ ni, add to dQ/dV: Ge 1e15 cm^-3 at 300 K, 5.7 %);
//     one-sided junctions at 0 V are outside the approximation (the
//     spill-over changes Cj by 5-33 %) and only listed.
//   - Current at the low forward bias (minority density 1e-3 of the
//     doping, at most 0.6 Vbi): Si and Ge, where it is the diffusion
//     current, within 5 %; GaAs and 4H-SiC, where depletion-region
//     recombination is a large share, within 15 % (`calc` uses the
//     Sah-Noyce-Shockley current with its maximum-rate approximation: a
//     model difference).
//   - Reverse (generation) current at -2 V: within 10 % (symmetric Si
//     1e17 cm^-3 differs by 8.4 % at 300 K and 7.8 % at 400 K, the other
//     cells by at most 3 %; the 8 % is not explained yet).
//
// Measured on this branch after rebasing onto the analytic fixes of main
// (2kT/q tail in W and Cj, local lifetime in the SNS integral), largest
// |difference| per group: Vbi 4.5 % (Si 1e19/1e15 at 400 K, the
// narrowing); W, Cj, peak field at -2 V 0.3 % symmetric, 2.6 % one-sided;
// forward current Si/Ge 3.2 %, GaAs/4H-SiC 12.3 %; reverse current 8.4 %
// (Si 1e17), 3 % elsewhere. Before those fixes the one-sided reverse
// current differed by a factor 4.2 and W at 0 V by the 2kT/q term.
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
		// W, Cj and the peak field.
		ni := m.Ni(c.temp)
		light := math.Min(c.na, c.nd)
		switch {
		case c.kind == "reverse":
			tol := 0.01
			if c.oneSided {
				tol = 0.04
			}
			for _, k := range []string{"depletion_width_m", "junction_capacitance_F", "peak_field_V_per_m"} {
				check(k, tol, "depletion approximation with the 2kT/q tail; one-sided: majority spill-over")
			}
		case c.kind == "zero" && !c.oneSided:
			check("depletion_width_m", 0.01, "depletion approximation with the 2kT/q tail")
			check("peak_field_V_per_m", 0.01, "depletion approximation with the 2kT/q tail")
			if ni < 0.01*light {
				check("junction_capacitance_F", 0.02, "depletion approximation with the 2kT/q tail")
			}
		}
		// Currents.
		wide := c.mat == "gaas" || c.mat == "4h-sic"
		switch {
		case c.kind == "forward" && wide:
			check("current_A", 0.15, "recombination share, SNS maximum-rate approximation in calc")
		case c.kind == "forward":
			check("current_A", 0.05, "low-injection diffusion current")
		case c.kind == "reverse":
			check("current_A", 0.10, "generation current")
		}
		line := ""
		for _, k := range compareKeys(false) {
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

// The solver's neutral regions follow the Spec's dopant-level model: at
// the contacts of a Si diode at 77 K the numeric ionised densities equal
// the analytic model's neutral-region values (physics.Static NdIonised,
// NaIonised; the same Fermi-Dirac occupation, an identity) for both the
// single-level and the lowered model, which differ there by more than 10 %.
func TestNumericIonisationModelFollowsSpec(t *testing.T) {
	var prev float64
	for _, im := range []string{"single-level", "lowered"} {
		s := DefaultSpec()
		s.Temperature, s.AcceptorDensity, s.DonorDensity, s.Bias = 77, 1e16*perCm3, 1e17*perCm3, 0
		s.Effects = IdealEffects()
		s.Effects.NoIonisation = false
		s.Effects.IonisationModel = im
		a := evaluateOK(t, s)
		r := solveOK(t, s, NumericSpec{PLength: 3 * um, NLength: 3 * um})
		nd := r.Solution.NetDoping
		cath, an := nd[len(nd)-1], nd[0]
		if e := rel(cath, a.Static.NdIonised); e > 1e-4 {
			t.Errorf("%s: cathode Nd+ %.6g, analytic %.6g", im, cath, a.Static.NdIonised)
		}
		if e := rel(-an, a.Static.NaIonised); e > 1e-4 {
			t.Errorf("%s: anode Na- %.6g, analytic %.6g", im, -an, a.Static.NaIonised)
		}
		if prev != 0 && rel(cath, prev) < 0.1 {
			t.Errorf("the two models give Nd+ %.4g and %.4g: not a test of the choice", prev, cath)
		}
		prev = cath
	}
}
