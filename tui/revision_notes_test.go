package tui

import (
	"strings"
	"testing"
)

// A save's note is kept with its revision, and the revision list of the
// session browser shows it.
func TestHistoryShowsEachSaveNote(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 120, 40)))
	m = editField(m, "5", 0, "310")
	m = press(m, "enter", "ctrl+s", "ctrl+u")
	m = typeText(m, "lot417")
	m = press(m, "tab", "tab")
	m = typeText(m, "first probe at 310 K")
	m = press(m, "enter")
	m = editField(m, "5", 0, "320")
	m = press(m, "enter", "ctrl+s") // the dialog opens on its note
	m = typeText(m, "warmer chuck")
	m = press(m, "enter")
	for rev, want := range map[int]string{1: "first probe at 310 K", 2: "warmer chuck"} {
		doc, _ := mustOpen(t, st, "lot417", rev)
		if doc.Meta.Note != want {
			t.Errorf("revision %d: note %q, want %q", rev, doc.Meta.Note, want)
		}
	}
	m = press(m, "ctrl+o", "tab")
	if shown(m) != "history" {
		t.Fatalf("tab in the browser did not show the revisions:\n%s", plain(m))
	}
	v := plain(m)
	for _, want := range []string{"first probe at 310 K", "warmer chuck"} {
		if !strings.Contains(v, want) {
			t.Errorf("the revision list lacks the note %q:\n%s", want, v)
		}
	}
}
