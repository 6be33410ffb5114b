package measure

import (
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// The read buffer is the file's size plus one (at least 512 bytes) for a
// small regular file, also behind an io.LimitReader, and 64 KiB for a large
// file or a reader of unknown size; only the former is reported small (its
// size then bounds the rows). An import of a small file gives the same data
// as the same text from a reader of unknown size (no presized columns).
func TestReadBufferSize(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, n int) *os.File {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(strings.Repeat("1,2\n", n/4)), 0o644); err != nil {
			t.Fatal(err)
		}
		f, err := os.Open(p)
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { f.Close() })
		return f
	}
	small, mid, large := write("s.csv", 100), write("m.csv", 4000), write("l.csv", 100000)
	cases := []struct {
		name  string
		r     io.Reader
		want  int
		small bool
	}{
		{"small file", small, 512, true},
		{"4000-byte file behind a limit", io.LimitReader(mid, 1<<30), 4001, true},
		{"large file", large, 64 << 10, false},
		{"string reader", strings.NewReader("V,I\n1,2\n"), 64 << 10, false},
	}
	for _, c := range cases {
		if got, sm := readBufferSize(c.r); got != c.want || sm != c.small {
			t.Errorf("%s: %d bytes (small %v), want %d (%v)", c.name, got, sm, c.want, c.small)
		}
	}
	text := "# temperature: 300 K\nV (V),I (mA)\n" + strings.Repeat("0.5,1.5\n0.61,2e-3\n\n# note\n", 200)
	p := filepath.Join(dir, "d.csv")
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	got, err := Import(f, "d.csv", Options{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := Import(strings.NewReader(text), "d.csv", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(got.VoltageV) != 400 || !slices.Equal(got.VoltageV, want.VoltageV) || !slices.Equal(got.CurrentA, want.CurrentA) {
		t.Errorf("small file: %d rows %v, reader: %d rows", len(got.VoltageV), got.CurrentA[:2], len(want.VoltageV))
	}
}
