// Package wafermap draws the wafer map of one batch column as lines of
// text: a die grid shaded by value, with a legend of the values and marks
// for outliers, failed fits, dies out of limits and dies not run. Render
// is a pure function of the batch rows (the classes and the shading are
// model/fit's, shared with the report's figure); the command line prints
// its lines and the workbench's batch screen shows them beside the table,
// each painting the classes its own way.
package wafermap

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"

	"junco/model"
	"junco/model/fit"
)

// Text is the class of labels and legend text, for painting.
const Text fit.DieClass = -1

// MaxRows bounds the grid rows drawn (the rest is cut with a note).
const MaxRows = 200

// Marks are the characters of the die classes, Unicode or ASCII.
func Marks(ascii bool) map[fit.DieClass]string {
	m := map[fit.DieClass]string{fit.DieGap: " "}
	for _, c := range []fit.DieClass{fit.DieOutlier, fit.DieFailed, fit.DieOutOfLimits, fit.DieNotRun, fit.DieUndetermined} {
		m[c] = fit.DieMark(c)
	}
	shades := []string{"░", "▒", "▓", "█"}
	if ascii {
		shades = []string{".", "-", "+", "#"}
	}
	for i, s := range shades {
		m[fit.DieClass(i)] = s
	}
	return m
}

// Options choose what Render draws.
type Options struct {
	Param  int         // the column (index of fit.BatchParams)
	Limits []fit.Limit // dies failing a limit on the column are marked out of limits
	// Wafer selects the wafer drawn (fit.WaferKey); dies of other
	// wafers are left out.
	Wafer string
	ASCII bool
	// Width is the room in columns (0: no limit); a grid wider is cut to
	// the columns around the cursor (or the first ones) with a note.
	Width int
	// Rows is the most grid rows drawn (0: up to MaxRows); a taller grid
	// shows the rows around the cursor (or the first ones) with a note.
	Rows int
	// Cursor is the index of the row whose die is framed [ ], -1 for none.
	Cursor int
	// Paint wraps text of a class in colour; nil paints nothing.
	Paint func(fit.DieClass, string) string
}

// Render draws the map of column o.Param for the wafer o.Wafer: a title,
// a line of x labels, one line per grid row y (y grows downward, x to the
// right, two columns per die: a separator and the die's mark) with the y
// label at the left, and the legend (the value range of each shade, then
// the marks). The cursor's die is framed [ ]. Rows without a known die
// are not drawn; the title counts them.
func Render(rows []fit.BatchRow, stats fit.BatchStats, o Options) []string {
	paint := o.Paint
	if paint == nil {
		paint = func(_ fit.DieClass, s string) string { return s }
	}
	p := fit.BatchParams()[o.Param]
	marks := Marks(o.ASCII)
	sc := fit.NewShadeScale(rows, stats, o.Param)
	outliers := fit.OutlierSet(stats[o.Param])
	g := fit.NewDieGrid(rows, o.Wafer)
	unknown := 0
	for _, r := range rows {
		if !r.Die.Known() {
			unknown++
		}
	}
	title := "wafer map of " + p.Symbol
	if o.Wafer != "" {
		title += ", wafer " + o.Wafer
	}
	title += fmt.Sprintf(": %d %s", g.N, plural(g.N, "die", "dies"))
	out := []string{paint(Text, title)}
	if unknown > 0 {
		// The count of files without a position goes on the title line
		// where it fits, else on a line of its own: never cut.
		more := fmt.Sprintf("%d %s without a position", unknown, plural(unknown, "file", "files"))
		if o.Width > 0 && utf8.RuneCountInString(title)+2+len(more) > o.Width {
			out = append(out, paint(Text, more))
		} else {
			out[0] = paint(Text, title+", "+more)
		}
	}
	if g.N == 0 {
		return append(out, paint(Text, "no die positions: name files like die_x03_y07.csv or r07c03.csv, or list them in "+fit.ManifestName))
	}
	if g.Dup > 0 {
		out = append(out, paint(Text, fmt.Sprintf("%d %s a die position with an earlier file: the first is shown", g.Dup, plural(g.Dup, "file shares", "files share"))))
	}
	ylab := max(len(strconv.Itoa(g.Y0)), len(strconv.Itoa(g.Y1)))
	ncols := g.X1 - g.X0 + 1
	first, shown := 0, ncols // the grid columns shown
	if o.Width > 0 {
		shown = min(ncols, max((o.Width-ylab-2)/2, 1))
	}
	cx, cy := math.MinInt, math.MinInt
	if o.Cursor >= 0 && o.Cursor < len(rows) && rows[o.Cursor].Die.Known() && fit.WaferKey(rows[o.Cursor].Die) == o.Wafer {
		cx, cy = rows[o.Cursor].Die.X, rows[o.Cursor].Die.Y
		if c := cx - g.X0; c >= shown {
			first = min(c-shown+1, ncols-shown)
		}
	}
	// x labels: every step-th x (step 1, 2, 5, 10, ... as wide labels
	// need), and the first column shown, where they fit.
	lw := max(len(strconv.Itoa(g.X0)), len(strconv.Itoa(g.X1)))
	step := 1
	for k := 0; 2*step < lw+1; k++ {
		step = []int{1, 2, 5}[k%3] * int(math.Pow10(k/3))
	}
	lab := []byte(strings.Repeat(" ", ylab+2+2*shown+lw))
	free := 0
	for i := 0; i < shown; i++ {
		x := g.X0 + first + i
		if x%step != 0 && i != 0 {
			continue
		}
		s := strconv.Itoa(x)
		at := ylab + 2 + 2*i
		if at < free || at+len(s) > len(lab) {
			continue
		}
		copy(lab[at:], s)
		free = at + len(s) + 1
	}
	copy(lab[max(ylab-1, 0):], "x")
	out = append(out, paint(Text, strings.TrimRight(string(lab), " ")))
	nrows, room := g.Y1-g.Y0+1, MaxRows
	if o.Rows > 0 {
		room = min(o.Rows, MaxRows)
	}
	y0, y1 := g.Y0, g.Y1
	if nrows > room {
		y1 = g.Y0 + room - 1
		if cy != math.MinInt && cy > y1 {
			y0, y1 = cy-room+1, cy
		}
	}
	for y := y0; y <= y1; y++ {
		var b strings.Builder
		b.WriteString(paint(Text, fmt.Sprintf("%*d", ylab, y)))
		b.WriteString(" ")
		for i := 0; i < shown; i++ {
			x := g.X0 + first + i
			sep := " "
			switch {
			case x == cx && y == cy:
				sep = "["
			case x-1 == cx && y == cy && i > 0:
				sep = "]"
			}
			b.WriteString(sep)
			cls := fit.DieGap
			if k, ok := g.At[[2]int{x, y}]; ok {
				cls = fit.ClassOfDie(rows, k, o.Param, sc, outliers, o.Limits)
			}
			b.WriteString(paint(cls, marks[cls]))
		}
		if x := g.X0 + first + shown - 1; x == cx && y == cy {
			b.WriteString("]")
		}
		out = append(out, strings.TrimRight(b.String(), " "))
	}
	if nrows > room {
		out = append(out, paint(Text, fmt.Sprintf("(y %d to %d of %d to %d shown)", y0, y1, g.Y0, g.Y1)))
	}
	if shown < ncols {
		out = append(out, paint(Text, fmt.Sprintf("(x %d to %d of %d to %d shown: widen the terminal)", g.X0+first, g.X0+first+shown-1, g.X0, g.X1)))
	}
	return append(out, legend(sc, p, o, marks, paint)...)
}

// MinWidth is the room in columns the map of o.Param and o.Wafer needs
// to show its whole grid (y labels, two columns a die, the cursor's
// frame) and the widest item of its legend without cutting them; the
// title and the legend's lines wrap or are cut beyond it.
func MinWidth(rows []fit.BatchRow, stats fit.BatchStats, o Options) int {
	g := fit.NewDieGrid(rows, o.Wafer)
	if g.N == 0 {
		return 0
	}
	ylab := max(len(strconv.Itoa(g.Y0)), len(strconv.Itoa(g.Y1)))
	w := ylab + 2 + 2*(g.X1-g.X0+1)
	p := fit.BatchParams()[o.Param]
	sc := fit.NewShadeScale(rows, stats, o.Param)
	for _, it := range legendItems(sc, p, o, Marks(o.ASCII), func(_ fit.DieClass, s string) string { return s }) {
		w = max(w, visibleWidth(it))
	}
	return w
}

// legend is the map's key: the value range of each shade (on a log scale
// for Is, Is2 and Rsh), then the marks, wrapped to o.Width.
func legend(sc fit.ShadeScale, p fit.BatchParam, o Options, marks map[fit.DieClass]string, paint func(fit.DieClass, string) string) []string {
	return flow(legendItems(sc, p, o, marks, paint), o.Width)
}

// legendItems are the items of the legend, each painted.
func legendItems(sc fit.ShadeScale, p fit.BatchParam, o Options, marks map[fit.DieClass]string, paint func(fit.DieClass, string) string) []string {
	f := func(v float64) string { return model.Format(p.Kind, v, 4, o.ASCII) }
	var items []string
	switch {
	case sc.OK && sc.Hi == sc.Lo:
		items = append(items, paint(fit.Shade2, marks[fit.Shade2])+" "+f(sc.Edge(0)))
	case sc.OK:
		for l := 0; l < fit.ShadeLevels; l++ {
			items = append(items, paint(fit.DieClass(l), marks[fit.DieClass(l)])+" "+f(sc.Edge(l))+" to "+f(sc.Edge(l+1)))
		}
	}
	for _, c := range []struct {
		cls  fit.DieClass
		what string
	}{{fit.DieOutlier, "outlier"}, {fit.DieFailed, "fit failed"}, {fit.DieOutOfLimits, "out of limits"}, {fit.DieNotRun, "not run"}, {fit.DieUndetermined, "not determined"}} {
		if c.cls == fit.DieOutOfLimits && !fit.HasLimitOn(o.Limits, o.Param) {
			continue
		}
		items = append(items, paint(c.cls, marks[c.cls])+" "+c.what)
	}
	scale := "linear"
	if sc.Log {
		scale = "log"
	}
	return append(items, paint(Text, "("+scale+" shading)"))
}

// flow joins items with two spaces, wrapping before width (0: one line).
func flow(items []string, width int) []string {
	var out []string
	line, lw := "", 0
	for _, it := range items {
		w := visibleWidth(it)
		if lw > 0 && width > 0 && lw+2+w > width {
			out = append(out, line)
			line, lw = "", 0
		}
		if lw > 0 {
			line += "  "
			lw += 2
		}
		line += it
		lw += w
	}
	if lw > 0 {
		out = append(out, line)
	}
	return out
}

// visibleWidth counts the runes of s outside ANSI escape sequences (every
// glyph here is one column wide).
func visibleWidth(s string) int {
	n, esc := 0, false
	for _, r := range s {
		switch {
		case esc:
			if r >= '@' && r <= '~' && r != '[' {
				esc = false
			}
		case r == 0x1b:
			esc = true
		default:
			n++
		}
	}
	return n
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
