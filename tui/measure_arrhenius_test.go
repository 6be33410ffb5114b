package tui

import (
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// A on the main screen fits the demo's I-V sweeps at three temperatures
// and shows the activation energy with its standard error; it lies
// between Eg/2 and Eg + 0.2 eV of silicon (diffusion near Eg, generation
// near Eg/2; Sze & Ng 2007, sec. 2.3).
func TestArrheniusScreenDemo(t *testing.T) {
	for _, size := range [][2]int{{120, 40}, {80, 24}} {
		m := newTest(t, size[0], size[1])
		m = press(m, "A")
		if shown(m) != "arrhenius" {
			t.Fatalf("A must open the temperature screen:\n%s", plain(m))
		}
		v := plain(m)
		re := regexp.MustCompile(`Ea +([0-9.]+) eV ± ([0-9.e-]+) eV`)
		g := re.FindStringSubmatch(v)
		if g == nil {
			t.Fatalf("%dx%d: no Ea with ±:\n%s", size[0], size[1], v)
		}
		ea, _ := strconv.ParseFloat(g[1], 64)
		const eg = 1.12 // eV, silicon near 300 K
		if !(ea > eg/2 && ea < eg+0.2) {
			t.Errorf("Ea %.3f eV outside Eg/2..Eg+0.2", ea)
		}
		if size[0] >= 90 {
			for _, want := range []string{"1000/T", "ln(Is/T^3)", "Arrhenius line", "273.2 K", "323.2 K", "iv-296K"} {
				if !strings.Contains(v, want) {
					t.Errorf("the screen lacks %q:\n%s", want, v)
				}
			}
		}
		if m.Dirty() {
			t.Error("the analysis must not change the session")
		}
		m = press(m, "esc")
		if shown(m) != "main" {
			t.Error("esc must go back")
		}
	}
}

// gamma is typed and applied; a bad value is refused and the result in
// force stays; ASCII shows +/-.
func TestArrheniusGamma(t *testing.T) {
	m := newTest(t, 120, 40)
	m = press(m, "A")
	ea0 := arrOf(m).view.Fit.ActivationEnergyEV
	m = press(m, "ctrl+u", "2", "enter")
	if arrOf(m).gamma != 2 || arrOf(m).view.Fit.Exponent != 4 || !strings.Contains(plain(m), "ln(Is/T^4)") {
		t.Fatalf("gamma 2: %+v\n%s", arrOf(m), plain(m))
	}
	if arrOf(m).view.Fit.ActivationEnergyEV >= ea0 {
		t.Error("a larger prefactor exponent must lower Ea")
	}
	m = press(m, "ctrl+u", "x", "enter")
	if arrOf(m).gammaErr == "" || arrOf(m).gamma != 2 || !strings.Contains(plain(m), "exponent of D/tau): \"x\" is not a number") {
		t.Errorf("a bad gamma must be refused:\n%s", plain(m))
	}
	m = press(m, "esc", "a", "A")
	if !strings.Contains(plain(m), "+/-") {
		t.Errorf("ASCII shows +/-:\n%s", plain(m))
	}
}

// Without enough temperatures the screen says why; without I-V data it
// does not open.
func TestArrheniusTooFew(t *testing.T) {
	m := bare(newTest(t, 100, 30))
	m = press(m, "A")
	if shown(m) != "main" || !strings.Contains(plain(m), "no I-V data set") {
		t.Fatalf("no data: %q", m.note)
	}
	m = importInto(t, m, writeIV(t, "one.csv"))
	m = press(m, "enter", "A")
	v := plain(m)
	if shown(m) != "arrhenius" || !strings.Contains(v, "no activation energy") || !strings.Contains(v, "activation energy needs two") {
		t.Fatalf("one temperature:\n%s", v)
	}
}

// The user picks the data sets: a different device's sweep (Is 1e-12 A,
// n = 1.5 at 300 K, invented) pooled with the demo's three temperatures
// scatters far beyond the fits' standard errors (reduced chi-square above
// 10, the standard error of Ea widened by its root); leaving it out with
// space gives back the demo's own Ea exactly.
func TestArrheniusPickDataSets(t *testing.T) {
	own := arrOf(press(newTest(t, 120, 40), "A")).view.Fit
	m := importInto(t, newTest(t, 120, 40), writeIV(t, "other.csv"))
	m = press(m, "enter", "A")
	pooled := arrOf(m).view.Fit
	if pooled == nil || pooled.Points != 4 || !(pooled.ReducedChiSquare > 10) || !strings.Contains(plain(m), "reduced chi-square") || !strings.Contains(plain(m), "one device") {
		t.Fatalf("pooled: %+v\n%s", pooled, plain(m))
	}
	ids := m.ivMeasurements()
	last := m.sess.meas[ids[len(ids)-1]].ID
	for range ids {
		m = press(m, "down")
	}
	m = press(m, "space")
	if !arrOf(m).off[last] || !strings.Contains(plain(m), "not selected") {
		t.Fatalf("space must leave out %s:\n%s", last, plain(m))
	}
	f := arrOf(m).view.Fit
	if f == nil || f.Points != 3 || f.ActivationEnergyEV != own.ActivationEnergyEV || f.StdErrEV != own.StdErrEV {
		t.Errorf("without the other device: %+v, want %+v", f, own)
	}
	m = press(m, "space")
	if arrOf(m).off[last] || arrOf(m).view.Fit.Points != 4 {
		t.Error("space again must take it back")
	}
	if m.Dirty() != true {
		// The import made the session unsaved; the analysis itself adds
		// nothing to it.
		t.Error("session state changed unexpectedly")
	}
}
