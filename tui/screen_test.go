package tui

import (
	"fmt"
	"strings"
	"testing"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model/measure"
	"junco/sessions"
)

// shown names what m shows: "main" for the panels, else the screen on top
// by its type ("browse" for *browseScreen), the fit screen as "fit" or
// "cvfit" by the kind of data it fits.
func shown(m Model) string {
	switch s := m.top().(type) {
	case nil:
		return "main"
	case *fitScreen:
		if s.kind != nil && s.kind.of() == measure.KindCV {
			return "cvfit"
		}
		return "fit"
	}
	return strings.TrimSuffix(strings.TrimPrefix(fmt.Sprintf("%T", m.top()), "*tui."), "Screen")
}

// onTop returns the screen on top of m when it is a *T, else a new zero T,
// so that a test reads empty state and fails on its own checks.
func onTop[T any, P interface {
	*T
	screen
}](m Model) P {
	if s, ok := m.top().(P); ok {
		return s
	}
	return P(new(T))
}

// fitOf, ivOf and cvOf are the fit screen on top and its kind's state.
func fitOf(m Model) *fitScreen { return onTop[fitScreen](m) }

func ivOf(m Model) *ivFit {
	if f, ok := fitOf(m).kind.(*ivFit); ok {
		return f
	}
	return &ivFit{}
}

func cvOf(m Model) *cvFit {
	if f, ok := fitOf(m).kind.(*cvFit); ok {
		return f
	}
	return &cvFit{}
}

// batchOf is the workbench's batch screen (open or not).
func batchOf(m Model) *batchScreen {
	if m.batch == nil {
		return &batchScreen{}
	}
	return m.batch
}

func importOf(m Model) *importScreen { return onTop[importScreen](m) }

func arrOf(m Model) *arrheniusScreen { return onTop[arrheniusScreen](m) }

// The stack: each screen opens over the one below, esc takes the top one
// off and shows the one below, down to the panels.
func TestScreenStackPushAndPop(t *testing.T) {
	m := newTest(t, 120, 40)
	m = editField(m, "5", 0, "320")
	m = press(m, "enter")
	if len(m.stack) != 0 {
		t.Fatalf("the panels start with %d screens open", len(m.stack))
	}
	m = press(m, "f")
	if shown(m) != "fit" || len(m.stack) != 1 {
		t.Fatalf("f: %s, %d screens", shown(m), len(m.stack))
	}
	// ctrl+c over the fit asks to quit on top of it; n takes the question
	// off and the fit is there again, with its state.
	fitOf(m).eds[0].set("0.1")
	m = press(m, "ctrl+c")
	if shown(m) != "quit" || len(m.stack) != 2 {
		t.Fatalf("ctrl+c over the fit: %s, %d screens", shown(m), len(m.stack))
	}
	m = press(m, "n")
	if shown(m) != "fit" || fitOf(m).eds[0].value() != "0.1" {
		t.Fatalf("n at the question must show the fit below as it was: %s %q", shown(m), fitOf(m).eds[0].value())
	}
	m = press(m, "esc")
	if shown(m) != "main" || len(m.stack) != 0 {
		t.Fatalf("esc from the fit: %s, %d screens", shown(m), len(m.stack))
	}
	if !strings.Contains(plain(m), "[Define]") {
		t.Errorf("the panels are not drawn after the last screen closed:\n%s", plain(m))
	}
}

// Three screens deep in the session browser, esc walks back one at a
// time: the comparison, the revisions, the list, the panels.
func TestEscReturnsToTheScreenBelow(t *testing.T) {
	m := start(New(Options{Renderer: plainRenderer(), Width: 120, Height: 40, Store: diffStore(t), User: "alice", Now: ticking()}))
	m = press(m, "ctrl+o", "tab", "d")
	want := []string{"diff", "history", "browse", "main"}
	for i, w := range want {
		if shown(m) != w || len(m.stack) != len(want)-1-i {
			t.Fatalf("step %d: %s with %d screens, want %s with %d", i, shown(m), len(m.stack), w, len(want)-1-i)
		}
		m = press(m, "esc")
	}
}

// A push never writes into the stack of an earlier value of the Model.
func TestScreenStackIsNotShared(t *testing.T) {
	m := newTest(t, 80, 24)
	m.stack = make([]screen, 1, 4) // room to grow in place: a push must not use it
	m.stack[0] = &helpScreen{}
	a, b := m, m
	a.push(&quitScreen{})
	b.push(&cardScreen{})
	if shown(a) != "quit" || shown(b) != "card" || len(m.stack) != 1 {
		t.Errorf("pushes on copies share the stack: %s %s, original %d screens", shown(a), shown(b), len(m.stack))
	}
	b.close(b.stack[0])
	if len(b.stack) != 0 || len(a.stack) != 2 {
		t.Errorf("close takes the screen and those over it off its own stack only: %d, %d", len(b.stack), len(a.stack))
	}
}

// Several keys in one read reach the screen on top, one by one: on the
// card screen, five j scroll five lines; on the import screen, a path
// typed in one read lands whole in its box.
func TestKeysInOneReadReachTheTopScreen(t *testing.T) {
	m := newTest(t, 80, 24)
	card := feed(m, oneRead("M"))
	if shown(card) != "card" {
		t.Fatalf("M opened %s", shown(card))
	}
	if n := len(onTop[cardScreen](card).lines(card, card.w)); n < 5+card.h {
		t.Fatalf("the card has %d lines: too short to scroll five at %d rows; the test set-up is wrong", n, card.h)
	}
	card = feed(card, oneRead("jjjjj"))
	if top := onTop[cardScreen](card).top; top != 5 {
		t.Errorf("jjjjj in one read scrolled the card %d lines, want 5", top)
	}
	imp := feed(m, oneRead("i"))
	imp = feed(imp, oneRead("a/b c.csv"))
	if got := importOf(imp).ed.value(); got != "a/b c.csv" {
		t.Errorf("a path typed in one read: %q", got)
	}
	// A read that opens a screen and goes on typing: the rest reaches
	// the screen opened by its first key.
	both := feed(m, oneRead("?jjj"))
	if shown(both) != "help" || onTop[helpScreen](both).off != 3 {
		t.Errorf("?jjj in one read: %s scrolled %d", shown(both), onTop[helpScreen](both).off)
	}
}

// ctrl+c is handled once, for every screen: from each screen on top
// of the stack, with unsaved changes, it asks to quit (the batch stops
// its run first); at the question it quits at once; at the draft offer it
// quits keeping the drafts.
func TestCtrlCOnceFromEveryScreen(t *testing.T) {
	base := start(New(Options{Renderer: plainRenderer(), Width: 120, Height: 40, Store: diffStore(t), User: "alice", Now: ticking()}))
	base = editField(base, "5", 0, "320")
	base = press(base, "enter")
	opens := map[string][]string{
		"help": {"?"}, "import": {"i"}, "fit": {"f"}, "arrhenius": {"A"}, "batch": {"B"}, "card": {"M"},
		"dialog": {"ctrl+s"}, "browse": {"ctrl+o"}, "history": {"ctrl+o", "tab"}, "diff": {"ctrl+o", "tab", "d"},
		"confirm": {"ctrl+o", "enter"},
	}
	for name, keys := range opens {
		m := press(base, keys...)
		if shown(m) != name {
			t.Fatalf("%v opened %s, want %s", keys, shown(m), name)
		}
		depth := len(m.stack)
		tm, cmd := m.Update(keyMsg("ctrl+c"))
		m = tm.(Model)
		if cmd != nil {
			if _, quit := cmd().(tea.QuitMsg); quit {
				t.Errorf("%s: ctrl+c with unsaved changes quit without asking", name)
				continue
			}
		}
		if shown(m) != "quit" || len(m.stack) != depth+1 || !strings.Contains(plain(m), "Quit junco?") {
			t.Errorf("%s: ctrl+c shows %s with %d screens, want the quit question over %d", name, shown(m), len(m.stack), depth)
			continue
		}
		_, cmd = m.Update(keyMsg("ctrl+c"))
		if cmd == nil {
			t.Errorf("%s: ctrl+c at the question did not quit", name)
		} else if _, quit := cmd().(tea.QuitMsg); !quit {
			t.Errorf("%s: ctrl+c at the question returned %T", name, cmd())
		}
	}
	// The draft offer: ctrl+c quits at once and keeps the draft.
	st := draftStore(t)
	d := start(New(Options{Renderer: plainRenderer(), Width: 120, Height: 40, Store: st, User: "alice", Now: ticking()}))
	if shown(d) != "draft" {
		t.Fatalf("the draft offer is not shown: %s", shown(d))
	}
	_, cmd := d.Update(keyMsg("ctrl+c"))
	if cmd == nil {
		t.Fatal("ctrl+c at the draft offer did not quit")
	}
	if _, quit := cmd().(tea.QuitMsg); !quit {
		t.Errorf("ctrl+c at the draft offer returned %T", cmd())
	}
	if ds, _, err := st.DraftsOf(sessions.UnnamedDraft, sessions.EditorID("alice")); err != nil || len(ds) != 1 {
		t.Errorf("the draft must be kept: %d drafts, %v", len(ds), err)
	}
}

// ctrl+c on a running batch stops the run (the files finished are kept)
// and asks to quit over the batch screen; n shows the batch again.
func TestCtrlCStopsTheBatch(t *testing.T) {
	dir := writeBatchDir(t, 6)
	m := newTest(t, 100, 30)
	m = editField(m, "5", 0, "320")
	m = press(m, "enter", "B")
	m = typeText(m, dir)
	tm, run := m.Update(keyMsg("enter"))
	m = tm.(Model)
	if !batchOf(m).running {
		t.Fatal("enter must start the batch")
	}
	tm, _ = m.Update(keyMsg("ctrl+c"))
	m = drain(tm.(Model), run)
	if shown(m) != "quit" || batchOf(m).running || batchOf(m).view == nil {
		t.Fatalf("ctrl+c on the run: %s, running %v, rows %v", shown(m), batchOf(m).running, batchOf(m).view != nil)
	}
	if v := batchOf(m).view; v.Interrupted && !strings.Contains(batchOf(m).err, "cancelled") {
		t.Errorf("an interrupted run must say so: %q", batchOf(m).err)
	}
	if m = press(m, "n"); shown(m) != "batch" {
		t.Errorf("n at the question: %s, want the batch", shown(m))
	}
}

// A screen lays itself out for a new terminal size while it is open,
// also under another screen: the fit's chart is drawn again for the
// size, and closing the screen over it shows the chart at that size.
func TestScreensFollowTheTerminalSize(t *testing.T) {
	m := press(newTest(t, 200, 60), "f")
	wide := len(fitOf(m).plot)
	m.push(&helpScreen{})
	tm, _ := m.Update(tea.WindowSizeMsg{Width: 80, Height: 24})
	m = press(tm.(Model), "esc")
	if shown(m) != "fit" || len(fitOf(m).plot) == 0 || len(fitOf(m).plot) >= wide {
		t.Fatalf("the fit's chart at 80 x 24 has %d rows (at 200 x 60: %d)", len(fitOf(m).plot), wide)
	}
	if lines := strings.Split(plain(m), "\n"); len(lines) != 24 || !strings.Contains(lines[1], "Fit") {
		t.Errorf("the fit screen at 80 x 24 draws %d lines:\n%s", len(lines), plain(m))
	}
}
