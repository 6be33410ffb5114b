package extract

import (
	"context"
	"math"
	"testing"

	"junco/physics"
)

// refEval is the per-point reference: the current from SingleDiode.Current
// (physics.LambertW0Exp at every point) and the gradient by implicit
// differentiation with exp(Vd/(n Vt)) computed directly (the form the fit
// used before the per-evaluation evaluator).
type refEval struct {
	vt float64
	d  SingleDiode
}

func (e *refEval) prepare(d SingleDiode) { e.d = d }
func (e *refEval) grad(_ int, v float64, g *[4]float64) float64 {
	return refGrad(e.d, v, e.vt, g)
}
func (e *refEval) current(_ int, v float64) float64 { return e.d.Current(v, e.vt) }
func (e *refEval) gradLast(_ int, v float64, g *[4]float64) float64 {
	return refGrad(e.d, v, e.vt, g)
}

func refGrad(d SingleDiode, v, vt float64, g *[4]float64) float64 {
	i := d.Current(v, vt)
	is, rs, rsh, n := d.SaturationCurrentA, d.SeriesResistanceOhm, d.ShuntResistanceOhm, d.IdealityFactor
	a := n * vt
	vd := v - i*rs
	e := math.Exp(vd / a)
	gd := is*e/a + 1/rsh
	den := 1 + rs*gd
	g[0] = is * (e - 1) / den
	g[1] = n * (-is * e * vd / (a * n)) / den
	g[2] = rs * (-i * gd) / den
	g[3] = rsh * (-vd / (rsh * rsh)) / den
	return i
}

// The per-evaluation single-diode evaluator agrees with the reference
// (the explicit Lambert-W solution of Ortiz-Conde et al. 2000) to 1e-12
// relative in I (of I + Is, the size of the terms that cancel near V = 0)
// and 1e-9 of the largest derivative, from a cold start, a
// warm start by the previous evaluation (parameters changed by 30 %) and
// with Rs = 0 and no shunt; extreme arguments (W of e^-800 and e^400).
func TestSingleEvalMatchesGrad(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	vs := []float64{-0.5, 1e-4, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 1.2, 3, 20}
	cases := []SingleDiode{
		{1e-12, 1.5, 10, 1e6},
		{1e-12, 1.5, 10, math.Inf(1)},
		{1e-12, 1.5, 0, 1e6},
		{3e-9, 1.9, 0.05, 200},
		{1e-20, 1.0, 1e3, 1e9},
	}
	for _, d := range cases {
		e := newSingleEval(len(vs), vt)
		for pass, scale := range []float64{1, 1.3, 1.3} {
			dd := d
			dd.SaturationCurrentA *= scale
			dd.SeriesResistanceOhm *= scale
			e.prepare(dd)
			for n, v := range vs {
				var g, gr [4]float64
				got := e.grad(n, v, &g)
				want := refGrad(dd, v, vt, &gr)
				// near V = 0 both forms cancel terms of size Is
				if math.Abs(got-want) > 1e-12*(math.Abs(want)+dd.SaturationCurrentA) {
					t.Errorf("%+v pass %d V=%g: I %g, want %g", dd, pass, v, got, want)
				}
				big := 0.0
				for k := range gr {
					big = math.Max(big, math.Abs(gr[k]))
				}
				for k := range g {
					if math.Abs(g[k]-gr[k]) > 1e-9*big+1e-30 {
						t.Errorf("%+v pass %d V=%g: dI/dln p[%d] %g, want %g", dd, pass, v, k, g[k], gr[k])
					}
				}
			}
		}
	}
	for _, y := range []float64{-800, -40, -1, 0, 1, 30, 400} {
		for _, w0 := range []float64{0, 1e-3, 1, 50} {
			got, want := lambertW(y, w0), physics.LambertW0Exp(y)
			// identity w + ln w = y (Corless et al. 1996, eq. 1.5)
			if math.Abs(got-want) > 1e-14*want {
				t.Errorf("lambertW(%g, start %g) = %g, want %g", y, w0, got, want)
			}
		}
	}
}

// A fit with the fast evaluator gives the same parameters, standard errors
// and RMS (to 1e-6 relative) as the per-point reference, on the recovery
// curves like those of TestFitIVSingleRecovers (invented data, 1.5 %
// noise; Rsh held at +Inf where the curve has no shunt); the RMS
// from the final residuals equals sqrt(mean(ln(I_model/I)^2)) recomputed
// from the fitted model.
func TestFitSingleFastMatchesReference(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	for _, d := range []SingleDiode{
		{1e-12, 1.5, 10, 1e6},
		{1e-12, 1.5, 10, math.Inf(1)},
		{2e-10, 1.8, 2, 5e4},
		{1e-14, 1.05, 0.5, 1e8},
	} {
		v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.05, 0.9, 200, 0.015, 3)
		pts, _ := forwardPoints(v, i, Window{})
		w := make([]float64, len(pts.v))
		for k := range w {
			w[k] = 1 / math.Sqrt(1+math.Pow(1e-13/(0.01*pts.i[k]), 2))
		}
		free := [4]bool{true, true, true, true}
		start := SingleDiode{d.SaturationCurrentA * 3, d.IdealityFactor * 1.1, 1, 1e5}
		if math.IsInf(d.ShuntResistanceOhm, 1) {
			// no shunt: Rsh is held at +Inf (a free Rsh is not determined
			// by the data, any large value gives the same cost)
			free[3], start.ShuntResistanceOhm = false, d.ShuntResistanceOhm
		}
		fast, err := fitLog[SingleDiode](context.Background(), pts, w, start, free, 200, newSingleEval(len(pts.v), vt), singleNames())
		if err != nil {
			t.Fatal(err)
		}
		ref, err := fitLog[SingleDiode](context.Background(), pts, w, start, free, 200, &refEval{vt: vt}, singleNames())
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k < 4; k++ {
			a, b := *fast.d.slot(k), *ref.d.slot(k)
			if math.Abs(a-b) > 1e-6*math.Abs(b) {
				t.Errorf("%+v: %s %g, reference %g", d, singleName(k), a, b)
			}
			a, b = *fast.se.slot(k), *ref.se.slot(k)
			if free[k] && math.Abs(a-b) > 1e-6*math.Abs(b) {
				t.Errorf("%+v: se %s %g, reference %g", d, singleName(k), a, b)
			}
		}
		s := 0.0
		for k := range pts.v {
			r := math.Log(fast.d.Current(pts.v[k], vt) / pts.i[k])
			s += r * r
		}
		rms := math.Sqrt(s / float64(len(pts.v)))
		if math.Abs(fast.rms-rms) > 1e-9*rms || math.Abs(ref.rms-rms) > 1e-6*rms {
			t.Errorf("%+v: rms %g (reference fit %g), recomputed %g", d, fast.rms, ref.rms, rms)
		}
	}
}

// One Fritsch step from a start within 3e-4 relative of W0(e^y) lands
// within 1e-15 of it (a few rounding units; fourth-order convergence; Fritsch, Shafer & Crowley,
// Commun. ACM 16, 123 (1973)); lambertW stops after such a step.
func TestLambertWOneStep(t *testing.T) {
	for _, y := range []float64{-30, -5, 0, 3, 10, 40, 300} {
		want := physics.LambertW0Exp(y)
		for _, e := range []float64{-3e-4, -1e-4, 1e-4, 3e-4} {
			w := want * (1 + e)
			z := y - w - math.Log(w)
			w1 := 1 + w
			q := 2 * w1 * (w1 + z*(2.0/3))
			w *= 1 + z/w1*(q-z)/(q-2*z)
			if math.Abs(w/want-1) > 1e-15 {
				t.Errorf("y=%g, start off by %g: one step gives %g relative error", y, e, w/want-1)
			}
		}
	}
}

// The third-order prediction of singleEval.solve is within t^4 (plus
// rounding, 2e-15) of W0(e^y) for every W from 1e-13 to 1e3 and |t| up to
// 0.1, so that below |t| = 1e-5 it is W to rounding: checked against
// physics.LambertW0Exp and the defining identity W + ln W = y (Corless et
// al., Adv. Comput. Math. 5, 329 (1996), eq. 1.5). After one evaluation
// that moves y, solve gives W to 2e-15 (2e-16 |y| for y below -10, where W
// is about e^y) whether it refines the prediction or takes it as it is.
func TestSolvePrediction(t *testing.T) {
	for _, y0 := range []float64{-30, -5, -1, 0, 1, 3, 10, 30, 300, 1000} {
		w0 := physics.LambertW0Exp(y0)
		for _, tt := range []float64{-0.1, -1e-2, -1e-3, -1e-5, -3e-7, 0, 1e-9, 2e-6, 9e-6, 1e-4, 1e-2, 0.1} {
			y := y0 + tt*(1+w0)
			e := newSingleEval(1, physics.ThermalVoltage(300))
			e.w[0], e.y[0] = w0, y0
			e.f = lambertForm{inf: true, c0: y, a: 1} // y(v = 0) = y
			got := e.solve(0, 0)
			want := physics.LambertW0Exp(y)
			if math.Abs(got+math.Log(got)-y) > 1e-15*math.Max(1, math.Abs(y)) {
				t.Errorf("y0=%g t=%g: W=%.17g misses W + ln W = y by %g", y0, tt, got, got+math.Log(got)-y)
			}
			// W ~ e^y for y << 0: its relative error is that of y
			if math.Abs(got/want-1) > 2e-15*math.Max(1, math.Abs(y)/10) {
				t.Errorf("y0=%g t=%g: W=%.17g, want %.17g", y0, tt, got, want)
			}
			iw := 1 / (1 + w0)
			f := tt * (1 + tt*iw*(0.5+tt*(1-2*w0)*iw/6))
			if r := math.Abs(w0*(1+f)/want - 1); r > math.Pow(tt, 4)+2e-15 {
				t.Errorf("y0=%g t=%g: prediction off by %g, above t^4", y0, tt, r)
			}
		}
	}
}
