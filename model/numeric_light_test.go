package model

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"testing"
)

// litStep is a silicon 1e16/1e16 cm^-3 step with ideal analytic effects,
// quasi-neutral widths 3 um (p, illuminated) and 200 um (n), and the
// given light.
func litStep(l Light) Spec {
	s := idealStep(1e16, 1e16, 0)
	s.PWidth, s.NWidth = 3*um, 200*um
	s.ElectronLifetime, s.HoleLifetime = 1e-6, 1e-6
	s.Light = l
	return s
}

// The numeric lit figures beside the analytic ones, like every compared
// quantity: the analytic values are physics.JunctionPhotocurrent (Hovel
// 1975; Sze & Ng 2007, ch. 13) with the Shockley dark current, read off by
// physics.LitFiguresOf; the numeric ones the drift-diffusion lit I-V read
// off by the same function. Each must agree within CompareTolerance (5 %
// Isc and Pmax, 2 % Voc and FF) for an ideal junction in low injection,
// and Voc must lie where the numeric current changes sign (a direct check
// of the search on the solver's curve).
func TestNumericLitFigures(t *testing.T) {
	for _, l := range []Light{
		{Generation: 1e24},
		{Wavelength: 600e-9, PowerDensity: 10, Absorption: 5e5}, // invented absorption (test value, not a material's)
	} {
		spec := litStep(l)
		a := evaluateOK(t, spec)
		r := solveOK(t, spec, NumericSpec{})
		if !r.Lit {
			t.Fatal("the numeric result of a lit Spec must be lit")
		}
		lit := map[string]bool{}
		for _, k := range litCompareKeys() {
			lit[k] = true
		}
		seen := map[string]bool{}
		for _, d := range Compare(a, r) {
			seen[d.Key] = true
			if !lit[d.Key] {
				continue
			}
			if d.Flagged || math.IsNaN(d.Relative) {
				t.Errorf("%+v %s: analytic %.6g, numeric %.6g (%.2f %%, tolerance %.0f %%)", l, d.Key, d.Analytic, d.Numeric, 100*d.Relative, 100*d.Tolerance)
			}
			t.Logf("%+v %s: analytic %.6g, numeric %.6g (%+.3f %%)", l, d.Key, d.Analytic, d.Numeric, 100*d.Relative)
		}
		for _, k := range litCompareKeys() {
			if !seen[k] {
				t.Errorf("Compare lacks %s for a lit Spec", k)
			}
		}
		// The numeric Voc is a zero of the numeric current.
		s := spec
		s.Bias = r.LitFigures.Voc
		at := solveOK(t, s, NumericSpec{})
		if rel := math.Abs(at.Current) / r.LitFigures.Isc; !(rel <= 1e-5) {
			t.Errorf("%+v: I(Voc = %.6f V) = %.3g A, %.2g of Isc", l, s.Bias, at.Current, rel)
		}
		// The JSON carries the lit keys, analytic and difference.
		var m map[string]any
		if err := json.Unmarshal(NumericJSON(r, a), &m); err != nil {
			t.Fatal(err)
		}
		if _, ok := m["open_circuit_voltage_V"]; !ok {
			t.Error("NumericJSON lacks open_circuit_voltage_V")
		}
		if d, ok := m["difference"].(map[string]any); !ok || d["fill_factor"] == nil {
			t.Errorf("NumericJSON difference lacks fill_factor: %v", m["difference"])
		}
	}
}

// A dark Spec has no lit quantities (nothing is invented in the dark).
func TestNumericDarkHasNoLitFigures(t *testing.T) {
	spec := litStep(Light{})
	r := solveOK(t, spec, NumericSpec{})
	for _, q := range NumericQuantities(r) {
		if q.Group == GroupLight {
			t.Errorf("dark result has %s", q.Key)
		}
	}
	if len(Compare(evaluateOK(t, spec), r)) != len(compareKeys(false)) {
		t.Error("dark Compare must have the dark keys only")
	}
}

// Internal quantum efficiency against wavelength, analytic
// (physics.JunctionPhotocurrent: Hovel 1975 as given in Sze & Ng 2007,
// ch. 13) and numeric (the solver at short circuit), for absorption
// lengths from 0.05 um to 1 mm. The wavelengths and absorption
// coefficients are invented test values (not a material's table). Checks:
// the two IQEs within 5 % (the acceptance of the solver's photocurrent
// against the closed forms); 0 < IQE <= 1 (collected pairs cannot exceed
// the absorbed photons: conservation); the IQE is lowest for the most
// strongly absorbed light, whose pairs are born next to the ohmic
// illuminated contact.
func TestQuantumEfficiency(t *testing.T) {
	spec := litStep(Light{})
	wl := []float64{400e-9, 500e-9, 700e-9, 900e-9, 1000e-9}
	alpha := []float64{2e7, 1e6, 1e5, 1e4, 1e3} // invented, 1/m
	tab, err := QuantumEfficiency(context.Background(), spec, NumericSpec{}, wl, alpha, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(tab.Points) != len(wl) || tab.PowerDensity != DefaultQEPowerDensity || tab.Side != "p" {
		t.Fatalf("table %+v", tab)
	}
	for i, p := range tab.Points {
		if e := rel(p.Numeric, p.Analytic); !(e <= 0.05) {
			t.Errorf("lambda %g nm: IQE numeric %.5f, analytic %.5f (%.2f %%)", p.Wavelength*1e9, p.Numeric, p.Analytic, 100*e)
		}
		for _, v := range []float64{p.Numeric, p.Analytic} {
			if !(v > 0 && v <= 1) {
				t.Errorf("lambda %g nm: IQE %g outside (0, 1]", p.Wavelength*1e9, v)
			}
		}
		if i > 0 && !(p.Numeric > tab.Points[0].Numeric) {
			t.Errorf("the most strongly absorbed light must have the lowest IQE: %g at %g nm, %g at %g nm", tab.Points[0].Numeric, wl[0]*1e9, p.Numeric, wl[i]*1e9)
		}
		t.Logf("lambda %4.0f nm, alpha %.0e 1/m: IQE analytic %.5f, numeric %.5f (%+.2f %%; %d nodes)", p.Wavelength*1e9, p.Absorption, p.Analytic, p.Numeric, 100*(p.Numeric/p.Analytic-1), p.Nodes)
	}
	var m map[string]any
	if err := json.Unmarshal(tab.JSON(), &m); err != nil {
		t.Fatalf("JSON: %v\n%s", err, tab.JSON())
	}
	if qe, ok := m["quantum_efficiency"].([]any); !ok || len(qe) != len(wl) {
		t.Errorf("JSON quantum_efficiency: %v", m["quantum_efficiency"])
	}
}

// Bad lists: errors naming the field, the value and the range.
func TestQuantumEfficiencyBadInput(t *testing.T) {
	spec := litStep(Light{})
	for _, c := range []struct {
		wl, alpha []float64
		field     string
	}{
		{nil, nil, FieldQE},
		{[]float64{500e-9}, []float64{1e5, 1e6}, FieldQE},
		{[]float64{500e-9, 1e-3}, []float64{1e5, 1e5}, "qe[1].wavelength"},
		{[]float64{500e-9}, []float64{0}, "qe[0].absorption"},
		{[]float64{500e-9}, []float64{-3}, "qe[0].absorption"},
	} {
		_, err := QuantumEfficiency(context.Background(), spec, NumericSpec{}, c.wl, c.alpha, nil)
		var ve *ValidationError
		if !errors.As(err, &ve) || ve.Fields[0].Field != c.field {
			t.Errorf("%v %v: error %v, want a ValidationError on %s", c.wl, c.alpha, err, c.field)
		}
	}
}

// BenchmarkNumericLitFigures times the search for Isc, Voc and the
// maximum-power point on the solver's lit I-V (about 80 solves along one
// continuation path).
func BenchmarkNumericLitFigures(b *testing.B) {
	spec := litStep(Light{Generation: 1e24})
	_, s, err := numericBuild(spec, NumericSpec{}, 0)
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if _, err := numericLitFigures(context.Background(), s, spec.Area); err != nil {
			b.Fatal(err)
		}
	}
}
