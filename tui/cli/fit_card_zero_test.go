package cli

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model/fit"
)

// zeroCelsiusFile writes the invented test sweep iv.csv (see
// testdata/fit/INVENTED.md) with its temperature comment changed to the
// given one, and returns its path.
func zeroCelsiusFile(t *testing.T, comment string) string {
	t.Helper()
	raw, err := os.ReadFile("testdata/fit/iv.csv")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(raw), "# temperature: 300 K", comment, 1)
	if text == string(raw) {
		t.Fatal("testdata/fit/iv.csv no longer states 300 K: the test needs a new source file")
	}
	p := filepath.Join(t.TempDir(), "iv-0C.csv")
	writeTestFile(t, p, []byte(text))
	return p
}

// A sweep at exactly 0 degC (stated in degC or as 273.15 K, the same
// temperature by the definition of the Celsius scale, BIPM SI Brochure,
// 9th ed., 2019, sec. 2.3.1) gives TNOM = 0 on the card, printed as 0;
// without it the simulator reads the card at its default TNOM of 27 degC
// (Berkeley SPICE 3 diode model; from memory) and the check fails. With
// the simulator, `fit card --check` passes.
func TestFitCardTNOMZeroCelsius(t *testing.T) {
	for _, comment := range []string{"# temperature: 0 C", "# temperature: 273.15 K"} {
		p := zeroCelsiusFile(t, comment)
		code, out, errs := fitCall("card", "--iv", p, "--name", "D7", "--json")
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", comment, code, errs)
		}
		var rep struct {
			ModelCard  string `json:"model_card"`
			Subckt     string `json:"subckt"`
			Parameters map[string]struct {
				Value *float64 `json:"value"`
			} `json:"parameters"`
		}
		if err := json.Unmarshal([]byte(out), &rep); err != nil {
			t.Fatal(err)
		}
		if v := rep.Parameters["TNOM"].Value; v == nil || *v != 0 {
			t.Errorf("%s: TNOM %v, want 0", comment, v)
		}
		if !strings.Contains(rep.ModelCard, " TNOM=0)") || !strings.Contains(rep.Subckt, " TNOM=0)") {
			t.Errorf("%s: no TNOM=0 in\n%s\n%s", comment, rep.ModelCard, rep.Subckt)
		}
		_, text, _ := fitCall("card", "--iv", p, "--name", "D7")
		if !strings.Contains(text, "TNOM       0 degC") {
			t.Errorf("%s: TNOM not printed as 0 degC:\n%s", comment, text)
		}
	}
	if !fit.SimulatorInstalled() {
		t.Skip(fit.SimulatorProgram + " is not installed: the --check of the 0 degC card is not run here (.ci/run installs it)")
	}
	code, out, errs := fitCall("card", "--iv", zeroCelsiusFile(t, "# temperature: 0 C"), "--name", "D7", "--check")
	if code != exitOK || !strings.Contains(out, "check: PASS") {
		t.Errorf("exit %d: %s\n%s", code, errs, out)
	}
}

// fit iv --model-card writes TNOM = 0 for a sweep at 0 degC, as fit card.
func TestFitIVModelCardTNOMZero(t *testing.T) {
	code, out, errs := fitCall("iv", zeroCelsiusFile(t, "# temperature: 0 C"), "--json", "--model-card", "D0")
	var rep struct {
		ModelCard string `json:"model_card"`
	}
	if err := json.Unmarshal([]byte(out), &rep); code != exitOK || err != nil {
		t.Fatalf("exit %d, %v: %s", code, err, errs)
	}
	if !strings.HasPrefix(rep.ModelCard, ".model D0 D(IS=") || !strings.HasSuffix(rep.ModelCard, " TNOM=0)") {
		t.Errorf("card %q, want TNOM=0 last", rep.ModelCard)
	}
}
