package sessions

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"junco/model/fit"
)

// exampleBatch is a hand-made batch result of five dies: a fitted die
// with every value, one with an infinite Rsh (no measurable shunt path),
// one with an undetermined Rs, a failed fit and a file not run.
func exampleBatch() *fit.BatchResult {
	nan, inf := math.NaN(), math.Inf(1)
	row := func(file string, x, y int, is, n, rs, rsh float64) fit.BatchRow {
		return fit.BatchRow{File: "wafer12/" + file, Status: fit.StatusOK, Die: fit.Die{X: x, Y: y, Wafer: "W12", Source: fit.DieFromName},
			Temperature: fit.Temperature{K: 298.15, Source: fit.SourceComment},
			Values:      fit.BatchColumns(is, n, rs, rsh, nan), StdErr: fit.BatchColumns(is/100, 0.01, 0.05, nan, nan), RMS: 0.012, Points: 61}
	}
	res := &fit.BatchResult{Rows: []fit.BatchRow{
		row("die_x01_y01.csv", 1, 1, 1.1e-14, 1.03, 2.1, 3e7),
		row("die_x02_y01.csv", 2, 1, 1.3e-14, 1.05, 2.4, inf),
		row("die_x01_y02.csv", 1, 2, 9.5e-15, 1.02, nan, 5e7),
		{File: "wafer12/die_x02_y02.csv", Status: fit.StatusError, Err: errors.New("wafer12/die_x02_y02.csv: no forward points"), Die: fit.Die{X: 2, Y: 2, Wafer: "W12", Source: fit.DieFromName}},
		{File: "wafer12/odd.csv", Status: fit.StatusNotRun, Err: errors.New("interrupted before this file")},
	}, Fitted: 3, Failed: 1, NotRun: 1, Interrupted: true}
	res.Stats = fit.Statistics(res.Rows)
	return res
}

func exampleLimits() []fit.Limit {
	return []fit.Limit{{Param: 1, Min: 1.0, Max: 1.04}, {Param: 2, Min: math.Inf(-1), Max: 5}}
}

// sameRows compares batch rows with NaN equal to NaN.
func sameRows(t *testing.T, got, want []fit.BatchRow) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%d rows, want %d", len(got), len(want))
	}
	eq := func(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }
	for k := range want {
		g, w := got[k], want[k]
		if g.Status != w.Status || g.Lit != w.Lit || g.Die != w.Die || g.Temperature != w.Temperature || g.Points != w.Points || !eq(g.RMS, w.RMS) {
			t.Errorf("row %d: %+v, want %+v", k, g, w)
		}
		if (g.Err == nil) != (w.Err == nil) || (w.Err != nil && g.Err.Error() != w.Err.Error()) {
			t.Errorf("row %d: error %v, want %v", k, g.Err, w.Err)
		}
		for j := range w.Values {
			if !eq(g.Values[j], w.Values[j]) || !eq(g.StdErr[j], w.StdErr[j]) {
				t.Errorf("row %d column %d: %g ± %g, want %g ± %g", k, j, g.Values[j], g.StdErr[j], w.Values[j], w.StdErr[j])
			}
		}
	}
}

// TestBatchRoundTrip keeps a batch in a document, encodes and decodes it
// and gets the same rows, statistics, outliers, limits and yield back.
func TestBatchRoundTrip(t *testing.T) {
	res := exampleBatch()
	b := NewBatch("wafer12", res, exampleLimits(), fit.IVOptions{}, fixedTime)
	doc := exampleDocument()
	var id string
	var err error
	doc.Batches, id, err = AppendBatch(doc.Batches, b)
	if err != nil || id != "batch-1" {
		t.Fatalf("AppendBatch: %q, %v", id, err)
	}
	data, err := Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "golden-session-batch.json", data)
	got, err := Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(normalise(got), normalise(doc)) {
		t.Errorf("decoded batch differs:\n%+v\nwant\n%+v", got.Batches, doc.Batches)
	}
	back, limits := got.Batches[0].Result()
	want := exampleBatch()
	for k := range want.Rows { // stored relative to the folder
		want.Rows[k].File = strings.TrimPrefix(want.Rows[k].File, "wafer12/")
	}
	sameRows(t, back.Rows, want.Rows)
	if back.Fitted != 3 || back.Failed != 1 || back.NotRun != 1 || !back.Interrupted {
		t.Errorf("counts %d/%d/%d interrupted %v, want 3/1/1 true", back.Fitted, back.Failed, back.NotRun, back.Interrupted)
	}
	if fmt.Sprint(back.Stats) != fmt.Sprint(res.Stats) { // NaN where nothing was fitted

		t.Errorf("statistics from the kept rows %+v, want %+v", back.Stats, res.Stats)
	}
	if !reflect.DeepEqual(limits, exampleLimits()) {
		t.Errorf("limits %+v, want %+v", limits, exampleLimits())
	}
	// The yield by hand: n within 1.0..1.04 passes dies 1 and 3; Rs <= 5
	// passes dies 1 and 2 (die 3's Rs is not determined); the failed die
	// is tested and fails; the die not run is not tested.
	y := fit.BatchYield(back.Rows, limits)
	if y.Tested != 4 || y.Passed != 1 || y.PerLimit[0].Passed != 2 || y.PerLimit[1].Passed != 2 {
		t.Errorf("yield %+v, want 1 of 4 overall, 2 and 2 per limit", y)
	}
	// The infinite Rsh is kept as infinite, the undetermined Rs as absent.
	r1 := got.Batches[0].Rows[1]
	if len(r1.Infinite) != 1 || r1.Infinite[0] != "shunt_resistance_ohm" {
		t.Errorf("row 1 infinite %v, want [shunt_resistance_ohm]", r1.Infinite)
	}
	if _, ok := got.Batches[0].Rows[2].Values["series_resistance_ohm"]; ok {
		t.Error("row 2 kept an Rs that was not determined")
	}
	// A second batch gets the next ID; the Clone is deep.
	doc.Batches, id, _ = AppendBatch(doc.Batches, b)
	if id != "batch-2" {
		t.Errorf("second batch ID %q, want batch-2", id)
	}
	c := doc.Clone()
	c.Batches[0].Rows[0].Values["ideality_factor"] = 9
	*c.Batches[0].Limits[0].Min = 9
	if doc.Batches[0].Rows[0].Values["ideality_factor"] == 9 || *doc.Batches[0].Limits[0].Min == 9 {
		t.Error("Clone shares the batch rows or limits")
	}
}

// TestBatchMigration reads the frozen schema-1 document: it migrates to
// the current schema with no batch, and is written back as schema 2.
func TestBatchMigration(t *testing.T) {
	data, err := os.ReadFile(filepath.Join("testdata", "schema1-frozen.json"))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(data), `"schema": 1,`) || strings.Contains(string(data), "batches") {
		t.Fatal("the frozen file is no longer a schema 1 document")
	}
	doc, err := Decode(data)
	if err != nil {
		t.Fatalf("schema 1 no longer reads: %v", err)
	}
	if doc.Schema != 2 || doc.Batches == nil || len(doc.Batches) != 0 {
		t.Errorf("migrated schema %d, batches %#v; want 2 and an empty list", doc.Schema, doc.Batches)
	}
	out, err := Encode(doc)
	if err != nil || !strings.Contains(string(out), "\"schema\": 2,") || !strings.Contains(string(out), "\"batches\": []") {
		t.Errorf("re-encoded: %v\n%s", err, out)
	}
	// A schema 1 document that already has batches is not schema 1.
	bad := strings.Replace(string(data), `"schema": 1,`, `"schema": 1, "batches": [],`, 1)
	var me *MigrationError
	if _, err := Decode([]byte(bad)); !errors.As(err, &me) || !strings.Contains(err.Error(), `no "batches"`) {
		t.Errorf("schema 1 with batches: %v", err)
	}
}

// TestBatchLimits checks that a batch over the named limits is refused,
// by AppendBatch and by Validate, with the limit in the message.
func TestBatchLimits(t *testing.T) {
	res := &fit.BatchResult{Rows: make([]fit.BatchRow, MaxBatchRows+1)}
	for k := range res.Rows {
		res.Rows[k] = fit.BatchRow{File: "f.csv", Status: fit.StatusError, Err: errors.New("x")}
	}
	big := NewBatch("", res, nil, fit.IVOptions{}, fixedTime)
	var le *BatchLimitError
	if _, _, err := AppendBatch(nil, big); !errors.As(err, &le) || !strings.Contains(err.Error(), "100000") || !strings.Contains(err.Error(), "MaxBatchRows") {
		t.Errorf("too many rows: %v", err)
	}
	doc := exampleDocument()
	big.ID = "batch-1"
	doc.Batches = []Batch{big}
	if err := doc.Validate(); err == nil || !strings.Contains(err.Error(), "$.batches[0].rows") || !strings.Contains(err.Error(), "MaxBatchRows") {
		t.Errorf("Validate of too many rows: %v", err)
	}

	small := NewBatch("w", exampleBatch(), nil, fit.IVOptions{}, fixedTime)
	var bs []Batch
	for range MaxBatches {
		var err error
		if bs, _, err = AppendBatch(bs, small); err != nil {
			t.Fatal(err)
		}
	}
	if _, _, err := AppendBatch(bs, small); !errors.As(err, &le) || !strings.Contains(err.Error(), "MaxBatches") || !strings.Contains(err.Error(), "20") {
		t.Errorf("too many batches: %v", err)
	}
	doc.Batches = append(bs, small)
	doc.Batches[MaxBatches].ID = "batch-99"
	if err := doc.Validate(); err == nil || !strings.Contains(err.Error(), "$.batches") || !strings.Contains(err.Error(), "MaxBatches") {
		t.Errorf("Validate of too many batches: %v", err)
	}
}

// TestBatchDecodeErrors: strict decoding and validation of kept batches.
func TestBatchDecodeErrors(t *testing.T) {
	doc := exampleDocument()
	doc.Batches, _, _ = AppendBatch(nil, NewBatch("wafer12", exampleBatch(), exampleLimits(), fit.IVOptions{}, fixedTime))
	data, err := Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	g := string(data)
	for _, c := range []struct{ name, from, to, want string }{
		{"unknown field", `"folder": "wafer12"`, `"folder": "wafer12", "colour": 1`, "$.batches[0].colour"},
		{"unknown column", `"ideality_factor": 1.03`, `"idealty_factor": 1.03`, `"idealty_factor"`},
		{"bad status", `"status": "error"`, `"status": "broken"`, "$.batches[0].rows[3].status"},
		{"bad model", `"model": "single"`, `"model": "triple"`, "$.batches[0].model"},
		{"negative std error", `"ideality_factor": 0.01`, `"ideality_factor": -0.01`, "std_errors.ideality_factor"},
		{"open limit", `"min": 1,`, `"min": null,`, ""},
		{"bad ID", `"id": "batch-1"`, `"id": "batch 1"`, "$.batches[0].id"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := strings.Replace(g, c.from, c.to, 1)
			if s == g {
				t.Fatal("replacement missed")
			}
			_, err := Decode([]byte(s))
			if c.want == "" {
				if err != nil {
					t.Errorf("an open MIN is allowed: %v", err)
				}
				return
			}
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want it to name %s", err, c.want)
			}
		})
	}
}

// TestBatchDiff: a batch added is one row; a changed batch of many files
// is summarised in a few rows, not one per file.
func TestBatchDiff(t *testing.T) {
	a := exampleDocument()
	b := a.Clone()
	b.Batches, _, _ = AppendBatch(nil, NewBatch("wafer12", exampleBatch(), exampleLimits(), fit.IVOptions{}, fixedTime))
	ch := Diff(a, b, true)
	if len(ch) != 1 || ch[0].Section != SectionBatches || ch[0].Delta != "added" || !strings.Contains(ch[0].New, "5 files (3 fitted, 1 failed, 1 not run)") {
		t.Fatalf("added: %+v", ch)
	}

	// Two batches of 10,000 dies; the second differs in every third row.
	mk := func(shift float64) *fit.BatchResult {
		res := &fit.BatchResult{Rows: make([]fit.BatchRow, 10000)}
		for k := range res.Rows {
			n := 1 + float64(k%50)/1000
			if k%3 == 0 {
				n += shift
			}
			res.Rows[k] = fit.BatchRow{File: "die-" + strconv.Itoa(k) + ".csv", Status: fit.StatusOK,
				Values: fit.BatchColumns(1e-14, n, 2, 1e7, math.NaN()), StdErr: fit.BatchColumns(1e-16, 0.01, 0.1, 1e5, math.NaN()), Points: 50}
		}
		res.Stats = fit.Statistics(res.Rows)
		return res
	}
	a.Batches, _, _ = AppendBatch(nil, NewBatch("lot7", mk(0), nil, fit.IVOptions{}, fixedTime))
	b.Batches, _, _ = AppendBatch(nil, NewBatch("lot7", mk(0.01), nil, fit.IVOptions{}, fixedTime))
	ch = Diff(a, b, true)
	if len(ch) > 8 {
		t.Errorf("a changed batch of 10,000 files gave %d rows, want a summary of a few", len(ch))
	}
	var files *Change
	for i := range ch {
		if ch[i].Quantity == "batch-1: files" {
			files = &ch[i]
		}
	}
	// Rows 0, 3, ..., 9999: 3334 changed.
	if files == nil || files.Delta != "3334 changed, 0 added, 0 removed" {
		t.Errorf("files row %+v in %+v", files, ch)
	}
}
