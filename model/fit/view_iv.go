package fit

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// Row is one fitted parameter for display: its name, the value and its
// standard error formatted in a trade unit ("n/a" when not determined),
// and a short remark (fixed, not observable) or "".
type Row struct {
	Name, Value, StdErr, Remark string
}

// IVView is an I-V fit prepared for the workbench: the parameters with
// their standard errors as display rows, the quality of the fit, and the
// fitted model on the measured biases.
type IVView struct {
	Result       *IVResult
	Fit          *extract.IVFit
	TemperatureK float64
	// TemperatureFrom is the temperature's source (Source constants).
	TemperatureFrom string
	Rows            []Row
	// Curve is the fitted model, |I| against bias, at the measured biases
	// (sorted), with the one series "fit".
	Curve model.Curve
	// ResidualV and Residual are ln(I_meas/I_fit) at the points used,
	// sorted by bias.
	ResidualV, Residual []float64
}

// Window is a bias window in V; the zero value means every point.
type Window = extract.Window

// NewIVView fits an I-V data set (IV) and prepares it for the workbench:
// display rows, the fitted curve and the residuals.
func NewIVView(ds *measure.DataSet, opt IVOptions) (*IVView, error) {
	r, err := IV(ds, opt)
	if err != nil {
		return nil, err
	}
	f, t, w := r.Fit, r.Temperature.K, opt.Window
	v := &IVView{Result: r, Fit: f, TemperatureK: t, TemperatureFrom: r.Temperature.Source}
	d, se := f.Single, f.SingleStdErr
	row := func(name string, k model.Kind, val, err float64) Row {
		r := Row{Name: name, Value: model.Format(k, val, 4, true), StdErr: model.Format(k, err, 2, true)}
		switch {
		case math.IsInf(val, 1):
			r.Remark = "not observable"
		case math.IsNaN(err) && val == 0:
			r.Remark = "not observable"
		case math.IsNaN(err):
			r.Remark = "not determined"
		}
		return r
	}
	v.Rows = []Row{
		row("Is", model.Current, d.SaturationCurrentA, se.SaturationCurrentA),
		row("n", model.Dimensionless, d.IdealityFactor, se.IdealityFactor),
		row("Rs", model.Resistance, d.SeriesResistanceOhm, se.SeriesResistanceOhm),
		row("Rsh", model.Resistance, d.ShuntResistanceOhm, se.ShuntResistanceOhm),
	}
	vt := physics.ThermalVoltage(t)
	xs := sortedUnique(ds.VoltageV)
	ys := make([]float64, len(xs))
	for i, x := range xs {
		ys[i] = d.Current(x, vt)
	}
	v.Curve = model.Curve{ID: "iv-fit", Title: "Measured and fitted current",
		X: model.Axis{Label: "bias V", Kind: model.Voltage}, Y: model.Axis{Label: "current I", Kind: model.Current, Log: true},
		Xs: xs, Series: []model.Series{{Label: "fit", Y: ys}}}
	idx := sortedIndex(ds.VoltageV)
	for _, k := range idx {
		x, y := ds.VoltageV[k], ds.CurrentA[k]
		if !w.Contains(x) || !(x > 0) || !(y > 0) || math.IsInf(x, 0) || math.IsInf(y, 0) {
			continue
		}
		m := d.Current(x, vt)
		if !(m > 0) {
			continue
		}
		v.ResidualV = append(v.ResidualV, x)
		v.Residual = append(v.Residual, math.Log(y/m))
	}
	return v, nil
}

// MeasuredCurve is a data set as a curve against bias, sorted by bias:
// current for I-V, capacitance for C-V, with the one series "measured".
func MeasuredCurve(ds *measure.DataSet) model.Curve {
	c := model.Curve{ID: "measured", Title: "Measured", X: model.Axis{Label: "bias V", Kind: model.Voltage}}
	if ds == nil {
		return c
	}
	src, yAxis := ds.CurrentA, model.Axis{Label: "current I", Kind: model.Current, Log: true}
	if ds.Kind == measure.KindCV {
		src, yAxis = ds.CapacitanceF, model.Axis{Label: "capacitance C", Kind: model.Capacitance}
	}
	c.Y = yAxis
	if len(src) != len(ds.VoltageV) {
		return c
	}
	idx := sortedIndex(ds.VoltageV)
	c.Xs = make([]float64, len(idx))
	ys := make([]float64, len(idx))
	for j, k := range idx {
		c.Xs[j], ys[j] = ds.VoltageV[k], src[k]
	}
	c.Series = []model.Series{{Label: "measured", Y: ys}}
	return c
}

// PredictedIV is the junction's predicted total current over the bias
// span of a data set (about 200 points), for comparison with the
// measurement; the one series is "prediction".
func PredictedIV(s model.Spec, ds *measure.DataSet) (model.Curve, error) {
	if ds == nil || len(ds.VoltageV) == 0 {
		return model.Curve{}, errors.New("the data set has no points")
	}
	s, r, label, err := predictionSweep(s, ds)
	if err != nil {
		return model.Curve{}, err
	}
	c, err := model.IVCurve(s, r)
	if err != nil {
		return model.Curve{}, err
	}
	if len(c.Series) == 0 {
		return model.Curve{}, errors.New("the prediction has no current")
	}
	c.ID, c.Y.Log = "iv-prediction", true
	c.Series = []model.Series{{Label: label, Y: c.Series[0].Y}}
	return c, nil
}

// sortedIndex returns the indices of the finite values of xs in ascending
// order of value.
func sortedIndex(xs []float64) []int {
	idx := make([]int, 0, len(xs))
	for i, x := range xs {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return xs[idx[a]] < xs[idx[b]] })
	return idx
}

// sortedUnique returns the finite values of xs sorted, without repeats.
func sortedUnique(xs []float64) []float64 {
	var out []float64
	for _, k := range sortedIndex(xs) {
		if len(out) == 0 || xs[k] != out[len(out)-1] {
			out = append(out, xs[k])
		}
	}
	return out
}

// predictionSweep returns what a prediction for a data set is computed
// with: the spec at the temperature the data were taken at (when the data
// set states one), about 200 biases over the data's span, and the series
// label that says so.
func predictionSweep(s model.Spec, ds *measure.DataSet) (model.Spec, model.Range, string, error) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range ds.VoltageV {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if !(hi > lo) {
		return s, model.Range{}, "", errors.New("the data set spans no bias range")
	}
	label := "prediction"
	if t, ok := ds.Temperature(); ok && t != s.Temperature {
		s.Temperature = t
		label = fmt.Sprintf("prediction at %s", model.Format(model.Temperature, t, 4, true))
	}
	return s, model.Range{From: lo, To: hi, Step: (hi - lo) / 199}, label, nil
}
