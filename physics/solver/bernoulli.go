package solver

import "math"

// Bernoulli returns the Bernoulli function B(x) = x / (e^x - 1), the
// weight of the Scharfetter-Gummel flux.
//
// Evaluation: x / expm1(x), which is accurate to rounding for all x because
// expm1 keeps full relative precision near 0; B(0) = 1 by continuity. For
// x > ~709 the result underflows gracefully to 0 (true value x e^-x); for
// x -> -Inf it tends to -x. Identity: B(-x) = B(x) + x. Source: D. L.
// Scharfetter, H. K. Gummel, IEEE Trans. Electron Devices ED-16, 64 (1969);
// S. Selberherr, Analysis and Simulation of Semiconductor Devices (1984),
// ch. 6 (chapter from memory).
func Bernoulli(x float64) float64 {
	if x == 0 {
		return 1
	}
	return x / math.Expm1(x)
}

// bernoulliDeriv returns dB/dx given x and b = B(x).
//
// Formula: B'(x) = B(x) (1 - B(x) - x) / x (from e^x B(x) = B(x) + x); for
// |x| < 0.05 the Taylor series -1/2 + x/6 - x^3/180 + x^5/5040 - x^7/151200
// (from the Bernoulli-number series of B) avoids the cancellation.
func bernoulliDeriv(x, b float64) float64 {
	if math.Abs(x) < 0.05 {
		x2 := x * x
		return -0.5 + x*(1.0/6+x2*(-1.0/180+x2*(1.0/5040-x2/151200)))
	}
	return b * (1 - b - x) / x
}

// BernoulliDeriv returns dB/dx of Bernoulli, accurate to rounding for all
// finite x (series near 0, closed form elsewhere). Limits: -1/2 at 0, -1
// for x -> -Inf, 0 for x -> +Inf.
func BernoulliDeriv(x float64) float64 { return bernoulliDeriv(x, Bernoulli(x)) }
