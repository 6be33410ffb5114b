package fit

import (
	"errors"
	"math"

	"junco/model"
	"junco/model/measure"
	"junco/physics/extract"
)

// CVView is a C-V fit prepared for the workbench: the Mott-Schottky
// line (built-in potential and the doping of the lightly doped side), the
// general junction-capacitance fit when it converges, display rows, and
// the curves of the C-V fit screen.
type CVView struct {
	Result       *CVResult
	MottSchottky *extract.MottSchottkyResult
	// Junction is the fit of C = Cj0/(1 - V/Vbi)^m + Cpar, nil when it
	// failed or did not converge (JunctionNote says why).
	Junction     *extract.CVFit
	JunctionNote string
	// AreaM2 and PermittivityFm are the geometry taken from the spec.
	AreaM2, PermittivityFm float64
	Material               string
	Rows                   []Row
	// Inverse is 1/C^2 against bias at the measured biases (sorted), with
	// the series "measured" and "Mott-Schottky line".
	Inverse model.Curve
	// Prediction is the session junction's 1/C^2 over the data's bias
	// span (series "prediction"); nil with PredictionErr set when it
	// cannot be computed.
	Prediction    *model.Curve
	PredictionErr string
}

// NewCVView analyses a C-V data set (CV) with the area and material of
// the session's junction and prepares it for the workbench: display rows,
// 1/C^2 with the Mott-Schottky line, and the junction's prediction (at the
// data set's temperature when it states one), whose failure does not fail
// the fit.
func NewCVView(ds *measure.DataSet, spec model.Spec, window Window) (*CVView, error) {
	if !(spec.Area > 0) || math.IsInf(spec.Area, 0) {
		return nil, errors.New("the junction has no positive area: set the area to derive the doping")
	}
	res, err := CV(ds, CVOptions{Window: window, AreaM2: spec.Area, Material: spec.Material})
	if err != nil {
		return nil, err
	}
	ms, g, mat := res.MottSchottky, res.Geometry, res.Material
	v := &CVView{Result: res, MottSchottky: ms, Junction: res.Junction, AreaM2: g.AreaM2, PermittivityFm: g.PermittivityFm, Material: mat.Name}
	switch {
	case errors.Is(res.JunctionErr, ErrNotConverged):
		v.JunctionNote = "general fit did not converge"
	case res.JunctionErr != nil:
		v.JunctionNote = "general fit failed: " + res.JunctionErr.Error()
	}
	row := func(name string, k model.Kind, val, se float64) Row {
		r := Row{Name: name, Value: model.Format(k, val, 4, true), StdErr: model.Format(k, se, 2, true)}
		if math.IsNaN(se) || math.IsInf(se, 0) {
			r.Remark = "not determined"
		}
		return r
	}
	v.Rows = []Row{
		row("Vbi", model.Voltage, ms.BuiltInV, ms.StdErrV),
		row("N", model.Density, ms.DopingM3, ms.StdErrM3),
	}
	if j := v.Junction; j != nil {
		p, se := j.Params, j.StdErr
		v.Rows = append(v.Rows,
			row("Cj0", model.Capacitance, p.ZeroBiasCapacitanceF, se.ZeroBiasCapacitanceF),
			row("Vj", model.Voltage, p.BuiltInPotentialV, se.BuiltInPotentialV),
			row("m", model.Dimensionless, p.GradingCoefficient, se.GradingCoefficient),
			row("Cpar", model.Capacitance, p.ParasiticCapacitanceF, se.ParasiticCapacitanceF))
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
	v.Inverse = model.Curve{ID: "cv-mott-schottky", Title: "Measured 1/C^2 and the Mott-Schottky line",
		X: model.Axis{Label: "bias V", Kind: model.Voltage}, Y: model.Axis{Label: "1/C^2", Kind: model.Dimensionless, Unit: "F^-2"},
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
