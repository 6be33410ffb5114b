package tui

import (
	"fmt"
	"math"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
)

// arrheniusState is the temperature screen: the I-V data sets at several
// temperatures, fitted one by one, and the activation energy of their
// saturation currents. gamma is the exponent typed for the prefactor
// T^(3+gamma/2).
type arrheniusState struct {
	ed       lineEditor
	gamma    float64
	gammaErr string
	view     *fit.ArrheniusView
	err      string
}

// openArrhenius fits the session's I-V data sets and shows the screen.
func (m *Model) openArrhenius() {
	if len(m.ivMeasurements()) == 0 {
		m.note = "no I-V data set in the session: i imports one (two or more temperatures are needed)"
		return
	}
	m.arr = arrheniusState{ed: newLineEditor("0")}
	m.screen = screenArrhenius
	m.refitArrhenius()
}

// refitArrhenius runs the analysis with the gamma in force.
func (m *Model) refitArrhenius() {
	a := &m.arr
	var in []fit.ArrheniusInput
	for _, i := range m.ivMeasurements() {
		in = append(in, fit.ArrheniusInput{ID: m.sess.meas[i].ID, DataSet: &m.sess.meas[i].DataSet})
	}
	a.view, a.err = nil, ""
	v, err := fit.Arrhenius(in, a.gamma)
	a.view = v
	if err != nil {
		a.err = err.Error()
	}
}

// applyGamma reads the gamma field (empty: 0).
func (m *Model) applyGamma() {
	a := &m.arr
	a.gammaErr = ""
	s := strings.TrimSpace(a.ed.value())
	g := 0.0
	if s != "" {
		v, err := model.ParseValue(model.Dimensionless, s)
		switch {
		case err != nil:
			a.gammaErr = "gamma: " + err.Error()
		case math.Abs(v) > 20:
			a.gammaErr = "gamma: between -20 and 20"
		}
		if a.gammaErr != "" {
			return
		}
		g = v
	}
	a.gamma = g
	m.refitArrhenius()
}

func (m Model) arrheniusKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	switch {
	case keyIs(km, k.Dismiss):
		m.screen = screenMain
		return m, nil
	case keyIs(km, k.Submit):
		m.applyGamma()
		return m, nil
	}
	m.arr.ed.handle(km)
	return m, nil
}

// arrheniusTableWidth is the width of the table beside the chart.
const arrheniusTableWidth = 46

// arrheniusScreen draws the gamma field, the Arrhenius chart and the
// table of temperatures and the activation energy.
func (m Model) arrheniusScreen(w, h int) []string {
	st, g := m.e.st, m.e.g
	a := m.arr
	out := []string{rule("Activation energy of Is from the I-V data sets", w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	out = append(out, "prefactor T^(3+gamma/2), gamma "+st.text.Paint("["+a.ed.view(7, st.selected, " ")+"]")+
		st.muted.Paint(fmt.Sprintf("  (in force %g, exponent %g)", a.gamma, 3+a.gamma/2)))
	if a.gammaErr != "" {
		out = append(out, st.err.Paint(cut(g.bad+" "+a.gammaErr, w, g.ellipsis)))
	} else {
		out = append(out, "")
	}
	tw := arrheniusTableWidth
	cw, ch := w-tw-2, h-3
	beside := w >= 90
	if !beside {
		tw, cw, ch = w, w, h-3-10
	}
	chart := m.arrheniusChart(cw, ch)
	table := m.arrheniusTable(tw)
	if beside {
		out = append(out, joinColumns(" "+st.faint.Paint(g.vbar), block(chart, cw, ch, g.ellipsis), table)...)
	} else {
		out = append(out, block(chart, cw, max(ch, 0), g.ellipsis)...)
		out = append(out, table...)
	}
	return block(out, w, h, g.ellipsis)
}

// arrheniusChart draws ln(Is/T^x) against 1000/T: the points and the line.
func (m Model) arrheniusChart(cw, ch int) []string {
	st, g := m.e.st, m.e.g
	v := m.arr.view
	used := v.Used()
	if len(used) == 0 || cw < 16 || ch < 8 {
		return []string{st.muted.Paint("(no chart: enlarge the terminal, or no temperatures to draw)")}
	}
	dotMark := "+"
	if !m.e.ascii {
		dotMark = "•"
	}
	items := []string{st.series[1].Paint(dotMark) + " fitted Is of each data set"}
	var xs, ys []float64
	for _, r := range used {
		xs = append(xs, r.InverseKiloKelvin)
		ys = append(ys, r.LnReducedSaturationA)
	}
	var lines []plotLine
	allY := append([]float64(nil), ys...)
	if v.Fit != nil {
		items = append(items, st.series[0].Paint(g.markers[0])+" Arrhenius line")
		lines = append(lines, plotLine{label: "line", xs: v.LineX[:], ys: v.LineY[:], paint: st.series[0], marker: g.markers[0]})
		allY = append(allY, v.LineY[:]...)
	}
	lines = append(lines, plotLine{label: "measured", xs: xs, ys: ys, paint: st.series[1], marker: dotMark, dots: true})
	legend := flowItems(items, cw, 2)
	ph := ch - len(legend) - 2
	if ph < 5 {
		return []string{st.muted.Paint("(no chart: enlarge the terminal)")}
	}
	xlo, xhi := minMax(xs, 1)
	pad := 0.05 * math.Max(xhi-xlo, 0.1)
	ylo, yhi := minMax(allY, 1)
	ypad := 0.05 * math.Max(yhi-ylo, 0.5)
	plot := renderPlot(lines, linearScale(xlo-pad, xhi+pad, max(2, cw/12)), linearScale(ylo-ypad, yhi+ypad, max(2, ph/3)), cw, ph, m.e)
	x := 3 + m.arr.gamma/2
	out := append([]string{}, legend...)
	out = append(out, st.muted.Paint(fmt.Sprintf("ln(Is/T^%g)  (Is in A, T in K)", x)))
	out = append(out, plot...)
	return append(out, st.muted.Paint(padLeft("1000/T (1/K)", cw)))
}

// arrheniusTable lists the temperatures with their fits and the result.
func (m Model) arrheniusTable(w int) []string {
	st, g := m.e.st, m.e.g
	a := m.arr
	pm := "±"
	if m.e.ascii {
		pm = "+/-"
	}
	var out []string
	if v := a.view; v != nil && v.Fit != nil {
		f := v.Fit
		out = append(out, st.strong.Paint(cut(fmt.Sprintf("Ea  %.3f eV %s %.2g eV", f.ActivationEnergyEV, pm, f.StdErrEV), w, g.ellipsis)),
			cut(fmt.Sprintf("  prefactor T^%g, ln C %.4g %s %.2g", f.Exponent, f.LnPrefactor, pm, f.StdErrLn), w, g.ellipsis),
			cut(fmt.Sprintf("  %d temperatures, RMS ln residual %.3g", f.Points, f.RMSResidual), w, g.ellipsis), "")
	}
	if a.err != "" {
		out = append(out, st.err.Paint(g.bad+" no activation energy:"))
		out = append(out, wrapped(a.err, w, st.err, "  ")...)
		out = append(out, "")
	}
	if a.view != nil {
		out = append(out, st.strong.Paint(cut(fmt.Sprintf("  %-10s %-9s %-11s %s", "data set", "T", "Is", "n"), w, g.ellipsis)))
		for _, r := range a.view.Rows {
			if r.Skip != "" {
				out = append(out, st.muted.Paint(cut(fmt.Sprintf("  %-10s left out: %s", r.ID, r.Skip), w, g.ellipsis)))
				continue
			}
			out = append(out, cut(fmt.Sprintf("  %-10s %-9s %-11s %.3f", cut(r.ID, 10, g.ellipsis), model.Format(model.Temperature, r.TemperatureK, 4, m.e.ascii),
				model.Format(model.Current, r.SaturationCurrentA, 3, m.e.ascii), r.IdealityFactor), w, g.ellipsis))
		}
		for _, n := range a.view.Notes {
			out = append(out, "")
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
	}
	return out
}

// arrheniusHelp is the footer of the temperature screen.
type arrheniusHelp struct{ k KeyMap }

func (h arrheniusHelp) ShortHelp() []key.Binding {
	return []key.Binding{key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "apply gamma")), h.k.Close}
}
func (h arrheniusHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }
