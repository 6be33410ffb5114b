package extract

import (
	"context"
	"fmt"
	"math"
)

// Rules of AnalyzeCV.
const (
	// CVAbruptGradingTolerance is how close a fitted grading coefficient
	// must be to 1/2 for the junction to count as one-sided abrupt, so that
	// the Mott-Schottky line gives the doping: |m - 1/2| <= 0.05. An
	// absolute band is used rather than a number of standard errors, which
	// would accept any m on noisy data and reject a slightly non-uniform
	// profile on clean data (a choice of this project).
	CVAbruptGradingTolerance = 0.05
	// CVLineMisfitLimit flags the Mott-Schottky line when its residual
	// standard deviation (m held at 1/2, Cpar fitted) exceeds the junction
	// fit's by more than this factor: for an abrupt junction both describe
	// the data and the ratio stays near 1 (a choice of this project).
	CVLineMisfitLimit = 1.5
)

// CVAnalysisOptions configures AnalyzeCV.
type CVAnalysisOptions struct {
	// Fit sets the bias window, the noise model and which of m and Cpar
	// are held (see CVOptions).
	Fit CVOptions
	// Geometry turns the Mott-Schottky slope into a doping and the
	// capacitance into a depletion depth. The zero value (no area) leaves
	// the doping and the profile out; Cj0, Vbi and m need no area.
	Geometry CVGeometry
	// ProfileHalfWindow > 0 asks for the differential doping profile of
	// C - Cpar with that half-window (see DopingProfile); 0 = no profile.
	ProfileHalfWindow int
}

// CVQuantity is one reported number of a C-V analysis.
type CVQuantity struct {
	Value, StdErr float64 // value and standard error (NaN when not known)
	// Determined is false when the data do not pin the value down, or it
	// was not computed; Reason then says why and front ends print "not
	// determined" instead of Value.
	Determined bool
	Fixed      bool   // held by the caller
	Reason     string // why not determined, or "held at ..."
}

// MottSchottkyLine is the line 1/(C - Cpar)^2 = Intercept + Slope V of
// the junction with m held at 1/2 and Cpar fitted (or held) jointly:
// Intercept = 1/Cj0^2, Slope = -1/(Cj0^2 Vbi).
type MottSchottkyLine struct {
	Slope, Intercept float64 // F^-2 V^-1, F^-2
	BuiltInV         float64 // its voltage-axis intercept, V
	StdErrV          float64 // standard error of BuiltInV, V
	ParasiticF       float64 // the Cpar subtracted, F
	Fit              *CVFit  // the fit with m = 1/2
	// MisfitRatio is the line's residual standard deviation over the
	// junction fit's, sqrt(chi2_line/(n - p_line)) / sqrt(chi2/(n - p)).
	MisfitRatio float64
	Flagged     bool   // MisfitRatio > CVLineMisfitLimit
	Note        string // why it is flagged
}

// CVAnalysis is the C-V analysis of one data set. The headline numbers are
// those of the junction fit C = Cj0/(1 - V/Vbi)^m + Cpar; the doping comes
// from the Mott-Schottky line of C - Cpar and only when m is consistent
// with 1/2.
type CVAnalysis struct {
	ZeroBiasCapacitanceF  CVQuantity // Cj0, F
	BuiltInPotentialV     CVQuantity // Vbi, V
	GradingCoefficient    CVQuantity // m
	ParasiticCapacitanceF CVQuantity // Cpar, F
	DopingM3              CVQuantity // N of the lightly doped side, m^-3 (units of Geometry)
	Junction              *CVFit     // the headline fit
	// Line is the Mott-Schottky line of C - Cpar; nil when its fit failed.
	Line *MottSchottkyLine
	// Profile is the differential doping profile of C - Cpar, when asked
	// for and an area is given.
	Profile []ProfilePoint
	Notes   []string
}

// AnalyzeCV analyses a C-V sweep of a junction:
//
//  1. fits C = Cj0/(1 - V/Vbi)^m + Cpar (FitJunctionCV); Cj0, Vbi, m and
//     Cpar with their standard errors and ParamStatus are the headline;
//  2. fits the same model with m held at 1/2, which is the Mott-Schottky
//     line of the parasitic-corrected capacitance,
//     1/(C - Cpar)^2 = 2 (Vbi - V)/(q eps N A^2), fitted jointly with
//     Cpar by least squares on C, and flags it when its misfit exceeds the
//     junction fit's by more than CVLineMisfitLimit;
//  3. reports the doping N = DopingFromSlope(slope) of that line only when
//     an area is given and m is held at 1/2 or fitted within
//     CVAbruptGradingTolerance of 1/2 and determined; its standard error
//     follows from the covariance of (ln Cj0, ln Vbi) by the delta method,
//     ln N = const - 2 ln Cj0 - ln Vbi, so it includes the uncertainty of
//     Cpar;
//  4. optionally, the differential doping profile of C - Cpar, with the
//     line's Cpar when the doping is reported (m consistent with 1/2),
//     else the junction fit's.
//
// Units: v in V (forward positive), c in F, doping in m^-3 with SI
// geometry. Errors: those of FitJunctionCV, and an invalid Geometry when
// one is given. A failed line or profile is a note, not an error.
// Source: Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007),
// sec. 2.2 (abrupt and linearly graded junction capacitance); the power
// law with Cpar is the SPICE junction-capacitance form (common practice);
// Schroder, Semiconductor Material and Device Characterization, 3rd ed.
// (2006), ch. 2 (profiling; parasitic capacitance must be removed first).
func AnalyzeCV(v, c []float64, opt CVAnalysisOptions) (*CVAnalysis, error) {
	return AnalyzeCVContext(context.Background(), v, c, opt)
}

// AnalyzeCVContext is AnalyzeCV with cancellation (see
// FitJunctionCVContext): a cancelled analysis returns ctx.Err() (wrapped).
func AnalyzeCVContext(ctx context.Context, v, c []float64, opt CVAnalysisOptions) (*CVAnalysis, error) {
	haveArea := opt.Geometry != (CVGeometry{})
	if haveArea {
		if _, err := opt.Geometry.check(); err != nil {
			return nil, err
		}
	}
	if opt.ProfileHalfWindow < 0 {
		return nil, inputErr("ProfileHalfWindow", opt.ProfileHalfWindow, "0 (no profile) or 1..1000 points", "the derivative window of the doping profile")
	}
	jf, err := FitJunctionCVContext(ctx, v, c, opt.Fit)
	if err != nil {
		return nil, err
	}
	a := &CVAnalysis{Junction: jf}
	p, se, st := jf.Params, jf.StdErr, jf.Status
	a.ZeroBiasCapacitanceF = quantity(p.ZeroBiasCapacitanceF, se.ZeroBiasCapacitanceF, st.ZeroBiasCapacitance)
	a.BuiltInPotentialV = quantity(p.BuiltInPotentialV, se.BuiltInPotentialV, st.BuiltInPotential)
	a.GradingCoefficient = quantity(p.GradingCoefficient, se.GradingCoefficient, st.Grading)
	a.ParasiticCapacitanceF = quantity(p.ParasiticCapacitanceF, se.ParasiticCapacitanceF, st.Parasitic)
	if !jf.Converged {
		a.Notes = append(a.Notes, "the junction fit did not converge (iteration limit reached): no parameter is determined")
	}

	// The Mott-Schottky line of C - Cpar (m = 1/2).
	lf := jf
	if !(opt.Fit.FixGrading && opt.Fit.Grading == 0.5) {
		lo := opt.Fit
		lo.FixGrading, lo.Grading = true, 0.5
		lf, err = FitJunctionCVContext(ctx, v, c, lo)
		if cerr := ctx.Err(); cerr != nil {
			return nil, fmt.Errorf("Mott-Schottky line: %w", cerr)
		}
		if err != nil {
			lf = nil
			a.Notes = append(a.Notes, "Mott-Schottky line (m = 1/2) failed: "+err.Error())
		}
	}
	if lf != nil {
		lp := lf.Params
		line := &MottSchottkyLine{Fit: lf, ParasiticF: lp.ParasiticCapacitanceF,
			Intercept: 1 / (lp.ZeroBiasCapacitanceF * lp.ZeroBiasCapacitanceF),
			BuiltInV:  lp.BuiltInPotentialV, StdErrV: lf.StdErr.BuiltInPotentialV}
		line.Slope = -line.Intercept / lp.BuiltInPotentialV
		line.MisfitRatio = math.Sqrt(lf.ReducedChiSquare / jf.ReducedChiSquare)
		if jf.ReducedChiSquare == 0 {
			line.MisfitRatio = 1
			if lf.ReducedChiSquare > 0 {
				line.MisfitRatio = math.Inf(1)
			}
		}
		if line.MisfitRatio > CVLineMisfitLimit {
			line.Flagged = true
			line.Note = fmt.Sprintf("the Mott-Schottky line (m = 1/2) misfits the data %.3g times more than the junction fit (limit %g): the junction is not one-sided abrupt with uniform doping", line.MisfitRatio, CVLineMisfitLimit)
			a.Notes = append(a.Notes, line.Note)
		}
		a.Line = line
	}

	a.DopingM3 = a.doping(opt, haveArea)
	if a.DopingM3.Determined && a.Line != nil && a.Line.Flagged {
		a.Notes = append(a.Notes, "the doping is reported because m is near 1/2, but the Mott-Schottky line is flagged: it is an average over a non-uniform profile")
	}

	if opt.ProfileHalfWindow > 0 {
		switch {
		case !haveArea:
			a.Notes = append(a.Notes, "doping profile: no area given")
		default:
			// With m consistent with 1/2 the line's Cpar (m held) is the
			// better-determined estimate; otherwise the junction fit's.
			cpar, det := p.ParasiticCapacitanceF, a.ParasiticCapacitanceF.Determined
			if a.DopingM3.Determined {
				cpar, det = a.Line.ParasiticF, a.Line.Fit.Status.Parasitic.Determined
			}
			cc := make([]float64, len(c))
			for k := range c {
				cc[k] = c[k] - cpar
			}
			vv, cw := windowed(v, cc, opt.Fit.Window)
			prof, err := DopingProfile(vv, cw, opt.Geometry, opt.ProfileHalfWindow)
			if err != nil {
				a.Notes = append(a.Notes, "doping profile failed: "+err.Error())
			}
			a.Profile = prof
			if !det {
				a.Notes = append(a.Notes, "doping profile: Cpar is not determined, so the profile of C - Cpar is uncertain")
			}
			if !a.DopingM3.Determined {
				a.Notes = append(a.Notes, "doping profile: the differential formula assumes a one-sided junction")
			}
		}
	}
	return a, nil
}

// doping applies rule 3 of AnalyzeCV.
func (a *CVAnalysis) doping(opt CVAnalysisOptions, haveArea bool) CVQuantity {
	nan := math.NaN()
	no := func(why string) CVQuantity { return CVQuantity{Value: nan, StdErr: nan, Reason: why} }
	m := a.GradingCoefficient
	switch {
	case !haveArea:
		return no("no area given: the doping follows from C per unit area")
	case a.Line == nil:
		return no("the Mott-Schottky line could not be fitted")
	case m.Fixed && math.Abs(m.Value-0.5) > 1e-12:
		return no(fmt.Sprintf("m is held at %g; the Mott-Schottky doping needs a one-sided abrupt junction (m = 1/2)", m.Value))
	case !m.Determined:
		return no("m is not determined (" + m.Reason + "); hold m at 0.5 to get the abrupt-junction doping")
	case math.Abs(m.Value-0.5) > CVAbruptGradingTolerance:
		return no(fmt.Sprintf("m = %.3g +- %.2g is not consistent with 1/2 (allowed |m - 1/2| <= %g): the junction is not one-sided abrupt, and the Mott-Schottky doping would be wrong", m.Value, m.StdErr, CVAbruptGradingTolerance))
	}
	lf := a.Line.Fit
	if !lf.Status.ZeroBiasCapacitance.Determined || !lf.Status.BuiltInPotential.Determined {
		return no("the Mott-Schottky line is not determined (Cj0: " + lf.Status.ZeroBiasCapacitance.Reason + "; Vbi: " + lf.Status.BuiltInPotential.Reason + ")")
	}
	n, err := DopingFromSlope(a.Line.Slope, opt.Geometry)
	if err != nil {
		return no(err.Error())
	}
	c := lf.lnCov
	s := n * math.Sqrt(math.Max(0, 4*c[0]+c[1]+4*c[2]))
	q := CVQuantity{Value: n, StdErr: s, Determined: true}
	if !(s <= n) {
		q.Determined, q.Reason = false, fmt.Sprintf("standard error %.3g is larger than the value %.3g", s, n)
	}
	return q
}

func quantity(v, se float64, st ParamStatus) CVQuantity {
	return CVQuantity{Value: v, StdErr: se, Determined: st.Determined, Fixed: st.Fixed, Reason: st.Reason}
}

// windowed keeps the points of v, y inside w (all for the zero window).
func windowed(v, y []float64, w Window) ([]float64, []float64) {
	if w.IsZero() {
		return v, y
	}
	var a, b []float64
	for k := range v {
		if w.Contains(v[k]) {
			a = append(a, v[k])
			b = append(b, y[k])
		}
	}
	return a, b
}
