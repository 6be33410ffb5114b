package model

import (
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"testing"

	"junco/physics"
)

var updateLitGolden = flag.Bool("update-lit-golden", false, "rewrite testdata/lit_forward_golden.json from the current model")

// litDemo is the demo junction (invented, DemoJunction) lit as a
// photodiode: 650 nm at 1 mW/cm^2 entering the p side with an absorption
// coefficient of 3e3 /cm (an illustrative value, from memory of Si near
// 650 nm; not a tested property), plus a uniform generation of 1e18
// cm^-3 s^-1, so that both depletion-region parts exist.
func litDemo() Spec {
	s := DemoJunction().Spec
	s.Light = Light{Wavelength: 650e-9, PowerDensity: 10, Absorption: 3e5, Generation: 1e24}
	return s
}

// litGoldenBiases are the biases (V) at which the avalanche multiplication
// of the photocurrent must change nothing: zero and forward bias.
var litGoldenBiases = []float64{0, 0.2, 0.4, 0.55, 0.7}

// Every result of the lit demo at zero and forward bias is unchanged by
// the multiplication of the photocurrent: testdata/lit_forward_golden.json
// holds the values the model gave before the multiplication was added
// (written with -update-lit-golden from the code of that commit), and every
// key in it must be reproduced to 1e-12 relative (identity: the junction
// voltage is >= 0 at these biases, where every factor is 1). New keys are
// allowed; missing ones are not.
func TestLitForwardResultsUnchanged(t *testing.T) {
	path := filepath.Join("testdata", "lit_forward_golden.json")
	now := map[string]map[string]float64{}
	for _, v := range litGoldenBiases {
		s := litDemo()
		s.Bias = v
		r, err := Evaluate(s)
		if err != nil {
			t.Fatal(err)
		}
		m := map[string]float64{}
		for _, q := range r.Quantities {
			if !math.IsNaN(q.Value) && !math.IsInf(q.Value, 0) {
				m[q.Key] = q.Value
			}
		}
		now[strconv.FormatFloat(v, 'g', -1, 64)] = m
	}
	if *updateLitGolden {
		b, err := json.MarshalIndent(now, "", " ")
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, b, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var old map[string]map[string]float64
	if err := json.Unmarshal(b, &old); err != nil {
		t.Fatal(err)
	}
	if len(old) != len(litGoldenBiases) {
		t.Fatalf("golden holds %d biases, want %d", len(old), len(litGoldenBiases))
	}
	n := 0
	for bias, keys := range old {
		for k, want := range keys {
			got, ok := now[bias][k]
			if !ok {
				t.Errorf("%s V: %s missing (was %g)", bias, k, want)
				continue
			}
			if math.Abs(got-want) > 1e-12*math.Abs(want) {
				t.Errorf("%s V: %s = %.15g, was %.15g", bias, k, got, want)
			}
			n++
		}
	}
	if n < 50*len(litGoldenBiases) {
		t.Errorf("only %d values compared", n)
	}
}

// quantity returns the quantity with key k of r.
func quantity(t *testing.T, r *Result, k string) Quantity {
	t.Helper()
	for _, q := range r.Quantities {
		if q.Key == k {
			return q
		}
	}
	t.Fatalf("no %s", k)
	return Quantity{}
}

// Near breakdown the lit results at the bias carry the avalanche gain
// (photocurrent_at_bias_A = photocurrent_gain x photocurrent_A, the gain
// above 1 and rising towards VB, as M does: Sze & Ng 2007, section 2.4.1),
// the near-breakdown flag and the safety caution; photocurrent_A (at short
// circuit) keeps its value, and it and the lit figures (read at zero and
// forward bias) carry neither flag.
func TestLitResultsNearBreakdown(t *testing.T) {
	s := litDemo()
	s.Bias = 0
	r0 := evaluateOK(t, s)
	vb := r0.Static.Breakdown.Voltage
	il := quantity(t, r0, "photocurrent_A")
	if slices.Contains(il.Flags, FlagCaution) || slices.Contains(il.Flags, physics.FlagNearBreakdown) {
		t.Errorf("0 V: photocurrent flagged %v", il.Flags)
	}
	prev := 1.0
	for _, x := range []float64{0.5, 0.9, 0.99} {
		s.Bias = -x * vb
		r := evaluateOK(t, s)
		at, g := quantity(t, r, "photocurrent_at_bias_A"), quantity(t, r, "photocurrent_gain")
		if math.Abs(at.Value-g.Value*il.Value) > 1e-12*at.Value || !(g.Value > prev) {
			t.Errorf("%g VB: photocurrent %g A, gain %g (previous %g), IL %g A", x, at.Value, g.Value, prev, il.Value)
		}
		if v, _ := r.Get("photocurrent_A"); v != il.Value {
			t.Errorf("%g VB: photocurrent_A %g, at 0 V %g", x, v, il.Value)
		}
		for _, q := range []Quantity{at, g} {
			if !slices.Contains(q.Flags, physics.FlagNearBreakdown) || !slices.Contains(q.Flags, FlagCaution) {
				t.Errorf("%g VB: %s flags %v", x, q.Key, q.Flags)
			}
		}
		// Collected at short circuit or read at zero and forward bias:
		// not multiplied, so neither flag.
		for _, k := range []string{"photocurrent_A", "photocurrent_n_region_A", "short_circuit_current_A", "fill_factor"} {
			if q := quantity(t, r, k); slices.Contains(q.Flags, physics.FlagNearBreakdown) || slices.Contains(q.Flags, FlagCaution) {
				t.Errorf("%g VB: %s flags %v", x, k, q.Flags)
			}
		}
		prev = g.Value
	}
}

// The solver has no impact ionisation: near the analytic breakdown its
// current is not multiplied, the numeric result says so
// (FlagNumericNoMultiplication, with the caution) and Compare leaves the
// current out (Relative NaN, not flagged) instead of reporting the gain as
// a model difference. A p+n Si junction at 1e17 cm^-3 (VB about 14 V)
// keeps the solve short.
func TestNumericNotMultiplied(t *testing.T) {
	s := DefaultSpec()
	s.AcceptorDensity, s.DonorDensity = 1e18*perCm3, 1e17*perCm3
	a := evaluateOK(t, s)
	vb := a.Static.Breakdown.Voltage
	s.Bias = -0.95 * vb
	a = evaluateOK(t, s)
	if !nearBreakdown(a.Point) {
		t.Fatalf("analytic point at 0.95 VB not near breakdown: M %g, %g", a.Point.Mn, a.Point.Mp)
	}
	r := solveOK(t, s, NumericSpec{})
	if !hasFlag(r.Flags, FlagNumericNoMultiplication) || !hasFlag(r.Flags, FlagCaution) {
		t.Errorf("flags %v", r.Flags)
	}
	for _, d := range Compare(a, r) {
		if d.Key == "current_A" && (!math.IsNaN(d.Relative) || d.Flagged) {
			t.Errorf("current compared near breakdown: %+v", d)
		}
	}
	s.Bias = -0.1 * vb
	if r := solveOK(t, s, NumericSpec{}); hasFlag(r.Flags, FlagNumericNoMultiplication) {
		t.Errorf("flagged at 0.1 VB: %v", r.Flags)
	}
}
