package tui

import (
	"strings"
	"testing"

	"github.com/charmbracelet/x/ansi"

	"junco/model"
)

// A warning reads its label once, and says how many times the doping the
// injected density is.
func TestWarningReadsItsLabelOnce(t *testing.T) {
	s := model.DemoJunction().Spec
	s.Bias = 0.9
	res, err := model.Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	sh := sheetModel{e: newTest(t, 120, 40).e}
	sh.SetSize(110, 200)
	sh.set(res, nil, nil)
	v := flat(ansi.Strip(strings.Join(sh.built, "\n")))
	if !strings.Contains(v, "high injection: the injected minority density is") || !strings.Contains(v, "times the doping") {
		t.Fatalf("no high-injection warning in words:\n%s", v)
	}
	for _, twice := range []string{"high-injection: high injection", "incomplete-ionisation: incomplete ionisation"} {
		if strings.Contains(v, twice) {
			t.Errorf("the sheet reads a label twice: %q", twice)
		}
	}
	if got := flagText("degenerate", "doping above a tenth"); got != "degenerate: doping above a tenth" {
		t.Errorf("a message that does not start with its code keeps it: %q", got)
	}
}

// A change of more than a hundredfold reads as a plain power of ten and
// keeps a gap from the absolute change beside it.
func TestLargePercentChange(t *testing.T) {
	q := model.Quantity{Key: "k", Kind: model.Voltage, Value: 0.1521}
	pin := &model.Result{Quantities: []model.Quantity{{Key: "k", Kind: model.Voltage, Value: 1.2e-6}}}
	abs, pct := deltaText(q, pin, true)
	if abs != "+152 mV" || pct != "+1.3e7%" {
		t.Errorf("delta %q %q, want +152 mV and +1.3e7%%", abs, pct)
	}
	c := sheetCols{delta: 14, pct: 10}
	if len(pct) >= c.pct {
		t.Errorf("%q leaves no gap in a %d-wide column", pct, c.pct)
	}
}
