package tui

import (
	"strings"
	"testing"
)

// At 120x40 (charts beside the definition) no chart title is cut: a title
// longer than the panel wraps onto a second line; and with the cursor on,
// the readout gives every series of the I-V chart its value, on as many
// lines as it needs.
func TestChartTitlesAndReadoutWhole(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "tab", "tab")
	// The charts panel: the right side of each line.
	right := func(m Model) string {
		var b strings.Builder
		lines := strings.Split(plain(m), "\n")
		for _, l := range lines[1 : len(lines)-1] { // not the title bar and footer
			if r := []rune(l); len(r) > m.w-m.chart.w {
				b.WriteString(string(r[m.w-m.chart.w:]) + "\n")
			}
		}
		return b.String()
	}
	for i := range m.chart.kinds {
		s := flat(right(m))
		if strings.Contains(s, "…") {
			t.Errorf("chart %d: a line is cut:\n%s", i+1, right(m))
		}
		if !strings.Contains(s, flat(m.chart.title)) {
			t.Errorf("chart %d: title %q not whole:\n%s", i+1, m.chart.title, plain(m))
		}
		m = press(m, "right")
	}
	m = press(m, "c", ".")
	s := flat(right(m))
	for _, ser := range m.chart.shown.Series {
		if !strings.Contains(s, ser.Label+" ") {
			t.Errorf("readout lacks %q:\n%s", ser.Label, plain(m))
		}
	}
	if strings.Contains(strings.Join(m.chart.cursorLines(m.chart.w), "\n"), "…") {
		t.Errorf("readout cut: %q", m.chart.cursorLines(m.chart.w))
	}
}
