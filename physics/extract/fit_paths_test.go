package extract

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"junco/physics"
)

// fitLogPerPoint is the least-squares fit as it was before the split of
// residuals and Jacobian: every evaluation, rejected steps included, forms
// the Jacobian, the residual is math.Log(I_model/I), and the model is the
// per-point reference refEval (the explicit Lambert-W solution by
// physics.LambertW0Exp at every point, exp(Vd/(n Vt)) formed directly). It
// is the reference the fast path is held to.
func fitLogPerPoint(pts ivPoints, w []float64, vt float64, d0 SingleDiode, free [4]bool) (singleResult, error) {
	var idx []int
	for k := 0; k < 4; k++ {
		if free[k] {
			idx = append(idx, k)
		}
	}
	p, m := len(idx), len(pts.v)
	theta := make([]float64, p)
	for j, k := range idx {
		theta[j] = math.Log(*d0.slot(k))
	}
	eval := func(th, r, jac []float64) bool {
		d := d0
		for j, k := range idx {
			*d.slot(k) = math.Exp(th[j])
		}
		var g [4]float64
		for n := 0; n < m; n++ {
			c := refGrad(d, pts.v[n], vt, &g)
			if !(c > 0) || math.IsInf(c, 0) {
				return false
			}
			r[n] = w[n] * math.Log(c/pts.i[n])
			if jac != nil {
				for j, k := range idx {
					jac[n*p+j] = w[n] / c * g[k]
				}
			}
		}
		return true
	}
	lr, err := levenberg(context.Background(), lmProblem{m: m, p: p, eval: eval}, theta, 200)
	if err != nil {
		return singleResult{}, err
	}
	out := singleResult{d: d0, free: free, iter: lr.iter, converged: lr.converged}
	ss := 0.0
	for n, rn := range lr.resid {
		ss += (rn / w[n]) * (rn / w[n])
	}
	out.rms = math.Sqrt(ss / float64(m))
	for k := 0; k < 4; k++ {
		*out.se.slot(k) = math.NaN()
	}
	for j, k := range idx {
		val := math.Exp(lr.theta[j])
		*out.d.slot(k) = val
		if lr.cov != nil {
			*out.se.slot(k) = val * math.Sqrt(lr.cov[j*p+j])
		}
	}
	return out, nil
}

// The fast fit path (residuals by fastLog, the Jacobian only where a step
// is taken, W refined from the previous evaluation) gives the parameters,
// standard errors and RMS of the per-point reference path to 1e-6 relative
// over a grid of single diodes spanning the files of the batch speed
// comparison and beyond: Is from 1e-15 to 1e-9 A, n from 1 to 2, Rs from
// 0.5 to 50 ohm, Rsh from 1e4 to 1e7 ohm and none, 1 % noise, 100 points
// from 0.05 to 0.9 V (invented data), wherever every free parameter is
// determined (at least 3 standard errors from zero). The reference is the explicit
// single-diode solution of Ortiz-Conde, Garcia Sanchez & Muci, Solid-State
// Electron. 44, 1861 (2000), evaluated point by point.
func TestFitSinglePathsAgreeOnGrid(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	rng := rand.New(rand.NewPCG(16, 1))
	worst, at, fits := 0.0, "", 0
	for _, is := range []float64{1e-15, 1e-12, 1e-9} {
		for _, n := range []float64{1.0, 1.3, 2.0} {
			for _, rs := range []float64{0.5, 5, 50} {
				for _, rsh := range []float64{1e4, 1e5, 1e7, math.Inf(1)} {
					d := SingleDiode{is, n, rs, rsh}
					v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.05, 0.9, 100, 0.01, rng.Uint64())
					pts, _ := forwardPoints(v, i, Window{})
					w := make([]float64, len(pts.v))
					for k := range w {
						w[k] = 1
					}
					free := [4]bool{true, true, true, !math.IsInf(rsh, 1)}
					start := SingleDiode{is * 3, n * 1.1, rs * 0.5, rsh}
					if !free[3] {
						start.ShuntResistanceOhm = rsh
					} else {
						start.ShuntResistanceOhm = rsh * 2
					}
					fast, err1 := fitLog[SingleDiode](context.Background(), pts, w, start, free, 200, newSingleEval(len(pts.v), vt), singleNames())
					ref, err2 := fitLogPerPoint(pts, w, vt, start, free)
					if (err1 == nil) != (err2 == nil) {
						t.Errorf("%+v: fast path error %v, reference %v", d, err1, err2)
						continue
					}
					if err1 != nil {
						continue
					}
					// Compare determined fits only: every free parameter at
					// least 3 standard errors from zero in both (FitIV's rule,
					// unobservable; in an undetermined direction the two paths
					// stop at different points of an almost flat cost).
					determined := true
					for k := 0; k < 4; k++ {
						if free[k] && (unobservable(1, *fast.d.slot(k), *fast.se.slot(k)) != "" || unobservable(1, *ref.d.slot(k), *ref.se.slot(k)) != "") {
							determined = false
						}
					}
					if !determined {
						continue
					}
					fits++
					cmp := func(what string, a, b float64) {
						if a == b || math.IsNaN(a) && math.IsNaN(b) {
							return
						}
						e := math.Abs(a/b - 1)
						if !(e <= 1e-6) {
							t.Errorf("%+v: %s %.10g, reference %.10g", d, what, a, b)
							return
						}
						if e > worst {
							worst, at = e, fmt.Sprintf("%s of %+v", what, d)
						}
					}
					for k := 0; k < 4; k++ {
						cmp(singleName(k), *fast.d.slot(k), *ref.d.slot(k))
						if free[k] {
							cmp("se "+singleName(k), *fast.se.slot(k), *ref.se.slot(k))
						}
					}
					cmp("rms", fast.rms, ref.rms)
					if fast.converged != ref.converged {
						t.Errorf("%+v: converged %v, reference %v", d, fast.converged, ref.converged)
					}
				}
			}
		}
	}
	if fits < 50 {
		t.Errorf("only %d of 108 grid fits determined every parameter", fits)
	}
	t.Logf("%d fits: fast and reference paths agree to %.2g relative at worst (%s)", fits, worst, at)
}
