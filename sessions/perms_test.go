package sessions

import (
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// privateTree fails for every folder or file under root that another
// account could read, write or enter.
func privateTree(t *testing.T, root string) (dirs, files int) {
	t.Helper()
	err := filepath.WalkDir(root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		info, err := d.Info()
		if err != nil {
			return err
		}
		perm := info.Mode().Perm()
		switch {
		case d.IsDir():
			dirs++
			if perm != 0o700 {
				t.Errorf("folder %s has mode %04o, want 0700", path, perm)
			}
		default:
			files++
			if perm&0o077 != 0 || perm&0o400 == 0 {
				t.Errorf("file %s has mode %04o, want 0600 or 0400", path, perm)
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return dirs, files
}

// TestStoreIsPrivateWhateverTheUmask: folders 0700, files 0600 or 0400,
// with the umask of most systems (022) and with none (000). The umask is
// the process's, so this test does not run in parallel.
func TestStoreIsPrivateWhateverTheUmask(t *testing.T) {
	for _, mask := range []int{0o022, 0o000, 0o002} {
		old := syscall.Umask(mask)
		data := filepath.Join(t.TempDir(), "data")
		notes, err := PrepareDataRoot(data)
		if err != nil {
			syscall.Umask(old)
			t.Fatal(err)
		}
		root, _ := UserStoreRoot(data, "alice")
		s, err := New(root, Options{ToolVersion: "test", User: "alice", Now: fixedClock()})
		if err != nil {
			syscall.Umask(old)
			t.Fatal(err)
		}
		steps := []error{}
		_, err = s.Save("d1", exampleDocument(), 0)
		steps = append(steps, err)
		_, err = s.Save("d2", exampleDocument(), 0)
		steps = append(steps, err)
		steps = append(steps, s.SaveDraft("d1", DraftKey{Editor: "alice"}, 1, exampleDocument()))
		steps = append(steps, s.AddReviewNote("d1", ReviewNote{Author: "bob", Text: "looks right"}))
		_, err = s.Trash("d2")
		steps = append(steps, err)
		sh, _ := NewShares(data, nil)
		steps = append(steps, sh.Set("alice", "d1", []string{"bob"}))
		syscall.Umask(old)
		for i, err := range steps {
			if err != nil {
				t.Fatalf("umask %03o, step %d: %v", mask, i, err)
			}
		}
		if len(notes) != 0 {
			t.Errorf("a new data folder gave notices %q", notes)
		}
		dirs, files := privateTree(t, data)
		// data, users, alice, sessions, d1, drafts, d1, reviews, d1,
		// trash, d2, stamp, shares, alice at least; revisions, draft,
		// note, share file.
		if dirs < 12 || files < 4 {
			t.Errorf("umask %03o: only %d folders and %d files were made; the store did not write what it should", mask, dirs, files)
		}
	}
}

// TestLooseStoreIsTightenedOnOpen: a store with the modes an older junco
// left (folders 0755, revisions 0444) is made private when opened, and
// the store says so.
func TestLooseStoreIsTightenedOnOpen(t *testing.T) {
	s := newTestStore(t)
	if _, err := s.Save("old", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	if err := s.SaveDraft("old", DraftKey{Editor: "ana"}, 1, exampleDocument()); err != nil {
		t.Fatal(err)
	}
	loosen := func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.IsDir() {
			return os.Chmod(path, 0o755)
		}
		return os.Chmod(path, 0o444)
	}
	if err := filepath.WalkDir(s.Root(), loosen); err != nil {
		t.Fatal(err)
	}
	again, err := New(s.Root(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	privateTree(t, s.Root())
	ns := again.Notices()
	if len(ns) != 1 || !strings.Contains(ns[0], "made private") || !strings.Contains(ns[0], "readable by other accounts") {
		t.Errorf("notices %q, want one saying the store was made private", ns)
	}
	if _, _, err := again.Open("old", 0); err != nil {
		t.Errorf("the tightened store does not open: %v", err)
	}
	if d, err := again.DraftOf("old", "ana"); err != nil || d == nil {
		t.Errorf("the tightened draft does not read: %v %v", d, err)
	}
	// Opened once more: nothing to do, nothing said.
	if third, _ := New(s.Root(), Options{}); len(third.Notices()) != 0 {
		t.Errorf("a private store gave notices %q", third.Notices())
	}

	// A server's data folder of an older junco is tightened at start.
	data := t.TempDir()
	legacy := filepath.Join(data, "users", "bob", "sessions", "x")
	if err := os.MkdirAll(legacy, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(legacy, revFile(1)), []byte("{}"), 0o444); err != nil {
		t.Fatal(err)
	}
	os.Chmod(data, 0o755)
	for _, d := range []string{"users", "users/bob", "users/bob/sessions", "users/bob/sessions/x"} {
		os.Chmod(filepath.Join(data, d), 0o755)
	}
	ns, err = PrepareDataRoot(data)
	if err != nil {
		t.Fatal(err)
	}
	privateTree(t, data)
	if len(ns) != 1 || !strings.Contains(ns[0], "6 folders and files") {
		t.Errorf("notices %q, want one naming the 6 folders and files made private", ns)
	}
}
