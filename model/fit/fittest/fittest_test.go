package fittest

import (
	"math"
	"strings"
	"testing"
)

// The biases run evenly from From to To, both included; without noise the
// values are the model's; the relative and the absolute noise have the
// asked standard deviation (within 5 % over 20000 draws, common
// practice); Negate changes the sign; the text has Head and one row per
// point in the column's unit.
func TestSweep(t *testing.T) {
	lin := func(v float64) float64 { return 2 * v }
	vs, ys := Sweep{From: -1, To: 1, Points: 5, Model: lin}.Values()
	if len(vs) != 5 || vs[0] != -1 || vs[4] != 1 || vs[2] != 0 {
		t.Errorf("biases %v", vs)
	}
	for k, v := range vs {
		if ys[k] != 2*v {
			t.Errorf("noiseless value at %g: %g", v, ys[k])
		}
	}
	const n = 20000
	one := func(float64) float64 { return 3 }
	for _, c := range []struct {
		s    Sweep
		want float64
	}{
		{Sweep{From: 0, To: 1, Points: n, Model: one, Rel: 0.01, Seed: [2]uint64{1, 2}}, 0.03},
		{Sweep{From: 0, To: 1, Points: n, Model: one, Abs: 0.5, Seed: [2]uint64{3, 4}}, 0.5},
	} {
		_, ys := c.s.Values()
		var sum, sq float64
		for _, y := range ys {
			sum += y
			sq += (y - 3) * (y - 3)
		}
		if sd := math.Sqrt(sq / n); math.Abs(sd/c.want-1) > 0.05 || math.Abs(sum/n-3) > 5*c.want/math.Sqrt(n) {
			t.Errorf("noise: mean %g, deviation %g, want 3 and %g", sum/n, sd, c.want)
		}
	}
	if _, ys := (Sweep{From: 0, To: 1, Points: 2, Model: one, Negate: true}).Values(); ys[0] != -3 {
		t.Errorf("Negate: %v", ys)
	}
	text := Sweep{Head: "V,I (mA)\n", From: 0, To: 1, Points: 2, Model: lin, Scale: 1e3, Row: "%.1f,%.0f,0\n"}.Text()
	if text != "V,I (mA)\n0.0,0,0\n1.0,2000,0\n" || strings.Count(text, "\n") != 3 {
		t.Errorf("text %q", text)
	}
}
