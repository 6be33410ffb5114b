package report

import (
	"image/color"
	"math"
)

// Drawing a laid-out figure (buildPlot) and the frame the wafer map
// shares with it: axes with ticks and titles around a plot area, lines
// and points clipped to it, a legend in a column of its own.

// Sizes, in points.
const (
	cm         = 72 / 2.54
	plotWidth  = 16 * cm // the figure without its legend column
	plotHeight = 10 * cm
	titleSize  = 12.0
	labelSize  = 11.0 // axis titles
	tickSize   = 9.5  // tick labels
	legendSize = 10.0
	majorTick  = 5.0
	minorTick  = 2.5
	legendRow  = 14.0
	thumbWidth = 22.0
	pad        = 6.0
	// farOut bounds a mapped coordinate: a point far off the axes (an
	// ideal current of 1e8 A on a milliampere axis) is brought to this
	// distance, where it is still clipped, instead of written with forty
	// digits.
	farOut = 1e6
)

// Colours of the frame.
var (
	black    = color.RGBA{0, 0, 0, 255}
	white    = color.RGBA{255, 255, 255, 255}
	gridGrey = color.RGBA{0xD4, 0xD4, 0xD4, 255}
)

// chart is a figure laid out for drawing: its axes (display units), its
// lines and points, and its legend.
type chart struct {
	Title  string
	X, Y   axis
	grid   bool
	lines  []chartLine
	dots   []chartDots
	legend []legendEntry
}

// chartLine is one series drawn as a line, broken into segments where a
// value is not defined.
type chartLine struct {
	st   stroke
	segs [][][2]float64
}

// chartDots is one series drawn as open circles.
type chartDots struct {
	colour color.RGBA
	pts    [][2]float64
}

// legendEntry is a row of a legend: a line, a circle or a filled square
// (swatch) in the entry's colour, and its label.
type legendEntry struct {
	label  string
	st     stroke
	dot    bool
	swatch bool
}

// frame is a plot area on the canvas and the axes that map into it.
type frame struct {
	x0, y0, x1, y1 float64
	X, Y           axis
}

func (f frame) px(v float64) float64 {
	return clampFar(f.x0 + f.X.norm(v)*(f.x1-f.x0))
}

func (f frame) py(v float64) float64 {
	return clampFar(f.y1 - f.Y.norm(v)*(f.y1-f.y0))
}

func clampFar(v float64) float64 {
	if math.IsNaN(v) {
		return v
	}
	return math.Max(-farOut, math.Min(farOut, v))
}

// within reports whether a tick at fraction t of its axis lies on it.
func within(t float64) bool { return t >= -1e-9 && t <= 1+1e-9 }

// labelled returns the labelled ticks of a that lie on it.
func labelled(a axis) []tick {
	var out []tick
	for _, t := range a.ticks() {
		if t.Label != "" && within(a.norm(t.Value)) {
			out = append(out, t)
		}
	}
	return out
}

// frameIn places the plot area of axes X, Y in the w by h box at (x, y),
// leaving room for the title (when there is one), the tick labels and
// the axis titles, so that none of them is cut at the box's edge.
func frameIn(x, y, w, h float64, X, Y axis, title bool) frame {
	top := pad + tickSize/2
	if title {
		top = pad + titleSize + pad
	}
	yw := 0.0
	for _, t := range labelled(Y) {
		yw = math.Max(yw, textWidth(t.Label, tickSize))
	}
	left := pad + labelSize + pad + yw + 3 + majorTick
	bottom := majorTick + 3 + tickSize + pad + labelSize + pad
	right := pad
	xt := labelled(X)
	if n := len(xt); n > 0 {
		// The end labels are centred on their ticks: the last may stand
		// out right of the area, the first left of it.
		right = math.Max(right, textWidth(xt[n-1].Label, tickSize)/2+2)
		left = math.Max(left, textWidth(xt[0].Label, tickSize)/2+2)
	}
	return frame{x0: x + left, y0: y + top, x1: x + w - right, y1: y + h - bottom, X: X, Y: Y}
}

// drawAxes draws the grid (at the labelled ticks, when asked), the two
// axes with their ticks and labels, the axis titles and the title above.
func drawAxes(c *svgCanvas, f frame, title string, grid bool) {
	thin := stroke{colour: gridGrey, width: 0.5}
	axisLine := stroke{colour: black, width: 0.8}
	xt, yt := f.X.ticks(), f.Y.ticks()
	if grid {
		for _, t := range xt {
			if t.Label != "" && within(f.X.norm(t.Value)) {
				x := f.px(t.Value)
				c.line(x, f.y0, x, f.y1, thin)
			}
		}
		for _, t := range yt {
			if t.Label != "" && within(f.Y.norm(t.Value)) {
				y := f.py(t.Value)
				c.line(f.x0, y, f.x1, y, thin)
			}
		}
	}
	c.line(f.x0, f.y1, f.x1, f.y1, axisLine)
	c.line(f.x0, f.y0, f.x0, f.y1, axisLine)
	for _, t := range xt {
		if !within(f.X.norm(t.Value)) {
			continue
		}
		x, l := f.px(t.Value), minorTick
		if t.Label != "" {
			l = majorTick
			c.text(x, f.y1+majorTick+3+tickSize*0.8, t.Label, textStyle{size: tickSize, anchor: "middle"})
		}
		c.line(x, f.y1, x, f.y1+l, axisLine)
	}
	for _, t := range yt {
		if !within(f.Y.norm(t.Value)) {
			continue
		}
		y, l := f.py(t.Value), minorTick
		if t.Label != "" {
			l = majorTick
			c.text(f.x0-majorTick-3, y, t.Label, textStyle{size: tickSize, anchor: "end", middle: true})
		}
		c.line(f.x0-l, y, f.x0, y, axisLine)
	}
	c.text((f.x0+f.x1)/2, f.y1+majorTick+3+tickSize+pad+labelSize*0.8, f.X.Title, textStyle{size: labelSize, anchor: "middle"})
	yw := 0.0
	for _, t := range labelled(f.Y) {
		yw = math.Max(yw, textWidth(t.Label, tickSize))
	}
	c.text(f.x0-majorTick-3-yw-pad, (f.y0+f.y1)/2, f.Y.Title, textStyle{size: labelSize, anchor: "middle", rotate: true})
	if title != "" {
		c.text((f.x0+f.x1)/2, f.y0-pad-titleSize*0.25, title, textStyle{size: titleSize, anchor: "middle"})
	}
}

// legendWidth is the width of a legend column (0 without entries): the
// widest entry with its thumbnail and some room.
func legendWidth(entries []legendEntry, size float64) float64 {
	w := 0.0
	for _, e := range entries {
		w = math.Max(w, textWidth(e.label, size))
	}
	if w == 0 {
		return 0
	}
	return pad + thumbWidth + pad + w + 2*pad
}

// drawLegend draws the entries in a column from (x, y) down.
func drawLegend(c *svgCanvas, entries []legendEntry, x, y, size float64) {
	for i, e := range entries {
		ym := y + legendRow/2 + float64(i)*legendRow
		switch {
		case e.swatch:
			c.rect(x+thumbWidth-size*1.4, ym-size*0.6, size*1.4, size*1.2, e.st.colour)
		case e.dot:
			c.circle(x+thumbWidth/2, ym, 2, e.st, "")
		default:
			c.line(x, ym, x+thumbWidth, ym, e.st)
		}
		c.text(x+thumbWidth+pad, ym, e.label, textStyle{size: size, middle: true})
	}
}

// svg draws the chart: the plot (16 cm by 10 cm) and, when there is a
// legend, a column right of it holding the legend.
func (p *chart) svg() []byte {
	lw := legendWidth(p.legend, legendSize)
	c := newSVG(plotWidth+lw, plotHeight)
	f := frameIn(0, 0, plotWidth, plotHeight, p.X, p.Y, p.Title != "")
	drawAxes(c, f, p.Title, p.grid)
	clip := c.clipRect(f.x0, f.y0, f.x1-f.x0, f.y1-f.y0)
	for _, ln := range p.lines {
		for _, seg := range ln.segs {
			pts := make([][2]float64, len(seg))
			for i, v := range seg {
				pts[i] = [2]float64{f.px(v[0]), f.py(v[1])}
			}
			if len(pts) == 1 {
				// A point alone (a one-point curve, or one defined
				// value between gaps) is a dot of the line's width.
				c.dot(pts[0][0], pts[0][1], ln.st.width, ln.st.colour, clip)
				continue
			}
			c.polyline(pts, ln.st, clip)
		}
	}
	for _, d := range p.dots {
		st := stroke{colour: d.colour, width: 0.8}
		for _, v := range d.pts {
			c.circle(f.px(v[0]), f.py(v[1]), 1.5, st, clip)
		}
	}
	if lw > 0 {
		drawLegend(c, p.legend, plotWidth+pad, f.y0, legendSize)
	}
	return c.bytes()
}
