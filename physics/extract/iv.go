package extract

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"

	"junco/physics"
)

// DiodeModel selects the I-V model fitted by FitIV.
type DiodeModel int

const (
	// ModelSingle is the single-diode model (SingleDiode): Is, n, Rs, Rsh.
	ModelSingle DiodeModel = iota
	// ModelDouble is the double-diode model (DoubleDiode): Is1 (n = 1),
	// Is2 (n = 2), Rs, Rsh.
	ModelDouble
)

// String returns "single" or "double".
func (m DiodeModel) String() string {
	if m == ModelDouble {
		return "double"
	}
	return "single"
}

// ParseDiodeModel maps "single" or "double" (case-insensitive) to a
// DiodeModel.
func ParseDiodeModel(s string) (DiodeModel, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "single", "":
		return ModelSingle, nil
	case "double":
		return ModelDouble, nil
	}
	return 0, inputErr("model", fmt.Sprintf("%q", s), "single or double", "unknown diode model")
}

// Window is a closed bias interval [MinV, MaxV] in volts selecting the
// points a fit uses. The zero value selects every point (FitIV further keeps
// only forward points, V > 0 and I > 0).
type Window struct {
	MinV, MaxV float64 // bounds, V
}

// IsZero reports whether w is the zero value (no restriction).
func (w Window) IsZero() bool { return w.MinV == 0 && w.MaxV == 0 }

// Contains reports whether v lies in the window (always true for the zero
// value).
func (w Window) Contains(v float64) bool { return w.IsZero() || (v >= w.MinV && v <= w.MaxV) }

func (w Window) check(field string) error {
	if w.IsZero() {
		return nil
	}
	if math.IsNaN(w.MinV) || math.IsNaN(w.MaxV) || math.IsInf(w.MinV, 0) || math.IsInf(w.MaxV, 0) {
		return inputErr(field, fmt.Sprintf("%g:%g", w.MinV, w.MaxV), "finite bounds", "the fit window must be a finite interval")
	}
	if !(w.MinV < w.MaxV) {
		return inputErr(field, fmt.Sprintf("%g:%g", w.MinV, w.MaxV), "MinV < MaxV", "the fit window is empty")
	}
	return nil
}

// IVOptions configures FitIV.
type IVOptions struct {
	// TemperatureK is the device temperature in K (required, 1..2000 K);
	// it sets Vt = kT/q.
	TemperatureK float64
	// Window restricts the fit to a bias range; zero = all forward points.
	Window Window
	// Model selects the single- or double-diode model.
	Model DiodeModel
	// RelativeNoise is the relative current noise (fraction, default 0.01)
	// and CurrentFloorA the absolute noise floor in A (0: estimated from
	// the reverse and near-zero-bias scatter, EstimateNoiseFloor, unless
	// NoFloorEstimate). Point i gets the weight
	// 1/sqrt(RelativeNoise^2 + (floor/I_i)^2) on the log-current residual
	// (propagation of additive plus multiplicative noise to ln I; common
	// practice); forward points below FloorFactor times the floor are left
	// out. With no floor all weights are equal.
	RelativeNoise, CurrentFloorA float64
	NoFloorEstimate              bool
	// ComplianceA is the instrument's compliance current in A (> 0): the
	// points whose |I| reaches it are left out. 0: a plateau at the top of
	// the sweep is detected (DetectCompliance) and left out.
	ComplianceA float64
	// FixRs holds Rs at RsOhm (>= 0) instead of fitting it; FixRsh holds
	// Rsh at RshOhm (> 0, +Inf = no shunt).
	FixRs, FixRsh bool
	RsOhm, RshOhm float64 // the fixed values, ohm
	// MaxIterations bounds the Levenberg-Marquardt iterations (default 200).
	MaxIterations int
}

// DirectEstimates are the direct (non-iterative) estimates used as the
// starting point of the least-squares fit.
type DirectEstimates struct {
	// From the linear region of ln I vs V (LinearRegion).
	SaturationCurrentA, IdealityFactor float64
	LinearWindow                       Window // bias span of the linear region
	// From Cheung & Cheung (CheungCheung); NaN when not applicable.
	SeriesResistanceOhm float64
	// Start value of Rsh from the low-bias excess current (+Inf = none).
	ShuntResistanceOhm float64
}

// IVFit is the result of FitIV. Parameter values and standard errors are in
// SI units (A, ohm); a standard error is NaN for a parameter that was held
// fixed or found not observable. For ModelSingle the Single fields are set,
// for ModelDouble the Double fields.
type IVFit struct {
	Model        DiodeModel      // model fitted
	TemperatureK float64         // temperature used for Vt, K
	Single       SingleDiode     // ModelSingle result
	SingleStdErr SingleDiode     // its standard errors
	Double       DoubleDiode     // ModelDouble result
	DoubleStdErr DoubleDiode     // its standard errors
	Start        DirectEstimates // direct-method start values
	// Correlations lists parameter pairs with |r| > 0.9.
	Correlations []Correlation
	// RMSLogResidual is sqrt(mean((ln I_model - ln I_meas)^2)) over the
	// points used (dimensionless; 0.01 is about 1 % scatter).
	RMSLogResidual float64
	// Points is the number of points used; Skipped the number in the window
	// left out because V <= 0, I <= 0 or a value was not finite.
	Points, Skipped int
	// UsedWindow spans the bias of the points used.
	UsedWindow Window
	Iterations int  // Levenberg-Marquardt iterations of the last fit
	Converged  bool // false when the iteration limit was hit
	// Clip is the forward run clipped at the compliance (no Indices when
	// none); those points are not in Points or Skipped.
	Clip Clip
	// NoiseFloorA is the absolute current noise used in the weights (0:
	// none), FloorSource "stated" or "estimated"; BelowFloor counts the
	// forward points in the window left out below FloorFactor times it.
	NoiseFloorA float64
	FloorSource string
	BelowFloor  int
	// Notes explain decisions such as dropping an unobservable parameter.
	Notes []string
}

// observable is the threshold below which a parameter's largest effect on
// ln I over the window counts as not observable.
const observable = 0.02

// unobservable says why an optional parameter (Rs, Rsh, Is2) cannot be
// determined from the data, or returns "": its largest effect on ln I is
// below 2 %, or it is not 3 standard errors away from zero in the log
// parametrisation (se > value/3; a 3-sigma rule, common practice), which
// keeps noise from being fitted as a parameter.
func unobservable(effect, value, se float64) string {
	switch {
	case effect < observable:
		return "largest effect on ln I below 2 %"
	case math.IsNaN(se) || se > value/3:
		return "standard error above a third of the value"
	}
	return ""
}

// FitIV fits a diode model to forward I-V data by weighted nonlinear least
// squares on the log-current scale, r_i = w_i (ln I_model(V_i) - ln I_i),
// with every parameter fitted as its logarithm (so it stays positive) by
// Levenberg-Marquardt. The single-diode model is evaluated explicitly with
// the Lambert W function (SingleDiode.Current), the double-diode model by a
// monotone Newton solve (DoubleDiode.Current); Jacobians are analytic
// (implicit differentiation of the model equation).
//
// Start values come from published direct methods: the linear region of
// ln I vs V for n and Is (LinearRegion), Cheung & Cheung, Appl. Phys. Lett.
// 49, 85 (1986) for Rs (CheungCheung), and the low-bias excess current for
// Rsh. Rs or Rsh whose largest effect on ln I in the window is below 0.02
// (2 %), or whose standard error exceeds a third of its value, is declared
// not observable, removed (Rs = 0, Rsh = +Inf) and the fit repeated; a note
// says so.
//
// Standard errors come from s^2 (J^T W J)^-1 with s^2 = sum w r^2/(N - p)
// and the delta method for the log parametrisation. Units: v in V, i in A,
// results in A and ohm. Valid for forward data spanning at least a few
// kT/q; points with V <= 0 or I <= 0 are skipped (see AnalyzeReverse for
// reverse bias).
func FitIV(v, i []float64, opt IVOptions) (*IVFit, error) {
	return FitIVContext(context.Background(), v, i, opt)
}

// FitIVContext is FitIV with cancellation: the start-value search and every
// Levenberg-Marquardt evaluation check ctx (every few thousand points), so
// a cancelled fit returns ctx.Err() (wrapped; test with errors.Is) within
// milliseconds whatever the number of points.
func FitIVContext(ctx context.Context, v, i []float64, opt IVOptions) (*IVFit, error) {
	if err := checkSweep(v, i, opt.TemperatureK, opt.Window); err != nil {
		return nil, err
	}
	t := opt.TemperatureK
	if opt.RelativeNoise < 0 || opt.CurrentFloorA < 0 || math.IsNaN(opt.RelativeNoise) || math.IsNaN(opt.CurrentFloorA) ||
		math.IsInf(opt.RelativeNoise, 0) || math.IsInf(opt.CurrentFloorA, 0) {
		return nil, inputErr("noise", fmt.Sprintf("%g, %g A", opt.RelativeNoise, opt.CurrentFloorA), ">= 0 and finite", "noise levels cannot be negative")
	}
	if !(opt.ComplianceA >= 0) || math.IsInf(opt.ComplianceA, 0) {
		return nil, inputErr("ComplianceA", opt.ComplianceA, "0 (detect) or a finite current > 0 A", "the compliance is the instrument's current limit")
	}
	if opt.FixRs && !(opt.RsOhm >= 0 && !math.IsInf(opt.RsOhm, 0)) {
		return nil, inputErr("RsOhm", opt.RsOhm, "0 <= Rs < Inf", "a fixed series resistance must be finite and not negative")
	}
	if opt.FixRsh && !(opt.RshOhm > 0) {
		return nil, inputErr("RshOhm", opt.RshOhm, "Rsh > 0 (+Inf = no shunt)", "a fixed shunt resistance must be positive")
	}
	vt := physics.ThermalVoltage(t)
	scr := screen(v, i, vt, opt)
	pts, skipped := forwardPoints(scr.v, scr.i, opt.Window)
	need := 5
	if opt.FixRs {
		need--
	}
	if opt.FixRsh {
		need--
	}
	if len(pts.v) < need {
		return nil, tooFew("window", len(pts.v), need, fmt.Sprintf("the fit needs forward points (V > 0, I > 0) inside the window; %d were skipped, %d clipped at the compliance, %d below %g times the noise floor",
			skipped, len(scr.clip.Indices), scr.belowFloor, FloorFactor))
	}
	de, err := directEstimates(ctx, pts.v, pts.i, vt)
	if err != nil {
		return nil, err
	}
	rel := opt.RelativeNoise
	if rel == 0 {
		rel = 0.01
	}
	w := make([]float64, len(pts.v))
	for k, c := range pts.i {
		f := scr.floor / (rel * c)
		w[k] = 1 / math.Sqrt(1+f*f)
	}
	maxIter := opt.MaxIterations
	if maxIter <= 0 {
		maxIter = 200
	}
	res := &IVFit{Model: opt.Model, TemperatureK: t, Start: de, Points: len(pts.v), Skipped: skipped,
		UsedWindow: Window{pts.v[0], pts.v[len(pts.v)-1]}, Clip: scr.clip, NoiseFloorA: scr.floor, FloorSource: scr.floorSrc,
		BelowFloor: scr.belowFloor, Notes: scr.notes}

	// Single-diode fit (also the start of the double-diode fit).
	sd := SingleDiode{de.SaturationCurrentA, de.IdealityFactor, de.SeriesResistanceOhm, de.ShuntResistanceOhm}
	if math.IsNaN(sd.SeriesResistanceOhm) || !(sd.SeriesResistanceOhm > 0) {
		sd.SeriesResistanceOhm = 1e-3 * de.IdealityFactor * vt / pts.i[len(pts.i)-1]
	}
	free := [4]bool{true, true, !opt.FixRs, !opt.FixRsh}
	if opt.FixRs {
		sd.SeriesResistanceOhm = opt.RsOhm
	}
	if opt.FixRsh {
		sd.ShuntResistanceOhm = opt.RshOhm
	}
	if math.IsInf(sd.ShuntResistanceOhm, 1) && free[3] {
		sd.ShuntResistanceOhm = 1e3 * maxRatio(pts.v, pts.i)
	}
	sf, err := fitSingle(ctx, pts, w, vt, sd, free, maxIter)
	if err != nil {
		return nil, err
	}
	for round := 0; round < 2; round++ {
		changed := false
		if sf.free[2] {
			if why := unobservable(seriesEffect(pts, sf.d.SeriesResistanceOhm, sf.d.IdealityFactor*vt), sf.d.SeriesResistanceOhm, sf.se.SeriesResistanceOhm); why != "" {
				sf.d.SeriesResistanceOhm, sf.free[2], changed = 0, false, true
				res.Notes = append(res.Notes, "series resistance not observable in the window ("+why+"); set to 0")
			}
		}
		if sf.free[3] {
			if why := shuntUnobservable(pts, sf.d.SeriesResistanceOhm, sf.d.ShuntResistanceOhm, shuntEffect(pts, sf.d), sf.se.ShuntResistanceOhm, scr.floor, rel); why != "" {
				sf.d.ShuntResistanceOhm, sf.free[3], changed = math.Inf(1), false, true
				res.Notes = append(res.Notes, "shunt resistance not observable in the window ("+why+"); set to infinity")
			}
		}
		if !changed {
			break
		}
		if sf, err = fitSingle(ctx, pts, w, vt, sf.d, sf.free, maxIter); err != nil {
			return nil, err
		}
	}
	if opt.Model != ModelDouble {
		res.Single, res.SingleStdErr = sf.d, sf.se
		res.Correlations, res.Iterations, res.Converged = sf.corr, sf.iter, sf.converged
		res.RMSLogResidual = sf.rms
		if !sf.converged {
			res.Notes = append(res.Notes, "iteration limit reached before convergence")
		}
		if n, se := sf.d.IdealityFactor, sf.se.IdealityFactor; n < 1 {
			how := "which a pn junction cannot give: check the temperature, a noise floor or clipped points"
			if n+2*se >= 1 {
				how = "though within 2 standard errors of 1"
			}
			res.Notes = append(res.Notes, fmt.Sprintf("caution: ideality factor n = %.5f below 1, %s", n, how))
		}
		return res, nil
	}

	// Double-diode fit started from the single-diode result.
	dd := doubleStart(pts, vt, sf.d)
	dfree := [4]bool{true, true, !opt.FixRs, !opt.FixRsh}
	if opt.FixRs {
		dd.SeriesResistanceOhm = opt.RsOhm
	} else if dd.SeriesResistanceOhm == 0 {
		dd.SeriesResistanceOhm = 1e-3 * vt / pts.i[len(pts.i)-1]
	}
	if opt.FixRsh {
		dd.ShuntResistanceOhm = opt.RshOhm
	} else if math.IsInf(dd.ShuntResistanceOhm, 1) {
		dd.ShuntResistanceOhm = 1e3 * maxRatio(pts.v, pts.i)
	}
	df, err := fitDouble(ctx, pts, w, vt, dd, dfree, maxIter)
	if err != nil {
		return nil, err
	}
	for round := 0; round < 3; round++ {
		changed := false
		if df.free[2] {
			if why := unobservable(seriesEffect(pts, df.d.SeriesResistanceOhm, vt), df.d.SeriesResistanceOhm, df.se.SeriesResistanceOhm); why != "" {
				df.d.SeriesResistanceOhm, df.free[2], changed = 0, false, true
				res.Notes = append(res.Notes, "series resistance not observable in the window ("+why+"); set to 0")
			}
		}
		if df.free[3] {
			if why := shuntUnobservable(pts, df.d.SeriesResistanceOhm, df.d.ShuntResistanceOhm, shuntEffectDouble(pts, vt, df.d), df.se.ShuntResistanceOhm, scr.floor, rel); why != "" {
				df.d.ShuntResistanceOhm, df.free[3], changed = math.Inf(1), false, true
				res.Notes = append(res.Notes, "shunt resistance not observable in the window ("+why+"); set to infinity")
			}
		}
		if df.free[1] {
			if why := unobservable(recombEffect(pts, vt, df.d), df.d.RecombinationCurrentA, df.se.RecombinationCurrentA); why != "" {
				df.d.RecombinationCurrentA, df.free[1], changed = 0, false, true
				res.Notes = append(res.Notes, "recombination (n = 2) current not observable in the window ("+why+"); set to 0")
			}
		}
		if !changed {
			break
		}
		if df, err = fitDouble(ctx, pts, w, vt, df.d, df.free, maxIter); err != nil {
			return nil, err
		}
	}
	res.Double, res.DoubleStdErr = df.d, df.se
	res.Correlations, res.Iterations, res.Converged = df.corr, df.iter, df.converged
	res.RMSLogResidual = df.rms
	if !df.converged {
		res.Notes = append(res.Notes, "iteration limit reached before convergence")
	}
	return res, nil
}

type ivPoints struct{ v, i []float64 }

// Len is the number of points.
func (p ivPoints) Len() int { return len(p.v) }

// Less orders by voltage.
func (p ivPoints) Less(a, b int) bool { return p.v[a] < p.v[b] }

// Swap exchanges two points.
func (p ivPoints) Swap(a, b int) {
	p.v[a], p.v[b] = p.v[b], p.v[a]
	p.i[a], p.i[b] = p.i[b], p.i[a]
}

// forwardPoints copies the finite points with V > 0, I > 0 inside w,
// sorted by V, and counts the points in w that were left out.
func forwardPoints(v, i []float64, w Window) (ivPoints, int) {
	p := ivPoints{make([]float64, 0, len(v)), make([]float64, 0, len(v))}
	skipped := 0
	for k := range v {
		if !w.Contains(v[k]) {
			continue
		}
		if v[k] > 0 && i[k] > 0 && !math.IsInf(v[k], 0) && !math.IsInf(i[k], 0) {
			p.v = append(p.v, v[k])
			p.i = append(p.i, i[k])
		} else {
			skipped++
		}
	}
	if !sort.IsSorted(p) {
		sort.Stable(p)
	}
	return p, skipped
}

func maxRatio(v, i []float64) float64 {
	m := 0.0
	for k := range v {
		m = max(m, v[k]/i[k])
	}
	return m
}

func seriesEffect(p ivPoints, rs, a float64) float64 {
	m := 0.0
	for _, c := range p.i {
		m = max(m, c*rs/a)
	}
	return m
}

// shuntUnobservable is unobservable for the shunt, which is also not
// measurable when a noise floor is known and its current V_d/Rsh stays
// below FloorFactor times the expected noise sqrt((rel I)^2 + floor^2) at
// every point used: nowhere does it stand out of the noise.
func shuntUnobservable(p ivPoints, rs, rsh, effect, se, floor, rel float64) string {
	if floor > 0 {
		m, at := 0.0, 0.0
		for k := range p.v {
			c := (p.v[k] - p.i[k]*rs) / rsh
			sig := math.Hypot(rel*p.i[k], floor)
			if c/sig > m {
				m, at = c/sig, c
			}
		}
		if m < FloorFactor {
			return fmt.Sprintf("not measurable: its current (%.3g A where it stands out most) stays below %g times the noise floor and relative noise", at, FloorFactor)
		}
	}
	return unobservable(effect, rsh, se)
}

func shuntEffect(p ivPoints, d SingleDiode) float64 {
	m := 0.0
	for k := range p.v {
		vd := p.v[k] - p.i[k]*d.SeriesResistanceOhm
		m = max(m, vd/d.ShuntResistanceOhm/p.i[k])
	}
	return m
}

func shuntEffectDouble(p ivPoints, vt float64, d DoubleDiode) float64 {
	m := 0.0
	for k := range p.v {
		vd := p.v[k] - p.i[k]*d.SeriesResistanceOhm
		m = max(m, vd/d.ShuntResistanceOhm/p.i[k])
	}
	return m
}

func recombEffect(p ivPoints, vt float64, d DoubleDiode) float64 {
	m := 0.0
	for k := range p.v {
		vd := p.v[k] - p.i[k]*d.SeriesResistanceOhm
		m = max(m, d.RecombinationCurrentA*math.Expm1(vd/(2*vt))/p.i[k])
	}
	return m
}

// fourParams is a diode model with four positive parameters addressed by
// index (for the log-parametrised least-squares fit) and a current with
// its gradient.
type fourParams[D any] interface {
	*D
	slot(k int) *float64
}

// fitResult is a fitted model D with its standard errors.
type fitResult[D any] struct {
	d, se     D
	free      [4]bool
	corr      []Correlation
	iter      int
	converged bool
	rms       float64 // RMS of ln(I_model/I) over the points, unweighted
}

// pointModel evaluates a model at every point of a fit: prepare takes the
// parameters of one evaluation, grad returns the current at point n (bias
// v) and its derivatives with respect to the logarithms of the four
// parameters.
type pointModel[D any] interface {
	prepare(d D)
	grad(n int, v float64, g *[4]float64) float64
	// current is grad without the derivatives; gradLast is grad at a point
	// where current was the last call with these parameters (it may reuse
	// what current found there).
	current(n int, v float64) float64
	gradLast(n int, v float64, g *[4]float64) float64
}

// doubleEval is the pointModel of the double-diode model.
type doubleEval struct {
	vt float64
	d  DoubleDiode
}

func (e *doubleEval) prepare(d DoubleDiode) { e.d = d }
func (e *doubleEval) grad(_ int, v float64, g *[4]float64) float64 {
	return e.d.grad(v, e.vt, g)
}
func (e *doubleEval) current(_ int, v float64) float64 {
	var g [4]float64
	return e.d.grad(v, e.vt, &g)
}
func (e *doubleEval) gradLast(_ int, v float64, g *[4]float64) float64 {
	return e.d.grad(v, e.vt, g)
}

type singleResult = fitResult[SingleDiode]
type doubleResult = fitResult[DoubleDiode]

func (d *SingleDiode) slot(k int) *float64 {
	switch k {
	case 0:
		return &d.SaturationCurrentA
	case 1:
		return &d.IdealityFactor
	case 2:
		return &d.SeriesResistanceOhm
	}
	return &d.ShuntResistanceOhm
}

func (d *DoubleDiode) slot(k int) *float64 {
	switch k {
	case 0:
		return &d.DiffusionCurrentA
	case 1:
		return &d.RecombinationCurrentA
	case 2:
		return &d.SeriesResistanceOhm
	}
	return &d.ShuntResistanceOhm
}

// fitLog fits the free parameters of d0 by weighted Levenberg-Marquardt on
// r = w ln(I_model / I_measured), each parameter as its logarithm (so it
// stays positive); standard errors come from the covariance (J^T J)^-1 s^2
// scaled to the parameter (se = value * sigma(ln value)).
func fitLog[D any, P fourParams[D]](ctx context.Context, pts ivPoints, w []float64, d0 D, free [4]bool, maxIter int,
	model pointModel[D], names [4]string) (fitResult[D], error) {
	var idx []int
	for k := 0; k < 4; k++ {
		if free[k] {
			idx = append(idx, k)
		}
	}
	p := len(idx)
	theta := make([]float64, p)
	for j, k := range idx {
		theta[j] = math.Log(*P(&d0).slot(k))
	}
	m := len(pts.v)
	lnI := make([]float64, m)
	for n, c := range pts.i {
		lnI[n] = fastLog(c)
	}
	// eval gives the residuals only; jacobian the Jacobian at the theta
	// of the last eval, from the W values that eval found (levenberg asks
	// for it only where a step is taken).
	eval := func(th, r, _ []float64) bool {
		d := d0
		for j, k := range idx {
			*P(&d).slot(k) = math.Exp(th[j])
		}
		model.prepare(d)
		for n := 0; n < m; n++ {
			if n&(cancelCheckEvery-1) == 0 && ctx.Err() != nil {
				return false
			}
			c := model.current(n, pts.v[n])
			if !(c > 0) || math.IsInf(c, 0) {
				return false
			}
			r[n] = w[n] * (fastLog(c) - lnI[n])
		}
		return true
	}
	jacobian := func(_, jac []float64) {
		var g [4]float64
		for n := 0; n < m; n++ {
			c := model.gradLast(n, pts.v[n], &g)
			wc := w[n] / c
			row := jac[n*p : n*p+p]
			for j, k := range idx {
				row[j] = wc * g[k]
			}
		}
	}
	lr, err := levenberg(ctx, lmProblem{m: m, p: p, eval: eval, jacobian: jacobian}, theta, maxIter)
	if err != nil {
		return fitResult[D]{}, err
	}
	out := fitResult[D]{d: d0, free: free, iter: lr.iter, converged: lr.converged}
	// The RMS of ln(I_model/I) from the final residuals r = w ln(I_model/I)
	// (no further model evaluation).
	ss := 0.0
	for n, rn := range lr.resid {
		ss += (rn / w[n]) * (rn / w[n])
	}
	out.rms = math.Sqrt(ss / float64(m))
	nan := math.NaN()
	for k := 0; k < 4; k++ {
		*P(&out.se).slot(k) = nan
	}
	sel := make([]string, p)
	for j, k := range idx {
		val := math.Exp(lr.theta[j])
		*P(&out.d).slot(k) = val
		sel[j] = names[k]
		if lr.cov != nil {
			*P(&out.se).slot(k) = val * math.Sqrt(lr.cov[j*p+j])
		}
	}
	out.corr = strongCorrelations(lr.cov, sel)
	return out, nil
}

// Parameter names of the two models in correlation reports.
func singleNames() [4]string { return [4]string{"Is", "n", "Rs", "Rsh"} }
func doubleNames() [4]string { return [4]string{"Is1", "Is2", "Rs", "Rsh"} }

func singleName(k int) string { return singleNames()[k] }
func doubleName(k int) string { return doubleNames()[k] }

func fitSingle(ctx context.Context, pts ivPoints, w []float64, vt float64, d0 SingleDiode, free [4]bool, maxIter int) (singleResult, error) {
	r, err := fitLog[SingleDiode](ctx, pts, w, d0, free, maxIter, newSingleEval(len(pts.v), vt), singleNames())
	if err != nil {
		return r, fmt.Errorf("single-diode fit: %w (start Is=%g A, n=%g, Rs=%g ohm, Rsh=%g ohm)", err,
			d0.SaturationCurrentA, d0.IdealityFactor, d0.SeriesResistanceOhm, d0.ShuntResistanceOhm)
	}
	return r, nil
}

func fitDouble(ctx context.Context, pts ivPoints, w []float64, vt float64, d0 DoubleDiode, free [4]bool, maxIter int) (doubleResult, error) {
	r, err := fitLog[DoubleDiode](ctx, pts, w, d0, free, maxIter, &doubleEval{vt: vt}, doubleNames())
	if err != nil {
		return r, fmt.Errorf("double-diode fit: %w", err)
	}
	return r, nil
}

// doubleStart derives double-diode start values from a single-diode fit:
// Is1 from the upper third of the points (n = 1 assumed there), Is2 from
// the excess current in the lower third (n = 2 assumed there).
func doubleStart(p ivPoints, vt float64, s SingleDiode) DoubleDiode {
	n := len(p.v)
	rs := s.SeriesResistanceOhm
	var a, b []float64
	for k := 2 * n / 3; k < n; k++ {
		vd := p.v[k] - p.i[k]*rs
		a = append(a, p.i[k]*math.Exp(-vd/vt))
	}
	is1 := median(a)
	for k := 0; k < n/3+1; k++ {
		vd := p.v[k] - p.i[k]*rs
		ex := p.i[k] - is1*math.Expm1(vd/vt) - vd/s.ShuntResistanceOhm
		if ex > 0 {
			b = append(b, ex/math.Expm1(vd/(2*vt)))
		}
	}
	is2 := median(b)
	if !(is2 > 0) {
		is2 = is1 * 1e3
	}
	if !(is1 > 0) {
		is1 = s.SaturationCurrentA * 1e-3
	}
	return DoubleDiode{is1, is2, rs, s.ShuntResistanceOhm}
}

func median(x []float64) float64 {
	if len(x) == 0 {
		return math.NaN()
	}
	y := append([]float64(nil), x...)
	sort.Float64s(y)
	n := len(y)
	if n%2 == 1 {
		return y[n/2]
	}
	return 0.5 * (y[n/2-1] + y[n/2])
}

// rmsLog is sqrt(mean(ln(model(V)/I)^2)) over the points.
func rmsLog(p ivPoints, model func(float64) float64) float64 {
	s := 0.0
	for k := range p.v {
		r := math.Log(model(p.v[k]) / p.i[k])
		s += r * r
	}
	return math.Sqrt(s / float64(len(p.v)))
}
