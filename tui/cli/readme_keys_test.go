package cli

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"junco/model"
	"junco/model/fit"
)

// readmeItemKeys returns the back-quoted keys of the README passage that
// starts with start and ends at the next list item or blank line (the
// same reading as fitReadmeKeys).
func readmeItemKeys(t *testing.T, readme, start string) map[string]bool {
	t.Helper()
	i := strings.Index(readme, start)
	if i < 0 {
		t.Fatalf("README has no passage starting %q", start)
	}
	return fitReadmeKeys(t, "- `fit x --json`:"+readme[i+len(start):], "x")
}

// readmeCompareKeys reports the keys emitted but not documented, and those
// documented but never emitted (except the keys in mayMiss, which only
// some machines emit).
func readmeCompareKeys(t *testing.T, what string, emitted, documented map[string]bool, mayMiss map[string]bool) {
	t.Helper()
	var undocumented, missing []string
	for k := range emitted {
		if !documented[k] {
			undocumented = append(undocumented, k)
		}
	}
	for k := range documented {
		if !emitted[k] && !mayMiss[k] {
			missing = append(missing, k)
		}
	}
	sort.Strings(undocumented)
	sort.Strings(missing)
	if len(undocumented) > 0 {
		t.Errorf("%s: emitted but not documented in the README: %v", what, undocumented)
	}
	if len(missing) > 0 {
		t.Errorf("%s: documented in the README but never emitted: %v", what, missing)
	}
}

// readmeRunKeys runs junco with args and adds every JSON key of its
// output to keys.
func readmeRunKeys(t *testing.T, keys map[string]bool, args ...string) {
	t.Helper()
	code, out, errs := runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("%v: exit %d: %s\n%s", args, code, errs, out)
	}
	var v any
	if err := json.Unmarshal([]byte(out), &v); err != nil {
		t.Fatalf("%v: not JSON: %v\n%s", args, err, out)
	}
	fitJSONKeys(v, keys)
}

// Every key of the calc JSON table, and of its lit results, is emitted by
// `junco calc --json` dark or lit (TestReadmeDocumentsEveryKey checks the
// other direction).
func TestReadmeCalcKeysAreEmitted(t *testing.T) {
	raw, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(raw)
	emitted := map[string]bool{}
	readmeRunKeys(t, emitted, "calc", "--json", "--bias", "0.5V")
	readmeRunKeys(t, emitted, "calc", "--json", "--wp", "2um", "--wn", "200um", "--light", "650nm:100mW/cm2", "--absorption", "3e3/cm")
	i := strings.Index(readme, "### JSON keys (`--json`)")
	j := strings.Index(readme, "## Measurements in, parameters out")
	if i < 0 || j < i {
		t.Fatal("README has no calc JSON key table before the fit section")
	}
	documented := map[string]bool{}
	for _, line := range strings.Split(readme[i:j], "\n") {
		if strings.HasPrefix(line, "| `") {
			cell := strings.SplitN(line, "|", 3)[1]
			for k := range fitReadmeKeys(t, "- `fit x --json`:"+cell, "x") {
				documented[k] = true
			}
		}
	}
	k := strings.Index(readme, "Lit results (keys only")
	if k < 0 {
		t.Fatal("README names no lit keys of calc")
	}
	for key := range fitReadmeKeys(t, "- `fit x --json`:"+readme[k:k+strings.Index(readme[k:], "`junco solve`")], "x") {
		documented[key] = true
	}
	var missing []string
	for key := range documented {
		if !emitted[key] {
			missing = append(missing, key)
		}
	}
	sort.Strings(missing)
	if len(documented) < 80 || len(missing) > 0 {
		t.Errorf("calc: %d keys documented; documented but never emitted: %v", len(documented), missing)
	}
}

// Every JSON key of `junco solve --json` (one bias, lit, a profile device,
// I-V and C-V sweeps, the quantum efficiency) is documented in the README,
// and every key the README lists is emitted by some run.
func TestReadmeDocumentsEverySolveKey(t *testing.T) {
	raw, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(raw)
	lit := []string{"--wp", "0.5um", "--wn", "200um", "--absorption", "3e3/cm"}
	runs := map[string][][]string{
		"- `solve --json`:": {
			{"solve", "--json", "--na", "1e19", "--nd", "1e16", "--bias", "-5V"},
			append([]string{"solve", "--json", "--na", "1e19", "--nd", "1e16", "--light", "650nm:100mW/cm2"}, lit...),
			{"solve", "--json", "--base", "donor", "--nd", "1e16", "--implant", "acceptor:1e14cm-2:0.1um:0.03um", "--bias", "-1V"},
		},
		"- `solve --sweep --json` and `solve --cv --json`:": {
			{"solve", "--json", "--na", "1e18", "--nd", "1e16", "--sweep", "0V:0.4V:0.2V"},
			{"solve", "--json", "--na", "1e18", "--nd", "1e16", "--cv", "-1V:0V:0.5V"},
		},
		"- `solve --qe --json`:": {
			append([]string{"solve", "--json", "--na", "1e19", "--nd", "1e16", "--qe", "400nm:600nm:100nm"}, lit...),
		},
	}
	for start, list := range runs {
		emitted := map[string]bool{}
		for _, args := range list {
			readmeRunKeys(t, emitted, args...)
		}
		documented := readmeItemKeys(t, readme, start)
		for k := range readmeItemKeys(t, readme, "JSON keys of `junco solve`") {
			documented[k] = true
		}
		readmeCompareKeys(t, start, emitted, documented, nil)
	}
}

// readmeCardFiles writes the invented demo measurements (junco's own
// model with noise, model.DemoMeasurements) as the files of a whole
// characterisation: I-V at three temperatures, C-V, a reverse sweep of
// the demo junction to breakdown and a recovery file; and an I-V sweep
// of a diode with a 1 Mohm shunt, whose card needs a subcircuit.
func readmeCardFiles(t *testing.T, dir string) (iv []string, cv, rev, rec, shunt string) {
	t.Helper()
	sets, err := model.DemoMeasurements(1)
	if err != nil {
		t.Fatal(err)
	}
	for _, ds := range sets {
		var b strings.Builder
		p := filepath.Join(dir, ds.ID+".csv")
		if ds.CapacitanceF != nil {
			b.WriteString("V,C (F)\n")
			for k, v := range ds.VoltageV {
				fmt.Fprintf(&b, "%g,%.10g\n", v, ds.CapacitanceF[k])
			}
			cv = p
		} else {
			fmt.Fprintf(&b, "# temperature: %.2f K\nV,I (A)\n", ds.TemperatureK[0])
			for k, v := range ds.VoltageV {
				fmt.Fprintf(&b, "%g,%.10g\n", v, ds.CurrentA[k])
			}
			if ds.TemperatureK[0] == model.DemoJunction().Spec.Temperature {
				iv = append([]string{p}, iv...) // the reference, as in the README
			} else {
				iv = append(iv, p)
			}
		}
		writeTestFile(t, p, []byte(b.String()))
	}
	c, err := model.IVCurve(model.DemoJunction().Spec, model.Range{From: -155, To: 0, Step: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("V,I (A)\n")
	for k, v := range c.Xs {
		fmt.Fprintf(&b, "%g,%.10g\n", v, c.Series[0].Y[k])
	}
	rev = filepath.Join(dir, "rev.csv")
	writeTestFile(t, rev, []byte(b.String()))
	rec = filepath.Join(dir, "trr.txt")
	writeTestFile(t, rec, []byte("forward current: 10 mA\nreverse current: 5 mA\nstorage time: 30 ns\nstorage time error: 1 ns\n"))
	return iv, cv, rev, rec, fitKeysIVFile(t, dir)
}

// Every JSON key of `junco fit card --json` is documented in the README,
// and every key the README lists is emitted by some run (the keys of
// --check only where ngspice is installed, its error only where not).
func TestReadmeDocumentsEveryCardKey(t *testing.T) {
	raw, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	iv, cv, rev, rec, shunt := readmeCardFiles(t, dir)
	whole := append(append([]string{"fit", "card", "--json", "--name", "D7", "--iv"}, iv...), "--cv", cv, "--reverse", rev, "--recovery", rec)
	emitted := map[string]bool{}
	readmeRunKeys(t, emitted, whole...)
	readmeRunKeys(t, emitted, "fit", "card", "--json", "--name", "D8", "--iv", shunt)
	checkKeys := []string{"installed", "element", "iv", "file", "temperature_K", "points", "rms_log_ratio", "pass", "cv",
		"max_rel_error", "rms_rel_error", "analysis_frequency_Hz", "breakdown", "bias_V", "ibv_A", "simulated_A", "limits",
		"storage_time", "forward_A", "reverse_A", "measured_s", "simulated_s"}
	mayMiss := map[string]bool{"error": true}
	if fit.SimulatorInstalled() {
		readmeRunKeys(t, emitted, append(whole, "--check")...)
		if !emitted["storage_time"] {
			t.Error("the --check run with --recovery emits no \"storage_time\": the test no longer covers it")
		}
	} else {
		for _, k := range checkKeys {
			mayMiss[k] = true
		}
	}
	// Without the simulator --check says so in "error" (exit 1).
	t.Setenv("PATH", t.TempDir())
	code, out, _ := runCLI(t, append(whole, "--check")...)
	var v any
	if err := json.Unmarshal([]byte(out), &v); code != exitFailure || err != nil {
		t.Fatalf("--check without the simulator: exit %d, %v\n%s", code, err, out)
	}
	fitJSONKeys(v, emitted)
	for _, k := range []string{"subckt", "shunt_ohm", "ISR", "NR", "TT", "BV", "IBV", "breakdown_V", "error", "check"} {
		if !emitted[k] {
			t.Errorf("the runs emit no %q: the test no longer covers it", k)
		}
	}
	readmeCompareKeys(t, "fit card", emitted, readmeItemKeys(t, string(raw), "JSON keys (`fit card --json`):"), mayMiss)
}
