package sessions

import (
	"strings"
	"testing"
)

// TestDraftsPerConnection: one user on two connections keeps two drafts
// of one session; both are offered, newest first, with a draft of an
// older version (no connection); discarding one keeps the others.
func TestDraftsPerConnection(t *testing.T) {
	s := newTestStore(t)
	c1 := NewConnID(fixedTime)
	c2 := NewConnID(fixedTime)
	if c1 == c2 || ValidateName(c1) != nil || !strings.HasPrefix(c1, "20250314T092653Z-") {
		t.Fatalf("connection IDs %q and %q: want two different valid names starting with the time", c1, c2)
	}
	a, b := exampleDocument(), exampleDocument()
	a.Notes = []string{"edit on connection 1"}
	b.Notes = []string{"edit on connection 2"}
	if err := s.SaveDraft("d7", DraftKey{Editor: "alice", Conn: c1}, 1, a); err != nil {
		t.Fatal(err)
	}
	if err := s.SaveDraft("d7", DraftKey{Editor: "alice", Conn: c2}, 1, b); err != nil {
		t.Fatal(err)
	}
	if err := s.SaveDraft("d7", DraftKey{Editor: "alice"}, 1, exampleDocument()); err != nil {
		t.Fatal(err)
	}
	if err := s.SaveDraft("d7", DraftKey{Editor: "bob", Conn: c1}, 1, exampleDocument()); err != nil {
		t.Fatal(err)
	}
	ds, probs, err := s.DraftsOf("d7", "alice")
	if err != nil || len(probs) != 0 || len(ds) != 3 {
		t.Fatalf("drafts of alice: %d %v %v, want 3", len(ds), probs, err)
	}
	// The clock advances one second per call: the legacy draft is newest.
	if ds[0].Conn != "" || ds[1].Conn != c2 || ds[1].Document.Notes[0] != "edit on connection 2" || ds[2].Conn != c1 || ds[2].Document.Notes[0] != "edit on connection 1" {
		t.Errorf("drafts of alice in order: %q %q %q", ds[0].Conn, ds[1].Conn, ds[2].Conn)
	}
	if all, probs, _ := s.Drafts(); len(all) != 4 || len(probs) != 0 {
		t.Errorf("all drafts: %d %v, want 4", len(all), probs)
	}
	if !s.HasDraft("d7", "alice") || !s.HasDraft("d7", "bob") || s.HasDraft("d7", "carol") {
		t.Error("HasDraft does not see the drafts of each connection")
	}
	if err := s.DiscardDraft("d7", ds[1].Key()); err != nil {
		t.Fatal(err)
	}
	if rest, _, _ := s.DraftsOf("d7", "alice"); len(rest) != 2 || rest[1].Conn != c1 {
		t.Errorf("after discarding connection 2: %+v", rest)
	}
	if err := s.SaveDraft("d7", DraftKey{Editor: "alice", Conn: "../x"}, 1, a); err == nil || !strings.Contains(err.Error(), "connection") {
		t.Errorf("a connection with a path was accepted: %v", err)
	}
}

// TestReservedNameIsNoSession: the one name check refuses the name kept
// for drafts of unsaved junctions, in any letter case, so no front end
// can save a session under it; its drafts still work.
func TestReservedNameIsNoSession(t *testing.T) {
	s := newTestStore(t)
	for _, n := range []string{UnnamedDraft, "_UNSAVED", "_Unsaved"} {
		if err := ValidateName(n); err == nil || !strings.Contains(err.Error(), "kept for the recovery drafts") {
			t.Errorf("ValidateName(%q) = %v, want it refused as reserved", n, err)
		}
		if _, err := s.Save(n, exampleDocument(), 0); err == nil {
			t.Errorf("a session named %q was saved", n)
		}
	}
	k := DraftKey{Editor: "alice", Conn: NewConnID(fixedTime)}
	if err := s.SaveDraft(UnnamedDraft, k, 0, exampleDocument()); err != nil {
		t.Fatal(err)
	}
	if d, err := s.DraftOf(UnnamedDraft, "alice"); err != nil || d == nil {
		t.Errorf("the draft of an unsaved junction: %v %v", d, err)
	}
	if ds, probs, _ := s.Drafts(); len(ds) != 1 || len(probs) != 0 {
		t.Errorf("all drafts: %d %v", len(ds), probs)
	}
	if err := s.DiscardDraft(UnnamedDraft, k); err != nil {
		t.Error(err)
	}
}
