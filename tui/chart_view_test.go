package tui

import (
	"math"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"junco/model"
	"junco/physics"
)

// chartAt opens the charts panel at w x h and steps to the chart id.
func chartAt(t *testing.T, w, h int, id string) Model {
	t.Helper()
	// Sized by a window message, as a program is.
	m := start(New(Options{Renderer: plainRenderer()}))
	tm, cmd := m.Update(tea.WindowSizeMsg{Width: w, Height: h})
	m = press(drain(tm.(Model), cmd), "tab", "tab")
	for i := 0; i < len(m.chart.kinds) && m.chart.kind().id != id; i++ {
		m = press(m, "l")
	}
	if m.chart.kind().id != id || m.chart.plot == nil {
		t.Fatalf("chart %q not drawn (at %q, error %q)", id, m.chart.kind().id, m.chart.curveErr)
	}
	return m
}

// series returns the values of a curve's series by label.
func seriesOf(t *testing.T, c model.Curve, label string) []float64 {
	t.Helper()
	for _, s := range c.Series {
		if s.Label == label {
			return s.Y
		}
	}
	t.Fatalf("curve %s has no series %q", c.ID, label)
	return nil
}

func maxOf(v []float64) float64 {
	m := math.Inf(-1)
	for _, x := range v {
		if physics.Finite(x) {
			m = math.Max(m, x)
		}
	}
	return m
}

// The linear I-V chart's y range follows the total current: its top lies
// between the largest total current and twice it, while the ideal
// Shockley current (which set the old scale) runs far above and is
// clipped. The expected values come from model.IVCurve, the same curve.
func TestChartIVRangeFollowsTotal(t *testing.T) {
	for _, size := range goldenSizes {
		m := chartAt(t, size[0], size[1], "iv")
		iv, err := model.IVCurve(m.chart.spec, m.chart.iv)
		if err != nil {
			t.Fatal(err)
		}
		total, ideal := maxOf(seriesOf(t, iv, "total")), maxOf(seriesOf(t, iv, "ideal (Shockley)"))
		top := m.chart.ax.fullY[1] * m.chart.ax.yf
		if !(top >= total && top <= 2*total) {
			t.Errorf("%dx%d: y axis top %g A, want between the largest total %g A and twice it", size[0], size[1], top, total)
		}
		if !(ideal > 10*top) {
			t.Errorf("%dx%d: the ideal current %g A should run off this demo's chart (top %g A); the test no longer tests the clipping", size[0], size[1], ideal, top)
		}
		if !strings.Contains(m.chart.yTitle, "scaled to the total") {
			t.Errorf("y title %q does not say what sets the scale", m.chart.yTitle)
		}
	}
}

// On the log I-V chart the top decade is the one above the largest total
// current, and the shunt current (zero without a shunt) is not drawn
// along the floor: its legend entry says it is zero and its marker
// appears nowhere in the plot.
func TestChartLogIVTopAndZeroComponent(t *testing.T) {
	m := chartAt(t, 120, 40, "iv-log")
	iv, _ := model.IVCurve(m.chart.spec, m.chart.iv)
	total := maxOf(seriesOf(t, iv, "total"))
	if want := math.Ceil(math.Log10(total) - 1e-9); m.chart.ax.fullY[1] != want {
		t.Errorf("top decade 1e%g, want 1e%g (largest total %g A)", m.chart.ax.fullY[1], want, total)
	}
	if !model.ZeroSeries(seriesOf(t, iv, "shunt")) {
		t.Skip("the demo junction has a shunt: nothing to check")
	}
	legend := ansi.Strip(strings.Join(m.chart.legend, "\n"))
	if !strings.Contains(legend, "shunt: zero") {
		t.Errorf("legend %q does not say the shunt current is zero", legend)
	}
	shunt := m.e.g.markers[6]
	for i, l := range m.chart.plot {
		if strings.Contains(ansi.Strip(l), shunt) {
			t.Errorf("plot row %d draws the zero shunt current's marker %q: %q", i, shunt, ansi.Strip(l))
		}
	}
}

// The C-V chart is scaled to the total capacitance where the depletion
// part dominates (from the same model.CVCurve); the forward-bias
// diffusion capacitance, which once flattened it, runs off the top.
func TestChartCVRangeFollowsTotal(t *testing.T) {
	m := chartAt(t, 120, 40, "cv")
	cv, _, err := model.CVCurve(m.chart.spec, m.chart.cv)
	if err != nil {
		t.Fatal(err)
	}
	d := cv.DepletionDominated()
	if d == nil {
		t.Fatal("the default C-V sweep has no forward part where diffusion dominates: the test tests nothing")
	}
	want := maxOf(d)
	top := m.chart.ax.fullY[1] * m.chart.ax.yf
	if !(top >= want && top <= 2*want) {
		t.Errorf("y axis top %g F, want between the largest depletion-dominated total %g F and twice it", top, want)
	}
	if total := maxOf(seriesOf(t, cv, "total")); !(total > top) {
		t.Errorf("the largest total %g F fits under the top %g F: nothing is clipped", total, top)
	}
	if !strings.Contains(m.chart.yTitle, "scaled to the total (depletion range)") {
		t.Errorf("y title %q does not say what sets the scale", m.chart.yTitle)
	}
}

// The cursor keys walk the points and the readout follows in trade units
// (model.Format); the zoom keys halve and restore the view's range; the
// pan keys move it.
func TestChartCursorReadoutAndZoom(t *testing.T) {
	m := chartAt(t, 120, 40, "iv")
	if m.chart.view.cursor != -1 {
		t.Fatalf("cursor on before any key: %d", m.chart.view.cursor)
	}
	m = press(m, "c")
	i := m.chart.view.cursor
	if i < 0 {
		t.Fatal("c did not put the cursor on")
	}
	xs := m.chart.shown.Xs
	read := func(m Model) string { return ansi.Strip(strings.Join(m.chart.cursorLines(200), " ")) }
	if want := model.Format(model.Voltage, xs[i], 4, false); !strings.Contains(read(m), "V "+want) {
		t.Errorf("readout %q lacks the cursor's bias %q", read(m), want)
	}
	total := seriesOf(t, m.chart.shown, "total")
	if want := model.Format(model.Current, total[i], 4, false); !strings.Contains(read(m), "total "+want) {
		t.Errorf("readout %q lacks the total current %q", read(m), want)
	}
	m = press(m, ".", ".", ",")
	if m.chart.view.cursor != i+1 {
		t.Errorf("after . . , the cursor is on point %d, want %d", m.chart.view.cursor, i+1)
	}
	if want := model.Format(model.Voltage, xs[i+1], 4, false); !strings.Contains(read(m), "V "+want) {
		t.Errorf("readout %q does not follow the cursor to %q", read(m), want)
	}
	full := m.chart.ax.viewX[1] - m.chart.ax.viewX[0]
	fullY := m.chart.ax.viewY[1] - m.chart.ax.viewY[0]
	m = press(m, "+")
	if got := m.chart.ax.viewX[1] - m.chart.ax.viewX[0]; math.Abs(got-full/2) > 1e-9*full {
		t.Errorf("zoom in: x view %g wide, want %g", got, full/2)
	}
	if got := m.chart.ax.viewY[1] - m.chart.ax.viewY[0]; math.Abs(got-fullY/2) > 1e-9*fullY {
		t.Errorf("zoom in: y view %g high, want %g", got, fullY/2)
	}
	if p := m.chart.ax.pxs[m.chart.view.cursor]; p < m.chart.ax.viewX[0] || p > m.chart.ax.viewX[1] {
		t.Errorf("the zoom lost the cursor: %g outside %v", p, m.chart.ax.viewX)
	}
	before := m.chart.ax.viewX
	m = press(m, "H")
	if !(m.chart.ax.viewX[0] < before[0]) {
		t.Errorf("pan left: view %v, was %v", m.chart.ax.viewX, before)
	}
	m = press(m, "z")
	if got := m.chart.ax.viewX[1] - m.chart.ax.viewX[0]; math.Abs(got-full/4) > 1e-9*full {
		t.Errorf("x-only zoom: x view %g wide, want %g", got, full/4)
	}
	m = press(m, "0")
	if m.chart.ax.viewX != m.chart.ax.fullX || m.chart.ax.viewY != m.chart.ax.fullY {
		t.Errorf("0: view %v %v, want the whole chart %v %v", m.chart.ax.viewX, m.chart.ax.viewY, m.chart.ax.fullX, m.chart.ax.fullY)
	}
	// Zoomed tick labels stay inside the frame and read values of the view.
	m = press(m, "+", "+", "+")
	if m.chart.plot == nil {
		t.Fatal("no plot after zooming")
	}
}

// A log x axis is refused, with the reason, where x crosses zero, and
// offered where the x values are of one sign over more than a decade.
func TestChartLogX(t *testing.T) {
	m := chartAt(t, 120, 40, "iv")
	m = press(m, "x")
	if m.chart.view.logX || !strings.Contains(m.chart.editErr, "cross zero") {
		t.Errorf("log x on a sweep through zero: on=%v, message %q", m.chart.view.logX, m.chart.editErr)
	}
	m.chart.iv = model.Range{From: 0.01, To: 0.8, Step: 0.01}
	m = drain(m, m.chart.request())
	m = press(m, "x")
	if !m.chart.view.logX || m.chart.ax.xm.kind != mapLog {
		t.Fatalf("log x refused on a sweep 10 mV to 800 mV: %q", m.chart.editErr)
	}
	if !strings.Contains(m.chart.xTitle, "log scale") {
		t.Errorf("x title %q does not say log scale", m.chart.xTitle)
	}
	// 10 mV to 800 mV: the decades 1e1 to 1e3 of the display unit mV.
	if got, want := m.chart.ax.fullX, [2]float64{1, 3}; got != want || !strings.Contains(m.chart.xTitle, "(mV)") {
		t.Errorf("log x range %v in %q, want %v decades of mV", got, m.chart.xTitle, want)
	}
}

// The mouse: the wheel zooms about the pointer, a click puts the cursor on
// the nearest point.
func TestChartMouse(t *testing.T) {
	m := chartAt(t, 120, 40, "iv")
	col, row, ok := m.chartOrigin()
	g := m.chart.ax.geom
	if !ok || g.w < 1 {
		t.Fatalf("no chart geometry: %v %+v", ok, g)
	}
	x, y := col+g.col+g.w/2, row+g.row+g.h/2
	tm, _ := m.Update(tea.MouseMsg{X: x, Y: y, Action: tea.MouseActionPress, Button: tea.MouseButtonWheelUp})
	m = tm.(Model)
	if !m.chart.view.zoomed() {
		t.Fatal("the wheel did not zoom")
	}
	tm, _ = m.Update(tea.MouseMsg{X: x, Y: y, Action: tea.MouseActionPress, Button: tea.MouseButtonLeft})
	m = tm.(Model)
	if m.chart.view.cursor < 0 {
		t.Fatal("a click did not put the cursor on")
	}
	// The clicked column is the middle of the view: the cursor's x is
	// within a column of it.
	p := m.chart.ax.pxs[m.chart.view.cursor]
	mid := (m.chart.ax.viewX[0] + m.chart.ax.viewX[1]) / 2
	if colW := (m.chart.ax.viewX[1] - m.chart.ax.viewX[0]) / float64(g.w); math.Abs(p-mid) > 1.5*colW {
		t.Errorf("click at the middle put the cursor at %g, middle %g", p, mid)
	}
}

// Spatial charts give each side of the junction its own scale when one is
// more than 100 times thinner: both sides' tick labels show.
func TestChartSplitSides(t *testing.T) {
	m := chartAt(t, 120, 40, "field")
	c := m.chart.shown
	lo, hi := minMax(c.Xs, 1)
	if math.Max(-lo, hi) < splitRatio*math.Min(-lo, hi) {
		t.Skipf("the demo junction's sides (%g, %g um) are not 100x apart", lo, hi)
	}
	if m.chart.ax.xm.kind != mapSplit {
		t.Fatalf("sides %g and %g um drawn on one linear scale", lo, hi)
	}
	labels := ansi.Strip(m.chart.plot[len(m.chart.plot)-1])
	f := strings.Fields(labels)
	neg, pos := 0, 0
	for _, w := range f {
		if strings.HasPrefix(w, "-") {
			neg++
		} else if w != "0" {
			pos++
		}
	}
	if neg == 0 || pos == 0 {
		t.Errorf("x labels %q lack one side (negative %d, positive %d)", labels, neg, pos)
	}
}

// clipSegment cuts a segment at the frame (checked against the segment's
// own line: the clipped ends lie on the frame and on the line).
func TestClipSegment(t *testing.T) {
	xs, ys := axisScale{min: 0, max: 1}, axisScale{min: 0, max: 1}
	a, b, ok := clipSegment(-1, 0, 3, 2, xs, ys)
	if !ok {
		t.Fatal("a segment through the frame was dropped")
	}
	// The line y = (x+1)/2 enters the frame at (0, 0.5) and leaves it at
	// (1, 1).
	on := func(p [2]float64) bool { return math.Abs(p[1]-(p[0]+1)/2) < 1e-12 }
	if !on(a) || !on(b) || a != [2]float64{0, 0.5} || math.Abs(b[0]-1) > 1e-12 || math.Abs(b[1]-1) > 1e-12 {
		t.Errorf("clipped to %v-%v", a, b)
	}
	if _, _, ok := clipSegment(2, 2, 3, 3, xs, ys); ok {
		t.Error("a segment outside the frame was kept")
	}
}
