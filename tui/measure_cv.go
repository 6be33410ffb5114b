package tui

import (
	"fmt"
	"math"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
)

// cvFit is the fit screen's C-V kind: the junction fit and the
// Mott-Schottky line of a C-V data set (fit.NewCVView, which brings the
// junction's prediction) on a 1/C^2 chart.
type cvFit struct {
	view *fit.CVView
	err  string
}

func (f *cvFit) of() measure.Kind    { return measure.KindCV }
func (f *cvFit) title() string       { return "C-V fit" }
func (f *cvFit) emptyWindow() string { return "every point" }
func (f *cvFit) noChart() string     { return "(no chart: enlarge the terminal, or no fit to draw)" }
func (f *cvFit) records() []fit.Record {
	if f.view == nil {
		return nil
	}
	return fit.CVRecords(f.view.Result)
}

func (f *cvFit) refit(m Model, ds *measure.DataSet, win fit.Window) {
	*f = cvFit{}
	if ds == nil {
		f.err = "the data set is gone"
		return
	}
	v, err := fit.NewCVView(ds, m.form.spec, win)
	if err != nil {
		f.err = err.Error()
	} else {
		f.view = v
	}
}

// chart draws 1/(C - Cpar)^2 of the data, the Mott-Schottky line and the
// prediction.
func (f *cvFit) chart(m Model, cw, ch int) (legend []string, yTitle string, plot []string) {
	st, g := m.e.st, m.e.g
	v := f.view
	if v == nil || len(v.Inverse.Series) < 2 {
		return nil, "", nil
	}
	dotMark := g.point
	items := []string{st.series[1].Paint(dotMark) + " measured 1/(C − Cpar)²"}
	if m.e.ascii {
		items[0] = st.series[1].Paint(dotMark) + " measured 1/(C - Cpar)^2"
	}
	type src struct {
		xs, ys []float64
		ln     plotLine
	}
	var srcs []src
	if p := v.Prediction; p != nil && len(p.Series) > 0 {
		items = append(items, st.pinSeries.Paint(g.pinMarker)+" "+p.Series[0].Label+" (the junction)")
		srcs = append(srcs, src{p.Xs, p.Series[0].Y, plotLine{label: "prediction", paint: st.pinSeries, marker: g.pinMarker, pinned: true}})
	}
	items = append(items, st.series[0].Paint(g.markers[0])+" Mott-Schottky line")
	srcs = append(srcs, src{v.Inverse.Xs, v.Inverse.Series[1].Y, plotLine{label: "line", paint: st.series[0], marker: g.markers[0]}})
	srcs = append(srcs, src{v.Inverse.Xs, v.Inverse.Series[0].Y, plotLine{label: "measured", paint: st.series[1], marker: dotMark, dots: true}})
	legend = flowItems(items, cw, 2)
	ph := ch - len(legend) - 2
	if ph < 5 {
		return nil, "", nil
	}
	// The y range is that of the measured points (the line and the
	// prediction are clipped to it, so a far-off prediction cannot flatten
	// the data), scaled to a power of ten for the tick labels.
	ylo, yhi := minMax(v.Inverse.Series[0].Y, 1)
	ylo = math.Min(ylo, 0)
	peak := math.Max(math.Abs(ylo), math.Abs(yhi))
	exp := 0
	if peak > 0 && physics.Finite(peak) {
		exp = int(math.Floor(math.Log10(peak)))
	}
	scale := math.Pow(10, float64(exp))
	ys := linearScale(ylo/scale, yhi*1.05/scale, max(2, ph/3))
	xlo, xhi := minMax(v.Inverse.Xs, 1)
	xs := exactScale(xlo, xhi, max(2, cw/12))
	var lines []plotLine
	for _, s := range srcs {
		ln := s.ln
		ln.xs, ln.ys = s.xs, onAxis(s.ys, scale, ys)
		lines = append(lines, ln)
	}
	return legend, fmt.Sprintf("1/(C - Cpar)^2 (1e%d F^-2)", exp), renderPlot(lines, xs, ys, cw, ph, m.e)
}

// table lists the junction fit's parameters and the Mott-Schottky
// line's (compact: two to a line).
func (f *cvFit) table(m Model, w int, compact bool) []string {
	st, g := m.e.st, m.e.g
	out := m.e.fitFailed(f.err, w)
	v := f.view
	if v == nil {
		return out
	}
	out = append(out, st.strong.Paint(cut("C = Cj0/(1 - V/Vbi)^m + Cpar", w, g.ellipsis)))
	head := min(4, len(v.Rows))
	if compact {
		head = len(v.Rows)
	}
	out = append(out, m.e.paramLines(v.Rows[:head], w, compact)...)
	if head < len(v.Rows) {
		out = append(out, st.strong.Paint(cut("Mott-Schottky line of C - Cpar (m = 1/2)", w, g.ellipsis)))
		out = append(out, m.e.paramLines(v.Rows[head:], w, compact)...)
	}
	j := v.Analysis.Junction
	win := fmt.Sprintf("  %d points, window used %s to %s", j.Points,
		model.Format(model.Voltage, j.UsedWindow.MinV, 4, m.e.ascii), model.Format(model.Voltage, j.UsedWindow.MaxV, 4, m.e.ascii))
	out = append(out, cut(win, w, g.ellipsis),
		cut(fmt.Sprintf("  RMS relative residual %.4f", j.RMSRelResidual), w, g.ellipsis))
	for _, x := range undetermined(v.Rows) {
		out = append(out, wrapped(x, w, st.muted, "  ")...)
	}
	if !compact {
		for _, n := range v.Analysis.Notes {
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
		if v.AreaM2 > 0 {
			out = append(out, wrapped(fmt.Sprintf("N is the lightly doped side's doping, from the area %s and the permittivity of %s.",
				model.Format(model.Area, v.AreaM2, 4, m.e.ascii), v.Material), w, st.muted, "  ")...)
		} else {
			out = append(out, wrapped("No doping: the junction has no area set.", w, st.muted, "  ")...)
		}
	}
	if v.PredictionErr != "" {
		out = append(out, wrapped("no prediction: "+v.PredictionErr, w, st.muted, "  ")...)
	}
	return out
}
