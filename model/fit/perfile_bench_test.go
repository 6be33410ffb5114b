package fit

import (
	"context"
	"path/filepath"
	"testing"

	"junco/model/measure"
)

// BenchmarkFitFile imports one invented 61-point I-V file and fits the
// single-diode model to it: the per-file cost of a batch on one core
// (ImportContext then IVContext, as Batch does for each file).
func BenchmarkFitFile(b *testing.B) {
	p := filepath.Join(b.TempDir(), "die.csv")
	writeIV(b, p, "# temperature: 300 K\nV,I (A)\n", testDiode, 300, 0, 1)
	ctx := context.Background()
	b.ReportAllocs()
	for b.Loop() {
		ds, err := ImportContext(ctx, nil, p, measure.KindIV, nil)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := IVContext(ctx, ds, IVOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
