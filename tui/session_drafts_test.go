package tui

import (
	"os"
	"path/filepath"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
)

// TestTwoConnectionsKeepTheirDrafts: one user on two connections edits
// one session and the server stops both; each connection's unsaved edit
// is kept in its own draft, and the next opening offers both, one after
// the other.
func TestTwoConnectionsKeepTheirDrafts(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "diode D7", model.DemoJunction().Spec)
	o := opts(st, "alice", 120, 40)
	o.Session = "d7"
	one, two := start(New(o)), start(New(o))
	one = editField(one, "5", 0, "301")
	two = editField(two, "5", 0, "302")
	for _, m := range []Model{one, two} {
		if _, cmd := m.Update(ShutdownMsg{}); cmd == nil {
			t.Fatal("ShutdownMsg gave no command")
		} else if _, ok := cmd().(tea.QuitMsg); !ok {
			t.Fatal("ShutdownMsg does not quit")
		}
	}
	ds, probs, err := st.DraftsOf("d7", "alice")
	if err != nil || len(probs) != 0 || len(ds) != 2 {
		t.Fatalf("%d drafts after two connections stopped (%v %v), want 2", len(ds), probs, err)
	}
	temps := map[float64]bool{}
	for _, d := range ds {
		temps[d.Document.Spec.Temperature] = true
	}
	if !temps[301] || !temps[302] {
		t.Fatalf("the drafts hold temperatures %v, want 301 K and 302 K", temps)
	}

	third := start(New(o))
	if shown(third) != "draft" {
		t.Fatal("no draft offer at the next opening")
	}
	wantIn(t, third, "A recovery draft was kept", "Draft 1 of 2")
	first := onTop[draftScreen](third).draft.Document.Spec.Temperature
	third = press(third, "d")
	if shown(third) != "draft" {
		t.Fatal("discarding the first draft did not offer the second")
	}
	wantIn(t, third, "Draft 2 of 2")
	second := onTop[draftScreen](third).draft.Document.Spec.Temperature
	if first == second {
		t.Fatalf("both offers showed the draft at %g K", first)
	}
	third = press(third, "r")
	if shown(third) != "main" || third.Spec().Temperature != second || !third.Dirty() {
		t.Fatalf("restored: screen %s, T %g, dirty %v; want the second draft, %g K, unsaved", shown(third), third.Spec().Temperature, third.Dirty(), second)
	}
	// Saving removes the restored draft too.
	third = press(third, "ctrl+s", "enter")
	if n, _ := st.Latest("d7"); n != 2 {
		t.Fatalf("the save made revision %d, want 2", n)
	}
	if ds, _, _ := st.DraftsOf("d7", "alice"); len(ds) != 0 {
		t.Errorf("%d drafts left after the save, want none", len(ds))
	}
}

// TestOpenSessionWithDamagedNewestRevision: the browser opens the newest
// readable revision of a session whose newest one is damaged, says so,
// and the next save takes the next free number.
func TestOpenSessionWithDamagedNewestRevision(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "diode D7", model.DemoJunction().Spec)
	saveNext(t, st, "d7", 0.5)
	p := filepath.Join(st.Root(), "sessions", "d7", "rev-000002.json")
	os.Chmod(p, 0o600)
	writeText(t, p, "{")
	m := start(New(opts(st, "alice", 140, 40)))
	m = press(m, "ctrl+o")
	wantIn(t, m, "(damaged: newest readable is revision 1)")
	m = press(m, "enter")
	if shown(m) != "main" || m.sess.name != "d7" || m.sess.rev != 1 {
		t.Fatalf("open: screen %s, session %q, revision %d", shown(m), m.sess.name, m.sess.rev)
	}
	wantIn(t, m, "unreadable newer revisions: 1")
	m = editField(m, "5", 0, "305")
	m = press(m, "enter", "ctrl+s", "enter")
	if n, _ := st.Latest("d7"); n != 3 || m.sess.rev != 3 {
		t.Errorf("saved as revision %d (workbench at %d), want 3", n, m.sess.rev)
	}
}
