package measure

import (
	"bufio"
	"os"
	"path/filepath"
	"strconv"
	"testing"
)

// writeSweep writes an invented n-row I-V file (voltage, current,
// temperature, compliance flag) for the benchmark; it is generated, not
// committed.
func writeSweep(tb testing.TB, n int) string {
	tb.Helper()
	p := filepath.Join(tb.TempDir(), "sweep.csv")
	f, err := os.Create(p)
	if err != nil {
		tb.Fatal(err)
	}
	w := bufio.NewWriter(f)
	w.WriteString("# temperature: 300 K\nVoltage (V),Current (A),T (K),compliance\n")
	var buf []byte
	for k := 0; k < n; k++ {
		v := -1 + 2*float64(k)/float64(n)
		buf = strconv.AppendFloat(buf[:0], v, 'g', 7, 64)
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, 1e-12*float64(k%1000+1)*1.2345678, 'e', 6, 64)
		buf = append(buf, ",300.0,0\n"...)
		w.Write(buf)
	}
	if err := w.Flush(); err != nil {
		tb.Fatal(err)
	}
	f.Close()
	return p
}

// BenchmarkImport1M imports a 1,000,000-row file; target under 1 s.
func BenchmarkImport1M(b *testing.B) {
	p := writeSweep(b, 1_000_000)
	st, _ := os.Stat(p)
	b.SetBytes(st.Size())
	b.ReportAllocs()
	for b.Loop() {
		ds, err := ImportFile(p, Options{})
		if err != nil || ds.Len() != 1_000_000 {
			b.Fatal(err)
		}
	}
}
