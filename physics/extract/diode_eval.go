package extract

import (
	"math"

	"junco/physics"
)

// singleEval evaluates the single-diode model and its gradient at every
// point of a fit, once per Levenberg-Marquardt evaluation. It gives the same
// values as SingleDiode.grad (to rounding) at a fraction of the cost:
//
//   - the per-evaluation constants ln(Is Rs Rsh/(a (Rs + Rsh))), a = n Vt, and
//     Rsh/(a (Rs + Rsh)) are formed once per evaluation, not once per point;
//   - W0(e^y) is solved from the previous evaluation's value at the same
//     point, moved to first order in the change of y, by Fritsch's
//     iteration on w + ln w = y (one logarithm a step, fourth-order
//     convergence, usually one step); the first
//     evaluation starts from the previous point's value (the first point
//     from physics.LambertW0Exp);
//   - exp(Vd/(n Vt)) is not computed: the Lambert solution gives
//     Is exp(Vd/(n Vt)) = W a (Rs + Rsh)/(Rs Rsh) directly (substituting
//     Vd = V - I Rs into the model equation gives W + ln W = y with
//     W = Is Rs Rsh exp(Vd/a)/(a (Rs + Rsh))).
//
// Source: Fritsch, Shafer & Crowley, "Algorithm 443: solution of the
// transcendental equation w e^w = x", Commun. ACM 16, 123 (1973); the
// explicit single-diode solution of Ortiz-Conde, García Sánchez & Muci,
// Solid-State Electron. 44, 1861 (2000) (see SingleDiode.Current).
type singleEval struct {
	vt float64
	w  []float64 // W at each point from the previous evaluation; 0 = none
	y  []float64 // its argument: W + ln W = y

	// per-evaluation constants
	d                SingleDiode
	a, c0, c1, isRs  float64 // n Vt; ln(Is Rs k/a); k/a; Is Rs
	ieScale, off     float64 // Is E = W ieScale; I = (a/Rs) W + off(V)
	aRs, invS, isRsh float64 // a/Rs; 1/(Rs+Rsh) (0 for no shunt); Is Rsh/(Rs+Rsh) (Is for no shunt)
	invA, invRsh     float64 // 1/a; 1/Rsh (0 for no shunt)
	closed           bool    // Rs = 0 or non-physical: use SingleDiode.grad
}

func newSingleEval(m int, vt float64) *singleEval {
	return &singleEval{vt: vt, w: make([]float64, m), y: make([]float64, m)}
}

// prepare sets the parameters of the next evaluation.
func (e *singleEval) prepare(d SingleDiode) {
	e.d = d
	is, rs, rsh := d.SaturationCurrentA, d.SeriesResistanceOhm, d.ShuntResistanceOhm
	a := d.IdealityFactor * e.vt
	e.closed = rs == 0 || !(is > 0) || !(a > 0) || !(rs > 0) || !(rsh > 0)
	if e.closed {
		return
	}
	e.a, e.isRs, e.aRs, e.invA, e.invRsh = a, is*rs, a/rs, 1/a, 1/rsh
	if math.IsInf(rsh, 1) {
		e.c0 = math.Log(is * rs / a)
		e.c1 = 1 / a
		e.invS, e.isRsh = 0, is
	} else {
		s := rs + rsh
		e.c0 = math.Log(is * rs * rsh / (a * s))
		e.c1 = rsh / (a * s)
		e.invS, e.isRsh = 1/s, is*rsh/s
	}
	e.ieScale = 1 / (rs * e.c1)
}

// lambertW returns W0(exp(y)), refining w0 (> 0) by Fritsch's iteration
// and falling back to physics.LambertW0Exp when w0 is not usable or the
// iteration does not settle within 6 steps.
func lambertW(y, w0 float64) float64 {
	if !(w0 > 0) || math.IsInf(w0, 0) {
		return physics.LambertW0Exp(y)
	}
	w := w0
	for k := 0; k < 6; k++ {
		z := y - w - math.Log(w)
		w1 := 1 + w
		q := 2 * w1 * (w1 + z*(2.0/3))
		eps := z / w1 * (q - z) / (q - 2*z)
		w *= 1 + eps
		if !(w > 0) || math.IsInf(w, 0) {
			break
		}
		// The error after a step is of the order of eps^4 (fourth-order
		// convergence): 1e-15 relative or less (rounding) after a step with
		// |eps| <= 3e-4 for y from -30 to 300 (TestLambertWOneStep).
		if math.Abs(eps) < 2e-4 {
			return w
		}
	}
	return physics.LambertW0Exp(y)
}

// grad returns I at point n (bias v) and dI/dln(p) for p = Is, n, Rs, Rsh,
// as SingleDiode.grad does.
func (e *singleEval) grad(n int, v float64, g *[4]float64) float64 {
	if e.closed {
		return e.d.grad(v, e.vt, g)
	}
	y := e.c0 + e.c1*(v+e.isRs)
	wp, yp := e.w[n], e.y[n]
	if !(wp > 0) && n > 0 {
		wp, yp = e.w[n-1], e.y[n-1] // first evaluation: the previous point (sorted by V)
	}
	// First-order prediction from the earlier value, dW/dy = W/(1+W)
	// (from W + ln W = y), kept within a factor 2.
	t := (y - yp) / (1 + wp)
	w := lambertW(y, wp*(1+math.Max(-0.5, math.Min(1, t))))
	e.w[n], e.y[n] = w, y
	rs := e.d.SeriesResistanceOhm
	i := e.aRs*w + v*e.invS - e.isRsh
	ie := w * e.ieScale // Is exp(Vd/a)
	vd := v - i*rs
	gd := ie*e.invA + e.invRsh
	f := 1 / (1 + rs*gd)
	g[0] = (ie - e.d.SaturationCurrentA) * f
	g[1] = -ie * vd * e.invA * f
	g[2] = -rs * i * gd * f
	g[3] = -vd * e.invRsh * f
	return i
}
