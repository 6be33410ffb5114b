package extract

import (
	"math"

	"junco/physics"
)

// lambertForm is the explicit single-diode solution of lambertCurrent
// (Rs > 0) split into what depends on the parameters only, formed once,
// and what depends on the bias: the argument y(V) of W0(e^y) and the
// current I(V, W) = (a/Rs) W - J (no shunt) or (a/Rs) W + (V - J Rsh)/S,
// J = Is + Iph, S = Rs + Rsh, with
// y = ln(Is Rs/a) + (V + J Rs)/a (no shunt) or
// y = ln(Is Rs Rsh/(a S)) + Rsh (V + J Rs)/(a S). The arithmetic is that of
// the formulas as written, so values are the same to the last bit.
type lambertForm struct {
	inf                 bool    // no shunt (Rsh = +Inf)
	c0                  float64 // ln(Is Rs/a) or ln(Is Rs Rsh/(a S))
	a, rsh, as, jrs     float64 // a; Rsh; a S; J Rs
	aRs, s, j, jrsh     float64 // a/Rs; S; J; J Rsh
	isExpScale, invA, g float64 // Is exp(Vd/a) = W isExpScale; 1/a; 1/Rsh (0 for no shunt)
}

// newLambertForm prepares the form for Is = is (A), a = n Vt (V), Rs = rs
// (> 0, ohm), Rsh = rsh (ohm, +Inf = none) and photocurrent iph (A); the
// caller has checked the parameters.
func newLambertForm(is, a, rs, rsh, iph float64) lambertForm {
	j := is + iph
	f := lambertForm{a: a, rsh: rsh, jrs: j * rs, aRs: a / rs, j: j, invA: 1 / a, g: 1 / rsh}
	if math.IsInf(rsh, 1) {
		f.inf = true
		f.c0 = math.Log(is * rs / a)
		f.isExpScale = a / rs // W = Is Rs exp(Vd/a)/a
		return f
	}
	f.s = rs + rsh
	f.as = a * f.s
	f.jrsh = j * rsh
	f.c0 = math.Log(is * rs * rsh / (a * f.s))
	f.isExpScale = a * f.s / (rs * rsh) // W = Is Rs Rsh exp(Vd/a)/(a S)
	return f
}

// y is the logarithm of the W argument at bias v.
func (f *lambertForm) y(v float64) float64 {
	if f.inf {
		return f.c0 + (v+f.jrs)/f.a
	}
	return f.c0 + f.rsh*(v+f.jrs)/f.as
}

// current is the terminal current at bias v for w = W0(exp(y(v))).
func (f *lambertForm) current(v, w float64) float64 {
	if f.inf {
		return f.aRs*w - f.j
	}
	return f.aRs*w + (v-f.jrsh)/f.s
}

// singleEval evaluates the single-diode model and its gradient at every
// point of a fit, once per Levenberg-Marquardt evaluation:
//
//   - the parameter-only constants (lambertForm) are formed once per
//     evaluation, not once per point;
//   - W0(e^y) is solved from the previous evaluation's value at the same
//     point, moved to first order in the change of y, by Fritsch's
//     iteration on w + ln w = y (one logarithm a step, fourth-order
//     convergence, usually one step); the first evaluation starts from the
//     previous point's value (the first point from physics.LambertW0Exp);
//   - exp(Vd/(n Vt)) is not computed: substituting Vd = V - I Rs into the
//     model equation gives W + ln W = y with
//     W = Is Rs Rsh exp(Vd/a)/(a (Rs + Rsh)) (W = Is Rs exp(Vd/a)/a without
//     shunt), so Is exp(Vd/a) follows from W.
//
// The derivatives are those of implicit differentiation of
// F = Is (E - 1) + Vd/Rsh - I = 0, E = exp(Vd/a), Vd = V - I Rs:
// dI/dp = (dF/dp)/(1 + Rs g), g = Is E/a + 1/Rsh, returned as dI/dln(p)
// for p = Is, n, Rs, Rsh. Rs = 0 uses the closed form I = Is (E - 1) + V/Rsh.
// Source: Fritsch, Shafer & Crowley, "Algorithm 443: solution of the
// transcendental equation w e^w = x", Commun. ACM 16, 123 (1973); the
// explicit single-diode solution of Ortiz-Conde, García Sánchez & Muci,
// Solid-State Electron. 44, 1861 (2000) (see lambertCurrent).
type singleEval struct {
	vt float64
	w  []float64 // W at each point from the previous evaluation; 0 = none
	y  []float64 // its argument: W + ln W = y

	// per-evaluation parameters
	d      SingleDiode
	f      lambertForm
	closed bool // Rs = 0: closed form
	bad    bool // non-physical parameters: NaN
}

func newSingleEval(m int, vt float64) *singleEval {
	return &singleEval{vt: vt, w: make([]float64, m), y: make([]float64, m)}
}

// prepare sets the parameters of the next evaluation.
func (e *singleEval) prepare(d SingleDiode) {
	e.d = d
	is, rs, rsh := d.SaturationCurrentA, d.SeriesResistanceOhm, d.ShuntResistanceOhm
	a := d.IdealityFactor * e.vt
	e.bad = !(is > 0) || !(a > 0) || !(rs >= 0) || !(rsh > 0)
	e.closed = rs == 0
	if e.bad || e.closed {
		return
	}
	e.f = newLambertForm(is, a, rs, rsh, 0)
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
		z := y - w - fastLog(w)
		w1 := 1 + w
		q := 2 * w1 * (w1 + z*(2.0/3))
		eps := z * (q - z) / (w1 * (q - 2*z))
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

// grad returns I at point n (bias v) and dI/dln(p) for p = Is, n, Rs, Rsh.
func (e *singleEval) grad(n int, v float64, g *[4]float64) float64 {
	if e.bad || e.closed {
		return e.closedGrad(v, g)
	}
	return e.gradAt(v, e.solve(n, v), g)
}

// current returns I at point n (bias v); gradLast then gives its gradient
// from the W found here.
func (e *singleEval) current(n int, v float64) float64 {
	if e.bad || e.closed {
		var g [4]float64
		return e.closedGrad(v, &g)
	}
	return e.f.current(v, e.solve(n, v))
}

// gradLast is grad at the point n where current was last called with
// these parameters: W is not solved again.
func (e *singleEval) gradLast(n int, v float64, g *[4]float64) float64 {
	if e.bad || e.closed {
		return e.closedGrad(v, g)
	}
	return e.gradAt(v, e.w[n], g)
}

// solve returns W0(exp(y(v))) at point n, from the previous evaluation's
// value there (or the previous point's on the first evaluation), and keeps
// it for the next.
func (e *singleEval) solve(n int, v float64) float64 {
	y := e.f.y(v)
	wp, yp := e.w[n], e.y[n]
	if !(wp > 0) && n > 0 {
		wp, yp = e.w[n-1], e.y[n-1] // first evaluation: the previous point (sorted by V)
	}
	// Third-order Taylor prediction from the earlier value: with
	// t = (y - yp)/(1 + W), W(y) = W (1 + t + t^2/(2 (1+W))
	// + t^3 (1 - 2W)/(6 (1+W)^2) + R), from the derivatives of W + ln W = y
	// (dW/dy = W/(1+W), d2W/dy2 = W/(1+W)^3, d3W/dy3 = W (1-2W)/(1+W)^5),
	// the remainder R below t^4 for every W > 0. Where |t| < 1e-5 (R below
	// 1e-20: the prediction is W to rounding; near convergence of a fit about
	// half the points) it is taken as it is; else it starts the iteration,
	// kept within a factor 2.
	iw := 1 / (1 + wp)
	t := (y - yp) * iw
	f := t * (1 + t*iw*(0.5+t*(1-2*wp)*iw*(1.0/6)))
	var w float64
	if math.Abs(t) < 1e-5 && wp > 0 {
		w = wp * (1 + f)
	} else {
		w = lambertW(y, wp*(1+max(-0.5, min(1, f))))
	}
	e.w[n], e.y[n] = w, y
	return w
}

// gradAt is grad for Rs > 0 given w = W0(exp(y(v))).
func (e *singleEval) gradAt(v, w float64, g *[4]float64) float64 {
	f := &e.f
	rs := e.d.SeriesResistanceOhm
	i := f.current(v, w)
	ie := w * f.isExpScale // Is exp(Vd/a)
	vd := v - i*rs
	gd := ie*f.invA + f.g
	k := 1 / (1 + rs*gd)
	g[0] = (ie - e.d.SaturationCurrentA) * k
	g[1] = -ie * vd * f.invA * k
	g[2] = -rs * i * gd * k
	g[3] = -vd * f.g * k
	return i
}

// closedGrad is grad for Rs = 0 (I = Is (E - 1) + V/Rsh) and NaN for
// non-physical parameters.
func (e *singleEval) closedGrad(v float64, g *[4]float64) float64 {
	if e.bad {
		nan := math.NaN()
		*g = [4]float64{nan, nan, nan, nan}
		return nan
	}
	is, rsh := e.d.SaturationCurrentA, e.d.ShuntResistanceOhm
	a := e.d.IdealityFactor * e.vt
	ex := math.Exp(v / a)
	g[0] = is * (ex - 1)
	g[1] = -is * ex * v / a
	g[2] = 0
	g[3] = -v / rsh
	return is*math.Expm1(v/a) + v/rsh
}

// grad returns I(V) and the derivatives dI/dln(p) for p = Is, n, Rs, Rsh
// (in that order) at bias v and thermal voltage vt (see singleEval).
func (d SingleDiode) grad(v, vt float64, g *[4]float64) float64 {
	e := singleEval{vt: vt}
	e.prepare(d)
	if e.bad || e.closed {
		return e.closedGrad(v, g)
	}
	return e.gradAt(v, physics.LambertW0Exp(e.f.y(v)), g)
}
