package fit

import (
	"os"
	"path/filepath"
	"testing"
	"time"
)

// A batch table the workbench exported into the folder is not fitted as a
// measurement when the folder is fitted again; a data file whose name only
// looks alike is.
func TestBatchFilesSkipExportedTables(t *testing.T) {
	dir := t.TempDir()
	at := time.Date(2026, 12, 5, 6, 38, 59, 0, time.UTC)
	name := BatchExportName(at)
	if name != "batch-20261205-063859.csv" || !IsBatchExport(filepath.Join(dir, name)) {
		t.Fatalf("export name %q", name)
	}
	for _, f := range []string{"die01.csv", name, "batch-2026-run.csv", "batch-20261305-063859.csv"} {
		if err := os.WriteFile(filepath.Join(dir, f), []byte("V,I\n"), 0o600); err != nil {
			t.Fatal(err)
		}
	}
	files, err := BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, f := range files {
		got = append(got, filepath.Base(f))
	}
	// Sorted; month 13 is no timestamp, so that file is data.
	want := []string{"batch-2026-run.csv", "batch-20261305-063859.csv", "die01.csv"}
	if len(got) != len(want) {
		t.Fatalf("files %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("files %v, want %v", got, want)
		}
	}
}
