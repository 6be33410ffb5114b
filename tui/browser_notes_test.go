package tui

import (
	"fmt"
	"strings"
	"testing"

	"junco/model"
)

// At 80x24 the revision list wraps each save's note under its column:
// every word of a long note is on screen, none cut; with more revisions
// than lines the selected one stays whole in view.
func TestHistoryWrapsNotes(t *testing.T) {
	st := newStore(t, "alice")
	doc := storeSession(t, st, "lot", "test diode D7, lot 417, as probed", model.DemoJunction().Spec)
	note := "probe card replaced after die 40; contact resistance rechecked at 10 mA, within 0.2 ohm of the morning's value"
	for k := 2; k <= 12; k++ {
		doc.Meta.Note = fmt.Sprintf("save %d: %s", k, note)
		if _, err := st.Save("lot", doc, k-1); err != nil {
			t.Fatal(err)
		}
	}
	m := start(New(opts(st, "alice", 80, 24)))
	m = press(m, "ctrl+o", "tab")
	s := plain(m)
	for _, l := range strings.Split(s, "\n") {
		if strings.Contains(l, "…") && !strings.Contains(l, "↑/↓") {
			t.Errorf("a line is cut: %q", l)
		}
	}
	f := flat(s)
	if !strings.Contains(f, "save 12: "+note) {
		t.Errorf("the newest note is not whole:\n%s", s)
	}
	// Walk to the oldest revision: it and its title are in view.
	for range 11 {
		m = press(m, "down")
	}
	f = flat(plain(m))
	if !strings.Contains(f, "1 2025-03-14") || !strings.Contains(f, "test diode D7, lot 417, as probed") {
		t.Errorf("the selected oldest revision is not in view:\n%s", plain(m))
	}
}
