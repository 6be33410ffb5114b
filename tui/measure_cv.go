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
)

// cvFitState is the C-V fit screen: the C-V data set fitted, the window
// fields, the fit and its 1/C^2 chart, drawn for the size in w x h.
type cvFitState struct {
	idx    int // index into the session's measurements
	eds    [2]lineEditor
	row    int
	win    fit.Window
	winErr string
	view   *fit.CVView
	err    string

	w, h   int
	legend []string
	yTitle string
	plot   []string
}

// fitMeasurements returns the indices of the session's data sets that a
// fit screen takes (I-V and C-V), in session order.
func (m Model) fitMeasurements() []int {
	var out []int
	for i, x := range m.sess.meas {
		if x.Kind == measure.KindIV || x.Kind == measure.KindCV {
			out = append(out, i)
		}
	}
	return out
}

// stepFitData moves from measurement at to the previous or next fittable
// data set and opens the fit screen of its kind.
func (m *Model) stepFitData(at int, next bool) {
	all := m.fitMeasurements()
	if len(all) < 2 {
		return
	}
	j := 0
	for n, i := range all {
		if i == at {
			j = n
		}
	}
	if next {
		j = (j + 1) % len(all)
	} else {
		j = (j + len(all) - 1) % len(all)
	}
	// On a screen of the same kind the window typed stays in force.
	i := all[j]
	cv := m.sess.meas[i].Kind == measure.KindCV
	switch {
	case cv && m.screen == screenCVFit:
		m.cvfit.idx = i
		m.recvfit()
	case cv:
		m.openCVFit(i)
	case m.screen == screenFit:
		m.fit.idx = i
		m.refit()
	default:
		m.openFit(i)
	}
}

// openCVFit shows the C-V fit screen for measurement i (not C-V: the
// newest C-V data set).
func (m *Model) openCVFit(i int) {
	var cvs []int
	for j, x := range m.sess.meas {
		if x.Kind == measure.KindCV {
			cvs = append(cvs, j)
		}
	}
	if len(cvs) == 0 {
		m.note = "no C-V data set in the session: i imports one"
		return
	}
	if i < 0 || i >= len(m.sess.meas) || m.sess.meas[i].Kind != measure.KindCV {
		i = cvs[len(cvs)-1]
	}
	m.cvfit = cvFitState{idx: i, eds: [2]lineEditor{newLineEditor(""), newLineEditor("")}}
	m.screen = screenCVFit
	m.recvfit()
}

// recvfit fits the chosen C-V data set in the window in force (the
// prediction comes with the fit) and redraws.
func (m *Model) recvfit() {
	f := &m.cvfit
	f.view, f.err = nil, ""
	if f.idx < 0 || f.idx >= len(m.sess.meas) {
		f.err = "the data set is gone"
		m.renderCVFit()
		return
	}
	v, err := fit.NewCVView(&m.sess.meas[f.idx].DataSet, m.form.spec, f.win)
	if err != nil {
		f.err = err.Error()
	} else {
		f.view = v
	}
	m.renderCVFit()
}

// keepCVFit stores the C-V fit in force with the session as a
// Mott-Schottky extraction.
func (m *Model) keepCVFit() {
	f := &m.cvfit
	switch {
	case m.sess.readOnly:
		m.note = "read-only review: fits cannot be kept here"
		return
	case f.view == nil || f.idx < 0 || f.idx >= len(m.sess.meas):
		m.note = "no fit to keep"
		return
	}
	m.keepRecords(m.sess.meas[f.idx].ID, fit.CVRecords(f.view.Result)...)
}

// applyCVWindow reads the window fields (parseWindow) and refits; a bad
// window is reported and the fit in force stays.
func (m *Model) applyCVWindow() {
	f := &m.cvfit
	w, bad := parseWindow(f.eds)
	if f.winErr = bad; bad != "" {
		m.renderCVFit()
		return
	}
	f.win = w
	m.recvfit()
}

func (m Model) cvFitKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	f := &m.cvfit
	switch {
	case keyIs(km, k.Dismiss):
		m.screen = screenMain
		return m, nil
	case keyIs(km, k.Submit):
		m.applyCVWindow()
		return m, nil
	case keyIs(km, k.KeepFit):
		m.keepCVFit()
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

// renderCVFit draws the 1/C^2 chart of the C-V fit screen.
func (m *Model) renderCVFit() {
	f := &m.cvfit
	st, g := m.e.st, m.e.g
	f.w, f.h = m.w, m.h
	f.legend, f.yTitle, f.plot = nil, "", nil
	cw, ch, _ := fitGeometry(m.w, m.h-2)
	v := f.view
	if v == nil || cw < 16 || len(v.Inverse.Series) < 2 {
		return
	}
	dotMark := "+"
	if !m.e.ascii {
		dotMark = "•"
	}
	items := []string{st.series[1].Paint(dotMark) + " measured 1/(C − Cpar)²"}
	if m.e.ascii {
		items[0] = st.series[1].Paint(dotMark) + " measured 1/(C - Cpar)^2"
	}
	type src struct {
		xs, ys []float64
		ln     plotLine
	}
	var srcs []src
	if p := v.Prediction; p != nil && len(p.Series) > 0 {
		items = append(items, st.pinSeries.Paint(g.pinMarker)+" "+p.Series[0].Label+" (the junction)")
		srcs = append(srcs, src{p.Xs, p.Series[0].Y, plotLine{label: "prediction", paint: st.pinSeries, marker: g.pinMarker, pinned: true}})
	}
	items = append(items, st.series[0].Paint(g.markers[0])+" Mott-Schottky line")
	srcs = append(srcs, src{v.Inverse.Xs, v.Inverse.Series[1].Y, plotLine{label: "line", paint: st.series[0], marker: g.markers[0]}})
	srcs = append(srcs, src{v.Inverse.Xs, v.Inverse.Series[0].Y, plotLine{label: "measured", paint: st.series[1], marker: dotMark, dots: true}})
	f.legend = flowItems(items, cw, 2)
	ph := ch - len(f.legend) - 2
	if ph < 5 {
		f.legend = nil
		return
	}
	// The y range is that of the measured points (the line and the
	// prediction are clipped to it, so a far-off prediction cannot flatten
	// the data), scaled to a power of ten for the tick labels.
	ylo, yhi := minMax(v.Inverse.Series[0].Y, 1)
	ylo = math.Min(ylo, 0)
	peak := math.Max(math.Abs(ylo), math.Abs(yhi))
	exp := 0
	if peak > 0 && physics.Finite(peak) {
		exp = int(math.Floor(math.Log10(peak)))
	}
	scale := math.Pow(10, float64(exp))
	ys := linearScale(ylo/scale, yhi*1.05/scale, max(2, ph/3))
	xlo, xhi := minMax(v.Inverse.Xs, 1)
	xs := exactScale(xlo, xhi, max(2, cw/12))
	var lines []plotLine
	for _, s := range srcs {
		ln := s.ln
		ln.xs = s.xs
		ln.ys = make([]float64, len(s.ys))
		for i, y := range s.ys {
			y /= scale
			if !physics.Finite(y) || y < ys.min || y > ys.max {
				y = math.NaN()
			}
			ln.ys[i] = y
		}
		lines = append(lines, ln)
	}
	f.yTitle = fmt.Sprintf("1/(C - Cpar)^2 (1e%d F^-2)", exp)
	f.plot = renderPlot(lines, xs, ys, cw, ph, m.e)
}

// cvFitTable is the parameter table of the C-V fit screen; compact sets
// two parameters to a line.
func (m Model) cvFitTable(w int, compact bool) []string {
	st, g := m.e.st, m.e.g
	f := m.cvfit
	var out []string
	if f.err != "" {
		out = append(out, st.err.Paint(g.bad+" the fit failed:"))
		out = append(out, wrapped(f.err, w, st.err, "  ")...)
	}
	v := f.view
	if v == nil {
		return out
	}
	pm := "±"
	if m.e.ascii {
		pm = "+/-"
	}
	out = append(out, st.strong.Paint(cut("C = Cj0/(1 - V/Vbi)^m + Cpar", w, g.ellipsis)))
	var pair string
	var why []string
	for i, r := range v.Rows {
		if i == 4 && !compact {
			out = append(out, st.strong.Paint(cut("Mott-Schottky line of C - Cpar (m = 1/2)", w, g.ellipsis)))
		}
		l := fmt.Sprintf("  %-4s %-12s %s %s", r.Name, r.Value, pm, r.StdErr)
		switch {
		case r.Value == "" && strings.HasPrefix(r.Remark, "not determined"):
			// The data do not pin it down: no number, the reason below.
			l = fmt.Sprintf("  %-4s not determined", r.Name)
			why = append(why, r.Name+": "+strings.TrimPrefix(r.Remark, "not determined: "))
		case r.Remark != "":
			l = fmt.Sprintf("  %-4s %-12s %s", r.Name, r.Value, r.Remark)
		}
		if compact {
			if i%2 == 0 {
				pair = padRight(l, 38, "")
				if i == len(v.Rows)-1 {
					out = append(out, cut(pair, w, g.ellipsis))
				}
				continue
			}
			l = pair + l
		}
		out = append(out, cut(l, w, g.ellipsis))
	}
	j := v.Analysis.Junction
	win := fmt.Sprintf("  %d points, window used %s to %s", j.Points,
		model.Format(model.Voltage, j.UsedWindow.MinV, 4, m.e.ascii), model.Format(model.Voltage, j.UsedWindow.MaxV, 4, m.e.ascii))
	out = append(out, cut(win, w, g.ellipsis),
		cut(fmt.Sprintf("  RMS relative residual %.4f", j.RMSRelResidual), w, g.ellipsis))
	for _, x := range why {
		out = append(out, wrapped(x, w, st.muted, "  ")...)
	}
	if !compact {
		for _, n := range v.Analysis.Notes {
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
		if v.AreaM2 > 0 {
			out = append(out, wrapped(fmt.Sprintf("N is the lightly doped side's doping, from the area %s and the permittivity of %s.",
				model.Format(model.Area, v.AreaM2, 4, m.e.ascii), v.Material), w, st.muted, "  ")...)
		} else {
			out = append(out, wrapped("No doping: the junction has no area set.", w, st.muted, "  ")...)
		}
	}
	if v.PredictionErr != "" {
		out = append(out, wrapped("no prediction: "+v.PredictionErr, w, st.muted, "  ")...)
	}
	return out
}

// cvFitScreen draws the C-V fit (drawFit).
func (m Model) cvFitScreen(w, h int) []string {
	f := m.cvfit
	return m.drawFit(fitLayout{prefix: "C-V fit", idx: f.idx, eds: f.eds, row: f.row, win: f.win, winErr: f.winErr,
		emptyWindow: "every point", noChart: "(no chart: enlarge the terminal, or no fit to draw)",
		legend: f.legend, yTitle: f.yTitle, plot: f.plot, table: m.cvFitTable}, w, h)
}

// cvFitHelp is the footer of the C-V fit screen.
type cvFitHelp struct{ k KeyMap }

func (h cvFitHelp) ShortHelp() []key.Binding {
	return []key.Binding{h.k.Refit, key.NewBinding(key.WithKeys("tab"), key.WithHelp("tab", "other bound")), h.k.KeepFit, h.k.NextData, h.k.Close}
}
func (h cvFitHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }
