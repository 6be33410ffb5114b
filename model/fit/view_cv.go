package fit

import (
	"errors"
	"math"

	"junco/model"
	"junco/model/measure"
	"junco/physics/extract"
)

// CVView is a C-V analysis prepared for the workbench: the junction fit
// C = Cj0/(1 - V/Vbi)^m + Cpar (the headline), the doping from the
// Mott-Schottky line of C - Cpar, display rows, and the curves of the C-V
// fit screen.
type CVView struct {
	Result   *CVResult
	Analysis *extract.CVAnalysis
	// AreaM2 (0 when the junction has none) and PermittivityFm are the
	// geometry taken from the spec.
	AreaM2, PermittivityFm float64
	Material               string
	// Rows: Vbi, m, Cj0 and Cpar of the junction fit, then N of the line.
	Rows []Row
	// Inverse is 1/(C - Cpar)^2 against bias at the measured biases
	// (sorted), with the series "measured" and "Mott-Schottky line".
	Inverse model.Curve
	// Prediction is the session junction's 1/C^2 over the data's bias
	// span (series "prediction"); nil with PredictionErr set when it
	// cannot be computed.
	Prediction    *model.Curve
	PredictionErr string
}

// cvRow is a display row: the value and standard error, or why the data
// do not determine it, or that it was held.
func cvRow(name string, k model.Kind, q extract.CVQuantity) Row {
	r := Row{Name: name, Value: model.Format(k, q.Value, 4, true), StdErr: model.Format(k, q.StdErr, 2, true)}
	switch {
	case !q.Determined:
		r.Value, r.StdErr, r.Remark = "", "", "not determined: "+q.Reason
	case q.Fixed:
		r.Remark = q.Reason
	case math.IsNaN(q.StdErr) || math.IsInf(q.StdErr, 0):
		r.Remark = "no standard error"
	}
	return r
}

// NewCVView analyses a C-V data set (CV) with the area and material of
// the session's junction (no positive area: no doping) and prepares it
// for the workbench: display rows, 1/(C - Cpar)^2 with the Mott-Schottky
// line, and the junction's prediction (at the data set's temperature when
// it states one), whose failure does not fail the fit.
func NewCVView(ds *measure.DataSet, spec model.Spec, window Window) (*CVView, error) {
	area := spec.Area
	if !(area > 0 && area < 1) {
		area = 0
	}
	res, err := CV(ds, CVOptions{Window: window, AreaM2: area, Material: spec.Material})
	if err != nil {
		return nil, err
	}
	a, g, mat := res.Analysis, res.Geometry, res.Material
	v := &CVView{Result: res, Analysis: a, AreaM2: g.AreaM2, PermittivityFm: g.PermittivityFm, Material: mat.Name}
	v.Rows = []Row{
		cvRow("Vbi", model.Voltage, a.BuiltInPotentialV),
		cvRow("m", model.Dimensionless, a.GradingCoefficient),
		cvRow("Cj0", model.Capacitance, a.ZeroBiasCapacitanceF),
		cvRow("Cpar", model.Capacitance, a.ParasiticCapacitanceF),
		cvRow("N", model.Density, a.DopingM3),
	}
	idx := sortedIndex(ds.VoltageV)
	xs := make([]float64, 0, len(idx))
	meas := make([]float64, 0, len(idx))
	line := make([]float64, 0, len(idx))
	cpar := a.ParasiticCapacitanceF.Value
	if a.Line != nil {
		cpar = a.Line.ParasiticF
	}
	for _, k := range idx {
		x, c := ds.VoltageV[k], ds.CapacitanceF[k]-cpar
		y := math.NaN()
		if c > 0 && !math.IsInf(c, 0) {
			y = 1 / (c * c)
		}
		xs = append(xs, x)
		meas = append(meas, y)
		l := math.NaN()
		if a.Line != nil {
			l = a.Line.Intercept + a.Line.Slope*x
		}
		line = append(line, l)
	}
	v.Inverse = model.Curve{ID: "cv-mott-schottky", Title: "Measured 1/(C - Cpar)^2 and the Mott-Schottky line",
		X: model.Axis{Label: "bias V", Kind: model.Voltage}, Y: model.Axis{Label: "1/(C - Cpar)^2", Kind: model.Dimensionless, Unit: "F^-2"},
		Xs: xs, Series: []model.Series{{Label: "measured", Y: meas}, {Label: "Mott-Schottky line", Y: line}}}
	if p, err := predictedInverseCV(spec, ds); err != nil {
		v.PredictionErr = err.Error()
	} else {
		v.Prediction = &p
	}
	return v, nil
}

// predictedInverseCV is the junction's predicted 1/C^2 (depletion
// capacitance) over the bias span of a data set, about 200 points.
func predictedInverseCV(s model.Spec, ds *measure.DataSet) (model.Curve, error) {
	s, r, label, err := predictionSweep(s, ds)
	if err != nil {
		return model.Curve{}, err
	}
	_, inv, err := model.CVCurve(s, r)
	if err != nil {
		return model.Curve{}, err
	}
	if len(inv.Series) == 0 {
		return model.Curve{}, errors.New("the prediction has no capacitance")
	}
	inv.ID = "cv-prediction"
	inv.Series = []model.Series{{Label: label, Y: inv.Series[0].Y}}
	return inv, nil
}
