package cli

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"junco/model/fit/fittest"
	"junco/physics"
	"junco/physics/extract"
)

// fitMixedLit are the invented lit dies of fitWriteMixedBatch, near
// fitLitTruth (test data, not measurements).
var fitMixedLit = []extract.LitDiode{
	{PhotocurrentA: 0.30, SaturationCurrentA: 5e-9, IdealityFactor: 1.4, SeriesResistanceOhm: 0.1, ShuntResistanceOhm: 120},
	{PhotocurrentA: 0.31, SaturationCurrentA: 6e-9, IdealityFactor: 1.41, SeriesResistanceOhm: 0.1, ShuntResistanceOhm: 110},
	{PhotocurrentA: 0.29, SaturationCurrentA: 4e-9, IdealityFactor: 1.39, SeriesResistanceOhm: 0.12, ShuntResistanceOhm: 130},
}

// fitWriteMixedBatch writes an invented folder of three dark dies
// (die_x0K_y00.csv) and three lit dies (die_x0K_y01.csv, the second in the
// generator sign) and returns it.
func fitWriteMixedBatch(t testing.TB, dir string) string {
	t.Helper()
	dir = filepath.Join(dir, "mixed")
	for k := range 3 {
		d := extract.SingleDiode{SaturationCurrentA: 1e-12 * (1 + 0.1*float64(k)), IdealityFactor: 1.4, SeriesResistanceOhm: 8, ShuntResistanceOhm: math.Inf(1)}
		fitWriteIV(t, dir, fmt.Sprintf("die_x%02d_y00.csv", k), d, 300, 0.1, 0.8, 60, uint64(40+k))
	}
	vt := physics.ThermalVoltage(300)
	for k, d := range fitMixedLit {
		fittest.Sweep{Head: "# invented lit sweep (test data)\n# temperature: 300 K\nV,I (mA)\n", From: -0.05, To: 0.67, Points: 61,
			Model: func(v float64) float64 { return d.Current(v, vt) }, Abs: 3e-5, Negate: k == 1,
			Seed: [2]uint64{uint64(50 + k), 5}, Scale: 1e3, Row: "%.4f,%.6f\n"}.Write(t, filepath.Join(dir, fmt.Sprintf("die_x%02d_y01.csv", k)))
	}
	return dir
}

// fit batch on a folder of dark and lit files: each row says its model;
// the lit rows carry Iph (within 0.5 % of the invented truth) and Voc
// (within 2 mV of the truth's own curve: the lit model's round trip) and
// no dark keys; the summary keeps the populations apart (3 dark Is, 3 lit
// Voc); the CSV has the model column; --map voc draws the Voc map and
// --limit Voc:0.55:0.7 passes the lit dies only (a dark die's Voc is not
// determined).
func TestFitBatchLitFiles(t *testing.T) {
	dir := fitWriteMixedBatch(t, t.TempDir())
	b := cliBatch(t, dir)
	_, out, _ := fitCall("batch", dir, "--json")
	var raw struct {
		Results []map[string]any `json:"results"`
	}
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatal(err)
	}
	vt := physics.ThermalVoltage(300)
	lit := 0
	for _, r := range raw.Results {
		file, _ := r["file"].(string)
		if !strings.Contains(file, "_y01") {
			if r["model"] != "dark" || r["photocurrent_A"] != nil || r["saturation_current_A"] == nil {
				t.Errorf("%s: dark row %v", file, r)
			}
			continue
		}
		truth := fitMixedLit[lit]
		lit++
		want, err := truth.Figures(vt)
		if err != nil {
			t.Fatal(err)
		}
		iph, _ := r["photocurrent_A"].(float64)
		voc, _ := r["open_circuit_voltage_V"].(float64)
		if r["model"] != "lit" || r["saturation_current_A"] != nil || r["rms_residual_A"] == nil ||
			math.Abs(iph/truth.PhotocurrentA-1) > 0.005 || math.Abs(voc-want.Voc) > 2e-3 {
			t.Errorf("%s: lit row %v; truth Iph %g, Voc %g", file, r, truth.PhotocurrentA, want.Voc)
		}
	}
	if lit != 3 || b.Summary["saturation_current_A"].N != 3 || b.Summary["open_circuit_voltage_V"].N != 3 || b.Summary["lit_saturation_current_A"].N != 3 {
		t.Errorf("%d lit rows; summary %+v", lit, b.Summary)
	}

	code, out, errs := fitCall("batch", dir, "--csv", "-")
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if code != exitOK || err != nil || len(recs) != 7 {
		t.Fatalf("csv: exit %d, %v, %d records: %s", code, err, len(recs), errs)
	}
	m, voc := slices.Index(recs[0], "model"), slices.Index(recs[0], "open_circuit_voltage_V")
	if m < 0 || voc < 0 || recs[1][m] != "dark" || recs[1][voc] != "" || recs[4][m] != "lit" || recs[4][voc] == "" {
		t.Errorf("csv model and Voc columns:\n%s", out)
	}

	code, out, errs = fitCall("batch", dir, "--map", "voc", "--limit", "Voc:0.55:0.7")
	if code != exitOK || !strings.Contains(out, "open-circuit voltage Voc (lit)") || !strings.Contains(out, "3 of 6") ||
		!strings.Contains(out, "3 lit files fitted with the lit single-diode model") {
		t.Errorf("--map voc --limit: exit %d\n%s%s", code, out, errs)
	}
}

// A mixed batch kept with a session (--save-to) shows the lit
// population's statistics in sessions show, and its Markdown export and
// --report draw the Voc wafer map.
func TestFitBatchLitSaveAndReport(t *testing.T) {
	t.Setenv("USER", "ana")
	dir := fitWriteMixedBatch(t, t.TempDir())
	store := t.TempDir()
	if code, _, errs := fitCall("batch", dir, "--save-to", "cells", "--data", store); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	code, out, errs := sess(t, store, "show", "cells")
	for _, w := range []string{"open-circuit voltage Voc (lit)", "saturation current Is"} {
		if code != exitOK || !strings.Contains(out, w) {
			t.Errorf("show lacks %q (exit %d, %s):\n%s", w, code, errs, out)
		}
	}
	rep := filepath.Join(t.TempDir(), "cells.md")
	if code, _, errs := fitCall("batch", dir, "--map", "Voc", "--report", rep); code != exitOK {
		t.Fatalf("--report: exit %d: %s", code, errs)
	}
	md, err := os.ReadFile(rep)
	if err != nil || !strings.Contains(string(md), "open-circuit voltage Voc (lit)") {
		t.Errorf("report (%v):\n%s", err, md)
	}
	if svg, err := os.ReadFile(strings.TrimSuffix(rep, ".md") + "-map-voc.svg"); err != nil || !strings.Contains(string(svg), "<svg") {
		t.Errorf("Voc wafer map figure: %v", err)
	}
}
