package tui

import (
	"math"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/physics"
)

// Reading values off a chart: a cursor that walks the points of the
// curve with a readout in trade units, zoom and pan on both axes, and a
// log x axis where the x values allow one.

// chartView is the part of the full plot the user looks at, as fractions
// of the full plotted range on each axis (0..1 is everything), with the
// cursor's point index (-1: no cursor) and the log x switch.
type chartView struct {
	x0, x1, y0, y1 float64
	cursor         int
	logX           bool
	// wantCursor puts the cursor on once the curve is drawn (c pressed
	// while the curves were being computed).
	wantCursor bool
}

func fullView() chartView { return chartView{x0: 0, x1: 1, y0: 0, y1: 1, cursor: -1} }

func (v chartView) zoomed() bool { return v.x0 > 0 || v.x1 < 1 || v.y0 > 0 || v.y1 < 1 }

// minViewSpan is the smallest fraction of the full range a view shows
// (a zoom of about a million).
const minViewSpan = 1e-6

// zoomAxis scales the span a0..a1 by f about the fraction c (c keeps its
// place in the view), kept inside 0..1.
func zoomAxis(a0, a1, f, c float64) (float64, float64) {
	span := math.Min(math.Max((a1-a0)*f, minViewSpan), 1)
	if !(c >= a0 && c <= a1) {
		c = (a0 + a1) / 2
	}
	// Keep c at the same place in the view.
	r := 0.5
	if a1 > a0 {
		r = (c - a0) / (a1 - a0)
	}
	lo := c - r*span
	return clampSpan(lo, span)
}

// centreAxis scales the span a0..a1 by f and centres it on the fraction
// c, kept inside 0..1 (the keys' zoom: the cursor's point comes to the
// middle).
func centreAxis(a0, a1, f, c float64) (float64, float64) {
	span := math.Min(math.Max((a1-a0)*f, minViewSpan), 1)
	return clampSpan(c-span/2, span)
}

// panAxis shifts a0..a1 by d times its span, kept inside 0..1.
func panAxis(a0, a1, d float64) (float64, float64) {
	span := a1 - a0
	return clampSpan(a0+d*span, span)
}

func clampSpan(lo, span float64) (float64, float64) {
	lo = math.Min(math.Max(lo, 0), 1-span)
	return lo, lo + span
}

// plotGeom locates the graph area of a drawn plot inside the panel, for
// the mouse: its first column and row, and its size in cells.
type plotGeom struct {
	col, row, w, h int
}

// drawnAxes are the scales and maps of the last render, kept for the
// cursor, zoom and mouse.
type drawnAxes struct {
	xm             axisMap
	fullX, fullY   [2]float64 // full plotted ranges
	viewX, viewY   [2]float64 // shown plotted ranges
	pxs            []float64  // plotted x of the curve's points
	pys            []float64  // plotted y of the followed series at those points
	xf             float64    // divisor from curve x to display x
	yf             float64    // divisor from curve y to display y (linear y)
	geom           plotGeom
	logXok         bool
	logXwhy        string
	cursorInFrame  bool
	followedSeries int
}

// frac converts a plotted coordinate to a fraction of a full range.
func frac(full [2]float64, p float64) float64 {
	if !(full[1] > full[0]) {
		return 0.5
	}
	return (p - full[0]) / (full[1] - full[0])
}

// viewKey handles the keys that move the cursor and the view; ok is false
// for any other key.
func (c *chartModel) viewKey(km tea.KeyMsg) (ok bool) {
	k := c.e.keys
	v := &c.view
	n := len(c.ax.pxs)
	step := func(d int) {
		if n == 0 {
			return
		}
		if v.cursor < 0 {
			v.cursor = c.startCursor()
		} else {
			v.cursor = min(max(v.cursor+d, 0), n-1)
		}
		c.follow()
	}
	cx, cy := c.zoomCentre()
	switch {
	case keyIs(km, k.Cursor):
		switch {
		case v.cursor >= 0 || v.wantCursor:
			v.cursor, v.wantCursor = -1, false
		case n > 0:
			v.cursor = c.startCursor()
			c.follow()
		default:
			v.wantCursor = true
		}
	case keyIs(km, k.CursorPrev):
		step(-1)
	case keyIs(km, k.CursorNext):
		step(1)
	case keyIs(km, k.CursorJumpPrev):
		step(-max(1, n/20))
	case keyIs(km, k.CursorJumpNext):
		step(max(1, n/20))
	case keyIs(km, k.ZoomIn):
		v.x0, v.x1 = centreAxis(v.x0, v.x1, 0.5, cx)
		v.y0, v.y1 = centreAxis(v.y0, v.y1, 0.5, cy)
	case keyIs(km, k.ZoomOut):
		v.x0, v.x1 = centreAxis(v.x0, v.x1, 2, cx)
		v.y0, v.y1 = centreAxis(v.y0, v.y1, 2, cy)
	case keyIs(km, k.ZoomInX):
		v.x0, v.x1 = centreAxis(v.x0, v.x1, 0.5, cx)
	case keyIs(km, k.ZoomOutX):
		v.x0, v.x1 = centreAxis(v.x0, v.x1, 2, cx)
	case keyIs(km, k.ZoomInY):
		v.y0, v.y1 = centreAxis(v.y0, v.y1, 0.5, cy)
	case keyIs(km, k.ZoomOutY):
		v.y0, v.y1 = centreAxis(v.y0, v.y1, 2, cy)
	case keyIs(km, k.PanLeft):
		v.x0, v.x1 = panAxis(v.x0, v.x1, -0.25)
	case keyIs(km, k.PanRight):
		v.x0, v.x1 = panAxis(v.x0, v.x1, 0.25)
	case keyIs(km, k.PanUp):
		v.y0, v.y1 = panAxis(v.y0, v.y1, 0.25)
	case keyIs(km, k.PanDown):
		v.y0, v.y1 = panAxis(v.y0, v.y1, -0.25)
	case keyIs(km, k.ResetView):
		cur := v.cursor
		*v = fullView()
		v.cursor = cur
		v.logX = c.view.logX
	case keyIs(km, k.LogX):
		if !v.logX && !c.ax.logXok {
			c.editErr = c.ax.logXwhy
			return true
		}
		v.logX = !v.logX
		v.x0, v.x1 = 0, 1
	default:
		return false
	}
	c.editErr = ""
	c.render()
	return true
}

// startCursor is the point the cursor starts on: the middle of the view.
func (c *chartModel) startCursor() int {
	best, bd := 0, math.Inf(1)
	mid := (c.ax.viewX[0] + c.ax.viewX[1]) / 2
	for i, p := range c.ax.pxs {
		if d := math.Abs(p - mid); physics.Finite(p) && d < bd {
			best, bd = i, d
		}
	}
	return best
}

// follow pans the view so that the cursor's point shows.
func (c *chartModel) follow() {
	v := &c.view
	if v.cursor < 0 || v.cursor >= len(c.ax.pxs) {
		return
	}
	f := frac(c.ax.fullX, c.ax.pxs[v.cursor])
	if !physics.Finite(f) {
		return
	}
	span := v.x1 - v.x0
	switch {
	case f < v.x0:
		v.x0, v.x1 = clampSpan(f-0.1*span, span)
	case f > v.x1:
		v.x0, v.x1 = clampSpan(f-0.9*span, span)
	}
}

// zoomCentre is where a zoom keeps its place: the cursor's point where
// there is one in view, else the middle of the view (fractions).
func (c *chartModel) zoomCentre() (float64, float64) {
	v := c.view
	cx, cy := (v.x0+v.x1)/2, (v.y0+v.y1)/2
	if v.cursor >= 0 && v.cursor < len(c.ax.pxs) {
		if f := frac(c.ax.fullX, c.ax.pxs[v.cursor]); physics.Finite(f) && f >= v.x0 && f <= v.x1 {
			cx = f
		}
		if v.cursor < len(c.ax.pys) {
			if f := frac(c.ax.fullY, c.ax.pys[v.cursor]); physics.Finite(f) && f >= v.y0 && f <= v.y1 {
				cy = f
			}
		}
	}
	return cx, cy
}

// mouse handles a mouse event at (x, y) cells from the panel's top left:
// the wheel zooms about the pointer (shift: x only, ctrl: y only), a click
// puts the cursor on the nearest point, a drag pans.
func (c *chartModel) mouse(msg tea.MouseMsg, x, y int) {
	g := c.ax.geom
	if g.w < 1 || g.h < 1 || c.plot == nil {
		return
	}
	gx, gy := x-g.col, y-g.row
	inside := gx >= 0 && gx < g.w && gy >= 0 && gy < g.h
	v := &c.view
	// The pointer as fractions of the full range.
	fx := v.x0 + (float64(gx)+0.5)/float64(g.w)*(v.x1-v.x0)
	fy := v.y0 + (1-(float64(gy)+0.5)/float64(g.h))*(v.y1-v.y0)
	switch {
	case msg.Action == tea.MouseActionPress && (msg.Button == tea.MouseButtonWheelUp || msg.Button == tea.MouseButtonWheelDown):
		if !inside {
			return
		}
		f := 0.5
		if msg.Button == tea.MouseButtonWheelDown {
			f = 2
		}
		if !msg.Ctrl {
			v.x0, v.x1 = zoomAxis(v.x0, v.x1, f, fx)
		}
		if !msg.Shift {
			v.y0, v.y1 = zoomAxis(v.y0, v.y1, f, fy)
		}
	case msg.Action == tea.MouseActionPress && msg.Button == tea.MouseButtonLeft:
		if !inside {
			return
		}
		c.drag = &[2]int{gx, gy}
		px := c.ax.fullX[0] + fx*(c.ax.fullX[1]-c.ax.fullX[0])
		best, bd := -1, math.Inf(1)
		for i, p := range c.ax.pxs {
			if d := math.Abs(p - px); physics.Finite(p) && d < bd {
				best, bd = i, d
			}
		}
		v.cursor = best
	case msg.Action == tea.MouseActionMotion && msg.Button == tea.MouseButtonLeft && c.drag != nil:
		dx, dy := gx-c.drag[0], gy-c.drag[1]
		if dx == 0 && dy == 0 {
			return
		}
		c.drag = &[2]int{gx, gy}
		v.x0, v.x1 = clampSpan(v.x0-float64(dx)/float64(g.w)*(v.x1-v.x0), v.x1-v.x0)
		v.y0, v.y1 = clampSpan(v.y0+float64(dy)/float64(g.h)*(v.y1-v.y0), v.y1-v.y0)
	case msg.Action == tea.MouseActionRelease:
		c.drag = nil
		return
	default:
		return
	}
	c.render()
}

// cursorLines is the readout under the plot, on readRows lines: the
// cursor's x and every series' y there in trade units (flowing onto the
// second line where the panel is narrow), or what the view keys do.
func (c chartModel) cursorLines(w int) []string {
	st, g, ascii := c.e.st, c.e.g, c.e.ascii
	rows := max(c.readRows, 1)
	pad := func(out []string) []string {
		for len(out) < rows {
			out = append(out, "")
		}
		return out
	}
	d := c.data
	i := c.view.cursor
	if d == nil || d.err != nil || c.plot == nil || i < 0 || i >= len(d.cur.Xs) || d.cur.ID == "carriers" && !c.num.on {
		var out []string
		for _, l := range flowParts(c.viewHints(), " "+g.dot+" ", w, rows, g.ellipsis) {
			out = append(out, st.faint.Paint(l))
		}
		return pad(out)
	}
	cur := c.shown
	if i >= len(cur.Xs) {
		return pad(nil)
	}
	parts := []string{st.strong.Paint(symbolOf(cur.X.Label) + " " + valueText(cur.X, cur.Xs[i], ascii))}
	// The total first: a narrow panel cuts the components.
	order := []int{}
	if p := cur.Primary(); p >= 0 {
		order = append(order, p)
	}
	for j := range cur.Series {
		if j != cur.Primary() {
			order = append(order, j)
		}
	}
	for _, j := range order {
		s := cur.Series[j]
		if i >= len(s.Y) {
			continue
		}
		parts = append(parts, st.series[j%len(st.series)].Paint(s.Label)+" "+valueText(cur.Y, s.Y[i], ascii))
	}
	if p := d.pinned; p != nil && i < len(p.Xs) && p.Xs[i] == cur.Xs[i] {
		ps := pinnedSeries(*p)
		parts = append(parts, st.pinSeries.Paint("pinned")+" "+valueText(p.Y, p.Series[ps].Y[i], ascii))
	}
	parts[0] = g.cursor + " " + parts[0]
	if !c.ax.cursorInFrame {
		parts = append(parts, st.faint.Paint("(outside the view)"))
	}
	return pad(flowParts(parts, "  ", w, rows, g.ellipsis))
}

// viewHints are what the view keys do, shown under the plot while the
// cursor is off.
func (c chartModel) viewHints() []string {
	items := []string{"c cursor", ", . walk", "+/- zoom", "H/J/K/L pan", "x log x", "0 whole chart"}
	if c.view.zoomed() {
		items = append([]string{"zoomed", "0 shows the whole chart"}, items[:5]...)
	}
	return items
}

// readoutLines is the number of lines the cursor readout of curve cur
// takes in w cells: the x, each series' label with a value and the
// pinned value, flowed as cursorLines does (values taken as 10 cells,
// "-123.4 mA").
func readoutLines(cur model.Curve, pinned bool, w int) int {
	const value = "-123.4 mA "
	parts := []string{"> " + symbolOf(cur.X.Label) + " " + value}
	for _, s := range cur.Series {
		parts = append(parts, s.Label+" "+value)
	}
	if pinned {
		parts = append(parts, "pinned "+value)
	}
	return len(flowParts(parts, "  ", w, len(parts), ""))
}

// hintLines is the number of lines the view hints take in w cells.
func (c chartModel) hintLines(w int) int {
	h := c.viewHints()
	return len(flowParts(h, " . ", w, len(h), ""))
}

// flowParts joins parts with sep into lines of at most w cells, at most
// maxLines lines; what does not fit on the last is cut there with tail.
func flowParts(parts []string, sep string, w, maxLines int, tail string) []string {
	var out []string
	line := ""
	for _, p := range parts {
		switch {
		case line == "":
			line = p
		case width(line)+width(sep)+width(p) <= w || len(out) == maxLines-1:
			line += sep + p
		default:
			out = append(out, line)
			line = p
		}
	}
	if line != "" {
		out = append(out, line)
	}
	for i := range out {
		out[i] = cut(out[i], w, tail)
	}
	return out
}

// symbolOf is the symbol at the end of an axis label ("bias V" -> "V"),
// or the label.
func symbolOf(label string) string {
	f := strings.Fields(label)
	if len(f) > 1 {
		return f[len(f)-1]
	}
	return label
}

// pinnedSeries is the series of the pinned curve drawn: its total where it
// has one, else its first.
func pinnedSeries(p model.Curve) int { return max(p.Primary(), 0) }
