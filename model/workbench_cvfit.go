package model

import (
	"errors"
	"fmt"
	"math"

	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// CVFitView is a C-V fit prepared for the workbench: the Mott-Schottky
// line (built-in potential and the doping of the lightly doped side), the
// general junction-capacitance fit when it converges, display rows, and
// the curves of the C-V fit screen.
type CVFitView struct {
	MottSchottky *extract.MottSchottkyResult
	// Junction is the fit of C = Cj0/(1 - V/Vbi)^m + Cpar, nil when it
	// failed or did not converge (JunctionNote says why).
	Junction     *extract.CVFit
	JunctionNote string
	// AreaM2 and PermittivityFm are the geometry taken from the spec.
	AreaM2, PermittivityFm float64
	Material               string
	Rows                   []FitRow
	// Inverse is 1/C^2 against bias at the measured biases (sorted), with
	// the series "measured" and "Mott-Schottky line".
	Inverse Curve
	// Prediction is the session junction's 1/C^2 over the data's bias
	// span (series "prediction"); nil with PredictionErr set when it
	// cannot be computed.
	Prediction    *Curve
	PredictionErr string
}

// Parameters lists the fitted parameters for storing with the session:
// Vbi (V) and N (m^-3) of the Mott-Schottky line, and when the general
// fit converged Cj0 (F), Vj (V), m and Cpar (F); standard errors NaN when
// not determined.
func (v *CVFitView) Parameters() []FitParameter {
	if v == nil || v.MottSchottky == nil {
		return nil
	}
	ms := v.MottSchottky
	out := []FitParameter{
		{"Vbi", "V", ms.BuiltInV, ms.StdErrV},
		{"N", "m^-3", ms.DopingM3, ms.StdErrM3},
	}
	if j := v.Junction; j != nil {
		p, se := j.Params, j.StdErr
		out = append(out,
			FitParameter{"Cj0", "F", p.ZeroBiasCapacitanceF, se.ZeroBiasCapacitanceF},
			FitParameter{"Vj", "V", p.BuiltInPotentialV, se.BuiltInPotentialV},
			FitParameter{"m", "", p.GradingCoefficient, se.GradingCoefficient},
			FitParameter{"Cpar", "F", p.ParasiticCapacitanceF, se.ParasiticCapacitanceF})
	}
	return out
}

// FitMeasuredCV fits a C-V data set within window (zero: every point):
// the Mott-Schottky line of 1/C^2 against V for a one-sided abrupt
// junction, with the junction area and the permittivity of the spec's
// material, and the general junction-capacitance model. The prediction of
// the spec's junction (at the data set's temperature when it states one)
// comes along for comparison; its failure does not fail the fit.
func FitMeasuredCV(ds *measure.DataSet, spec Spec, window IVFitWindow) (*CVFitView, error) {
	if ds == nil || ds.Kind != measure.KindCV || len(ds.CapacitanceF) != len(ds.VoltageV) {
		return nil, errors.New("the data set is not a C-V sweep")
	}
	mat, err := physics.MaterialByName(spec.Material)
	if err != nil {
		return nil, fmt.Errorf("the junction's material: %w", err)
	}
	if !(spec.Area > 0) || math.IsInf(spec.Area, 0) {
		return nil, errors.New("the junction has no positive area: set the area to derive the doping")
	}
	g := extract.CVGeometry{AreaM2: spec.Area, PermittivityFm: mat.Permittivity()}
	w := extract.Window{MinV: window.MinV, MaxV: window.MaxV}
	ms, err := extract.MottSchottky(ds.VoltageV, ds.CapacitanceF, g, w)
	if err != nil {
		return nil, err
	}
	v := &CVFitView{MottSchottky: ms, AreaM2: g.AreaM2, PermittivityFm: g.PermittivityFm, Material: mat.Name}
	switch j, err := extract.FitJunctionCV(ds.VoltageV, ds.CapacitanceF, extract.CVOptions{Window: w}); {
	case err != nil:
		v.JunctionNote = "general fit failed: " + err.Error()
	case !j.Converged:
		v.JunctionNote = "general fit did not converge"
	default:
		v.Junction = j
	}
	row := func(name string, k Kind, val, se float64) FitRow {
		r := FitRow{Name: name, Value: Format(k, val, 4, true), StdErr: Format(k, se, 2, true)}
		if math.IsNaN(se) || math.IsInf(se, 0) {
			r.Remark = "not determined"
		}
		return r
	}
	v.Rows = []FitRow{
		row("Vbi", Voltage, ms.BuiltInV, ms.StdErrV),
		row("N", Density, ms.DopingM3, ms.StdErrM3),
	}
	if j := v.Junction; j != nil {
		p, se := j.Params, j.StdErr
		v.Rows = append(v.Rows,
			row("Cj0", Capacitance, p.ZeroBiasCapacitanceF, se.ZeroBiasCapacitanceF),
			row("Vj", Voltage, p.BuiltInPotentialV, se.BuiltInPotentialV),
			row("m", Dimensionless, p.GradingCoefficient, se.GradingCoefficient),
			row("Cpar", Capacitance, p.ParasiticCapacitanceF, se.ParasiticCapacitanceF))
	}
	idx := sortedIndex(ds.VoltageV)
	xs := make([]float64, 0, len(idx))
	meas := make([]float64, 0, len(idx))
	line := make([]float64, 0, len(idx))
	for _, k := range idx {
		x, c := ds.VoltageV[k], ds.CapacitanceF[k]
		y := math.NaN()
		if c > 0 && !math.IsInf(c, 0) {
			y = 1 / (c * c)
		}
		xs = append(xs, x)
		meas = append(meas, y)
		line = append(line, ms.Intercept+ms.Slope*x)
	}
	v.Inverse = Curve{ID: "cv-mott-schottky", Title: "Measured 1/C^2 and the Mott-Schottky line",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "1/C^2", Kind: Dimensionless, Unit: "F^-2"},
		Xs: xs, Series: []Series{{Label: "measured", Y: meas}, {Label: "Mott-Schottky line", Y: line}}}
	if p, err := predictedInverseCV(spec, ds); err != nil {
		v.PredictionErr = err.Error()
	} else {
		v.Prediction = &p
	}
	return v, nil
}

// predictedInverseCV is the junction's predicted 1/C^2 (depletion
// capacitance) over the bias span of a data set, about 200 points.
func predictedInverseCV(s Spec, ds *measure.DataSet) (Curve, error) {
	s, r, label, err := predictionSweep(s, ds)
	if err != nil {
		return Curve{}, err
	}
	_, inv, err := CVCurve(s, r)
	if err != nil {
		return Curve{}, err
	}
	if len(inv.Series) == 0 {
		return Curve{}, errors.New("the prediction has no capacitance")
	}
	inv.ID = "cv-prediction"
	inv.Series = []Series{{Label: label, Y: inv.Series[0].Y}}
	return inv, nil
}
