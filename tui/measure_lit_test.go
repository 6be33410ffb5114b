package tui

import (
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/physics"
	"junco/physics/extract"
)

// writeLitIV writes an invented lit I-V sweep (test data, not a
// measurement) of a cell-like lit diode, with 0.02 mA scatter, in the
// generator sign (delivered current positive) or the load sign.
func writeLitIV(t *testing.T, name string, generator bool) string {
	t.Helper()
	d := extract.LitDiode{PhotocurrentA: 0.2, SaturationCurrentA: 2e-9, IdealityFactor: 1.3, SeriesResistanceOhm: 0.2, ShuntResistanceOhm: 150}
	rng := rand.New(rand.NewPCG(4, 9))
	vt := physics.ThermalVoltage(300)
	var b strings.Builder
	b.WriteString("# invented lit sweep\n# temperature: 300 K\nV (V),I (mA)\n")
	for k := 0; k <= 60; k++ {
		v := -0.05 + 0.012*float64(k)
		i := d.Current(v, vt) + 2e-5*rng.NormFloat64()
		if generator {
			i = -i
		}
		fmt.Fprintf(&b, "%.4f,%.6f\n", v, i*1e3)
	}
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(b.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// A lit data set gets the lit fit on the fit screen: linear current and
// power charts with the maximum-power point marked, the five parameters
// and the figures of merit; ctrl+k keeps the lit record.
func TestFitScreenLitCurve(t *testing.T) {
	for _, c := range []struct {
		w, h int
		gen  bool
	}{{120, 44, true}, {80, 30, false}} {
		m := bare(newTest(t, c.w, c.h))
		m = importInto(t, m, writeLitIV(t, "cell.csv", c.gen))
		m = press(m, "f")
		if shown(m) != "fit" || ivOf(m).lit == nil {
			t.Fatalf("%v: f must fit the lit curve: %q\n%s", c, ivOf(m).err, plain(m))
		}
		v := plain(m)
		sign := "load"
		if c.gen {
			sign = "generator"
		}
		want := []string{"lit single diode", sign, "Iph", "Rsh", "Voc", "FF", "Pmax", "linear scale", "delivered power", "maximum power", "◆"}
		if c.w == 120 {
			want = append(want, "start points", "data", "fit")
		}
		for _, s := range want {
			if !strings.Contains(v, s) {
				t.Errorf("%v: the lit fit screen lacks %q:\n%s", c, s, v)
			}
		}
		m = press(m, "ctrl+k")
		if len(m.sess.extr) != 1 || m.sess.extr[0].Method != "iv-lit-single-diode" || m.sess.extr[0].Parameters[0].Name != "Iph" {
			t.Fatalf("%v: kept %+v", c, m.sess.extr)
		}
		if doc, err := m.document("lit"); err != nil || doc.Validate() != nil {
			t.Errorf("%v: the saved document would be invalid: %v", c, err)
		}
	}
}
