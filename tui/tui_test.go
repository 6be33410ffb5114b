package tui

import (
	"fmt"
	"io"
	"math"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
	"github.com/muesli/termenv"

	"junco/model"
	"junco/physics"
)

// plainRenderer renders without colour, as the golden files are made.
func plainRenderer() *lipgloss.Renderer {
	r := lipgloss.NewRenderer(io.Discard)
	r.SetColorProfile(termenv.Ascii)
	r.SetHasDarkBackground(true)
	return r
}

func newTest(t testing.TB, w, h int) Model {
	t.Helper()
	return start(New(Options{Renderer: plainRenderer(), Width: w, Height: h}))
}

// start runs the model's Init command as a program would.
func start(m Model) Model { return drain(m, m.Init()) }

// drain runs commands as a program would, feeding their messages back,
// until none is left (quit is not acted on).
func drain(m Model, cmd tea.Cmd) Model {
	queue := []tea.Cmd{cmd}
	for len(queue) > 0 {
		c := queue[0]
		queue = queue[1:]
		if c == nil {
			continue
		}
		switch msg := c().(type) {
		case nil, tea.QuitMsg:
		case tea.BatchMsg:
			queue = append(queue, msg...)
		default:
			tm, next := m.Update(msg)
			m = tm.(Model)
			queue = append(queue, next)
		}
	}
	return m
}

// press feeds keys given as names ("enter", "tab", "ctrl+u", ...) or as
// runes of text, running the commands they return.
func press(m Model, keys ...string) Model {
	for _, k := range keys {
		tm, cmd := m.Update(keyMsg(k))
		m = drain(tm.(Model), cmd)
	}
	return m
}

func keyMsg(k string) tea.KeyMsg {
	switch k {
	case "enter":
		return tea.KeyMsg{Type: tea.KeyEnter}
	case "tab":
		return tea.KeyMsg{Type: tea.KeyTab}
	case "shift+tab":
		return tea.KeyMsg{Type: tea.KeyShiftTab}
	case "esc":
		return tea.KeyMsg{Type: tea.KeyEsc}
	case "up":
		return tea.KeyMsg{Type: tea.KeyUp}
	case "down":
		return tea.KeyMsg{Type: tea.KeyDown}
	case "left":
		return tea.KeyMsg{Type: tea.KeyLeft}
	case "right":
		return tea.KeyMsg{Type: tea.KeyRight}
	case "backspace":
		return tea.KeyMsg{Type: tea.KeyBackspace}
	case "ctrl+u":
		return tea.KeyMsg{Type: tea.KeyCtrlU}
	case "ctrl+c":
		return tea.KeyMsg{Type: tea.KeyCtrlC}
	case "pgdown":
		return tea.KeyMsg{Type: tea.KeyPgDown}
	case "pgup":
		return tea.KeyMsg{Type: tea.KeyPgUp}
	case "home":
		return tea.KeyMsg{Type: tea.KeyHome}
	case "end":
		return tea.KeyMsg{Type: tea.KeyEnd}
	case "delete":
		return tea.KeyMsg{Type: tea.KeyDelete}
	case "ctrl+s":
		return tea.KeyMsg{Type: tea.KeyCtrlS}
	case "ctrl+o":
		return tea.KeyMsg{Type: tea.KeyCtrlO}
	case "space":
		return tea.KeyMsg{Type: tea.KeySpace, Runes: []rune{' '}}
	}
	// Any other named key (ctrl+k, f1, ...) by the terminal library's own
	// names: control keys are 0-31 and 127, special keys negative.
	if len([]rune(k)) > 1 {
		for t := tea.KeyType(-200); t <= 127; t++ {
			if t != tea.KeyRunes && t.String() == k {
				return tea.KeyMsg{Type: t}
			}
		}
	}
	return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(k)}
}

// typeText types text into the focused input, one key per rune.
func typeText(m Model, text string) Model {
	for _, r := range text {
		m = press(m, string(r))
	}
	return m
}

func plain(m Model) string { return ansi.Strip(m.View()) }

// flat joins the words of a screen, so that wrapped text can be found.
func flat(s string) string { return strings.Join(strings.Fields(s), " ") }

// editField goes to a step, moves down n fields, clears the field and
// types text (without pressing enter).
func editField(m Model, step string, down int, text string) Model {
	m = press(m, step)
	for i := 0; i < down; i++ {
		m = press(m, "down")
	}
	m = press(m, "enter", "ctrl+u")
	return typeText(m, text)
}

func quantity(t *testing.T, r *model.Result, key string) float64 {
	t.Helper()
	v, ok := r.Get(key)
	if !ok {
		t.Fatalf("result has no %s", key)
	}
	return v
}

func TestDemoOpensLabelled(t *testing.T) {
	m := newTest(t, 80, 24)
	v := plain(m)
	for _, want := range []string{"invented demo data", "Step 1 of 5: Material", "Silicon"} {
		if !strings.Contains(v, want) {
			t.Errorf("first screen lacks %q:\n%s", want, v)
		}
	}
	if m.Dirty() {
		t.Error("a freshly opened demo reports changes")
	}
}

// The result shown must be the model's evaluation of the spec in force.
func TestResultIsModelEvaluationOfSpecInForce(t *testing.T) {
	m := newTest(t, 80, 24)
	m = editField(m, "5", 1, "-3V")
	if got := m.Spec().Bias; got != -3 {
		t.Fatalf("bias in force = %g, want -3", got)
	}
	want, err := model.Evaluate(m.Spec())
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range want.Quantities {
		got := quantity(t, m.Result(), q.Key)
		if !(got == q.Value || math.IsNaN(got) && math.IsNaN(q.Value)) {
			t.Errorf("%s = %g on screen, model gives %g", q.Key, got, q.Value)
		}
	}
	m = press(m, "enter", "tab")
	tm, _ := m.Update(tea.WindowSizeMsg{Width: 100, Height: 120})
	v := plain(tm.(Model))
	w := want.Quantities[0]
	for _, q := range want.Quantities {
		if q.Key == "depletion_width_m" {
			w = q
		}
	}
	if !strings.Contains(v, w.Text(4, false)) {
		t.Errorf("results panel does not show depletion width %s:\n%s", w.Text(4, false), v)
	}
}

func TestBadValueKeepsLastGoodAndSaysSo(t *testing.T) {
	m := newTest(t, 80, 24)
	before := m.Spec().AcceptorDensity
	m = editField(m, "2", 1, "1e25")
	if got := m.Spec().AcceptorDensity; got != before {
		t.Fatalf("out-of-range text changed the value in force: %g, want %g", got, before)
	}
	v := flat(plain(m))
	for _, want := range []string{"Acceptor doping, p side: 1.00e25 cm^-3 is not allowed", "1.00e21 cm^-3", "kept 5.000e", "In force: 5.000e18 cm^-3", "2 Doping!"} {
		if !strings.Contains(v, want) {
			t.Errorf("screen lacks %q:\n%s", want, plain(m))
		}
	}
	if r := flat(plain(press(m, "enter", "tab"))); !strings.Contains(r, "From the last valid input: not in force Acceptor doping, p side") {
		t.Errorf("results do not say they are from the last valid input:\n%s", r)
	}
	// Enter leaves the typed text visible and marked, not lost.
	m = press(m, "enter")
	if !strings.Contains(plain(m), "1e25") || !m.Dirty() {
		t.Errorf("the bad text was lost or not counted as a change:\n%s", plain(m))
	}
	// Fixing it puts it in force.
	m = press(m, "up", "enter", "ctrl+u")
	m = typeText(m, "1e17")
	if got := m.Spec().AcceptorDensity; got != 1e23 {
		t.Fatalf("acceptor doping = %g m^-3, want 1e23", got)
	}
	if strings.Contains(plain(m), "From the last valid input") {
		t.Error("results still claim to be stale after the field was fixed")
	}
}

func TestUnparseableTextNamesTheUnits(t *testing.T) {
	m := newTest(t, 120, 40)
	m = editField(m, "3", 0, "2 furlongs")
	m = press(m, "enter")
	v := plain(m)
	if !strings.Contains(v, "unknown unit") || !strings.Contains(v, "cm2") {
		t.Errorf("no unit help for bad text:\n%s", v)
	}
	if m.Spec().Area != model.DemoJunction().Spec.Area {
		t.Errorf("bad text left %g m^2 in force (the valid prefix \"2\"), want the area from before", m.Spec().Area)
	}
}

func TestEscPutsOldValueBack(t *testing.T) {
	m := newTest(t, 80, 24)
	orig := m.Spec().Temperature
	m = editField(m, "5", 0, "350")
	if m.Spec().Temperature != 350 {
		t.Fatalf("typing did not apply live: %g", m.Spec().Temperature)
	}
	m = press(m, "esc")
	if m.Spec().Temperature != orig {
		t.Fatalf("esc left %g in force, want %g", m.Spec().Temperature, orig)
	}
	if m.Dirty() {
		t.Error("esc left the junction marked changed")
	}
}

func TestLiveUpdateAsYouType(t *testing.T) {
	m := newTest(t, 80, 24)
	is0 := quantity(t, m.Result(), "saturation_current_A")
	m = editField(m, "3", 0, "1")
	// 1 cm^2 is 400 times the demo's 0.0025 cm^2.
	if got := quantity(t, m.Result(), "saturation_current_A"); math.Abs(got/is0-400) > 1e-6 {
		t.Errorf("Is after typing 1 cm^2: %g, want 400 x %g", got, is0)
	}
	m = typeText(m, "mm2") // "1mm2"
	if got := m.Spec().Area; got != 1e-6 {
		t.Errorf("area = %g m^2, want 1e-6", got)
	}
}

func TestOptionalFieldEmptyMeansDefault(t *testing.T) {
	m := newTest(t, 80, 24)
	m = editField(m, "3", 2, "") // n-side neutral width
	if m.Spec().NWidth != 0 {
		t.Fatalf("empty width should mean long (0), got %g", m.Spec().NWidth)
	}
	m = press(m, "enter")
	if !strings.Contains(plain(m), "long") {
		t.Errorf("empty width not shown as long:\n%s", plain(m))
	}
	m = editField(m, "4", 0, "2.5us")
	if math.Abs(m.Spec().ElectronLifetime-2.5e-6) > 1e-18 {
		t.Errorf("electron lifetime = %g", m.Spec().ElectronLifetime)
	}
}

func TestMaterialChangeResetsUnknownSpecies(t *testing.T) {
	m := newTest(t, 80, 24)
	// Choices are in key order: 4h-sic, gaas, ge, si. Left from si gives ge
	// (boron and phosphorus known), then gaas (neither known).
	m = press(m, "1", "left")
	if m.Spec().Material != "ge" || m.Spec().AcceptorSpecies != "boron" {
		t.Fatalf("after one step: %q with %q", m.Spec().Material, m.Spec().AcceptorSpecies)
	}
	m = press(m, "left")
	if m.Spec().Material != "gaas" {
		t.Fatalf("material = %q, want gaas", m.Spec().Material)
	}
	if m.Spec().AcceptorSpecies != "" || m.Spec().DonorSpecies != "" {
		t.Errorf("species not reset: %q, %q", m.Spec().AcceptorSpecies, m.Spec().DonorSpecies)
	}
	if !strings.Contains(flat(plain(m)), "not known in the new material") {
		t.Errorf("no note about the reset:\n%s", plain(m))
	}
}

func TestProfileShowsGradientOnlyWhenGraded(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "2")
	if strings.Contains(plain(m), "Doping gradient") {
		t.Fatal("gradient shown for a step junction")
	}
	m = press(m, "right")
	if m.Spec().Profile != "linear" || !strings.Contains(plain(m), "Doping gradient") {
		t.Fatalf("graded profile: %q\n%s", m.Spec().Profile, plain(m))
	}
}

func TestStepsJumpAndFlow(t *testing.T) {
	m := newTest(t, 80, 24)
	for _, c := range []struct{ key, want string }{
		{"3", "Step 3 of 5: Geometry"}, {"5", "Step 5 of 5: Operating"}, {"1", "Step 1 of 5"},
		{"]", "Step 2 of 5"}, {"[", "Step 1 of 5"},
	} {
		m = press(m, c.key)
		if !strings.Contains(plain(m), c.want) {
			t.Errorf("after %q: no %q", c.key, c.want)
		}
	}
	// Down from the last field of step 1 enters step 2.
	m = press(m, "down")
	if !strings.Contains(plain(m), "Step 2 of 5") {
		t.Errorf("down did not continue into step 2")
	}
}

func TestPinShowsChangesAndOverlay(t *testing.T) {
	m := newTest(t, 200, 60)
	m = press(m, "p")
	w0 := quantity(t, m.Result(), "depletion_width_m")
	m = editField(m, "5", 1, "0.6")
	m = press(m, "enter")
	w1 := quantity(t, m.Result(), "depletion_width_m")
	dw := model.Format(model.Length, w1-w0, 3, false)
	pct := fmt.Sprintf("%+.2g%%", 100*(w1-w0)/w0)
	v := plain(m)
	for _, want := range []string{"pinned", "change against the pinned reference", dw, pct, "pinned: total"} {
		if !strings.Contains(v, want) {
			t.Errorf("pinned view lacks %q:\n%s", want, v)
		}
	}
	m = press(m, "u")
	if strings.Contains(plain(m), "pinned: total") {
		t.Error("overlay stays after dropping the pin")
	}
}

func TestQuitAsksOnlyWithChanges(t *testing.T) {
	m := newTest(t, 80, 24)
	_, cmd := m.Update(keyMsg("q"))
	if cmd == nil {
		t.Fatal("q on an unchanged junction did not quit")
	}
	// (the chart request of the first screen has been run by newTest)
	if _, ok := cmd().(tea.QuitMsg); !ok {
		t.Fatal("q did not return the quit command")
	}
	m = editField(m, "5", 0, "310")
	m = press(m, "enter", "q")
	if !strings.Contains(plain(m), "Quit junco?") {
		t.Fatalf("no confirmation with changes:\n%s", plain(m))
	}
	m = press(m, "n")
	if strings.Contains(plain(m), "Quit junco?") || m.Spec().Temperature != 310 {
		t.Fatal("n did not return to the workbench intact")
	}
	m = press(m, "q")
	_, cmd = m.Update(keyMsg("y"))
	if cmd == nil {
		t.Fatal("y did not quit")
	}
	if _, ok := cmd().(tea.QuitMsg); !ok {
		t.Fatal("y did not return the quit command")
	}
}

func TestCtrlCWhileTypingAsksToo(t *testing.T) {
	m := newTest(t, 80, 24)
	m = editField(m, "5", 0, "320")
	m = press(m, "ctrl+c")
	if !strings.Contains(plain(m), "Quit junco?") {
		t.Fatalf("ctrl+c with changes did not ask:\n%s", plain(m))
	}
}

func TestHelpScreenExplainsTheBasics(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "?")
	v := plain(m)
	for _, want := range []string{"Getting started", "saturation current Is is under Currents", "depletion width W under Electrostatics", "enter"} {
		if !strings.Contains(v, want) {
			t.Errorf("help lacks %q", want)
		}
	}
	m = press(m, "esc")
	if strings.Contains(plain(m), "Getting started") {
		t.Error("esc did not close help")
	}
}

func TestLayoutsBySize(t *testing.T) {
	for _, c := range []struct {
		w, h  int
		shown []string
		not   []string
	}{
		{80, 24, []string{"Define the junction"}, []string{"━━ Results", "── Results"}},
		{120, 40, []string{"Define the junction", "Results"}, []string{"── Charts"}},
		{200, 60, []string{"Define the junction", "── Results", "── Charts"}, nil},
	} {
		v := plain(newTest(t, c.w, c.h))
		for _, s := range c.shown {
			if !strings.Contains(v, s) {
				t.Errorf("%dx%d lacks %q", c.w, c.h, s)
			}
		}
		for _, s := range c.not {
			if strings.Contains(v, s) {
				t.Errorf("%dx%d shows %q", c.w, c.h, s)
			}
		}
		lines := strings.Split(v, "\n")
		if len(lines) != c.h {
			t.Errorf("%dx%d: %d lines", c.w, c.h, len(lines))
		}
		for i, l := range lines {
			if width(l) > c.w {
				t.Errorf("%dx%d: line %d is %d wide", c.w, c.h, i, width(l))
			}
		}
	}
}

func TestResizeIncludingZero(t *testing.T) {
	m := newTest(t, 80, 24)
	for _, s := range [][2]int{{0, 0}, {1, 1}, {39, 11}, {40, 12}, {300, 90}, {80, 24}} {
		tm, cmd := m.Update(tea.WindowSizeMsg{Width: s[0], Height: s[1]})
		m = drain(tm.(Model), cmd)
		if m.View() == "" {
			t.Errorf("empty view at %dx%d", s[0], s[1])
		}
	}
	m = press(m, "tab", "tab") // charts at 80x24
	if !strings.Contains(plain(m), "bias V (V)") {
		t.Errorf("chart lost after resizes:\n%s", plain(m))
	}
}

func TestASCIIModeDrawsOnlyASCII(t *testing.T) {
	check := func(name string, m Model) {
		for _, keys := range [][]string{nil, {"tab"}, {"tab"}, {"l"}, {"?"}} {
			m = press(m, keys...)
			for _, r := range plain(m) {
				if r > 127 {
					t.Fatalf("%s: non-ASCII %q in\n%s", name, r, plain(m))
				}
			}
		}
	}
	check("option", start(New(Options{Renderer: plainRenderer(), ASCII: true, Width: 100, Height: 30})))
	check("key a", press(newTest(t, 100, 30), "a"))
}

func TestNoColorHasNoColourCodes(t *testing.T) {
	r := lipgloss.NewRenderer(io.Discard)
	r.SetColorProfile(termenv.TrueColor)
	r.SetHasDarkBackground(true)
	colour := start(New(Options{Renderer: r, Width: 100, Height: 30}))
	if !strings.Contains(colour.View(), "\x1b[38;2;") {
		t.Fatal("colour renderer drew no colour: the check below would prove nothing")
	}
	mono := start(New(Options{Renderer: r, NoColor: true, Width: 100, Height: 30}))
	for _, keys := range [][]string{nil, {"tab"}, {"tab"}} {
		mono = press(mono, keys...)
		if v := mono.View(); strings.Contains(v, "\x1b[38;") || strings.Contains(v, "\x1b[48;") {
			t.Fatalf("NoColor view has colour codes: %q", v[:min(len(v), 200)])
		}
	}
}

func TestDetectASCII(t *testing.T) {
	for _, c := range []struct {
		env  map[string]string
		want bool
	}{
		{map[string]string{}, true},
		{map[string]string{"LANG": "C"}, true},
		{map[string]string{"LANG": "POSIX"}, true},
		{map[string]string{"LANG": "en_GB.UTF-8"}, false},
		{map[string]string{"LANG": "de_DE.utf8"}, false},
		{map[string]string{"LANG": "en_GB.UTF-8", "LC_ALL": "C"}, true},
		{map[string]string{"LANG": "C", "LC_CTYPE": "C.UTF-8"}, false},
		{map[string]string{"LANG": "en_US.ISO-8859-1"}, true},
	} {
		got := DetectASCII(func(k string) string { return c.env[k] })
		if got != c.want {
			t.Errorf("%v: DetectASCII = %v, want %v", c.env, got, c.want)
		}
	}
	if !DetectNoColor(func(k string) string { return map[string]string{"NO_COLOR": "1"}[k] }) ||
		DetectNoColor(func(k string) string { return map[string]string{"NO_COLOR": ""}[k] }) ||
		!DetectNoColor(func(k string) string { return map[string]string{"TERM": "dumb"}[k] }) {
		t.Error("DetectNoColor does not follow NO_COLOR / TERM=dumb")
	}
}

func TestSweepEditing(t *testing.T) {
	m := newTest(t, 100, 30)
	m = press(m, "tab", "tab", "r", "ctrl+u")
	m = typeText(m, "-2")
	m = press(m, "tab", "tab", "ctrl+u")
	m = typeText(m, "0")
	m = press(m, "enter")
	if !strings.Contains(plain(m), "step must be non-zero") {
		t.Fatalf("zero step accepted:\n%s", plain(m))
	}
	m = press(m, "ctrl+u")
	m = typeText(m, "20mV")
	m = press(m, "enter")
	v := plain(m)
	if !strings.Contains(v, "sweep -2.00 V to 800 mV in 20.0 mV steps") {
		t.Fatalf("sweep not applied:\n%s", v)
	}
	if !strings.Contains(v, "-2") {
		t.Error("x axis does not start at -2 V")
	}
	// Profiles have no sweep; r says where the bias is set.
	for i := 0; i < 5; i++ {
		m = press(m, "l")
	}
	m = press(m, "r")
	if !strings.Contains(plain(m), "drawn at the bias set under Define") {
		t.Errorf("profile chart r: %s", plain(m))
	}
}

func TestEveryChartDraws(t *testing.T) {
	m := newTest(t, 100, 30)
	m = press(m, "tab", "tab")
	n := len(chartKinds(false))
	for i := 0; i < n; i++ {
		v := plain(m)
		if m.chart.curveErr != "" || m.chart.plot == nil {
			t.Errorf("chart %d (%s): %s", i+1, m.chart.kind().id, m.chart.curveErr)
		}
		if !strings.Contains(v, "(") {
			t.Errorf("chart %d has no axis unit:\n%s", i+1, v)
		}
		m = press(m, "l")
	}
}

func TestInvalidInitialSpecIsMarkedNotUsed(t *testing.T) {
	s := model.DefaultSpec()
	s.DonorDensity = 1 // m^-3: far below the allowed range
	m := start(New(Options{Renderer: plainRenderer(), Spec: &s, Width: 120, Height: 40}))
	if m.Spec().DonorDensity != model.DefaultSpec().DonorDensity {
		t.Fatalf("bad initial value put in force: %g", m.Spec().DonorDensity)
	}
	m = press(m, "2")
	v := plain(m)
	if !strings.Contains(v, "Donor doping, n side: 1.00e-6 cm^-3 is not allowed") {
		t.Errorf("bad initial value not marked:\n%s", v)
	}
	if strings.Contains(v, "invented demo data") {
		t.Error("a given junction is labelled as demo data")
	}
}

func TestCaution(t *testing.T) {
	plainRes := &model.Result{Quantities: []model.Quantity{{Key: "x", Group: model.GroupCurrents}}}
	if cautionNeeded(plainRes) {
		t.Error("caution without breakdown or power")
	}
	bd := &model.Result{Quantities: []model.Quantity{{Key: "bv", Group: groupBreakdown}}}
	if !cautionNeeded(bd) {
		t.Error("no caution with a Breakdown group")
	}
	pw := &model.Result{Flags: []physics.Flag{{Code: "self-heating", Message: "power dissipated 3 W"}}}
	if !cautionNeeded(pw) {
		t.Error("no caution with a power flag")
	}
	s := sheetModel{e: newEnv(plainRenderer(), false, false), w: 100, h: 40}
	s.set(bd, nil, nil)
	if !strings.Contains(strings.Join(strings.Fields(ansi.Strip(s.View())), " "), "high-current measurement is hazardous") {
		t.Error("sheet does not show the caution text")
	}
}

func TestEditorKeys(t *testing.T) {
	e := newLineEditor("1e16")
	for _, k := range []tea.KeyMsg{keyMsg("left"), keyMsg("left"), keyMsg("backspace"), keyMsg("2")} {
		e.handle(k)
	}
	// "1e16" with the cursor before the second "1": backspace removes "e".
	if e.value() != "1216" {
		t.Fatalf("got %q", e.value())
	}
	e.handle(keyMsg("ctrl+u"))
	if e.value() != "16" {
		t.Fatalf("ctrl+u: %q", e.value())
	}
	e.handle(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(strings.Repeat("9", 200)), Paste: true})
	if len([]rune(e.value())) != maxInputRunes {
		t.Fatalf("paste not bounded: %d", len(e.value()))
	}
}
