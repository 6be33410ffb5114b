package tui

import (
	"bytes"
	"errors"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
)

// ctrl+k on the batch screen keeps the table with the session (saved
// with ctrl+s as the next revision, the same record sessions.NewBatch
// makes of the run); re-opening the session says it keeps a table, and
// pgup shows it with its rows and statistics computed from the kept rows.
func TestBatchKeepSavesAndReopens(t *testing.T) {
	dir := writeBatchDir(t, 4)
	st := newStore(t, "alice")
	storeSession(t, st, "lot", "lot 7", model.DefaultSpec())
	o := opts(st, "alice", 120, 40)
	o.Session = "lot"
	m := start(New(o))
	m = press(m, "B", "ctrl+k")
	if !strings.Contains(m.note, "no batch table to keep") || m.Dirty() {
		t.Errorf("ctrl+k before a run: note %q, dirty %v", m.note, m.Dirty())
	}
	m = typeText(m, dir)
	m = press(m, "enter")
	if m.batch.view == nil || m.batch.view.Fitted != 4 {
		t.Fatalf("batch not run:\n%s", plain(m))
	}
	run := m.batch.view
	m = press(m, "ctrl+k")
	if m.note != "kept batch-1 (5 files) with the session; ctrl+s saves it" || !m.Dirty() {
		t.Fatalf("ctrl+k: note %q, dirty %v", m.note, m.Dirty())
	}
	m = press(m, "ctrl+k")
	if !strings.Contains(m.note, "kept already as batch-1") || len(m.sess.batches) != 1 {
		t.Errorf("a second ctrl+k: note %q, %d kept", m.note, len(m.sess.batches))
	}
	m = press(m, "esc", "ctrl+s")
	wantIn(t, m, "Save lot as revision 2")
	m = press(m, "enter")
	doc, rev := mustOpen(t, st, "lot", 0)
	if rev.Number != 2 || len(doc.Batches) != 1 {
		t.Fatalf("saved revision %d with %d batch tables", rev.Number, len(doc.Batches))
	}
	want := sessions.NewBatch(dir, run, nil, fit.IVOptions{}, doc.Batches[0].Performed)
	want.ID = "batch-1"
	// The saved document encodes as the same document with the record
	// built afresh in place of the kept one.
	wantDoc := *doc
	wantDoc.Batches = []sessions.Batch{want}
	got, err1 := sessions.Encode(doc)
	exp, err2 := sessions.Encode(&wantDoc)
	if err1 != nil || err2 != nil || !bytes.Equal(got, exp) {
		t.Errorf("kept record differs from sessions.NewBatch of the run (%v, %v):\n%s\nwant\n%s", err1, err2, got, exp)
	}
	if doc.Batches[0].Rows[0].File != "broken.csv" || doc.Batches[0].Folder != dir {
		t.Errorf("rows are not named relative to the folder: %q in %q", doc.Batches[0].Rows[0].File, doc.Batches[0].Folder)
	}

	// Re-opened: the note says the session keeps a table; pgup shows it.
	m = start(New(o))
	if !strings.Contains(m.note, "keeps 1 batch table") {
		t.Errorf("re-opened note %q", m.note)
	}
	m = press(m, "B", "pgup")
	v := m.batch.view
	if v == nil || v.Fitted != 4 || v.Failed != 1 || v.Stats[0].Median != run.Stats[0].Median {
		t.Fatalf("kept table on view: %+v", v)
	}
	s := plain(m)
	for _, w := range []string{"kept table 1 of 1", "4 fitted, 1 failed", "die00.csv", "broken.csv"} {
		if !strings.Contains(s, w) {
			t.Errorf("screen lacks %q:\n%s", w, s)
		}
	}
	m = press(m, "ctrl+k")
	if !strings.Contains(m.note, "batch-1 is kept with the session already") || m.Dirty() {
		t.Errorf("ctrl+k on a kept table: %q, dirty %v", m.note, m.Dirty())
	}
}

// A session that keeps MaxBatches tables refuses another, naming the
// limit; nothing changes.
func TestBatchKeepLimit(t *testing.T) {
	dir := writeBatchDir(t, 2)
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 120, 40)))
	m = press(m, "B")
	m = typeText(m, dir)
	m = press(m, "enter")
	one := sessions.NewBatch(dir, m.batch.view, nil, fit.IVOptions{}, t0)
	for range sessions.MaxBatches {
		m.sess.batches, _, _ = sessions.AppendBatch(m.sess.batches, one)
	}
	m = press(m, "ctrl+k")
	if !strings.Contains(m.note, "not kept") || !strings.Contains(m.note, "MaxBatches") || len(m.sess.batches) != sessions.MaxBatches {
		t.Errorf("over the limit: note %q, %d kept", m.note, len(m.sess.batches))
	}
}

// A kept table opened on a die reads today's file again: while it gives
// the kept row's fit the die's screen says nothing more; once the file
// holds other data (another die's sweep copied over it) the screen says
// the file has changed and gives the kept values beside today's chart;
// once the file is gone it says so. The comparison is keptChange's, at
// keptTolerance.
func TestKeptDieSaysWhenTheFileChanged(t *testing.T) {
	dir := t.TempDir()
	ents, err := os.ReadDir(waferDir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		b, err := os.ReadFile(filepath.Join(waferDir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		writeText(t, filepath.Join(dir, e.Name()), string(b))
	}
	for _, size := range goldenSizes {
		m := newTest(t, size[0], size[1])
		m = press(m, "B")
		m = typeText(m, dir)
		m = press(m, "enter", "ctrl+k", "pgup")
		b := batchOf(m)
		if !b.viewIsKept(&m) {
			t.Fatalf("pgup does not show the kept table: %q", m.note)
		}
		// The kept failed row's error (kept as text) names its place in
		// words, not by the file's path, as the run's row does.
		if l := leftOfMap(plain(m)); !strings.Contains(l, "line 1: current column") || strings.Contains(l, "die_x01_y03.tsv:") {
			t.Errorf("%dx%d: the kept failed row's error:\n%s", size[0], size[1], l)
		}
		row := b.view.Rows[b.wm.cursor]
		if filepath.Base(row.File) != "die_x01_y00.csv" {
			t.Fatalf("the cursor is on %s", row.File)
		}
		file := filepath.Join(dir, "die_x01_y00.csv")
		orig, err := os.ReadFile(file)
		if err != nil {
			t.Fatal(err)
		}
		m = press(m, "enter")
		if d := batchOf(m).wm.die; d == nil || d.view == nil || d.kept != "" {
			t.Fatalf("%dx%d: the unchanged file: %+v", size[0], size[1], d)
		}
		changed := "the file has changed since the table was kept: the row shows the kept values, the chart today's file"
		if strings.Contains(flat(plain(m)), "changed") {
			t.Errorf("%dx%d: the unchanged file is said to have changed:\n%s", size[0], size[1], plain(m))
		}
		other, err := os.ReadFile(filepath.Join(dir, "die_x02_y01.csv"))
		if err != nil {
			t.Fatal(err)
		}
		writeText(t, file, string(other))
		m = press(m, "esc", "enter")
		d := batchOf(m).wm.die
		if d == nil || d.view == nil || d.kept != changed {
			t.Fatalf("%dx%d: a changed file: %+v", size[0], size[1], d)
		}
		screen := flat(plain(m))
		kept := "kept: Is " + model.Format(model.Current, row.Values[0], 4, false)
		if !strings.Contains(screen, changed) || !strings.Contains(screen, kept) {
			t.Errorf("%dx%d: the die's screen does not say the file changed (want %q and %q):\n%s", size[0], size[1], changed, kept, plain(m))
		}
		if err := os.Remove(file); err != nil {
			t.Fatal(err)
		}
		m = press(m, "esc", "enter")
		if !strings.Contains(flat(plain(m)), "the file is gone since the table was kept") {
			t.Errorf("%dx%d: a removed file:\n%s", size[0], size[1], plain(m))
		}
		writeText(t, file, string(orig))
	}
}

// sameWithin: the relative tolerance, infinities and NaN (a parameter not
// fitted, as Is2 of the single diode).
func TestSameWithin(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	for _, c := range []struct {
		a, b float64
		want bool
	}{
		{1e-12, 1e-12 * (1 + 1e-7), true}, {1e-12, 1e-12 * (1 + 1e-5), false}, {8, 8.0001, false},
		{inf, inf, true}, {inf, 1e12, false}, {nan, nan, true}, {nan, 1, false}, {0, 0, true},
	} {
		if got := sameWithin(c.a, c.b, 1e-6); got != c.want {
			t.Errorf("sameWithin(%g, %g) = %v", c.a, c.b, got)
		}
	}
}

// rowError of an error kept as text names the place in words in place of
// the file's path (the row names the file).
func TestRowErrorOfKeptText(t *testing.T) {
	for _, c := range []struct{ msg, want string }{
		{"/lab/w7/d1.tsv:1: current column: missing", "line 1: current column: missing"},
		{"/lab/w7/d1.tsv:3:7: not a number", "line 3, column 7: not a number"},
		{"/lab/w7/d1.tsv: empty file", "empty file"},
		{"other.tsv:1: kept as it was", "other.tsv:1: kept as it was"},
	} {
		if got := rowError(errors.New(c.msg), "/lab/w7/d1.tsv", "d1.tsv"); got != c.want {
			t.Errorf("rowError(%q) = %q, want %q", c.msg, got, c.want)
		}
	}
}

// keptChange compares no lit row (its columns are the lit fit's; the
// die's screen fits the dark model) but still says when its file is gone.
func TestKeptChangeLitRow(t *testing.T) {
	r := fit.BatchRow{File: "cell.csv", Status: fit.StatusOK, Lit: true, Values: fit.BatchColumns()}
	r.Values[fit.ColLitIs], r.Values[fit.ColLitN], r.Values[fit.ColLitRs] = 1e-9, 1.5, 2
	d := &dieFit{view: &fit.IVView{}}
	if got := keptChange(r, d, nil); got != "" {
		t.Errorf("a lit row is compared with the dark fit: %q", got)
	}
	if got := keptChange(r, &dieFit{}, fs.ErrNotExist); !strings.HasPrefix(got, "the file is gone") {
		t.Errorf("a lit row's file gone: %q", got)
	}
	if got := keptValues(r, true); got != "kept: Is 1.000 nA, n 1.500, Rs 2.000 ohm" {
		t.Errorf("a lit row's kept values: %q", got)
	}
}
