package report

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"sort"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/sessions"
)

// FitFigure is one kept fit of a session drawn against its data: the
// measured points (series 0, drawn as dots), the fitted model and the
// junction's prediction.
type FitFigure struct {
	Extraction sessions.Extraction
	Figure     Figure
	// Data is the curve of the CSV export: the measured points and the
	// fitted model at the measured biases.
	Data model.Curve
	// Notes say what could not be drawn (the fitted curve of a
	// Mott-Schottky line, a prediction the model refuses).
	Notes []string
}

// FitFigures draws every kept fit of doc that names a data set of the
// session: measured points, the fit (fit.RecordModel, at the record's
// temperature) and the prediction of the session's junction over the same
// bias span (fit.PredictedIV, fit.PredictedCV). Fits without a data set
// are left out.
func FitFigures(doc *sessions.Document) []FitFigure {
	var out []FitFigure
	for _, x := range doc.Extractions {
		var m *sessions.Measurement
		for i := range doc.Measurements {
			if doc.Measurements[i].ID == x.Measurement {
				m = &doc.Measurements[i]
			}
		}
		if x.Measurement == "" || m == nil {
			continue
		}
		out = append(out, fitFigure(doc.Spec, x, &m.DataSet))
	}
	return out
}

func fitFigure(spec model.Spec, x sessions.Extraction, ds *measure.DataSet) FitFigure {
	ff := FitFigure{Extraction: x}
	meas := fit.MeasuredCurve(ds)
	logY := ds.Kind == measure.KindIV
	params := map[string]float64{}
	for _, p := range x.Parameters {
		params[p.Name] = p.Value
	}
	f, err := fit.RecordModel(x.Method, params, x.Notes, spec.Temperature)
	if err != nil {
		ff.Notes = append(ff.Notes, "fitted curve not drawn: "+err.Error())
	}
	var pred model.Curve
	if ds.Kind == measure.KindIV {
		pred, err = fit.PredictedIV(spec, ds)
	} else {
		pred, err = fit.PredictedCV(spec, ds)
	}
	if err != nil {
		ff.Notes = append(ff.Notes, "prediction not drawn: "+err.Error())
		pred = model.Curve{}
	}
	var my []float64
	if len(meas.Series) > 0 {
		my = meas.Series[0].Y
	}
	// The CSV curve: measured points and the fit at the measured biases.
	ff.Data = model.Curve{ID: "fit-" + x.ID, Title: meas.Title, X: meas.X, Y: meas.Y, Xs: meas.Xs,
		Series: []model.Series{{Label: "measured", Y: my}}}
	if f != nil {
		ys := make([]float64, len(meas.Xs))
		for i, v := range meas.Xs {
			ys[i] = f(v)
		}
		ff.Data.Series = append(ff.Data.Series, model.Series{Label: "fit", Y: ys})
	}
	// The figure: the measured biases and the prediction's merged, the
	// measured values as dots, the fit evaluated everywhere and the
	// prediction interpolated on its own span.
	xs := append(append([]float64(nil), meas.Xs...), pred.Xs...)
	sort.Float64s(xs)
	c := model.Curve{ID: "fit-" + x.ID, X: meas.X, Y: meas.Y, Xs: xs, Title: fmt.Sprintf("Fit %s of %s", x.ID, x.Measurement)}
	dots := make([]float64, len(xs))
	j := 0
	for i, v := range xs {
		dots[i] = math.NaN()
		if j < len(meas.Xs) && meas.Xs[j] == v {
			dots[i] = my[j]
			j++
		}
	}
	c.Series = append(c.Series, model.Series{Label: "measured", Y: dots})
	if f != nil {
		ys := make([]float64, len(xs))
		for i, v := range xs {
			ys[i] = f(v)
		}
		c.Series = append(c.Series, model.Series{Label: "fit", Y: ys})
	}
	if len(pred.Series) > 0 {
		ys := make([]float64, len(xs))
		for i, v := range xs {
			ys[i] = interpolate(pred.Xs, pred.Series[0].Y, v, logY)
		}
		c.Series = append(c.Series, model.Series{Label: pred.Series[0].Label, Y: ys})
	}
	if logY {
		// On a log axis the model's zero crossing (|I| -> 0 at 0 V) would
		// stretch the axis over decades of nothing: values below a
		// hundredth of the smallest measured |I| are not drawn.
		lo := math.Inf(1)
		for _, y := range my {
			if a := math.Abs(y); a > 0 {
				lo = math.Min(lo, a)
			}
		}
		for _, sr := range c.Series[1:] {
			for i, y := range sr.Y {
				if math.Abs(y) < lo/100 {
					sr.Y[i] = math.NaN()
				}
			}
		}
	}
	dot := make([]bool, len(c.Series))
	dot[0] = true
	ff.Figure = Figure{Curve: c, LogY: logY, Dots: dot}
	return ff
}

// interpolate returns y at v on the sorted grid xs, linearly (in log|y|
// when logY and both neighbours have the same sign), NaN outside the grid.
func interpolate(xs, ys []float64, v float64, logY bool) float64 {
	n := len(xs)
	if n == 0 || len(ys) != n || v < xs[0] || v > xs[n-1] {
		return math.NaN()
	}
	k := sort.SearchFloat64s(xs, v)
	if k < n && xs[k] == v {
		return ys[k]
	}
	a, b := ys[k-1], ys[k]
	t := (v - xs[k-1]) / (xs[k] - xs[k-1])
	if logY && a*b > 0 {
		return math.Copysign(math.Exp((1-t)*math.Log(math.Abs(a))+t*math.Log(math.Abs(b))), a)
	}
	return a + t*(b-a)
}

// FitParametersCSV lists the parameters of every kept fit: fit_id,
// method, measurement_id, parameter, unit, value, std_error (SI; an empty
// standard error was not estimated).
func FitParametersCSV(doc *sessions.Document) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	_ = w.Write([]string{"fit_id", "method", "measurement_id", "parameter", "unit", "value", "std_error"})
	for _, x := range doc.Extractions {
		for _, p := range x.Parameters {
			se := ""
			if p.StdError != nil {
				se = csvNumber(*p.StdError)
			}
			_ = w.Write([]string{x.ID, x.Method, x.Measurement, p.Name, p.Unit, csvNumber(p.Value), se})
		}
	}
	w.Flush()
	return b.Bytes()
}
