package sessions

import (
	"errors"
	"fmt"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"sync"
	"testing"
)

// helperEnv makes the test binary act as a second writer process.
const helperEnv = "JUNCO_SESSIONS_TEST_WRITER"

// TestHelperWriter is not a test: run by TestConcurrentProcesses in a
// child process, it saves JUNCO_SESSIONS_TEST_COUNT revisions tagged with
// its writer ID into the store at JUNCO_SESSIONS_TEST_DIR and prints the
// revision numbers it got.
func TestHelperWriter(t *testing.T) {
	id := os.Getenv(helperEnv)
	if id == "" {
		t.Skip("helper process only")
	}
	n, _ := strconv.Atoi(os.Getenv("JUNCO_SESSIONS_TEST_COUNT"))
	s, err := New(os.Getenv("JUNCO_SESSIONS_TEST_DIR"), Options{ToolVersion: "writer-" + id})
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(3)
	}
	var got []string
	for i := range n {
		doc := exampleDocument()
		doc.Notes = []string{fmt.Sprintf("%s/%d", id, i)}
		r, err := s.SaveNext("shared", doc, 1)
		if err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(4)
		}
		got = append(got, strconv.Itoa(r.Number))
	}
	fmt.Println(strings.Join(got, " "))
	os.Exit(0)
}

// checkAllSaved verifies that the session has exactly the revisions
// 1..want and that every tag appears exactly once.
func checkAllSaved(t *testing.T, s *Store, want int, tags map[string]bool) {
	t.Helper()
	hist, probs, err := s.History("shared")
	if err != nil || len(probs) != 0 {
		t.Fatalf("history: %v %v", err, probs)
	}
	if len(hist) != want {
		t.Fatalf("%d revisions, want %d", len(hist), want)
	}
	seen := map[string]int{}
	for i, r := range hist {
		if r.Number != i+1 {
			t.Fatalf("revision numbers have a gap: %d at position %d", r.Number, i+1)
		}
		doc, _, err := s.Open("shared", r.Number)
		if err != nil {
			t.Fatalf("revision %d: %v", r.Number, err)
		}
		if r.Number > 1 {
			seen[doc.Notes[0]]++
		}
	}
	for tag := range tags {
		if seen[tag] != 1 {
			t.Errorf("save %q stored %d times", tag, seen[tag])
		}
	}
	if len(seen) != len(tags) {
		t.Errorf("%d distinct saves stored, %d made", len(seen), len(tags))
	}
}

func TestConcurrentGoroutines(t *testing.T) {
	s := newTestStore(t)
	if _, err := s.Save("shared", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	const workers, each = 8, 10
	tags := map[string]bool{}
	var mu sync.Mutex
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() {
			for i := range each {
				doc := exampleDocument()
				tag := fmt.Sprintf("g%d/%d", w, i)
				doc.Notes = []string{tag}
				if _, err := s.SaveNext("shared", doc, 1); err != nil {
					t.Error(err)
					return
				}
				mu.Lock()
				tags[tag] = true
				mu.Unlock()
			}
		})
	}
	wg.Wait()
	checkAllSaved(t, s, 1+workers*each, tags)

	// Editors racing from the same base: exactly one wins, the others get
	// a StaleError and nothing of theirs is stored.
	latest, _ := s.Latest("shared")
	var wins, stale int
	for w := range workers {
		wg.Go(func() {
			doc := exampleDocument()
			doc.Notes = []string{fmt.Sprintf("race %d", w)}
			_, err := s.Save("shared", doc, latest)
			mu.Lock()
			defer mu.Unlock()
			var se *StaleError
			switch {
			case err == nil:
				wins++
			case errors.As(err, &se):
				stale++
			default:
				t.Error(err)
			}
		})
	}
	wg.Wait()
	if wins != 1 || stale != workers-1 {
		t.Errorf("%d saves won and %d were stale; want 1 and %d", wins, stale, workers-1)
	}
	if n, _ := s.Latest("shared"); n != latest+1 {
		t.Errorf("latest %d after the race, want %d", n, latest+1)
	}
}

// TestConcurrentProcesses: two child processes and this one save the same
// session at the same time; every save gets its own revision.
func TestConcurrentProcesses(t *testing.T) {
	if os.Getenv(helperEnv) != "" {
		t.Skip("in a helper")
	}
	s := newTestStore(t)
	if _, err := s.Save("shared", exampleDocument(), 0); err != nil {
		t.Fatal(err)
	}
	const each = 15
	tags := map[string]bool{}
	var wg sync.WaitGroup
	outs := make([]string, 2)
	for p := range 2 {
		id := fmt.Sprintf("proc%d", p)
		for i := range each {
			tags[fmt.Sprintf("%s/%d", id, i)] = true
		}
		wg.Go(func() {
			cmd := exec.Command(os.Args[0], "-test.run=^TestHelperWriter$", "-test.count=1")
			cmd.Env = append(os.Environ(), helperEnv+"="+id, "JUNCO_SESSIONS_TEST_DIR="+s.Root(), "JUNCO_SESSIONS_TEST_COUNT="+strconv.Itoa(each))
			out, err := cmd.Output()
			if err != nil {
				t.Errorf("%s: %v", id, err)
			}
			outs[p] = string(out)
		})
	}
	for i := range each {
		tag := fmt.Sprintf("main/%d", i)
		tags[tag] = true
		doc := exampleDocument()
		doc.Notes = []string{tag}
		if _, err := s.SaveNext("shared", doc, 1); err != nil {
			t.Fatal(err)
		}
	}
	wg.Wait()
	for p, o := range outs {
		if len(strings.Fields(o)) < each {
			t.Errorf("process %d reported %q", p, o)
		}
	}
	checkAllSaved(t, s, 1+3*each, tags)
}
