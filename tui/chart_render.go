package tui

import (
	"junco/model"
	"junco/physics"
	"math"
)

// render redraws the plot from the curves at hand for the current size,
// chart, view and drawing mode. The y scale follows the total where the
// curve has one (the I-V total current, the total capacitance): the
// idealised components are drawn clipped to the frame, never allowed to
// set it.
func (c *chartModel) render() {
	c.plot, c.legend, c.curveErr, c.topPad, c.readRows = nil, nil, "", 0, 1
	c.ax = drawnAxes{}
	k := c.kind()
	c.title = k.name
	if c.w < 16 || c.h < 8 || c.data == nil || c.data.req.kind.id != k.id {
		return
	}
	st, g := c.e.st, c.e.g
	if c.data.err != nil {
		c.curveErr = c.data.err.Error()
		return
	}
	cur, pinned := c.data.cur, c.data.pinned
	cur, extra, exs, why, ok := c.overlay(k.id, cur)
	if !ok {
		c.curveErr = why
		return
	}
	c.shown = cur
	c.title = cur.Title
	// The readout takes the rows the values of every series need where
	// the panel has the height (2 from 20 rows, 4 from 30).
	c.readRows = 1
	switch {
	case c.h >= 30:
		c.readRows = min(4, max(readoutLines(cur, pinned != nil, c.w), c.hintLines(c.w)))
	case c.h >= 20:
		c.readRows = min(2, max(readoutLines(cur, pinned != nil, c.w), c.hintLines(c.w)))
	}
	if len(extra) > 0 {
		c.title += " " + g.dot + " with the drift-diffusion solution"
	}
	logY := k.log || cur.Y.Log
	prim := cur.Primary()
	pinIdx := 0
	if pinned != nil {
		pinIdx = pinnedSeries(*pinned)
	}

	// The x axis: a display unit, then linear, log or split.
	xf, xUnit := axisFactor(cur.X, maxAbs(cur.Xs), c.e.ascii)
	conv := func(v []float64, f float64) []float64 {
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = x / f
		}
		return out
	}
	xs := conv(cur.Xs, xf)
	c.ax.xf = xf
	c.ax.logXok, c.ax.logXwhy = logMapFor(xs)
	if c.view.logX && !c.ax.logXok {
		c.view.logX = false
	}
	xm := axisMap{}
	xlo, xhi := minMax(xs, 1)
	var pxsDisp []float64
	if pinned != nil {
		pxsDisp = conv(pinned.Xs, xf)
		plo, phi := minMax(pxsDisp, 1)
		xlo, xhi = math.Min(xlo, plo), math.Max(xhi, phi)
	}
	c.xTitle = axisTitle(cur.X.Label, xUnit)
	switch {
	case c.view.logX:
		xm = axisMap{kind: mapLog}
		if xhi <= 0 {
			c.xTitle = axisTitle("|"+cur.X.Label+"|", xUnit) + ", log scale"
		} else {
			c.xTitle = axisTitle(cur.X.Label, xUnit) + ", log scale"
		}
	case spatial(cur):
		if m, ok := splitMap(xlo, xhi); ok {
			xm = m
			c.xTitle = axisTitle(cur.X.Label, xUnit) + ", each side of the junction to its own scale"
			if width(c.xTitle) > c.w {
				c.xTitle = axisTitle(cur.X.Label, xUnit) + ", each side to its own scale"
			}
		}
	}
	c.ax.xm = xm
	pxs := xm.apply(xs)
	c.ax.pxs = pxs

	// What sets the y scale: the total (and the pinned total and the
	// solver's lines), else every series.
	var all []float64
	for i, s := range cur.Series {
		if prim < 0 || i == prim {
			all = append(all, s.Y...)
		}
	}
	cvNote := ""
	if d := cur.DepletionDominated(); d != nil {
		all, cvNote = d, " (depletion range)"
	}
	if pinned != nil {
		if d := pinned.DepletionDominated(); d != nil {
			all = append(all, d...)
		} else {
			all = append(all, pinned.Series[pinIdx].Y...)
		}
	}
	for _, s := range extra {
		for j, y := range s.Y {
			if j < len(exs) && physics.Finite(exs[j]) {
				all = append(all, y)
			}
		}
	}
	negative := false
	for _, v := range all {
		if v < 0 {
			negative = true
		}
	}

	// The legend first: its height fixes the plot height. A series with
	// no value off zero has no line on a log axis; its entry says so.
	var items []string
	for i, s := range cur.Series {
		l := s.Label
		if len(extra) > 0 {
			l += " (analytic)"
		}
		if logY && model.ZeroSeries(s.Y) {
			items = append(items, st.faint.Paint(g.markers[i%len(g.markers)]+" "+l+": zero"))
			continue
		}
		items = append(items, st.series[i%len(st.series)].Paint(g.markers[i%len(g.markers)])+" "+l)
	}
	for i, s := range extra {
		j := numericMarker(i, len(g.markers))
		items = append(items, st.series[j%len(st.series)].Paint(g.markers[j])+" "+s.Label)
	}
	if pinned != nil {
		items = append(items, st.pinSeries.Paint(g.pinMarker)+" pinned: "+pinned.Series[pinIdx].Label)
	}
	c.legend = flowItems(items, c.w, 3)
	ph := c.h - c.fixedRows(len(c.legend))
	if ph < 5 {
		c.curveErr = "the chart needs more room: enlarge the terminal"
		return
	}

	var ys axisScale
	var yConv func([]float64) []float64
	if logY {
		_, si := displayFactor(cur.Y)
		lo, hi, ok := decadeRange(all, si, capDecades(k.id))
		if !ok {
			c.curveErr = "nothing to draw on a logarithmic axis: every value is zero or missing"
			return
		}
		span := hi - lo
		gh := ph - 2
		if !c.view.zoomed() && gh >= span && gh%span != 0 && gh%span <= gh/5 {
			trim := gh % span
			c.topPad = trim
			ph -= trim
			gh -= trim
		}
		step := max(1, int(math.Ceil(3*float64(span)/float64(max(gh, 1)))))
		ys = decadeScale(lo, hi, step)
		yConv = func(v []float64) []float64 {
			out := make([]float64, len(v))
			for i, y := range v {
				// Zero has no place on a log axis: the line breaks there
				// and values below the frame are clipped, never drawn
				// along its floor.
				if a := math.Abs(y) / si; a > 0 && physics.Finite(a) {
					out[i] = math.Log10(a)
				} else {
					out[i] = math.NaN()
				}
			}
			return out
		}
		unit := displayUnit(cur.Y, c.e.ascii)
		name := cur.Y.Label
		if negative {
			name = "|" + name + "|"
		}
		if unit == "1" {
			c.yTitle = name + " (log scale)"
		} else {
			c.yTitle = name + " (" + unit + ", log scale)"
		}
	} else {
		yf, yUnit := axisFactor(cur.Y, maxAbs(all), c.e.ascii)
		lo, hi := minMax(all, yf)
		ys = linearScale(lo, hi, max(2, (ph-2)/3))
		yConv = func(v []float64) []float64 { return conv(v, yf) }
		c.ax.yf = yf
		c.yTitle = axisTitle(cur.Y.Label, yUnit)
	}
	if prim >= 0 {
		c.yTitle += ", scaled to the " + cur.Series[prim].Label + cvNote
	}

	// The full plotted ranges, then the view inside them.
	fxlo, fxhi := minMax(pxs, 1)
	if pinned != nil {
		plo, phi := minMax(xm.apply(pxsDisp), 1)
		fxlo, fxhi = math.Min(fxlo, plo), math.Max(fxhi, phi)
	}
	if xm.kind == mapLog {
		fxlo, fxhi = math.Floor(fxlo+1e-9), math.Ceil(fxhi-1e-9)
	}
	if !(fxhi > fxlo) {
		fxhi = fxlo + 1
	}
	c.ax.fullX, c.ax.fullY = [2]float64{fxlo, fxhi}, [2]float64{ys.min, ys.max}
	v := c.view
	at := func(r [2]float64, f float64) float64 { return r[0] + f*(r[1]-r[0]) }
	vx := [2]float64{at(c.ax.fullX, v.x0), at(c.ax.fullX, v.x1)}
	vy := [2]float64{at(c.ax.fullY, v.y0), at(c.ax.fullY, v.y1)}
	c.ax.viewX, c.ax.viewY = vx, vy
	xsc := viewScale(xm, vx[0], vx[1], max(2, c.w/12))
	if xm.kind == mapLinear && v.x0 == 0 && v.x1 == 1 {
		xsc = exactScale(xlo, xhi, max(2, c.w/12))
	}
	if v.y0 > 0 || v.y1 < 1 {
		if logY {
			ys = logViewScale(vy[0], vy[1], max(2, (ph-2)/3))
		} else {
			ys = exactScale(vy[0], vy[1], max(2, (ph-2)/3))
		}
	}

	var lines []plotLine
	if pinned != nil {
		lines = append(lines, plotLine{label: "pinned", xs: xm.apply(pxsDisp), ys: yConv(pinned.Series[pinIdx].Y), paint: st.pinSeries, marker: g.pinMarker, pinned: true})
	}
	nxs := xm.apply(conv(exs, xf))
	for i := len(extra) - 1; i >= 0; i-- {
		j := numericMarker(i, len(g.markers))
		lines = append(lines, plotLine{label: extra[i].Label, xs: nxs, ys: yConv(extra[i].Y),
			paint: st.series[j%len(st.series)], marker: g.markers[j]})
	}
	// The total is drawn last, over its components.
	order := make([]int, 0, len(cur.Series))
	for i := len(cur.Series) - 1; i >= 0; i-- {
		if i != prim {
			order = append(order, i)
		}
	}
	if prim >= 0 {
		order = append(order, prim)
	}
	follow := max(prim, 0)
	var cursorPts []cursorPoint
	for _, i := range order {
		s := cur.Series[i]
		py := yConv(s.Y)
		if i == follow {
			c.ax.pys, c.ax.followedSeries = py, i
		}
		lines = append(lines, plotLine{label: s.Label, xs: pxs, ys: py,
			paint: st.series[i%len(st.series)], marker: g.markers[i%len(g.markers)]})
		if j := v.cursor; j >= 0 && j < len(pxs) && j < len(py) {
			cursorPts = append(cursorPts, cursorPoint{x: pxs[j], y: py[j], line: len(lines) - 1})
		}
	}
	if v.wantCursor && len(pxs) > 0 {
		c.view.wantCursor = false
		c.view.cursor = c.startCursor()
		c.render()
		return
	}
	opt := plotOpts{cursorX: math.NaN()}
	if j := v.cursor; j >= 0 && j < len(pxs) {
		opt.cursorX, opt.cursorPts = pxs[j], cursorPts
		c.ax.cursorInFrame = pxs[j] >= vx[0] && pxs[j] <= vx[1]
	} else if v.cursor >= len(pxs) {
		c.view.cursor = -1
	}
	var geom plotGeom
	c.plot, geom = renderPlotWith(lines, xsc, ys, c.w, ph, c.e, opt)
	geom.row += 2 + len(c.legend) + c.topPad
	c.ax.geom = geom
}
