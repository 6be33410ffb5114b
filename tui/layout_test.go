package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"
)

// The focused panel gets the width it needs: at every usual terminal size
// the definition shows every label and choice whole, and the results every
// label, symbol, value and change against a pin; the sheet's status stays
// on its first lines (never a fragment of it).
func TestFocusedPanelCutsNoWord(t *testing.T) {
	for _, size := range goldenSizes {
		m := newTest(t, size[0], size[1])
		for step := 1; step <= 5; step++ {
			m = press(m, string(rune('0'+step)))
			f := m.form
			f.SetSize(f.w, 400) // every field in view: this checks widths
			v := ansi.Strip(f.View())
			for _, i := range m.form.stepFields(m.form.step) {
				d := m.form.defs[i]
				if !strings.Contains(v, d.label) {
					t.Errorf("%v step %d: label %q cut:\n%s", size, step, d.label, v)
				}
				if d.choice && !strings.Contains(v, choiceLabel(d, m.form.spec)) {
					t.Errorf("%v step %d: choice %q cut:\n%s", size, step, choiceLabel(d, m.form.spec), v)
				}
			}
		}
		// Results with a pin, scrolled through to the end.
		m = press(m, "p", "5", "down", "enter", "ctrl+u")
		m = typeText(m, "0.6")
		m = press(m, "enter", "tab")
		if m.focus != panelResults {
			t.Fatalf("%v: focus %d", size, m.focus)
		}
		all := ansi.Strip(strings.Join(append(append([]string(nil), m.sheet.head...), m.sheet.built...), "\n"))
		if strings.Contains(all, m.e.g.ellipsis) {
			for _, l := range strings.Split(all, "\n") {
				if strings.Contains(l, m.e.g.ellipsis) {
					t.Errorf("%v: the focused results cut %q", size, l)
				}
			}
		}
		for _, q := range m.Result().Quantities {
			d, p := deltaText(q, m.pin, false)
			for _, want := range []string{q.Symbol, q.Text(4, false), d, p} {
				if !strings.Contains(all, want) {
					t.Errorf("%v: results with a pin lack %q (%s)", size, want, q.Key)
				}
			}
		}
		m = press(m, "G")
		first := ansi.Strip(m.sheet.lines()[0])
		if !strings.HasPrefix(strings.TrimSpace(first), m.e.g.good+" live") {
			t.Errorf("%v: the sheet's first line scrolled away: %q", size, first)
		}
	}
}
