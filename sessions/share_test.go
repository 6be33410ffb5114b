package sessions

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func TestReviewNotes(t *testing.T) {
	s := newTestStore(t)
	if err := s.AddReviewNote("nosuch", ReviewNote{Author: "bob", Text: "hi"}); err == nil {
		t.Fatal("note on a missing session accepted")
	}
	if _, err := s.Save("d7", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	before, _, _ := s.History("d7")
	for _, c := range []ReviewNote{{Author: "bob", Text: "  "}, {Author: "../x", Text: "t"}, {Author: "", Text: "t"}} {
		if err := s.AddReviewNote("d7", c); err == nil {
			t.Errorf("bad note %+v accepted", c)
		}
	}
	if err := s.AddReviewNote("d7", ReviewNote{Author: "bob", Text: "Is the 5 us lifetime measured?"}); err != nil {
		t.Fatal(err)
	}
	if err := s.AddReviewNote("d7", ReviewNote{Author: "carol", Text: "Looks fine."}); err != nil {
		t.Fatal(err)
	}
	// A damaged note file is reported, the others still read.
	dir := filepath.Join(s.Root(), reviewsDir, "d7")
	if err := os.WriteFile(filepath.Join(dir, "zz-broken.json"), []byte("{not json"), 0o644); err != nil {
		t.Fatal(err)
	}
	notes, damaged, err := s.ReviewNotes("d7")
	if err != nil || len(notes) != 2 || len(damaged) != 1 {
		t.Fatalf("notes %v damaged %v err %v", notes, damaged, err)
	}
	if notes[0].Author != "bob" || notes[1].Author != "carol" || notes[0].Time.IsZero() {
		t.Errorf("order or fields wrong: %+v", notes)
	}
	// Adding notes writes no revision.
	after, _, _ := s.History("d7")
	if len(after) != len(before) {
		t.Errorf("review notes changed the history: %d -> %d", len(before), len(after))
	}
}

func TestShares(t *testing.T) {
	root := t.TempDir()
	sh, err := NewShares(root, fixedClock())
	if err != nil {
		t.Fatal(err)
	}
	if sh.CanRead("bob", "ada", "d7") {
		t.Fatal("unshared session readable")
	}
	if !sh.CanRead("ada", "ada", "d7") {
		t.Fatal("owner cannot read own session")
	}
	if err := sh.Set("ada", "d7", []string{"bob", "bob", "ada"}); err != nil {
		t.Fatal(err)
	}
	if !sh.CanRead("bob", "ada", "d7") || sh.CanRead("carol", "ada", "d7") {
		t.Fatal("share with bob only is wrong")
	}
	got, err := sh.SharedWith("bob")
	if err != nil || len(got) != 1 || got[0].Owner != "ada" || got[0].Session != "d7" || len(got[0].Readers) != 1 {
		t.Fatalf("SharedWith(bob) = %+v %v", got, err)
	}
	if err := sh.Set("ada", "d8", []string{Everyone}); err != nil {
		t.Fatal(err)
	}
	if !sh.CanRead("carol", "ada", "d8") {
		t.Fatal("share with everyone not readable")
	}
	// Unsharing takes effect at once.
	if err := sh.Set("ada", "d7", nil); err != nil {
		t.Fatal(err)
	}
	if sh.CanRead("bob", "ada", "d7") {
		t.Fatal("unshared session still readable")
	}
	// Names that could leave the root are refused.
	for _, bad := range [][3]string{{"..", "d7", "bob"}, {"ada", "../x", "bob"}, {"ada", "d7", "a/b"}} {
		if err := sh.Set(bad[0], bad[1], []string{bad[2]}); err == nil {
			t.Errorf("Set(%q) accepted", bad)
		}
	}
	var ne *NameError
	if _, err := UserStoreRoot(root, "../etc"); !errors.As(err, &ne) {
		t.Errorf("UserStoreRoot accepted a path: %v", err)
	}
	if p, err := UserStoreRoot(root, "ada"); err != nil || p != filepath.Join(root, "users", "ada") {
		t.Errorf("UserStoreRoot = %q %v", p, err)
	}
}

// The owner sees reviewers' notes when opening the session, once each,
// also after saving them into a new revision.
func TestOpenMergesReviewNotes(t *testing.T) {
	s := newTestStore(t)
	if _, err := s.Save("d7", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	if err := s.AddReviewNote("d7", ReviewNote{Author: "bob", Text: "check Rs"}); err != nil {
		t.Fatal(err)
	}
	doc, rev, err := s.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	count := func(d *Document) (n int) {
		for _, r := range d.Reviews {
			if r.Author == "bob" && r.Text == "check Rs" {
				n++
			}
		}
		return n
	}
	if count(doc) != 1 {
		t.Fatalf("review note not merged: %+v", doc.Reviews)
	}
	if _, err := s.Save("d7", doc, rev.Number); err != nil {
		t.Fatal(err)
	}
	doc2, _, err := s.Open("d7", 0)
	if err != nil || count(doc2) != 1 {
		t.Fatalf("note duplicated after save: %+v %v", doc2.Reviews, err)
	}
}

// A reviewer writes review notes into the owner's space, so their number
// is bounded: after MaxReviewNotes on one session the next is refused,
// naming the limit, and the owner still opens and saves the session with
// every note merged. Before, notes were unbounded: a reviewer could fill
// the server's disk from a read-only share, and past 10000 notes the
// owner's next save was refused (a document keeps at most 10000).
func TestReviewNotesBounded(t *testing.T) {
	s := newTestStore(t)
	if _, err := s.Save("d7", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	t0 := time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)
	if err := s.AddReviewNote("d7", ReviewNote{Author: "bob", Text: "first", Time: t0}); err != nil {
		t.Fatal(err)
	}
	// The rest written as AddReviewNote writes them (one file each),
	// without a flush per note.
	dir := filepath.Join(s.Root(), reviewsDir, "d7")
	for i := 1; i < MaxReviewNotes; i++ {
		n := ReviewNote{Author: "bob", Text: fmt.Sprintf("note %d", i), Time: t0.Add(time.Duration(i) * time.Second)}
		data, _ := json.Marshal(n)
		if err := os.WriteFile(filepath.Join(dir, n.Time.Format(trashStamp)+"-bob.json"), data, 0o400); err != nil {
			t.Fatal(err)
		}
	}
	err := s.AddReviewNote("d7", ReviewNote{Author: "bob", Text: "one more", Time: t0.Add(-time.Hour)})
	if err == nil || !strings.Contains(err.Error(), "MaxReviewNotes") {
		t.Fatalf("note beyond the limit: %v", err)
	}
	doc, _, err := s.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	if want := MaxReviewNotes + len(exampleDocument().Reviews); len(doc.Reviews) != want {
		t.Fatalf("%d notes merged, want %d", len(doc.Reviews), want)
	}
	if _, err := s.Save("d7", doc, 1); err != nil {
		t.Errorf("the owner cannot save the session with its notes: %v", err)
	}
}
