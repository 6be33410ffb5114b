package tui

import (
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/physics"
)

// Which sweep a chart follows.
const (
	sweepNone = iota // drawn at the bias of the junction
	sweepIV
	sweepCV
	sweepTemp
)

// maxChartPoints bounds the sweeps the workbench draws, to keep every
// keystroke quick.
const maxChartPoints = model.MaxChartPoints

// chartKind is one chart of the charts panel.
type chartKind struct {
	id    string
	name  string
	sweep int
	log   bool // plot log10 |y|
}

func chartKinds(ascii bool) []chartKind {
	invC2 := "1/C² against V"
	if ascii {
		invC2 = "1/C^2 against V"
	}
	return []chartKind{
		{"iv", "I-V, linear", sweepIV, false},
		{"iv-log", "I-V, log |I|", sweepIV, true},
		{"cv", "C-V", sweepCV, false},
		{"inv-c2", invC2, sweepCV, false},
		{"ideality", "ideality n(V)", sweepIV, false},
		{"charge", "space charge", sweepNone, false},
		{"field", "electric field", sweepNone, false},
		{"potential", "potential", sweepNone, false},
		{"bands", "band edges", sweepNone, false},
		{"minority", "excess minority carriers", sweepNone, true},
		{"diffusion-current", "minority diffusion current", sweepNone, false},
		{"is-t", "Is against 1000/T", sweepTemp, true},
		{"vf-t", "VF against T", sweepTemp, false},
		{"power", "power delivered (light)", sweepIV, false},
	}
}

// chartModel is the charts panel: the chart picker, the plot with its
// legend and axis titles, and the sweep of the chart.
type chartModel struct {
	e     env
	kinds []chartKind
	idx   int

	iv, cv, temp model.Range
	iF           float64 // forward current of the VF-T sweep, A

	spec model.Spec
	pin  *model.Spec

	editing bool
	row     int
	eds     []lineEditor
	editErr string

	// sync computes curves in Update instead of in a command (tests).
	sync bool
	// seq numbers the curve requests; have is the one whose data is
	// shown. A late answer to an older request is dropped.
	seq, have int
	lastReq   *chartRequest
	data      *chartData
	// num is the drift-diffusion side (solver mode).
	num solverState

	// Cached drawing, rebuilt by render in Update, never in View.
	title          string
	legend         []string
	yTitle, xTitle string
	plot           []string
	curveErr       string
	topPad         int
	// readRows is the rows of the cursor readout: up to 4 where every
	// series' value does not fit on one line of the panel.
	readRows int

	// view is the part of the chart shown, with the cursor; ax the scales
	// of the last render; shown the curve drawn; drag the last cell of a
	// mouse drag.
	view  chartView
	ax    drawnAxes
	shown model.Curve
	drag  *[2]int

	w, h int
}

func newChart(e env, s model.Spec) chartModel {
	c := chartModel{e: e, kinds: kindsFor(e.ascii, false), spec: s,
		iv:   model.DefaultIVRange(),
		cv:   model.Range{From: -5, To: 0.5, Step: 0.05},
		temp: model.Range{From: 250, To: 400, Step: 5},
		iF:   1e-3,
		view: fullView(),
	}
	return c
}

// SetSize sets the panel size, redraws from the curves at hand and asks
// for new ones when the resolution changes.
func (c *chartModel) SetSize(w, h int) tea.Cmd {
	w, h = max(w, 0), max(h, 0)
	if w == c.w && h == c.h {
		return nil
	}
	c.w, c.h = w, h
	c.render()
	return c.request()
}

func (c *chartModel) setEnv(e env) {
	c.e = e
	c.kinds = kindsFor(e.ascii, c.num.on)
	c.render()
}

// setSpec sets the junction and the pinned one and asks for their curves.
func (c *chartModel) setSpec(s model.Spec, pin *model.Spec) tea.Cmd {
	c.spec, c.pin = s, pin
	return c.request()
}

// chartRequest is everything a chart's curves are computed from.
type chartRequest struct {
	kind         chartKind
	spec         model.Spec
	pin          *model.Spec
	iv, cv, temp model.Range
	iF           float64
	points       int
}

// chartData is a computed chart: its curve and the pinned one.
type chartData struct {
	req    chartRequest
	cur    model.Curve
	err    error
	pinned *model.Curve
}

// chartDataMsg delivers the curves of request seq.
type chartDataMsg struct {
	seq  int
	data chartData
}

func (c chartModel) makeRequest() chartRequest {
	return chartRequest{kind: c.kind(), spec: c.spec, pin: c.pin, iv: c.iv, cv: c.cv, temp: c.temp, iF: c.iF,
		points: min(max(2*c.w, 60), 400)}
}

// request asks for the curves of the present state: a command that
// computes them off the event loop (or, with sync, at once). Nothing is
// asked while the panel is too small or when the same request is out.
func (c *chartModel) request() tea.Cmd {
	if c.w < 16 || c.h < 8 {
		return nil
	}
	req := c.makeRequest()
	if c.lastReq != nil && reflect.DeepEqual(req, *c.lastReq) {
		return nil
	}
	c.lastReq = &req
	c.seq++
	seq := c.seq
	if c.sync {
		d := computeChart(req)
		c.data, c.have = &d, seq
		c.render()
		return nil
	}
	return func() tea.Msg { return chartDataMsg{seq: seq, data: computeChart(req)} }
}

// computeChart computes a chart's curves; it only reads its argument, so it
// may run on any goroutine.
func computeChart(r chartRequest) chartData {
	d := chartData{req: r}
	d.cur, d.err = chartCurve(r, r.spec)
	if d.err == nil && r.pin != nil {
		if pc, err := chartCurve(r, *r.pin); err == nil && len(pc.Series) > 0 {
			d.pinned = &pc
		}
	}
	return d
}

func (c chartModel) kind() chartKind { return c.kinds[min(max(c.idx, 0), len(c.kinds)-1)] }

// Update handles keys for the focused charts panel.
func (c chartModel) Update(msg tea.Msg) (chartModel, tea.Cmd) {
	km, ok := msg.(tea.KeyMsg)
	if !ok {
		return c, nil
	}
	k := c.e.keys
	if c.editing {
		return c.updateEditing(km)
	}
	if c.viewKey(km) {
		return c, nil
	}
	switch {
	case keyIs(km, k.NextChart):
		c.idx = (c.idx + 1) % len(c.kinds)
		c.editErr, c.view = "", fullView()
		c.render()
		return c, c.request()
	case keyIs(km, k.PrevChart):
		c.idx = (c.idx + len(c.kinds) - 1) % len(c.kinds)
		c.editErr, c.view = "", fullView()
		c.render()
		return c, c.request()
	case keyIs(km, k.Sweep):
		c.startEditing()
	}
	return c, nil
}

// apply takes computed curves if they answer the latest request.
func (c *chartModel) apply(msg chartDataMsg) {
	if msg.seq != c.seq {
		return
	}
	d := msg.data
	c.data, c.have = &d, msg.seq
	c.render()
}

// pending reports whether newer curves are being computed.
func (c chartModel) pending() bool { return c.have != c.seq }

// chartCurve computes the requested chart's curve for a spec.
func chartCurve(c chartRequest, s model.Spec) (model.Curve, error) {
	k, points := c.kind, c.points
	switch k.id {
	case "iv", "iv-log":
		return model.IVCurve(s, c.iv)
	case "cv", "inv-c2":
		cv, inv, err := model.CVCurve(s, c.cv)
		if k.id == "cv" {
			return cv, err
		}
		return inv, err
	case "ideality":
		return model.IdealityCurve(s, c.iv)
	case "power":
		return model.PowerCurve(s, c.iv)
	case "charge", "field", "potential", "bands":
		ch, f, p, b, err := model.JunctionProfiles(s, points)
		switch k.id {
		case "charge":
			return ch, err
		case "field":
			return f, err
		case "potential":
			return p, err
		}
		return b, err
	case "minority", "diffusion-current":
		d, j, err := model.MinorityProfiles(s, points/2)
		if k.id == "minority" {
			return d, err
		}
		return j, err
	case "is-t", "vf-t":
		is, vf, err := model.TemperatureCurves(s, c.temp, c.iF)
		if k.id == "is-t" {
			return is, err
		}
		return vf, err
	case "carriers":
		return model.Curve{ID: k.id}, nil // drawn from the solution
	}
	return model.Curve{}, fmt.Errorf("unknown chart %q", k.id)
}

// fixedRows is the number of panel rows around the plot.
// (title, y title, x title, cursor readout, two sweep lines; a title and
// a readout that do not fit on one line take two).
func (c chartModel) fixedRows(legendLines int) int {
	return 6 + legendLines + c.readoutRows() + len(c.titleLines(c.w, "")) - 1 + max(c.readRows, 1) - 1
}

// titleLines is the chart's position and title, wrapped under the title
// onto a second line when it does not fit in w (the rest cut there), with
// busy after it.
func (c chartModel) titleLines(w int, busy string) []string {
	st, g := c.e.st, c.e.g
	pos := fmt.Sprintf("%s %d/%d %s ", g.left, c.idx+1, len(c.kinds), g.right)
	tw := max(w-width(pos), 1)
	parts := wrapText(c.title+busy, tw)
	if len(parts) > 2 {
		parts = []string{parts[0], cut(strings.Join(parts[1:], " "), tw, g.ellipsis)}
	}
	out := []string{st.accent.Paint(pos) + st.strong.Paint(parts[0])}
	if len(parts) > 1 {
		out = append(out, strings.Repeat(" ", width(pos))+st.strong.Paint(parts[1]))
	}
	return out
}

// capDecades bounds the decades a log chart spans.
func capDecades(id string) int {
	return 16
}

// decadeRange returns the whole decades (exponents, in the unit of si)
// that hold the magnitudes of vs, at most maxSpan of them counted down
// from the largest.
func decadeRange(vs []float64, si float64, maxSpan int) (lo, hi int, ok bool) {
	big, small := 0.0, math.Inf(1)
	for _, v := range vs {
		a := math.Abs(v) / si
		if !physics.Finite(a) || a == 0 {
			continue
		}
		big = math.Max(big, a)
		small = math.Min(small, a)
	}
	if big == 0 {
		return 0, 0, false
	}
	hi = int(math.Ceil(math.Log10(big) - 1e-9))
	lo = int(math.Floor(math.Log10(small) + 1e-9))
	if hi-lo > maxSpan {
		lo = hi - maxSpan
	}
	if hi <= lo {
		lo = hi - 1
	}
	return lo, hi, true
}

func maxAbs(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		if physics.Finite(x) {
			m = math.Max(m, math.Abs(x))
		}
	}
	return m
}

func minMax(v []float64, f float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		if physics.Finite(x) {
			lo, hi = math.Min(lo, x/f), math.Max(hi, x/f)
		}
	}
	if lo > hi {
		return 0, 1
	}
	return lo, hi
}

// displayFactor returns the unit an axis's values are shown in and the
// SI value of one such unit (1 when the axis already names its unit).
func displayFactor(a model.Axis) (string, float64) {
	if a.Unit == "um" {
		return "um", 1
	}
	if a.Unit != "" {
		return a.Unit, 1
	}
	return model.TradeUnit(a.Kind)
}

func displayUnit(a model.Axis, ascii bool) string {
	u, _ := displayFactor(a)
	if u == "um" && !ascii {
		u = "µm"
	}
	if u == "" {
		u = "1"
	}
	return u
}

// prefixable units take an SI prefix on a chart axis.
func prefixable(u string) bool {
	switch u {
	case "A", "V", "F", "s", "W", "ohm", "m", "V/cm", "A/cm^2":
		return true
	}
	return false
}

// axisFactor returns the divisor that brings SI values of an axis into
// a readable display unit and that unit: an SI prefix where the unit takes
// one, else a power of ten in front of it.
func axisFactor(a model.Axis, maxAbsSI float64, ascii bool) (float64, string) {
	unit, si := displayFactor(a)
	base, baseSI := unit, 1.0
	if unit == "um" {
		// Positions come in um; they read best with the prefix that fits.
		base, baseSI = "m", 1e-6
	}
	m := maxAbsSI / si * baseSI
	e := 0
	if m > 0 && physics.Finite(m) {
		e = int(math.Floor(math.Log10(m)/3)) * 3
	}
	if prefixable(base) && e >= -15 && e <= 9 {
		p := map[int]string{-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G"}[e]
		if p == "µ" && ascii {
			p = "u"
		}
		return si / baseSI * math.Pow(10, float64(e)), p + base
	}
	// Other units keep their own scale unless the numbers get unwieldy.
	if m == 0 || (m >= 1e-2 && m < 1e4) {
		return si, displayUnit(a, ascii)
	}
	times := "×10^"
	if ascii {
		times = "x10^"
	}
	return si * math.Pow(10, float64(e)), times + strconv.Itoa(e) + " " + displayUnit(a, ascii)
}

// axisTitle joins an axis label and its unit.
func axisTitle(label, unit string) string {
	if unit == "" || unit == "1" {
		return label
	}
	return label + " (" + unit + ")"
}

// flowItems lays legend items out in lines of at most w cells, at most
// maxLines lines.
func flowItems(items []string, w, maxLines int) []string {
	var out []string
	line := ""
	for _, it := range items {
		switch {
		case line == "":
			line = it
		case width(line)+3+width(it) <= w:
			line += "   " + it
		default:
			out = append(out, line)
			line = it
		}
	}
	if line != "" {
		out = append(out, line)
	}
	if len(out) > maxLines {
		out = out[:maxLines]
	}
	for i := range out {
		out[i] = cut(out[i], w, "")
	}
	return out
}

// View draws the panel from the cached plot.
func (c chartModel) View() string { return strings.Join(c.lines(), "\n") }

func (c chartModel) lines() []string {
	st, g := c.e.st, c.e.g
	w, h := c.w, c.h
	if w < 1 || h < 1 {
		return nil
	}
	busy := ""
	if c.pending() {
		busy = " " + g.dot + " computing" + g.ellipsis
	}
	if c.num.solving {
		busy = " " + g.dot + " solving" + g.ellipsis
	}
	out := c.titleLines(w, busy)
	if n := len(c.titleLines(w, "")); len(out) > n {
		out = c.titleLines(w, "") // the rows were counted without it
	}
	if c.curveErr != "" || c.plot == nil {
		msg := c.curveErr
		switch {
		case msg != "":
		case c.w < 16 || c.h < 8:
			msg = "the chart needs more room: enlarge the terminal"
		case c.pending() || c.waiting():
			msg = ""
		default:
			msg = "the chart needs more room: enlarge the terminal"
		}
		if msg == "" {
			out = append(out, "", st.muted.Paint("computing the curves"+g.ellipsis), "")
			out = append(out, c.readout(w)...)
			out = append(out, c.sweepLines(w)...)
			return block(out, w, h, g.ellipsis)
		}
		out = append(out, "")
		for _, l := range wrapText(g.bad+" "+msg, w) {
			out = append(out, st.err.Paint(l))
		}
		out = append(out, "")
		out = append(out, c.readout(w)...)
		out = append(out, c.sweepLines(w)...)
		return block(out, w, h, g.ellipsis)
	}
	out = append(out, c.legend...)
	out = append(out, st.muted.Paint(cut(c.yTitle, w, g.ellipsis)))
	for i := 0; i < c.topPad; i++ {
		out = append(out, "")
	}
	out = append(out, c.plot...)
	out = append(out, st.muted.Paint(padLeft(cut(c.xTitle, w, g.ellipsis), w)))
	out = append(out, c.cursorLines(w)...)
	out = append(out, c.readout(w)...)
	out = append(out, c.sweepLines(w)...)
	return block(out, w, h, g.ellipsis)
}
