package tui

import (
	"fmt"
	"math"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
)

// ivFit is the fit screen's I-V kind: the single-diode fit of a dark data
// set with the junction's prediction on a log |I| chart (ctrl+l: linear),
// or the fit of a lit data set (fit.IsLit; measure_lit.go).
type ivFit struct {
	meas model.Curve // the data set's points
	view *fit.IVView
	lit  *fit.LitView
	err  string
	pred *model.Curve
	pErr string
	// linear draws |I| on a linear axis instead of a log one.
	linear bool
}

func (f *ivFit) of() measure.Kind { return measure.KindIV }
func (f *ivFit) title() string    { return "Fit" }
func (f *ivFit) switchAxis()      { f.linear = !f.linear }

func (f *ivFit) emptyWindow() string {
	if f.lit != nil {
		return "every point"
	}
	return "every forward point"
}

func (f *ivFit) noChart() string {
	return "(no chart: enlarge the terminal, or nothing to draw on a log axis)"
}

// junctionRule is the temperature rule of the workbench's fits: the
// file's, else the junction's.
func (m Model) junctionRule() fit.TemperatureRule {
	return fit.TemperatureRule{FallbackK: m.form.spec.Temperature, FallbackSource: fit.SourceJunction}
}

func (f *ivFit) refit(m Model, ds *measure.DataSet, win fit.Window) {
	*f = ivFit{linear: f.linear}
	switch {
	case ds == nil:
		f.err = "the data set is gone"
		return
	case fit.IsLit(ds):
		f.meas = fit.MeasuredCurve(ds)
		lv, err := fit.NewLitView(ds, fit.LitOptions{Window: win, Temperature: m.junctionRule()})
		if err != nil {
			f.err = err.Error()
		}
		f.lit = lv
		return
	}
	f.meas = fit.MeasuredCurve(ds)
	v, err := fit.NewIVView(ds, fit.IVOptions{Window: win, Temperature: m.junctionRule()})
	if err != nil {
		f.err = err.Error()
	} else {
		f.view = v
	}
	if p, err := fit.PredictedIV(m.form.spec, ds); err != nil {
		f.pErr = err.Error()
	} else {
		f.pred = &p
	}
}

func (f *ivFit) records() []fit.Record {
	switch {
	case f.lit != nil:
		return []fit.Record{fit.LitRecord(f.lit.Result)}
	case f.view != nil:
		return []fit.Record{fit.IVRecord(f.view.Result)}
	}
	return nil
}

// chart draws the measured points, the fit and the prediction: log |I|,
// or |I| on a linear axis scaled to the measured range.
func (f *ivFit) chart(m Model, cw, ch int) ([]string, string, []string) {
	if f.lit != nil {
		return f.litChart(m, cw, ch)
	}
	st, g := m.e.st, m.e.g
	meas := f.meas
	if len(meas.Series) == 0 {
		return nil, "", nil
	}
	items := []string{st.series[1].Paint(g.point) + " measured"}
	var lines []plotLine
	if f.pred != nil {
		items = append(items, st.pinSeries.Paint(g.pinMarker)+" prediction (the junction)")
		lines = append(lines, plotLine{label: "prediction", xs: f.pred.Xs, ys: f.pred.Series[0].Y, paint: st.pinSeries, marker: g.pinMarker, pinned: true})
	}
	if f.view != nil {
		items = append(items, st.series[0].Paint(g.markers[0])+" fit")
		lines = append(lines, plotLine{label: "fit", xs: f.view.Curve.Xs, ys: f.view.Curve.Series[0].Y, paint: st.series[0], marker: g.markers[0]})
	}
	lines = append(lines, plotLine{label: "measured", xs: meas.Xs, ys: meas.Series[0].Y, paint: st.series[1], marker: g.point, dots: true})
	legend := flowItems(items, cw, 2)
	ph := ch - len(legend) - 2
	if ph < 5 {
		return nil, "", nil
	}
	xlo, xhi := minMax(meas.Xs, 1)
	xs := exactScale(xlo, xhi, max(2, cw/12))
	if f.linear {
		// The y range is that of the measured |I| (the fit and the
		// prediction are clipped to it), in the SI prefix that suits it.
		mags := make([]float64, len(meas.Series[0].Y))
		for i, y := range meas.Series[0].Y {
			mags[i] = math.Abs(y)
		}
		div, unit := axisFactor(model.Axis{Kind: model.Current}, maxAbs(mags), m.e.ascii)
		_, yhi := minMax(mags, div)
		ys := linearScale(0, yhi*1.05, max(2, ph/3))
		for i := range lines {
			lines[i].ys = onAxis(mapValues(lines[i].ys, math.Abs), div, ys)
		}
		return legend, "|current I| (" + unit + ", linear scale)", renderPlot(lines, xs, ys, cw, ph, m.e)
	}
	ys, ok := logCurrent(lines, ph)
	if !ok {
		return legend, "", nil
	}
	return legend, "|current I| (A, log scale)", renderPlot(lines, xs, ys, cw, ph, m.e)
}

// mapValues returns f of every value.
func mapValues(v []float64, f func(float64) float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = f(x)
	}
	return out
}

// logCurrent puts the currents of lines on a log |I| axis of ph rows:
// the decades they span (at most 16), each value as log10 |I| held at the
// axis floor (zero and NaN are not drawn). ok is false when no value
// can be drawn.
func logCurrent(lines []plotLine, ph int) (ys axisScale, ok bool) {
	var all []float64
	for _, l := range lines {
		for _, y := range l.ys {
			if y != 0 {
				all = append(all, y)
			}
		}
	}
	lo, hi, ok := decadeRange(all, 1, 16)
	if !ok {
		return axisScale{}, false
	}
	ys = decadeScale(lo, hi, max(1, int(math.Ceil(3*float64(hi-lo)/float64(max(ph-2, 1))))))
	floor := math.Pow(10, float64(lo))
	for i := range lines {
		lines[i].ys = mapValues(lines[i].ys, func(y float64) float64 {
			if math.IsNaN(y) || y == 0 {
				return math.NaN()
			}
			return math.Log10(math.Max(math.Abs(y), floor))
		})
	}
	return ys, true
}

// table lists the single-diode parameters with their standard errors,
// the residual, the points and the window used.
func (f *ivFit) table(m Model, w int, compact bool) []string {
	if f.lit != nil {
		return f.litTable(m, w, compact)
	}
	st, g := m.e.st, m.e.g
	out := m.e.fitFailed(f.err, w)
	if v := f.view; v != nil {
		out = append(out, st.strong.Paint(cut(fmt.Sprintf("single diode at %s (%s)", model.Format(model.Temperature, v.TemperatureK, 4, m.e.ascii), v.TemperatureFrom), w, g.ellipsis)))
		out = append(out, m.e.paramLines(v.Rows, w, compact)...)
		fit := v.Fit
		if compact {
			out = append(out, cut(fmt.Sprintf("  RMS log residual %.4f %s %d points used (skipped %d) %s window used %s to %s", fit.RMSLogResidual, g.dot, fit.Points, fit.Skipped, g.dot,
				model.Format(model.Voltage, fit.UsedWindow.MinV, 4, m.e.ascii), model.Format(model.Voltage, fit.UsedWindow.MaxV, 4, m.e.ascii)), w, g.ellipsis))
			if sp := sparkline(v.Residual, w-12, m.e.ascii); sp != "" {
				out = append(out, "  residuals "+st.muted.Paint(sp))
			}
			if f.pErr != "" {
				out = append(out, wrapped("no prediction: "+f.pErr, w, st.muted, "  ")...)
			}
			return out
		}
		out = append(out,
			cut(fmt.Sprintf("  RMS log residual %.4f", fit.RMSLogResidual), w, g.ellipsis),
			cut(fmt.Sprintf("  points used %d (skipped %d)", fit.Points, fit.Skipped), w, g.ellipsis),
			cut(fmt.Sprintf("  window used %s to %s", model.Format(model.Voltage, fit.UsedWindow.MinV, 4, m.e.ascii), model.Format(model.Voltage, fit.UsedWindow.MaxV, 4, m.e.ascii)), w, g.ellipsis))
		if sp := sparkline(v.Residual, w-12, m.e.ascii); sp != "" {
			out = append(out, "  residuals "+st.muted.Paint(sp))
		}
		if !fit.Converged {
			out = append(out, st.warn.Paint(cut("  the iteration limit was reached", w, g.ellipsis)))
		}
		for _, n := range fit.Notes {
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
	}
	if f.pErr != "" {
		out = append(out, wrapped("no prediction: "+f.pErr, w, st.muted, "  ")...)
	}
	return out
}
