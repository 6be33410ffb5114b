package physics

import (
	"math"
	"testing"
)

// Reference values of W0 from the defining identity and known closed forms
// (Corless et al., Adv. Comput. Math. 5, 329 (1996)): W0(e) = 1, W0(-1/e) = -1,
// W0(0) = 0, W0(2 ln 2) = ln 2 (since ln2 * e^{ln 2} = 2 ln 2), and the omega
// constant W0(1) = 0.5671432904097838 (Corless et al. 1996, section 1).
func TestLambertW0KnownValues(t *testing.T) {
	cases := []struct{ x, w float64 }{
		{0, 0},
		{math.E, 1},
		{-math.Exp(-1), -1},
		{2 * math.Ln2, math.Ln2},
		{1, 0.5671432904097838},
	}
	for _, c := range cases {
		got := LambertW0(c.x)
		if math.Abs(got-c.w) > 1e-12*math.Max(1, math.Abs(c.w)) {
			t.Errorf("W0(%g) = %.16g, want %.16g", c.x, got, c.w)
		}
	}
}

// The identity w e^w = x must hold over the whole principal branch.
func TestLambertW0Identity(t *testing.T) {
	for _, x := range []float64{-0.3678, -0.36, -0.3, -0.1, -1e-8, 1e-300, 1e-10, 0.5, 2, 10, 1e3, 1e10, 1e100, 1e300} {
		w := LambertW0(x)
		got := w * math.Exp(w)
		if math.Abs(got-x) > 1e-12*math.Abs(x)+1e-15 {
			t.Errorf("W0(%g)=%g: w e^w = %g", x, w, got)
		}
	}
	if !math.IsNaN(LambertW0(-0.5)) {
		t.Errorf("W0(-0.5) should be NaN")
	}
}

func TestLambertW0Exp(t *testing.T) {
	for _, y := range []float64{-5, 0, 5, 19.9, 20.1, 50, 700, 1e4, 1e8} {
		w := LambertW0Exp(y)
		if r := w + math.Log(w) - y; math.Abs(r) > 1e-12*math.Max(1, y) {
			t.Errorf("W(e^%g) = %g: residual %g", y, w, r)
		}
		if y < 700 {
			if d := LambertW0(math.Exp(y)); math.Abs(d-w) > 1e-12*w {
				t.Errorf("W(e^%g): log form %g, direct %g", y, w, d)
			}
		}
	}
}
