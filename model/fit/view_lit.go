package fit

import (
	"math"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// FigureRow is one figure of merit of a lit curve for display: its name,
// the value read off the data and the value of the fitted curve,
// formatted ("n/a" when not found).
type FigureRow struct {
	Name, Data, Fit string
}

// LitView is a lit I-V fit prepared for the workbench: the parameters
// with standard errors, the figures of merit of the data and of the fit,
// the fitted current and the delivered power on linear axes, the fit's
// maximum-power point, and the residuals. Currents are in the data set's
// own sign convention (Fit.Sign); the power is the delivered power, V
// times the generator-sign current, positive between 0 V and Voc.
type LitView struct {
	Result       *LitResult
	Fit          *extract.LitFit
	TemperatureK float64
	// TemperatureFrom is the temperature's source (Source constants).
	TemperatureFrom string
	Rows            []Row
	Figures         []FigureRow
	// Curve is the fitted current against bias (series "fit"), linear
	// axes, at the measured biases (sorted).
	Curve model.Curve
	// Power is the delivered power against bias: series "measured" (from
	// the data) and "fit", at the measured biases.
	Power model.Curve
	// MaxPowerV, MaxPowerA and MaxPowerW are the fit's maximum-power
	// point: bias, current (in the data's sign) and power.
	MaxPowerV, MaxPowerA, MaxPowerW float64
	// ResidualV and Residual are I_meas - I_fit in A at the points used,
	// sorted by bias.
	ResidualV, Residual []float64
}

// NewLitView fits a lit I-V data set (LitIV) and prepares it for the
// workbench.
func NewLitView(ds *measure.DataSet, opt LitOptions) (*LitView, error) {
	r, err := LitIV(ds, opt)
	if err != nil {
		return nil, err
	}
	f, t := r.Fit, r.Temperature.K
	v := &LitView{Result: r, Fit: f, TemperatureK: t, TemperatureFrom: r.Temperature.Source}
	row := func(name string, k model.Kind, val, se float64) Row {
		x := Row{Name: name, Value: model.Format(k, val, 4, true), StdErr: model.Format(k, se, 2, true)}
		if math.IsNaN(se) {
			x.Remark = "not determined"
		}
		return x
	}
	d, se := f.Diode, f.StdErr
	v.Rows = []Row{
		row("Iph", model.Current, d.PhotocurrentA, se.PhotocurrentA),
		row("Is", model.Current, d.SaturationCurrentA, se.SaturationCurrentA),
		row("n", model.Dimensionless, d.IdealityFactor, se.IdealityFactor),
		row("Rs", model.Resistance, d.SeriesResistanceOhm, se.SeriesResistanceOhm),
		row("Rsh", model.Resistance, d.ShuntResistanceOhm, se.ShuntResistanceOhm),
	}
	fig := func(name string, k model.Kind, a, b float64) FigureRow {
		return FigureRow{name, formatOrNA(k, a), formatOrNA(k, b)}
	}
	v.Figures = []FigureRow{
		fig("Isc", model.Current, f.Data.Isc, f.Model.Isc),
		fig("Voc", model.Voltage, f.Data.Voc, f.Model.Voc),
		fig("Pmax", model.Power, f.Data.Pmax, f.Model.Pmax),
		fig("Vmp", model.Voltage, f.Data.Vmp, f.Model.Vmp),
		fig("FF", model.Dimensionless, f.Data.FF, f.Model.FF),
	}
	// s converts a load-sign current to the data's convention.
	s := 1.0
	if f.Sign == extract.SignGenerator {
		s = -1
	}
	vt := physics.ThermalVoltage(t)
	xs := sortedUnique(ds.VoltageV)
	ys := make([]float64, len(xs))
	pf := make([]float64, len(xs))
	for k, x := range xs {
		c := d.Current(x, vt)
		ys[k], pf[k] = s*c, -x*c
	}
	v.Curve = model.Curve{ID: "iv-lit-fit", Title: "Measured and fitted current (lit)",
		X: model.Axis{Label: "bias V", Kind: model.Voltage}, Y: model.Axis{Label: "current I", Kind: model.Current},
		Xs: xs, Series: []model.Series{{Label: "fit", Y: ys}}}
	idx := sortedIndex(ds.VoltageV)
	pm := make([]float64, 0, len(idx))
	var px []float64
	for _, k := range idx {
		x, y := ds.VoltageV[k], ds.CurrentA[k]
		if !physics.Finite(y) {
			continue
		}
		px, pm = append(px, x), append(pm, x*y*-s)
		if opt.Window.Contains(x) {
			v.ResidualV = append(v.ResidualV, x)
			v.Residual = append(v.Residual, y-s*d.Current(x, vt))
		}
	}
	// The measured power at the measured biases, the fitted one at the
	// sorted unique biases: both series on the fit's abscissae.
	pmOnXs := make([]float64, len(xs))
	for k := range pmOnXs {
		pmOnXs[k] = math.NaN()
	}
	for j, x := range px {
		if k := searchSorted(xs, x); k >= 0 {
			pmOnXs[k] = pm[j]
		}
	}
	v.Power = model.Curve{ID: "iv-lit-power", Title: "Delivered power",
		X: model.Axis{Label: "bias V", Kind: model.Voltage}, Y: model.Axis{Label: "power P", Kind: model.Power},
		Xs: xs, Series: []model.Series{{Label: "measured", Y: pmOnXs}, {Label: "fit", Y: pf}}}
	v.MaxPowerV, v.MaxPowerA, v.MaxPowerW = f.Model.Vmp, -s*f.Model.Imp, f.Model.Pmax
	return v, nil
}

// formatOrNA formats a finite value, "n/a" otherwise.
func formatOrNA(k model.Kind, x float64) string {
	if !physics.Finite(x) {
		return "n/a"
	}
	return model.Format(k, x, 4, true)
}

// searchSorted returns the index of x in the sorted xs, or -1.
func searchSorted(xs []float64, x float64) int {
	lo, hi := 0, len(xs)
	for lo < hi {
		m := (lo + hi) / 2
		if xs[m] < x {
			lo = m + 1
		} else {
			hi = m
		}
	}
	if lo < len(xs) && xs[lo] == x {
		return lo
	}
	return -1
}
