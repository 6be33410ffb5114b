package tui

import (
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"github.com/charmbracelet/x/ansi"
)

// The import screen shows its input box before anything is typed, starts
// a new path in the folder of the last one (never after the last path's
// file name), completes names with tab and names data sets after their
// files.
func TestImportDialogBoxCompletionAndNames(t *testing.T) {
	dir := t.TempDir()
	src, err := os.ReadFile(writeIV(t, "x.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []string{"d7-25C.csv", "d7-75C.csv", "notes.txt"} {
		writeText(t, filepath.Join(dir, n), string(src))
	}
	m := bare(newTest(t, 100, 30))
	m = press(m, "i")
	if v := plain(m); !strings.Contains(v, "file [") || !strings.Contains(v, "]") {
		t.Fatalf("no input box before typing:\n%s", v)
	}
	m = typeText(m, dir+"/d")
	m = press(m, "tab")
	if got := importOf(m).ed.value(); got != dir+"/d7-" {
		t.Errorf("tab completed %q to %q, want the common part %q", dir+"/d", got, dir+"/d7-")
	}
	if v := plain(m); !strings.Contains(v, "d7-25C.csv") || !strings.Contains(v, "d7-75C.csv") {
		t.Errorf("the names that fit are not listed:\n%s", v)
	}
	m = typeText(m, "2")
	m = press(m, "tab")
	if got := importOf(m).ed.value(); got != dir+"/d7-25C.csv" {
		t.Fatalf("tab completed to %q, want %q", got, dir+"/d7-25C.csv")
	}
	m = press(m, "enter", "enter")
	if len(m.sess.meas) != 1 || m.sess.meas[0].ID != "d7-25C" {
		t.Fatalf("data set named %v, want d7-25C after its file", m.sess.meas)
	}
	// The next import starts in the same folder; a second file of the
	// same stem gets a number.
	m = press(m, "i")
	if got := importOf(m).ed.value(); got != dir+"/" {
		t.Errorf("the next path starts as %q, want the folder %q", got, dir+"/")
	}
	m = typeText(m, "d7-25C.csv")
	m = press(m, "enter", "enter")
	if len(m.sess.meas) != 2 || m.sess.meas[1].ID != "d7-25C-2" {
		t.Fatalf("second data set named %v, want d7-25C-2", m.sess.meas)
	}
}

// Completion reads only through the files the front end passes in (the
// served workbench: the user's inbox).
func TestImportCompletionUsesGivenFiles(t *testing.T) {
	files := fstest.MapFS{
		"run-a.csv": &fstest.MapFile{Data: []byte("V,I\n")},
		"run-b.csv": &fstest.MapFile{Data: []byte("V,I\n")},
		"zeta.csv":  &fstest.MapFile{Data: []byte("V,I\n")},
	}
	out, choices, _, err := completePath(mapFiles{files}, "z")
	if err != nil || out != "zeta.csv" || choices != nil {
		t.Errorf("z: %q %v %v, want zeta.csv", out, choices, err)
	}
	out, choices, _, err = completePath(mapFiles{files}, "run")
	if err != nil || out != "run-" || len(choices) != 2 {
		t.Errorf("run: %q %v %v, want run- and two choices", out, choices, err)
	}
	o := Options{Renderer: plainRenderer(), Width: 100, Height: 30, Files: mapFiles{files}}
	m := bare(start(New(o)))
	m = press(m, "i")
	m = typeText(m, "ze")
	m = press(m, "tab")
	if got := importOf(m).ed.value(); got != "zeta.csv" {
		t.Errorf("completion in the given files: %q, want zeta.csv\n%s", got, ansi.Strip(m.View()))
	}
}

// mapFiles serves an in-memory file system as model.Files.
type mapFiles struct{ fs fstest.MapFS }

func (f mapFiles) Open(name string) (fs.File, error) { return f.fs.Open(name) }

func (f mapFiles) ReadDir(name string) ([]fs.DirEntry, error) { return f.fs.ReadDir(name) }
