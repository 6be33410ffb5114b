package tui

import (
	"math"
	"strings"
	"testing"
)

// editSweep opens the sweep editor of the current chart and types the
// given FROM, TO and STEP, then applies them.
func editSweep(m Model, from, to, step string) Model {
	m = press(m, "r", "ctrl+u")
	m = typeText(m, from)
	m = press(m, "tab", "ctrl+u")
	m = typeText(m, to)
	m = press(m, "tab", "ctrl+u")
	m = typeText(m, step)
	return press(m, "enter")
}

// An absurd sweep is refused with the limit named, and the workbench
// keeps running (it used to panic in makeslice and drop a served
// connection).
func TestSweepEditorRefusesHugeSweep(t *testing.T) {
	m := newTest(t, 160, 30)
	m = press(m, "tab", "tab")
	m = editSweep(m, "0", "1e30", "1")
	v := plain(m)
	if !strings.Contains(v, "MaxChartPoints") || !strings.Contains(v, "2001") {
		t.Fatalf("a sweep of 1e30 points was not refused with the limit named:\n%s", v)
	}
}

// A Celsius step is a difference: 0C to 100C in 10C steps is 11 points
// 10 K apart, as on the command line (the step used to be read as
// 283.15 K, leaving one point).
func TestSweepEditorCelsiusStep(t *testing.T) {
	m := newTest(t, 100, 30)
	m = press(m, "tab", "tab")
	for i := 0; i < 20 && m.chart.kind().sweep != sweepTemp; i++ {
		m = press(m, "l")
	}
	if m.chart.kind().sweep != sweepTemp {
		t.Fatal("no temperature chart found")
	}
	m = editSweep(m, "0C", "100C", "10C")
	r := m.chart.temp
	n, err := r.Count(maxChartPoints)
	if err != nil || n != 11 || math.Abs(r.From-273.15) > 1e-9 || math.Abs(r.Step-10) > 1e-12 {
		t.Fatalf("0C:100C:10C gave %+v (%d points, %v), want 273.15 K to 373.15 K in 10 K steps, 11 points:\n%s", r, n, err, plain(m))
	}
}
