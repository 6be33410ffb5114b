package cli

import (
	"bytes"
	"context"
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

// The data files written here are invented: sampled from the diode and
// junction-capacitance models with known parameters and fixed-seed noise,
// so every fitted value has a known truth.

func fitCall(args ...string) (int, string, string) {
	return fitCallCtx(context.Background(), args...)
}

func fitCallCtx(ctx context.Context, args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := runFit(ctx, args, &out, &errb)
	return code, out.String(), errb.String()
}

// fitWriteIV writes a forward sweep of the single-diode model in mA with a
// temperature comment (0 = none) and 1 % multiplicative noise.
func fitWriteIV(t testing.TB, dir, name string, d extract.SingleDiode, tempK float64, v0, v1 float64, n int, seed uint64) string {
	t.Helper()
	head := "Voltage (V),Current (mA),compliance\n"
	tk := tempK
	if tk == 0 {
		tk = 300
	} else {
		head = fmt.Sprintf("# temperature: %g K\n", tempK) + head
	}
	vt := physics.ThermalVoltage(tk)
	return fittest.Sweep{Head: head, From: v0, To: v1, Points: n, Model: func(v float64) float64 { return d.Current(v, vt) },
		Rel: 0.01, Seed: [2]uint64{seed, 5}, Scale: 1e3, Row: "%.6g,%.8g,0\n"}.Write(t, filepath.Join(dir, name))
}

func fitJSONMap(t *testing.T, s string) map[string]any {
	t.Helper()
	var m map[string]any
	if err := json.Unmarshal([]byte(s), &m); err != nil {
		t.Fatalf("not a JSON object: %v\n%s", err, s)
	}
	return m
}

func fitNear(t *testing.T, m map[string]any, key string, want, rel float64) {
	t.Helper()
	got, ok := m[key].(float64)
	if !ok {
		t.Errorf("%s missing or not a number: %v", key, m[key])
		return
	}
	if math.Abs(got/want-1) > rel {
		t.Errorf("%s = %g, want %g within %g %%", key, got, want, 100*rel)
	}
}

// Truth recovery through the command (task criteria: Is 10 %, n 2 %,
// Rs 10 %).
func TestFitIVCommandJSON(t *testing.T) {
	dir := t.TempDir()
	truth := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.5, SeriesResistanceOhm: 10, ShuntResistanceOhm: 1e6}
	p := fitWriteIV(t, dir, "die1.csv", truth, 300, 0.02, 1.0, 150, 1)
	code, out, errs := fitCall("iv", p, "--json", "--model-card", "DX1")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := fitJSONMap(t, out)
	fitNear(t, m, "saturation_current_A", 1e-12, 0.10)
	fitNear(t, m, "ideality_factor", 1.5, 0.02)
	fitNear(t, m, "series_resistance_ohm", 10, 0.10)
	fitNear(t, m, "temperature_K", 300, 1e-12)
	if m["file"] != p || m["temperature_source"] != "comment" || m["points"].(float64) != 150 {
		t.Errorf("file/temperature/points: %v %v %v", m["file"], m["temperature_source"], m["points"])
	}
	se, ok := m["stderr"].(map[string]any)
	if !ok {
		t.Fatalf("no stderr object: %s", out)
	}
	for _, k := range []string{"saturation_current_A", "ideality_factor", "series_resistance_ohm", "shunt_resistance_ohm"} {
		if _, ok := m[k]; !ok {
			t.Errorf("key %s missing", k)
		}
		if v, ok := se[k].(float64); !ok || !(v > 0) {
			t.Errorf("stderr.%s = %v", k, se[k])
		}
	}
	if rms := m["rms_log_residual"].(float64); rms < 0.005 || rms > 0.015 {
		t.Errorf("rms_log_residual %g for 1 %% noise", rms)
	}
	card, _ := m["model_card"].(string)
	if !strings.HasPrefix(card, ".model DX1 D(IS=") || !strings.Contains(card, " N=1.") || !strings.Contains(card, "TNOM=26.85") {
		t.Errorf("model card %q", card)
	}
}

func TestFitIVCommandSeveralFilesAndText(t *testing.T) {
	dir := t.TempDir()
	d := extract.SingleDiode{SaturationCurrentA: 1e-13, IdealityFactor: 1.1, SeriesResistanceOhm: 2, ShuntResistanceOhm: math.Inf(1)}
	a := fitWriteIV(t, dir, "a.csv", d, 0, 0.1, 0.8, 80, 2)
	b := fitWriteIV(t, dir, "b.csv", d, 0, 0.1, 0.8, 80, 3)
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("V,I\n0.1,oops\n"), 0o644)
	code, out, errs := fitCall("iv", a, b, bad, "--temp", "300K", "--json")
	if code != exitUsage {
		t.Errorf("exit %d with a bad file, want %d", code, exitUsage)
	}
	if !strings.Contains(errs, "bad.csv:2:2") {
		t.Errorf("stderr does not locate the bad value: %s", errs)
	}
	var arr []map[string]any
	// The failing file is on standard error only.
	if err := json.Unmarshal([]byte(out), &arr); err != nil || len(arr) != 2 || strings.Contains(out, "bad.csv") {
		t.Fatalf("want a JSON array of the 2 fits: %v\n%s", err, out)
	}
	if arr[0]["file"] != a || arr[1]["file"] != b {
		t.Errorf("elements: %v", arr)
	}
	fitNear(t, arr[1], "ideality_factor", 1.1, 0.02)
	if code, out, errs := fitCall("iv", bad); code != exitUsage || out != "" || !strings.Contains(errs, "bad.csv:2:2") {
		t.Errorf("one failing file: exit %d, stdout %q, stderr %q; want 2, nothing, the error", code, out, errs)
	}
	if code, out, _ := fitCall("iv", bad, "--json"); code != exitUsage || out != "" {
		t.Errorf("one failing file, --json: exit %d, stdout %q; want 2 and nothing", code, out)
	}
	if arr[0]["temperature_source"] != "option" {
		t.Errorf("temperature source %v", arr[0]["temperature_source"])
	}
	// Text output in trade units; no temperature: warned and 300 K assumed.
	code, out, errs = fitCall("iv", a, "--ascii")
	if code != 0 || !strings.Contains(out, "saturation current") || !strings.Contains(out, "99.") || !strings.Contains(out, " fA") ||
		!strings.Contains(out, "ideality factor") || !strings.Contains(errs, "300 K assumed") {
		t.Errorf("text output (exit %d):\n%s\nstderr: %s", code, out, errs)
	}
}

func TestFitIVCommandDoubleAndLeakage(t *testing.T) {
	dir := t.TempDir()
	vt := physics.ThermalVoltage(300)
	dd := extract.DoubleDiode{DiffusionCurrentA: 1e-14, RecombinationCurrentA: 1e-9, SeriesResistanceOhm: 5, ShuntResistanceOhm: 1e6}
	p := fittest.Sweep{Head: "# T = 27 C\nbias_V;current_A\n", From: -2, To: 0.9, Points: 301, Model: func(v float64) float64 { return dd.Current(v, vt) },
		Rel: 0.01, Seed: [2]uint64{8, 8}, Row: "%.5g;%.8g\n"}.Write(t, filepath.Join(dir, "dd.csv"))
	code, out, errs := fitCall("iv", p, "--model", "double", "--window", "0.05:0.9", "--leakage-at", "-1V", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := fitJSONMap(t, out)
	fitNear(t, m, "saturation_current_A", 1e-14, 0.10)
	fitNear(t, m, "recombination_current_A", 1e-9, 0.10)
	fitNear(t, m, "series_resistance_ohm", 5, 0.10)
	fitNear(t, m, "temperature_K", 300.15, 1e-12) // 27 C = 300.15 K
	// Leakage at -1 V: the model value (computed), within the 1 % noise.
	fitNear(t, m, "leakage_current_A", dd.Current(-1, vt), 0.03)
	if w := m["window_V"].([]any); w[0].(float64) < 0.05 || w[1].(float64) > 0.9 {
		t.Errorf("window %v", w)
	}
}

// fitWriteCV writes a C-V sweep of a one-sided abrupt junction,
// C = A sqrt(q eps N/(2 (Vbi - V))) (Sze & Ng 2007, sec. 2.2), in pF with
// 0.3 % noise.
func fitWriteCV(t *testing.T, dir string, n, vbi, area, eps float64) string {
	return fittest.Sweep{Head: "V [V]\tC [pF]\tf [kHz]\n", From: -4, To: 0.2, Points: 81,
		Model: func(v float64) float64 { return area * math.Sqrt(physics.Q*eps*n/(2*(vbi-v))) },
		Rel:   0.003, Seed: [2]uint64{4, 4}, Scale: 1e12, Row: "%.4f\t%.6g\t100\n"}.Write(t, filepath.Join(dir, "cv.tsv"))
}

func TestFitCVCommand(t *testing.T) {
	dir := t.TempDir()
	si, err := physics.MaterialByName("si")
	if err != nil {
		t.Fatal(err)
	}
	// Task criteria: doping within 5 %, Vbi within 50 mV.
	p := fitWriteCV(t, dir, 2e22, 0.78, 1e-6, si.Permittivity())
	code, out, errs := fitCall("cv", p, "--area", "1mm2", "--json", "--profile", "--model-card", "CJ1")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := fitJSONMap(t, out)
	fitNear(t, m, "doping_per_m3", 2e22, 0.05)
	if v := m["built_in_potential_V"].(float64); math.Abs(v-0.78) > 0.05 {
		t.Errorf("Vbi = %g", v)
	}
	fitNear(t, m, "grading_coefficient", 0.5, 0.05)
	fitNear(t, m, "area_m2", 1e-6, 1e-12)
	for _, k := range []string{"zero_bias_capacitance_F", "stderr", "doping_profile", "model_card"} {
		if m[k] == nil {
			t.Errorf("%s missing", k)
		}
	}
	se := m["stderr"].(map[string]any)
	if !(se["doping_per_m3"].(float64) > 0) || !(se["built_in_potential_V"].(float64) > 0) {
		t.Errorf("stderr %v", se)
	}
	if card := m["model_card"].(string); !strings.HasPrefix(card, ".model CJ1 D(CJO=") || !strings.Contains(card, " M=0.") {
		t.Errorf("card %q", card)
	}
	// A bare area is in cm^2 and the doping scales as 1/A^2: 1e-2 cm^2 is
	// the same 1 mm^2.
	code, out, _ = fitCall("cv", p, "--area", "0.01", "--json")
	if code != 0 {
		t.Fatal(out)
	}
	fitNear(t, fitJSONMap(t, out), "doping_per_m3", 2e22, 0.05)
	// Another material changes eps and so N = 2/(q eps A^2 |slope|) by
	// eps_Si/eps_Ge (DopingFromSlope).
	ge, _ := physics.MaterialByName("ge")
	code, out, _ = fitCall("cv", p, "--area", "1mm2", "--material", "ge", "--json")
	if code != 0 {
		t.Fatal(out)
	}
	fitNear(t, fitJSONMap(t, out), "doping_per_m3", 2e22*si.Permittivity()/ge.Permittivity(), 0.05)
	code, out, _ = fitCall("cv", p, "--area", "1mm2", "--profile")
	if code != 0 || !strings.Contains(out, "Mott-Schottky") || !strings.Contains(out, "cm^-3") || !strings.Contains(out, "doping profile") {
		t.Errorf("text (exit %d):\n%s", code, out)
	}
	// Without an area: the junction fit, no doping, and the status says why.
	code, out, errs = fitCall("cv", p, "--json")
	if code != 0 {
		t.Fatalf("no area: exit %d: %s", code, errs)
	}
	m = fitJSONMap(t, out)
	st := m["status"].(map[string]any)
	if m["doping_per_m3"] != nil || m["area_m2"] != nil || !strings.Contains(st["doping_per_m3"].(map[string]any)["reason"].(string), "no area") {
		t.Errorf("no area: doping %v, area %v, status %v", m["doping_per_m3"], m["area_m2"], st["doping_per_m3"])
	}
	if v := m["built_in_potential_V"].(float64); math.Abs(v-0.78) > 0.05 || st["built_in_potential_V"].(map[string]any)["determined"] != true {
		t.Errorf("no area: Vbi = %g, status %v", v, st["built_in_potential_V"])
	}
	// Holding m and Cpar: marked held, doping still within 5 %.
	code, out, errs = fitCall("cv", p, "--area", "1mm2", "--grading", "0.5", "--parasitic", "0pF", "--json")
	if code != 0 {
		t.Fatalf("held: exit %d: %s", code, errs)
	}
	m = fitJSONMap(t, out)
	fitNear(t, m, "doping_per_m3", 2e22, 0.05)
	st = m["status"].(map[string]any)
	for _, k := range []string{"grading_coefficient", "parasitic_capacitance_F"} {
		if x := st[k].(map[string]any); x["held"] != true || !strings.Contains(x["reason"].(string), "held at") {
			t.Errorf("held %s: %v", k, x)
		}
	}
	code, out, _ = fitCall("cv", p, "--area", "1mm2", "--grading", "0.5")
	if code != 0 || !strings.Contains(out, "held at 0.5") {
		t.Errorf("held, text (exit %d):\n%s", code, out)
	}
}

// A linearly graded junction with 5 pF of fixture capacitance, C = A (q a
// eps^2/(12 (Vbi - V)))^(1/3) + Cpar (Sze & Ng 2007, sec. 2.2), 0.2 %
// noise: the headline Vbi is the junction fit's (within 50 mV, m within
// 0.03 of 1/3), and the doping is withheld with the reason, in JSON
// (null) and in the text ("not determined").
func TestFitCVGradedParasitic(t *testing.T) {
	si, _ := physics.MaterialByName("si")
	eps := si.Permittivity()
	p := fittest.Sweep{Head: "V [V]\tC [pF]\n", From: -10, To: 0.3, Points: 81,
		Model: func(v float64) float64 { return 1e-7*math.Cbrt(physics.Q*1e28*eps*eps/(12*(0.7-v))) + 5e-12 },
		Rel:   0.002, Seed: [2]uint64{12, 12}, Scale: 1e12, Row: "%.4f\t%.6g\n"}.Write(t, filepath.Join(t.TempDir(), "graded.tsv"))
	code, out, errs := fitCall("cv", p, "--area", "0.1mm2", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := fitJSONMap(t, out)
	if v := m["built_in_potential_V"].(float64); math.Abs(v-0.7) > 0.05 {
		t.Errorf("Vbi = %g, truth 0.7", v)
	}
	if g := m["grading_coefficient"].(float64); math.Abs(g-1.0/3) > 0.03 {
		t.Errorf("m = %g, truth 1/3", g)
	}
	fitNear(t, m, "parasitic_capacitance_F", 5e-12, 0.2)
	st := m["status"].(map[string]any)["doping_per_m3"].(map[string]any)
	if m["doping_per_m3"] != nil || st["determined"] != false || !strings.Contains(st["reason"].(string), "not consistent with 1/2") {
		t.Errorf("doping %v, status %v", m["doping_per_m3"], st)
	}
	if l := m["mott_schottky_line"].(map[string]any); l["flagged"] != true {
		t.Errorf("line %v must be flagged", l)
	}
	code, out, _ = fitCall("cv", p, "--area", "0.1mm2")
	if code != 0 || !strings.Contains(out, "not determined: m = 0.3") {
		t.Errorf("text (exit %d):\n%s", code, out)
	}
}

// Arrhenius through the command: Is(T) = C T^3 exp(-Eg/kT) with Eg =
// 1.12 eV (Si, from memory) gives Ea = Eg (Sze & Ng 2007, sec. 2.3).
func TestFitArrheniusCommand(t *testing.T) {
	dir := t.TempDir()
	var files []string
	for k, tk := range []float64{280, 300, 320, 340, 360} {
		vt := physics.ThermalVoltage(tk)
		d := extract.SingleDiode{SaturationCurrentA: 50 * math.Pow(tk, 3) * math.Exp(-1.12/vt), IdealityFactor: 1, SeriesResistanceOhm: 1, ShuntResistanceOhm: math.Inf(1)}
		files = append(files, fitWriteIV(t, dir, fmt.Sprintf("t%d.csv", k), d, tk, 0.1, 0.75, 80, uint64(k+10)))
	}
	code, out, errs := fitCall(append([]string{"arrhenius", "--json", "--current", "1mA"}, files...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := fitJSONMap(t, out)
	if ea := m["activation_energy_eV"].(float64); math.Abs(ea-1.12) > 0.03 {
		t.Errorf("Ea = %g eV", ea)
	}
	if dv, ok := m["vf_temperature_coefficient_V_per_K"].(float64); !ok || dv > -1e-3 || dv < -3e-3 {
		t.Errorf("dVF/dT = %v (Si near 1 mA: about -2 mV/K, common practice)", m["vf_temperature_coefficient_V_per_K"])
	}
	if len(m["temperatures"].([]any)) != 5 {
		t.Errorf("temperatures %v", m["temperatures"])
	}
	// --temp per file overrides the comments; a wrong count is bad input.
	code, _, errs = fitCall(append([]string{"arrhenius", "--temp", "300K,310K"}, files...)...)
	if code != exitUsage || !strings.Contains(errs, "2 temperatures for 5 files") {
		t.Errorf("count mismatch: exit %d %s", code, errs)
	}
	code, out, _ = fitCall(append([]string{"arrhenius"}, files...)...)
	if code != 0 || !strings.Contains(out, "activation energy") || !strings.Contains(out, "eV") {
		t.Errorf("text (exit %d): %s", code, out)
	}
}

func fitBatchDir(t testing.TB, n int) string {
	dir := t.TempDir()
	for k := 0; k < n; k++ {
		d := extract.SingleDiode{SaturationCurrentA: 1e-12 * (1 + 0.05*float64(k%7)), IdealityFactor: 1.4 + 0.005*float64(k%5), SeriesResistanceOhm: 8, ShuntResistanceOhm: math.Inf(1)}
		if k == 3 {
			d.SaturationCurrentA = 1e-9 // a leaky die: an outlier
		}
		fitWriteIV(t, dir, fmt.Sprintf("die%04d.csv", k), d, 300, 0.1, 0.9, 60, uint64(k))
	}
	return dir
}

func TestFitBatchCommand(t *testing.T) {
	dir := fitBatchDir(t, 24)
	os.WriteFile(filepath.Join(dir, "die9999.csv"), []byte("V,T (K)\n1,300\n"), 0o644) // no current column
	os.WriteFile(filepath.Join(dir, "notes.md"), []byte("not data"), 0o644)
	csvPath := filepath.Join(t.TempDir(), "out.csv")
	code, out, errs := fitCall("batch", dir, "--jobs", "2", "--csv", csvPath)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "25 files: 24 fitted, 1 failed") || !strings.Contains(out, "die0003.csv") || !strings.Contains(out, "die9999.csv") {
		t.Errorf("summary:\n%s", out)
	}
	f, err := os.Open(csvPath)
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil || len(recs) != 26 {
		t.Fatalf("csv: %v, %d records", err, len(recs))
	}
	head := strings.Join(recs[0], ",")
	if !strings.HasPrefix(head, "file,status,error,model,temperature_K") || !strings.Contains(head, "ideality_factor_stderr") {
		t.Errorf("csv header %s", head)
	}
	outlierIn := slices.Index(recs[0], "outlier_in")
	if recs[4][1] != "ok" || outlierIn < 0 || !strings.Contains(recs[4][outlierIn], "saturation_current_A") {
		t.Errorf("die0003 row %v", recs[4])
	}
	if recs[25][1] != "error" || !strings.Contains(recs[25][2], "missing column") {
		t.Errorf("failed row %v", recs[25])
	}
	// JSON summary: median n near the middle of 1.40..1.42.
	code, out, _ = fitCall("batch", dir, "--json")
	if code != 0 {
		t.Fatal(out)
	}
	m := fitJSONMap(t, out)
	sum := m["summary"].(map[string]any)
	nsum := sum["ideality_factor"].(map[string]any)
	if med := nsum["median"].(float64); math.Abs(med-1.41) > 0.02 {
		t.Errorf("median n %g", med)
	}
	is := sum["saturation_current_A"].(map[string]any)
	if o := is["outliers"].([]any); len(o) != 1 || !strings.HasSuffix(o[0].(string), "die0003.csv") {
		t.Errorf("Is outliers %v", o)
	}
}

func TestFitBatchInterrupted(t *testing.T) {
	dir := fitBatchDir(t, 6)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	code, out, errs := fitCallCtx(ctx, "batch", dir, "--csv", "-")
	if code != exitFailure || !strings.Contains(errs, "interrupted") {
		t.Errorf("exit %d, stderr %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) != 7 {
		t.Fatalf("csv %v: %d", err, len(recs))
	}
	for _, r := range recs[1:] {
		if r[1] != "not_run" {
			t.Errorf("row %v", r)
		}
	}
}

func TestFitBadInput(t *testing.T) {
	dir := t.TempDir()
	good := fitWriteIV(t, dir, "g.csv", extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.2, ShuntResistanceOhm: math.Inf(1)}, 300, 0.1, 0.7, 40, 1)
	cv := filepath.Join(dir, "c.csv")
	os.WriteFile(cv, []byte("V,C (pF)\n-1,10\n0,12\n"), 0o644)
	cases := []struct {
		name string
		args []string
		code int
		msg  string
	}{
		{"no subcommand", nil, exitUsage, "Usage"},
		{"unknown subcommand", []string{"xy"}, exitUsage, `unknown subcommand "xy"`},
		{"unknown option", []string{"iv", good, "--bogus"}, exitUsage, `unknown option "--bogus"`},
		{"option without value", []string{"iv", good, "--temp"}, exitUsage, "--temp needs a value"},
		{"bad temperature", []string{"iv", good, "--temp", "hot"}, exitUsage, "not a valid temperature"},
		{"temperature out of range", []string{"iv", good, "--temp", "-300C"}, exitUsage, "allowed 1..2000 K"},
		{"bad window", []string{"iv", good, "--window", "0.7"}, exitUsage, "expected V1:V2"},
		{"reversed window", []string{"iv", good, "--window", "0.7:0.1"}, exitUsage, "lower bound"},
		{"empty window", []string{"iv", good, "--window", "2:3"}, exitUsage, "usable points"},
		{"bad model", []string{"iv", good, "--model", "triple"}, exitUsage, "single or double"},
		{"bad card name", []string{"iv", good, "--model-card", "a b"}, exitUsage, "model-card"},
		{"forward leakage bias", []string{"iv", good, "--leakage-at", "1V"}, exitUsage, "reverse bias"},
		{"no file", []string{"iv"}, exitUsage, "no data file"},
		{"missing file", []string{"iv", filepath.Join(dir, "nope.csv")}, exitUsage, "nope.csv"},
		{"directory to iv", []string{"iv", dir}, exitUsage, "is a directory"},
		{"cv profile without area", []string{"cv", cv, "--profile"}, exitUsage, "--profile needs --area"},
		{"cv bad grading", []string{"cv", cv, "--grading", "7"}, exitUsage, "--grading"},
		{"cv bad parasitic", []string{"cv", cv, "--parasitic", "2 farad"}, exitUsage, "--parasitic"},
		{"cv huge parasitic", []string{"cv", cv, "--parasitic", "1F"}, exitUsage, "allowed from -1 uF to 1 uF"},
		{"cv bad area", []string{"cv", cv, "--area", "1 acre"}, exitUsage, "not a valid area"},
		{"cv zero area", []string{"cv", cv, "--area", "0"}, exitUsage, "above 0"},
		{"cv bad material", []string{"cv", cv, "--area", "1mm2", "--material", "unobtainium"}, exitUsage, "unknown material"},
		{"cv on I-V file", []string{"cv", good, "--area", "1mm2"}, exitUsage, "capacitance"},
		{"cv two files", []string{"cv", cv, cv, "--area", "1mm2"}, exitUsage, "exactly one"},
		{"arrhenius too few", []string{"arrhenius", good, good}, exitUsage, "3 or more"},
		{"batch bad jobs", []string{"batch", dir, "--jobs", "0"}, exitUsage, "1..1024"},
		{"batch empty dir", []string{"batch", t.TempDir()}, exitUsage, "no .csv"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, errs := fitCall(c.args...)
			if code != c.code || !strings.Contains(errs, c.msg) {
				t.Errorf("exit %d (want %d), stderr %q (want %q)", code, c.code, errs, c.msg)
			}
		})
	}
	code, out, _ := fitCall("help")
	if code != 0 || !strings.Contains(out, "junco fit batch") {
		t.Errorf("help: %d %s", code, out)
	}
}

// BenchmarkFitBatch1000Files fits 1000 invented 60-point I-V files with two
// workers; target under 10 s on 2 cores.
func BenchmarkFitBatch1000Files(b *testing.B) {
	dir := fitBatchDir(b, 1000)
	csvPath := filepath.Join(b.TempDir(), "out.csv")
	for b.Loop() {
		code, _, errs := fitCall("batch", dir, "--jobs", "2", "--csv", csvPath)
		if code != 0 {
			b.Fatal(errs)
		}
	}
}

// fitLitTruth is an invented lit diode (of the order of a silicon cell).
var fitLitTruth = extract.LitDiode{PhotocurrentA: 0.3, SaturationCurrentA: 5e-9, IdealityFactor: 1.4, SeriesResistanceOhm: 0.1, ShuntResistanceOhm: 120}

// fitWriteLit writes an invented lit sweep (the model's curve plus 0.03 mA
// noise; test data, not a measurement) in mA, in the generator sign
// (delivered current positive) or the load sign.
func fitWriteLit(t testing.TB, dir string, generator bool) string {
	t.Helper()
	vt := physics.ThermalVoltage(300)
	return fittest.Sweep{Head: "# invented lit sweep (test data)\n# temperature: 300 K\nV,I (mA)\n", From: -0.05, To: 0.67, Points: 61,
		Model: func(v float64) float64 { return fitLitTruth.Current(v, vt) }, Abs: 3e-5, Negate: generator,
		Seed: [2]uint64{11, 5}, Scale: 1e3, Row: "%.4f,%.6f\n"}.Write(t, filepath.Join(dir, fmt.Sprintf("lit-%v.csv", generator)))
}

// fit iv recognises a lit file in either sign, says which it assumed, and
// reports the lit parameters (near the invented truth) and the figures of
// merit in text and JSON; --light forces the lit fit, which a dark curve
// then refuses with a clear error.
func TestFitIVLitCurve(t *testing.T) {
	dir := t.TempDir()
	for _, gen := range []bool{false, true} {
		p := fitWriteLit(t, dir, gen)
		code, out, errs := fitCall("iv", p, "--json")
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(out), &m); err != nil {
			t.Fatal(err)
		}
		want := "load"
		if gen {
			want = "generator"
		}
		if m["model"] != "lit" || m["current_sign"] != want {
			t.Errorf("generator %v: model %v, sign %v", gen, m["model"], m["current_sign"])
		}
		iph, _ := m["photocurrent_A"].(float64)
		n, _ := m["ideality_factor"].(float64)
		if math.Abs(iph/fitLitTruth.PhotocurrentA-1) > 0.005 || math.Abs(n/fitLitTruth.IdealityFactor-1) > 0.02 {
			t.Errorf("generator %v: Iph %g, n %g; truth %g, %g", gen, iph, n, fitLitTruth.PhotocurrentA, fitLitTruth.IdealityFactor)
		}
		for _, k := range []string{"rms_residual_A", "figures_from_data", "figures_from_fit", "photocurrent_stderr_A"} {
			if m[k] == nil {
				t.Errorf("generator %v: no %s in %s", gen, k, out)
			}
		}
		fd := m["figures_from_data"].(map[string]any)
		ff := m["figures_from_fit"].(map[string]any)
		if a, b := fd["fill_factor"].(float64), ff["fill_factor"].(float64); math.Abs(a-b) > 0.01 || !(a > 0.5 && a < 0.9) {
			t.Errorf("fill factor: data %g, fit %g", a, b)
		}
		code, out, _ = fitCall("iv", p, "--ascii")
		for _, s := range []string{"lit single diode", "current sign", want, "Iph", "fill factor FF", "(data)", "(fit)"} {
			if code != exitOK || !strings.Contains(out, s) {
				t.Errorf("text (exit %d) lacks %q:\n%s", code, s, out)
			}
		}
	}
	d := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.2, SeriesResistanceOhm: 2, ShuntResistanceOhm: math.Inf(1)}
	dark := fitWriteIV(t, dir, "dark.csv", d, 300, 0.1, 0.7, 40, 1)
	if code, out, errs := fitCall("iv", dark, "--json"); code != exitOK || strings.Contains(out, "photocurrent_A") {
		t.Errorf("dark file: exit %d, %s%s", code, out, errs)
	}
	code, _, errs := fitCall("iv", dark, "--light")
	if code != exitUsage || !strings.Contains(errs, "current =") || !strings.Contains(errs, "lit fit") {
		t.Errorf("--light on a dark forward sweep: exit %d, %s", code, errs)
	}
}

// --save-to stores a lit fit as iv-lit-single-diode with Iph first, and
// the data set; the document is valid.
func TestFitIVLitSaveTo(t *testing.T) {
	files, store := t.TempDir(), t.TempDir()
	p := fitWriteLit(t, files, true)
	if code, _, errs := fitCall("iv", p, "--save-to", "cells", "--data", store); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, _, err := fitSaveStore(t, store).Open("cells", 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Extractions) != 1 || len(doc.Measurements) != 1 {
		t.Fatalf("%d extractions, %d measurements", len(doc.Extractions), len(doc.Measurements))
	}
	x := doc.Extractions[0]
	iph, ok := fitSaveParamByName(x, "Iph")
	if x.Method != "iv-lit-single-diode" || !ok || math.Abs(iph.Value/fitLitTruth.PhotocurrentA-1) > 0.005 || len(x.Parameters) != 5 {
		t.Errorf("extraction %+v", x)
	}
	if err := doc.Validate(); err != nil {
		t.Errorf("invalid document: %v", err)
	}
}

// The batch's collector percentage makes a heap of 32 MiB for small batches
// (543 % for 2,000 files: live 4 MiB + 2,000 x 512 B = 4.98 MiB,
// 32 MiB / 4.98 MiB = 6.43 times it)
// and leaves the default where twice the estimated live heap exceeds
// 32 MiB (from 24,576 files on), so the heap is never more than
// max(32 MiB, 2 x live): arithmetic of the rule in batchGCPercent.
func TestBatchGCPercent(t *testing.T) {
	for _, c := range []struct{ n, want int }{{1, 699}, {2000, 543}, {24575, 100}, {24576, 100}, {1000000, 100}} {
		if got := batchGCPercent(c.n); got != c.want {
			t.Errorf("batchGCPercent(%d) = %d, want %d", c.n, got, c.want)
		}
		live := 4<<20 + 512*c.n
		if heap := live * (100 + batchGCPercent(c.n)) / 100; heap > max(32<<20, 2*live) {
			t.Errorf("%d files: heap goal %d bytes above max(32 MiB, 2 x %d)", c.n, heap, live)
		}
	}
}
