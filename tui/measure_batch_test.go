package tui

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model/fit"
)

func TestBatchFilesListing(t *testing.T) {
	dir := writeBatchDir(t, 3)
	files, err := fit.BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, f := range files {
		names = append(names, filepath.Base(f))
	}
	if got := strings.Join(names, " "); got != "broken.csv die00.csv die01.csv die02.csv" {
		t.Errorf("files %q", got)
	}
	if _, err := fit.BatchFiles(nil, filepath.Join(dir, "missing")); err == nil || !strings.Contains(err.Error(), "no directory") {
		t.Errorf("missing directory: %v", err)
	}
}

// B opens the screen; enter fits the directory: the median Is is within
// 10 % of the invented value and the bad file is a row with its error.
func TestBatchScreen(t *testing.T) {
	dir := writeBatchDir(t, 6)
	m := newTest(t, 120, 40)
	m = press(m, "B")
	if shown(m) != "batch" {
		t.Fatalf("B must open the batch screen:\n%s", plain(m))
	}
	m = typeText(m, dir)
	m = press(m, "enter")
	b := batchOf(m)
	if b.running || b.view == nil || b.err != "" {
		t.Fatalf("batch not finished: running %v err %q\n%s", b.running, b.err, plain(m))
	}
	v := b.view
	if v.Fitted != 6 || v.Failed != 1 || len(v.Rows) != 7 {
		t.Fatalf("view %+v", v)
	}
	if med := v.Stats[0].Median; math.Abs(med/batchIs-1) > 0.1 {
		t.Errorf("median Is %g, want %g within 10 %%", med, batchIs)
	}
	if filepath.Base(v.Rows[0].File) != "broken.csv" || v.Rows[0].Err == nil {
		t.Errorf("the bad file must be a row with its error: %+v", v.Rows[0])
	}
	s := plain(m)
	for _, want := range []string{"7 of 7 files", "6 fitted, 1 failed", "median", "broken.csv", "die05.csv"} {
		if !strings.Contains(s, want) {
			t.Errorf("screen lacks %q:\n%s", want, s)
		}
	}
	if m.Dirty() {
		t.Error("a batch must not change the session")
	}
	m = press(m, "esc")
	if shown(m) != "main" {
		t.Error("esc must close the screen when no batch runs")
	}
	m = press(m, "B", "ctrl+u")
	m = typeText(m, filepath.Join(dir, "missing"))
	m = press(m, "enter")
	if !strings.Contains(batchOf(m).err, "no directory") {
		t.Errorf("missing directory: %q", batchOf(m).err)
	}
}

// A batch cancelled after its first file keeps the rows finished.
func TestBatchCancelKeepsRows(t *testing.T) {
	dir := writeBatchDir(t, 6)
	files, err := fit.BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	v, err := fit.Batch(ctx, files, fit.BatchOptions{Jobs: 1, Progress: func(done, total int) {
		if done == 2 {
			cancel()
		}
	}})
	if err == nil || v == nil || !v.Interrupted {
		t.Fatalf("want a cancelled batch: %v %+v", err, v)
	}
	if v.Fitted+v.Failed < 2 || v.NotRun == 0 || len(v.Rows) != len(files) {
		t.Fatalf("rows %d, not run %d of %d", len(v.Rows), v.NotRun, len(files))
	}
	if v.Rows[1].Err != nil || v.Stats[0].N != v.Fitted {
		t.Errorf("finished rows lost: %+v", v.Rows)
	}
}

// esc while a batch runs cancels it; the screen shows the cancellation,
// and a stale message of an earlier run is dropped.
func TestBatchScreenCancel(t *testing.T) {
	dir := writeBatchDir(t, 6)
	m := newTest(t, 100, 30)
	m = press(m, "B")
	m = typeText(m, dir)
	tm, cmd := m.Update(keyMsg("enter"))
	m = tm.(Model)
	if !batchOf(m).running || cmd == nil {
		t.Fatal("enter must start the batch")
	}
	tm, _ = m.Update(keyMsg("esc"))
	m = tm.(Model)
	if shown(m) != "batch" {
		t.Fatal("esc while running must cancel, not close")
	}
	m = drain(m, cmd)
	if batchOf(m).running || batchOf(m).view == nil {
		t.Fatalf("the cancelled batch must end with its rows: %+v", batchOf(m))
	}
	if v := batchOf(m).view; v.Interrupted {
		if !strings.Contains(batchOf(m).err, "cancelled") || v.Fitted+v.Failed+v.NotRun != 7 {
			t.Errorf("cancelled view: err %q %+v", batchOf(m).err, v)
		}
	}
	seq, view, err := batchOf(m).seq, batchOf(m).view, batchOf(m).err
	tm, _ = m.Update(batchDoneMsg{seq: seq - 1})
	if got := batchOf(tm.(Model)); got.view != view || got.err != err {
		t.Error("a stale message must be dropped")
	}
	tm, _ = m.Update(batchProgressMsg{seq: seq + 5, n: 99, total: 99})
	if batchOf(tm.(Model)).n == 99 {
		t.Error("a stale progress must be dropped")
	}
}

// The batch table marks each outlier row with the parameters it is an
// outlier in (the summary's "1 of 5" names a row the table shows).
func TestBatchTableMarksOutliers(t *testing.T) {
	m := newTest(t, 120, 40)
	res := &fit.BatchResult{Fitted: 3}
	for k, rs := range []float64{5, 5.2, 80} {
		res.Rows = append(res.Rows, fit.BatchRow{File: fmt.Sprintf("die%d.csv", k), Status: fit.StatusOK,
			Values: fit.BatchColumns(1e-12, 1.4, rs, math.Inf(1), math.NaN())})
	}
	res.Stats = fit.Statistics(res.Rows)
	if len(res.Stats[2].Outliers) == 0 {
		res.Stats[2].Outliers = []int{2} // the fences of three rows may admit it; the mark is what is tested
	}
	m.batch = &batchScreen{view: res}
	lines := m.batch.table(m, 100, 10)
	var row string
	for _, l := range lines {
		if strings.Contains(l, "die2.csv") {
			row = l
		}
	}
	if !strings.Contains(row, "Rs") {
		t.Errorf("outlier row not marked: %q\n%s", row, strings.Join(lines, "\n"))
	}
	for _, l := range lines {
		if strings.Contains(l, "die0.csv") && strings.HasSuffix(strings.TrimSpace(l), "Rs") {
			t.Errorf("a row that is no outlier is marked: %q", l)
		}
	}
}

// A lit row of the batch table shows the lit fit's Is, n and Rs and is
// marked lit; a dark row is not marked.
func TestBatchTableMarksLitRows(t *testing.T) {
	m := newTest(t, 120, 40)
	dark := fit.BatchRow{File: "dark.csv", Status: fit.StatusOK, Values: fit.BatchColumns(1e-12, 1.4, 5, math.Inf(1)), StdErr: fit.BatchColumns()}
	lit := fit.BatchRow{File: "lit.csv", Status: fit.StatusOK, Lit: true, Values: fit.BatchColumns(), StdErr: fit.BatchColumns()}
	lit.Values[fit.ColLitIs], lit.Values[fit.ColLitN], lit.Values[fit.ColLitRs], lit.Values[fit.ColIph] = 5e-9, 1.35, 0.05, 0.5
	res := &fit.BatchResult{Fitted: 2, Rows: []fit.BatchRow{dark, lit}}
	res.Stats = fit.Statistics(res.Rows)
	m.batch = &batchScreen{view: res}
	for _, l := range m.batch.table(m, 100, 10) {
		switch {
		case strings.Contains(l, "lit.csv") && (!strings.HasSuffix(strings.TrimSpace(l), "lit") || !strings.Contains(l, "1.350")):
			t.Errorf("lit row: %q", l)
		case strings.Contains(l, "dark.csv") && strings.HasSuffix(strings.TrimSpace(l), "lit"):
			t.Errorf("dark row marked lit: %q", l)
		}
	}
}

// ctrl+e writes the batch table as CSV beside the files (the command
// line's table, fit.WriteBatchCSV), one row per file, never replacing a
// file; a second export in the same second is refused, not overwritten.
func TestBatchExport(t *testing.T) {
	dir := writeBatchDir(t, 3)
	m := newTest(t, 120, 40)
	m = press(m, "B")
	m = typeText(m, dir)
	m = press(m, "enter")
	if batchOf(m).view == nil {
		t.Fatalf("no batch:\n%s", plain(m))
	}
	m = press(m, "ctrl+e")
	matches, _ := filepath.Glob(filepath.Join(dir, "batch-*.csv"))
	if len(matches) != 1 || !strings.Contains(m.note, "written") {
		t.Fatalf("export: %v, note %q", matches, m.note)
	}
	data, err := os.ReadFile(matches[0])
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	if len(lines) != 1+len(batchOf(m).view.Rows) || !strings.HasPrefix(lines[0], "file,status,error") {
		t.Errorf("CSV of %d lines for %d rows:\n%s", len(lines), len(batchOf(m).view.Rows), data)
	}
	m = press(m, "ctrl+e")
	after, _ := filepath.Glob(filepath.Join(dir, "batch-*.csv"))
	again, err := os.ReadFile(matches[0])
	if err != nil || string(again) != string(data) {
		t.Error("a second export changed the first file")
	}
	switch {
	case strings.Contains(m.note, "exists"): // same second: refused
		if len(after) != 1 {
			t.Errorf("refused export left files %v", after)
		}
	case strings.Contains(m.note, "written"): // a second later: a new file
		if len(after) != 2 {
			t.Errorf("second export: %q, files %v", m.note, after)
		}
	default:
		t.Errorf("second export: note %q", m.note)
	}
}
