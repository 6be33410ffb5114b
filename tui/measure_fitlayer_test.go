package tui

import (
	"testing"

	"junco/sessions"
)

// Keeping fits never collides with an ID the session holds: the old
// workbench named the N-th extraction fit-N without looking, so a session
// holding only fit-2 named its next fit fit-2 and failed validation at save. Now each kept
// fit gets MEASUREMENT-fit-K with the smallest free K, and the document
// validates.
func TestKeepFitIDsNeverCollide(t *testing.T) {
	st := newStore(t, "alice")
	m := start(New(opts(st, "alice", 120, 40)))
	m = press(m, "f")
	if shown(m) != "fit" || ivOf(m).view == nil {
		t.Fatalf("no fit screen:\n%s", plain(m))
	}
	mid := m.sess.meas[fitOf(m).idx].ID
	m.sess.extr = append(m.sess.extr,
		sessions.Extraction{ID: "fit-2", Method: "iv-single-diode", Measurement: mid, Performed: m.sess.now().UTC()})
	m = press(m, "ctrl+k", "ctrl+k")
	if len(m.sess.extr) != 3 {
		t.Fatalf("%d extractions, want 3", len(m.sess.extr))
	}
	if a, b := m.sess.extr[1].ID, m.sess.extr[2].ID; a != mid+"-fit-1" || b != mid+"-fit-2" {
		t.Errorf("kept IDs %s, %s; want %s-fit-1, %s-fit-2", a, b, mid, mid)
	}
	doc, err := m.document("demo")
	if err != nil {
		t.Fatal(err)
	}
	if err := doc.Validate(); err != nil {
		t.Errorf("the document would be refused at save: %v", err)
	}
}
