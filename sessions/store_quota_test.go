package sessions

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// A store with a cap (a served user's) refuses the save that would take
// its files past it, with a *StoreQuotaError naming the option, and
// leaves no partial file; files in the user's inbox (capped apart) do not
// count, and a store without a cap saves on. Before, a served user could
// save revisions without bound and fill the server's disk for everyone.
func TestStoreQuota(t *testing.T) {
	root := t.TempDir()
	size := int64(len(mustEncodeDoc(t, exampleDocument())))
	s, err := New(root, Options{ToolVersion: "test", Now: fixedClock(), MaxBytes: 3*size + size/2, MaxBytesFlag: "--store-max-mib"})
	if err != nil {
		t.Fatal(err)
	}
	// A large inbox file: not counted.
	if err := os.MkdirAll(filepath.Join(root, inboxDir), 0o700); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(root, inboxDir, "big.csv"), make([]byte, 10*size), 0o600); err != nil {
		t.Fatal(err)
	}
	saved := 0
	var qerr *StoreQuotaError
	for i := 0; i < 10; i++ {
		_, err := s.Save("d7", exampleDocument(), saved)
		if err != nil {
			if !errors.As(err, &qerr) {
				t.Fatalf("save %d: %v", i+1, err)
			}
			break
		}
		saved++
	}
	if saved != 3 || qerr == nil {
		t.Fatalf("%d revisions saved under a cap of 3.5 revisions (error %v)", saved, qerr)
	}
	if msg := qerr.Error(); !strings.Contains(msg, "--store-max-mib") || !strings.Contains(msg, "would add") {
		t.Errorf("message %q does not say what was refused and which option sets the cap", msg)
	}
	ents, _ := os.ReadDir(s.sessionDir("d7"))
	for _, e := range ents {
		if strings.HasPrefix(e.Name(), ".") {
			t.Errorf("a partial file was left: %s", e.Name())
		}
	}
	if h, _, err := s.History("d7"); err != nil || len(h) != 3 {
		t.Errorf("history after the refusal: %d revisions, %v", len(h), err)
	}
	free := newTestStore(t)
	for i := 0; i < 5; i++ {
		if _, err := free.Save("d7", exampleDocument(), i); err != nil {
			t.Fatalf("a store without a cap: save %d: %v", i+1, err)
		}
	}
}

func mustEncodeDoc(t *testing.T, d *Document) []byte {
	t.Helper()
	data, err := Encode(d)
	if err != nil {
		t.Fatal(err)
	}
	return data
}
