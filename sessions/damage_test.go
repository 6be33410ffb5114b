package sessions

import (
	"os"
	"path/filepath"
	"testing"
	"time"
)

// TestDamagedNewestRevisions: with revisions 3, 4 and 6 of 6 unreadable,
// the session is listed with revision 5 and a damage mark, opens at
// revision 5, and the next save from 5 is revision 7.
func TestDamagedNewestRevisions(t *testing.T) {
	s := newTestStore(t)
	for base := range 6 {
		doc := exampleDocument()
		doc.Notes = []string{"revision " + string(rune('1'+base))}
		if _, err := s.Save("d7", doc, base); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := s.Save("fine", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{3, 4, 6} {
		p := filepath.Join(s.sessionDir("d7"), revFile(n))
		os.Chmod(p, 0o600)
		if err := os.WriteFile(p, []byte("\x00\x01 not json"), 0o600); err != nil {
			t.Fatal(err)
		}
	}

	list, probs, err := s.List()
	if err != nil {
		t.Fatal(err)
	}
	if len(list) != 2 || list[0].Name != "d7" || list[1].Name != "fine" {
		t.Fatalf("listed %+v, want d7 and fine", list)
	}
	d := list[0]
	if d.Latest.Number != 5 || d.Revisions != 6 || len(d.Damaged) != 1 || d.Damaged[0].Path != filepath.Join(s.sessionDir("d7"), revFile(6)) {
		t.Errorf("d7 listed with revision %d of %d, damaged %v; want revision 5 of 6, revision 6 damaged", d.Latest.Number, d.Revisions, d.Damaged)
	}
	if len(probs) != 1 {
		t.Errorf("problems %v, want the one damaged newest revision", probs)
	}

	doc, rev, err := s.Open("d7", 0)
	if err != nil {
		t.Fatalf("open newest: %v", err)
	}
	if rev.Number != 5 || doc.Notes[0] != "revision 5" || len(rev.Skipped) != 1 {
		t.Errorf("opened revision %d (%q), skipped %v; want revision 5, revision 6 skipped", rev.Number, doc.Notes, rev.Skipped)
	}

	doc.Notes = append(doc.Notes, "after the damage")
	saved, err := s.Save("d7", doc, 5)
	if err != nil {
		t.Fatalf("save from revision 5: %v", err)
	}
	if saved.Number != 7 || saved.Meta.BasedOn != 5 {
		t.Errorf("saved as revision %d based on %d, want 7 based on 5", saved.Number, saved.Meta.BasedOn)
	}
	// Revision 7 reads, so a save from 5 is stale now.
	if _, err := s.Save("d7", doc, 5); err == nil {
		t.Error("a second save from revision 5 was accepted over the readable revision 7")
	}
	if _, rev, err := s.Open("d7", 0); err != nil || rev.Number != 7 || len(rev.Skipped) != 0 {
		t.Errorf("newest after the save: %d %v %v", rev.Number, rev.Skipped, err)
	}
	for _, n := range []int{3, 4, 6} {
		b, _ := os.ReadFile(filepath.Join(s.sessionDir("d7"), revFile(n)))
		if string(b) != "\x00\x01 not json" {
			t.Errorf("damaged revision %d was changed", n)
		}
	}
}

// TestStaleTempFilesSwept: temporary files of a save or draft killed
// midway are removed once older than staleTempAge; fresh ones (a save
// under way) are kept.
func TestStaleTempFilesSwept(t *testing.T) {
	s, err := New(t.TempDir(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.Save("d7", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	if err := s.SaveDraft("d7", DraftKey{Editor: "ana"}, 1, exampleDocument()); err != nil {
		t.Fatal(err)
	}
	if err := s.AddReviewNote("d7", ReviewNote{Author: "bob", Text: "seen"}); err != nil {
		t.Fatal(err)
	}
	old := time.Now().Add(-staleTempAge - time.Minute)
	var stale, fresh []string
	for _, dir := range []string{s.sessionDir("d7"), filepath.Dir(s.draftPath("d7", DraftKey{Editor: "ana"})), filepath.Join(s.Root(), reviewsDir, "d7")} {
		for i, age := range []time.Time{old, time.Now()} {
			p := filepath.Join(dir, ".tmp-"+string(rune('a'+i)))
			if err := os.WriteFile(p, []byte("half a revision"), 0o600); err != nil {
				t.Fatal(err)
			}
			os.Chtimes(p, age, age)
			if i == 0 {
				stale = append(stale, p)
			} else {
				fresh = append(fresh, p)
			}
		}
	}
	keep := filepath.Join(s.sessionDir("d7"), ".backup")
	os.WriteFile(keep, nil, 0o600)
	os.Chtimes(keep, old, old)

	if _, _, err := s.List(); err != nil {
		t.Fatal(err)
	}
	if _, _, err := s.Drafts(); err != nil {
		t.Fatal(err)
	}
	if _, _, err := s.ReviewNotes("d7"); err != nil {
		t.Fatal(err)
	}
	for _, p := range stale {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("stale %s is still there", p)
		}
	}
	for _, p := range append(fresh, keep) {
		if _, err := os.Stat(p); err != nil {
			t.Errorf("%s was removed: %v", p, err)
		}
	}
}
