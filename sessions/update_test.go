package sessions

import (
	"fmt"
	"os"
	"os/exec"
	"slices"
	"strconv"
	"sync"
	"testing"
)

// appendNote is the change of the tests: one note more on the newest
// revision, or a new session holding just it.
func appendNote(tag string) func(*Document, int) (*Document, error) {
	return func(doc *Document, _ int) (*Document, error) {
		if doc == nil {
			doc = exampleDocument()
			doc.Notes = nil
		}
		doc.Notes = append(doc.Notes, tag)
		return doc, nil
	}
}

// checkUpdates verifies that every tag was saved in exactly one
// revision of its own, that the revisions are 1..n without a gap, and
// reports how many tags the newest revision holds (all of them when no
// writer had to fall back to SaveNext).
func checkUpdates(t *testing.T, s *Store, tags []string) {
	t.Helper()
	hist, probs, err := s.History("same")
	if err != nil || len(probs) != 0 {
		t.Fatalf("history: %v %v", err, probs)
	}
	if len(hist) != len(tags) {
		t.Fatalf("%d revisions for %d saves", len(hist), len(tags))
	}
	var prev []string
	added := map[string]int{}
	for i, r := range hist {
		if r.Number != i+1 {
			t.Fatalf("revision numbers have a gap at %d", r.Number)
		}
		doc, _, err := s.Open("same", r.Number)
		if err != nil {
			t.Fatal(err)
		}
		for _, n := range doc.Notes {
			if !slices.Contains(prev, n) {
				added[n]++
			}
		}
		prev = doc.Notes
	}
	for _, tag := range tags {
		if added[tag] != 1 {
			t.Errorf("save %s appears in %d revisions as new, want 1", tag, added[tag])
		}
	}
	if len(prev) != len(tags) {
		t.Logf("the newest revision holds %d of %d notes (some writers fell back to the next free revision)", len(prev), len(tags))
	}
}

// TestUpdateConcurrentGoroutines: 20 writers save a change to one
// session at once, the first of them creating it; every change is stored,
// none is refused.
func TestUpdateConcurrentGoroutines(t *testing.T) {
	s := newTestStore(t)
	const writers = 20
	var tags []string
	var wg sync.WaitGroup
	for w := range writers {
		tag := fmt.Sprintf("writer %d", w)
		tags = append(tags, tag)
		wg.Go(func() {
			if _, err := s.Update("same", appendNote(tag)); err != nil {
				t.Errorf("%s: %v", tag, err)
			}
		})
	}
	wg.Wait()
	checkUpdates(t, s, tags)
}

const updateHelperEnv = "JUNCO_SESSIONS_TEST_UPDATER"

// TestHelperUpdater is not a test: run by TestUpdateConcurrentProcesses
// in a child process, it saves one change tagged with its ID.
func TestHelperUpdater(t *testing.T) {
	id := os.Getenv(updateHelperEnv)
	if id == "" {
		t.Skip("helper process only")
	}
	s, err := New(os.Getenv("JUNCO_SESSIONS_TEST_DIR"), Options{ToolVersion: "updater-" + id})
	if err == nil {
		_, err = s.Update("same", appendNote(id))
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(4)
	}
	os.Exit(0)
}

// TestUpdateConcurrentProcesses: 20 processes save a change to one
// session at once; every change is stored, no process fails.
func TestUpdateConcurrentProcesses(t *testing.T) {
	if os.Getenv(updateHelperEnv) != "" || os.Getenv(helperEnv) != "" {
		t.Skip("in a helper")
	}
	if testing.Short() {
		t.Skip("starts 20 processes")
	}
	s := newTestStore(t)
	const procs = 20
	var tags []string
	var wg sync.WaitGroup
	for p := range procs {
		id := "proc" + strconv.Itoa(p)
		tags = append(tags, id)
		wg.Go(func() {
			cmd := exec.Command(os.Args[0], "-test.run=^TestHelperUpdater$", "-test.count=1")
			cmd.Env = append(os.Environ(), updateHelperEnv+"="+id, "JUNCO_SESSIONS_TEST_DIR="+s.Root())
			if out, err := cmd.CombinedOutput(); err != nil {
				t.Errorf("%s: %v %s", id, err, out)
			}
		})
	}
	wg.Wait()
	checkUpdates(t, s, tags)
}
