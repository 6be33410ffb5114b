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
