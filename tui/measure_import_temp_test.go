package tui

import (
	"math"
	"strings"
	"testing"

	"junco/model/fit"
)

// The import preview says which temperature a fit will use: the file's
// comment (also written without a colon), else the junction's, flagged;
// t types one, which the fit then uses with the source "option". A fit at
// the wrong temperature scales n by T_true/T_used (the fit sees only
// V/(n kT/q)), so the 250 K device read at the junction's 296.15 K gives
// n = 1.05 * 250/296.15 = 0.886; typed, n = 1.05 within 2 %.
func TestImportPreviewTemperature(t *testing.T) {
	m := bare(newTest(t, 110, 34))
	m = importInto(t, m, writeIVAt(t, "c.csv", "# temperature 250 K", 250))
	if v := plain(m); !strings.Contains(v, "250.00 K (stated in a comment") {
		t.Errorf("comment without a colon not shown:\n%s", v)
	}
	m = press(m, "t")
	if importOf(m).editing || !strings.Contains(plain(m), "the file states its temperature") {
		t.Errorf("t on a file with a temperature must refuse:\n%s", plain(m))
	}
	m = press(m, "esc")

	m = importInto(t, m, writeIVAt(t, "none.csv", "", 250))
	if v := plain(m); !strings.Contains(v, "not stated in the file: the junction's 296.15 K is assumed") {
		t.Errorf("assumed temperature not shown:\n%s", v)
	}
	m = press(m, "t", "x", "enter")
	if !importOf(m).editing || !strings.Contains(plain(m), "temperature: ") {
		t.Errorf("a bad temperature must be refused:\n%s", plain(m))
	}
	// esc leaves the field unchanged and stays on the preview.
	if m = press(m, "esc"); shown(m) != "import" || importOf(m).editing || importOf(m).ds == nil || importOf(m).ds.TemperatureTyped {
		t.Fatalf("esc in the temperature field: %s editing %v\n%s", shown(m), importOf(m).editing, plain(m))
	}
	m = press(m, "t")
	m = press(m, "ctrl+u", "2", "5", "0", "K", "enter")
	if importOf(m).editing || !strings.Contains(plain(m), "250.00 K (typed") {
		t.Fatalf("typed temperature not shown:\n%s", plain(m))
	}
	m = press(m, "f")
	if shown(m) != "fit" || ivOf(m).view == nil {
		t.Fatalf("f must add and fit:\n%s", plain(m))
	}
	if v := ivOf(m).view; v.TemperatureK != 250 || v.TemperatureFrom != fit.SourceOption || math.Abs(v.Fit.Single.IdealityFactor/1.05-1) > 0.02 {
		t.Errorf("fit at %g K (%s): n = %g, want 250 K (option), n = 1.05", v.TemperatureK, v.TemperatureFrom, v.Fit.Single.IdealityFactor)
	}
	if !m.sess.meas[len(m.sess.meas)-1].TemperatureTyped {
		t.Error("the typed temperature is not marked in the session")
	}
	// The same file without the typed value: the junction's temperature.
	m = importInto(t, press(m, "esc"), writeIVAt(t, "none2.csv", "", 250))
	m = press(m, "f")
	if v := ivOf(m).view; v.TemperatureFrom != fit.SourceJunction || math.Abs(v.Fit.Single.IdealityFactor-1.05*250/296.15) > 0.02 {
		t.Errorf("junction fallback: %g K (%s), n = %g, want n near %.3f", v.TemperatureK, v.TemperatureFrom, v.Fit.Single.IdealityFactor, 1.05*250/296.15)
	}
}
