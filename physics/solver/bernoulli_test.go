package solver

import (
	"math"
	"testing"
)

// bernoulliSeries sums B(x) = sum_k B_k x^k / k! with the Bernoulli numbers
// B_0..B_12 (1, -1/2, 1/6, 0, -1/30, 0, 1/42, 0, -1/30, 0, 5/66, 0,
// -691/2730; Abramowitz & Stegun, Handbook of Mathematical Functions,
// Table 23.2), an evaluation independent of expm1, accurate for |x| < 0.5.
func bernoulliSeries(x float64) float64 {
	bk := []float64{1, -0.5, 1.0 / 6, 0, -1.0 / 30, 0, 1.0 / 42, 0, -1.0 / 30, 0, 5.0 / 66, 0, -691.0 / 2730}
	sum, term := 0.0, 1.0
	for k, b := range bk {
		if k > 0 {
			term *= x / float64(k)
		}
		sum += b * term
	}
	return sum
}

// Near zero B must agree with its Taylor series (definition of the
// generating function x/(e^x - 1) = sum B_k x^k/k!).
func TestBernoulliSeriesNearZero(t *testing.T) {
	if Bernoulli(0) != 1 {
		t.Fatalf("B(0) = %v, want 1 (limit of x/(e^x-1))", Bernoulli(0))
	}
	for _, x := range []float64{-0.4, -0.05, -1e-3, -1e-8, -1e-300, 1e-300, 1e-12, 1e-6, 0.01, 0.3, 0.45} {
		got, want := Bernoulli(x), bernoulliSeries(x)
		if math.Abs(got-want) > 4e-16*want {
			t.Errorf("B(%g) = %.17g, series %.17g", x, got, want)
		}
	}
}

// Large arguments: B(x) = x e^-x / (1 - e^-x) for x > 0 and B(x) = -x / (1 -
// e^x) for x < 0 (both rearrangements of the definition, free of
// cancellation there); underflow to 0 and the -x asymptote beyond.
func TestBernoulliLargeArguments(t *testing.T) {
	for _, x := range []float64{5, 30, 50, 200, 700} {
		want := x * math.Exp(-x) / -math.Expm1(-x)
		if got := Bernoulli(x); math.Abs(got-want) > 1e-14*want {
			t.Errorf("B(%g) = %g, want %g", x, got, want)
		}
		wantN := x / -math.Expm1(-x)
		if got := Bernoulli(-x); math.Abs(got-wantN) > 1e-15*wantN {
			t.Errorf("B(%g) = %.17g, want %.17g", -x, got, wantN)
		}
	}
	if b := Bernoulli(1e4); b != 0 || math.IsNaN(b) {
		t.Errorf("B(1e4) = %g, want 0 (underflow of x e^-x)", b)
	}
	if b := Bernoulli(-1e4); b != 1e4 {
		t.Errorf("B(-1e4) = %g, want 1e4 (limit -x)", b)
	}
}

// The identity B(-x) = B(x) + x (from e^x B(x) = B(-x)), checked where its
// right side has no cancellation (x > 0).
func TestBernoulliReflection(t *testing.T) {
	for _, x := range []float64{1e-9, 1e-3, 0.04, 0.06, 0.7, 3, 17, 40} {
		l, r := Bernoulli(-x), Bernoulli(x)+x
		if math.Abs(l-r) > 5e-16*l {
			t.Errorf("B(-%g) = %.17g, B(%g)+%g = %.17g", x, l, x, x, r)
		}
	}
}

// The derivative against a central difference of Bernoulli (step 1e-5,
// error about h^2/6 times the third derivative, < 1e-10) and against the
// series derivative -1/2 + x/6 near 0; both branches must meet at |x| =
// 0.05.
func TestBernoulliDerivative(t *testing.T) {
	for _, x := range []float64{-30, -5, -1, -0.2, -0.051, -0.049, -1e-4, 0, 1e-4, 0.049, 0.051, 0.2, 1, 5, 30} {
		h := 1e-5
		fd := (Bernoulli(x+h) - Bernoulli(x-h)) / (2 * h)
		if got := BernoulliDeriv(x); math.Abs(got-fd) > 1e-9 {
			t.Errorf("B'(%g) = %.12g, central difference %.12g", x, got, fd)
		}
	}
	if d := BernoulliDeriv(0); d != -0.5 {
		t.Errorf("B'(0) = %v, want -1/2 (series)", d)
	}
	for _, x := range []float64{-0.05, 0.05} {
		b := Bernoulli(x)
		closed := b * (1 - b - x) / x // the branch used for |x| >= 0.05
		if series := bernoulliDeriv(x*(1-1e-15), b); math.Abs(series-closed) > 1e-12 {
			t.Errorf("branches disagree at %g: series %.15g, closed form %.15g", x, series, closed)
		}
	}
	if d := BernoulliDeriv(-800); math.Abs(d+1) > 1e-15 {
		t.Errorf("B'(-800) = %g, want -1", d)
	}
	if d := BernoulliDeriv(800); d != 0 {
		t.Errorf("B'(800) = %g, want 0", d)
	}
}
