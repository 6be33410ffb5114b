package model

import (
	"encoding/json"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"
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
