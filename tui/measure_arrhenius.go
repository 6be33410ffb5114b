package tui

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
)

// arrheniusScreen is the temperature screen: the I-V data sets at
// several temperatures, fitted one by one, and the activation energy of
// their saturation currents. gamma is the exponent of D/tau in T typed by
// the user (the prefactor is T^(3+gamma/2)); the user picks the data sets
// that enter the fit.
type arrheniusScreen struct {
	ed       lineEditor
	gamma    float64
	gammaErr string
	view     *fit.ArrheniusView
	err      string
	// cursor is the data set under the cursor (index into the session's
	// I-V data sets); off holds the IDs the user left out (space).
	cursor int
	off    map[string]bool
}

// openArrhenius fits the session's I-V data sets and shows the screen.
func (m *Model) openArrhenius() {
	if len(m.ivMeasurements()) == 0 {
		m.note = "no I-V data set in the session: i imports one (two or more temperatures are needed)"
		return
	}
	a := &arrheniusScreen{ed: newLineEditor("0"), off: map[string]bool{}}
	a.refit(*m)
	m.push(a)
}

// refit runs the analysis with the gamma in force.
func (a *arrheniusScreen) refit(m Model) {
	var in []fit.ArrheniusInput
	for _, i := range m.ivMeasurements() {
		if a.off[m.sess.meas[i].ID] {
			continue
		}
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
func (a *arrheniusScreen) applyGamma(m Model) {
	a.gammaErr = ""
	s := strings.TrimSpace(a.ed.value())
	g := 0.0
	if s != "" {
		v, err := strconv.ParseFloat(s, 64)
		switch {
		case err != nil || math.IsNaN(v):
			a.gammaErr = fmt.Sprintf("g (exponent of D/tau): %q is not a number", s)
		case math.Abs(v) > 20:
			a.gammaErr = "g (exponent of D/tau): between -20 and 20"
		}
		if a.gammaErr != "" {
			return
		}
		g = v
	}
	a.gamma = g
	a.refit(m)
}

// arrheniusKeys is the key map of the temperature screen.
type arrheniusKeys struct{ Apply, Choose, Up, Down, Toggle, Close key.Binding }

func (k KeyMap) arrheniusKeys() arrheniusKeys {
	return arrheniusKeys{Apply: key.NewBinding(key.WithKeys("enter"), key.WithHelp("enter", "apply g")),
		Choose: key.NewBinding(key.WithKeys("up", "down"), key.WithHelp("↑/↓", "data set")),
		Up:     k.ListUp, Down: k.ListDown,
		Toggle: key.NewBinding(key.WithKeys(" "), key.WithHelp("space", "use or leave out")), Close: k.Close}
}

func (k arrheniusKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Apply, k.Choose, k.Toggle, k.Close}
}

// FullHelp is every key of the activation-energy screen, for the help
// screen (Choose stands for Up and Down).
func (k arrheniusKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (a *arrheniusScreen) footer(m Model) []key.Binding { return m.e.keys.arrheniusKeys().ShortHelp() }

func (a *arrheniusScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.arrheniusKeys()
	switch {
	case keyIs(km, k.Close):
		m.close(a)
	case keyIs(km, k.Apply):
		a.applyGamma(*m)
	case keyIs(km, k.Up):
		a.cursor = max(0, a.cursor-1)
	case keyIs(km, k.Down):
		a.cursor = min(len(m.ivMeasurements())-1, a.cursor+1)
	case keyIs(km, k.Toggle):
		if ids := m.ivMeasurements(); a.cursor < len(ids) {
			id := m.sess.meas[ids[a.cursor]].ID
			a.off[id] = !a.off[id]
			a.refit(*m)
		}
	default:
		a.ed.handle(km)
	}
	return nil
}

// arrheniusTableWidth is the width of the table beside the chart.
const arrheniusTableWidth = 46

// view draws the gamma field, the Arrhenius chart and the table of
// temperatures and the activation energy.
func (a *arrheniusScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	out := []string{rule("Activation energy of Is from the I-V data sets", w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	out = append(out, "D/tau ~ T^g, g "+st.text.Paint("["+a.ed.view(7, st.selected, " ")+"]")+
		st.muted.Paint(fmt.Sprintf("  (in force %g: prefactor T^(3+g/2) = T^%g)", a.gamma, 3+a.gamma/2)))
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
	chart := a.chart(m, cw, ch)
	table := a.table(m, tw)
	if beside {
		out = append(out, joinColumns(" "+st.faint.Paint(g.vbar), block(chart, cw, ch, g.ellipsis), table)...)
	} else {
		out = append(out, block(chart, cw, max(ch, 0), g.ellipsis)...)
		out = append(out, table...)
	}
	return block(out, w, h, g.ellipsis)
}

// chart draws ln(Is/T^x) against 1000/T: the points and the line.
func (a *arrheniusScreen) chart(m Model, cw, ch int) []string {
	st, g := m.e.st, m.e.g
	v := a.view
	used := v.Used()
	if len(used) == 0 || cw < 16 || ch < 8 {
		return []string{st.muted.Paint("(no chart: enlarge the terminal, or no temperatures to draw)")}
	}
	dotMark := g.point
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
	x := 3 + a.gamma/2
	out := append([]string{}, legend...)
	out = append(out, st.muted.Paint(fmt.Sprintf("ln(Is/T^%g)  (Is in A, T in K)", x)))
	out = append(out, plot...)
	return append(out, st.muted.Paint(padLeft("1000/T (1/K)", cw)))
}

// table lists the temperatures with their fits and the result.
func (a *arrheniusScreen) table(m Model, w int) []string {
	st, g := m.e.st, m.e.g
	pm := g.plusMinus
	var out []string
	if v := a.view; v != nil && v.Fit != nil {
		f := v.Fit
		out = append(out, st.strong.Paint(cut(fmt.Sprintf("Ea  %.3f eV %s %.2g eV", f.ActivationEnergyEV, pm, f.StdErrEV), w, g.ellipsis)),
			cut(fmt.Sprintf("  prefactor T^%g, ln C %.4g %s %.2g", f.Exponent, f.LnPrefactor, pm, f.StdErrLn), w, g.ellipsis),
			cut(fmt.Sprintf("  %d temperatures, RMS ln residual %.3g", f.Points, f.RMSResidual), w, g.ellipsis))
		if !math.IsNaN(f.ReducedChiSquare) {
			out = append(out, cut(fmt.Sprintf("  reduced chi-square %.3g (se widened by its root when above 1)", f.ReducedChiSquare), w, g.ellipsis))
		}
		out = append(out, "")
	}
	if a.err != "" {
		out = append(out, st.err.Paint(g.bad+" no activation energy:"))
		out = append(out, wrapped(a.err, w, st.err, "  ")...)
		out = append(out, "")
	}
	if a.view != nil {
		rows := map[string]fit.ArrheniusRow{}
		for _, r := range a.view.Rows {
			rows[r.ID] = r
		}
		out = append(out, st.strong.Paint(cut(fmt.Sprintf("    %-10s %-9s %-11s %s", "data set", "T", "Is", "n"), w, g.ellipsis)))
		for k, i := range m.ivMeasurements() {
			id := m.sess.meas[i].ID
			box, cur := "[x]", " "
			if a.off[id] {
				box = "[ ]"
			}
			if k == a.cursor {
				cur = ">"
			}
			head := cur + box + " " + fmt.Sprintf("%-10s", cut(id, 10, g.ellipsis))
			r, ok := rows[id]
			switch {
			case a.off[id]:
				out = append(out, st.muted.Paint(cut(head+" not selected", w, g.ellipsis)))
			case !ok:
			case r.Skip != "":
				out = append(out, st.muted.Paint(cut(head+" left out: "+r.Skip, w, g.ellipsis)))
			default:
				out = append(out, cut(fmt.Sprintf("%s %-9s %-11s %.3f", head, model.Format(model.Temperature, r.TemperatureK, 4, m.e.ascii),
					model.Format(model.Current, r.SaturationCurrentA, 3, m.e.ascii), r.IdealityFactor), w, g.ellipsis))
			}
		}
		for _, n := range a.view.Notes {
			out = append(out, "")
			out = append(out, wrapped(n, w, st.muted, "  ")...)
		}
	}
	return out
}
