package tui

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/charmbracelet/x/exp/golden"
	"github.com/charmbracelet/x/exp/teatest"

	"junco/model"
	"junco/sessions"
)

// runProgram runs the workbench as a program at w x h, sends the keys,
// quits, and returns the final model's view without escape codes (the
// renderer has no colour).
func runProgram(t *testing.T, o Options, w, h int, keys ...string) string {
	t.Helper()
	o.Renderer = plainRenderer()
	o.syncCharts = true
	tm := teatest.NewTestModel(t, New(o), teatest.WithInitialTermSize(w, h))
	for _, k := range keys {
		tm.Send(keyMsg(k))
	}
	if err := tm.Quit(); err != nil {
		t.Fatal(err)
	}
	fm := tm.FinalModel(t, teatest.WithFinalTimeout(5*time.Second))
	m, ok := fm.(Model)
	if !ok {
		t.Fatalf("final model is %T", fm)
	}
	return ansi.Strip(m.View())
}

func TestGolden(t *testing.T) {
	screens := []struct {
		name string
		o    Options
		keys []string
	}{
		{"define", Options{}, nil},
		{"doping-bad-value", Options{}, []string{"2", "down", "enter", "ctrl+u", "1", "e", "2", "5"}},
		{"results", Options{}, []string{"tab"}},
		{"chart-iv-log", Options{}, []string{"tab", "tab", "l"}},
		{"chart-iv", Options{}, []string{"tab", "tab"}},
		{"chart-cv", Options{}, []string{"tab", "tab", "l", "l"}},
		{"chart-field-split", Options{}, []string{"tab", "tab", "l", "l", "l", "l", "l", "l"}},
		{"chart-iv-log-cursor-zoom", Options{}, []string{"tab", "tab", "l", "c", ">", ">", ">", "+"}},
		{"chart-bands-ascii", Options{ASCII: true}, []string{"tab", "tab", "l", "l", "l", "l", "l", "l", "l", "l"}},
		{"pinned-results", Options{}, []string{"p", "5", "down", "enter", "ctrl+u", "0", ".", "6", "enter", "tab"}},
		{"help", Options{}, []string{"?"}},
		{"help-end", Options{}, []string{"?", "G"}},
		{"define-lifetimes", Options{}, []string{"4"}},
		{"conditions-from-charts", Options{}, []string{"tab", "tab", "5", "down", "down"}},
		{"quit-question", Options{}, []string{"5", "enter", "ctrl+u", "3", "1", "0", "enter", "q"}},
	}
	for _, size := range goldenSizes {
		for _, s := range screens {
			name := fmt.Sprintf("%s-%dx%d", s.name, size[0], size[1])
			t.Run(name, func(t *testing.T) {
				out := runProgram(t, s.o, size[0], size[1], s.keys...)
				golden.RequireEqual(t, []byte(out))
			})
		}
	}
}

// goldenSizes are the terminal sizes every golden screen is drawn at: the
// smallest usual terminal, a laptop's, a wide monitor's.
var goldenSizes = [][2]int{{80, 24}, {120, 40}, {200, 60}}

// A real program (curves computed in commands) shows the chart after the
// keys that open it, and quits through its own keys.
func TestProgramDrawsChartsAndQuits(t *testing.T) {
	tm := teatest.NewTestModel(t, New(Options{Renderer: plainRenderer()}), teatest.WithInitialTermSize(100, 30))
	tm.Send(keyMsg("tab"))
	tm.Send(keyMsg("tab"))
	tm.Send(keyMsg("l"))
	teatest.WaitFor(t, tm.Output(), func(b []byte) bool {
		return bytes.Contains(b, []byte("log scale")) && bytes.Contains(b, []byte("1e-"))
	}, teatest.WithDuration(5*time.Second))
	tm.Send(keyMsg("q"))
	tm.WaitFinished(t, teatest.WithFinalTimeout(5*time.Second))
	m := tm.FinalModel(t).(Model)
	if m.chart.pending() || m.chart.kind().id != "iv-log" || m.chart.plot == nil {
		t.Errorf("final chart: %s pending=%v drawn=%v", m.chart.kind().id, m.chart.pending(), m.chart.plot != nil)
	}
}

// The program quits through its own keys, not only through the test's Quit.
func TestProgramQuitsOnQ(t *testing.T) {
	tm := teatest.NewTestModel(t, New(Options{Renderer: plainRenderer()}), teatest.WithInitialTermSize(80, 24))
	tm.Send(keyMsg("q"))
	tm.WaitFinished(t, teatest.WithFinalTimeout(5*time.Second))
	var _ tea.Model = tm.FinalModel(t)
}

// goldenStore is a store with three sessions (one of two revisions) and a
// damaged entry, all saved at fixed times.
func goldenStore(t *testing.T) *sessions.Store {
	t.Helper()
	st := newStore(t, "alice")
	spec := model.DemoJunction().Spec
	storeSession(t, st, "d7-lot417", "test diode D7, lot 417, as probed", spec)
	saveNext(t, st, "d7-lot417", -5)
	spec.AcceptorDensity = 1e23
	storeSession(t, st, "d7-lowdope", "D7 with a lighter p+ layer", spec)
	spec.Temperature = 350
	storeSession(t, st, "hot-bench", "hot-chuck run at 350 K", spec)
	brokenEntry(t, st)
	return st
}

// brokenEntry adds a session "broken" whose only revision cannot be read.
func brokenEntry(t *testing.T, st *sessions.Store) {
	t.Helper()
	broken := filepath.Join(st.Root(), "sessions", "broken")
	if err := os.MkdirAll(broken, 0o755); err != nil {
		t.Fatal(err)
	}
	writeText(t, filepath.Join(broken, "rev-000001.json"), `{"schema": 1, "meta": {`)
}

// TestGoldenSessions pins the session browser and review mode.
func TestGoldenSessions(t *testing.T) {
	screens := []struct {
		name string
		o    func(t *testing.T) Options
		keys []string
	}{
		{"browser", func(t *testing.T) Options {
			return Options{Store: goldenStore(t), User: "alice", Now: ticking()}
		}, []string{"ctrl+o"}},
		{"browser-filtered", func(t *testing.T) Options {
			return Options{Store: goldenStore(t), User: "alice", Now: ticking()}
		}, []string{"ctrl+o", "d", "7", "down"}},
		{"review", func(t *testing.T) Options {
			var a, c []string
			return reviewOpts(&a, &c, newStore(t, "bob"))
		}, []string{"2", "down", "enter"}},
		{"review-notes", func(t *testing.T) Options {
			var a, c []string
			return reviewOpts(&a, &c, newStore(t, "bob"))
		}, []string{"tab"}},
		{"history-notes", func(t *testing.T) Options {
			return Options{Store: diffStore(t), User: "alice", Now: ticking()}
		}, []string{"ctrl+o", "tab"}},
		{"diff", func(t *testing.T) Options {
			return Options{Store: diffStore(t), User: "alice", Now: ticking()}
		}, []string{"ctrl+o", "tab", "d"}},
		{"draft-offer", func(t *testing.T) Options {
			return Options{Store: draftStore(t), User: "alice", Now: ticking()}
		}, nil},
	}
	for _, size := range goldenSizes {
		for _, s := range screens {
			name := fmt.Sprintf("%s-%dx%d", s.name, size[0], size[1])
			t.Run(name, func(t *testing.T) {
				out := runProgram(t, s.o(t), size[0], size[1], s.keys...)
				golden.RequireEqual(t, []byte(out))
			})
		}
	}
}

// diffStore is a store with one session of two revisions: the second
// changes the doping and the temperature and adds a note, saved with it.
func diffStore(t *testing.T) *sessions.Store {
	t.Helper()
	st := newStore(t, "alice")
	doc := storeSession(t, st, "d7-lot417", "test diode D7, lot 417, as probed", model.DemoJunction().Spec)
	doc.Spec.AcceptorDensity, doc.Spec.Temperature = 2e24, 320
	doc.Notes = append(doc.Notes, "2025-03-14 10:00 UTC, alice: warmer chuck, heavier p+ implant")
	doc.Meta.Note = "warmer chuck, heavier p+ implant"
	if _, err := st.Save("d7-lot417", doc, 1); err != nil {
		t.Fatal(err)
	}
	return st
}

// draftStore is a store with a recovery draft of an unnamed junction whose
// acceptor doping and electron lifetime were changed.
func draftStore(t *testing.T) *sessions.Store {
	t.Helper()
	st := newStore(t, "alice")
	spec := model.DemoJunction().Spec
	spec.AcceptorDensity, spec.ElectronLifetime = 1e23, 2e-6
	doc := sessions.NewDocument("test diode D7", "alice", spec, t0)
	if err := st.SaveDraft(sessions.UnnamedDraft, sessions.DraftKey{Editor: sessions.EditorID("alice")}, 0, doc); err != nil {
		t.Fatal(err)
	}
	return st
}
