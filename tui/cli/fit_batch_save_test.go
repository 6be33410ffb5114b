package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"

	"junco/model"
	"junco/sessions"
	"junco/tui"
)

// fit batch --save-to keeps the table as the next revision of a session
// (created when missing); sessions show lists it, sessions diff
// summarises a second table, the export has it; a bad name fails before
// any fit.
func TestFitBatchSaveTo(t *testing.T) {
	t.Setenv("USER", "ana")
	store := t.TempDir()
	code, _, errs := fitCall("batch", "testdata/fit/wafermap", "--limit", "n:1.3:1.42", "--save-to", "lot", "--data", store)
	if code != exitOK || !strings.Contains(errs, "created it with the default junction") || !strings.Contains(errs, "saved as revision 1 of session lot (batch table batch-1, 13 files)") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	code, out, errs := sess(t, store, "show", "lot")
	for _, w := range []string{"\nBatch tables\n", "batch-1: testdata/fit/wafermap, 13 files (12 fitted, 1 failed), single diode", "ideality factor n", "yield 11 of 13 dies within every limit (n 1.300 to 1.420)", "window: every forward point"} {
		if code != exitOK || !strings.Contains(out, w) {
			t.Errorf("show lacks %q (exit %d, %s):\n%s", w, code, errs, out)
		}
	}
	code, _, errs = fitCall("batch", "testdata/fit/wafermap", "--save-to", "lot", "--data", store)
	if code != exitOK || !strings.Contains(errs, "saved as revision 2 of session lot (batch table batch-2, 13 files)") {
		t.Fatalf("second batch: exit %d: %s", code, errs)
	}
	code, out, _ = sess(t, store, "diff", "lot", "1", "2")
	if code != exitOK || !strings.Contains(out, "batch-2") || !strings.Contains(out, "added") || strings.Count(out, "\n") > 6 {
		t.Errorf("diff:\n%s", out)
	}
	exp := t.TempDir()
	if code, _, errs := sess(t, store, "export", "lot", "--format", "md", "--out", exp); code != exitOK {
		t.Fatalf("export: %s", errs)
	}
	md, _ := os.ReadFile(filepath.Join(exp, "lot-r2.md"))
	if !strings.Contains(string(md), "### batch-1") || !strings.Contains(string(md), "### batch-2") || !strings.Contains(string(md), "| overall | | | 11 of 13 |") {
		t.Errorf("report:\n%s", md)
	}
	if _, err := os.Stat(filepath.Join(exp, "lot-r2-batch-1-map-n.svg")); err != nil {
		t.Errorf("wafer map figure: %v", err)
	}
	code, _, errs = fitCall("batch", "testdata/fit/wafermap", "--save-to", "../x", "--data", store)
	if code != exitUsage || !strings.Contains(errs, "--save-to") || strings.Contains(errs, "files:") {
		t.Errorf("bad name: exit %d: %s", code, errs)
	}
}

// The command line and the workbench keep the same record of the same
// folder: fit batch --save-to, and the workbench's batch screen with
// ctrl+k and ctrl+s, give equal batch tables (but for the time).
func TestFitBatchSaveSameAsWorkbench(t *testing.T) {
	t.Setenv("USER", "ana")
	store := t.TempDir()
	folder := "testdata/fit/wafermap"
	if code, _, errs := fitCall("batch", folder, "--save-to", "cli", "--data", store); code != exitOK {
		t.Fatalf("fit batch: %s", errs)
	}
	st, err := sessions.New(store, sessions.Options{ToolVersion: Version, User: "ana"})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.Save("wb", sessions.NewDocument("wb", "ana", model.DefaultSpec(), time.Now()), 0); err != nil {
		t.Fatal(err)
	}
	m, err := workbenchModel(workbenchOptions{data: store, target: "wb"}, tui.Options{Width: 120, Height: 40})
	if err != nil {
		t.Fatal(err)
	}
	d := &wbDriver{t: t, m: m, msgs: make(chan tea.Msg, 256)}
	d.run(m.Init())
	d.keys(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune("B")})
	for _, r := range folder {
		d.keys(tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune{r}})
	}
	d.keys(tea.KeyMsg{Type: tea.KeyEnter})
	d.until("12 fitted, 1 failed")
	d.keys(tea.KeyMsg{Type: tea.KeyCtrlK})
	d.until("kept batch-1 (13 files)")
	d.keys(tea.KeyMsg{Type: tea.KeyEsc}, tea.KeyMsg{Type: tea.KeyCtrlS})
	d.until("Save wb as revision 2")
	d.keys(tea.KeyMsg{Type: tea.KeyEnter})
	d.until("saved as session wb, revision 2")

	a, _, err := st.Open("cli", 0)
	if err != nil {
		t.Fatal(err)
	}
	b, _, err := st.Open("wb", 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Batches) != 1 || len(b.Batches) != 1 {
		t.Fatalf("batches: %d and %d", len(a.Batches), len(b.Batches))
	}
	ka, kb := a.Batches[0], b.Batches[0]
	ka.Performed, kb.Performed = time.Time{}, time.Time{}
	ja, jb := batchRecordJSON(t, ka), batchRecordJSON(t, kb)
	if ja != jb {
		t.Errorf("command line and workbench records differ:\n%s\n---\n%s", ja, jb)
	}
	if len(ka.Rows) != 13 || ka.Rows[0].Die == nil {
		t.Errorf("record: %d rows, die %+v", len(ka.Rows), ka.Rows[0].Die)
	}
}

func batchRecordJSON(t *testing.T, b sessions.Batch) string {
	t.Helper()
	b.Performed = time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC)
	doc := sessions.NewDocument("x", "x", model.DefaultSpec(), b.Performed)
	doc.Batches = []sessions.Batch{b}
	data, err := sessions.Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	s := string(data)
	return s[strings.Index(s, `"batches"`):]
}

// wbDriver runs a workbench as a program would, each command in its own
// goroutine (a draft timer may sleep), feeding messages back until the
// screen shows what a step waits for.
type wbDriver struct {
	t    *testing.T
	m    tui.Model
	msgs chan tea.Msg
}

func (d *wbDriver) run(cmd tea.Cmd) {
	if cmd != nil {
		go func() { d.msgs <- cmd() }()
	}
}

func (d *wbDriver) update(msg tea.Msg) {
	switch msg := msg.(type) {
	case nil, tea.QuitMsg:
	case tea.BatchMsg:
		for _, c := range msg {
			d.run(c)
		}
	default:
		tm, cmd := d.m.Update(msg)
		d.m = tm.(tui.Model)
		d.run(cmd)
	}
}

func (d *wbDriver) keys(ks ...tea.KeyMsg) {
	for _, k := range ks {
		d.update(k)
	}
}

// until feeds messages until the screen shows want (30 s at most: a
// bound, not a timing).
func (d *wbDriver) until(want string) {
	d.t.Helper()
	deadline := time.After(30 * time.Second)
	for {
		if s := strings.Join(strings.Fields(ansi.Strip(d.m.View())), " "); strings.Contains(s, want) {
			return
		}
		select {
		case msg := <-d.msgs:
			d.update(msg)
		case <-deadline:
			d.t.Fatalf("the workbench never showed %q:\n%s", want, ansi.Strip(d.m.View()))
		}
	}
}
