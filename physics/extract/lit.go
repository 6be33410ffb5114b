package extract

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"junco/physics"
)

// LitSign is the sign convention of the current in a lit I-V file.
type LitSign int

const (
	// SignAuto lets FitLit recognise the convention (RecogniseLit).
	SignAuto LitSign = iota
	// SignLoad counts the current positive into the device (the
	// convention of a diode measured as a load: forward current positive);
	// a lit junction then has I(0) < 0 and I(Voc) = 0 with Voc > 0.
	SignLoad
	// SignGenerator counts the current positive out of the device (the
	// current it delivers): I(0) > 0, falling through zero at Voc.
	SignGenerator
)

// String returns "auto", "load" or "generator".
func (s LitSign) String() string {
	switch s {
	case SignLoad:
		return "load"
	case SignGenerator:
		return "generator"
	}
	return "auto"
}

// ParseLitSign maps "auto", "load" or "generator" (case-insensitive) to a
// LitSign.
func ParseLitSign(s string) (LitSign, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "auto", "":
		return SignAuto, nil
	case "load":
		return SignLoad, nil
	case "generator":
		return SignGenerator, nil
	}
	return SignAuto, inputErr("sign", fmt.Sprintf("%q", s), "auto, load or generator", "unknown sign convention of the current")
}

// LitDiode holds the parameters of the single-diode model of an
// illuminated junction (photocurrent source in parallel with the diode and
// the shunt, series resistance outside), in the load sign:
//
//	I = Is (exp((V - I Rs)/(n Vt)) - 1) + (V - I Rs)/Rsh - Iph,
//
// and I_generator = -I. Units: Iph and Is in A (> 0), n dimensionless
// (> 0), Rs in ohm (>= 0), Rsh in ohm (> 0, +Inf = no shunt). Valid where
// the photocurrent does not depend on bias and the lumped picture holds.
// Source: Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007),
// ch. 13 (solar-cell equivalent circuit); the explicit Lambert-W form is
// that of Jain & Kapoor, Sol. Energy Mater. Sol. Cells 81, 269 (2004).
type LitDiode struct {
	PhotocurrentA       float64 // Iph, A
	SaturationCurrentA  float64 // Is, A
	IdealityFactor      float64 // n
	SeriesResistanceOhm float64 // Rs, ohm; 0 = none
	ShuntResistanceOhm  float64 // Rsh, ohm; +Inf = none
}

// lambertCurrent is the single-diode current with photocurrent iph (A) at
// bias v (V) in the load sign, for Is = is (A), a = n Vt (V), Rs = rs and
// Rsh = rsh (ohm), explicitly with the principal branch of W. With
// J = Is + Iph and S = Rs + Rsh:
//
//   - Rs = 0: I = Is (exp(V/a) - 1) + V/Rsh - Iph (closed form);
//   - Rsh = +Inf: I = (a/Rs) W0((Is Rs/a) exp((V + J Rs)/a)) - J;
//   - both: I = (a/Rs) W0((Is Rs Rsh/(a S)) exp(Rsh (V + J Rs)/(a S)))
//   - (V - J Rsh)/S.
//
// The W argument is passed as its logarithm to physics.LambertW0Exp, so no
// bias overflows. Returns NaN for is <= 0, a <= 0, rs < 0, rsh <= 0 or
// iph < 0. Source: Jain & Kapoor, Sol. Energy Mater. Sol. Cells 81, 269
// (2004); with iph = 0 the forms of Banwell & Jayakumar, Electron. Lett. 36,
// 291 (2000) and Ortiz-Conde, García Sánchez & Muci, Solid-State Electron.
// 44, 1861 (2000).
func lambertCurrent(is, a, rs, rsh, iph, v float64) float64 {
	if !(is > 0) || !(a > 0) || !(rs >= 0) || !(rsh > 0) || !(iph >= 0) {
		return math.NaN()
	}
	if rs == 0 {
		return is*math.Expm1(v/a) + v/rsh - iph
	}
	f := newLambertForm(is, a, rs, rsh, iph)
	return f.current(v, physics.LambertW0Exp(f.y(v)))
}

// Current returns the terminal current I(V) in A, load sign, of the lit
// single-diode model at bias v (V) and thermal voltage vt = kT/q (V),
// explicitly (lambertCurrent). NaN for non-physical parameters.
func (d LitDiode) Current(v, vt float64) float64 {
	return lambertCurrent(d.SaturationCurrentA, d.IdealityFactor*vt, d.SeriesResistanceOhm, d.ShuntResistanceOhm, d.PhotocurrentA, v)
}

// Figures returns the figures of merit of the model's curve at thermal
// voltage vt (physics.LitFiguresOf; generator sign: Isc, Imp, Pmax > 0).
// It returns an error when the curve carries no photocurrent (I(0) >= 0).
func (d LitDiode) Figures(vt float64) (physics.LitFigures, error) {
	cur := func(v float64) float64 { return d.Current(v, vt) }
	if !(cur(0) < 0) {
		return nanFigures(), errors.New("the curve carries no photocurrent: the current at zero bias is not negative (load sign)")
	}
	return physics.LitFiguresOf(cur)
}

// litGrad returns I(V) (load sign) and dI/dln(p) for p = Iph, Is, n, Rs,
// Rsh (in that order) by implicit differentiation of
// F = Is (E - 1) + Vd/Rsh - Iph - I = 0, E = exp(Vd/(n Vt)), Vd = V - I Rs:
// dI/dp = (dF/dp)/(1 + Rs g), g = Is E/(n Vt) + 1/Rsh, with dF/dIph = -1,
// dF/dIs = E - 1, dF/dn = -Is E Vd/(n^2 Vt), dF/dRs = -I g,
// dF/dRsh = -Vd/Rsh^2. Where exp overflows, Is E is taken from F = 0.
func (d LitDiode) litGrad(v, vt float64, g *[5]float64) float64 {
	i := d.Current(v, vt)
	iph, is, n, rs, rsh := d.PhotocurrentA, d.SaturationCurrentA, d.IdealityFactor, d.SeriesResistanceOhm, d.ShuntResistanceOhm
	a := n * vt
	vd := v - i*rs
	ise := is * math.Exp(vd/a)
	if math.IsInf(ise, 0) {
		ise = i + iph + is - vd/rsh
	}
	gd := ise/a + 1/rsh
	den := 1 + rs*gd
	g[0] = -iph / den
	g[1] = (ise - is) / den
	g[2] = -ise * vd / a / den
	g[3] = -rs * i * gd / den
	g[4] = -vd / rsh / den
	return i
}

// LitRecognition says whether a curve looks lit and in which sign
// convention, with the rough short-circuit current and open-circuit
// voltage it was judged by.
type LitRecognition struct {
	Lit  bool
	Sign LitSign // SignLoad or SignGenerator when Lit
	// Why says what was seen (or missed), fit to show a user.
	Why string
	// IscA is |I(0)| interpolated (A); VocV the bias where the current
	// changes sign (V); both NaN when not found.
	IscA, VocV float64
}

// minLitVoc is the smallest open-circuit voltage RecogniseLit accepts
// (20 mV, about 0.8 kT/q at 300 K): below it a zero crossing is as likely
// an offset of the ammeter as light.
const minLitVoc = 0.02

// RecogniseLit tells a lit I-V curve from a dark one: a lit curve has a
// current of one sign at zero bias (|I(0)| > 0) that keeps that sign up to
// an open-circuit voltage Voc >= 20 mV where it changes sign, and the data
// reach zero bias (their lowest bias is at most Voc/2). The sign at zero
// bias gives the convention: negative is the load sign (forward current
// positive), positive the generator sign. A dark diode's current changes
// sign at zero bias instead. Units: V and A. Common practice (the
// definitions of Isc and Voc: Sze & Ng 2007, ch. 13).
func RecogniseLit(v, i []float64) LitRecognition {
	nan := math.NaN()
	out := LitRecognition{IscA: nan, VocV: nan}
	pts := finitePoints(v, i, Window{})
	if len(pts.v) < 5 {
		out.Why = fmt.Sprintf("%d finite points; a lit curve needs at least 5", len(pts.v))
		return out
	}
	i0, _ := interpAtZeroBias(pts)
	if !(i0 != 0) || math.IsNaN(i0) {
		out.Why = "no current at zero bias"
		return out
	}
	sign := SignLoad
	if i0 > 0 {
		sign = SignGenerator
	}
	load := toLoad(pts, sign)
	voc, ok := crossing(load)
	out.IscA = math.Abs(i0)
	if !ok {
		out.Why = fmt.Sprintf("the current at zero bias (%.4g A) does not change sign at a positive bias", i0)
		return out
	}
	out.VocV = voc
	switch {
	case voc < minLitVoc:
		out.Why = fmt.Sprintf("the current changes sign at %.4g V, below %g V: a dark curve (or an offset)", voc, minLitVoc)
	case pts.v[0] > voc/2:
		out.Why = fmt.Sprintf("the data start at %.4g V, above half the open-circuit voltage %.4g V: zero bias is not reached", pts.v[0], voc)
	default:
		out.Lit, out.Sign = true, sign
		what := "negative at zero bias: load sign (forward current positive)"
		if sign == SignGenerator {
			what = "positive at zero bias: generator sign (delivered current positive)"
		}
		out.Why = fmt.Sprintf("lit curve: current %s, changing sign at %.4g V", what, voc)
	}
	return out
}

// LitOptions configures FitLit.
type LitOptions struct {
	// TemperatureK is the device temperature in K (required, 1..2000 K).
	TemperatureK float64
	// Window restricts the fit to a bias range; zero = every point.
	Window Window
	// Sign is the current's convention; SignAuto recognises it
	// (RecogniseLit), else takes the sign of the current at zero bias.
	Sign LitSign
	// Starts, when not empty, replaces the fit's own start points (for
	// tests and for users who know better); each must be physical.
	Starts []LitDiode
	// MaxIterations bounds the Levenberg-Marquardt iterations of the
	// final refinement (default 300; each start runs at most 100).
	MaxIterations int
}

// LitFit is the result of FitLit. Parameter values and standard errors are
// in SI units (A, ohm); a standard error is NaN when the covariance is
// singular. The figures of merit are in the generator sign (Isc, Imp,
// Pmax positive).
type LitFit struct {
	TemperatureK float64
	// Sign is the convention assumed; SignWhy says why.
	Sign    LitSign
	SignWhy string
	Diode   LitDiode // fitted parameters
	StdErr  LitDiode // their standard errors
	// Start holds the values read off the curve that the start points
	// are made from.
	Start LitStartValues
	// StartsTried is the number of start points; StartsAtBest how many of
	// them ended at the best fit (RMS residual within 1e-4 of the best, or
	// both below 1e-12 Isc, the floor of the arithmetic).
	StartsTried, StartsAtBest int
	Correlations              []Correlation
	// RMSResidualA is sqrt(mean((I_model - I_meas)^2)) in A over the
	// points used.
	RMSResidualA float64
	// Data are the figures of merit read off the data (LitDataFigures);
	// Model those of the fitted curve (LitDiode.Figures); a field is NaN
	// when it could not be found (see Notes).
	Data, Model physics.LitFigures
	// Points is the number of points used, Skipped the number in the
	// window left out because a value was not finite.
	Points, Skipped int
	UsedWindow      Window
	Iterations      int  // of the best start
	Converged       bool // false when the best start hit the iteration limit
	Notes           []string
}

// litStartPoints bounds the points each start point's fit runs on (the
// best is refined on all points).
const litStartPoints = 400

// litStartIterations bounds the iterations of each start (a start in a
// flat valley would otherwise spend the whole budget); the best start is
// then refined with LitOptions.MaxIterations.
const litStartIterations = 100

// litNames are the parameter names in correlation reports.
func litNames() [5]string { return [5]string{"Iph", "Is", "n", "Rs", "Rsh"} }

func (d *LitDiode) litSlot(k int) *float64 {
	switch k {
	case 0:
		return &d.PhotocurrentA
	case 1:
		return &d.SaturationCurrentA
	case 2:
		return &d.IdealityFactor
	case 3:
		return &d.SeriesResistanceOhm
	}
	return &d.ShuntResistanceOhm
}

func (d LitDiode) physical() bool {
	for k := 0; k < 5; k++ {
		x := *d.litSlot(k)
		if !(x > 0) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// FitLit fits the lit single-diode model (LitDiode) to an illuminated I-V
// curve by least squares on the current itself, r_i = I_model(V_i) - I_i
// (the curve crosses zero, so no log scale), with every parameter fitted
// as its logarithm (so it stays positive) by Levenberg-Marquardt with the
// analytic Jacobian (implicit differentiation, litGrad); the model current
// is explicit (Lambert W).
//
// To reach the global optimum rather than a local one the fit runs from
// several start points made from the curve (litStarts: Isc, Voc, the
// slopes at short and open circuit and the maximum-power point; a grid of
// n over 1..2 with Is from Voc, and the explicit method of Phang, Chan &
// Phillips, Electron. Lett. 20, 406 (1984)) and keeps the lowest sum of
// squares; the result says how many starts reached it. Each start runs at
// most 100 iterations, on at most 400 points spread over the sweep; the
// best is then refined on all points.
//
// Standard errors: s^2 (J^T J)^-1 with s^2 = sum r^2/(N - 5) and the delta
// method for the log parametrisation (Bates & Watts 1988, ch. 2). Units: v
// in V, i in A. Valid for a curve that spans zero bias to beyond the
// maximum-power point (ideally to Voc and past it), at one irradiance.
func FitLit(v, i []float64, opt LitOptions) (*LitFit, error) {
	return FitLitContext(context.Background(), v, i, opt)
}

// FitLitContext is FitLit with cancellation (ctx is checked before every
// model evaluation and every few thousand points).
func FitLitContext(ctx context.Context, v, i []float64, opt LitOptions) (*LitFit, error) {
	if err := checkSweep(v, i, opt.TemperatureK, opt.Window); err != nil {
		return nil, err
	}
	t := opt.TemperatureK
	if opt.Sign < SignAuto || opt.Sign > SignGenerator {
		return nil, inputErr("Sign", int(opt.Sign), "SignAuto, SignLoad or SignGenerator", "unknown sign convention")
	}
	for k, s := range opt.Starts {
		if !s.physical() {
			return nil, inputErr(fmt.Sprintf("Starts[%d]", k), fmt.Sprintf("%+v", s), "every parameter positive and finite", "a start point must be a physical lit diode")
		}
	}
	vt := physics.ThermalVoltage(t)
	pts := finitePoints(v, i, opt.Window)
	skipped := 0
	for k := range v {
		if opt.Window.Contains(v[k]) {
			skipped++
		}
	}
	skipped -= len(pts.v)
	const need = 6
	if len(pts.v) < need {
		return nil, tooFew("window", len(pts.v), need, "the lit fit has five parameters and needs finite points from zero bias to beyond the maximum-power point")
	}
	res := &LitFit{TemperatureK: t, Points: len(pts.v), Skipped: skipped, UsedWindow: Window{pts.v[0], pts.v[len(pts.v)-1]}}
	res.Sign, res.SignWhy = opt.Sign, "given"
	if opt.Sign == SignAuto {
		rec := RecogniseLit(pts.v, pts.i)
		switch {
		case rec.Lit:
			res.Sign, res.SignWhy = rec.Sign, rec.Why
		default:
			i0, _ := interpAtZeroBias(pts)
			res.Sign = SignLoad
			if i0 > 0 {
				res.Sign = SignGenerator
			}
			res.SignWhy = "not recognised as lit (" + rec.Why + "); " + res.Sign.String() + " sign taken from the current at zero bias"
		}
	}
	load := toLoad(pts, res.Sign)
	sv, err := litStartValues(load)
	if err != nil {
		return nil, err
	}
	res.Start = sv
	res.Data = litDataFigures(load)
	starts := opt.Starts
	if len(starts) == 0 {
		starts = litStarts(sv, vt)
	}
	maxIter := opt.MaxIterations
	if maxIter <= 0 {
		maxIter = 300
	}
	// On a long sweep the starts run on at most litStartPoints points
	// spread over it, and the best is then refined on all of them.
	sub := load
	if n := len(load.v); n > litStartPoints {
		sub = ivPoints{}
		for k := 0; k < litStartPoints; k++ {
			j := k * (n - 1) / (litStartPoints - 1)
			sub.v, sub.i = append(sub.v, load.v[j]), append(sub.i, load.i[j])
		}
	}
	var best *lmResult
	var costs []float64
	for _, s := range starts {
		lr, err := fitLitFrom(ctx, sub, vt, s, min(maxIter, litStartIterations))
		if err != nil {
			if ctx.Err() != nil {
				return nil, err
			}
			continue
		}
		costs = append(costs, lr.cost)
		if best == nil || lr.cost < best.cost {
			b := lr
			best = &b
		}
	}
	if best == nil {
		return nil, fmt.Errorf("lit fit: %w from all %d start points (Isc %.4g A, Voc %.4g V)", ErrNoConvergence, len(starts), sv.IscA, sv.VocV)
	}
	res.StartsTried = len(starts)
	// A start reached the best when its RMS residual is within 1e-4 of
	// the best one's, or both are at the floor of the arithmetic (1e-12
	// of the short-circuit current).
	bestRMS := math.Sqrt(best.cost / float64(len(sub.v)))
	for _, c := range costs {
		if math.Sqrt(c/float64(len(sub.v))) <= bestRMS*(1+1e-4)+1e-12*sv.IscA {
			res.StartsAtBest++
		}
	}
	{
		// Refine the best on all points with the full iteration budget.
		var d LitDiode
		for k := 0; k < 5; k++ {
			*d.litSlot(k) = math.Exp(best.theta[k])
		}
		lr, err := fitLitFrom(ctx, load, vt, d, maxIter)
		if err != nil {
			return nil, fmt.Errorf("lit fit on all %d points: %w", len(load.v), err)
		}
		best = &lr
	}
	nan := math.NaN()
	for k := 0; k < 5; k++ {
		val := math.Exp(best.theta[k])
		*res.Diode.litSlot(k) = val
		*res.StdErr.litSlot(k) = nan
		if best.cov != nil {
			*res.StdErr.litSlot(k) = val * math.Sqrt(best.cov[k*5+k])
		}
	}
	names := litNames()
	res.Correlations = strongCorrelations(best.cov, names[:])
	res.RMSResidualA = math.Sqrt(best.cost / float64(len(load.v)))
	res.Iterations, res.Converged = best.iter, best.converged
	if !best.converged {
		res.Notes = append(res.Notes, "iteration limit reached before convergence")
	}
	if best.cov == nil {
		res.Notes = append(res.Notes, "the parameters are not all determined by the data (singular covariance): no standard errors")
	}
	if res.Model, err = res.Diode.Figures(vt); err != nil {
		res.Notes = append(res.Notes, "figures of merit of the fit: "+err.Error())
		res.Model = nanFigures()
	}
	if math.IsNaN(res.Data.Voc) {
		res.Notes = append(res.Notes, "the data do not reach open circuit: Voc, and so the fill factor, from the data are not given")
	}
	if res.StartsAtBest < res.StartsTried {
		res.Notes = append(res.Notes, fmt.Sprintf("%d of %d start points reached the best fit; the others ended elsewhere (a worse minimum, or the iteration limit in a flat valley)", res.StartsAtBest, res.StartsTried))
	}
	return res, nil
}

// fitLitFrom runs Levenberg-Marquardt on r = I_model - I from start s.
func fitLitFrom(ctx context.Context, p ivPoints, vt float64, s LitDiode, maxIter int) (lmResult, error) {
	theta := make([]float64, 5)
	for k := range theta {
		theta[k] = math.Log(*s.litSlot(k))
	}
	m := len(p.v)
	eval := func(th, r, jac []float64) bool {
		var d LitDiode
		for k := 0; k < 5; k++ {
			*d.litSlot(k) = math.Exp(th[k])
		}
		var g [5]float64
		for n := 0; n < m; n++ {
			if n&(cancelCheckEvery-1) == 0 && ctx.Err() != nil {
				return false
			}
			c := d.litGrad(p.v[n], vt, &g)
			if math.IsNaN(c) || math.IsInf(c, 0) {
				return false
			}
			r[n] = c - p.i[n]
			if jac != nil {
				for k := 0; k < 5; k++ {
					if math.IsNaN(g[k]) || math.IsInf(g[k], 0) {
						return false
					}
					jac[n*5+k] = g[k]
				}
			}
		}
		return true
	}
	return levenberg(ctx, lmProblem{m: m, p: 5, eval: eval}, theta, maxIter)
}

// finitePoints copies the finite points inside w, sorted by V.
func finitePoints(v, i []float64, w Window) ivPoints {
	var p ivPoints
	for k := range v {
		if k >= len(i) || !w.Contains(v[k]) {
			continue
		}
		if !math.IsNaN(v[k]) && !math.IsNaN(i[k]) && !math.IsInf(v[k], 0) && !math.IsInf(i[k], 0) {
			p.v = append(p.v, v[k])
			p.i = append(p.i, i[k])
		}
	}
	if !sort.IsSorted(p) {
		sort.Stable(p)
	}
	return p
}

// toLoad returns the points in the load sign (a copy).
func toLoad(p ivPoints, s LitSign) ivPoints {
	out := ivPoints{v: append([]float64(nil), p.v...), i: append([]float64(nil), p.i...)}
	if s == SignGenerator {
		for k := range out.i {
			out.i[k] = -out.i[k]
		}
	}
	return out
}

func nanFigures() physics.LitFigures {
	n := math.NaN()
	return physics.LitFigures{Isc: n, Voc: n, Pmax: n, Vmp: n, Imp: n, FF: n}
}
