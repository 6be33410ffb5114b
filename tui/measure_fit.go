package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/sessions"
)

// The fit screen: one data set of the session fitted in a voltage window
// typed by the user, its chart and its parameter table (beside the chart
// on a wide terminal, below it on a small one). pgup and pgdn walk the
// session's I-V and C-V data sets; a fitKind holds what differs between
// the kinds of data: the fit (model/fit's), the chart, the table and the
// records ctrl+k keeps. measure_iv.go and measure_lit.go hold the I-V
// kind, measure_cv.go the C-V kind.

// fitKind is what a fit screen fits and draws for one kind of data set.
type fitKind interface {
	// of is the kind of data set the fit takes.
	of() measure.Kind
	// title heads the screen ("Fit"); emptyWindow says what an empty
	// window fits; noChart stands where no chart can be drawn.
	title() string
	emptyWindow() string
	noChart() string
	// refit fits ds (nil: the data set is gone) in win with the
	// junction in force (its temperature, its prediction).
	refit(m Model, ds *measure.DataSet, win fit.Window)
	// chart draws the chart of the fit in cw x ch cells: the legend, the
	// y axis title and the plot lines (nil: no chart).
	chart(m Model, cw, ch int) (legend []string, yTitle string, plot []string)
	// table is the parameter table in w columns; compact keeps it to
	// fitCompactRows lines, below the chart.
	table(m Model, w int, compact bool) []string
	// records are what ctrl+k keeps with the session (nil: no fit).
	records() []fit.Record
}

// axisSwitcher is a fitKind whose current axis switches between log and
// linear (ctrl+l).
type axisSwitcher interface{ switchAxis() }

// newFitKind returns the fit of a kind of data set (nil: none).
func newFitKind(k measure.Kind) fitKind {
	switch k {
	case measure.KindIV:
		return &ivFit{}
	case measure.KindCV:
		return &cvFit{}
	}
	return nil
}

// fitScreen is the fit screen: the data set fitted (an index into the
// session's measurements), the window boxes and the window in force, and
// the chart drawn for the terminal's size.
type fitScreen struct {
	kind   fitKind
	idx    int
	eds    [2]lineEditor
	row    int
	win    fit.Window
	winErr string

	legend []string
	yTitle string
	plot   []string
}

// fitMeasurements returns the indices of the session's data sets that a
// fit screen takes (I-V and C-V), in session order.
func (m Model) fitMeasurements() []int {
	var out []int
	for i, x := range m.sess.meas {
		if newFitKind(x.Kind) != nil {
			out = append(out, i)
		}
	}
	return out
}

// openFit shows the fit screen for measurement i (not a data set a fit
// takes: the newest I-V data set, else the newest C-V one).
func (m *Model) openFit(i int) {
	if i < 0 || i >= len(m.sess.meas) || newFitKind(m.sess.meas[i].Kind) == nil {
		i = -1
		for _, k := range []measure.Kind{measure.KindIV, measure.KindCV} {
			for j, x := range m.sess.meas {
				if x.Kind == k {
					i = j
				}
			}
			if i >= 0 {
				break
			}
		}
	}
	if i < 0 {
		m.note = "no I-V data set (nor C-V) in the session: i imports one"
		return
	}
	s := &fitScreen{}
	s.show(*m, i)
	m.push(s)
}

// show fits measurement i. On a data set of the kind shown the window
// typed stays in force; another kind starts with empty boxes.
func (s *fitScreen) show(m Model, i int) {
	if k := m.sess.meas[i].Kind; s.kind == nil || s.kind.of() != k {
		*s = fitScreen{kind: newFitKind(k), eds: [2]lineEditor{newLineEditor(""), newLineEditor("")}}
	}
	s.idx = i
	s.refit(m)
}

// refit fits the data set in the window in force and redraws.
func (s *fitScreen) refit(m Model) {
	var ds *measure.DataSet
	if s.idx >= 0 && s.idx < len(m.sess.meas) {
		ds = &m.sess.meas[s.idx].DataSet
	}
	s.kind.refit(m, ds, s.win)
	s.render(m)
}

// step moves to the previous or next data set a fit takes.
func (s *fitScreen) step(m Model, next bool) {
	all := m.fitMeasurements()
	if len(all) < 2 {
		return
	}
	j := 0
	for n, i := range all {
		if i == s.idx {
			j = n
		}
	}
	if next {
		j = (j + 1) % len(all)
	} else {
		j = (j + len(all) - 1) % len(all)
	}
	s.show(m, all[j])
}

// keep stores the fit in force with the session (saved with ctrl+s).
func (s *fitScreen) keep(m *Model) {
	recs := s.kind.records()
	switch {
	case m.sess.readOnly:
		m.note = "read-only review: fits cannot be kept here"
	case recs == nil || s.idx < 0 || s.idx >= len(m.sess.meas):
		m.note = "no fit to keep"
	default:
		m.keepRecords(m.sess.meas[s.idx].ID, recs...)
	}
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

// applyWindow reads the window boxes and refits; a bad window is
// reported and the fit in force stays.
func (s *fitScreen) applyWindow(m Model) {
	w, bad := parseWindow(s.eds)
	if s.winErr = bad; bad != "" {
		s.render(m)
		return
	}
	s.win = w
	s.refit(m)
}

// fitKeys is the key map of the fit screen; LinLog is on where the kind
// switches its axis.
type fitKeys struct{ Refit, OtherBound, Keep, LinLog, PrevData, NextData, Close key.Binding }

func (s *fitScreen) fitKeys(k KeyMap) fitKeys {
	lin := k.LinLog
	_, ok := s.kind.(axisSwitcher)
	lin.SetEnabled(ok)
	return fitKeys{Refit: k.Refit, OtherBound: key.NewBinding(key.WithKeys("tab", "shift+tab"), key.WithHelp("tab", "other bound")),
		Keep: k.KeepFit, LinLog: lin, PrevData: k.PrevData, NextData: k.NextData, Close: k.Close}
}

func (k fitKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Refit, k.OtherBound, k.Keep, k.LinLog, k.NextData, k.Close}
}

// FullHelp is every key of the fit screen, for the help screen: LinLog
// named with the kinds it acts in.
func (k fitKeys) FullHelp() [][]key.Binding {
	lin := k.LinLog
	lin.SetEnabled(true)
	lin.SetHelp(lin.Help().Key, lin.Help().Desc+" (I-V)")
	return [][]key.Binding{{k.Refit, k.OtherBound, k.Keep, lin, k.PrevData, k.NextData, k.Close}}
}

func (s *fitScreen) footer(m Model) []key.Binding { return s.fitKeys(m.e.keys).ShortHelp() }

// listen draws the chart again for a new terminal size.
func (s *fitScreen) listen(m *Model, msg tea.Msg) tea.Cmd {
	if _, ok := msg.(tea.WindowSizeMsg); ok {
		s.render(*m)
	}
	return nil
}

func (s *fitScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := s.fitKeys(m.e.keys)
	switch {
	case keyIs(km, k.Close):
		m.close(s)
	case keyIs(km, k.Refit):
		s.applyWindow(*m)
	case keyIs(km, k.Keep):
		s.keep(m)
	case keyIs(km, k.LinLog):
		s.kind.(axisSwitcher).switchAxis()
		s.render(*m)
	case keyIs(km, k.OtherBound):
		s.row = 1 - s.row
	case keyIs(km, k.PrevData), keyIs(km, k.NextData):
		s.step(*m, keyIs(km, k.NextData))
	default:
		s.row = min(max(s.row, 0), 1)
		s.eds[s.row].handle(km)
	}
	return nil
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

// render draws the chart for the terminal's size.
func (s *fitScreen) render(m Model) {
	s.legend, s.yTitle, s.plot = nil, "", nil
	cw, ch, _ := fitGeometry(m.w, m.h-2)
	if s.idx < 0 || s.idx >= len(m.sess.meas) || cw < 16 {
		return
	}
	s.legend, s.yTitle, s.plot = s.kind.chart(m, cw, ch)
}

// view draws the title, the window boxes, the chart and the table.
func (s *fitScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	title := s.kind.title()
	if s.idx >= 0 && s.idx < len(m.sess.meas) {
		x := m.sess.meas[s.idx]
		title += " " + x.ID + " " + g.dot + " " + x.SourceFile
		if n := len(m.fitMeasurements()); n > 1 {
			title += fmt.Sprintf(" %s %d data sets (pgup/pgdn)", g.dot, n)
		}
	}
	out := []string{rule(title, w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	field := func(i int, label string) string {
		cur := st.faint
		if i == s.row {
			cur = st.selected
		}
		return label + " " + st.text.Paint("["+s.eds[i].view(9, cur, " ")+"]")
	}
	win := "window " + field(0, "V1") + "  " + field(1, "V2")
	if s.win == (fit.Window{}) {
		win += st.muted.Paint("  (empty: " + s.kind.emptyWindow() + ")")
	}
	out = append(out, win)
	if s.winErr != "" {
		out = append(out, st.err.Paint(cut(g.bad+" "+s.winErr, w, g.ellipsis)))
	} else {
		out = append(out, "")
	}
	cw, ch, beside := fitGeometry(w, h)
	var chart []string
	if s.plot != nil {
		chart = append(chart, s.legend...)
		chart = append(chart, st.muted.Paint(s.yTitle))
		chart = append(chart, s.plot...)
		chart = append(chart, st.muted.Paint(padLeft("bias V (V)", cw)))
	} else {
		chart = append(chart, st.muted.Paint(s.kind.noChart()))
	}
	if beside {
		left := block(chart, cw, ch, g.ellipsis)
		out = append(out, joinColumns(" "+st.faint.Paint(g.vbar), left, s.kind.table(m, fitTableWidth, false))...)
	} else {
		out = append(out, block(chart, cw, max(ch, 0), g.ellipsis)...)
		out = append(out, s.kind.table(m, w, true)...)
	}
	return block(out, w, h, g.ellipsis)
}

// fitFailed is the head of a table whose fit failed.
func (e env) fitFailed(err string, w int) []string {
	if err == "" {
		return nil
	}
	return append([]string{e.st.err.Paint(e.g.bad + " the fit failed:")}, wrapped(err, w, e.st.err, "  ")...)
}

// paramRow is a fit parameter on one line: its name, value and standard
// error, or its value and remark; a value the data do not pin down shows
// no number (the reason is given below the table).
func (e env) paramRow(r fit.Row) string {
	switch {
	case notDetermined(r):
		return fmt.Sprintf("  %-4s not determined", r.Name)
	case r.Remark != "":
		return fmt.Sprintf("  %-4s %-12s %s", r.Name, r.Value, r.Remark)
	}
	return fmt.Sprintf("  %-4s %-12s %s %s", r.Name, r.Value, e.g.plusMinus, r.StdErr)
}

// notDetermined reports whether the data do not pin a parameter down:
// no value, and a remark that says why.
func notDetermined(r fit.Row) bool {
	return r.Value == "" && strings.HasPrefix(r.Remark, "not determined")
}

// undetermined says why each parameter of rows that the data do not pin
// down has no number ("name: reason").
func undetermined(rows []fit.Row) []string {
	var why []string
	for _, r := range rows {
		if notDetermined(r) {
			why = append(why, r.Name+": "+strings.TrimPrefix(r.Remark, "not determined: "))
		}
	}
	return why
}

// paramLines sets fit parameters one to a line, or two to a line when
// compact (an odd last one alone), each line cut to w.
func (e env) paramLines(rows []fit.Row, w int, compact bool) []string {
	var out []string
	for i := 0; i < len(rows); i++ {
		l := e.paramRow(rows[i])
		if compact && i+1 < len(rows) {
			i++
			l = padRight(l, 38, "") + e.paramRow(rows[i])
		}
		out = append(out, cut(l, w, e.g.ellipsis))
	}
	return out
}

// onAxis returns the values divided by div where axis a shows them, NaN
// (not drawn) where a value is off the axis or not finite: the fit
// screens' charts clip the fit and the prediction to the data's range.
func onAxis(v []float64, div float64, a axisScale) []float64 {
	return mapValues(v, func(y float64) float64 {
		y /= div
		if !physics.Finite(y) || y < a.min || y > a.max {
			return math.NaN()
		}
		return y
	})
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
