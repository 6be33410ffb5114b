package extract

import (
	"context"
	"fmt"
	"math"
	"sort"
	"strings"
)

// Bounds of the junction-capacitance fit. A fit that runs to one of them
// has not found the parameter: its status says so.
const (
	// CVMaxBuiltInV is the largest built-in potential the fit accepts, V.
	// Vbi stays below Eg/q, and no junction semiconductor in use has a gap
	// above 6 eV (diamond 5.5 eV; Sze & Ng 2007, appendix G, from memory).
	CVMaxBuiltInV = 6.0
	// CVMinGrading and CVMaxGrading bound the grading coefficient m: 1/3
	// (linearly graded) and 1/2 (abrupt) are the textbook cases (Sze & Ng
	// 2007, sec. 2.2); hyperabrupt varactor profiles reach m of about 2
	// (common practice, from memory).
	CVMinGrading = 0.05
	CVMaxGrading = 3.0
)

// CVOptions configures FitJunctionCV.
type CVOptions struct {
	Window Window // bias range; zero = all points
	// FixParasitic holds Cpar at ParasiticF (F) instead of fitting it.
	FixParasitic bool
	ParasiticF   float64 // the fixed Cpar, F
	// FixGrading holds m at Grading instead of fitting it.
	FixGrading bool
	Grading    float64 // the fixed m
	// NoiseRel and NoiseAbsF describe the measurement noise: the standard
	// deviation of a capacitance C is NoiseRel*C + NoiseAbsF (F). Both zero
	// (the default) selects a constant relative error. Only their ratio
	// changes the fit; the standard errors are scaled by the reduced
	// chi-square either way.
	NoiseRel, NoiseAbsF float64
}

// ParamStatus says whether the data pin a fitted parameter down.
type ParamStatus struct {
	// Determined is false when the standard error is not finite or larger
	// than the value, when the fit ran to a bound, or when it did not
	// converge; front ends then print "not determined" instead of the
	// number. A held parameter counts as determined.
	Determined bool
	Fixed      bool   // held by the caller, not fitted
	Reason     string // why not determined, or "held at ..."; "" otherwise
}

// JunctionStatus is the ParamStatus of each parameter of JunctionCV.
type JunctionStatus struct {
	ZeroBiasCapacitance, BuiltInPotential, Grading, Parasitic ParamStatus
}

// CVFit is the result of FitJunctionCV; a standard error is NaN for a
// fixed parameter.
type CVFit struct {
	Params, StdErr JunctionCV     // fitted values and standard errors
	Status         JunctionStatus // which parameters the data determine
	Correlations   []Correlation  // pairs with |r| > 0.9
	RMSRelResidual float64        // rms of (C_model - C)/C
	// ReducedChiSquare is the weighted residual sum of squares over
	// (points - free parameters); with a stated noise model it is about 1
	// when the model describes the data.
	ReducedChiSquare float64
	Points           int    // points used
	UsedWindow       Window // bias span of the points used
	Iterations       int    // Levenberg-Marquardt iterations (best start)
	Converged        bool   // false when the iteration limit was hit
	// lnCov holds var(ln Cj0), var(ln Vbi) and cov(ln Cj0, ln Vbi); NaN
	// when the covariance is singular.
	lnCov [3]float64
}

// FitJunctionCV fits C = Cj0/(1 - V/Vbi)^m + Cpar (JunctionCV) to C-V data
// by Levenberg-Marquardt on noise-weighted residuals (C_model - C)/sigma,
// sigma = NoiseRel*C + NoiseAbsF (relative residuals by default), with
// Cj0, Vbi and m fitted as logarithms (positive) and Cpar linearly; the
// caller may hold m or Cpar. Vbi is kept above every bias in the window
// and below CVMaxBuiltInV, m within [CVMinGrading, CVMaxGrading]. Start
// values: a grid over Vbi (including the Mott-Schottky intercept) and m,
// solving the linear sub-problem for (Cj0, Cpar) at each grid point; the
// three best starts are iterated and the lowest cost kept. Standard errors
// from s^2 (J^T J)^-1 with the delta method; Status marks each parameter
// the data do not pin down (see ParamStatus). Units: v in V, c in F. Valid
// for depletion-region data (V < Vbi; diffusion capacitance in forward bias
// is not modelled). For an abrupt junction the fitted Vbi is the C-V
// intercept, which lies about 2kT/q below the electrostatic built-in
// potential (Sze & Ng 2007, sec. 2.2, from memory); it is not corrected.
// Source: model of Sze & Ng, Physics of Semiconductor Devices, 3rd ed.
// (2007), sec. 2.2 (abrupt m = 1/2, linearly graded m = 1/3); the general
// power law is the SPICE junction-capacitance form (CJO, VJ, M), common
// practice; fitting method as FitIV.
func FitJunctionCV(v, c []float64, opt CVOptions) (*CVFit, error) {
	return FitJunctionCVContext(context.Background(), v, c, opt)
}

// FitJunctionCVContext is FitJunctionCV with cancellation: the start grid
// and every model evaluation check ctx, so a cancelled fit returns
// ctx.Err() (wrapped; test with errors.Is) promptly whatever the number of
// points.
func FitJunctionCVContext(ctx context.Context, v, c []float64, opt CVOptions) (*CVFit, error) {
	if len(v) != len(c) {
		return nil, inputErr("capacitance", fmt.Sprintf("%d values", len(c)), fmt.Sprintf("%d values", len(v)), "one capacitance per voltage")
	}
	if err := opt.Window.check("Window"); err != nil {
		return nil, err
	}
	if opt.FixGrading && !(opt.Grading >= CVMinGrading && opt.Grading <= CVMaxGrading) {
		return nil, inputErr("Grading", opt.Grading, fmt.Sprintf("%g <= m <= %g", CVMinGrading, CVMaxGrading), "the grading coefficient of a junction (1/2 abrupt, 1/3 linearly graded)")
	}
	if opt.FixParasitic && (math.IsNaN(opt.ParasiticF) || math.IsInf(opt.ParasiticF, 0)) {
		return nil, inputErr("ParasiticF", opt.ParasiticF, "finite", "parasitic capacitance")
	}
	if !(opt.NoiseRel >= 0) || math.IsInf(opt.NoiseRel, 0) {
		return nil, inputErr("NoiseRel", opt.NoiseRel, ">= 0, finite", "relative standard deviation of C")
	}
	if !(opt.NoiseAbsF >= 0) || math.IsInf(opt.NoiseAbsF, 0) {
		return nil, inputErr("NoiseAbsF", opt.NoiseAbsF, ">= 0 F, finite", "absolute standard deviation of C")
	}
	rel, abs := opt.NoiseRel, opt.NoiseAbsF
	if rel == 0 && abs == 0 {
		rel = 1
	}
	var xs, ys, sig []float64
	for k := range v {
		if opt.Window.Contains(v[k]) && c[k] > 0 && !math.IsInf(c[k], 0) && !math.IsNaN(v[k]) && !math.IsInf(v[k], 0) {
			xs = append(xs, v[k])
			ys = append(ys, c[k])
			sig = append(sig, rel*c[k]+abs)
		}
	}
	np := 4
	if opt.FixParasitic {
		np--
	}
	if opt.FixGrading {
		np--
	}
	if len(xs) < np+1 {
		return nil, tooFew("window", len(xs), np+1, "the junction-capacitance fit needs more biases than parameters")
	}
	vmin, vmax := xs[0], xs[0]
	for _, x := range xs {
		vmax, vmin = math.Max(vmax, x), math.Min(vmin, x)
	}
	if vmax == vmin {
		return nil, inputErr("voltage", vmax, "a sweep over several biases", "all points are at one bias")
	}
	if vmax >= CVMaxBuiltInV {
		return nil, inputErr("voltage", fmt.Sprintf("%g V (largest bias)", vmax), fmt.Sprintf("below %g V", CVMaxBuiltInV), "depletion capacitance exists only below the built-in potential; narrow the window")
	}
	starts, err := cvStarts(ctx, xs, ys, sig, vmax, opt)
	if err != nil {
		return nil, fmt.Errorf("junction C-V fit: %w", err)
	}
	freeM, freeP := !opt.FixGrading, !opt.FixParasitic
	names := []string{"Cj0", "Vbi"}
	if freeM {
		names = append(names, "m")
	}
	if freeP {
		names = append(names, "Cpar")
	}
	p := len(names)
	cs := median(ys)
	base := JunctionCV{GradingCoefficient: opt.Grading, ParasiticCapacitanceF: opt.ParasiticF}
	unpack := func(th []float64) JunctionCV {
		j := base
		j.ZeroBiasCapacitanceF = math.Exp(th[0])
		j.BuiltInPotentialV = math.Exp(th[1])
		k := 2
		if freeM {
			j.GradingCoefficient = math.Exp(th[k])
			k++
		}
		if freeP {
			j.ParasiticCapacitanceF = th[k] * cs
		}
		return j
	}
	eval := func(th, r, jac []float64) bool {
		j := unpack(th)
		if j.BuiltInPotentialV > CVMaxBuiltInV || j.GradingCoefficient < CVMinGrading || j.GradingCoefficient > CVMaxGrading {
			return false
		}
		for n := range xs {
			if n&(cancelCheckEvery-1) == 0 && ctx.Err() != nil {
				return false
			}
			u := 1 - xs[n]/j.BuiltInPotentialV
			if !(u > 0) {
				return false
			}
			cj := j.ZeroBiasCapacitanceF * math.Pow(u, -j.GradingCoefficient)
			r[n] = (cj + j.ParasiticCapacitanceF - ys[n]) / sig[n]
			if jac != nil {
				row := jac[n*p : n*p+p]
				row[0] = cj / sig[n]
				row[1] = -j.GradingCoefficient * cj * xs[n] / (j.BuiltInPotentialV * u) / sig[n]
				k := 2
				if freeM {
					row[k] = -j.GradingCoefficient * cj * math.Log(u) / sig[n]
					k++
				}
				if freeP {
					row[k] = cs / sig[n]
				}
			}
		}
		return true
	}
	var lr lmResult
	found := false
	var lastErr error
	for _, s := range starts {
		th := []float64{math.Log(s.ZeroBiasCapacitanceF), math.Log(s.BuiltInPotentialV)}
		if freeM {
			th = append(th, math.Log(s.GradingCoefficient))
		}
		if freeP {
			th = append(th, s.ParasiticCapacitanceF/cs)
		}
		r, err := levenberg(ctx, lmProblem{m: len(xs), p: p, eval: eval}, th, 300)
		if cerr := ctx.Err(); cerr != nil {
			return nil, fmt.Errorf("junction C-V fit: %w", cerr)
		}
		if err != nil {
			lastErr = err
			continue
		}
		if !found || r.cost < lr.cost || (r.converged && !lr.converged && r.cost <= lr.cost*(1+1e-9)) {
			lr, found = r, true
		}
	}
	if !found {
		if lastErr == nil {
			lastErr = ErrNoConvergence
		}
		return nil, fmt.Errorf("junction C-V fit: %w", lastErr)
	}
	fit := &CVFit{Params: unpack(lr.theta), Points: len(xs), UsedWindow: Window{vmin, vmax}, Iterations: lr.iter, Converged: lr.converged}
	nan := math.NaN()
	fit.StdErr = JunctionCV{nan, nan, nan, nan}
	fit.lnCov = [3]float64{nan, nan, nan}
	if lr.cov != nil {
		fit.StdErr.ZeroBiasCapacitanceF = fit.Params.ZeroBiasCapacitanceF * math.Sqrt(lr.cov[0])
		fit.StdErr.BuiltInPotentialV = fit.Params.BuiltInPotentialV * math.Sqrt(lr.cov[p+1])
		fit.lnCov = [3]float64{lr.cov[0], lr.cov[p+1], lr.cov[1]}
		k := 2
		if freeM {
			fit.StdErr.GradingCoefficient = fit.Params.GradingCoefficient * math.Sqrt(lr.cov[k*p+k])
			k++
		}
		if freeP {
			fit.StdErr.ParasiticCapacitanceF = cs * math.Sqrt(lr.cov[k*p+k])
		}
	}
	fit.Correlations = strongCorrelations(lr.cov, names)
	ss := 0.0
	for n := range xs {
		e := (fit.Params.Capacitance(xs[n]) - ys[n]) / ys[n]
		ss += e * e
	}
	fit.RMSRelResidual = math.Sqrt(ss / float64(len(xs)))
	fit.ReducedChiSquare = lr.cost / float64(len(xs)-p)
	fit.Status = junctionStatus(fit, opt, vmax, minOf(ys), lr.cov == nil)
	return fit, nil
}

// junctionStatus applies the rules of ParamStatus to a finished fit.
func junctionStatus(f *CVFit, opt CVOptions, vmax, cmin float64, singular bool) JunctionStatus {
	p, se := f.Params, f.StdErr
	free := func(val, s float64, unit string, bound func() string) ParamStatus {
		var why []string
		if !f.Converged {
			why = append(why, "the fit did not converge (iteration limit reached)")
		}
		if b := bound(); b != "" {
			why = append(why, b)
		}
		switch {
		case singular || math.IsNaN(s) || math.IsInf(s, 0):
			why = append(why, "the data cannot separate this parameter from the others (singular curvature matrix)")
		case s > math.Abs(val):
			why = append(why, fmt.Sprintf("standard error %.3g%s is larger than the value %.3g%s", s, unit, val, unit))
		}
		if len(why) > 0 {
			return ParamStatus{Reason: strings.Join(why, "; ")}
		}
		return ParamStatus{Determined: true}
	}
	none := func() string { return "" }
	st := JunctionStatus{
		ZeroBiasCapacitance: free(p.ZeroBiasCapacitanceF, se.ZeroBiasCapacitanceF, " F", none),
		BuiltInPotential: free(p.BuiltInPotentialV, se.BuiltInPotentialV, " V", func() string {
			switch {
			case p.BuiltInPotentialV >= 0.99*CVMaxBuiltInV:
				return fmt.Sprintf("the fit ran to the upper bound Vbi = %g V", CVMaxBuiltInV)
			case p.BuiltInPotentialV-math.Max(vmax, 0) < 1e-3:
				return fmt.Sprintf("the fit ran to the lower bound, the largest bias in the data or 0 V (%.4g V): forward points beyond the depletion region (diffusion capacitance) pull it there; narrow the window", math.Max(vmax, 0))
			}
			return ""
		}),
	}
	if opt.FixGrading {
		st.Grading = ParamStatus{Determined: true, Fixed: true, Reason: fmt.Sprintf("held at %g", opt.Grading)}
	} else {
		st.Grading = free(p.GradingCoefficient, se.GradingCoefficient, "", func() string {
			switch {
			case p.GradingCoefficient >= 0.99*CVMaxGrading:
				return fmt.Sprintf("the fit ran to the upper bound m = %g", CVMaxGrading)
			case p.GradingCoefficient <= 1.01*CVMinGrading:
				return fmt.Sprintf("the fit ran to the lower bound m = %g", CVMinGrading)
			}
			return ""
		})
	}
	if opt.FixParasitic {
		st.Parasitic = ParamStatus{Determined: true, Fixed: true, Reason: fmt.Sprintf("held at %g F", opt.ParasiticF)}
	} else {
		// Cpar is often near zero, so a standard error above the value
		// means "small", not "unknown": it is undetermined only when its
		// uncertainty exceeds the smallest capacitance measured.
		st.Parasitic = free(math.Inf(1), se.ParasiticCapacitanceF, " F", func() string {
			if se.ParasiticCapacitanceF > cmin {
				return fmt.Sprintf("standard error %.3g F is larger than the smallest capacitance measured (%.3g F)", se.ParasiticCapacitanceF, cmin)
			}
			return ""
		})
	}
	return st
}

// cvStarts returns up to three start points for FitJunctionCV, the best of
// a grid over (Vbi, m) with (Cj0, Cpar) solved linearly at each node.
func cvStarts(ctx context.Context, xs, ys, sig []float64, vmax float64, opt CVOptions) ([]JunctionCV, error) {
	vbis := []float64{0.3, 0.5, 0.7, 0.9, 1.2, 1.6, 2.2, 3.0, 4.0, 5.5}
	for _, d := range []float64{0.02, 0.05, 0.1, 0.2, 0.4} {
		vbis = append(vbis, vmax+d)
	}
	if ms, err := MottSchottky(xs, ys, CVGeometry{1, 1, 1}, Window{}); err == nil && ms.BuiltInV > 0 && ms.BuiltInV < CVMaxBuiltInV {
		vbis = append(vbis, ms.BuiltInV)
	}
	ms := []float64{0.2, 0.25, 1.0 / 3, 0.4, 0.5, 0.6, 0.75, 1, 1.5}
	if opt.FixGrading {
		ms = []float64{opt.Grading}
	}
	type node struct {
		j    JunctionCV
		cost float64
	}
	var nodes []node
	for _, vb := range vbis {
		if vb <= vmax+0.005 || vb > 0.99*CVMaxBuiltInV || vb <= 0 {
			continue
		}
		for _, m := range ms {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
			j, cost := linearCj(xs, ys, sig, vb, m, opt)
			if j.ZeroBiasCapacitanceF > 0 && !math.IsInf(cost, 0) && !math.IsNaN(cost) {
				nodes = append(nodes, node{j, cost})
			}
		}
	}
	sort.SliceStable(nodes, func(a, b int) bool { return nodes[a].cost < nodes[b].cost })
	var out []JunctionCV
	for _, n := range nodes {
		if len(out) == 3 {
			break
		}
		out = append(out, n.j)
	}
	if len(out) == 0 {
		j := JunctionCV{median(ys), math.Max(vmax, 0) + 0.5, 0.5, 0}
		if opt.FixParasitic {
			j.ParasiticCapacitanceF = opt.ParasiticF
		}
		if opt.FixGrading {
			j.GradingCoefficient = opt.Grading
		}
		out = append(out, j)
	}
	return out, nil
}

// linearCj solves the weighted linear least-squares problem for (Cj0, Cpar)
// at fixed Vbi and m (residuals (C_model - C)/sigma) and returns the cost.
func linearCj(x, c, sig []float64, vbi, m float64, opt CVOptions) (JunctionCV, float64) {
	// Minimise sum ((Cj0 f + P - c)/sigma)^2 with f = (1 - V/Vbi)^-m.
	var s11, s12, s22, b1, b2 float64
	f := make([]float64, len(x))
	for k := range x {
		f[k] = math.Pow(1-x[k]/vbi, -m)
		w := 1 / (sig[k] * sig[k])
		s11 += w * f[k] * f[k]
		s12 += w * f[k]
		s22 += w
		b1 += w * f[k] * c[k]
		b2 += w * c[k]
	}
	j := JunctionCV{BuiltInPotentialV: vbi, GradingCoefficient: m}
	if opt.FixParasitic {
		j.ParasiticCapacitanceF = opt.ParasiticF
		j.ZeroBiasCapacitanceF = (b1 - opt.ParasiticF*s12) / s11
	} else {
		det := s11*s22 - s12*s12
		if !(math.Abs(det) > 0) {
			return j, math.Inf(1)
		}
		j.ZeroBiasCapacitanceF = (b1*s22 - b2*s12) / det
		j.ParasiticCapacitanceF = (s11*b2 - s12*b1) / det
	}
	cost := 0.0
	for k := range x {
		r := (j.ZeroBiasCapacitanceF*f[k] + j.ParasiticCapacitanceF - c[k]) / sig[k]
		cost += r * r
	}
	return j, cost
}

func minOf(x []float64) float64 {
	m := math.Inf(1)
	for _, v := range x {
		m = math.Min(m, v)
	}
	return m
}
