package tui

import (
	"strings"
	"testing"
)

// On the panels a note longer than the line is wrapped above the keys,
// never cut (issue: never cut a word a user needs): at 80x24 pinning the
// result gives a note of about 100 characters; every word of it shows,
// the keys keep the last line and the screen stays 24 lines.
func TestPanelLongNoteWrapped(t *testing.T) {
	m := newTest(t, 80, 24)
	m = press(m, "p")
	if len(m.note) <= 78 {
		t.Fatalf("the pin note %q is not longer than the line; the test needs a long note", m.note)
	}
	view := plain(m)
	lines := strings.Split(view, "\n")
	if len(lines) != 24 {
		t.Fatalf("%d lines, want 24", len(lines))
	}
	flat := strings.Join(strings.Fields(strings.Join(lines, " ")), " ")
	if !strings.Contains(flat, m.note) {
		t.Errorf("the note %q is not shown whole:\n%s", m.note, view)
	}
	if last := lines[23]; !strings.Contains(last, "next field") {
		t.Errorf("the keys lost the last line: %q", last)
	}
}
