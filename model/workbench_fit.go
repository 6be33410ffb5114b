package model

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"sort"
	"time"

	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// maxImportBytes bounds the measurement files the workbench imports.
const maxImportBytes = 64 << 20

// Files is where the workbench reads measurement files from: the local
// file system (LocalFiles) or, on a server, the user's inbox
// (sessions.Inbox), which opens nothing outside it. Open opens a file for
// reading; ReadDir lists a folder. Their errors are shown to the user.
type Files interface {
	Open(name string) (fs.File, error)
	ReadDir(name string) ([]fs.DirEntry, error)
}

// LocalFiles is the local file system, reached with the rights of the
// user who runs junco.
type LocalFiles struct{}

// Open opens the file at path.
func (LocalFiles) Open(path string) (fs.File, error) { return os.Open(path) }

// ReadDir lists the folder at path.
func (LocalFiles) ReadDir(path string) ([]fs.DirEntry, error) { return os.ReadDir(path) }

// ImportMeasurement imports the measurement file at path from files (nil:
// LocalFiles) for the workbench: only a regular file (no directory,
// device or pipe that could block) of at most 64 MiB is read. now stamps
// the import (nil: time.Now). On error no data set is returned; measure's
// typed errors (file, line, column) come through unchanged.
func ImportMeasurement(files Files, path string, now func() time.Time) (*measure.DataSet, error) {
	if path == "" {
		return nil, errors.New("no file named: type the path of a CSV or text file")
	}
	if files == nil {
		files = LocalFiles{}
	}
	f, err := files.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	fi, err := f.Stat()
	if err != nil {
		return nil, err
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("%s is not a regular file", path)
	}
	if fi.Size() > maxImportBytes {
		return nil, fmt.Errorf("%s has %d bytes; at most %d are imported here", path, fi.Size(), maxImportBytes)
	}
	return measure.Import(io.LimitReader(f, maxImportBytes), path, measure.Options{Now: now})
}

// FitRow is one fitted parameter for display: its name, the value and its
// standard error formatted in a trade unit ("n/a" when not determined),
// and a short remark (fixed, not observable) or "".
type FitRow struct {
	Name, Value, StdErr, Remark string
}

// IVFitView is an I-V fit prepared for the workbench: the parameters with
// their standard errors as display rows, the quality of the fit, and the
// fitted model on the measured biases.
type IVFitView struct {
	Fit          *extract.IVFit
	TemperatureK float64
	// TemperatureFrom says where the temperature came from ("data set" or
	// "junction").
	TemperatureFrom string
	Rows            []FitRow
	// Curve is the fitted model, |I| against bias, at the measured biases
	// (sorted), with the one series "fit".
	Curve Curve
	// ResidualV and Residual are ln(I_meas/I_fit) at the points used,
	// sorted by bias.
	ResidualV, Residual []float64
}

// FitParameter is one fitted parameter for a record: SI value and unit,
// standard error (NaN when held fixed or not observable).
type FitParameter struct {
	Name, Unit    string
	Value, StdErr float64
}

// Parameters lists the single-diode parameters of the fit (Is in A, n, Rs
// and Rsh in ohm) with their standard errors, for storing with the
// session.
func (v *IVFitView) Parameters() []FitParameter {
	if v == nil || v.Fit == nil {
		return nil
	}
	d, se := v.Fit.Single, v.Fit.SingleStdErr
	return []FitParameter{
		{"Is", "A", d.SaturationCurrentA, se.SaturationCurrentA},
		{"n", "", d.IdealityFactor, se.IdealityFactor},
		{"Rs", "ohm", d.SeriesResistanceOhm, se.SeriesResistanceOhm},
		{"Rsh", "ohm", d.ShuntResistanceOhm, se.ShuntResistanceOhm},
	}
}

// IVFitWindow is the bias window of a fit in V; the zero value means all
// forward points.
type IVFitWindow struct{ MinV, MaxV float64 }

// FitMeasuredIV fits the single-diode model (Is, n, Rs, Rsh) to an I-V
// data set within window. The temperature is the data set's own (column
// or stated in the file) or else fallbackK (the junction's).
func FitMeasuredIV(ds *measure.DataSet, window IVFitWindow, fallbackK float64) (*IVFitView, error) {
	if ds == nil || ds.Kind != measure.KindIV || len(ds.CurrentA) != len(ds.VoltageV) {
		return nil, errors.New("the data set is not an I-V sweep")
	}
	t, from := fallbackK, "junction"
	if dt, ok := ds.Temperature(); ok {
		t, from = dt, "data set"
	}
	w := extract.Window{MinV: window.MinV, MaxV: window.MaxV}
	f, err := extract.FitIV(ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: t, Window: w})
	if err != nil {
		return nil, err
	}
	v := &IVFitView{Fit: f, TemperatureK: t, TemperatureFrom: from}
	d, se := f.Single, f.SingleStdErr
	row := func(name string, k Kind, val, err float64) FitRow {
		r := FitRow{Name: name, Value: Format(k, val, 4, true), StdErr: Format(k, err, 2, true)}
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
	v.Rows = []FitRow{
		row("Is", Current, d.SaturationCurrentA, se.SaturationCurrentA),
		row("n", Dimensionless, d.IdealityFactor, se.IdealityFactor),
		row("Rs", Resistance, d.SeriesResistanceOhm, se.SeriesResistanceOhm),
		row("Rsh", Resistance, d.ShuntResistanceOhm, se.ShuntResistanceOhm),
	}
	vt := physics.ThermalVoltage(t)
	xs := sortedUnique(ds.VoltageV)
	ys := make([]float64, len(xs))
	for i, x := range xs {
		ys[i] = d.Current(x, vt)
	}
	v.Curve = Curve{ID: "iv-fit", Title: "Measured and fitted current",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "current I", Kind: Current, Log: true},
		Xs: xs, Series: []Series{{Label: "fit", Y: ys}}}
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
func MeasuredCurve(ds *measure.DataSet) Curve {
	c := Curve{ID: "measured", Title: "Measured", X: Axis{Label: "bias V", Kind: Voltage}}
	if ds == nil {
		return c
	}
	src, yAxis := ds.CurrentA, Axis{Label: "current I", Kind: Current, Log: true}
	if ds.Kind == measure.KindCV {
		src, yAxis = ds.CapacitanceF, Axis{Label: "capacitance C", Kind: Capacitance}
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
	c.Series = []Series{{Label: "measured", Y: ys}}
	return c
}

// PredictedIV is the junction's predicted total current over the bias
// span of a data set (about 200 points), for comparison with the
// measurement; the one series is "prediction".
func PredictedIV(s Spec, ds *measure.DataSet) (Curve, error) {
	if ds == nil || len(ds.VoltageV) == 0 {
		return Curve{}, errors.New("the data set has no points")
	}
	s, r, label, err := predictionSweep(s, ds)
	if err != nil {
		return Curve{}, err
	}
	c, err := IVCurve(s, r)
	if err != nil {
		return Curve{}, err
	}
	if len(c.Series) == 0 {
		return Curve{}, errors.New("the prediction has no current")
	}
	c.ID, c.Y.Log = "iv-prediction", true
	c.Series = []Series{{Label: label, Y: c.Series[0].Y}}
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
func predictionSweep(s Spec, ds *measure.DataSet) (Spec, Range, string, error) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range ds.VoltageV {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	if !(hi > lo) {
		return s, Range{}, "", errors.New("the data set spans no bias range")
	}
	label := "prediction"
	if t, ok := ds.Temperature(); ok && t != s.Temperature {
		s.Temperature = t
		label = fmt.Sprintf("prediction at %s", Format(Temperature, t, 4, true))
	}
	return s, Range{From: lo, To: hi, Step: (hi - lo) / 199}, label, nil
}
