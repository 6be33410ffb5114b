package tui

import (
	"junco/physics"
	"math"
	"strconv"
	"strings"

	"github.com/NimbleMarkets/ntcharts/canvas"
	"github.com/NimbleMarkets/ntcharts/canvas/graph"
	"github.com/NimbleMarkets/ntcharts/canvas/runes"
	"github.com/NimbleMarkets/ntcharts/linechart"
)

// plotLine is one line of a plot in plotted units (logarithms already
// taken on a log axis). NaN breaks the line.
type plotLine struct {
	label  string
	xs, ys []float64
	paint  ink
	marker string
	pinned bool
	// dots draws each point as its marker character, unconnected
	// (measured data).
	dots bool
}

// axisScale describes one plotted axis: its range and ticks in plotted
// units and how a tick is labelled.
type axisScale struct {
	min, max float64
	ticks    []float64
	label    func(float64) string
}

// cellClass says how a chart cell is painted.
const (
	classCursor = -4
	classLabel  = -3
	classAxis   = -2
	classEmpty  = -1
)

// renderPlot draws lines on an ntcharts line chart of w x h cells (axes
// and tick labels included) and returns exactly h lines of w cells. Only
// the chart's layout, axes, labels and braille grid are used: lines are
// drawn series by series into the visible range (the chart's own helpers
// scale to the data range), and the canvas is painted here in runs so
// that a redraw stays cheap.
func renderPlot(lines []plotLine, xs, ys axisScale, w, h int, e env) []string {
	out, _ := renderPlotWith(lines, xs, ys, w, h, e, plotOpts{cursorX: math.NaN()})
	return out
}

// plotOpts are the extras of a plot: the cursor's x (NaN for none), drawn
// as a faint vertical line, and its points on the lines, drawn as a mark
// in the line's colour.
type plotOpts struct {
	cursorX   float64
	cursorPts []cursorPoint
}

// cursorPoint is where the cursor meets line number line.
type cursorPoint struct {
	x, y float64
	line int
}

// renderPlotWith is renderPlot with the cursor; it also returns where the
// graph area lies in the returned lines. Segments are clipped to the
// frame, so a line leaving the frame ends at its edge and one far outside
// costs nothing.
func renderPlotWith(lines []plotLine, xs, ys axisScale, w, h int, e env, opt plotOpts) ([]string, plotGeom) {
	st, g := e.st, e.g
	if w < 16 || h < 5 || !(xs.max > xs.min) || !(ys.max > ys.min) {
		return block([]string{st.muted.Paint("(the chart needs more room)")}, max(w, 0), max(h, 0), ""), plotGeom{}
	}
	gh := h - 2
	gridH := 4 * gh
	yfmt := func(i int, _ float64) string {
		r := gh - i
		if r < 0 || r >= gh {
			return ""
		}
		// Neighbouring rows share their edge exactly (same expression),
		// so no tick falls between them.
		unit := (ys.max - ys.min) / float64(gridH-1)
		edge := func(k int) float64 { return ys.min + (float64(k)-3.5)*unit }
		top := gridH - 1 - 4*r
		return tickIn(ys, edge(top), edge(top+4))
	}
	lc := linechart.New(w, h, xs.min, xs.max, ys.min, ys.max,
		linechart.WithXYSteps(1, 1), linechart.WithYLabelFormatter(yfmt))
	gw := lc.GraphWidth()
	if gw < 4 || lc.GraphHeight() < 2 {
		return block([]string{st.muted.Paint("(the chart needs more room)")}, w, h, ""), plotGeom{}
	}
	gridW := 2 * gw
	xfmt := func(i int, _ float64) string {
		if i < 0 || i >= gw {
			return ""
		}
		unit := (xs.max - xs.min) / float64(gridW-1)
		edge := func(k int) float64 { return xs.min + (float64(k)-0.5)*unit }
		return tickIn(xs, edge(2*i), edge(2*i+2))
	}
	lc.XLabelFormatter = xfmt
	lc.DrawXYAxisAndLabel()
	o := lc.Origin()
	for i := 0; i < gw; i++ {
		if xfmt(i, 0) != "" {
			lc.Canvas.SetCell(canvas.Point{X: o.X + 1 + i, Y: o.Y}, canvas.Cell{Rune: g.tickX})
		}
	}
	for i := 1; i <= gh; i++ {
		if yfmt(i, 0) != "" {
			lc.Canvas.SetCell(canvas.Point{X: o.X, Y: o.Y - i}, canvas.Cell{Rune: g.tickY})
		}
	}

	owner := make([][]int8, gh)
	for y := range owner {
		owner[y] = make([]int8, gw)
		for x := range owner[y] {
			owner[y][x] = classEmpty
		}
	}
	inGraph := func(x, y int) bool { return x >= 0 && x < gw && y >= 0 && y < gh }
	put := func(x, y int, r rune, k int) {
		if !inGraph(x, y) {
			return
		}
		lc.Canvas.SetCell(canvas.Point{X: o.X + 1 + x, Y: y}, canvas.Cell{Rune: r})
		owner[y][x] = int8(k)
	}
	type mark struct{ x, y int }
	var markers [][]mark
	for k, ln := range lines {
		grid := graph.NewBrailleGrid(gw, gh, xs.min, xs.max, ys.min, ys.max)
		if ln.dots {
			r := []rune(ln.marker + "*")[0]
			for j := range ln.xs {
				if j >= len(ln.ys) || !physics.Finite(ln.xs[j]) || !physics.Finite(ln.ys[j]) ||
					ln.xs[j] < xs.min || ln.xs[j] > xs.max || ln.ys[j] < ys.min || ln.ys[j] > ys.max {
					continue
				}
				p := grid.GridPoint(canvas.Float64Point{X: ln.xs[j], Y: ln.ys[j]})
				put(p.X/2, p.Y/4, r, k)
			}
			markers = append(markers, nil)
			continue
		}
		havePrev := false
		var px, py float64
		for j := range ln.xs {
			if j >= len(ln.ys) || !physics.Finite(ln.xs[j]) || !physics.Finite(ln.ys[j]) {
				havePrev = false
				continue
			}
			x, y := ln.xs[j], ln.ys[j]
			if havePrev {
				if a, b, ok := clipSegment(px, py, x, y, xs, ys); ok {
					p0 := grid.GridPoint(canvas.Float64Point{X: a[0], Y: a[1]})
					p1 := grid.GridPoint(canvas.Float64Point{X: b[0], Y: b[1]})
					for _, q := range graph.GetLinePoints(p0, p1) {
						grid.Set(q)
					}
				}
			} else if x >= xs.min && x <= xs.max && y >= ys.min && y <= ys.max {
				grid.Set(grid.GridPoint(canvas.Float64Point{X: x, Y: y}))
			}
			px, py, havePrev = x, y, true
		}
		pat := grid.BraillePatterns()
		var ms []mark
		space := max(6, gw/7)
		for y := 0; y < len(pat) && y < gh; y++ {
			for x := 0; x < len(pat[y]) && x < gw; x++ {
				r := pat[y][x]
				if r == runes.BrailleBlockOffset {
					continue
				}
				if g.ascii {
					put(x, y, []rune(ln.marker)[0], k)
				} else {
					cur := lc.Canvas.Cell(canvas.Point{X: o.X + 1 + x, Y: y}).Rune
					if runes.IsBraillePattern(cur) {
						r = runes.CombineBraillePatterns(cur, r)
					}
					put(x, y, r, k)
				}
			}
		}
		// Marker positions: one cell every few columns, staggered per line.
		for x := (k * space / max(len(lines), 1)) % space; x < gw; x += space {
			for y := 0; y < len(pat) && y < gh; y++ {
				if x < len(pat[y]) && pat[y][x] != runes.BrailleBlockOffset {
					ms = append(ms, mark{x, y})
					break
				}
			}
		}
		markers = append(markers, ms)
	}
	if !g.ascii {
		taken := make([][]bool, gh)
		for y := range taken {
			taken[y] = make([]bool, gw)
		}
		for k := len(markers) - 1; k >= 0; k-- {
			ms := markers[k]
			if lines[k].pinned {
				continue
			}
			r := []rune(lines[k].marker)[0]
			for _, m := range ms {
				// Only where the line shows, and not crowding another marker.
				if owner[m.y][m.x] != int8(k) || (m.x > 0 && taken[m.y][m.x-1]) || (m.x+1 < gw && taken[m.y][m.x+1]) {
					continue
				}
				put(m.x, m.y, r, k)
				taken[m.y][m.x] = true
			}
		}
	}

	// The cursor: a faint line up its column where nothing is drawn, and
	// a mark on each line it meets.
	if physics.Finite(opt.cursorX) && opt.cursorX >= xs.min && opt.cursorX <= xs.max {
		grid := graph.NewBrailleGrid(gw, gh, xs.min, xs.max, ys.min, ys.max)
		cx := grid.GridPoint(canvas.Float64Point{X: opt.cursorX, Y: ys.min}).X / 2
		bar := '┊'
		if g.ascii {
			bar = ':'
		}
		for y := 0; y < gh; y++ {
			if owner[y][cx] == classEmpty {
				put(cx, y, bar, classCursor)
			}
		}
		mark := '◉'
		if g.ascii {
			mark = '&'
		}
		for _, p := range opt.cursorPts {
			if !physics.Finite(p.y) || p.y < ys.min || p.y > ys.max || p.line < 0 || p.line >= len(lines) {
				continue
			}
			q := grid.GridPoint(canvas.Float64Point{X: opt.cursorX, Y: p.y})
			put(q.X/2, q.Y/4, mark, p.line)
		}
	}

	// Paint the canvas in runs of one class.
	out := make([]string, h)
	var b strings.Builder
	for y := 0; y < h; y++ {
		b.Reset()
		run := strings.Builder{}
		runClass := classEmpty
		flush := func() {
			if run.Len() == 0 {
				return
			}
			s := run.String()
			switch {
			case runClass == classLabel:
				b.WriteString(st.muted.Paint(s))
			case runClass == classAxis, runClass == classCursor:
				b.WriteString(st.faint.Paint(s))
			case runClass >= 0 && runClass < len(lines):
				b.WriteString(lines[runClass].paint.Paint(s))
			default:
				b.WriteString(s)
			}
			run.Reset()
		}
		for x := 0; x < w; x++ {
			r := lc.Canvas.Cell(canvas.Point{X: x, Y: y}).Rune
			cls := classEmpty
			gx, gy := x-o.X-1, y
			switch {
			case inGraph(gx, gy):
				cls = int(owner[gy][gx])
			case (x == o.X && y <= o.Y) || (y == o.Y && x >= o.X):
				cls = classAxis
			case r != 0:
				cls = classLabel
			}
			if r == 0 {
				r = ' '
				if cls == classAxis {
					cls = classEmpty
				}
			}
			if g.ascii {
				r = asciiRune(r)
			}
			if cls != runClass {
				flush()
				runClass = cls
			}
			run.WriteRune(r)
		}
		flush()
		out[y] = b.String()
	}
	return out, plotGeom{col: o.X + 1, row: 0, w: gw, h: gh}
}

// clipSegment clips the segment (x0,y0)-(x1,y1) to the frame of the two
// scales (Liang and Barsky's parametric clipping); ok is false when no
// part of it lies inside.
func clipSegment(x0, y0, x1, y1 float64, xs, ys axisScale) (a, b [2]float64, ok bool) {
	t0, t1 := 0.0, 1.0
	dx, dy := x1-x0, y1-y0
	for _, e := range [][2]float64{{-dx, x0 - xs.min}, {dx, xs.max - x0}, {-dy, y0 - ys.min}, {dy, ys.max - y0}} {
		p, q := e[0], e[1]
		if p == 0 {
			if q < 0 {
				return a, b, false
			}
			continue
		}
		r := q / p
		if p < 0 {
			t0 = math.Max(t0, r)
		} else {
			t1 = math.Min(t1, r)
		}
		if t0 > t1 {
			return a, b, false
		}
	}
	return [2]float64{x0 + t0*dx, y0 + t0*dy}, [2]float64{x0 + t1*dx, y0 + t1*dy}, true
}

// asciiRune replaces the box-drawing runes of the axes.
func asciiRune(r rune) rune {
	switch r {
	case runes.LineVertical:
		return '|'
	case runes.LineHorizontal:
		return '-'
	case runes.LineUpRight, runes.LineHorizontalDown, runes.LineVerticalLeft, runes.LineHorizontalVertical:
		return '+'
	}
	if r > 127 {
		return '?'
	}
	return r
}

// tickIn returns the label of the tick in [lo, hi), or "".
func tickIn(a axisScale, lo, hi float64) string {
	for _, t := range a.ticks {
		if t >= lo && t < hi && t >= a.min-1e-12*math.Abs(a.max-a.min) && t <= a.max+1e-12*math.Abs(a.max-a.min) {
			return a.label(t)
		}
	}
	return ""
}

// niceStep returns a round step (1, 2 or 5 times a power of ten) near
// span/n.
func niceStep(span float64, n int) float64 {
	if !(span > 0) || n < 1 {
		return 1
	}
	raw := span / float64(n)
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw {
			return m * p
		}
	}
	return 10 * p
}

// linearScale builds a linear axis over [lo, hi] with about n ticks,
// widened to whole steps.
func linearScale(lo, hi float64, n int) axisScale {
	if !physics.Finite(lo) || !physics.Finite(hi) {
		lo, hi = 0, 1
	}
	if hi < lo {
		lo, hi = hi, lo
	}
	if hi == lo {
		d := math.Abs(lo) * 0.1
		if d == 0 {
			d = 1
		}
		lo, hi = lo-d, hi+d
	}
	// An end within a thousandth of the span of zero is zero (a reverse
	// current of nanoamperes under milliamperes): no empty step for it.
	if span := hi - lo; lo < 0 && -lo < 1e-3*span {
		lo = 0
	} else if hi > 0 && hi < 1e-3*span {
		hi = 0
	}
	step := niceStep(hi-lo, n)
	lo = math.Floor(lo/step+1e-9) * step
	hi = math.Ceil(hi/step-1e-9) * step
	a := axisScale{min: lo, max: hi}
	dec := max(0, -int(math.Floor(math.Log10(step)+1e-9)))
	for t := lo; t <= hi+step*1e-6; t += step {
		v := math.Round(t/step) * step
		a.ticks = append(a.ticks, v)
	}
	a.label = func(v float64) string {
		if math.Abs(v) < step*1e-9 {
			return "0"
		}
		return strconv.FormatFloat(v, 'f', dec, 64)
	}
	return a
}

// exactScale is a linear axis over exactly [lo, hi] (no widening), for a
// sweep axis whose ends the user chose.
func exactScale(lo, hi float64, n int) axisScale {
	a := linearScale(lo, hi, n)
	if physics.Finite(lo) && physics.Finite(hi) && hi > lo {
		a.min, a.max = lo, hi
	}
	return a
}

// decadeScale builds a logarithmic axis over whole decades lo..hi
// (exponents), labelling every k-th decade as 1e<n>.
func decadeScale(lo, hi, k int) axisScale {
	if hi <= lo {
		hi = lo + 1
	}
	k = max(k, 1)
	a := axisScale{min: float64(lo), max: float64(hi)}
	for d := lo; d <= hi; d++ {
		if (d-lo)%k == 0 {
			a.ticks = append(a.ticks, float64(d))
		}
	}
	a.label = func(v float64) string { return "1e" + strconv.Itoa(int(math.Round(v))) }
	return a
}
