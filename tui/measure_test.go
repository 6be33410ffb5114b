package tui

import (
	"math"
	"path/filepath"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"
)

func importInto(t *testing.T, m Model, path string) Model {
	t.Helper()
	m = press(m, "i")
	if shown(m) != "import" {
		t.Fatalf("i did not open the import screen: %q", plain(m))
	}
	m = press(m, "ctrl+u")
	importOf(m).ed.set(path)
	return press(m, "enter")
}

// bare drops the invented demo measurements, so that a test sees only
// what it imports.
func bare(m Model) Model {
	m.sess.meas = nil
	m.setBaseline()
	return m
}

func TestImportPreviewAndAccept(t *testing.T) {
	m := bare(newTest(t, 100, 30))
	m = importInto(t, m, writeIV(t, "diode.csv"))
	v := plain(m)
	for _, want := range []string{"I-V sweep: 60 points", "voltage", `"V (V)"`, "unit V", "current", "unit mA", "compliance", "non-finite", "rows left out"} {
		if !strings.Contains(v, want) {
			t.Errorf("preview lacks %q:\n%s", want, v)
		}
	}
	if len(m.sess.meas) != 0 || m.Dirty() {
		t.Fatal("a preview must add nothing")
	}
	m = press(m, "enter")
	if shown(m) != "main" || len(m.sess.meas) != 1 || m.sess.meas[0].ID != "diode" {
		t.Fatalf("accept: screen %s, %d measurements", shown(m), len(m.sess.meas))
	}
	if !m.Dirty() || !strings.Contains(plain(m), "unsaved") {
		t.Error("an added measurement must mark the session unsaved")
	}
	doc, err := m.document("t")
	if err != nil || len(doc.Measurements) != 1 || doc.Measurements[0].SourceFile != "diode.csv" {
		t.Fatalf("document: %v %+v", err, doc)
	}
	m = importInto(t, m, writeIV(t, "second.csv"))
	m = press(m, "enter")
	if len(m.sess.meas) != 2 || m.sess.meas[1].ID != "second" {
		t.Fatalf("second import: %+v", len(m.sess.meas))
	}
}

func TestImportBadFileNamesLineAndColumn(t *testing.T) {
	m := bare(newTest(t, 100, 30))
	p := filepath.Join(t.TempDir(), "bad.csv")
	writeText(t, p, "V,I (A)\n0.1,1e-9\n0.2,abc\n")
	m = importInto(t, m, p)
	v := flat(plain(m))
	if !strings.Contains(v, "bad.csv:3:2") || !strings.Contains(v, "Nothing was imported") {
		t.Errorf("the error must name line 3, column 2:\n%s", plain(m))
	}
	m = press(m, "enter", "esc")
	if len(m.sess.meas) != 0 || m.Dirty() || shown(m) != "main" {
		t.Fatalf("a bad file must add nothing (%d, screen %s)", len(m.sess.meas), shown(m))
	}
	// A missing file and a directory are errors too, not crashes.
	for _, path := range []string{filepath.Join(t.TempDir(), "none.csv"), t.TempDir(), ""} {
		m = importInto(t, m, path)
		if importOf(m).ds != nil || importOf(m).err == "" {
			t.Errorf("%q: want an error", path)
		}
		m = press(m, "esc")
	}
}

func TestFitScreen(t *testing.T) {
	for _, size := range [][2]int{{120, 40}, {80, 24}} {
		m := newTest(t, size[0], size[1])
		m = importInto(t, m, writeIV(t, "diode.csv"))
		m = press(m, "f")
		if shown(m) != "fit" || ivOf(m).view == nil {
			t.Fatalf("%v: f must add and fit: %q %s", size, ivOf(m).err, plain(m))
		}
		v := plain(m)
		for _, want := range []string{"Is ", "n ", "Rs", "Rsh", "±", "RMS log residual", "points used", "window used", "measured", "fit", "prediction"} {
			if !strings.Contains(v, want) {
				t.Errorf("%v: the fit screen lacks %q:\n%s", size, want, v)
			}
		}
		if size[0] == 120 {
			if n := ivOf(m).view.Fit.Single.IdealityFactor; math.Abs(n-1.5) > 0.05 {
				t.Errorf("n = %g, want about 1.5", n)
			}
			if !strings.Contains(v, "•") {
				t.Errorf("the measured points need their own character:\n%s", v)
			}
		}
		before := ivOf(m).view.Fit.Points
		m = typeText(m, "0.2")
		m = press(m, "tab")
		m = typeText(m, "500mV")
		m = press(m, "enter")
		if ivOf(m).view == nil || fitOf(m).win.MinV != 0.2 || math.Abs(fitOf(m).win.MaxV-0.5) > 1e-12 {
			t.Fatalf("%v: window not applied: %+v %q", size, fitOf(m).win, ivOf(m).err)
		}
		if after := ivOf(m).view.Fit.Points; after >= before || after == 0 {
			t.Errorf("%v: refit in the window uses %d points, before %d", size, after, before)
		}
		if u := ivOf(m).view.Fit.UsedWindow; u.MinV < 0.2 || u.MaxV > 0.5 {
			t.Errorf("used window %+v", u)
		}
		// A bad window says why and keeps the fit.
		m = press(m, "ctrl+u")
		m = typeText(m, "x")
		m = press(m, "enter")
		if fitOf(m).winErr == "" || ivOf(m).view == nil {
			t.Errorf("a bad bound must be reported")
		}
		m = press(m, "esc")
		if shown(m) != "main" {
			t.Errorf("esc must close the fit screen")
		}
	}
}

func TestFitWithoutData(t *testing.T) {
	m := bare(newTest(t, 80, 24))
	m = press(m, "f")
	if shown(m) != "main" || !strings.Contains(plain(m), "no I-V data set") {
		t.Errorf("f without data must say so:\n%s", plain(m))
	}
}

// The demo opens with its invented measurements (labelled invented in
// their source field), ready for the fit screen.
func TestDemoComesWithInventedMeasurements(t *testing.T) {
	m := newTest(t, 120, 40)
	if len(m.sess.meas) == 0 || m.Dirty() {
		t.Fatalf("demo measurements %d, dirty %v", len(m.sess.meas), m.Dirty())
	}
	for _, ms := range m.sess.meas {
		if !strings.Contains(ms.SourceFile, "invented") {
			t.Errorf("%s not labelled invented: %q", ms.ID, ms.SourceFile)
		}
	}
	m = press(m, "f")
	if !strings.Contains(plain(m), "Is") {
		t.Errorf("fit screen on the demo data:\n%s", plain(m))
	}
}

// ctrl+k keeps the fit with the session: parameters with standard errors,
// the data set's ID and the window; the session becomes unsaved and the
// saved document carries the extraction.
func TestKeepFitWithSession(t *testing.T) {
	st := newStore(t, "alice")
	o := opts(st, "alice", 120, 40)
	m := start(New(o))
	m = press(m, "f")
	if shown(m) != "fit" {
		t.Fatalf("no fit screen:\n%s", plain(m))
	}
	m = press(m, "ctrl+k")
	if len(m.sess.extr) != 1 || !m.Dirty() {
		t.Fatalf("kept %d fits, dirty %v", len(m.sess.extr), m.Dirty())
	}
	x := m.sess.extr[0]
	if x.Method != "iv-single-diode" || x.Measurement == "" || len(x.Parameters) < 2 || x.Parameters[0].Name != "Is" || x.Parameters[0].StdError == nil {
		t.Fatalf("extraction %+v", x)
	}
	doc, err := m.document("demo")
	if err != nil || len(doc.Extractions) != 1 {
		t.Fatalf("document extractions: %v %v", doc, err)
	}
	if err := doc.Validate(); err != nil {
		t.Fatalf("the saved document would be invalid: %v", err)
	}
}

// ctrl+l switches the fit chart's current axis between log and linear
// (with an SI prefix), and back; the window fields take no text from it.
func TestFitLinearLogToggle(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "f")
	if shown(m) != "fit" || ivOf(m).view == nil {
		t.Fatalf("f must open the I-V fit on the demo:\n%s", plain(m))
	}
	if v := plain(m); !strings.Contains(v, "log scale") {
		t.Fatalf("the fit chart starts on a log axis:\n%s", v)
	}
	tm, _ := m.Update(tea.KeyMsg{Type: tea.KeyCtrlL})
	m = tm.(Model)
	v := plain(m)
	if !ivOf(m).linear || !strings.Contains(v, "linear scale") || strings.Contains(v, "log scale") || fitOf(m).plot == nil {
		t.Fatalf("ctrl+l must draw |I| on a linear axis:\n%s", v)
	}
	if !strings.Contains(v, "(mA, linear") && !strings.Contains(v, "(µA, linear") && !strings.Contains(v, "(A, linear") {
		t.Errorf("the linear axis names its unit:\n%s", v)
	}
	if fitOf(m).eds[0].value() != "" || fitOf(m).eds[1].value() != "" {
		t.Error("ctrl+l must not type into the window")
	}
	// A resize keeps the choice.
	tm, _ = m.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	m = tm.(Model)
	if !strings.Contains(plain(m), "linear scale") {
		t.Errorf("a resize must keep the linear axis:\n%s", plain(m))
	}
	tm, _ = m.Update(tea.KeyMsg{Type: tea.KeyCtrlL})
	m = tm.(Model)
	if ivOf(m).linear || !strings.Contains(plain(m), "log scale") {
		t.Errorf("ctrl+l again must go back to log:\n%s", plain(m))
	}
}
