package tui

import (
	"errors"
	"fmt"
	"path/filepath"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/sessions"
	"junco/tui/wafermap"
)

// waferMapState is the wafer map of a finished batch: whether keys walk
// the map (focus) or edit the directory, the die under the cursor (an
// index of the batch's rows, -1: none), the column mapped, the wafer
// shown, and the die's fit when one is open.
type waferMapState struct {
	hasDies bool
	focus   bool
	cursor  int
	param   int
	wafer   int
	die     *dieFit
}

// dieFit is one die's fit opened from the map: the row, the data set
// read again from its file and the fit (or why there is none).
type dieFit struct {
	row  int
	ds   *measure.DataSet
	view *fit.IVView
	err  string
	// kept says how the file compares with its row of a kept table
	// (keptChange; empty: it matches, or the row is a run's).
	kept string
}

// newWaferMapState starts the map of a batch on its first die, with the
// keys on the map when some file has a die position.
func newWaferMapState(v *fit.BatchResult) waferMapState {
	s := waferMapState{cursor: -1, param: 0}
	if v == nil {
		return s
	}
	ws := fit.Wafers(v.Rows)
	if len(ws) == 0 {
		return s
	}
	s.hasDies, s.focus = true, true
	s.cursor = fit.FirstDie(v.Rows, ws[0])
	return s
}

// waferKey is the wafer shown (fit.WaferKey; "" when the dies name none).
func (s waferMapState) waferKey(rows []fit.BatchRow) string {
	if ws := fit.Wafers(rows); s.wafer < len(ws) {
		return ws[s.wafer]
	}
	return ""
}

// onMap reports whether keys go to the map (or the die's fit).
func (s waferMapState) onMap(v *fit.BatchResult) bool {
	return v != nil && s.hasDies && (s.focus || s.die != nil)
}

// mapKey handles the keys of the map: arrows walk the dies (also from a
// die's fit, which then follows), enter opens the die's fit, [ and ]
// change the column, w the wafer, tab gives the keys to the directory; f
// in a die's fit adds its data set to the session and opens the fit
// screen over the batch.
func (b *batchScreen) mapKey(m *Model, km tea.KeyMsg) {
	k := m.e.keys.batchKeys()
	s := &b.wm
	rows := b.view.Rows
	step := func(dx, dy int) {
		s.cursor = fit.StepDie(rows, s.cursor, dx, dy)
		if s.die != nil {
			b.openDie(*m)
		}
	}
	switch {
	case keyIs(km, k.Left):
		step(-1, 0)
	case keyIs(km, k.Right):
		step(1, 0)
	case keyIs(km, k.Up):
		step(0, -1)
	case keyIs(km, k.Down):
		step(0, 1)
	case keyIs(km, k.Open):
		if s.die == nil {
			b.openDie(*m)
		}
	case keyIs(km, k.Next), keyIs(km, k.Prev):
		d := 1
		if keyIs(km, k.Prev) {
			d = len(fit.BatchParams()) - 1
		}
		for i := 0; i < len(fit.BatchParams()); i++ {
			s.param = (s.param + d) % len(fit.BatchParams())
			if b.view.Stats[s.param].N > 0 {
				break
			}
		}
	case keyIs(km, k.Wafer):
		if ws := fit.Wafers(rows); len(ws) > 1 {
			s.wafer = (s.wafer + 1) % len(ws)
			s.cursor = fit.FirstDie(rows, ws[s.wafer])
			s.die = nil
		}
	case keyIs(km, k.Focus):
		if s.die == nil {
			s.focus = false
		}
	case keyIs(km, k.AddDie):
		if s.die != nil && s.die.ds != nil {
			b.addDie(m)
		}
	}
}

// openDie reads the cursor's file again and fits it with the batch's
// options (the fit layer's, as the batch did): the die's fit.
func (b *batchScreen) openDie(m Model) {
	s := &b.wm
	if b.view == nil || s.cursor < 0 || s.cursor >= len(b.view.Rows) {
		return
	}
	r := b.view.Rows[s.cursor]
	d := &dieFit{row: s.cursor}
	s.die = d
	kept := b.viewIsKept(&m)
	readErr := b.readDie(m, r, d, kept)
	if kept && !errors.Is(readErr, errKeptDieInReview) {
		d.kept = keptChange(r, d, readErr)
	}
}

// readDie reads the file of row r again and fits it into d; the error of
// the reading (nil once the file is read, whether it fits or not). A
// kept row whose temperature was the junction's is fitted at the kept
// temperature, so that a junction edited since does not pass for a
// changed file.
func (b *batchScreen) readDie(m Model, r fit.BatchRow, d *dieFit, kept bool) error {
	file, err := b.dieFile(&m, r)
	if err != nil {
		d.err = err.Error()
		return err
	}
	ds, err := fit.Import(m.sess.files, file, measure.KindIV, m.sess.now)
	if err != nil {
		d.err = err.Error()
		return err
	}
	d.ds = ds
	rule := m.junctionRule()
	if kept && r.Temperature.Source == fit.SourceJunction && r.Temperature.K > 0 {
		rule.FallbackK = r.Temperature.K
	}
	v, err := fit.NewIVView(ds, fit.IVOptions{Temperature: rule})
	if err != nil {
		d.err = err.Error()
		return nil
	}
	d.view = v
	return nil
}

// addDie adds the open die's data set to the session as the import
// screen does (addMeasurement: its ID policy) and opens the fit screen
// on it over the batch (esc comes back to the map); refused in review.
func (b *batchScreen) addDie(m *Model) {
	if m.sess.readOnly {
		m.note = "read-only review: measurements cannot be added; ctrl+s copies the session to your sessions"
		return
	}
	d := b.wm.die
	if err := m.roomFor(*d.ds); err != nil {
		m.note = err.Error()
		return
	}
	i := m.addMeasurement(*d.ds)
	b.wm.die = nil // the map again, after the fit
	m.openFit(i)
	m.note = fmt.Sprintf("added %s (%s) to the session; ctrl+s saves it; esc returns to the batch", m.sess.meas[i].ID, dieLabel(b.view.Rows[d.row].Die))
}

// dieLabel names a die's position: "x3 y7" (with its wafer when stated).
func dieLabel(d fit.Die) string {
	if !d.Known() {
		return "no position"
	}
	s := fmt.Sprintf("x%d y%d", d.X, d.Y)
	if k := fit.WaferKey(d); k != "" {
		s += " wafer " + sessions.Printable(k, 0, "")
	}
	return s
}

// waferInks paints the map's classes: a cool-to-warm scale for the
// shades, the workbench's error, warning and pinned colours for the
// marks. Built from the session's renderer; without colour, nothing.
func (m Model) waferInks() map[fit.DieClass]ink {
	if !m.e.color {
		return nil
	}
	r := m.e.r
	fg := func(c string) ink { return inkOf(r.NewStyle().Foreground(lipgloss.Color(c))) }
	return map[fit.DieClass]ink{
		fit.Shade0: fg("39"), fit.Shade1: fg("43"), fit.Shade2: fg("148"), fit.Shade3: fg("220"),
		fit.DieOutlier: m.e.st.pinned, fit.DieFailed: m.e.st.err, fit.DieOutOfLimits: m.e.st.caution,
		fit.DieNotRun: m.e.st.muted, fit.DieUndetermined: m.e.st.muted, wafermap.Text: m.e.st.muted,
	}
}

// waferMapLines is the right side of the batch screen: the map of the
// column chosen with the cursor's die framed, and the cursor's die.
func (b *batchScreen) waferMapLines(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	s := b.wm
	rows := b.view.Rows
	wafer := s.waferKey(rows)
	inks := m.waferInks()
	paint := func(c fit.DieClass, t string) string {
		if k, ok := inks[c]; ok {
			return k.Paint(t)
		}
		return t
	}
	// The grid takes the room the title and legend leave (at least 3
	// rows, scrolled to the cursor); the cursor's die comes below when
	// there is room.
	o := wafermap.Options{Param: s.param, Wafer: wafer, ASCII: m.e.ascii, Width: w, Rows: h, Cursor: s.cursor, Paint: paint}
	out := wafermap.Render(rows, b.view.Stats, o)
	for i := 0; i < 3 && len(out) > h && o.Rows > 3; i++ {
		o.Rows = max(o.Rows-(len(out)-h), 3)
		out = wafermap.Render(rows, b.view.Stats, o)
	}
	if s.cursor >= 0 && s.cursor < len(rows) {
		r := rows[s.cursor]
		p := fit.BatchParams()[s.param]
		out = append(out, "", st.strong.Paint(cut(g.cursor+" "+dieLabel(r.Die)+"  "+sessions.Printable(filepath.Base(r.File), 0, ""), w, g.ellipsis)))
		switch {
		case r.Status == fit.StatusOK:
			out = append(out, cut("  "+p.Symbol+" "+model.Format(p.Kind, r.Values[s.param], 4, m.e.ascii), w, g.ellipsis))
		case r.Err != nil:
			out = append(out, wrapped(g.bad+" "+b.rowErr(r), w, st.err, "  ")...)
		}
		if r.Die.Note != "" {
			out = append(out, wrapped(r.Die.Note, w, st.muted, "  ")...)
		}
	}
	if !s.focus {
		out = append(out, st.muted.Paint(cut("tab: keys to the map", w, g.ellipsis)))
	}
	return block(out, w, h, g.ellipsis)
}

// dieFitView draws the open die's fit: its position and file, the chart
// of the measured and fitted current (log scale) and the parameters with
// standard errors.
func (b *batchScreen) dieFitView(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	d := b.wm.die
	r := b.view.Rows[d.row]
	out := []string{rule("Die "+dieLabel(r.Die)+" "+g.dot+" "+sessions.Printable(filepath.Base(r.File), 0, ""), w, glyphs{hbar: g.hbar}, st.heading)}
	if d.kept != "" {
		out = append(out, wrapped(g.bad+" "+d.kept, w, st.caution, "")...)
		if kv := keptValues(r, m.e.ascii); kv != "" {
			out = append(out, wrapped(kv, w, st.muted, "  ")...)
		}
	}
	if d.err != "" {
		out = append(out, wrapped(g.bad+" "+sessions.Printable(d.err, 0, ""), w, st.err, "")...)
		out = append(out, st.muted.Paint(cut("arrows: next die  esc: back to the map", w, g.ellipsis)))
		return out
	}
	v := d.view
	var table []string
	table = append(table, st.strong.Paint(fmt.Sprintf("single diode at %s (%s)", model.Format(model.Temperature, v.TemperatureK, 4, m.e.ascii), v.TemperatureFrom)))
	for _, row := range v.Rows {
		table = append(table, m.e.paramRow(row))
	}
	table = append(table, fmt.Sprintf("  RMS log residual %.4f", v.Fit.RMSLogResidual), fmt.Sprintf("  points used %d", v.Fit.Points),
		"", st.muted.Paint("arrows: next die"), st.muted.Paint("f: add to the session and fit"), st.muted.Paint("esc: back to the map"))
	tw := 40
	if w < 80 {
		chart := m.dieChart(d, w, max(h-len(out)-len(table)-1, 0))
		return append(append(out, chart...), table...)
	}
	chart := m.dieChart(d, w-tw-3, h-len(out))
	return append(out, joinColumns(" "+st.faint.Paint(g.vbar)+" ", block(chart, w-tw-3, h-len(out), g.ellipsis), table)...)
}

// dieChart draws log |I| of the die's data (dots) and fit (line) in w x h
// cells, with the axis titles.
func (m Model) dieChart(d *dieFit, w, h int) []string {
	st, g := m.e.st, m.e.g
	meas := fit.MeasuredCurve(d.ds)
	if len(meas.Series) == 0 || h < 7 || w < 20 {
		return nil
	}
	dot := g.point
	srcs := []plotLine{
		{label: "fit", xs: d.view.Curve.Xs, ys: d.view.Curve.Series[0].Y, paint: st.series[0], marker: g.markers[0]},
		{label: "measured", xs: meas.Xs, ys: meas.Series[0].Y, paint: st.series[1], marker: dot, dots: true},
	}
	ph := h - 3
	ys, ok := logCurrent(srcs, ph)
	if !ok {
		return nil
	}
	xlo, xhi := minMax(meas.Xs, 1)
	xs := exactScale(xlo, xhi, max(2, w/12))
	out := []string{st.series[1].Paint(dot) + " measured  " + st.series[0].Paint(g.markers[0]) + " fit", st.muted.Paint("|current I| (A, log scale)")}
	out = append(out, renderPlot(srcs, xs, ys, w, ph, m.e)...)
	return append(out, st.muted.Paint(padLeft("bias V (V)", w)))
}
