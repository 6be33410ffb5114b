package tui

import (
	"errors"
	"fmt"
	"math"
	"reflect"
	"strconv"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
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

	w, h int
}

func newChart(e env, s model.Spec) chartModel {
	c := chartModel{e: e, kinds: kindsFor(e.ascii, false), spec: s,
		iv:   model.DefaultIVRange(),
		cv:   model.Range{From: -5, To: 0.5, Step: 0.05},
		temp: model.Range{From: 250, To: 400, Step: 5},
		iF:   1e-3,
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
	switch {
	case keyIs(km, k.NextChart):
		c.idx = (c.idx + 1) % len(c.kinds)
		c.editErr = ""
		c.render()
		return c, c.request()
	case keyIs(km, k.PrevChart):
		c.idx = (c.idx + len(c.kinds) - 1) % len(c.kinds)
		c.editErr = ""
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

// sweepFields names the inputs of the current chart's sweep.
func (c chartModel) sweepFields() (labels []string, kinds []model.Kind, values []float64) {
	switch c.kind().sweep {
	case sweepIV:
		return []string{"from", "to", "step"}, []model.Kind{model.Voltage, model.Voltage, model.Voltage}, []float64{c.iv.From, c.iv.To, c.iv.Step}
	case sweepCV:
		return []string{"from", "to", "step"}, []model.Kind{model.Voltage, model.Voltage, model.Voltage}, []float64{c.cv.From, c.cv.To, c.cv.Step}
	case sweepTemp:
		return []string{"from", "to", "step", "VF at"}, []model.Kind{model.Temperature, model.Temperature, model.Temperature, model.Current},
			[]float64{c.temp.From, c.temp.To, c.temp.Step, c.iF}
	}
	return nil, nil, nil
}

func (c *chartModel) startEditing() {
	_, kinds, vals := c.sweepFields()
	if len(kinds) == 0 {
		c.editErr = "this chart is drawn at the bias set under Define, step 5 (Conditions)"
		return
	}
	c.editing, c.row, c.editErr = true, 0, ""
	c.eds = make([]lineEditor, len(kinds))
	for i := range kinds {
		c.eds[i] = newLineEditor(inputText(kinds[i], vals[i]))
	}
}

func (c chartModel) updateEditing(km tea.KeyMsg) (chartModel, tea.Cmd) {
	k := c.e.keys
	s := km.String()
	switch {
	case keyIs(km, k.Cancel):
		c.editing, c.editErr = false, ""
		return c, nil
	case keyIs(km, k.Apply):
		if err := c.applySweep(); err != nil {
			c.editErr = err.Error()
			return c, nil
		}
		c.editing, c.editErr = false, ""
		return c, c.request()
	case s == "tab" || s == "down":
		c.row = (c.row + 1) % len(c.eds)
		return c, nil
	case s == "shift+tab" || s == "up":
		c.row = (c.row + len(c.eds) - 1) % len(c.eds)
		return c, nil
	}
	if c.row >= 0 && c.row < len(c.eds) {
		c.eds[c.row].handle(km)
	}
	return c, nil
}

// applySweep parses and checks the sweep inputs and puts them in force.
func (c *chartModel) applySweep() error {
	labels, kinds, _ := c.sweepFields()
	// One sweep parser for the command line and the workbench; the step is
	// a difference (10 C is 10 K) and the points are counted before any
	// memory is taken.
	r, err := model.ParseSweepParts(kinds[0], c.eds[0].value(), c.eds[1].value(), c.eds[2].value(), maxChartPoints)
	if err != nil {
		return err
	}
	vals := []float64{r.From, r.To, r.Step}
	for i := 3; i < len(kinds); i++ {
		v, err := model.ParseValue(kinds[i], c.eds[i].value())
		if err != nil {
			return fmt.Errorf("sweep %s: %v", labels[i], err)
		}
		vals = append(vals, v)
	}
	if n, _ := r.Count(maxChartPoints); n < 2 {
		return errors.New("the sweep needs at least two points: widen it or choose a smaller step")
	}
	// The ends must be values the junction accepts.
	field := model.FieldBias
	if c.kind().sweep == sweepTemp {
		field = model.FieldTemperature
	}
	for i, v := range []float64{r.From, r.To} {
		s := c.spec
		if field == model.FieldBias {
			s.Bias = v
		} else {
			s.Temperature = v
		}
		if err := s.Validate(); err != nil {
			var ve *model.ValidationError
			if errors.As(err, &ve) {
				if fe, ok := ve.For(field); ok {
					return fmt.Errorf("sweep %s %s is not allowed: %s (%s)", labels[i], fe.Value, fe.Allowed, fe.Why)
				}
			}
		}
	}
	switch c.kind().sweep {
	case sweepIV:
		c.iv = r
	case sweepCV:
		c.cv = r
	case sweepTemp:
		if !(vals[3] > 0) {
			return fmt.Errorf("VF at %s: the forward current must be positive", model.Format(model.Current, vals[3], 3, c.e.ascii))
		}
		c.temp, c.iF = r, vals[3]
	}
	return nil
}

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
func (c chartModel) fixedRows(legendLines int) int { return 5 + legendLines + c.readoutRows() }

// render redraws the plot from the curves at hand for the current size,
// chart and drawing mode.
func (c *chartModel) render() {
	c.plot, c.legend, c.curveErr, c.topPad = nil, nil, "", 0
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
	c.title = cur.Title
	if len(extra) > 0 {
		c.title += " " + g.dot + " with the drift-diffusion solution"
	}

	// Scale the x axis into its display unit.
	xf, xUnit := axisFactor(cur.X, maxAbs(cur.Xs), c.e.ascii)
	conv := func(v []float64, f float64) []float64 {
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = x / f
		}
		return out
	}
	xs := conv(cur.Xs, xf)
	var pxs []float64
	if pinned != nil {
		pxs = conv(pinned.Xs, xf)
	}
	nxs := conv(exs, xf)

	// The y axis: linear in a display unit, or decades of |y|.
	logY := k.log || cur.Y.Log
	var all []float64
	for _, s := range cur.Series {
		all = append(all, s.Y...)
	}
	if pinned != nil {
		all = append(all, pinned.Series[0].Y...)
	}
	for _, s := range extra {
		for j, y := range s.Y {
			if j < len(exs) && finite(exs[j]) {
				all = append(all, y)
			}
		}
	}
	var ys axisScale
	var yConv func([]float64) []float64
	negative := false
	for _, v := range all {
		if v < 0 {
			negative = true
		}
	}
	legendW := c.w
	// Build legend first: its height fixes the plot height.
	var items []string
	for i, s := range cur.Series {
		l := s.Label
		if len(extra) > 0 {
			l += " (analytic)"
		}
		items = append(items, st.series[i%len(st.series)].Paint(g.markers[i%len(g.markers)])+" "+l)
	}
	for i, s := range extra {
		j := numericMarker(i, len(g.markers))
		items = append(items, st.series[j%len(st.series)].Paint(g.markers[j])+" "+s.Label)
	}
	if pinned != nil {
		items = append(items, st.pinSeries.Paint(g.pinMarker)+" pinned: "+pinned.Series[0].Label)
	}
	c.legend = flowItems(items, legendW, 3)
	ph := c.h - c.fixedRows(len(c.legend))
	if ph < 5 {
		c.curveErr = "the chart needs more room: enlarge the terminal"
		return
	}
	if logY {
		_, si := displayFactor(cur.Y)
		lo, hi, ok := decadeRange(all, si, capDecades(k.id))
		if !ok {
			c.curveErr = "nothing to draw on a logarithmic axis: every value is zero or missing"
			return
		}
		span := hi - lo
		gh := ph - 2
		if gh >= span && gh%span != 0 && gh%span <= gh/5 {
			trim := gh % span
			c.topPad = trim
			ph -= trim
			gh -= trim
		}
		step := max(1, int(math.Ceil(3*float64(span)/float64(max(gh, 1)))))
		ys = decadeScale(lo, hi, step)
		floor := math.Pow(10, float64(lo))
		yConv = func(v []float64) []float64 {
			out := make([]float64, len(v))
			for i, y := range v {
				switch {
				case math.IsNaN(y):
					out[i] = math.NaN()
				default:
					out[i] = math.Log10(math.Max(math.Abs(y)/si, floor))
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
		c.yTitle = axisTitle(cur.Y.Label, yUnit)
	}
	xlo, xhi := minMax(xs, 1)
	if pxs != nil {
		plo, phi := minMax(pxs, 1)
		xlo, xhi = math.Min(xlo, plo), math.Max(xhi, phi)
	}
	xsc := exactScale(xlo, xhi, max(2, c.w/12))
	c.xTitle = axisTitle(cur.X.Label, xUnit)

	var lines []plotLine
	if pinned != nil {
		lines = append(lines, plotLine{label: "pinned", xs: pxs, ys: yConv(pinned.Series[0].Y), paint: st.pinSeries, marker: g.pinMarker, pinned: true})
	}
	for i := len(extra) - 1; i >= 0; i-- {
		j := numericMarker(i, len(g.markers))
		lines = append(lines, plotLine{label: extra[i].Label, xs: nxs, ys: yConv(extra[i].Y),
			paint: st.series[j%len(st.series)], marker: g.markers[j]})
	}
	for i := len(cur.Series) - 1; i >= 0; i-- {
		s := cur.Series[i]
		lines = append(lines, plotLine{label: s.Label, xs: xs, ys: yConv(s.Y),
			paint: st.series[i%len(st.series)], marker: g.markers[i%len(g.markers)]})
	}
	c.plot = renderPlot(lines, xsc, ys, c.w, ph, c.e)
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
		if !finite(a) || a == 0 {
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
		if finite(x) {
			m = math.Max(m, math.Abs(x))
		}
	}
	return m
}

func minMax(v []float64, f float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		if finite(x) {
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
	if m > 0 && finite(m) {
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
	var out []string
	pos := fmt.Sprintf("%s %d/%d %s ", g.left, c.idx+1, len(c.kinds), g.right)
	busy := ""
	if c.pending() {
		busy = " " + g.dot + " computing" + g.ellipsis
	}
	if c.num.solving {
		busy = " " + g.dot + " solving" + g.ellipsis
	}
	out = append(out, st.accent.Paint(pos)+st.strong.Paint(cut(c.title, max(w-width(pos)-width(busy), 0), g.ellipsis))+st.faint.Paint(busy))
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
	out = append(out, c.readout(w)...)
	out = append(out, c.sweepLines(w)...)
	return block(out, w, h, g.ellipsis)
}

// sweepLines describes or edits the sweep of the chart (two lines).
func (c chartModel) sweepLines(w int) []string {
	st, g, ascii := c.e.st, c.e.g, c.e.ascii
	var l1, l2 string
	if c.editing {
		labels, _, _ := c.sweepFields()
		var parts []string
		for i, lb := range labels {
			box := c.eds[i].view(10, st.selected, " ")
			if i != c.row {
				box = padRight(c.eds[i].value(), 10, g.ellipsis)
			}
			parts = append(parts, lb+" ["+box+"]")
		}
		l1 = strings.Join(parts, " ")
		l2 = st.faint.Paint("tab next box " + g.dot + " enter apply " + g.dot + " esc cancel")
		if c.editErr != "" {
			l2 = st.err.Paint(g.bad + " " + c.editErr)
		}
		return []string{cut(l1, w, g.ellipsis), cut(l2, w, g.ellipsis)}
	}
	f := func(k model.Kind, v float64) string { return model.Format(k, v, 3, ascii) }
	switch c.kind().sweep {
	case sweepIV:
		l1 = fmt.Sprintf("sweep %s to %s in %s steps", f(model.Voltage, c.iv.From), f(model.Voltage, c.iv.To), f(model.Voltage, c.iv.Step))
	case sweepCV:
		l1 = fmt.Sprintf("sweep %s to %s in %s steps", f(model.Voltage, c.cv.From), f(model.Voltage, c.cv.To), f(model.Voltage, c.cv.Step))
	case sweepTemp:
		l1 = fmt.Sprintf("sweep %s to %s in %s steps, VF at %s", f(model.Temperature, c.temp.From), f(model.Temperature, c.temp.To), f(model.Temperature, c.temp.Step), f(model.Current, c.iF))
	default:
		l1 = "at the bias in force, " + f(model.Voltage, c.spec.Bias) + " (Define, step 5)"
	}
	if c.kind().sweep != sweepNone {
		l1 += "  " + g.dot + "  r: change"
	}
	if c.editErr != "" {
		l2 = st.err.Paint(g.bad + " " + c.editErr)
	}
	return []string{st.muted.Paint(cut(l1, w, g.ellipsis)), cut(l2, w, g.ellipsis)}
}
