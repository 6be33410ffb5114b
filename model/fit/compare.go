package fit

import (
	"context"
	"errors"
	"fmt"
	"math"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// Limits of the reconciling-lifetime search, s, and the largest fitted
// ideality factor for which a diffusion lifetime is still inferred.
const (
	ReconcileMinLifetime = 1e-12 // s (1 ps)
	ReconcileMaxLifetime = 1.0   // s
	ReconcileMaxIdeality = 1.3
	reconcileMinIdeality = 0.9 // below, the fit is not a diode law at all
)

// IVComparisonPoint is one measured point against the model's prediction.
type IVComparisonPoint struct {
	BiasV      float64 // measured bias, V
	MeasuredA  float64 // measured current, A
	PredictedA float64 // the model's total current at that bias, A
	Ratio      float64 // MeasuredA / PredictedA
	InWindow   bool    // the point is forward (V > 0, I > 0) and inside the window
}

// IVComparison is a measured forward I-V curve set against the model of a
// junction, and the minority-carrier lifetime that reconciles the two.
type IVComparison struct {
	// TemperatureK is the temperature the model was evaluated at and the
	// data fitted at; TemperatureSource says where it came from
	// ("data set" or "spec").
	TemperatureK      float64
	TemperatureSource string
	// Window is the bias window used (the span of the points used).
	Window extract.Window
	Points []IVComparisonPoint
	// RMSLogRatio is sqrt(mean(ln(measured/predicted)^2)) over the forward
	// points in the window (0.01 is about 1 % discrepancy).
	RMSLogRatio float64
	// Fit is the single-diode fit of the data in the window (its ideality
	// factor decides whether a diffusion lifetime can be inferred); Double
	// the double-diode fit (nil when it failed).
	Fit, Double *extract.IVFit
	// MeasuredIsA is the measured diffusion saturation current, A, and
	// IsSource the fit it comes from; ModelIsA the model's low-injection
	// diffusion saturation current with the spec's lifetimes, A.
	MeasuredIsA, ModelIsA float64
	IsSource              string
	// LifetimeSide names the lifetime varied: "hole lifetime in the n
	// region" or "electron lifetime in the p region" (the lightly doped
	// side; the other side's lifetime is kept as specified).
	LifetimeSide string
	// LifetimeField is the model.Spec field varied (model.FieldHoleLifetime or
	// model.FieldElectronLifetime); SpecLifetimeS its value in the model before
	// (the default when the spec leaves it 0), s.
	LifetimeField string
	SpecLifetimeS float64
	// ReconcilingLifetimeS is the lifetime for which the model's diffusion
	// saturation current equals MeasuredIsA, s, and
	// ReconcilingDiffusionLengthM the diffusion length sqrt(D tau) that
	// goes with it, m.
	ReconcilingLifetimeS        float64
	ReconcilingDiffusionLengthM float64
	// Evaluations counts the model evaluations of the search.
	Evaluations int
	// Assumptions are the conditions the inferred lifetime rests on.
	Assumptions []string
}

// CompareIV evaluates the junction of spec at the measured biases of an
// I-V data set and compares: the ratio measured/predicted per point and its
// RMS log over the window [v1, v2] (v1 = v2 = 0: all forward points). It
// then fits a single diode to the data in the window (extract.FitIV) and
// searches, by bisection on log(tau) over 1 ps to 1 s with the model
// evaluated at each step, the minority-carrier lifetime of the lightly doped
// side (holes in the n region when Nd <= Na, else electrons in the p
// region; the other side's lifetime is kept) for which the model's
// low-injection diffusion saturation current (physics.Static.IsDiff,
// band-gap narrowing and ionisation included as enabled) equals the
// measured diffusion Is: the n = 1 part of a double-diode fit
// (extract.ModelDouble), else the single-diode Is. The depletion-region (SRH) lifetime of
// that side follows the same override, as in the model.
//
// The model is evaluated at the data set's temperature when it states one,
// else at the spec's. It returns an error, not a lifetime, when the fit's
// ideality factor is outside 0.9..1.3 (above, recombination dominates and a
// diffusion lifetime is meaningless) or when the fitted Is lies outside the
// range of IsDiff over the lifetime range (naming the limit).
func CompareIV(spec model.Spec, ds *measure.DataSet, v1, v2 float64) (*IVComparison, error) {
	return CompareIVContext(context.Background(), spec, ds, v1, v2)
}

// CompareIVContext is CompareIV with cancellation: the fits stop soon
// after ctx is cancelled and the error wraps ctx.Err().
func CompareIVContext(ctx context.Context, spec model.Spec, ds *measure.DataSet, v1, v2 float64) (*IVComparison, error) {
	if ds == nil {
		return nil, errors.New("compare: no data set given")
	}
	if ds.Kind != measure.KindIV || len(ds.CurrentA) != len(ds.VoltageV) {
		return nil, fmt.Errorf("compare: data set %q is %q with %d currents for %d voltages: an I-V data set (one current per voltage) is needed",
			ds.SourceFile, ds.Kind, len(ds.CurrentA), len(ds.VoltageV))
	}
	w := extract.Window{MinV: v1, MaxV: v2}
	if !w.IsZero() && !(v1 < v2) {
		return nil, fmt.Errorf("compare: window %g V to %g V: allowed a start below the end (the window selects the fitted biases)", v1, v2)
	}
	c := &IVComparison{TemperatureK: spec.Temperature, TemperatureSource: "spec"}
	if t, ok := ds.Temperature(); ok && t > 0 {
		c.TemperatureK, c.TemperatureSource = t, "data set"
		spec.Temperature = t
	}
	st, err := spec.Static()
	if err != nil {
		return nil, fmt.Errorf("compare: the junction: %w", err)
	}

	// Prediction at the measured biases (the total current, as IVCurve).
	var sum2 float64
	n := 0
	lo, hi := math.Inf(1), math.Inf(-1)
	for k, v := range ds.VoltageV {
		i := ds.CurrentA[k]
		p := st.SolveFrom(v, math.NaN())
		pt := IVComparisonPoint{BiasV: v, MeasuredA: i, PredictedA: p.Current, Ratio: i / p.Current}
		if v > 0 && i > 0 && p.Current > 0 && w.Contains(v) && !math.IsNaN(pt.Ratio) && !math.IsInf(pt.Ratio, 0) {
			pt.InWindow = true
			l := math.Log(pt.Ratio)
			sum2 += l * l
			n++
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		c.Points = append(c.Points, pt)
	}
	if n == 0 {
		return nil, fmt.Errorf("compare: window %g V to %g V holds no forward point (V > 0, I > 0) of %q", v1, v2, ds.SourceFile)
	}
	c.RMSLogRatio = math.Sqrt(sum2 / float64(n))
	c.Window = extract.Window{MinV: lo, MaxV: hi}

	fit, err := extract.FitIVContext(ctx, ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: c.TemperatureK, Window: w})
	if err != nil {
		return nil, fmt.Errorf("compare: fitting %q: %w", ds.SourceFile, err)
	}
	c.Fit = fit
	c.ModelIsA = st.IsDiff
	if nf := fit.Single.IdealityFactor; !(nf >= reconcileMinIdeality && nf <= ReconcileMaxIdeality) {
		why := "below 0.9 the data follow no diode law"
		if nf > ReconcileMaxIdeality {
			why = "recombination or another non-diffusion current dominates the window, so a diffusion lifetime would be meaningless; choose a window at higher bias"
		}
		return c, fmt.Errorf("compare: fitted ideality factor n = %.3f over %g V to %g V: allowed %.1f to %.1f (%s)",
			nf, fit.UsedWindow.MinV, fit.UsedWindow.MaxV, reconcileMinIdeality, ReconcileMaxIdeality, why)
	}

	// The diffusion (n = 1) part of a double-diode fit is the measured
	// counterpart of IsDiff; a single-diode Is with n > 1 would absorb the
	// recombination current and overstate it. Fall back to the single
	// diode only when the double-diode fit fails.
	c.MeasuredIsA, c.IsSource = fit.Single.SaturationCurrentA, "single-diode fit (the double-diode fit failed: "
	if dd, err := extract.FitIVContext(ctx, ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: c.TemperatureK, Window: w, Model: extract.ModelDouble}); err == nil && dd.Double.DiffusionCurrentA > 0 {
		c.Double, c.MeasuredIsA, c.IsSource = dd, dd.Double.DiffusionCurrentA, "n = 1 part of a double-diode fit"
	} else {
		if err == nil {
			err = errors.New("no diffusion current found")
		}
		c.IsSource += err.Error() + "; the single-diode Is is overstated when n > 1)"
	}

	holes := spec.DonorDensity <= spec.AcceptorDensity
	c.LifetimeSide, c.LifetimeField, c.SpecLifetimeS = "electron lifetime in the p region (the lightly doped side)", model.FieldElectronLifetime, st.TauN
	if holes {
		c.LifetimeSide, c.LifetimeField, c.SpecLifetimeS = "hole lifetime in the n region (the lightly doped side)", model.FieldHoleLifetime, st.TauP
	}
	at := func(tau float64) (*physics.Static, error) {
		s := spec
		if holes {
			s.HoleLifetime = tau
		} else {
			s.ElectronLifetime = tau
		}
		c.Evaluations++
		return s.Static()
	}
	target := math.Log(c.MeasuredIsA)
	gap := func(tau float64) (float64, *physics.Static, error) {
		s, err := at(tau)
		if err != nil {
			return 0, nil, err
		}
		return math.Log(s.IsDiff) - target, s, nil
	}
	a, b := ReconcileMinLifetime, ReconcileMaxLifetime
	fa, _, err := gap(a)
	if err != nil {
		return c, fmt.Errorf("compare: the junction at %s = %g s: %w", c.LifetimeField, a, err)
	}
	fb, sb, err := gap(b)
	if err != nil {
		return c, fmt.Errorf("compare: the junction at %s = %g s: %w", c.LifetimeField, b, err)
	}
	// IsDiff falls as the lifetime grows (fewer recombinations): fa > fb.
	if fa < 0 {
		return c, fmt.Errorf("compare: measured Is = %s is above the model's diffusion Is at the 1 ps lifetime limit (%s): no lifetime in 1 ps to 1 s reconciles them; the current is not diffusion from this junction",
			model.Format(model.Current, c.MeasuredIsA, 3, true), model.Format(model.Current, math.Exp(fa+target), 3, true))
	}
	if fb > 0 {
		return c, fmt.Errorf("compare: measured Is = %s is below the model's diffusion Is at the 1 s lifetime limit (%s; the other side and the contacts set this floor): no lifetime in 1 ps to 1 s reconciles them",
			model.Format(model.Current, c.MeasuredIsA, 3, true), model.Format(model.Current, math.Exp(fb+target), 3, true))
	}
	la, lb := math.Log(a), math.Log(b)
	best := sb
	tau := b
	for range 80 {
		lm := (la + lb) / 2
		tau = math.Exp(lm)
		fm, sm, err := gap(tau)
		if err != nil {
			return c, fmt.Errorf("compare: the junction at %s = %g s: %w", c.LifetimeField, tau, err)
		}
		best = sm
		if fm > 0 {
			la = lm
		} else {
			lb = lm
		}
		if lb-la < 1e-6 || math.Abs(fm) < 1e-9 {
			break
		}
	}
	c.ReconcilingLifetimeS = tau
	if holes {
		c.ReconcilingDiffusionLengthM = best.LP
	} else {
		c.ReconcilingDiffusionLengthM = best.LN
	}
	c.Assumptions = compareAssumptions(spec, c, holes)
	return c, nil
}

func compareAssumptions(s model.Spec, c *IVComparison, holes bool) []string {
	contact := func(width float64, v *float64, side string) string {
		switch {
		case width == 0:
			return "the " + side + " region is long (no contact within a diffusion length)"
		case v == nil:
			return fmt.Sprintf("the %s region is %s wide with an ideal ohmic contact", side, model.Format(model.Length, width, 3, true))
		}
		return fmt.Sprintf("the %s region is %s wide with a contact recombination velocity of %s", side, model.Format(model.Length, width, 3, true), model.Format(model.Velocity, *v, 3, true))
	}
	other := "the p region's electron current is as modelled (its lifetime and width as specified)"
	if !holes {
		other = "the n region's hole current is as modelled (its lifetime and width as specified)"
	}
	return []string{
		fmt.Sprintf("geometry and doping are as defined: area %s, Na = %s, Nd = %s (%s profile)",
			model.Format(model.Area, s.Area, 3, true), model.Format(model.Density, s.AcceptorDensity, 3, true), model.Format(model.Density, s.DonorDensity, 3, true), s.Profile),
		fmt.Sprintf("the current is diffusion-dominated in the window %g V to %g V (fitted ideality %.3f, near 1); the measured Is is the %s",
			c.Fit.UsedWindow.MinV, c.Fit.UsedWindow.MaxV, c.Fit.Single.IdealityFactor, c.IsSource),
		contact(s.PWidth, s.PContactVelocity, "p") + "; " + contact(s.NWidth, s.NContactVelocity, "n"),
		fmt.Sprintf("the temperature is %s (from the %s)", model.Format(model.Temperature, c.TemperatureK, 4, true), c.TemperatureSource),
		other,
		"the lifetime varied is the " + c.LifetimeSide + "; its depletion-region (SRH) lifetime follows it as in the model",
	}
}
