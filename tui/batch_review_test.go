package tui

import (
	"context"
	"os"
	"strings"
	"testing"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
)

// keptWaferDoc is a session keeping the batch table of the wafer-map
// test folder (rows named relative to it), the way fit batch --save-to
// keeps one.
func keptWaferDoc(t *testing.T) (*sessions.Document, *fit.BatchResult) {
	t.Helper()
	files, err := fit.BatchFiles(nil, waferDir)
	if err != nil {
		t.Fatal(err)
	}
	view, err := fit.Batch(context.Background(), files, fit.BatchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	doc := sessions.NewDocument("lot", "ada", model.DefaultSpec(), t0)
	doc.Batches, _, err = sessions.AppendBatch(nil, sessions.NewBatch(waferDir, view, nil, fit.IVOptions{}, t0))
	if err != nil {
		t.Fatal(err)
	}
	return doc, view
}

// A reviewer opening a die of the owner's kept table is told that its
// file is in the owner's inbox, and nothing is read: before, the file of
// the same name in the reviewer's own inbox was fitted and shown as the
// owner's die (a different diode under the owner's die label, found with
// OpenSSH's ssh against `junco serve`, review ada/lot7).
func TestReviewKeptDieReadsNoReviewerFile(t *testing.T) {
	doc, _ := keptWaferDoc(t)
	data := t.TempDir()
	in, err := sessions.OpenInbox(data, "bob", sessions.InboxLimits{})
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	other, err := os.ReadFile(writeIV(t, "x.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range doc.Batches[0].Rows {
		w, err := in.Create(r.File, -1)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(other)
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
	}
	m := start(New(Options{Renderer: plainRenderer(), Width: 120, Height: 40, Files: in, ReadOnly: true,
		Document: doc, Name: "ada/lot", Now: ticking()}))
	m = press(m, "B", "pgup")
	if batchOf(m).view == nil || !batchOf(m).viewIsKept(&m) {
		t.Fatalf("the kept table is not on view:\n%s", plain(m))
	}
	m = press(m, "enter")
	d := batchOf(m).wm.die
	if d == nil {
		t.Fatal("enter did not open the die")
	}
	if d.ds != nil || d.view != nil {
		t.Errorf("the reviewer's own file was read as the owner's die (Is %g)", d.view.Fit.Single.SaturationCurrentA)
	}
	if !strings.Contains(d.err, "owner's inbox") {
		t.Errorf("the die says %q, not why nothing is shown", d.err)
	}
	m = press(m, "f")
	if len(m.sess.meas) != len(doc.Measurements) || m.Dirty() {
		t.Error("a review added a data set")
	}
}

// On the local file system a kept table's die is read from the table's
// folder, whatever the working directory: its fit is the kept row's.
// Before, the row's name was read relative to the working directory (no
// such file here; a different file of that name, had there been one).
func TestLocalKeptDieReadFromItsFolder(t *testing.T) {
	doc, _ := keptWaferDoc(t)
	m := start(New(Options{Renderer: plainRenderer(), Width: 120, Height: 40, Document: doc, Name: "lot", Now: ticking()}))
	m = press(m, "B", "pgup", "enter")
	b := batchOf(m)
	d := b.wm.die
	if d == nil || d.view == nil {
		t.Fatalf("the kept die did not open: %+v", d)
	}
	row := b.view.Rows[b.wm.cursor]
	if got, want := d.view.Fit.Single.SaturationCurrentA, row.Values[0]; got != want {
		t.Errorf("die fit Is %g, kept row %g", got, want)
	}
}
