package fit

import (
	"context"
	"fmt"
	"path/filepath"
	"runtime"
	"testing"
)

// BenchmarkBatchRetainedMemory fits 500 invented 61-point I-V files on two
// workers and reports the heap still in use per file once the batch has
// returned (retained-B/file): what a batch keeps is its rows, not the
// curves, so this stays near the size of one row whatever the files hold.
func BenchmarkBatchRetainedMemory(b *testing.B) {
	dir := b.TempDir()
	const n = 500
	for k := 0; k < n; k++ {
		writeIV(b, filepath.Join(dir, fmt.Sprintf("die%03d.csv", k)), "# temperature: 300 K\nV,I (A)\n", testDiode, 300, 0, uint64(k))
	}
	files, err := BatchFiles(nil, dir)
	if err != nil {
		b.Fatal(err)
	}
	var ms runtime.MemStats
	for b.Loop() {
		runtime.GC()
		runtime.ReadMemStats(&ms)
		before := ms.HeapAlloc
		res, err := Batch(context.Background(), files, BatchOptions{Jobs: 2})
		if err != nil || res.Fitted != n {
			b.Fatal(err)
		}
		runtime.GC()
		runtime.ReadMemStats(&ms)
		b.ReportMetric(float64(int64(ms.HeapAlloc)-int64(before))/n, "retained-B/file")
		runtime.KeepAlive(res)
	}
}
