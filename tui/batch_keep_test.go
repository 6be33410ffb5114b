package tui

import (
	"bytes"
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
