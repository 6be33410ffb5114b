package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/sessions"
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

// TestReviewNoteWithControlCharactersIsEscaped: a review note carrying a
// terminal control sequence is shown escaped, never passed through.
func TestReviewNoteWithControlCharactersIsEscaped(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "diode D7", model.DemoJunction().Spec)
	if err := st.AddReviewNote("d7", sessions.ReviewNote{Author: "bob", Text: "fine \x1b[2Jgone"}); err != nil {
		t.Fatal(err)
	}
	o := opts(st, "alice", 120, 40)
	o.Session = "d7"
	m := start(New(o))
	for _, n := range m.sheet.reviews {
		if strings.ContainsRune(n.Text, 0x1b) {
			t.Fatalf("the note reaches the sheet unescaped: %q", n.Text)
		}
	}
	if len(m.sheet.reviews) != 1 || m.sheet.reviews[0].Text != `fine \x1b[2Jgone` {
		t.Errorf("reviews on the sheet: %+v", m.sheet.reviews)
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

func TestDraftIsWrittenOnlyWhileUnsavedAndOffered(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 100, 30)))
	// Nothing changed: no timer at all.
	for _, k := range []string{"down", "tab", "l", "shift+tab"} {
		tm, cmd := m.Update(keyMsg(k))
		m = tm.(Model)
		if asksForTick(cmd) {
			t.Fatalf("%s on an unchanged junction started the draft timer", k)
		}
	}
	m = editField(m, "2", 1, "1e17")
	m = press(m, "enter")
	d, err := st.DraftOf(sessions.UnnamedDraft, "alice")
	if err != nil || d == nil {
		t.Fatalf("no draft after a change: %v", err)
	}
	if d.Document.Spec.AcceptorDensity != 1e23 {
		t.Fatalf("draft has Na %g", d.Document.Spec.AcceptorDensity)
	}
	// Idle after the draft: keys that change nothing start no timer.
	for _, k := range []string{"down", "up"} {
		tm, cmd := m.Update(keyMsg(k))
		m = tm.(Model)
		if asksForTick(cmd) {
			t.Fatalf("%s with the draft up to date started the timer", k)
		}
	}
	// A new workbench offers the draft.
	n := start(New(opts(st, "alice", 100, 30)))
	wantIn(t, n, "A recovery draft was kept", "the junction that had not been saved yet", "acceptor doping Na (na)", "1.000e17 cm^-3")
	if shown(n) != "draft" {
		t.Fatal("no draft offer")
	}
	r := press(n, "r")
	if r.Spec().AcceptorDensity != 1e23 || !r.Dirty() {
		t.Fatalf("restored draft: Na %g, dirty %v", r.Spec().AcceptorDensity, r.Dirty())
	}
	wantIn(t, r, "restored", "unsaved", "invented demo data")
	// Saving removes the draft.
	r = press(r, "ctrl+s", "enter")
	if d, _ := st.DraftOf(sessions.UnnamedDraft, "alice"); d != nil {
		t.Error("the draft survived the save")
	}
	// Discarding: another user's draft of the saved session.
	b := opts(st, "bob", 100, 30)
	b.Session = "d7-demo"
	bob := start(New(b))
	bob = editField(bob, "5", 0, "301")
	bob = press(bob, "enter")
	if d, _ := st.DraftOf("d7-demo", "bob"); d == nil {
		t.Fatal("no draft for bob")
	}
	bob2 := start(New(b))
	wantIn(t, bob2, "session d7-demo (started from revision 1)")
	bob2 = press(bob2, "d")
	if d, _ := st.DraftOf("d7-demo", "bob"); d != nil || bob2.Spec().Temperature == 301 {
		t.Fatal("discard kept the draft")
	}
	wantIn(t, bob2, "draft discarded")
	// q on the offer quits and keeps it.
	bob = press(bob, "esc")
	bob = editField(bob, "5", 0, "302")
	bob = press(bob, "enter")
	_, cmd := start(New(b)).Update(keyMsg("q"))
	if _, ok := cmd().(tea.QuitMsg); !ok {
		t.Fatal("q on the offer does not quit")
	}
	if d, _ := st.DraftOf("d7-demo", "bob"); d == nil {
		t.Error("quitting from the offer removed the draft")
	}
}

func TestShutdownWritesTheDraftAtOnce(t *testing.T) {
	st := newStore(t, "alice")
	o := opts(st, "alice", 80, 24)
	o.draftEvery = time.Hour // no timer fires in this test
	m := start(New(o))
	_, cmd := m.Update(ShutdownMsg{})
	if _, ok := cmd().(tea.QuitMsg); !ok {
		t.Fatal("ShutdownMsg does not quit")
	}
	if d, _ := st.DraftOf(sessions.UnnamedDraft, "alice"); d != nil {
		t.Fatal("a draft was written without changes")
	}
	// Keys without running their commands: the draft timer never fires.
	for _, k := range []string{"5", "enter", "ctrl+u", "3", "3", "3"} {
		tm, _ := m.Update(keyMsg(k))
		m = tm.(Model)
	}
	if m.Spec().Temperature != 333 {
		t.Fatalf("T = %g", m.Spec().Temperature)
	}
	tm, cmd := m.Update(ShutdownMsg{})
	if _, ok := cmd().(tea.QuitMsg); !ok {
		t.Fatal("ShutdownMsg does not quit")
	}
	d, err := st.DraftOf(sessions.UnnamedDraft, "alice")
	if err != nil || d == nil || d.Document.Spec.Temperature != 333 {
		t.Fatalf("draft at shutdown: %+v %v", d, err)
	}
	_ = tm
}
