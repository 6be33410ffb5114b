package tui

import (
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/sessions"
)

// maxPathRunes bounds the path typed on the import screen.
const maxPathRunes = 1024

// importState is the import screen: a path, and the preview of the data
// set read from it (nothing is added before it is accepted).
type importState struct {
	ed  lineEditor
	ds  *measure.DataSet
	err string
	// choices are the names the last tab completion found (more: how
	// many more were left out).
	choices []string
	more    int
	// temp is the temperature field of the preview (t), typing while
	// editing; tErr says why a typed value was refused.
	temp    lineEditor
	editing bool
	tErr    string
}

// fitState is the fit screen: the I-V data set fitted, the window fields
// and the fit with its chart, drawn for the size in w x h.
type fitState struct {
	idx    int // index into the session's measurements
	eds    [2]lineEditor
	row    int
	win    fit.Window
	winErr string
	view   *fit.IVView
	lit    *fit.LitView // a lit data set's fit (measure_lit.go)
	err    string
	pred   *model.Curve
	pErr   string
	// linear draws |I| on a linear axis instead of a log one.
	linear bool

	w, h   int
	legend []string
	yTitle string
	plot   []string
}

// openImport shows the import screen (refused in review mode).
func (m *Model) openImport() {
	if m.sess.readOnly {
		m.note = "read-only review: measurements cannot be added; ctrl+s copies the session to your sessions"
		return
	}
	// The folder of the last path is offered again; what is typed goes
	// after it (ctrl+u clears it).
	dir := ""
	if last := m.imp.ed.value(); strings.Contains(last, "/") {
		dir = last[:strings.LastIndex(last, "/")+1]
	}
	m.imp = importState{ed: newLineEditorN(dir, maxPathRunes)}
	m.screen = screenImport
}

func (m Model) importKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	if keyIs(km, k.Dismiss) {
		m.screen, m.imp.ds, m.imp.err = screenMain, nil, ""
		m.note = "import cancelled: nothing was added"
		return m, nil
	}
	if m.imp.ds != nil && m.imp.editing {
		m.importTemperatureKey(km)
		return m, nil
	}
	if m.imp.ds != nil {
		switch {
		case km.String() == "t":
			m.startImportTemperature()
			return m, nil
		case keyIs(km, k.AddData):
			m.acceptImport()
			return m, nil
		case keyIs(km, k.AddFit):
			i := m.acceptImport()
			m.openFit(i)
			return m, nil
		case keyIs(km, k.EditPath):
			m.imp.ds = nil
		}
		return m, nil
	}
	if keyIs(km, k.Submit) {
		path := strings.TrimSpace(m.imp.ed.value())
		ds, err := fit.Import(m.sess.files, path, "", m.sess.now)
		m.imp.ds, m.imp.err = nil, ""
		if err != nil {
			m.imp.err = err.Error()
			return m, nil
		}
		m.imp.ds = ds
		return m, nil
	}
	if km.Type == tea.KeyTab {
		out, choices, more, err := completePath(m.sess.files, m.imp.ed.value())
		m.imp.choices, m.imp.more, m.imp.err = choices, more, ""
		if err != nil {
			m.imp.err = "no completion: " + err.Error()
		}
		m.imp.ed.set(out)
		return m, nil
	}
	if _, changed := m.imp.ed.handle(km); changed {
		m.imp.err, m.imp.choices, m.imp.more = "", nil, 0
	}
	return m, nil
}

// acceptImport adds the previewed data set to the session under a new ID
// and returns its index among the measurements.
func (m *Model) acceptImport() int {
	ds := *m.imp.ds
	ds.SourceFile = filepath.Base(ds.SourceFile)
	id := measurementID(ds.SourceFile, string(ds.Kind), func(id string) bool {
		for _, x := range m.sess.meas {
			if x.ID == id {
				return true
			}
		}
		return false
	})
	m.sess.meas = append(m.sess.meas, sessions.Measurement{ID: id, DataSet: ds})
	m.imp = importState{ed: m.imp.ed}
	m.screen = screenMain
	m.note = fmt.Sprintf("added %s (%d points) to the session; ctrl+s saves it", id, ds.Len())
	return len(m.sess.meas) - 1
}

// importScreen draws the path and the preview or the error.
func (m Model) importScreen(w, h int) []string {
	st, g := m.e.st, m.e.g
	fw := m.frameWidth(w)
	var body []string
	body = append(body, wrapped("The path of a CSV or text sweep (bias with current or capacitance; units from the header).", fw, st.muted, "")...)
	if m.sess.filesNote != "" {
		body = append(body, wrapped(m.sess.filesNote, fw, st.muted, "")...)
	}
	body = append(body, "", "file ["+st.text.Paint(m.imp.ed.view(max(fw-7, 1), st.selected, " "))+"]")
	if len(m.imp.choices) > 0 {
		list := strings.Join(m.imp.choices, "  ")
		if m.imp.more > 0 {
			list += fmt.Sprintf("  (%d more)", m.imp.more)
		}
		body = append(body, wrapped(list, fw, st.muted, "      ")...)
	}
	switch {
	case m.imp.err != "":
		body = append(body, "")
		body = append(body, wrapped(g.bad+" "+m.imp.err, fw, st.err, "  ")...)
		body = append(body, wrapped("Nothing was imported.", fw, st.muted, "  ")...)
	case m.imp.ds != nil:
		body = append(body, "")
		body = append(body, previewLines(m.imp.ds, fw, m.e)...)
		body = append(body, m.importTemperatureLines(fw)...)
	}
	return m.frame("Import a measurement", body, w, h)
}

// previewLines describe an imported data set: kind, columns and units,
// rows, problems.
func previewLines(ds *measure.DataSet, w int, e env) []string {
	st, g := e.st, e.g
	var out []string
	kind := "I-V"
	if ds.Kind == measure.KindCV {
		kind = "C-V"
	}
	out = append(out, st.ok.Paint(g.good+" ")+st.strong.Paint(fmt.Sprintf("%s sweep: %d points of %d data rows", kind, ds.Len(), ds.DataRows)))
	col := func(role string, idx int, unit string) {
		if idx <= 0 {
			return
		}
		name := ""
		if idx-1 < len(ds.Columns.Header) {
			name = " " + strconv.Quote(ds.Columns.Header[idx-1])
		}
		if unit == "" {
			unit = "SI (none stated)"
		}
		out = append(out, cut(fmt.Sprintf("  %-12s column %d%s, unit %s", role, idx, name, unit), w, g.ellipsis))
	}
	col("voltage", ds.Columns.Voltage, ds.Units.Voltage)
	col("current", ds.Columns.Current, ds.Units.Current)
	col("capacitance", ds.Columns.Capacitance, ds.Units.Capacitance)
	col("frequency", ds.Columns.Frequency, ds.Units.Frequency)
	col("temperature", ds.Columns.Temperature, ds.Units.Temperature)
	col("compliance", ds.Columns.Compliance, "")
	if ds.ProblemRows == 0 {
		out = append(out, "  no rows left out")
	} else {
		counts := map[measure.ProblemKind]int{}
		for _, p := range ds.Problems {
			counts[p.Kind]++
		}
		var parts []string
		for _, k := range []measure.ProblemKind{measure.ProblemCompliance, measure.ProblemNonFinite, measure.ProblemOverflow, measure.ProblemMissing} {
			if counts[k] > 0 {
				parts = append(parts, fmt.Sprintf("%d %s", counts[k], strings.ReplaceAll(string(k), "_", "-")))
			}
		}
		out = append(out, st.warn.Paint(cut(fmt.Sprintf("  %d rows left out: %s", ds.ProblemRows, strings.Join(parts, ", ")), w, g.ellipsis)))
		for i, p := range ds.Problems {
			if i == 3 {
				out = append(out, st.muted.Paint(fmt.Sprintf("    and %d more", ds.ProblemRows-3)))
				break
			}
			out = append(out, st.muted.Paint(cut(fmt.Sprintf("    line %d column %d: %s %q", p.Line, p.Column, strings.ReplaceAll(string(p.Kind), "_", "-"), p.Value), w, g.ellipsis)))
		}
	}
	return out
}

// ivMeasurements returns the indices of the session's I-V data sets.
func (m Model) ivMeasurements() []int {
	var out []int
	for i, x := range m.sess.meas {
		if x.Kind == measure.KindIV {
			out = append(out, i)
		}
	}
	return out
}

// openFit shows the fit screen for measurement i (-1: the newest I-V
// data set).
func (m *Model) openFit(i int) {
	if i >= 0 && i < len(m.sess.meas) && m.sess.meas[i].Kind == measure.KindCV {
		m.openCVFit(i)
		return
	}
	ivs := m.ivMeasurements()
	if len(ivs) == 0 {
		if len(m.fitMeasurements()) > 0 {
			m.openCVFit(-1)
			return
		}
		m.note = "no I-V data set (nor C-V) in the session: i imports one"
		return
	}
	if i < 0 || i >= len(m.sess.meas) || m.sess.meas[i].Kind != measure.KindIV {
		i = ivs[len(ivs)-1]
	}
	m.fit = fitState{idx: i, eds: [2]lineEditor{newLineEditor(""), newLineEditor("")}}
	m.screen = screenFit
	m.refit()
}

// refit fits the chosen data set in the window in force, computes the
// prediction and redraws.
func (m *Model) refit() {
	f := &m.fit
	f.view, f.lit, f.err, f.pred, f.pErr = nil, nil, "", nil, ""
	if f.idx < 0 || f.idx >= len(m.sess.meas) {
		f.err = "the data set is gone"
		m.renderFit()
		return
	}
	ds := &m.sess.meas[f.idx].DataSet
	if fit.IsLit(ds) {
		lv, err := fit.NewLitView(ds, fit.LitOptions{Window: f.win, Temperature: fit.TemperatureRule{FallbackK: m.form.spec.Temperature, FallbackSource: fit.SourceJunction}})
		if err != nil {
			f.err = err.Error()
		}
		f.lit = lv
		m.renderFit()
		return
	}
	v, err := fit.NewIVView(ds, fit.IVOptions{Window: f.win, Temperature: fit.TemperatureRule{FallbackK: m.form.spec.Temperature, FallbackSource: fit.SourceJunction}})
	if err != nil {
		f.err = err.Error()
	} else {
		f.view = v
	}
	if p, err := fit.PredictedIV(m.form.spec, ds); err != nil {
		f.pErr = err.Error()
	} else {
		f.pred = &p
	}
	m.renderFit()
}

// keepFit stores the fit in force with the session (saved with ctrl+s):
// its parameters with standard errors, the data set, the window and notes.
func (m *Model) keepFit() {
	f := &m.fit
	switch {
	case m.sess.readOnly:
		m.note = "read-only review: fits cannot be kept here"
		return
	case f.lit != nil && f.idx >= 0 && f.idx < len(m.sess.meas):
		m.keepRecords(m.sess.meas[f.idx].ID, fit.LitRecord(f.lit.Result))
		return
	case f.view == nil || f.idx < 0 || f.idx >= len(m.sess.meas):
		m.note = "no fit to keep"
		return
	}
	m.keepRecords(m.sess.meas[f.idx].ID, fit.IVRecord(f.view.Result))
}

// keepRecords adds the records of a fit of measurement to the session's
// extractions (saved with ctrl+s) under IDs that collide with none
// (sessions.AppendFitRecords).
func (m *Model) keepRecords(measurement string, recs ...fit.Record) {
	var ids []string
	m.sess.extr, ids = sessions.AppendFitRecords(m.sess.extr, measurement, m.sess.now(), recs...)
	m.note = "kept " + strings.Join(ids, ", ") + " of " + measurement + " with the session; ctrl+s saves it"
}

// parseWindow reads two window boxes: both empty means every point (the
// zero window); otherwise V1 < V2 with units. The error names the box.
func parseWindow(eds [2]lineEditor) (fit.Window, string) {
	a, b := strings.TrimSpace(eds[0].value()), strings.TrimSpace(eds[1].value())
	if a == "" && b == "" {
		return fit.Window{}, ""
	}
	lo, err1 := model.ParseValue(model.Voltage, a)
	hi, err2 := model.ParseValue(model.Voltage, b)
	switch {
	case err1 != nil:
		return fit.Window{}, "V1: " + err1.Error()
	case err2 != nil:
		return fit.Window{}, "V2: " + err2.Error()
	case !(lo < hi):
		return fit.Window{}, "the window needs V1 < V2"
	}
	return fit.Window{MinV: lo, MaxV: hi}, ""
}

// applyWindow reads the window fields and refits; a bad window is
// reported and the fit in force stays.
func (m *Model) applyWindow() {
	f := &m.fit
	w, bad := parseWindow(f.eds)
	if f.winErr = bad; bad != "" {
		m.renderFit()
		return
	}
	f.win = w
	m.refit()
}

func (m Model) fitKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	f := &m.fit
	switch {
	case keyIs(km, k.Dismiss):
		m.screen = screenMain
		return m, nil
	case keyIs(km, k.Submit):
		m.applyWindow()
		return m, nil
	case keyIs(km, k.KeepFit):
		m.keepFit()
		return m, nil
	case keyIs(km, k.LinLog):
		f.linear = !f.linear
		m.renderFit()
		return m, nil
	case km.Type == tea.KeyTab || km.Type == tea.KeyShiftTab:
		f.row = 1 - f.row
		return m, nil
	case keyIs(km, k.PrevData), keyIs(km, k.NextData):
		m.stepFitData(f.idx, keyIs(km, k.NextData))
		return m, nil
	}
	f.row = min(max(f.row, 0), 1)
	f.eds[f.row].handle(km)
	return m, nil
}

// fitTableWidth is the width of the parameter table beside the chart.
const fitTableWidth = 44

// fitGeometry returns the chart's size and whether the table stands
// beside it, for a body of w x h.
func fitGeometry(w, h int) (cw, ch int, beside bool) {
	if w >= 100 {
		return w - fitTableWidth - 2, h - 3, true
	}
	return w, h - 3 - fitCompactRows, false
}

// fitCompactRows is the height of the parameter table below the chart.
const fitCompactRows = 6

// renderFit draws the chart of the fit screen for the terminal size.
func (m *Model) renderFit() {
	f := &m.fit
	st, g := m.e.st, m.e.g
	f.w, f.h = m.w, m.h
	f.legend, f.yTitle, f.plot = nil, "", nil
	if f.lit != nil {
		m.renderLitFit()
		return
	}
	cw, ch, _ := fitGeometry(m.w, m.h-2)
	if f.idx < 0 || f.idx >= len(m.sess.meas) || cw < 16 {
		return
	}
	meas := fit.MeasuredCurve(&m.sess.meas[f.idx].DataSet)
	if len(meas.Series) == 0 {
		return
	}
	dotMark := "+"
	if !m.e.ascii {
		dotMark = "•"
	}
	items := []string{st.series[1].Paint(dotMark) + " measured"}
	type src struct {
		xs, ys []float64
		ln     plotLine
	}
	var srcs []src
	if f.pred != nil {
		items = append(items, st.pinSeries.Paint(g.pinMarker)+" prediction (the junction)")
		srcs = append(srcs, src{f.pred.Xs, f.pred.Series[0].Y, plotLine{label: "prediction", paint: st.pinSeries, marker: g.pinMarker, pinned: true}})
	}
	if f.view != nil {
		items = append(items, st.series[0].Paint(g.markers[0])+" fit")
		srcs = append(srcs, src{f.view.Curve.Xs, f.view.Curve.Series[0].Y, plotLine{label: "fit", paint: st.series[0], marker: g.markers[0]}})
	}
	srcs = append(srcs, src{meas.Xs, meas.Series[0].Y, plotLine{label: "measured", paint: st.series[1], marker: dotMark, dots: true}})
	f.legend = flowItems(items, cw, 2)
	ph := ch - len(f.legend) - 2
	if ph < 5 {
		f.legend = nil
		return
	}
	xlo, xhi := minMax(meas.Xs, 1)
	xs := exactScale(xlo, xhi, max(2, cw/12))
	if f.linear {
		// The y range is that of the measured |I| (the fit and the
		// prediction are clipped to it), in the SI prefix that suits it.
		mags := make([]float64, len(meas.Series[0].Y))
		for i, y := range meas.Series[0].Y {
			mags[i] = math.Abs(y)
		}
		div, unit := axisFactor(model.Axis{Kind: model.Current}, maxAbs(mags), m.e.ascii)
		_, yhi := minMax(mags, div)
		ys := linearScale(0, yhi*1.05, max(2, ph/3))
		var lines []plotLine
		for _, s := range srcs {
			ln := s.ln
			ln.xs = s.xs
			ln.ys = make([]float64, len(s.ys))
			for i, y := range s.ys {
				y = math.Abs(y) / div
				if !physics.Finite(y) || y > ys.max {
					y = math.NaN()
				}
				ln.ys[i] = y
			}
			lines = append(lines, ln)
		}
		f.yTitle = "|current I| (" + unit + ", linear scale)"
		f.plot = renderPlot(lines, xs, ys, cw, ph, m.e)
		return
	}
	var all []float64
	for _, s := range srcs {
		for _, y := range s.ys {
			if y != 0 {
				all = append(all, y)
			}
		}
	}
	lo, hi, ok := decadeRange(all, 1, 16)
	if !ok {
		return
	}
	ys := decadeScale(lo, hi, max(1, int(math.Ceil(3*float64(hi-lo)/float64(max(ph-2, 1))))))
	floor := math.Pow(10, float64(lo))
	var lines []plotLine
	for _, s := range srcs {
		ln := s.ln
		ln.xs = s.xs
		ln.ys = make([]float64, len(s.ys))
		for i, y := range s.ys {
			switch {
			case math.IsNaN(y) || y == 0:
				ln.ys[i] = math.NaN()
			default:
				ln.ys[i] = math.Log10(math.Max(math.Abs(y), floor))
			}
		}
		lines = append(lines, ln)
	}
	f.yTitle = "|current I| (A, log scale)"
	f.plot = renderPlot(lines, xs, ys, cw, ph, m.e)
}

// fitTable is the parameter table of the fit screen; compact sets two
// parameters to a line (below the chart on a small terminal).
func (m Model) fitTable(w int, compact bool) []string {
	st, g := m.e.st, m.e.g
	f := m.fit
	if f.lit != nil {
		return m.litTable(w, compact)
	}
	var out []string
	if f.err != "" {
		out = append(out, st.err.Paint(g.bad+" the fit failed:"))
		out = append(out, wrapped(f.err, w, st.err, "  ")...)
	}
	if v := f.view; v != nil {
		out = append(out, st.strong.Paint(cut(fmt.Sprintf("single diode at %s (%s)", model.Format(model.Temperature, v.TemperatureK, 4, m.e.ascii), v.TemperatureFrom), w, g.ellipsis)))
		pm := "±"
		if m.e.ascii {
			pm = "+/-"
		}
		var pair string
		for i, r := range v.Rows {
			l := fmt.Sprintf("  %-4s %-12s %s %s", r.Name, r.Value, pm, r.StdErr)
			if r.Remark != "" {
				l = fmt.Sprintf("  %-4s %-12s %s", r.Name, r.Value, r.Remark)
			}
			if compact {
				if i%2 == 0 {
					pair = padRight(l, 38, "")
					continue
				}
				l = pair + l
			}
			out = append(out, cut(l, w, g.ellipsis))
		}
		fit := v.Fit
		if compact {
			out = append(out, cut(fmt.Sprintf("  RMS log residual %.4f %s %d points used (skipped %d) %s window used %s to %s", fit.RMSLogResidual, g.dot, fit.Points, fit.Skipped, g.dot,
				model.Format(model.Voltage, fit.UsedWindow.MinV, 4, m.e.ascii), model.Format(model.Voltage, fit.UsedWindow.MaxV, 4, m.e.ascii)), w, g.ellipsis))
			if sp := sparkline(v.Residual, w-12, m.e.ascii); sp != "" {
				out = append(out, "  residuals "+st.muted.Paint(sp))
			}
			if f.pErr != "" {
				out = append(out, wrapped("no prediction: "+f.pErr, w, st.muted, "  ")...)
			}
			return out
		}
		out = append(out,
			cut(fmt.Sprintf("  RMS log residual %.4f", fit.RMSLogResidual), w, g.ellipsis),
			cut(fmt.Sprintf("  points used %d (skipped %d)", fit.Points, fit.Skipped), w, g.ellipsis),
			cut(fmt.Sprintf("  window used %s to %s", model.Format(model.Voltage, fit.UsedWindow.MinV, 4, m.e.ascii), model.Format(model.Voltage, fit.UsedWindow.MaxV, 4, m.e.ascii)), w, g.ellipsis))
		if sp := sparkline(v.Residual, w-12, m.e.ascii); sp != "" {
			out = append(out, "  residuals "+st.muted.Paint(sp))
		}
		if !fit.Converged {
			out = append(out, st.warn.Paint(cut("  the iteration limit was reached", w, g.ellipsis)))
		}
		for _, n := range fit.Notes {
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
	}
	if f.pErr != "" {
		out = append(out, wrapped("no prediction: "+f.pErr, w, st.muted, "  ")...)
	}
	return out
}

// sparkline draws values in at most w cells, scaled to the largest
// magnitude (the middle level is zero).
func sparkline(v []float64, w int, ascii bool) string {
	if len(v) == 0 || w < 4 {
		return ""
	}
	levels := []rune("▁▂▃▄▅▆▇█")
	if ascii {
		levels = []rune("_.-~=+*#")
	}
	peak := 0.0
	for _, x := range v {
		if physics.Finite(x) {
			peak = math.Max(peak, math.Abs(x))
		}
	}
	n := min(len(v), w)
	out := make([]rune, n)
	for i := range out {
		x := v[i*len(v)/n]
		lv := len(levels) / 2
		if peak > 0 && physics.Finite(x) {
			lv = int(math.Round((x/peak + 1) / 2 * float64(len(levels)-1)))
		}
		out[i] = levels[min(max(lv, 0), len(levels)-1)]
	}
	return string(out)
}

// fitLayout is what a fit screen shows; the I-V and C-V screens share
// the drawing (drawFit).
type fitLayout struct {
	prefix      string // title prefix, e.g. "Fit"
	idx         int    // the data set fitted
	eds         [2]lineEditor
	row         int
	win         fit.Window
	winErr      string
	emptyWindow string // what an empty window means
	noChart     string // shown when there is no chart
	legend      []string
	yTitle      string
	plot        []string
	table       func(width int, compact bool) []string
}

// drawFit draws a fit screen: title, window fields, chart and table
// (beside the chart when the terminal is wide enough, else below).
func (m Model) drawFit(l fitLayout, w, h int) []string {
	st, g := m.e.st, m.e.g
	title := l.prefix
	if l.idx >= 0 && l.idx < len(m.sess.meas) {
		x := m.sess.meas[l.idx]
		title = l.prefix + " " + x.ID + " " + g.dot + " " + x.SourceFile
		if n := len(m.fitMeasurements()); n > 1 {
			title += fmt.Sprintf(" %s %d data sets (pgup/pgdn)", g.dot, n)
		}
	}
	out := []string{rule(title, w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	field := func(i int, label string) string {
		cur := st.faint
		if i == l.row {
			cur = st.selected
		}
		return label + " " + st.text.Paint("["+l.eds[i].view(9, cur, " ")+"]")
	}
	win := "window " + field(0, "V1") + "  " + field(1, "V2")
	if l.win == (fit.Window{}) {
		win += st.muted.Paint("  (empty: " + l.emptyWindow + ")")
	}
	out = append(out, win)
	if l.winErr != "" {
		out = append(out, st.err.Paint(cut(g.bad+" "+l.winErr, w, g.ellipsis)))
	} else {
		out = append(out, "")
	}
	cw, ch, beside := fitGeometry(w, h)
	var chart []string
	if l.plot != nil {
		chart = append(chart, l.legend...)
		chart = append(chart, st.muted.Paint(l.yTitle))
		chart = append(chart, l.plot...)
		chart = append(chart, st.muted.Paint(padLeft("bias V (V)", cw)))
	} else {
		chart = append(chart, st.muted.Paint(l.noChart))
	}
	if beside {
		left := block(chart, cw, ch, g.ellipsis)
		out = append(out, joinColumns(" "+st.faint.Paint(g.vbar), left, l.table(fitTableWidth, false))...)
	} else {
		out = append(out, block(chart, cw, max(ch, 0), g.ellipsis)...)
		out = append(out, l.table(w, true)...)
	}
	return block(out, w, h, g.ellipsis)
}

// fitScreen draws the I-V fit.
func (m Model) fitScreen(w, h int) []string {
	f := m.fit
	empty := "every forward point"
	if f.lit != nil {
		empty = "every point"
	}
	return m.drawFit(fitLayout{prefix: "Fit", idx: f.idx, eds: f.eds, row: f.row, win: f.win, winErr: f.winErr,
		emptyWindow: empty, noChart: "(no chart: enlarge the terminal, or nothing to draw on a log axis)",
		legend: f.legend, yTitle: f.yTitle, plot: f.plot, table: m.fitTable}, w, h)
}

// importHelp is the footer of the import screen.
type importHelp struct {
	k       KeyMap
	preview bool
}

func (h importHelp) ShortHelp() []key.Binding {
	if h.preview {
		return []key.Binding{h.k.AddData, h.k.AddFit, h.k.EditPath,
			key.NewBinding(key.WithKeys("t"), key.WithHelp("t", "type the temperature")), h.k.Dismiss}
	}
	return []key.Binding{key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "read and preview")),
		key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "complete the name")), h.k.Dismiss}
}
func (h importHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }

// fitHelp is the footer of the fit screen.
type fitHelp struct{ k KeyMap }

func (h fitHelp) ShortHelp() []key.Binding {
	return []key.Binding{h.k.Refit, key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "other bound")), h.k.KeepFit, h.k.LinLog, h.k.NextData, h.k.Close}
}
func (h fitHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }
