package tui

import (
	"fmt"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/sessions"
)

// busiest makes m (a workbench at 200 x 60) the fullest screen: all
// three panels, a pin, and the logarithmic I-V chart with its overlay.
func busiest(b *testing.B, m Model) Model {
	m = press(m, "p")
	m = editField(m, "5", 1, "0.6")
	m = press(m, "enter", "tab", "tab", "l", "shift+tab", "shift+tab")
	if !m.visible(panelCharts) || m.pin == nil || m.chart.kind().id != "iv-log" {
		b.Fatal("not the busiest screen")
	}
	return m
}

// keystrokes times b.N keystrokes that change the value typed into the
// bias field of m, and returns the workbench after them.
func keystrokes(b *testing.B, m Model) Model {
	m = press(m, "5", "down", "enter") // typing in the bias field
	keys := []tea.KeyMsg{keyMsg("1"), keyMsg("backspace")}
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		tm, _ := m.Update(keys[i%2])
		m = tm.(Model)
	}
	b.StopTimer()
	return m
}

var sinkView string

// views times b.N draws of m.
func views(b *testing.B, m Model) {
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		sinkView = m.View()
	}
}

// BenchmarkViewBusiest200x60 draws the busiest screen.
func BenchmarkViewBusiest200x60(b *testing.B) { views(b, busiest(b, newTest(b, 200, 60))) }

// BenchmarkKeystroke200x60 handles one keystroke that changes a value
// while everything is shown: parse, validate, evaluate, update the sheet
// and recompute and redraw the chart (and its pinned overlay).
func BenchmarkKeystroke200x60(b *testing.B) {
	m := keystrokes(b, busiest(b, newTest(b, 200, 60)))
	if !m.chart.pending() {
		b.Fatal("keystrokes did not ask for new curves")
	}
	if m.form.rev < 2 {
		b.Fatal("keystrokes did not change the junction")
	}
}

// BenchmarkChartRedraw200x60 computes and draws the busiest chart (the
// log I-V with a pinned overlay, 181 bias points each): the work that a
// change sets off in a command and that lands in Update when done.
func BenchmarkChartRedraw200x60(b *testing.B) {
	m := busiest(b, newTest(b, 200, 60))
	req := m.chart.makeRequest()
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		d := computeChart(req)
		m.chart.data = &d
		m.chart.render()
	}
}

// BenchmarkChartRender200x60 draws the chart from curves at hand (what a
// resize or a change of drawing mode costs).
func BenchmarkChartRender200x60(b *testing.B) {
	m := busiest(b, newTest(b, 200, 60))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		m.chart.render()
	}
}

// BenchmarkKeystroke80x24 is the same on a small terminal (definition
// panel only).
func BenchmarkKeystroke80x24(b *testing.B) { keystrokes(b, newTest(b, 80, 24)) }

// BenchmarkKeystrokeWithStore200x60 is BenchmarkKeystroke200x60 with a
// session store: the keystroke also decides whether the draft timer
// starts.
func BenchmarkKeystrokeWithStore200x60(b *testing.B) {
	m := busiest(b, start(New(opts(newStore(b, "alice"), "alice", 200, 60))))
	if !m.Dirty() {
		b.Fatal("not the busiest screen with unsaved changes")
	}
	m = keystrokes(b, m)
	if !m.sess.draftPending {
		b.Fatal("keystrokes did not start the draft timer")
	}
}

// BenchmarkViewBrowser200x60 draws the session browser with 60 sessions.
func BenchmarkViewBrowser200x60(b *testing.B) {
	st := newStore(b, "alice")
	spec := model.DemoJunction().Spec
	for i := 0; i < 60; i++ {
		doc := sessions.NewDocument(fmt.Sprintf("run %d", i), "alice", spec, t0)
		if _, err := st.Save(fmt.Sprintf("run-%02d", i), doc, 0); err != nil {
			b.Fatal(err)
		}
	}
	m := press(New(opts(st, "alice", 200, 60)), "ctrl+o")
	if shown(m) != "browse" || len(onTop[browseScreen](m).list) != 60 {
		b.Fatal("not the browser")
	}
	views(b, m)
}
