package fit

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model/measure"
)

// zeroCelsiusIV is the invented command-line test sweep iv.csv (see
// tui/cli/testdata/fit/INVENTED.md) with its temperature comment changed
// to 0 degC.
func zeroCelsiusIV(t *testing.T) *measure.DataSet {
	t.Helper()
	raw, err := os.ReadFile("../../tui/cli/testdata/fit/iv.csv")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(raw), "# temperature: 300 K", "# temperature: 0 C", 1)
	if text == string(raw) {
		t.Fatal("iv.csv no longer states 300 K: the test needs a new source file")
	}
	p := filepath.Join(t.TempDir(), "iv-0C.csv")
	if err := os.WriteFile(p, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
	ds, err := Import(nil, p, measure.KindIV, nil)
	if err != nil {
		t.Fatal(err)
	}
	return ds
}

// A reference sweep at exactly 0 degC gives TNOM = 0 on the card (and on
// the subcircuit's inner model): a card without TNOM would be read at the
// simulator's default TNOM of 27 degC (Berkeley SPICE 3 diode model, the
// parameters hold at TNOM, default 27 degC; from memory), so its IS would
// be scaled from 27 degC to the sweep's temperature and the check fail.
// In the simulator the card reproduces the sweep (rms ln ratio < 0.05).
func TestCardKeepsTNOMZero(t *testing.T) {
	r, err := Card(context.Background(), CardInputs{Name: "D7", IV: []*measure.DataSet{zeroCelsiusIV(t)}})
	if err != nil {
		t.Fatal(err)
	}
	if p, ok := r.Param("TNOM"); !ok || p.Value != 0 {
		t.Errorf("TNOM %+v, want 0 degC", p)
	}
	if !strings.Contains(r.Card, " TNOM=0)") {
		t.Errorf("card without TNOM=0: %s", r.Card)
	}
	if r.Subckt == "" || !strings.Contains(r.Subckt, " TNOM=0)") {
		t.Errorf("subcircuit without TNOM=0: %q", r.Subckt)
	}
	needSimulator(t)
	checkFigures(t, r)
}

// 273.15 K is 0 degC by the definition of the Celsius scale (BIPM, The
// International System of Units, 9th ed., 2019, sec. 2.3.1): a reference
// temperature one rounding step above 273.15 K gives TNOM = 0 exactly,
// not 5.7e-14 degC, and 296.15 K gives 23 degC.
func TestCardTNOMCelsiusRounded(t *testing.T) {
	for _, c := range []struct{ k, want float64 }{
		{math.Nextafter(273.15, 1000), 0}, {math.Nextafter(273.15, 0), 0}, {296.15, 23}, {300, 26.85},
	} {
		ds, err := Import(nil, "../../tui/cli/testdata/fit/iv-no-temperature.csv", measure.KindIV, nil)
		if err != nil {
			t.Fatal(err)
		}
		r, err := Card(context.Background(), CardInputs{Name: "D7", IV: []*measure.DataSet{ds}, Temperature: TemperatureRule{OptionK: c.k}})
		if err != nil {
			t.Fatal(err)
		}
		p, _ := r.Param("TNOM")
		if p.Value != c.want {
			t.Errorf("%.17g K: TNOM = %.17g degC, want %g", c.k, p.Value, c.want)
		}
	}
}
