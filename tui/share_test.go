package tui

import (
	"errors"
	"reflect"
	"testing"

	"junco/model"
)

// The share dialog: refused before the first save, then shares with the
// readers typed, shows the current readers when reopened, and stops
// sharing on an empty list; an error from the share service stays in place.
func TestShareDialog(t *testing.T) {
	st := newStore(t, "alice")
	storeSession(t, st, "d7", "test", model.DefaultSpec())
	shared := map[string][]string{}
	fail := false
	o := opts(st, "alice", 100, 30)
	o.Share = func(name string, readers []string) error {
		if fail {
			return errors.New("the share registry is not writable")
		}
		shared[name] = readers
		return nil
	}
	o.Readers = func(name string) []string { return shared[name] }

	// Not saved yet: the key says why.
	m := start(New(o))
	m = press(m, "ctrl+r")
	wantIn(t, m, "save the session first")

	o.Session = "d7"
	m = start(New(o))
	m = press(m, "ctrl+r")
	wantIn(t, m, "Share d7 for review", "Reviewers")
	m = typeText(m, "bob, carol")
	m = press(m, "enter")
	if !reflect.DeepEqual(shared["d7"], []string{"bob", "carol"}) {
		t.Fatalf("shared %v", shared)
	}
	wantIn(t, m, "shared d7 read-only with bob, carol")
	m = press(m, "ctrl+r")
	wantIn(t, m, "bob carol")
	fail = true
	m = press(m, "enter")
	wantIn(t, m, "not writable")
	fail = false
	m = press(m, "ctrl+u", "enter")
	if len(shared["d7"]) != 0 {
		t.Fatalf("not unshared: %v", shared)
	}
	wantIn(t, m, "d7 is no longer shared")

	// No share service (a local workbench): the key says why.
	o.Share = nil
	m = start(New(o))
	m = press(m, "ctrl+r")
	wantIn(t, m, "sharing needs the workbench served")
}
