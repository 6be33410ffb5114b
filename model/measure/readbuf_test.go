package measure

import (
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The read buffer is the file's size plus one (at least 512 bytes) for a
// small regular file, also behind an io.LimitReader, and 64 KiB for a large
// file or a reader of unknown size.
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
		name string
		r    io.Reader
		want int
	}{
		{"small file", small, 512},
		{"4000-byte file behind a limit", io.LimitReader(mid, 1<<30), 4001},
		{"large file", large, 64 << 10},
		{"string reader", strings.NewReader("V,I\n1,2\n"), 64 << 10},
	}
	for _, c := range cases {
		if got := readBufferSize(c.r); got != c.want {
			t.Errorf("%s: %d bytes, want %d", c.name, got, c.want)
		}
	}
}
