package cli

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"
	"testing"
	"time"

	"junco/model"
	"junco/physics"
	"junco/physics/extract"
	"junco/sessions"
)

// fitJSONKeys adds every object key found in v (at any depth) to keys.
func fitJSONKeys(v any, keys map[string]bool) {
	switch x := v.(type) {
	case map[string]any:
		for k, e := range x {
			keys[k] = true
			fitJSONKeys(e, keys)
		}
	case []any:
		for _, e := range x {
			fitJSONKeys(e, keys)
		}
	}
}

// fitReadmeKeys returns the keys the README lists for a fit subcommand:
// the back-quoted words of the line that starts with "- `fit SUB --json`:".
func fitReadmeKeys(t *testing.T, readme, sub string) map[string]bool {
	t.Helper()
	start := "- `fit " + sub + " --json`:"
	i := strings.Index(readme, start)
	if i < 0 {
		t.Fatalf("README has no line starting %q", start)
	}
	item := readme[i+len(start):]
	if j := strings.Index(item, "\n- "); j >= 0 {
		item = item[:j]
	}
	if j := strings.Index(item, "\n\n"); j >= 0 {
		item = item[:j]
	}
	keys := map[string]bool{}
	for _, m := range regexp.MustCompile("`([a-zA-Z0-9_]+)`").FindAllStringSubmatch(item, -1) {
		keys[m[1]] = true
	}
	return keys
}

// fitKeysIVFile writes an invented I-V sweep from -2 V to 0.9 V (single
// diode, Rsh 1 Mohm) with one unreadable row, so that the leakage, the
// zero-bias resistance and the row problems all appear.
func fitKeysIVFile(t *testing.T, dir string) string {
	t.Helper()
	d := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.05, SeriesResistanceOhm: 5, ShuntResistanceOhm: 1e6}
	vt := physics.ThermalVoltage(300)
	var b strings.Builder
	b.WriteString("# temperature: 300 K\nV,I (A)\n")
	for k := 0; k <= 116; k++ {
		v := -2 + 0.025*float64(k)
		fmt.Fprintf(&b, "%.4f,%.8g\n", v, d.Current(v, vt))
		if k == 50 {
			b.WriteString("0.51,NaN\n")
		}
	}
	p := filepath.Join(dir, "keys.csv")
	writeTestFile(t, p, []byte(b.String()))
	return p
}

// fitKeysCVFile copies the invented C-V file with one unreadable row
// (a row problem, reported in the notes).
func fitKeysCVFile(t *testing.T, dir string) string {
	t.Helper()
	b, err := os.ReadFile("testdata/fit/cv.tsv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(b), "\n")
	lines = append(lines[:5], append([]string{"-3.5\tNaN\t100\n"}, lines[5:]...)...)
	p := filepath.Join(dir, "cv-nan.tsv")
	writeTestFile(t, p, []byte(strings.Join(lines, "")))
	return p
}

// fitKeysRecombination writes invented I-V files at 280, 300 and 320 K of
// a diode with n = 1.6 (a mean n above 1.3 draws a note).
func fitKeysRecombination(t *testing.T, dir string) []string {
	t.Helper()
	var out []string
	for k, tk := range []float64{280, 300, 320} {
		vt := physics.ThermalVoltage(tk)
		d := extract.SingleDiode{SaturationCurrentA: 1e3 * math.Pow(tk, 1.5) * math.Exp(-0.56/vt), IdealityFactor: 1.6, SeriesResistanceOhm: 2, ShuntResistanceOhm: math.Inf(1)}
		out = append(out, fitWriteIV(t, dir, fmt.Sprintf("r%d.csv", k), d, tk, 0.1, 0.8, 60, uint64(k+30)))
	}
	return out
}

// Every JSON key of `junco fit iv|cv|arrhenius|batch --json` is documented
// in the README, and every key the README lists for them is emitted by
// some run: the keys are a public interface.
func TestReadmeDocumentsEveryFitKey(t *testing.T) {
	raw, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	readme := string(raw)
	dir := t.TempDir()
	ivAll := fitKeysIVFile(t, dir)
	spec := model.DefaultSpec()
	enc, err := sessions.Encode(sessions.NewDocument("keys", "test", spec, time.Unix(0, 0)))
	if err != nil {
		t.Fatal(err)
	}
	sess := filepath.Join(dir, "s.json")
	writeTestFile(t, sess, enc)
	arr := []string{"testdata/fit/arrhenius/iv-250K.csv", "testdata/fit/arrhenius/iv-300K.csv", "testdata/fit/arrhenius/iv-350K.csv"}
	runs := map[string][][]string{
		"iv": {
			{"iv", "testdata/fit/iv.csv", filepath.Join(dir, "missing.csv"), "--json"},
			{"iv", ivAll, "--json", "--leakage-at", "-1V", "--model", "double", "--model-card", "D1", "--compare", sess},
			{"iv", ivAll, "--json", "--window", "0.3:0.6", "--compare", sess},
			{"iv", ivAll, "--json", "--compliance", "1uA", "--floor", "10nA"},
			{"iv", "testdata/fit/wafer/die00.csv", "--json", "--compare", sess},
			{"iv", fitWriteLit(t, dir, true), "--json"},
		},
		"cv": {
			{"cv", "testdata/fit/cv.tsv", "--area", "1mm2", "--profile", "--model-card", "CJ1", "--json"},
			{"cv", fitKeysCVFile(t, dir), "--area", "1mm2", "--json"},
			{"cv", "testdata/fit/cv.tsv", "--grading", "0.5", "--parasitic", "1pF", "--json"},
		},
		"arrhenius": {
			append([]string{"arrhenius", "--current", "1mA", "--json"}, arr...),
			append([]string{"arrhenius", "--json"}, fitKeysRecombination(t, dir)...),
		},
		"batch": {{"batch", "testdata/fit/wafer", "--json"}, {"batch", "testdata/fit/wafer", "--json", "--model", "double"},
			{"batch", "testdata/fit/wafermap", "--json", "--limit", "n:1.3:1.42", "--limit", "Rs::8.2ohm"}, {"batch", "testdata/fit/wafermap-manifest", "--json"},
			{"batch", fitWriteMixedBatch(t, dir), "--json"}},
	}
	for _, sub := range []string{"iv", "cv", "arrhenius", "batch"} {
		emitted := map[string]bool{}
		for _, args := range runs[sub] {
			_, out, errs := fitCall(args...)
			var v any
			if err := json.Unmarshal([]byte(out), &v); err != nil {
				t.Fatalf("%v: not JSON: %v\n%s%s", args, err, out, errs)
			}
			fitJSONKeys(v, emitted)
		}
		documented := fitReadmeKeys(t, readme, sub)
		var undocumented, missing []string
		for k := range emitted {
			if !documented[k] {
				undocumented = append(undocumented, k)
			}
		}
		for k := range documented {
			if !emitted[k] {
				missing = append(missing, k)
			}
		}
		sort.Strings(undocumented)
		sort.Strings(missing)
		if len(undocumented) > 0 {
			t.Errorf("fit %s: emitted but not documented in the README: %v", sub, undocumented)
		}
		if len(missing) > 0 {
			t.Errorf("fit %s: documented in the README but never emitted: %v", sub, missing)
		}
	}
}
