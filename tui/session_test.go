package tui

import (
	"os"
	"path/filepath"
	"reflect"
	"regexp"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/sessions"
)

// t0 is the clock of the session tests: a fixed instant.
var t0 = time.Date(2025, 3, 14, 9, 26, 0, 0, time.UTC)

// ticking returns a clock that starts at t0 and advances one minute per
// call (safe for the goroutines of a test program).
func ticking() func() time.Time {
	var n atomic.Int64
	return func() time.Time { return t0.Add(time.Duration(n.Add(1)) * time.Minute) }
}

func newStore(t testing.TB, user string) *sessions.Store {
	t.Helper()
	st, err := sessions.New(t.TempDir(), sessions.Options{ToolVersion: "test", User: user, Now: ticking()})
	if err != nil {
		t.Fatal(err)
	}
	return st
}

// opts are the options of a workbench on st for user at w x h; drafts are
// written a millisecond after a change.
func opts(st *sessions.Store, user string, w, h int) Options {
	return Options{Renderer: plainRenderer(), Store: st, User: user, Now: ticking(), Width: w, Height: h, draftEvery: time.Millisecond}
}

// storeSession saves a document with spec as a new session and returns it.
func storeSession(t *testing.T, st *sessions.Store, name, title string, spec model.Spec) *sessions.Document {
	t.Helper()
	doc := sessions.NewDocument(title, "alice", spec, t0)
	if _, err := st.Save(name, doc, 0); err != nil {
		t.Fatal(err)
	}
	return doc
}

// saveNext stores a further revision of a session with another bias.
func saveNext(t *testing.T, st *sessions.Store, name string, bias float64) {
	t.Helper()
	doc, rev, err := st.Open(name, 0)
	if err != nil {
		t.Fatal(err)
	}
	doc.Spec.Bias = bias
	if _, err := st.Save(name, doc, rev.Number); err != nil {
		t.Fatal(err)
	}
}

func mustOpen(t *testing.T, st *sessions.Store, name string, rev int) (*sessions.Document, sessions.Revision) {
	t.Helper()
	doc, r, err := st.Open(name, rev)
	if err != nil {
		t.Fatal(err)
	}
	return doc, r
}

func latest(t *testing.T, st *sessions.Store, name string) int {
	t.Helper()
	n, err := st.Latest(name)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

func wantIn(t *testing.T, m Model, wants ...string) {
	t.Helper()
	v := flat(plain(m))
	for _, w := range wants {
		if !strings.Contains(v, w) {
			t.Errorf("screen lacks %q:\n%s", w, plain(m))
		}
	}
}

func TestFirstSaveAsksForANameAndChecksIt(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 100, 30)))
	m = editField(m, "2", 1, "1e17")
	m = press(m, "enter")
	edited := m.Spec()
	m = press(m, "ctrl+s")
	wantIn(t, m, "Save the junction as a session", "Session name", "d7-demo", "Title")
	// A bad name is refused in place, naming the value, the rule and why.
	m = press(m, "ctrl+u")
	m = typeText(m, "lot 417")
	m = press(m, "enter")
	wantIn(t, m, `name "lot 417": contains ' '`, "allowed 1 to 64 letters")
	if !reflect.DeepEqual(m.Spec(), edited) || !m.Dirty() {
		t.Fatal("a refused name lost the edits")
	}
	if list, _, _ := st.List(); len(list) != 0 {
		t.Fatalf("a refused name saved something: %v", list)
	}
	// The draft name is kept for drafts.
	m = press(m, "ctrl+u")
	m = typeText(m, sessions.UnnamedDraft)
	m = press(m, "enter")
	wantIn(t, m, "kept for the recovery drafts")
	m = press(m, "ctrl+u")
	m = typeText(m, "lot417")
	m = press(m, "tab", "tab")
	m = typeText(m, "lower p doping")
	m = press(m, "enter")
	if shown(m) != "main" || m.Dirty() {
		t.Fatalf("after the save: screen %s, dirty %v:\n%s", shown(m), m.Dirty(), plain(m))
	}
	wantIn(t, m, "saved as session lot417, revision 1", "lot417 rev 1")
	doc, rev := mustOpen(t, st, "lot417", 0)
	if rev.Number != 1 || !reflect.DeepEqual(doc.Spec, edited) {
		t.Fatalf("stored revision %d with spec %+v, want the edited %+v", rev.Number, doc.Spec, edited)
	}
	if doc.Meta.Author != "alice" || doc.Meta.Title != model.DemoJunction().Title {
		t.Errorf("meta: %+v", doc.Meta)
	}
	if len(doc.Notes) != 2 || doc.Notes[0] != "Started from the built-in demo junction of junco: invented demo data." ||
		!regexp.MustCompile(`^2025-03-14 \d\d:\d\d UTC, alice: lower p doping$`).MatchString(doc.Notes[1]) {
		t.Errorf("notes %q", doc.Notes)
	}
	// A second save goes into the same session, from revision 1.
	m = editField(m, "5", 1, "-2")
	m = press(m, "enter")
	if !m.Dirty() || !strings.Contains(plain(m), "unsaved") {
		t.Fatal("an edit after the save is not shown as unsaved")
	}
	m = press(m, "ctrl+s")
	wantIn(t, m, "Save lot417 as revision 2")
	m = press(m, "enter")
	if d, r := mustOpen(t, st, "lot417", 0); r.Number != 2 || d.Spec.Bias != -2 || d.Meta.BasedOn != 1 {
		t.Fatalf("second save: revision %d, bias %g, based on %d", r.Number, d.Spec.Bias, d.Meta.BasedOn)
	}
}

func TestSaveKeepsSweepChartPinAndNotesAndReopens(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 100, 30)))
	m = press(m, "p") // pin the demo as it is
	pinned := m.Spec()
	m = editField(m, "5", 1, "0.3")
	m = press(m, "enter")
	// I-V sweep from -2 V to 0.7 V in 10 mV steps.
	m = press(m, "tab", "tab", "r", "ctrl+u")
	m = typeText(m, "-2")
	m = press(m, "tab", "ctrl+u")
	m = typeText(m, "0.7")
	m = press(m, "enter", "l") // and the log I-V chart
	if m.chart.iv != (model.Range{From: -2, To: 0.7, Step: 0.01}) {
		t.Fatalf("sweep not applied: %+v", m.chart.iv)
	}
	m = press(m, "n")
	m = typeText(m, "pin is the as-probed state")
	m = press(m, "enter")
	wantIn(t, m, "note added")
	m = press(m, "ctrl+s", "ctrl+u")
	m = typeText(m, "sweep-test")
	m = press(m, "enter")
	doc, _ := mustOpen(t, st, "sweep-test", 0)
	if doc.Sweeps.Bias != (sessions.Sweep{From: -2, To: 0.7, Step: 0.01}) || doc.Sweeps.Chart != "iv" {
		t.Errorf("sweeps %+v", doc.Sweeps)
	}
	if len(doc.References) != 1 || doc.References[0].Name != pinReference || !reflect.DeepEqual(doc.References[0].Spec, pinned) {
		t.Fatalf("references %+v", doc.References)
	}
	// The stored reference results are the model's evaluation of the pin.
	res, err := model.Evaluate(pinned)
	if err != nil {
		t.Fatal(err)
	}
	for _, rv := range doc.References[0].Results {
		want, _ := res.Get(rv.Key)
		if rv.Value != nil && *rv.Value != want {
			t.Errorf("reference %s = %g, model gives %g", rv.Key, *rv.Value, want)
		}
	}
	if len(doc.Notes) != 2 || !strings.HasSuffix(doc.Notes[1], "alice: pin is the as-probed state") {
		t.Errorf("notes %q", doc.Notes)
	}

	// Reopened, the workbench shows the same state and nothing unsaved.
	o := opts(st, "alice", 100, 30)
	o.Session = "sweep-test"
	r := start(New(o))
	if r.Dirty() {
		t.Fatal("a freshly opened session reports unsaved changes")
	}
	if !reflect.DeepEqual(r.Spec(), m.Spec()) || r.chart.iv != m.chart.iv || r.pin == nil || !reflect.DeepEqual(r.pin.Spec, pinned) {
		t.Fatalf("reopened state differs: spec %v, sweep %+v, pin %v", reflect.DeepEqual(r.Spec(), m.Spec()), r.chart.iv, r.pin != nil)
	}
	r = press(r, "tab")
	wantIn(t, r, "Session notes", "pin is the as-probed state", "sweep-test rev 1")
	// An unchanged pin keeps its stored record in the next revision.
	r = editField(press(r, "shift+tab"), "5", 0, "310")
	r = press(r, "enter", "ctrl+s", "enter")
	doc2, rev2 := mustOpen(t, st, "sweep-test", 0)
	if rev2.Number != 2 || !reflect.DeepEqual(doc2.References, doc.References) {
		t.Errorf("revision %d references changed though the pin did not", rev2.Number)
	}
	// Dropping the pin is a change, and saving removes the reference.
	r = press(r, "u")
	if !r.Dirty() {
		t.Fatal("dropping the pin is not an unsaved change")
	}
	r = press(r, "ctrl+s", "enter")
	if doc3, _ := mustOpen(t, st, "sweep-test", 0); len(doc3.References) != 0 {
		t.Errorf("references after unpinning: %+v", doc3.References)
	}
}

func TestStaleBaseOffersNextRevisionOrCopy(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "diode D7", model.DemoJunction().Spec)
	o := opts(st, "alice", 100, 30)
	o.Session = "d7"
	a := start(New(o))
	// Someone else saves revision 2 meanwhile.
	saveNext(t, st, "d7", -1)
	a = editField(a, "5", 0, "320")
	a = press(a, "enter")
	edited := a.Spec()
	a = press(a, "ctrl+s")
	a = typeText(a, "hot")
	a = press(a, "enter")
	wantIn(t, a, "A newer revision exists", "Session d7 has revision 2", "newer than revision 1 your edits started from",
		"save as the next revision anyway", "save as a copy under a new name")
	if latest(t, st, "d7") != 2 {
		t.Fatal("the stale save stored something")
	}
	// d shows what revision 2 changed; esc comes back to the choice.
	a = press(a, "d")
	wantIn(t, a, "d7: revision 1 → revision 2", "bias V (bias)", "550.0 mV", "-1.000 V")
	a = press(a, "esc")
	wantIn(t, a, "A newer revision exists")
	// esc leaves without saving and keeps the edits.
	a = press(a, "esc")
	if shown(a) != "main" || !reflect.DeepEqual(a.Spec(), edited) || !a.Dirty() {
		t.Fatal("leaving the choice lost the edits")
	}
	wantIn(t, a, "not saved; your edits are kept")
	// n saves as revision 3, based on 1; revision 2 stays.
	a = press(a, "ctrl+s", "enter", "n")
	doc3, r3 := mustOpen(t, st, "d7", 0)
	if r3.Number != 3 || doc3.Meta.BasedOn != 1 || doc3.Spec.Temperature != 320 {
		t.Fatalf("next-anyway save: revision %d based on %d, T %g", r3.Number, doc3.Meta.BasedOn, doc3.Spec.Temperature)
	}
	if doc2, _ := mustOpen(t, st, "d7", 2); doc2.Spec.Bias != -1 {
		t.Error("revision 2 changed")
	}
	if a.Dirty() || a.sess.rev != 3 {
		t.Fatalf("after the save: dirty %v, base %d", a.Dirty(), a.sess.rev)
	}

	// Again stale; this time save a copy under a new name.
	saveNext(t, st, "d7", -2)
	a = editField(a, "5", 0, "330")
	a = press(a, "enter", "ctrl+s", "enter", "c")
	wantIn(t, a, "Save your edits as a new session", "d7-copy")
	a = press(a, "ctrl+u")
	a = typeText(a, "d7") // taken
	a = press(a, "enter")
	wantIn(t, a, "a session named d7 already exists (revision 4)")
	a = press(a, "ctrl+u")
	a = typeText(a, "d7-hot")
	a = press(a, "enter")
	doc, r := mustOpen(t, st, "d7-hot", 0)
	if r.Number != 1 || doc.Spec.Temperature != 330 || !strings.Contains(doc.Meta.Origin, "copied from session d7, revision 3") {
		t.Fatalf("copy: revision %d, T %g, origin %q", r.Number, doc.Spec.Temperature, doc.Meta.Origin)
	}
	if latest(t, st, "d7") != 4 {
		t.Error("the copy touched the original session")
	}
	wantIn(t, a, "d7-hot rev 1")
}

func TestSaveFailureKeepsEverything(t *testing.T) {
	dir := t.TempDir()
	blocker := filepath.Join(dir, "not-a-dir")
	if err := os.WriteFile(blocker, []byte("x"), 0o644); err != nil {
		t.Fatal(err)
	}
	st, err := sessions.New(blocker, sessions.Options{User: "alice"})
	if err != nil {
		t.Fatal(err)
	}
	m := start(New(opts(st, "alice", 100, 30)))
	m = editField(m, "5", 0, "305")
	m = press(m, "enter")
	edited := m.Spec()
	m = press(m, "ctrl+s", "ctrl+u")
	m = typeText(m, "lot417")
	m = press(m, "tab", "tab")
	m = typeText(m, "my note")
	m = press(m, "enter")
	wantIn(t, m, "not saved:", "Your edits are kept")
	if shown(m) != "dialog" || onTop[dialogScreen](m).fields[2].ed.value() != "my note" || onTop[dialogScreen](m).fields[0].ed.value() != "lot417" {
		t.Fatal("the dialog lost what was typed")
	}
	if !reflect.DeepEqual(m.Spec(), edited) || !m.Dirty() || len(m.sess.notes) != 0 {
		t.Fatal("a failed save changed the workbench")
	}
	m = press(m, "esc")
	if !reflect.DeepEqual(m.Spec(), edited) || !m.Dirty() {
		t.Fatal("cancelling the dialog lost the edits")
	}
}

func TestNoStoreSaysWhy(t *testing.T) {
	m := start(New(Options{Renderer: plainRenderer(), Width: 100, Height: 30, NoStoreReason: "no data directory (HOME is not set)"}))
	for _, k := range []string{"ctrl+s", "S", "ctrl+o"} {
		m = press(m, k)
		if shown(m) != "main" {
			t.Fatalf("%s opened screen %s without a store", k, shown(m))
		}
		wantIn(t, m, "is not available here: no data directory")
	}
	// A note needs no store; it is kept until a save.
	m = press(m, "n")
	m = typeText(m, "x")
	m = press(m, "enter")
	if !m.Dirty() {
		t.Error("a note is not an unsaved change")
	}
}

func TestBrowserFiltersAndShowsDamagedEntries(t *testing.T) {
	st := newStore(t, "alice")
	spec := model.DemoJunction().Spec
	storeSession(t, st, "d7-lot417", "test diode D7, lot 417", spec)
	storeSession(t, st, "d9-lot420", "test diode D9, lot 420", spec)
	spec.Temperature = 350
	storeSession(t, st, "hot-bench", "hot bench run", spec)
	brokenEntry(t, st)
	m := start(New(opts(st, "alice", 120, 40)))
	m = press(m, "ctrl+o")
	wantIn(t, m, "Sessions", "4 sessions, 1 entry cannot be read", "d7-lot417", "d9-lot420", "hot-bench", "broken", "(damaged: no revision can be read)",
		"Cannot be read", "sessions/broken/rev-000001.json")
	if strings.Contains(plain(m), st.Root()) {
		t.Error("the browser shows the store's full path")
	}
	m = typeText(m, "lot")
	wantIn(t, m, "2 of 4 sessions", "d7-lot417", "d9-lot420")
	if strings.Contains(plain(m), "hot-bench") {
		t.Error("the filter lets hot-bench through")
	}
	m = typeText(m, " 420")
	wantIn(t, m, "1 of 4 sessions")
	m = press(m, "ctrl+u")
	m = typeText(m, "nothing-like-it")
	wantIn(t, m, "no session matches the filter")
	m = press(m, "enter")
	wantIn(t, m, "no session to open")
	m = press(m, "ctrl+u")
	m = typeText(m, "HOT")
	m = press(m, "enter")
	if shown(m) != "main" || m.sess.name != "hot-bench" || m.Spec().Temperature != 350 || m.Dirty() {
		t.Fatalf("opening hot-bench: screen %s, session %q, T %g", shown(m), m.sess.name, m.Spec().Temperature)
	}
	wantIn(t, m, "opened hot-bench, revision 1")
	// With unsaved changes, opening asks first; n keeps them.
	m = editField(m, "5", 0, "360")
	m = press(m, "enter", "ctrl+o", "down", "down", "enter")
	wantIn(t, m, "Open the newest revision of d9-lot420?", "drops them")
	m = press(m, "n")
	if shown(m) != "browse" || m.sess.name != "hot-bench" || m.Spec().Temperature != 360 {
		t.Fatal("declining lost the edits or left the browser")
	}
	m = press(m, "enter", "y")
	if m.sess.name != "d9-lot420" || m.Dirty() {
		t.Fatalf("confirmed open: %q dirty %v", m.sess.name, m.Dirty())
	}
}

func TestHistoryDiffRestore(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "diode D7", model.DemoJunction().Spec)
	saveNext(t, st, "d7", -1)
	saveNext(t, st, "d7", -3)
	o := opts(st, "alice", 120, 40)
	o.Session = "d7"
	m := start(New(o))
	m = press(m, "ctrl+o", "tab")
	wantIn(t, m, "Revisions of d7", "3 revisions, newest first", "your edits started from revision 3")
	// Newest first: the cursor is on revision 3.
	if onTop[historyScreen](m).hist[0].Number != 3 || onTop[historyScreen](m).hist[2].Number != 1 {
		t.Fatalf("history order %v", onTop[historyScreen](m).hist)
	}
	// d on revision 3 compares it with revision 2.
	m = press(m, "d")
	f := func(v float64) string { return model.Format(model.Voltage, v, 4, false) }
	wantIn(t, m, "d7: revision 2 → revision 3", "bias V (bias)", f(-1), f(-3), "-2.00 V", "results")
	m = press(m, "esc")
	// Mark revision 1, select 3: diff 1 -> 3.
	m = press(m, "down", "down", "space", "up", "up")
	wantIn(t, m, "revision 1 is marked")
	m = press(m, "d")
	wantIn(t, m, "d7: revision 1 → revision 3", f(0.55), f(-3))
	m = press(m, "esc")
	// Against the current edits.
	m = press(m, "esc", "esc")
	m = editField(m, "5", 0, "310")
	m = press(m, "enter", "ctrl+o", "tab", "c")
	wantIn(t, m, "d7: revision 3 → your current edits", "temperature T (temp)", "296.1 K", "310.0 K", "not saved")
	m = press(m, "esc")
	// Restore revision 1: asks first, n cancels.
	m = press(m, "down", "down", "r")
	wantIn(t, m, "Restore revision 1 of d7?", "stored again as the newest revision, 4 or later", "revisions 2 to 3 stay as they are", "unsaved edits are kept")
	m = press(m, "n")
	if latest(t, st, "d7") != 3 {
		t.Fatal("n restored anyway")
	}
	m = press(m, "r", "y")
	if latest(t, st, "d7") != 4 {
		t.Fatal("y did not restore")
	}
	d1, _ := mustOpen(t, st, "d7", 1)
	d4, r4 := mustOpen(t, st, "d7", 4)
	if !reflect.DeepEqual(d1.Spec, d4.Spec) || r4.Meta.Origin != "restored from revision 1" {
		t.Fatalf("restored revision: origin %q", r4.Meta.Origin)
	}
	wantIn(t, m, "revision 1 of d7 stored again as revision 4", "your unsaved edits are kept", "4 revisions")
	if m.Spec().Temperature != 310 || m.sess.rev != 3 {
		t.Fatal("restoring lost the unsaved edits")
	}
	// r on the newest says so.
	m = press(m, "up", "up", "up", "r")
	wantIn(t, m, "revision 4 is the newest already")
	// Enter opens a revision (asking, as there are unsaved edits).
	m = press(m, "down", "enter", "y")
	if m.sess.rev != 3 || m.Spec().Bias != -3 || m.Dirty() {
		t.Fatalf("opened revision %d, bias %g", m.sess.rev, m.Spec().Bias)
	}
}

// drainNoTicks runs cmd and reports whether it (or a batch in it) asked
// for a draft tick.
func asksForTick(cmd tea.Cmd) bool {
	if cmd == nil {
		return false
	}
	switch msg := cmd().(type) {
	case draftTickMsg:
		return true
	case tea.BatchMsg:
		for _, c := range msg {
			if asksForTick(c) {
				return true
			}
		}
	}
	return false
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

func TestQuitQuestionSavesFirst(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 100, 30)))
	m = editField(m, "5", 0, "310")
	m = press(m, "enter", "q")
	wantIn(t, m, "Quit junco?", "s save first")
	m = press(m, "s")
	if shown(m) != "dialog" {
		t.Fatal("s did not open the save dialog")
	}
	_, cmd := m.Update(keyMsg("enter"))
	if cmd == nil {
		t.Fatal("saving from the quit question did not quit")
	}
	if _, ok := cmd().(tea.QuitMsg); !ok {
		t.Fatal("saving from the quit question did not quit")
	}
	if latest(t, st, "d7-demo") != 1 {
		t.Fatal("not saved")
	}
}

// reviewDoc is a session of alice's with a note and a review note.
func reviewDoc() *sessions.Document {
	doc := sessions.NewDocument("test diode D7, lot 417", "alice", model.DemoJunction().Spec, t0)
	doc.Notes = []string{"lifetime from the decay of wafer 3"}
	doc.Reviews = []sessions.ReviewNote{{Author: "carol", Time: t0.Add(time.Hour), Text: "check the area"}}
	doc.Meta.Modified = t0.Add(2 * time.Hour)
	return doc
}

func TestEditorID(t *testing.T) {
	for in, want := range map[string]string{"alice": "alice", "J Doe": "J_Doe", "": "unknown", ".hidden": "_hidden", "nul": "unknown", "a/b": "a_b"} {
		if got := sessions.EditorID(in); got != want {
			t.Errorf("EditorID(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestFileDocumentIsStoredOnlyWhenSaved(t *testing.T) {
	st := newStore(t, "alice")
	doc := reviewDoc()
	doc.Meta.Origin = "imported from lot417.json"
	o := opts(st, "alice", 100, 30)
	o.Document, o.Name = doc, "lot417"
	m := start(New(o))
	if m.Dirty() {
		t.Fatal("a file just opened reports unsaved changes")
	}
	if list, _, _ := st.List(); len(list) != 0 {
		t.Fatal("opening a file stored it")
	}
	m = press(m, "ctrl+s")
	wantIn(t, m, "Save the junction as a session", "lot417", "test diode D7, lot 417")
	m = press(m, "enter")
	saved, r := mustOpen(t, st, "lot417", 0)
	if r.Number != 1 || saved.Meta.Origin != "imported from lot417.json" || !reflect.DeepEqual(saved.Notes, doc.Notes) || len(saved.Reviews) != 1 {
		t.Fatalf("stored file: revision %d, origin %q, notes %q", r.Number, saved.Meta.Origin, saved.Notes)
	}
	// The next revision is an edit, not an import.
	m = editField(m, "5", 0, "300")
	m = press(m, "enter", "ctrl+s", "enter")
	if d2, _ := mustOpen(t, st, "lot417", 2); d2.Meta.Origin != "" {
		t.Errorf("revision 2 origin %q", d2.Meta.Origin)
	}
}

func TestSessionScreensDrawOnlyASCII(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "diode D7", model.DemoJunction().Spec)
	saveNext(t, st, "d7", -1)
	o := opts(st, "alice", 100, 30)
	o.ASCII, o.Session, o.Revision = true, "d7", 1
	m := start(New(o))
	m = editField(m, "3", 0, "1mm2")
	m = press(m, "enter")
	check := func(what string) {
		t.Helper()
		for _, r := range plain(m) {
			if r > 127 {
				t.Fatalf("%s: non-ASCII %q in\n%s", what, r, plain(m))
			}
		}
	}
	for _, step := range []struct {
		what string
		keys []string
		want string
	}{
		{"save dialog", []string{"ctrl+s"}, "dialog"}, {"stale choice", []string{"enter"}, "stale"},
		{"stale diff", []string{"d"}, "diff"}, {"back", []string{"esc", "esc"}, "main"},
		{"browser", []string{"ctrl+o"}, "browse"}, {"history", []string{"tab"}, "history"},
		{"diff", []string{"d"}, "diff"}, {"diff with edits", []string{"esc", "c"}, "diff"},
		{"restore question", []string{"esc", "down", "r"}, "confirm"}, {"open question", []string{"n", "enter"}, "confirm"},
		{"note dialog", []string{"n", "esc", "esc", "n"}, "dialog"}, {"quit question", []string{"esc", "q"}, "quit"},
	} {
		m = press(m, step.keys...)
		if shown(m) != step.want {
			t.Fatalf("%s: screen %s, want %s", step.what, shown(m), step.want)
		}
		check(step.what)
	}
}

func TestCtrlSWhileTypingSavesWhatIsInForce(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 100, 30)))
	m = editField(m, "5", 0, "315")
	if !m.form.typing {
		t.Fatal("not typing")
	}
	m = press(m, "ctrl+s")
	if m.form.typing || shown(m) != "dialog" {
		t.Fatalf("ctrl+s while typing: typing %v, screen %s", m.form.typing, shown(m))
	}
	m = press(m, "enter")
	if doc, _ := mustOpen(t, st, "d7-demo", 0); doc.Spec.Temperature != 315 {
		t.Fatalf("saved T %g, want the typed 315 K", doc.Spec.Temperature)
	}
	// Text that is not accepted is not saved, and the save says so.
	m = editField(m, "5", 0, "5000")
	m = press(m, "ctrl+s", "enter")
	wantIn(t, m, "saved as session d7-demo, revision 2", "the text not in force under Temperature is not saved")
	if doc, _ := mustOpen(t, st, "d7-demo", 0); doc.Spec.Temperature != 315 {
		t.Fatalf("saved T %g, want 315 K in force", doc.Spec.Temperature)
	}
	if !m.Dirty() || !strings.Contains(plain(m), "5000") {
		t.Error("the text not in force was lost or not counted as unsaved")
	}
}
