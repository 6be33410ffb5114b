package sessions

import (
	"bytes"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

var errInjected = errors.New("injected failure")

// faultFS passes every operation to the real file system but fails the
// failAt-th changing operation (counted from 1). In crash mode every later
// changing operation fails too, as if the process had died there; in
// transient mode the later ones succeed (a full disk that recovers).
// A failed write writes half its bytes first, like a torn write.
type faultFS struct {
	osFS
	mu      sync.Mutex
	n       int
	failAt  int
	crash   bool
	crashed bool
	ops     []string
}

func (f *faultFS) step(op string) error {
	f.mu.Lock()
	defer f.mu.Unlock()
	f.n++
	f.ops = append(f.ops, op)
	if f.crashed || f.n == f.failAt {
		if f.crash {
			f.crashed = true
		}
		return fmt.Errorf("%s: %w", op, errInjected)
	}
	return nil
}

func (f *faultFS) MkdirAll(dir string) error {
	if err := f.step("mkdir"); err != nil {
		return err
	}
	return f.osFS.MkdirAll(dir)
}

func (f *faultFS) CreateTemp(dir, pattern string) (tempFile, error) {
	if err := f.step("create"); err != nil {
		return nil, err
	}
	t, err := f.osFS.CreateTemp(dir, pattern)
	if err != nil {
		return nil, err
	}
	return &faultFile{tempFile: t, fs: f}, nil
}

func (f *faultFS) Link(o, n string) error {
	if err := f.step("link"); err != nil {
		return err
	}
	return f.osFS.Link(o, n)
}

func (f *faultFS) Rename(o, n string) error {
	if err := f.step("rename"); err != nil {
		return err
	}
	return f.osFS.Rename(o, n)
}

func (f *faultFS) Remove(name string) error {
	if err := f.step("remove"); err != nil {
		return err
	}
	return f.osFS.Remove(name)
}

func (f *faultFS) SyncDir(dir string) error {
	if err := f.step("syncdir"); err != nil {
		return err
	}
	return f.osFS.SyncDir(dir)
}

type faultFile struct {
	tempFile
	fs *faultFS
}

func (f *faultFile) Write(p []byte) (int, error) {
	if err := f.fs.step("write"); err != nil {
		n, _ := f.tempFile.Write(p[:len(p)/2])
		return n, err
	}
	return f.tempFile.Write(p)
}

func (f *faultFile) Chmod(m fs.FileMode) error {
	if err := f.fs.step("chmod"); err != nil {
		return err
	}
	return f.tempFile.Chmod(m)
}

func (f *faultFile) Sync() error {
	if err := f.fs.step("sync"); err != nil {
		return err
	}
	return f.tempFile.Sync()
}

func (f *faultFile) Close() error {
	if err := f.fs.step("close"); err != nil {
		f.tempFile.Close()
		return err
	}
	return f.tempFile.Close()
}

// visibleRevisions lists the revision files of a session and checks that
// each one opens with a fresh store.
func checkSession(t *testing.T, root, name string) map[int]*Document {
	t.Helper()
	s, err := New(root, Options{ToolVersion: "check"})
	if err != nil {
		t.Fatal(err)
	}
	hist, probs, err := s.History(name)
	if err != nil && !isNotFound(err) {
		t.Fatalf("history: %v", err)
	}
	if len(probs) != 0 {
		t.Fatalf("problems after an interrupted save: %v", probs)
	}
	out := map[int]*Document{}
	for _, r := range hist {
		doc, _, err := s.Open(name, r.Number)
		if err != nil {
			t.Fatalf("listed revision %d does not open: %v", r.Number, err)
		}
		out[r.Number] = doc
	}
	return out
}

// TestCrashConsistency fails every step of a save in turn, once as a crash
// and once as a transient error, and checks that the previous revision is
// intact and readable, no half-written revision is ever listed, and a
// later save works.
func TestCrashConsistency(t *testing.T) {
	type scenario struct {
		name string
		// prepare makes the state before the interrupted operation.
		prepare func(s *Store) error
		// op is the interrupted operation.
		op func(s *Store) error
		// check verifies the state after it (done tells whether op
		// reported success).
		check func(t *testing.T, root string, done bool)
		// ops is the sequence of changing operations of an uninterrupted run.
		ops string
	}
	docA := exampleDocument()
	docB := exampleDocument()
	docB.Notes = []string{"revision two"}
	revA := mustEncodeStamped(t, docA)
	scenarios := []scenario{
		{
			name:    "next revision",
			prepare: func(s *Store) error { _, err := s.Save("d7", docA, 0); return err },
			op:      func(s *Store) error { _, err := s.Save("d7", docB, 1); return err },
			ops:     "create write chmod sync close link remove syncdir",
			check: func(t *testing.T, root string, done bool) {
				revs := checkSession(t, root, "d7")
				if revs[1] == nil || !bytes.Equal(mustEncode(t, revs[1]), revA) {
					t.Fatalf("revision 1 damaged or lost")
				}
				if done && revs[2] == nil {
					t.Fatalf("save reported success but revision 2 is missing")
				}
				if r2 := revs[2]; r2 != nil && (len(r2.Notes) != 1 || r2.Notes[0] != "revision two") {
					t.Fatalf("revision 2 has the wrong content: %q", r2.Notes)
				}
				if len(revs) > 2 {
					t.Fatalf("%d revisions after one save", len(revs))
				}
			},
		},
		{
			name:    "first revision",
			prepare: func(s *Store) error { return nil },
			op:      func(s *Store) error { _, err := s.Save("d7", docA, 0); return err },
			ops:     "mkdir syncdir create write chmod sync close link remove syncdir",
			check: func(t *testing.T, root string, done bool) {
				revs := checkSession(t, root, "d7")
				if done && revs[1] == nil {
					t.Fatalf("save reported success but revision 1 is missing")
				}
				if len(revs) > 1 {
					t.Fatalf("%d revisions", len(revs))
				}
			},
		},
		{
			name: "draft replacement",
			prepare: func(s *Store) error {
				return s.SaveDraft("d7", DraftKey{Editor: "ed"}, 0, docA)
			},
			op:  func(s *Store) error { return s.SaveDraft("d7", DraftKey{Editor: "ed"}, 0, docB) },
			ops: "mkdir create write chmod sync close rename syncdir",
			check: func(t *testing.T, root string, done bool) {
				s, _ := New(root, Options{})
				ds, probs, err := s.Drafts()
				if err != nil || len(probs) != 0 || len(ds) != 1 {
					t.Fatalf("drafts after interruption: %v %v %v", ds, probs, err)
				}
				isB := len(ds[0].Document.Notes) == 1 && ds[0].Document.Notes[0] == "revision two"
				if done && !isB {
					t.Fatalf("draft save reported success but the old draft is there")
				}
			},
		},
		{
			name: "trash",
			prepare: func(s *Store) error {
				_, err := s.Save("d7", docA, 0)
				return err
			},
			op:  func(s *Store) error { _, err := s.Trash("d7"); return err },
			ops: "mkdir rename syncdir syncdir",
			check: func(t *testing.T, root string, done bool) {
				s, _ := New(root, Options{})
				live := checkSession(t, root, "d7")
				tr, _, _ := s.Trashed()
				if len(live)+len(tr) != 1 {
					t.Fatalf("session is neither live nor in the trash (or both): %d live revisions, %d trash entries", len(live), len(tr))
				}
				if done && len(tr) != 1 {
					t.Fatalf("trash reported success but the session is live")
				}
			},
		},
	}
	for _, sc := range scenarios {
		for _, crash := range []bool{true, false} {
			mode := map[bool]string{true: "crash", false: "transient"}[crash]
			t.Run(sc.name+"/"+mode, func(t *testing.T) {
				steps := 0
				for failAt := 1; ; failAt++ {
					root := t.TempDir()
					base, _ := New(root, Options{ToolVersion: "test", Now: fixedClock()})
					if err := sc.prepare(base); err != nil {
						t.Fatal(err)
					}
					ffs := &faultFS{failAt: failAt, crash: crash}
					s, _ := newStore(root, Options{ToolVersion: "test", Now: fixedClock()}, ffs)
					err := sc.op(s)
					if err != nil && !errors.Is(err, errInjected) {
						t.Fatalf("step %d: unexpected error %v", failAt, err)
					}
					sc.check(t, root, err == nil)
					// Whatever happened, the store works afterwards and
					// leftover temporary files are never listed.
					after, _ := New(root, Options{ToolVersion: "test", Now: fixedClock()})
					if _, err := after.SaveNext("d7", docB, 0); err != nil && !isNotFound(err) {
						t.Fatalf("step %d: save after the interruption: %v", failAt, err)
					}
					checkNoStrayNames(t, root)
					if ffs.n < failAt {
						// The operation completed without reaching the fault.
						steps = ffs.n
						if got := strings.Join(ffs.ops, " "); got != sc.ops {
							t.Errorf("operations %q, want %q", got, sc.ops)
						}
						if err != nil {
							t.Fatalf("no fault injected but error %v", err)
						}
						break
					}
				}
				if steps < 3 {
					t.Fatalf("only %d steps: the fault injection is not reached", steps)
				}
			})
		}
	}
}

// mustEncodeStamped is the encoding of doc as the test store saves it as
// revision 1 (first clock tick, tool "test").
func mustEncodeStamped(t *testing.T, doc *Document) []byte {
	c := *doc
	c.Schema = SchemaVersion
	c.Meta.Modified = fixedClock()()
	c.Meta.ToolVersion = "test"
	c.Meta.SavedBy = ""
	c.Meta.BasedOn = 0
	return mustEncode(t, &c)
}

// checkNoStrayNames: every visible file in session directories is a
// complete revision (temporary files are hidden dot files).
func checkNoStrayNames(t *testing.T, root string) {
	t.Helper()
	filepath.WalkDir(filepath.Join(root, "sessions"), func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return nil
		}
		n := d.Name()
		if strings.HasPrefix(n, ".tmp-") {
			return nil
		}
		if _, ok := parseRevFile(n); !ok {
			t.Errorf("stray file %s", p)
			return nil
		}
		b, _ := os.ReadFile(p)
		if _, err := Decode(b); err != nil {
			t.Errorf("visible revision %s is incomplete: %v", p, err)
		}
		return nil
	})
}
