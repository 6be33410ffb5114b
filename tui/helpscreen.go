package tui

import (
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
)

// guideText is the getting-started guide of the help screen.
func guideText(g glyphs) []string {
	return []string{
		"The workbench has three panels: Define (the junction, step by step), Results (every computed value with its unit) and Charts. Tab and shift+tab move between them; a wide terminal shows them side by side.",
		"1. The keys 1 to 5 choose a step of Define from any panel: 1 Material, 2 Doping, 3 Geometry, 4 Lifetimes, 5 Conditions. Up and down (or k and j) choose a field.",
		"2. On a number field press enter and type the value, with a unit or without one (a bare number is in the unit named under the field): 1e17, 1e23 m-3, 250um, 27C, -5V. The results follow as you type; enter applies and moves on; esc puts the old value back; x restores the default.",
		"3. On a choice (semiconductor, profile, species, the effect switches) left and right or space change it; enter moves on.",
		"4. A value that is not accepted is marked " + g.bad + " with the allowed range and the reason. The last good value stays in force, and the results say they come from the last valid input.",
		"5. In Results, the saturation current Is is under Currents and the depletion width W under Electrostatics. [n] beside a value points to warning n at the end of the sheet.",
		"6. In Charts, left and right choose among the charts; r edits the sweep (from, to, step), tab moves between its boxes, enter applies.",
		"7. p pins the present result as a reference: every value then shows its change against it and the charts overlay the pinned curve. u drops the pin.",
		"8. a switches between Unicode and plain ASCII drawing. q quits, asking first when there are unsaved changes.",
		"9. m switches the charts between the analytic model and the drift-diffusion solver. In solver mode the potential, field, space-charge and band charts (with the quasi-Fermi levels Efn and Efp) overlay the numeric curve on the analytic one, an extra chart shows the carrier densities, and a table under the chart compares both models; " + g.bad + " marks a difference over 5 %, where the depletion approximation is not to be trusted.",
		"Sessions. ctrl+s saves the junction, its I-V and temperature sweeps, the chart, the pin and the notes as the next revision of its session (the first save asks for a name); S saves as a new session; n adds a dated note. Nothing is overwritten: every save is a new revision. The header says when there are unsaved changes, and a recovery draft of them is kept every few seconds, offered again at the next start.",
		"ctrl+o opens the session browser: type to filter, enter opens, tab shows the revisions of the selected session. There, space marks a revision, d compares the marked (or the previous) revision with the selected one, c compares the selected one with your current edits, r stores an old revision again as the newest, enter opens a revision.",
		"If someone saved the session after you opened it, saving says so and offers the next revision anyway or a copy under a new name; your edits are kept either way.",
		"Review mode shows a colleague's session read-only: every panel and note is there, nothing can be changed. n adds a review note; ctrl+s copies the session into your own sessions, where you can try changes.",
		"Measurements. i imports a CSV or text sweep: type its path, enter shows the columns, units, rows and any rows left out (or the error with its line and column); enter adds it to the session, f adds it and fits it. f fits the newest I-V data set with the single-diode model: the measured points, the fit and the junction's prediction on a log |I| chart, with Is, n, Rs and Rsh and their standard errors; type a window V1 and V2 (tab between them) and press enter to refit, pgup and pgdn choose another data set. ctrl+s saves the data sets with the session.",
		"The numbers come from the depletion approximation and the ideal (Shockley) diffusion currents; flags mark values outside a model's validity. The demo junction is invented demo data.",
	}
}

// helpScreen is the guide and every key, scrolled by off.
type helpScreen struct{ off int }

// openHelp shows the help at its top.
func (m *Model) openHelp() { m.push(&helpScreen{}) }

// helpKeys is the key map of the help screen.
type helpKeys struct {
	scrollKeys
	Back key.Binding
}

func (k KeyMap) helpKeys() helpKeys {
	back := key.NewBinding(key.WithKeys(append([]string{"esc", "q", "enter"}, k.Help.Keys()...)...), key.WithHelp("esc/?", "back"))
	return helpKeys{scrollKeys: k.scrollKeys(), Back: back}
}

func (k helpKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Down, k.Up, k.PageDown, k.Bottom, k.Top, k.Back}
}

// FullHelp is every key of the help screen, for the help screen.
func (k helpKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{append(k.scrollKeys.list(), k.Back)}
}

func (s *helpScreen) footer(m Model) []key.Binding { return m.e.keys.helpKeys().ShortHelp() }

func (s *helpScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.helpKeys()
	if !k.scroll(&s.off, km, m.helpPage(), m.helpEnd()) && keyIs(km, k.Back) {
		m.close(s)
	}
	return nil
}

// helpPage is how far pgdn and space move the help: its height less two
// lines kept for context.
func (m Model) helpPage() int { return max(m.h-2-2, 1) }

// helpEnd is the scroll that shows the end of the help.
func (m Model) helpEnd() int { return max(len(m.helpLines(m.w))-(m.h-2), 0) }

// view draws the guide and every key, scrolled by off.
func (s *helpScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	out := m.helpLines(w)
	off := min(s.off, max(len(out)-h, 0))
	out = out[off:]
	res := block(out, w, h, g.ellipsis)
	if len(out) > h && h > 0 {
		res[h-1] = padRight(st.faint.Paint("  "+g.arrow+" more below (j, space or pgdn; G or end for the end)"), w, "")
	}
	return res
}

// helpLines is the whole help for width w.
func (m Model) helpLines(w int) []string {
	st, g := m.e.st, m.e.g
	var out []string
	out = append(out, rule("Help and guide", w, glyphs{hbar: g.hbarHeavy}, st.heading), "")
	out = append(out, st.strong.Paint("Getting started"))
	for _, p := range guideText(g) {
		for _, l := range wrapText(p, w-2) {
			out = append(out, "  "+l)
		}
	}
	out = append(out, "", st.strong.Paint("Keys"))
	groups := m.helpGroups()
	hm := m.help
	hm.Width = 0
	var cols [][]string
	for _, gr := range groups {
		col := append([]string{st.accent.Paint(gr.title)}, strings.Split(hm.FullHelpView([][]key.Binding{gr.b}), "\n")...)
		cols = append(cols, col)
	}
	// Set as many columns side by side as fit, then the rest below.
	for len(cols) > 0 {
		n, used := 0, 2
		for n < len(cols) {
			cw := colWidth(cols[n]) + 3
			if n > 0 && used+cw > w {
				break
			}
			used += cw
			n++
		}
		row := make([][]string, n)
		hgt := 0
		for i := 0; i < n; i++ {
			hgt = max(hgt, len(cols[i]))
		}
		for i := 0; i < n; i++ {
			row[i] = block(cols[i], colWidth(cols[i]), hgt, g.ellipsis)
		}
		for _, l := range joinColumns("   ", row...) {
			out = append(out, "  "+l)
		}
		out = append(out, "")
		cols = cols[n:]
	}
	return out
}

func colWidth(lines []string) int {
	n := 0
	for _, l := range lines {
		n = max(n, width(l))
	}
	return n
}
