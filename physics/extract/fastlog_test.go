package extract

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestFastLog checks fastLog against the standard library's math.Log
// (fdlibm's e_log.c, under 1 ulp) within 2 ulp over every binary scale of
// the doubles, a dense grid of [0.5, 2), the neighbourhood of 1 where the
// reduction cancels, and random arguments; and the special values. It also
// checks the identity ln(x y) = ln x + ln y to rounding.
func TestFastLog(t *testing.T) {
	worst, at := 0.0, 0.0
	check := func(x float64) {
		got, want := fastLog(x), math.Log(x)
		if got == want {
			return
		}
		ulp := math.Nextafter(math.Abs(want), math.Inf(1)) - math.Abs(want)
		if e := math.Abs(got-want) / ulp; e > worst {
			worst, at = e, x
		}
	}
	for e := -1074.0; e < 1024; e += 0.003 {
		check(math.Pow(2, e))
	}
	for x := 0.5; x < 2; x += 1.0 / (1 << 20) {
		check(x)
	}
	for x := 1 - 1.0/32; x < 1+1.0/32; x += 1.0 / (1 << 24) {
		check(x)
		check(math.Nextafter(x, 0))
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for k := 0; k < 200000; k++ {
		check(math.Float64frombits(rng.Uint64() >> 1)) // any positive double, NaN and Inf included
	}
	if worst > 2 {
		t.Errorf("fastLog differs from math.Log by %.3g ulp at x = %v, want at most 2", worst, at)
	}
	t.Logf("largest difference from math.Log: %.3g ulp (at %v)", worst, at)
	for _, x := range []float64{0, math.Copysign(0, -1), -1, math.Inf(1), math.Inf(-1), math.NaN(), 5e-324, 1, 2, 0.5} {
		got, want := fastLog(x), math.Log(x)
		if !(got == want || math.IsNaN(got) && math.IsNaN(want)) {
			t.Errorf("fastLog(%v) = %v, math.Log gives %v", x, got, want)
		}
	}
	for k := 0; k < 1000; k++ {
		x, y := math.Exp(60*rng.Float64()-30), math.Exp(60*rng.Float64()-30)
		if d := fastLog(x*y) - fastLog(x) - fastLog(y); math.Abs(d) > 1e-13 {
			t.Fatalf("ln(%g %g) - ln %g - ln %g = %g", x, y, x, y, d)
		}
	}
}

func BenchmarkFastLog(b *testing.B) {
	x, s := 1.2345e-7, 0.0
	for b.Loop() {
		s += fastLog(x)
		x *= 1.0000001
	}
	if math.IsNaN(s) {
		b.Fatal(s)
	}
}

func BenchmarkMathLog(b *testing.B) {
	x, s := 1.2345e-7, 0.0
	for b.Loop() {
		s += math.Log(x)
		x *= 1.0000001
	}
	if math.IsNaN(s) {
		b.Fatal(s)
	}
}

// lnOneMinusExp agrees with ln(1 - e^-x) from the standard library to
// 1e-15 relative plus 2e-16 (the rounding of 1 - e^-x) from x = 1e-6 to 700: math.Log(-math.Expm1(-x)) below
// x = 1 and math.Log1p(-math.Exp(-x)) above, each accurate there (no
// cancellation).
func TestLnOneMinusExp(t *testing.T) {
	for x := 1e-6; x < 700; x *= 1.001 {
		want := math.Log1p(-math.Exp(-x))
		if x < 1 {
			want = math.Log(-math.Expm1(-x))
		}
		if got := lnOneMinusExp(x); math.Abs(got-want) > 1e-15*math.Abs(want)+2e-16 {
			t.Fatalf("lnOneMinusExp(%g) = %g, want %g", x, got, want)
		}
	}
}
