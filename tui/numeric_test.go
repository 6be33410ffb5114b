package tui

import (
	"errors"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
)

// toBands moves the focus to the charts and picks the band diagram.
func toBands(t *testing.T, m Model) Model {
	t.Helper()
	m = press(m, "tab", "tab")
	for i := 0; i < len(m.chart.kinds) && m.chart.kind().id != "bands"; i++ {
		m = press(m, "right")
	}
	if m.chart.kind().id != "bands" {
		t.Fatalf("no band chart")
	}
	return m
}

func update(m Model, msg tea.Msg) (Model, tea.Cmd) {
	tm, cmd := m.Update(msg)
	return tm.(Model), cmd
}

func TestSolverModeOverlayAndReadout(t *testing.T) {
	m := toBands(t, newTest(t, 120, 40))
	if v := m.View(); strings.Contains(v, "(numeric)") || strings.Contains(v, "analytic vs numeric") {
		t.Fatalf("analytic mode shows solver output:\n%s", v)
	}
	m, cmd := update(m, keyMsg("m"))
	if !m.chart.num.on || !m.chart.num.solving || cmd == nil {
		t.Fatalf("m did not start a solve: on %v solving %v", m.chart.num.on, m.chart.num.solving)
	}
	if v := m.View(); !strings.Contains(v, "solving") {
		t.Fatalf("no solving state:\n%s", v)
	}
	m = drain(m, cmd)
	if m.chart.num.solving || m.chart.num.err != "" {
		t.Fatalf("solve did not finish: %q", m.chart.num.err)
	}
	v := m.View()
	for _, want := range []string{"Efn (numeric)", "Efp (numeric)", "Ec (analytic)", "analytic vs numeric", "depletion width", "built-in potential", "%"} {
		if !strings.Contains(v, want) {
			t.Errorf("solver view lacks %q:\n%s", want, v)
		}
	}
	// The demo differs by far more than 5 %: marked.
	if !strings.Contains(v, "not to be trusted") {
		t.Errorf("no distrust marker:\n%s", v)
	}
	// Switching charts does not solve again.
	m2, cmd := update(m, keyMsg("right"))
	if m2.chart.num.solving {
		t.Errorf("changing the chart re-solved")
	}
	_ = cmd
	// The carrier chart exists in solver mode only.
	found := false
	for _, k := range m.chart.kinds {
		found = found || k.id == "carriers"
	}
	if !found {
		t.Errorf("no carrier chart in solver mode")
	}
	m = press(m, "m")
	if m.chart.num.on || strings.Contains(m.View(), "(numeric)") {
		t.Errorf("m did not switch back")
	}
	for _, k := range m.chart.kinds {
		if k.id == "carriers" {
			t.Errorf("carrier chart left in analytic mode")
		}
	}
}

func TestSolverStaleAnswerDropped(t *testing.T) {
	m := toBands(t, newTest(t, 120, 40))
	m, first := update(m, keyMsg("m"))
	old := first().(solveDoneMsg)
	// A newer request supersedes the first.
	m.chart.num.asked = nil
	m.chart.solveRequest(m.form.spec, m.form.res)
	m, _ = update(m, old)
	if !m.chart.num.solving || m.chart.num.curves != nil {
		t.Fatalf("a stale answer was taken")
	}
	if strings.Contains(m.View(), "Efn (numeric)") {
		t.Errorf("stale numbers shown as current")
	}
	old.seq = m.chart.num.seq
	m, _ = update(m, old)
	if m.chart.num.solving || !strings.Contains(m.View(), "Efn (numeric)") {
		t.Errorf("the current answer was not taken")
	}
}

func TestSolverErrorInPlace(t *testing.T) {
	m := toBands(t, newTest(t, 120, 40))
	m, _ = update(m, keyMsg("m"))
	m, _ = update(m, solveDoneMsg{seq: m.chart.num.seq, err: errors.New("no convergence at\n0.7 V")})
	v := m.View()
	if !strings.Contains(v, "no drift-diffusion solution: no convergence at 0.7 V") {
		t.Fatalf("error not shown in place:\n%s", v)
	}
	if strings.Contains(v, "(numeric)") || strings.Contains(v, "analytic vs numeric") {
		t.Errorf("numbers shown with the error:\n%s", v)
	}
	// The solver-only chart says why it is empty.
	for m.chart.kind().id != "carriers" {
		m = press(m, "right")
	}
	if !strings.Contains(m.View(), "no drift-diffusion solution") {
		t.Errorf("carrier chart lacks the error:\n%s", m.View())
	}
}

func TestSolverRefusedInput(t *testing.T) {
	s := model.DemoJunction().Spec
	s.Area = -1
	msg := runSolve(t.Context(), 1, s, nil)
	if msg.err == nil {
		t.Skip("the solver accepts this junction")
	}
	m := toBands(t, newTest(t, 120, 40))
	m, _ = update(m, keyMsg("m"))
	msg.seq = m.chart.num.seq
	m, _ = update(m, msg)
	if m.chart.num.err == "" || !strings.Contains(m.View(), m.e.g.bad) {
		t.Errorf("refusal not shown: %q", m.chart.num.err)
	}
}

func TestSolverSmallTerminal(t *testing.T) {
	m := toBands(t, newTest(t, 80, 24))
	m = press(m, "m")
	v := m.View()
	if v == "" || !strings.Contains(v, "largest difference") {
		t.Errorf("no one-line readout at 80 x 24:\n%s", v)
	}
	for _, sz := range [][2]int{{40, 12}, {16, 8}, {0, 0}} {
		m, _ = update(m, tea.WindowSizeMsg{Width: sz[0], Height: sz[1]})
		if m.View() == "" {
			t.Errorf("empty view at %v", sz)
		}
	}
}
