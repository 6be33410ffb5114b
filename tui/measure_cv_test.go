package tui

import (
	"math"
	"strings"
	"testing"

	"junco/model"
)

// withSpec sets the junction of the session (the geometry of the fit).
func withSpec(m Model, s model.Spec) Model {
	m.form.spec = s
	return m
}

// The invented sweep fits back: doping within 5 %, the 1/C^2 intercept
// within 50 mV of the model's: the electrostatic built-in potential less
// the majority-carrier tails' 2kT/q (Sze & Ng 2007, section 2.2.1); the
// screen shows the rows and the legend at both layouts.
func TestCVFitRoundTrip(t *testing.T) {
	s := cvTestSpec()
	r, err := model.Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	vbi := r.Static.Vbi - r.Static.Tail
	path := writeCV(t, "cv.csv")
	for _, size := range [][2]int{{120, 40}, {80, 30}} {
		m := withSpec(bare(newTest(t, size[0], size[1])), s)
		m = importInto(t, m, path)
		if !strings.Contains(plain(m), "C-V sweep: 51 points") {
			t.Fatalf("%v: preview:\n%s", size, plain(m))
		}
		m = press(m, "f")
		if shown(m) != "cvfit" || cvOf(m).view == nil {
			t.Fatalf("%v: f must add and show the C-V fit: %q\n%s", size, cvOf(m).err, plain(m))
		}
		an := cvOf(m).view.Analysis
		n, b := an.DopingM3, an.BuiltInPotentialV
		if r := n.Value / s.DonorDensity; !n.Determined || math.Abs(r-1) > 0.05 {
			t.Errorf("%v: doping %+v, want %g (ratio %.4f)", size, n, s.DonorDensity, r)
		}
		if d := b.Value - vbi; !b.Determined || math.Abs(d) > 0.05 {
			t.Errorf("%v: Vbi %+v, want %.4f V", size, b, vbi)
		}
		if !(n.StdErr > 0) || !(b.StdErr > 0) {
			t.Errorf("%v: standard errors %g %g", size, n.StdErr, b.StdErr)
		}
		v := plain(m)
		for _, want := range []string{"C-V fit cv", "Vbi", "N ", "cm^-3", "Cj0", "Cpar", "measured 1/(C", "Mott-Schottky line", "prediction", "1/(C - Cpar)^2 (1e", "window"} {
			if !strings.Contains(v, want) {
				t.Errorf("%v: the C-V screen lacks %q:\n%s", size, want, v)
			}
		}
		// A window narrows the points used; a bad one is refused.
		before := an.Junction.Points
		m = press(m, "ctrl+u")
		fitOf(m).eds[0].set("-3")
		fitOf(m).eds[1].set("-1")
		m = press(m, "enter")
		if cvOf(m).view == nil || cvOf(m).view.Analysis.Junction.Points >= before {
			t.Fatalf("%v: window not applied: %+v %q", size, fitOf(m).win, cvOf(m).err)
		}
		fitOf(m).eds[1].set("-4")
		m = press(m, "enter")
		if fitOf(m).winErr == "" || cvOf(m).view == nil {
			t.Errorf("%v: V1 > V2 must be refused, keeping the fit", size)
		}
		m = press(m, "esc")
		if shown(m) != "main" {
			t.Errorf("%v: esc must close the C-V screen", size)
		}
	}
}

// ctrl+k keeps the C-V fit as the command line stores it (fit.CVRecords):
// the junction-capacitance extraction (Cj0, Vbi, m, Cpar), the headline,
// and the Mott-Schottky extraction of C - Cpar (Vbi, N); the document
// validates.
func TestKeepCVFit(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 120, 40)))
	m = press(m, "f")
	if shown(m) != "fit" {
		t.Fatalf("f must still open the I-V fit on the demo:\n%s", plain(m))
	}
	// pgdn cycles through every data set; the demo's C-V sweep is last.
	for n := 0; n < len(m.sess.meas) && shown(m) != "cvfit"; n++ {
		m = press(m, "pgdown")
	}
	if shown(m) != "cvfit" || cvOf(m).view == nil {
		t.Fatalf("pgdn must reach the C-V data set: %q\n%s", cvOf(m).err, plain(m))
	}
	m = press(m, "ctrl+k")
	want := 2
	if len(m.sess.extr) != want || !m.Dirty() {
		t.Fatalf("kept %d fits (want %d), dirty %v", len(m.sess.extr), want, m.Dirty())
	}
	j := m.sess.extr[0]
	if j.Method != "cv-junction-capacitance" || !strings.HasPrefix(j.Measurement, "cv-") || len(j.Parameters) != 4 || j.Parameters[1].Name != "Vbi" || j.ID == m.sess.extr[1].ID {
		t.Errorf("junction extraction %+v", j)
	}
	x := m.sess.extr[1]
	if x.Method != "mott-schottky" || len(x.Parameters) < 2 ||
		x.Parameters[0].Name != "Vbi" || x.Parameters[1].Name != "N" || x.Parameters[1].StdError == nil {
		t.Fatalf("extraction %+v", x)
	}
	if r := x.Parameters[1].Value / model.DemoJunction().Spec.DonorDensity; math.Abs(r-1) > 0.05 {
		t.Errorf("demo doping ratio %.4f", r)
	}
	doc, err := m.document("demo")
	if err != nil || len(doc.Extractions) != want {
		t.Fatalf("document extractions: %v %v", doc, err)
	}
	if err := doc.Validate(); err != nil {
		t.Fatalf("the saved document would be invalid: %v", err)
	}
	// pgup goes back to an I-V set on the I-V screen.
	m = press(m, "pgup")
	if shown(m) != "fit" {
		t.Errorf("pgup from the C-V set must show the I-V screen, screen %s", shown(m))
	}
}
