package cli

import (
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/charmbracelet/x/ansi"

	"junco/model"
	"junco/sessions"
	"junco/tui"
)

func TestParseWorkbenchArgs(t *testing.T) {
	for _, c := range []struct {
		args []string
		want workbenchOptions
		err  string
	}{
		{nil, workbenchOptions{}, ""},
		{[]string{"--ascii", "--data", "d"}, workbenchOptions{ascii: true, asciiSet: true, data: "d"}, ""},
		{[]string{"d7", "--rev=2", "--data=d"}, workbenchOptions{target: "d7", rev: 2, data: "d"}, ""},
		{[]string{"runs/d7.json"}, workbenchOptions{target: "runs/d7.json"}, ""},
		{[]string{"a", "b"}, workbenchOptions{}, `unexpected argument "b"`},
		{[]string{"--rev", "0", "d7"}, workbenchOptions{}, `--rev "0": allowed a revision number, 1 or more`},
		{[]string{"--rev", "2"}, workbenchOptions{}, "--rev N needs a session NAME"},
		{[]string{"--data"}, workbenchOptions{}, "--data needs a value"},
		{[]string{"--colour"}, workbenchOptions{}, `unknown option "--colour"`},
	} {
		got, _, err := parseWorkbenchArgs(c.args)
		if c.err != "" {
			if err == nil || !strings.Contains(err.Error(), c.err) {
				t.Errorf("%q: error %v, want %q", c.args, err, c.err)
			}
			continue
		}
		if err != nil || got != c.want {
			t.Errorf("%q: %+v, %v; want %+v", c.args, got, err, c.want)
		}
	}
}

func TestWorkbenchOpensStoredSessionsAndFiles(t *testing.T) {
	t.Setenv("USER", "alice")
	dir := t.TempDir()
	st, err := sessions.New(dir, sessions.Options{User: "alice", ToolVersion: Version})
	if err != nil {
		t.Fatal(err)
	}
	spec := model.DemoJunction().Spec
	spec.Temperature = 340
	doc := sessions.NewDocument("hot run", "alice", spec, time.Now())
	if _, err := st.Save("hot", doc, 0); err != nil {
		t.Fatal(err)
	}
	doc.Spec.Temperature = 360
	if _, err := st.Save("hot", doc, 1); err != nil {
		t.Fatal(err)
	}
	view := func(m tui.Model) string { return ansi.Strip(m.View()) }
	base := tui.Options{Width: 120, Height: 40}

	m, err := workbenchModel(workbenchOptions{data: dir, target: "hot"}, base)
	if err != nil || m.Spec().Temperature != 360 || m.Dirty() || !strings.Contains(view(m), "hot rev 2") {
		t.Fatalf("open hot: %v, T %g\n%s", err, m.Spec().Temperature, view(m))
	}
	m, err = workbenchModel(workbenchOptions{data: dir, target: "hot", rev: 1}, base)
	if err != nil || m.Spec().Temperature != 340 || !strings.Contains(view(m), "hot rev 1") {
		t.Fatalf("open hot --rev 1: %v, T %g", err, m.Spec().Temperature)
	}
	if _, err := workbenchModel(workbenchOptions{data: dir, target: "cold"}, base); err == nil || !strings.Contains(err.Error(), `no session named "cold"`) {
		t.Errorf("missing session: %v", err)
	}
	if _, err := workbenchModel(workbenchOptions{data: dir, target: "hot", rev: 9}, base); err == nil || !strings.Contains(err.Error(), "has no revision 9") {
		t.Errorf("missing revision: %v", err)
	}

	// A file opens as a junction new to the store: nothing is stored
	// until a save, which asks for a name.
	data, err := sessions.Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(t.TempDir(), "lot417.json")
	writeTestFile(t, file, data)
	m, err = workbenchModel(workbenchOptions{data: dir, target: file}, base)
	if err != nil || m.Spec().Temperature != 360 || m.Dirty() {
		t.Fatalf("open file: %v", err)
	}
	if list, _, _ := st.List(); len(list) != 1 {
		t.Fatalf("opening a file stored it: %v", list)
	}
	bad := filepath.Join(t.TempDir(), "bad.json")
	writeTestFile(t, bad, []byte(`{"schema": 99}`))
	if _, err := workbenchModel(workbenchOptions{data: dir, target: bad}, base); err == nil || !strings.Contains(err.Error(), "bad.json: schema 99 is newer") {
		t.Errorf("bad file: %v", err)
	}
	// No arguments: the demo, with the store for saving.
	m, err = workbenchModel(workbenchOptions{data: dir}, base)
	if err != nil || !strings.Contains(view(m), "invented demo data") {
		t.Fatalf("demo: %v", err)
	}
}
