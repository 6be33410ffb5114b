package physics

import "math"

// LambertW0 returns the principal branch W0(x) of the Lambert W function,
// the solution w >= -1 of w e^w = x, for x >= -1/e.
//
// Method: Halley iteration from a branch-point series (near -1/e), a
// rational start (moderate x) or the asymptotic log form (large x); converges
// to full double precision in at most a few steps. Returns NaN for x < -1/e
// or NaN input, +Inf for +Inf.
// Source: Corless, Gonnet, Hare, Jeffrey, Knuth, "On the Lambert W function",
// Adv. Comput. Math. 5, 329-359 (1996), eqs. 4.19-4.22 (series) and 5.9
// (Halley step).
func LambertW0(x float64) float64 {
	const em1 = 0.36787944117144233 // 1/e, math.Exp(-1)
	switch {
	case math.IsNaN(x) || x < -em1:
		return math.NaN()
	case math.IsInf(x, 1):
		return math.Inf(1)
	case x == 0:
		return 0
	case x == -em1:
		return -1
	}
	var w float64
	switch {
	case x < -0.32:
		// Branch-point series in p = sqrt(2(e x + 1)) (Corless et al. eq. 4.22).
		p := math.Sqrt(2 * (math.E*x + 1))
		w = -1 + p - p*p/3 + 11.0/72*p*p*p
	case x < 3:
		w = math.Log1p(x) * (1 - math.Log1p(math.Log1p(x))/(2+math.Log1p(x)))
	default:
		l1 := math.Log(x)
		l2 := math.Log(l1)
		w = l1 - l2 + l2/l1
	}
	for i := 0; i < 30; i++ {
		ew := math.Exp(w)
		f := w*ew - x
		wp1 := w + 1
		if wp1 == 0 {
			break
		}
		d := f / (ew*wp1 - (w+2)*f/(2*wp1))
		w -= d
		if math.Abs(d) <= 1e-15*(1+math.Abs(w)) {
			break
		}
	}
	return w
}

// LambertW0Exp returns W0(exp(y)) without forming exp(y), so that arguments
// far beyond the float64 range (y up to about 1e300) stay exact.
//
// Method: for y < 20 it evaluates LambertW0(exp(y)) directly; above, Newton
// iteration on w + ln w = y from w = y - ln y. Units: dimensionless.
// Source: the identity W(e^y) + ln W(e^y) = y (Corless et al. 1996, eq. 1.5);
// its use against overflow in diode models is described by Roberts &
// Valluri, arXiv:1601.02679 (2016).
func LambertW0Exp(y float64) float64 {
	if math.IsNaN(y) {
		return math.NaN()
	}
	if y < 20 {
		return LambertW0(math.Exp(y))
	}
	w := y - math.Log(y)
	for i := 0; i < 50; i++ {
		f := w + math.Log(w) - y
		d := f / (1 + 1/w)
		w -= d
		if math.Abs(d) <= 1e-16*w {
			break
		}
	}
	return w
}
