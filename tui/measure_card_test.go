package tui

import (
	"junco/model/fit"
	"math"
	"strings"
	"testing"
)

// M on the main screen builds the model card from the demo's data sets
// (invented: three I-V temperatures and a C-V sweep) and shows it with
// the parameters' sources, the ranges and the breakdown caution first;
// the card lines fit the width as SPICE continuation lines.
func TestCardScreenDemo(t *testing.T) {
	for _, size := range [][2]int{{120, 40}, {80, 24}} {
		m := newTest(t, size[0], size[1])
		m = press(m, "M")
		if shown(m) != "card" || onTop[cardScreen](m).res == nil {
			t.Fatalf("M must open the card screen: %q\n%s", onTop[cardScreen](m).err, plain(m))
		}
		r := onTop[cardScreen](m).res
		if math.Abs(r.Curves[0].Temperature.K-m.form.spec.Temperature) > 0.01 {
			t.Errorf("reference at %v, want the junction's %g K", r.Curves[0].Temperature, m.form.spec.Temperature)
		}
		var all []string
		for k := 0; k < 40; k++ {
			all = append(all, plain(m))
			m = press(m, "down")
		}
		v := strings.Join(all, "\n")
		for _, want := range []string{".model D_", "+ ", "BREAKDOWN NOT MEASURED", "EG", "C-V junction fit", "(reference, TNOM)"} {
			if !strings.Contains(v, want) {
				t.Errorf("%dx%d: the screen lacks %q", size[0], size[1], want)
			}
		}
		if m.Dirty() {
			t.Error("the card must not change the session")
		}
		m = press(m, "esc")
		if shown(m) != "main" {
			t.Error("esc must go back")
		}
	}
}

func TestCardWrapKeepsACard(t *testing.T) {
	line := ".model DX D(IS=1e-14 N=1.02 RS=2 CJO=1e-11 VJ=0.7 M=0.5 FC=0.5 EG=1.12 XTI=3 TNOM=26.85)"
	got := cardWrap(line, 30)
	for k, l := range got {
		if len(l) > 30 || (k > 0 && !strings.HasPrefix(l, "+ ")) {
			t.Errorf("line %d %q", k, l)
		}
	}
	if strings.Join(strings.Fields(strings.ReplaceAll(strings.Join(got, " "), "+ ", "")), " ") != line {
		t.Errorf("the words changed: %q", got)
	}
	if fit.CardName("test diode D7, lot QM-0417") != "D_testdiodeD7lotQM0417" || fit.CardName("é") != "D_session" {
		t.Errorf("%q %q", fit.CardName("test diode D7, lot QM-0417"), fit.CardName("é"))
	}
}
