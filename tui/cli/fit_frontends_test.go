package cli

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"junco/model/fit"
	"junco/physics/extract"
	"junco/sessions"
)

// These tests put the command line (runFit) and the workbench's calls into
// model/fit (the same calls tui/measure*.go make) on the same files and
// require one answer: each covers one divergence the two front ends had
// before they shared the fit layer. The files are the invented ones in
// testdata/fit (INVENTED.md) or written here from the diode model.

// workbenchRule is the temperature rule of the workbench: the junction's
// temperature when the file states none.
func workbenchRule(junctionK float64) fit.TemperatureRule {
	return fit.TemperatureRule{FallbackK: junctionK, FallbackSource: fit.SourceJunction}
}

type batchJSON struct {
	Files   int `json:"files"`
	Summary map[string]struct {
		N        int      `json:"n"`
		Median   *float64 `json:"median"`
		Q1       *float64 `json:"q1"`
		Q3       *float64 `json:"q3"`
		LogScale bool     `json:"log_scale"`
		Outliers []string `json:"outliers"`
	} `json:"summary"`
	Results []struct {
		File   string   `json:"file"`
		Status string   `json:"status"`
		Rs     *float64 `json:"series_resistance_ohm"`
	} `json:"results"`
}

func cliBatch(t *testing.T, args ...string) batchJSON {
	t.Helper()
	code, out, errs := fitCall(append([]string{"batch", "--json"}, args...)...)
	if code != exitOK {
		t.Fatalf("fit batch: exit %d: %s", code, errs)
	}
	var b batchJSON
	if err := json.Unmarshal([]byte(out), &b); err != nil {
		t.Fatal(err)
	}
	return b
}

// Batch file discovery: one policy (recursive, .csv/.tsv/.txt/.dat,
// hidden entries and other extensions skipped, sorted). The command line
// and the workbench's fit.BatchFiles list the same files, including the
// .dat file and the .txt file in a subdirectory, and not README.md.
func TestFrontEndsBatchFiles(t *testing.T) {
	dir := "testdata/fit/wafer"
	b := cliBatch(t, dir)
	wb, err := fit.BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	var cli []string
	for _, r := range b.Results {
		cli = append(cli, r.File)
	}
	if strings.Join(cli, " ") != strings.Join(wb, " ") {
		t.Fatalf("command line %v, workbench %v", cli, wb)
	}
	joined := strings.Join(wb, " ")
	for _, want := range []string{"die08.dat", filepath.Join("edge", "die09.txt"), "die99.tsv"} {
		if !strings.Contains(joined, want) {
			t.Errorf("%s not listed: %v", want, wb)
		}
	}
	if strings.Contains(joined, "README") || len(wb) != 11 {
		t.Errorf("%d files: %v (want the 11 data files, no README.md)", len(wb), wb)
	}
}

// Rs statistics: one policy (linear for n and Rs, log10 for Is and Rsh).
// die05 was sampled with Rs = 0 and fits Rs = 0: it is an outlier on a
// linear scale in both front ends (on a log scale it would have been
// dropped), and both give the same median and quartiles.
func TestFrontEndsRsStatistics(t *testing.T) {
	dir := "testdata/fit/wafer"
	b := cliBatch(t, dir, "--jobs", "2")
	wb := workbenchBatch(t, dir)
	rs := b.Summary["series_resistance_ohm"]
	ws := wb.Stats[2]
	if rs.LogScale || ws.Log {
		t.Errorf("Rs statistics on a log scale: command line %v, workbench %v", rs.LogScale, ws.Log)
	}
	if rs.N != ws.N || rs.N != 10 || *rs.Median != ws.Median || *rs.Q1 != ws.Q1 || *rs.Q3 != ws.Q3 {
		t.Errorf("Rs summary: command line n %d median %g q1 %g q3 %g; workbench n %d median %g q1 %g q3 %g",
			rs.N, *rs.Median, *rs.Q1, *rs.Q3, ws.N, ws.Median, ws.Q1, ws.Q3)
	}
	var wout []string
	for _, k := range ws.Outliers {
		wout = append(wout, wb.Rows[k].File)
	}
	if strings.Join(rs.Outliers, " ") != strings.Join(wout, " ") || len(wout) != 1 || !strings.HasSuffix(wout[0], "die05.csv") {
		t.Errorf("Rs outliers: command line %v, workbench %v (want die05.csv, fitted Rs = 0)", rs.Outliers, wout)
	}
	for _, r := range wb.Rows {
		if strings.HasSuffix(r.File, "die05.csv") && r.Values[2] != 0 {
			t.Errorf("die05 fits Rs = %g, the test expects 0", r.Values[2])
		}
	}
}

// Missing temperature: one rule. A file stating 300 K gives n = 1.050
// (the invented truth 1.05 within 0.5 %) in both front ends whatever the
// junction's temperature; a file stating none is fitted at --temp on the
// command line and at the junction's temperature in the workbench, the
// same n for the same temperature, and both say where it came from.
func TestFrontEndsTemperature(t *testing.T) {
	ivN := func(args ...string) (float64, string, []string) {
		code, out, errs := fitCall(append([]string{"iv", "--json"}, args...)...)
		if code != exitOK {
			t.Fatalf("fit iv %v: exit %d %s", args, code, errs)
		}
		var m struct {
			N      float64  `json:"ideality_factor"`
			Source string   `json:"temperature_source"`
			Notes  []string `json:"notes"`
		}
		if err := json.Unmarshal([]byte(out), &m); err != nil {
			t.Fatal(err)
		}
		return m.N, m.Source, m.Notes
	}
	wbN := func(path string, junctionK float64) *fit.IVView {
		ds, err := fit.Import(nil, path, "", nil)
		if err != nil {
			t.Fatal(err)
		}
		v, err := fit.NewIVView(ds, fit.IVOptions{Temperature: workbenchRule(junctionK)})
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	n, src, _ := ivN("testdata/fit/iv.csv")
	w := wbN("testdata/fit/iv.csv", 296.15)
	if math.Abs(n/1.05-1) > 0.005 || w.Fit.Single.IdealityFactor != n || src != fit.SourceComment || w.TemperatureFrom != fit.SourceComment {
		t.Errorf("stated 300 K: command line n %.4f (%s), workbench n %.4f (%s); want both 1.050 (comment)", n, src, w.Fit.Single.IdealityFactor, w.TemperatureFrom)
	}
	n, src, notes := ivN("testdata/fit/iv-no-temperature.csv", "--temp", "296.15K")
	w = wbN("testdata/fit/iv-no-temperature.csv", 296.15)
	if math.Abs(w.Fit.Single.IdealityFactor/n-1) > 1e-9 || src != fit.SourceOption || w.TemperatureFrom != fit.SourceJunction {
		t.Errorf("no temperature: command line n %.6f (%s), workbench n %.6f (%s)", n, src, w.Fit.Single.IdealityFactor, w.TemperatureFrom)
	}
	if len(notes) != 0 && strings.Contains(strings.Join(notes, " "), "assumed") {
		t.Errorf("--temp given, yet: %v", notes)
	}
	if !strings.Contains(strings.Join(w.Result.Notes, " "), "junction's 296.15 K") {
		t.Errorf("the workbench must say it used the junction's temperature: %v", w.Result.Notes)
	}
	// With neither, the command line assumes 300 K and says so; the
	// workbench with a 300 K junction gives the same n.
	n, src, notes = ivN("testdata/fit/iv-no-temperature.csv")
	w = wbN("testdata/fit/iv-no-temperature.csv", 300)
	if src != fit.SourceAssumed || !strings.Contains(strings.Join(notes, " "), "300 K assumed") || w.Fit.Single.IdealityFactor != n {
		t.Errorf("assumed: %s %v; workbench n %g vs %g", src, notes, w.Fit.Single.IdealityFactor, n)
	}
}

// Saved C-V fits: one record shape and ID scheme. The session the command
// line writes with --save-to holds the same extractions (method, IDs,
// parameter names, units and values) as the workbench's ctrl+k on the
// same file (fit.CVRecords through sessions.AppendFitRecords).
func TestFrontEndsCVRecords(t *testing.T) {
	store := t.TempDir()
	code, _, errs := fitCall("cv", "testdata/fit/cv.tsv", "--area", "1mm2", "--save-to", "c1", "--data", store)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, _, err := fitSaveStore(t, store).Open("c1", 0)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := fit.Import(nil, "testdata/fit/cv.tsv", "", nil)
	if err != nil {
		t.Fatal(err)
	}
	res, err := fit.CV(ds, fit.CVOptions{AreaM2: 1e-6, Material: "si"})
	if err != nil {
		t.Fatal(err)
	}
	wb, _ := sessions.AppendFitRecords(nil, "cv-1", time.Now(), fit.CVRecords(res)...)
	if len(doc.Extractions) != 2 || len(wb) != 2 {
		t.Fatalf("command line %d extractions, workbench %d; want 2 (junction fit and line)", len(doc.Extractions), len(wb))
	}
	for k := range wb {
		c, w := doc.Extractions[k], wb[k]
		if c.ID != w.ID || c.Method != w.Method || len(c.Parameters) != len(w.Parameters) {
			t.Fatalf("record %d: command line %s %s %d params, workbench %s %s %d", k, c.ID, c.Method, len(c.Parameters), w.ID, w.Method, len(w.Parameters))
		}
		for j := range w.Parameters {
			if c.Parameters[j].Name != w.Parameters[j].Name || c.Parameters[j].Unit != w.Parameters[j].Unit || c.Parameters[j].Value != w.Parameters[j].Value {
				t.Errorf("%s parameter %d: %+v vs %+v", w.Method, j, c.Parameters[j], w.Parameters[j])
			}
		}
	}
	if wb[0].Method != fit.MethodCVJunction || wb[1].Method != fit.MethodMottSchottky || wb[0].Parameters[1].Name != "Vbi" {
		t.Errorf("record shape %s %s %s", wb[0].Method, wb[1].Method, wb[0].Parameters[1].Name)
	}
}

// Non-finite parameters: one policy, a note. A diode without shunt path
// fits Rsh = +Inf; the command line's stored record and the workbench's
// record of the same fit both leave Rsh out and say why.
func TestFrontEndsNonFiniteParameters(t *testing.T) {
	dir, store := t.TempDir(), t.TempDir()
	d := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.2, SeriesResistanceOhm: 2, ShuntResistanceOhm: math.Inf(1)}
	p := fitWriteIV(t, dir, "noshunt.csv", d, 300, 0.1, 0.7, 40, 1)
	if code, _, errs := fitCall("iv", p, "--save-to", "s", "--data", store); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, _, err := fitSaveStore(t, store).Open("s", 0)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := fit.Import(nil, p, "", nil)
	if err != nil {
		t.Fatal(err)
	}
	v, err := fit.NewIVView(ds, fit.IVOptions{Temperature: workbenchRule(300)})
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(v.Fit.Single.ShuntResistanceOhm, 1) {
		t.Skipf("the fit found a finite Rsh %g; the case needs an infinite one", v.Fit.Single.ShuntResistanceOhm)
	}
	wb, _ := sessions.AppendFitRecords(nil, "iv-1", time.Now(), fit.IVRecord(v.Result))
	for _, x := range []sessions.Extraction{doc.Extractions[0], wb[0]} {
		if _, ok := fitSaveParamByName(x, "Rsh"); ok {
			t.Errorf("%s: infinite Rsh stored", x.ID)
		}
		if !strings.Contains(strings.Join(x.Notes, "|"), "Rsh not stored: infinite (no measurable path)") {
			t.Errorf("%s: no note on Rsh: %v", x.ID, x.Notes)
		}
	}
	if strings.Join(doc.Extractions[0].Notes, "|") != strings.Join(wb[0].Notes, "|") {
		t.Errorf("notes differ:\n%v\n%v", doc.Extractions[0].Notes, wb[0].Notes)
	}
}

// Import guards: one guard (fit.Import). A directory and a file over
// 64 MiB are refused by the command line with the workbench's message.
func TestFrontEndsImportGuard(t *testing.T) {
	dir := t.TempDir()
	big := filepath.Join(dir, "huge.csv")
	f, err := os.Create(big)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(fit.MaxFileBytes + 1); err != nil { // sparse: no 64 MiB written
		t.Fatal(err)
	}
	f.Close()
	for _, p := range []string{big, dir} {
		_, wbErr := fit.Import(nil, p, "", nil)
		var fe *fit.FileError
		if wbErr == nil || !errors.As(wbErr, &fe) {
			t.Fatalf("%s: workbench import error %v, want a *fit.FileError", p, wbErr)
		}
		code, _, errs := fitCall("iv", p)
		if code != exitUsage || !strings.Contains(errs, wbErr.Error()) {
			t.Errorf("%s: command line exit %d, stderr %q; want 2 and %q", p, code, errs, wbErr.Error())
		}
	}
}

// The progress line of a long batch gives the files done, the rate and
// the time left at that rate (250 of 1000 files in 5 s: 50 files/s, 15 s
// left).
func TestFitProgressLine(t *testing.T) {
	if got := fitProgressLine(250, 1000, 5*time.Second); got != "250/1000 files, 50 files/s, 15s left " {
		t.Errorf("%q", got)
	}
	if got := fitProgressLine(0, 1000, 0); got != "0/1000 files" {
		t.Errorf("%q", got)
	}
}

// Lit files in a batch: one routing. On the invented folder of dark and
// lit dies the command line and the workbench's call (fit.Batch with the
// workbench's temperature rule; the files state 300 K) mark the same
// rows lit and give the same numbers in every column, and the same
// per-population statistics.
func TestFrontEndsLitBatch(t *testing.T) {
	dir := fitWriteMixedBatch(t, t.TempDir())
	_, out, _ := fitCall("batch", dir, "--json", "--jobs", "3")
	var b struct {
		Summary map[string]struct {
			N      int      `json:"n"`
			Median *float64 `json:"median"`
		} `json:"summary"`
		Results []map[string]any `json:"results"`
	}
	if err := json.Unmarshal([]byte(out), &b); err != nil {
		t.Fatal(err)
	}
	wb := workbenchBatch(t, dir)
	if len(b.Results) != len(wb.Rows) || len(wb.Rows) != 6 {
		t.Fatalf("command line %d rows, workbench %d", len(b.Results), len(wb.Rows))
	}
	lit := 0
	for k, r := range wb.Rows {
		c := b.Results[k]
		if c["file"] != r.File || c["model"] != r.Model() || r.Status != fit.StatusOK {
			t.Errorf("row %d: command line %v %v, workbench %s %s", k, c["file"], c["model"], r.File, r.Model())
		}
		if r.Lit {
			lit++
		}
		for j, p := range fit.BatchParams() {
			got, ok := c[p.Key].(float64)
			if math.IsNaN(r.Values[j]) || math.IsInf(r.Values[j], 0) {
				if ok {
					t.Errorf("%s: %s %g on the command line, not determined in the workbench", r.File, p.Key, got)
				}
				continue
			}
			if !ok || got != r.Values[j] {
				t.Errorf("%s: %s %v on the command line, %g in the workbench", r.File, p.Key, c[p.Key], r.Values[j])
			}
		}
	}
	for j, p := range fit.BatchParams() {
		s, ws := b.Summary[p.Key], wb.Stats[j]
		if s.N != ws.N || (ws.N > 0 && *s.Median != ws.Median) {
			t.Errorf("%s: command line n %d, workbench n %d median %g", p.Key, s.N, ws.N, ws.Median)
		}
	}
	if lit != 3 {
		t.Errorf("%d lit rows in the workbench, want 3", lit)
	}
}

// workbenchBatch is the workbench's batch of dir: the fit layer's call
// the batch screen makes, the junction's temperature (the demo's 296.15 K)
// where a file states none.
func workbenchBatch(t *testing.T, dir string) *fit.BatchResult {
	t.Helper()
	files, err := fit.BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	wb, err := fit.Batch(context.Background(), files, fit.BatchOptions{IV: fit.IVOptions{Temperature: workbenchRule(296.15)}})
	if err != nil {
		t.Fatal(err)
	}
	return wb
}
