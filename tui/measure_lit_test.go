package tui

import (
	"strings"
	"testing"
)

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
