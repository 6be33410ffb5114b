package tui

import (
	"errors"
	"reflect"
	"strings"
	"testing"

	"junco/model"
	"junco/sessions"
)

// Review mode: a colleague's session shown read-only, with review notes.

func reviewOpts(added *[]string, copies *[]string, st *sessions.Store) Options {
	o := Options{Renderer: plainRenderer(), Width: 120, Height: 40, User: "bob", Now: ticking(),
		Session: "d7-lot417", Document: reviewDoc(), Revision: 3, ReadOnly: true, Store: st,
		AddReview: func(text string) error {
			if text == "fail please" {
				return errors.New("the review service is down")
			}
			*added = append(*added, text)
			return nil
		},
		CopyToOwn: func(doc *sessions.Document, name string) (int, error) {
			*copies = append(*copies, name)
			r, err := st.Save(name, doc, 0)
			return r.Number, err
		}}
	return o
}

func TestReviewModeShowsAllRefusesEditsAndAddsNotes(t *testing.T) {
	st := newStore(t, "bob")
	var added, copies []string
	m := start(New(reviewOpts(&added, &copies, st)))
	wantIn(t, m, "[review (read-only)]", "Define the junction · read-only", "d7-lot417 rev 3")
	spec := m.Spec()
	// Every editing key is refused with a reason; navigation works.
	for _, keys := range [][]string{{"right"}, {"x"}, {"2", "down", "enter"}, {"2", "down", "x"}, {"p"}, {"tab", "tab", "r"}} {
		m = press(m, keys...)
		wantIn(t, m, "read-only review:", "cannot be changed; ctrl+s copies it to your sessions")
		if m.form.typing || m.chart.editing || m.pin != nil {
			t.Fatalf("%v started an edit in review mode", keys)
		}
		if !reflect.DeepEqual(m.Spec(), spec) {
			t.Fatalf("%v changed the junction in review mode", keys)
		}
		m = press(m, "shift+tab", "shift+tab", "shift+tab")
		m.focus = panelDefine
	}
	if m.Dirty() {
		t.Fatal("review mode reports unsaved changes")
	}
	// Notes and review notes are shown, with author and time.
	m = press(m, "tab")
	wantIn(t, m, "Session notes", "lifetime from the decay of wafer 3", "Review notes", "carol, 2025-03-14 10:26 UTC: check the area")
	// n adds a review note through the callback.
	m = press(m, "n")
	wantIn(t, m, "Add a review note", "signed bob")
	m = press(m, "enter")
	wantIn(t, m, "the text is empty")
	m = typeText(m, "fail please")
	m = press(m, "enter")
	wantIn(t, m, "the review service is down")
	if onTop[dialogScreen](m).fields[0].ed.value() != "fail please" {
		t.Fatal("a failed review note lost its text")
	}
	m = press(m, "ctrl+u")
	m = typeText(m, "Cj looks high for this area")
	m = press(m, "enter")
	if !reflect.DeepEqual(added, []string{"Cj looks high for this area"}) {
		t.Fatalf("AddReview got %q", added)
	}
	wantIn(t, m, "review note added", "bob, 2025-03-14", "Cj looks high for this area")
	// q quits at once: nothing is unsaved in review mode.
	if _, cmd := m.Update(keyMsg("q")); cmd == nil {
		t.Fatal("q in review mode does not quit")
	}
	// ctrl+s copies into the reviewer's sessions and opens the copy.
	m = press(m, "ctrl+s")
	wantIn(t, m, "Copy into your own sessions", "d7-lot417-mine")
	m = press(m, "enter")
	if !reflect.DeepEqual(copies, []string{"d7-lot417-mine"}) {
		t.Fatalf("CopyToOwn got %q", copies)
	}
	doc, _ := mustOpen(t, st, "d7-lot417-mine", 0)
	if len(doc.Reviews) != 2 || !strings.Contains(doc.Meta.Origin, "copied from session d7-lot417, revision 3, under review") {
		t.Fatalf("copy: %d review notes, origin %q", len(doc.Reviews), doc.Meta.Origin)
	}
	if m.sess.readOnly || m.sess.name != "d7-lot417-mine" {
		t.Fatal("the copy was not opened for editing")
	}
	wantIn(t, m, "copied into your session d7-lot417-mine")
	m = press(m, "shift+tab", "2", "down", "enter")
	if !m.form.typing {
		t.Fatal("the copy cannot be edited")
	}
}

func TestReviewWithoutCallbacksSaysWhy(t *testing.T) {
	o := Options{Renderer: plainRenderer(), Width: 100, Height: 30, Document: reviewDoc(), Session: "x", ReadOnly: true}
	m := start(New(o))
	m = press(m, "n")
	wantIn(t, m, "review notes cannot be added here")
	m = press(m, "ctrl+s")
	wantIn(t, m, "Copying into your own sessions is not available here")
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
