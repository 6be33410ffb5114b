package fit

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model"
	"junco/model/measure"
)

// limitedFiles is the local file system with a row cap, as a served
// user's inbox has (sessions.Inbox.RowLimit).
type limitedFiles struct {
	model.LocalFiles
	rows int
}

func (l limitedFiles) RowLimit() int { return l.rows }

func (l limitedFiles) Open(name string) (fs.File, error) { return os.Open(name) }

// A file access with a row cap (a served inbox) refuses an import above
// it with the cap named; the same file imports through the local file
// system, whose cap is measure.MaxRows.
func TestImportHonoursTheRowCapOfTheFiles(t *testing.T) {
	var b strings.Builder
	b.WriteString("V,I\n")
	for i := range 500 {
		fmt.Fprintf(&b, "%g,%g\n", 0.001*float64(i), 1e-12*float64(i+1))
	}
	p := filepath.Join(t.TempDir(), "rows.csv")
	if err := os.WriteFile(p, []byte(b.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, err := Import(nil, p, measure.KindIV, nil); err != nil {
		t.Fatalf("local import: %v", err)
	}
	_, err := Import(limitedFiles{rows: 100}, p, measure.KindIV, nil)
	if !errors.Is(err, measure.ErrTooManyRows) || !strings.Contains(err.Error(), "at most 100 data rows") {
		t.Errorf("capped import: %v", err)
	}
}
