package tui

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model/measure"
	"junco/sessions"
)

// servedInbox lays out a server data folder: alice's inbox holds a good
// I-V file and a symbolic link to a file outside; bob's inbox holds his
// own file; a readable CSV and an account-like file lie outside every
// inbox. It returns a workbench served to alice (reading her inbox only).
func servedInbox(t *testing.T) (m Model, data string, outside []string) {
	t.Helper()
	data = t.TempDir()
	good, err := os.ReadFile(writeIV(t, "die.csv"))
	if err != nil {
		t.Fatal(err)
	}
	secretCSV := filepath.Join(data, "private.csv")
	account := filepath.Join(data, "account")
	writeText(t, secretCSV, string(good))
	writeText(t, account, "rootSECRET:x:0:0:root:/root:/bin/sh\n")
	put := func(user, name string, b []byte) *sessions.Inbox {
		in, err := sessions.OpenInbox(data, user, sessions.InboxLimits{})
		if err != nil {
			t.Fatal(err)
		}
		w, err := in.Create(name, -1)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(b)
		if err := w.Close(); err != nil {
			t.Fatal(err)
		}
		return in
	}
	put("bob", "bobs.csv", good).Close()
	in := put("alice", "die.csv", good)
	t.Cleanup(func() { in.Close() })
	dir, _ := sessions.InboxRoot(data, "alice")
	if err := os.Symlink(secretCSV, filepath.Join(dir, "link.csv")); err != nil {
		t.Fatal(err)
	}
	m = start(New(Options{Renderer: plainRenderer(), Width: 120, Height: 40, Files: in, FilesNote: "files come from your inbox"}))
	return m, data, []string{secretCSV, account}
}

// TestServedImportReadsOnlyTheInbox tries, on the import screen of a
// served workbench, every way out of the inbox: a relative escape, an
// absolute path to a readable CSV and to an account file, the system
// account file, a symbolic link to outside, another user's inbox. Each is
// refused and nothing is added; no message names a server path or shows
// the file's text. A file in the inbox imports.
func TestServedImportReadsOnlyTheInbox(t *testing.T) {
	m, data, outside := servedInbox(t)
	before := len(m.sess.meas)
	paths := []string{"../../../private.csv", "../../x", outside[0], outside[1], "/etc/passwd", "link.csv",
		"../../bob/inbox/bobs.csv", "../bob/inbox/bobs.csv"}
	for _, p := range paths {
		m = press(m, "i", "ctrl+u")
		m = typeText(m, p)
		m = press(m, "enter")
		if importOf(m).ds != nil || importOf(m).err == "" {
			t.Errorf("%s: imported (%v) or no error", p, importOf(m).ds != nil)
		}
		for _, leak := range []string{data, filepath.Base(data), "/etc", "passwd", "SECRET", "root:", "users"} {
			if strings.Contains(importOf(m).err, leak) {
				t.Errorf("%s: message %q names %q", p, importOf(m).err, leak)
			}
		}
		m = press(m, "esc")
	}
	if len(m.sess.meas) != before {
		t.Fatalf("measurements were added: %d", len(m.sess.meas)-before)
	}
	m = press(m, "i", "ctrl+u")
	if !strings.Contains(flat(plain(m)), "files come from your inbox") {
		t.Errorf("the import screen does not say where files come from:\n%s", plain(m))
	}
	m = typeText(m, "die.csv")
	m = press(m, "enter")
	if importOf(m).ds == nil {
		t.Fatalf("a file of the inbox: %s", importOf(m).err)
	}
}

// TestServedBatchReadsOnlyTheInbox: the batch screen of a served
// workbench lists only the inbox (an empty folder field), and refuses any
// other folder without naming it.
func TestServedBatchReadsOnlyTheInbox(t *testing.T) {
	m, data, _ := servedInbox(t)
	for _, dir := range []string{data, "/etc", "..", "../bob/inbox", "../../.."} {
		m = press(m, "B", "ctrl+u")
		m = typeText(m, dir)
		m = press(m, "enter")
		if batchOf(m).view != nil || batchOf(m).err == "" {
			t.Errorf("%s: listed or no error", dir)
		}
		if strings.Contains(batchOf(m).err, data) || strings.Contains(batchOf(m).err, "/etc") {
			t.Errorf("%s: message names a server path: %q", dir, batchOf(m).err)
		}
		m = press(m, "esc")
	}
	m = press(m, "B", "ctrl+u", "enter")
	v := batchOf(m).view
	if v == nil || len(v.Rows) != 1 || v.Fitted != 1 || v.Rows[0].File != "die.csv" {
		t.Fatalf("batch of the inbox: %+v err %q", v, batchOf(m).err)
	}
}

// The local workbench keeps full file access: an absolute path imports.
func TestLocalImportKeepsFullAccess(t *testing.T) {
	p := writeIV(t, "local.csv")
	m := newTest(t, 120, 40)
	m = press(m, "i")
	m = typeText(m, p)
	m = press(m, "enter")
	if importOf(m).ds == nil {
		t.Fatalf("local import of an absolute path: %s", importOf(m).err)
	}
}

// A served batch's export lands in the user's inbox (where sftp can fetch
// it), never beside server paths, and its message names no server path.
func TestServedBatchExportGoesToTheInbox(t *testing.T) {
	m, data, _ := servedInbox(t)
	m = press(m, "B", "ctrl+u", "enter")
	if batchOf(m).view == nil {
		t.Fatalf("no batch: %q", batchOf(m).err)
	}
	m = press(m, "ctrl+e")
	if !strings.Contains(m.note, "written") || strings.Contains(m.note, data) {
		t.Fatalf("export note %q", m.note)
	}
	dir, _ := sessions.InboxRoot(data, "alice")
	found, _ := filepath.Glob(filepath.Join(dir, "batch-*.csv"))
	if len(found) != 1 {
		t.Errorf("inbox holds %v, want one batch CSV", found)
	}
}

// A served workbench holds at most sessions.ServedMaxPoints points in
// all: an import beyond is refused on the import screen with the limit
// named, and nothing is added (the same file could be imported again and
// again, each copy held in the server's memory for the connection's
// life). Locally any number of points may be held, up to
// sessions.MaxDataSets data sets (beyond, the save would be refused).
func TestServedImportPointsBounded(t *testing.T) {
	m, _, _ := servedInbox(t)
	big := measure.DataSet{Kind: measure.KindIV, SourceFile: "big.csv",
		VoltageV: make([]float64, sessions.ServedMaxPoints-10), CurrentA: make([]float64, sessions.ServedMaxPoints-10)}
	m.sess.meas = append(m.sess.meas, sessions.Measurement{ID: "big", DataSet: big})
	before := len(m.sess.meas)
	m = press(m, "i", "ctrl+u")
	m = typeText(m, "die.csv")
	m = press(m, "enter", "enter")
	if len(m.sess.meas) != before {
		t.Fatalf("a data set was added past %d points", sessions.ServedMaxPoints)
	}
	if s := importOf(m); s == nil || !strings.Contains(s.err, fmt.Sprint(sessions.ServedMaxPoints)) {
		t.Fatalf("the import screen does not say why: %+v", s)
	}
	m = press(m, "f") // add and fit: refused the same way
	if len(m.sess.meas) != before {
		t.Fatal("add and fit added a data set past the limit")
	}

	l := newTest(t, 120, 40)
	for len(l.sess.meas) < sessions.MaxDataSets {
		l.sess.meas = append(l.sess.meas, sessions.Measurement{ID: fmt.Sprintf("x%d", len(l.sess.meas)), DataSet: measure.DataSet{Kind: measure.KindIV, VoltageV: []float64{0}, CurrentA: []float64{0}}})
	}
	l = press(l, "i")
	l = typeText(l, writeIV(t, "local.csv"))
	l = press(l, "enter", "enter")
	if len(l.sess.meas) != sessions.MaxDataSets || !strings.Contains(importOf(l).err, "MaxDataSets") {
		t.Errorf("a data set beyond MaxDataSets: %d held, message %q", len(l.sess.meas), importOf(l).err)
	}
}
