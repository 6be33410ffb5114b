package physics

import "math"

// RegionResistance returns the resistance (ohm) of a quasi-neutral region
// of length t (m) and area a (m^2) whose majority carriers have density n
// (m^-3) and mobility mu (m^2/(V s)).
//
// Formula: R = rho t / A with rho = 1/(q n mu) (Sze & Ng 2007, section
// 1.5.1). Valid in low injection: high injection modulates the
// conductivity (not modelled; the estimate is then an upper bound), and
// current crowding and spreading resistance of a real die are ignored.
func RegionResistance(t, a, n, mu float64) float64 { return t / (Q * n * mu * a) }

// solverTolerance is the convergence tolerance of the self-consistent
// junction voltage, V (relative to max(1 V, |Vj|)).
const solverTolerance = 1e-12

// linearStep is the largest final Newton step (V) that the solver takes
// without evaluating the junction again.
const linearStep = 1e-6

// lambertGuess returns a first estimate of the junction voltage for a
// single-exponential diode of saturation current i0 (A) behind rs (ohm) at
// terminal voltage v: the explicit Lambert-W solution
// I = (Vt/Rs) W0((i0 Rs/Vt) exp((V + i0 Rs)/Vt)) - i0 (T. C. Banwell,
// A. Jayakumar, Electron. Lett. 36, 291 (2000)), Vj = V - I Rs, with the
// argument passed in logarithmic form (LambertW0Exp) so it never
// overflows.
func lambertGuess(i0, rs, vt, v float64) float64 {
	y := math.Log(i0*rs/vt) + (v+i0*rs)/vt
	i := vt/rs*LambertW0Exp(y) - i0
	return v - i*rs
}

// solveJunction finds the junction voltage vj with vj + rs i(vj) = v for a
// junction branch current i(vj) = dark(vj) - il that is monotone increasing
// with dark(0) = 0 and a bias-independent photocurrent il >= 0, by Newton
// iteration safeguarded by bisection on a bracket that always contains the
// root ([min(v, 0), max(v, 0) + rs il], cut below at vmin: at its upper end
// i >= -il, at its lower end i <= -il <= 0), starting from guess.
// jf returns the current and an estimate of its derivative. It returns the
// root, the number of iterations and whether it converged within 200
// steps. Bisection halves the bracket whenever Newton leaves it or meets a
// non-finite value, so it converges for any rs >= 0 and any bias.
func solveJunction(v, rs, vmin, il, guess float64, jf func(float64) (float64, float64)) (float64, int, bool) {
	lo, hi := math.Min(v, 0), math.Max(v, 0)+rs*il
	if lo < vmin {
		lo = vmin
	}
	x := guess
	if !(x >= lo && x <= hi) {
		x = 0.5 * (lo + hi)
	}
	for it := 1; it <= 200; it++ {
		i, g := jf(x)
		f := x + rs*i - v
		switch {
		case f > 0 || math.IsInf(f, 1):
			hi = x
		case f < 0 || math.IsInf(f, -1):
			lo = x
		case f == 0:
			return x, it, true
		default: // NaN: treat as too far forward
			hi = x
		}
		tol := solverTolerance * math.Max(1, math.Abs(x))
		step := f / (1 + rs*g)
		if math.Abs(step) <= tol {
			return x, it, true
		}
		if math.Abs(step) <= linearStep {
			// The final Newton step is below 1 uV: take it without a
			// further evaluation (the caller corrects the last evaluated
			// state linearly; quadratic error ~ (step/Vt)^2).
			if nx := x - step; nx >= lo && nx <= hi {
				return nx, it, true
			}
		}
		nx := x - step
		if !(nx > lo && nx < hi) || math.IsNaN(nx) {
			nx = 0.5 * (lo + hi)
		}
		if hi-lo <= tol {
			return nx, it, true
		}
		x = nx
	}
	return x, 200, false
}
