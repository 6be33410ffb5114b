package cli

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"junco/model/fit"
)

var fitCardArgs = []string{"card", "--iv", "testdata/fit/arrhenius/iv-300K.csv", "testdata/fit/arrhenius/iv-250K.csv",
	"--iv", "testdata/fit/arrhenius/iv-350K.csv", "--cv", "testdata/fit/cv.tsv", "--name", "DX"}

// The JSON keys are the card's parameter names, each with value, standard
// error and source; the invented test sets (Is ~ T^3 exp(-1.12 eV/kT),
// Sze & Ng 2007, sec. 2.3) give EG near 1.12 eV.
func TestFitCardJSON(t *testing.T) {
	code, out, errs := fitCall(append(fitCardArgs, "--json")...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		ModelCard  string `json:"model_card"`
		Parameters map[string]struct {
			Value  *float64 `json:"value"`
			StdErr *float64 `json:"stderr"`
			Source string   `json:"source"`
		} `json:"parameters"`
		Ranges struct {
			TemperatureK []float64 `json:"temperature_K"`
			BreakdownV   *float64  `json:"breakdown_V"`
		} `json:"measured_ranges"`
		Cautions []string `json:"cautions"`
		Check    any      `json:"check"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err, out)
	}
	for _, k := range []string{"IS", "N", "RS", "CJO", "VJ", "M", "FC", "EG", "XTI", "TNOM"} {
		p, ok := rep.Parameters[k]
		if !ok || p.Value == nil || p.Source == "" {
			t.Errorf("parameter %s: %+v", k, p)
		}
		if k != "FC" && k != "TNOM" && p.StdErr == nil {
			t.Errorf("%s has no standard error", k)
		}
	}
	for _, k := range []string{"BV", "IBV", "TT", "ISR"} {
		if _, ok := rep.Parameters[k]; ok {
			t.Errorf("%s present though not measured", k)
		}
	}
	if eg := *rep.Parameters["EG"].Value; math.Abs(eg-1.12) > 0.02 {
		t.Errorf("EG = %g, want 1.12", eg)
	}
	if !strings.HasPrefix(rep.ModelCard, ".model DX D(") || rep.Ranges.BreakdownV != nil || len(rep.Ranges.TemperatureK) != 2 {
		t.Errorf("card %q ranges %+v", rep.ModelCard, rep.Ranges)
	}
	if !strings.Contains(rep.Cautions[0], "BREAKDOWN NOT MEASURED") || rep.Check != nil {
		t.Errorf("cautions %v check %v", rep.Cautions, rep.Check)
	}
}

func TestFitCardTextAndCheck(t *testing.T) {
	code, out, errs := fitCall(append(fitCardArgs, "--check")...)
	if !fit.SimulatorInstalled() {
		if code != exitFailure || !strings.Contains(out, "check: NOT RUN") || !strings.Contains(errs, "not installed") {
			t.Errorf("without the simulator: exit %d\n%s\n%s", code, out, errs)
		}
		t.Skip(fit.SimulatorProgram + " is not installed: the --check figures are not tested here (.ci/run installs it)")
	}
	if code != exitOK {
		t.Fatalf("exit %d: %s\n%s", code, errs, out)
	}
	for _, want := range []string{".model DX D(", "measured ranges", "EG", "I-V testdata/fit/arrhenius/iv-250K.csv", "C-V at", "check: PASS"} {
		if !strings.Contains(out, want) {
			t.Errorf("no %q in\n%s", want, out)
		}
	}
}

// --check without the simulator says so plainly and exits 1.
func TestFitCardCheckWithoutSimulator(t *testing.T) {
	t.Setenv("PATH", t.TempDir())
	code, out, errs := fitCall(append(fitCardArgs, "--check")...)
	if code != exitFailure || !strings.Contains(errs, "ngspice is not installed") || !strings.Contains(out, "check: NOT RUN") {
		t.Errorf("exit %d\n%s\n%s", code, out, errs)
	}
}

func TestFitCardErrors(t *testing.T) {
	dir := t.TempDir()
	rec := filepath.Join(dir, "rec.txt")
	writeTestFile(t, rec, []byte("forward current: 10 mA\n"))
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"card", "--iv", "testdata/fit/iv.csv"}, "--name is required"},
		{[]string{"card", "--name", "D"}, "no forward I-V file"},
		{[]string{"card", "--iv", "testdata/fit/iv.csv", "--name", "9x"}, "name"},
		{[]string{"card", "--iv", "testdata/fit/iv.csv", "--name", "D", "--recovery", rec}, "storage time"},
		{[]string{"card", "--iv", "testdata/fit/iv.csv", "--name", "D", "--temp", "5000K"}, "1..2000 K"},
		{[]string{"card", "--iv", filepath.Join(dir, "missing.csv"), "--name", "D"}, "missing.csv"},
	} {
		code, _, errs := fitCall(c.args...)
		if code != exitUsage || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
	code, out, _ := fitCall("card", "--help")
	if code != exitOK || !strings.Contains(out, "--recovery FILE") {
		t.Errorf("help: %d %s", code, out)
	}
}
