package tui

import (
	"fmt"
	"strings"

	"junco/model"
	"junco/physics"
)

// The fit screen of a lit I-V data set (fit.IsLit): the current and the
// delivered power against bias on linear axes, one chart above the other,
// with the fit's maximum-power point marked on both; the table lists the
// lit parameters and the figures of merit of the data and of the fit.

// litChart draws the charts of a lit fit (legend, titles and plot
// lines) in cw x ch cells.
func (f *ivFit) litChart(m Model, cw, ch int) (legend []string, yTitle string, plot []string) {
	st, g := m.e.st, m.e.g
	v := f.lit
	meas := f.meas
	if len(meas.Series) == 0 {
		return nil, "", nil
	}
	dotMark, mpp := g.point, g.mpp
	items := []string{st.series[1].Paint(dotMark) + " measured", st.series[0].Paint(g.markers[0]) + " fit",
		st.accent.Paint(mpp) + " maximum power (fit)"}
	legend = flowItems(items, cw, 2)
	// Two charts and the power chart's title share the height.
	avail := ch - len(legend) - 3
	if avail < 10 {
		return nil, "", nil
	}
	ih := avail * 3 / 5
	ph := avail - ih
	xlo, xhi := minMax(meas.Xs, 1)
	xs := exactScale(xlo, xhi, max(2, cw/12))

	// Current, in the data's sign, scaled to the measured range.
	mi := meas.Series[0].Y
	div, unit := axisFactor(model.Axis{Kind: model.Current}, maxAbs(mi), m.e.ascii)
	ilo, ihi := minMax(mi, div)
	iys := linearScale(ilo, ihi, max(2, ih/3))
	ilines := []plotLine{
		{label: "fit", xs: v.Curve.Xs, ys: onAxis(v.Curve.Series[0].Y, div, iys), paint: st.series[0], marker: g.markers[0]},
		{label: "measured", xs: meas.Xs, ys: onAxis(mi, div, iys), paint: st.series[1], marker: dotMark, dots: true},
		{label: "maximum power", xs: []float64{v.MaxPowerV}, ys: onAxis([]float64{v.MaxPowerA}, div, iys), paint: st.accent, marker: mpp, dots: true},
	}
	yTitle = "current I (" + unit + ", linear scale; " + v.Fit.Sign.String() + " sign)"
	plot = renderPlot(ilines, xs, iys, cw, ih, m.e)

	// Delivered power: from a quarter of Pmax below zero to above Pmax
	// (beyond Voc and in reverse bias the junction absorbs power, which
	// would swamp the scale).
	pk := v.MaxPowerW
	for _, s := range v.Power.Series {
		for _, y := range s.Y {
			if physics.Finite(y) && y > pk {
				pk = y
			}
		}
	}
	if !(pk > 0) {
		return legend, yTitle, plot
	}
	pdiv, punit := axisFactor(model.Axis{Kind: model.Power}, pk, m.e.ascii)
	pys := linearScale(-0.25*pk/pdiv, 1.05*pk/pdiv, max(2, ph/3))
	plines := []plotLine{
		{label: "fit", xs: v.Power.Xs, ys: onAxis(v.Power.Series[1].Y, pdiv, pys), paint: st.series[0], marker: g.markers[0]},
		{label: "measured", xs: v.Power.Xs, ys: onAxis(v.Power.Series[0].Y, pdiv, pys), paint: st.series[1], marker: dotMark, dots: true},
		{label: "maximum power", xs: []float64{v.MaxPowerV}, ys: onAxis([]float64{v.MaxPowerW}, pdiv, pys), paint: st.accent, marker: mpp, dots: true},
	}
	// The same label width on both charts keeps their bias axes aligned.
	alignLabels(&iys, &pys)
	plot = renderPlot(ilines, xs, iys, cw, ih, m.e)
	plot = append(plot, st.muted.Paint("delivered power P ("+punit+", linear scale)"))
	return legend, yTitle, append(plot, renderPlot(plines, xs, pys, cw, ph, m.e)...)
}

// figureText is a figure of merit's data and fit values as text.
type figureText struct{ data, fit string }

// litTable is the parameter table of a lit fit; compact puts the
// figures of merit on fewer lines (below the chart on a small terminal).
func (x *ivFit) litTable(m Model, w int, compact bool) []string {
	st, g := m.e.st, m.e.g
	v := x.lit
	f := v.Fit
	var out []string
	head := fmt.Sprintf("lit single diode at %s (%s)", model.Format(model.Temperature, v.TemperatureK, 4, m.e.ascii), v.TemperatureFrom)
	if compact {
		head += ", " + f.Sign.String() + " sign"
	}
	out = append(out, st.strong.Paint(cut(head, w, g.ellipsis)))
	if !compact {
		out = append(out, st.muted.Paint(cut("  current sign: "+f.Sign.String(), w, g.ellipsis)))
	}
	out = append(out, m.e.paramLines(v.Rows, w, compact)...)
	if compact {
		// Six lines in all (fitCompactRows): the figures on two.
		fig := map[string]figureText{}
		for _, r := range v.Figures {
			fig[r.Name] = figureText{r.Data, r.Fit}
		}
		out = append(out, cut(fmt.Sprintf("  FF %s/%s  Voc %s/%s (data/fit)", fig["FF"].data, fig["FF"].fit, fig["Voc"].data, fig["Voc"].fit), w, g.ellipsis))
		out = append(out, cut(fmt.Sprintf("  Pmax %s/%s  RMS residual %s", fig["Pmax"].data, fig["Pmax"].fit, model.Format(model.Current, f.RMSResidualA, 3, m.e.ascii)), w, g.ellipsis))
		return out
	}
	out = append(out, cut(fmt.Sprintf("  %-5s %-12s %s", "", "data", "fit"), w, g.ellipsis))
	for _, r := range v.Figures {
		out = append(out, cut(fmt.Sprintf("  %-5s %-12s %s", r.Name, r.Data, r.Fit), w, g.ellipsis))
	}
	out = append(out, cut(fmt.Sprintf("  RMS residual %s %s %d points (skipped %d)", model.Format(model.Current, f.RMSResidualA, 3, m.e.ascii), g.dot, f.Points, f.Skipped), w, g.ellipsis))
	out = append(out, cut(fmt.Sprintf("  %d of %d start points reached the best", f.StartsAtBest, f.StartsTried), w, g.ellipsis))
	if !f.Converged {
		out = append(out, st.warn.Paint(cut("  the iteration limit was reached", w, g.ellipsis)))
	}
	for _, n := range f.Notes {
		if !strings.Contains(n, "start points reached the best fit") { // the line above
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
	}
	return out
}

// alignLabels pads the tick labels of two axes to the same width (on the
// left), so that charts drawn one above the other share their plot area.
func alignLabels(a, b *axisScale) {
	w := 0
	for _, x := range []*axisScale{a, b} {
		for _, t := range x.ticks {
			w = max(w, len([]rune(x.label(t))))
		}
	}
	for _, x := range []*axisScale{a, b} {
		lab := x.label
		x.label = func(v float64) string {
			s := lab(v)
			if n := len([]rune(s)); n < w {
				s = strings.Repeat(" ", w-n) + s
			}
			return s
		}
	}
}
