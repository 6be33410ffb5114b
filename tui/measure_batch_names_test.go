package tui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// File names reach the batch screen from a directory (or a served inbox)
// that anyone with write access there may have filled: control
// characters in them are shown escaped (sessions.Printable), never sent
// to the terminal, in the good rows and in the failed ones (whose error
// names the file too). Before, a file named "x\x1b[2Jy.csv" cleared the
// user's screen.
func TestBatchScreenEscapesFileNames(t *testing.T) {
	src := writeBatchDir(t, 1)
	dir := t.TempDir()
	good, err := os.ReadFile(filepath.Join(src, "die00.csv"))
	if err != nil {
		t.Fatal(err)
	}
	writeText(t, filepath.Join(dir, "d\x1b[2Jy.csv"), string(good))
	writeText(t, filepath.Join(dir, "b\x1b]0;owned\a.csv"), "no numbers\n")
	m := newTest(t, 160, 40)
	m = press(m, "B")
	m = typeText(m, dir)
	m = press(m, "enter")
	if batchOf(m).view == nil || len(batchOf(m).view.Rows) != 2 {
		t.Fatalf("batch not run: %q\n%s", batchOf(m).err, plain(m))
	}
	v := m.View()
	for _, raw := range []string{"\x1b[2J", "\x1b]0;", "\a"} {
		if strings.Contains(v, raw) {
			t.Errorf("the screen sends %q from a file name to the terminal", raw)
		}
	}
	if !strings.Contains(v, `d\x1b[2Jy.csv`) {
		t.Errorf("the escaped name is not shown:\n%s", plain(m))
	}
}

// The same in the wafer map: the die under the cursor, its fit and the
// rows beside the map show file names and errors escaped.
func TestBatchMapEscapesFileNames(t *testing.T) {
	src := writeBatchDir(t, 1)
	dir := t.TempDir()
	good, err := os.ReadFile(filepath.Join(src, "die00.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"d\x1b[2J_x1_y1.csv", "e\x1b]0;owned\a_x2_y1.csv"} {
		writeText(t, filepath.Join(dir, n), string(good))
	}
	writeText(t, filepath.Join(dir, "b\x1b[5m_x1_y2.csv"), "no numbers\n")
	m := newTest(t, 160, 50)
	m = press(m, "B")
	m = typeText(m, dir)
	m = press(m, "enter")
	if batchOf(m).view == nil || !batchOf(m).wm.hasDies {
		t.Fatalf("no wafer map: %q\n%s", batchOf(m).err, plain(m))
	}
	check := func(what string, v string) {
		t.Helper()
		for _, raw := range []string{"\x1b[2J", "\x1b]0;", "\a", "\x1b[5m"} {
			if strings.Contains(v, raw) {
				t.Errorf("%s: the screen sends %q from a file name to the terminal", what, raw)
			}
		}
	}
	check("map", m.View())
	for _, k := range []string{"right", "down", "left"} {
		m = press(m, k)
		check("map after "+k, m.View())
	}
	m = press(m, "enter")
	check("die view", m.View())
}
