package fit

import (
	"context"
	"io/fs"
	"path/filepath"
	"strings"
	"testing"

	"junco/model"
)

// cancelOnOpen is the local file system that cancels a context when the
// file named at is opened: an interruption that arrives while that file
// is being read.
type cancelOnOpen struct {
	model.LocalFiles
	at     string
	cancel context.CancelFunc
}

func (c cancelOnOpen) Open(name string) (fs.File, error) {
	if filepath.Base(name) == c.at {
		c.cancel()
	}
	return c.LocalFiles.Open(name)
}

// A file cut short by an interruption is "not run", like the files after
// it: nothing is wrong with it. Before, Ctrl-C during `fit batch` listed
// the files in progress as failed ("context canceled"), next to the
// files that really are not measurements.
func TestBatchInterruptedFileIsNotRun(t *testing.T) {
	dir := t.TempDir()
	var files []string
	for _, n := range []string{"a.csv", "b.csv", "c.csv"} {
		p := filepath.Join(dir, n)
		writeIV(t, p, "# temperature: 300 K\nV,I (A)\n", testDiode, 300, 0, 1)
		files = append(files, p)
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	res, err := Batch(ctx, files, BatchOptions{Jobs: 1, Files: cancelOnOpen{at: "b.csv", cancel: cancel}})
	if err == nil || !res.Interrupted {
		t.Fatalf("not interrupted: %v", err)
	}
	if res.Fitted != 1 || res.Failed != 0 || res.NotRun != 2 {
		t.Errorf("%d fitted, %d failed, %d not run; want 1, 0, 2", res.Fitted, res.Failed, res.NotRun)
	}
	if r := res.Rows[1]; r.Status != StatusNotRun || r.Err == nil || !strings.Contains(r.Err.Error(), "interrupted") {
		t.Errorf("the file in progress: %s %v", r.Status, r.Err)
	}
}
