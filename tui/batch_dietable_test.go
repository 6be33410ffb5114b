package tui

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/charmbracelet/bubbles/key"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/ansi"
	"github.com/muesli/termenv"

	"junco/model/fit"
	"junco/model/measure"
)

// batchRun opens the batch screen at w x h with the renderer r and fits
// the invented wafer.
func batchRun(t *testing.T, r *lipgloss.Renderer, w, h int) Model {
	t.Helper()
	m := start(New(Options{Renderer: r, Width: w, Height: h}))
	m = press(m, "B")
	m = typeText(m, waferDir)
	m = press(m, "enter")
	if v := batchOf(m).view; v == nil || !batchOf(m).wm.hasDies {
		t.Fatalf("no wafer map after the run: %q\n%s", batchOf(m).err, plain(m))
	}
	return m
}

// tableLine is the line of the die table (left of the map's bar) that
// names file, "" when none does.
func tableLine(screen, file string) string {
	for _, l := range strings.Split(screen, "\n") {
		left, _, _ := strings.Cut(l, "│")
		if strings.Contains(left, file) {
			return left
		}
	}
	return ""
}

// The die table marks every row the fit layer calls an outlier
// (fit.OutlierParams: beyond 1.5 IQR, per parameter) with the
// parameters it is an outlier in, as the table without dies does, and
// paints it as a caution; other rows carry no mark. Before, the die
// x1 y1 (Is 992 pA against a median of 1.1 pA) had neither.
func TestBatchDieTableMarksOutliers(t *testing.T) {
	for _, size := range goldenSizes {
		m := batchRun(t, plainRenderer(), size[0], size[1])
		v := batchOf(m).view
		outliers := fit.OutlierParams(v.Stats)
		if len(outliers) == 0 {
			t.Fatal("the invented wafer has no outlier: the check below would prove nothing")
		}
		screen := plain(m)
		// The outlier column starts under its heading.
		at := strings.Index(tableLine(screen, "outlier in"), "outlier in")
		if at < 0 {
			t.Fatalf("%dx%d: no outlier column:\n%s", size[0], size[1], screen)
		}
		at = len([]rune(tableLine(screen, "outlier in")[:at]))
		for k, r := range v.Rows {
			name := filepath.Base(r.File)
			line := tableLine(screen, name)
			if line == "" {
				continue // scrolled out at 80x24
			}
			var want []string
			for _, j := range outliers[k] {
				want = append(want, fit.BatchParams()[j].Symbol)
			}
			tail := ""
			if r := []rune(line); len(r) > at {
				tail = strings.TrimSpace(string(r[at:]))
			}
			if got := strings.Join(want, ", "); got != tail && r.Err == nil {
				t.Errorf("%dx%d: row %s ends %q, want the outlier parameters %q", size[0], size[1], name, tail, got)
			}
		}
		if tableLine(screen, "die_x01_y01.csv") == "" {
			t.Errorf("%dx%d: the outlier row of die x1 y1 is not in view:\n%s", size[0], size[1], screen)
		}
	}
	r := lipgloss.NewRenderer(io.Discard)
	r.SetColorProfile(termenv.ANSI256)
	r.SetHasDarkBackground(true)
	m := batchRun(t, r, 120, 40)
	var line string
	for _, l := range strings.Split(m.View(), "\n") {
		if strings.Contains(ansi.Strip(l), "die_x01_y01.csv") {
			line = l
		}
	}
	caution := m.e.st.caution.Paint("x")
	code, _, _ := strings.Cut(caution, "x")
	if code == "" || !strings.Contains(line, code) {
		t.Errorf("the outlier row is not painted as a caution (%q): %q", code, line)
	}
}

// File names and errors are not cut in the die table: the table takes
// the width of its longest name where the map leaves the room (at 80x24
// as well for this wafer), and a failed file's error is wrapped below
// its row, every word of it on the screen.
func TestBatchDieTableKeepsNamesAndErrors(t *testing.T) {
	for _, size := range goldenSizes {
		m := batchRun(t, plainRenderer(), size[0], size[1])
		v := batchOf(m).view
		if l := namesOf(leftOfMap(plain(m))); strings.Contains(l, "…") {
			t.Errorf("%dx%d: a name is cut:\n%s", size[0], size[1], l)
		}
		for _, r := range v.Rows {
			if r.Err == nil {
				continue
			}
			// Walk the cursor down to the failed die (x1 y3 below the
			// first, x1 y0), so that its rows are in view.
			for i := 0; i < len(v.Rows) && batchOf(m).wm.cursor != indexOf(v.Rows, r); i++ {
				m = press(m, "down")
			}
			msg := rowError(r.Err)
			if !strings.Contains(flat(leftOfMap(plain(m))), msg) {
				t.Errorf("%dx%d: the error %q is not shown whole beside the map:\n%s", size[0], size[1], msg, plain(m))
			}
			if strings.Contains(msg, r.File) {
				t.Errorf("the error repeats the file name its row shows: %q", msg)
			}
		}
	}
}

// leftOfMap is the screen's text left of the map's bar: the summary and
// the die table.
func leftOfMap(screen string) string {
	var left []string
	for _, l := range strings.Split(screen, "\n") {
		a, _, _ := strings.Cut(l, "│")
		left = append(left, a)
	}
	return strings.Join(left, "\n")
}

// namesOf leaves out the die table's error lines (indented by
// dieErrIndent): the rest are the summary, the header and the rows.
func namesOf(left string) string {
	var keep []string
	for _, l := range strings.Split(left, "\n") {
		if rest, ok := strings.CutPrefix(l, dieErrIndent); !ok || strings.HasPrefix(rest, " ") {
			keep = append(keep, l)
		}
	}
	return strings.Join(keep, "\n")
}

func indexOf(rows []fit.BatchRow, r fit.BatchRow) int {
	for k := range rows {
		if rows[k].File == r.File {
			return k
		}
	}
	return -1
}

// The die table's width: the longest name where the map leaves room;
// else what the map leaves, never below names of dieNameMin.
func TestDieTableWidth(t *testing.T) {
	cols := dieCols{name: 30, pos: 7, val: 8, out: 10}
	full := cols.width() // 2+30+1+7+1+8+1+10 = 60
	if full != 60 {
		t.Fatalf("width %d, want 60", full)
	}
	for _, c := range []struct{ w, mapNeed, want int }{
		{200, 30, 60},                    // room: the whole table
		{80, 30, 47},                     // the map keeps 30 and the bar 3
		{60, 30, 60 - (30 - dieNameMin)}, // never below names of dieNameMin
	} {
		if got := dieTableWidth(c.w, cols, c.mapNeed); got != c.want {
			t.Errorf("dieTableWidth(%d, map %d) = %d, want %d", c.w, c.mapNeed, got, c.want)
		}
	}
	// A long error widens the table up to 80 columns in half the screen.
	cols.err = 170
	for _, c := range []struct{ w, mapNeed, want int }{
		{200, 30, 80}, {160, 30, 78}, {80, 30, 47},
	} {
		if got := dieTableWidth(c.w, cols, c.mapNeed); got != c.want {
			t.Errorf("dieTableWidth(%d, map %d) = %d, want %d", c.w, c.mapNeed, got, c.want)
		}
	}
}

// cutMiddle keeps a name's start and end (its extension) and takes out
// the middle.
func TestCutMiddle(t *testing.T) {
	for _, c := range []struct {
		s    string
		w    int
		want string
	}{
		{"die_x01_y00.csv", 20, "die_x01_y00.csv"},
		{"die_x01_y00.csv", 15, "die_x01_y00.csv"},
		{"lot417/wafer07/die_x01_y00.csv", 15, "lot417/…y00.csv"},
		{"abcdef", 3, "ab…"},
	} {
		got := cutMiddle(c.s, c.w, "…")
		if got != c.want || width(got) > c.w {
			t.Errorf("cutMiddle(%q, %d) = %q, want %q", c.s, c.w, got, c.want)
		}
	}
}

// rowWindow keeps the cursor's row in view with rows of several lines,
// and leaves a line for "... n more" when rows are left out.
func TestRowWindow(t *testing.T) {
	rows := func(h ...int) [][]string {
		var out [][]string
		for _, n := range h {
			out = append(out, make([]string, n))
		}
		return out
	}
	for _, c := range []struct {
		h          []int
		cur, room  int
		first, end int
	}{
		{[]int{1, 1, 1}, 0, 5, 0, 3},
		{[]int{1, 1, 1, 1, 1, 1}, 0, 4, 0, 3},
		{[]int{1, 1, 1, 1, 1, 1}, 5, 4, 2, 6},
		{[]int{1, 6, 1, 1}, 3, 5, 2, 4},
		{[]int{1, 6, 1, 1}, 1, 4, 1, 2},
	} {
		first, end := rowWindow(rows(c.h...), c.cur, c.room)
		if first != c.first || end != c.end {
			t.Errorf("rowWindow(%v, cur %d, room %d) = %d..%d, want %d..%d", c.h, c.cur, c.room, first, end, c.first, c.end)
		}
		if c.cur < first || c.cur >= end {
			t.Errorf("rowWindow(%v, cur %d): the cursor's row is out of view", c.h, c.cur)
		}
	}
}

// An error at a place of the file names the place in words, not the
// file (its row names it).
func TestRowError(t *testing.T) {
	base := errors.New("missing column")
	for _, c := range []struct {
		err  error
		want string
	}{
		{&measure.ColumnError{File: "a/b.csv", Line: 1, Role: "current", Err: base}, "line 1: current column: missing column"},
		{&measure.ParseError{File: "a/b.csv", Line: 7, Column: 2, Err: base}, "line 7, column 2: missing column"},
		{fmt.Errorf("fit: %w", &measure.ParseError{File: "a/b.csv", Line: 7, Err: base}), "fit: a/b.csv:7: missing column"},
		{errors.New("too few points\x1b[2J"), `too few points\x1b[2J`},
	} {
		if got := rowError(c.err); got != c.want {
			t.Errorf("rowError(%v) = %q, want %q", c.err, got, c.want)
		}
	}
}

// footerOf is the footer of a screen drawn at h lines: the lines below
// the screen's own (the batch screen has no line of its own after the
// die table's; the footer starts at the first line naming a key of the
// footer's first binding).
func footerOf(m Model) string {
	return strings.Join(m.footer(), "\n")
}

// Every key of the batch screen is in its footer in every state of the
// screen at 80x24 and 120x40, also with a note: the folder field before
// and after a run, the map, a die's fit. Before, the footer was cut after
// "ctrl+e export CSV" below 200 columns, and ctrl+k and pgup/pgdn could
// not be found.
func TestBatchFooterShowsEveryKey(t *testing.T) {
	k := KeyMap{}.batchKeys()
	every := map[string]bool{}
	for _, kb := range []key.Binding{k.Run, k.Focus, k.Walk, k.Param, k.Export, k.Keep, k.Kept, k.Close, k.Open, k.AddDie} {
		every[kb.Help().Key] = false
	}
	for _, size := range [][2]int{{80, 24}, {120, 40}} {
		m := newTest(t, size[0], size[1])
		m = press(m, "B")
		states := []struct {
			name string
			keys []string
		}{
			{"folder", nil},
			{"map", append(append([]string{}, strings.Split(waferDir, "")...), "enter")},
			{"map with a note", []string{"ctrl+k"}},
			{"die", []string{"enter"}},
			{"folder after a run", []string{"esc", "tab"}},
		}
		for _, s := range states {
			m = press(m, s.keys...)
			if s.name == "map with a note" && m.note == "" {
				t.Fatal("ctrl+k left no note: the check with a note would prove nothing")
			}
			foot := footerOf(m)
			if got := len(strings.Split(plain(m), "\n")); got != size[1] {
				t.Errorf("%dx%d %s: %d lines drawn", size[0], size[1], s.name, got)
			}
			lines, fl := strings.Split(plain(m), "\n"), m.footer()
			for i, l := range fl {
				fl[i] = strings.TrimRight(ansi.Strip(l), " ")
			}
			for i, l := range lines {
				lines[i] = strings.TrimRight(l, " ")
			}
			if !slices.Equal(lines[len(lines)-len(fl):], fl) {
				t.Errorf("%dx%d %s: the footer is not at the foot of the screen:\n%s", size[0], size[1], s.name, plain(m))
			}
			if strings.Contains(foot, "…") {
				t.Errorf("%dx%d %s: the footer is cut:\n%s", size[0], size[1], s.name, foot)
			}
			for _, kb := range batchOf(m).footer(m) {
				if !kb.Enabled() {
					continue
				}
				h := kb.Help()
				if !strings.Contains(ansi.Strip(foot), h.Key+" "+h.Desc) {
					t.Errorf("%dx%d %s: %q missing from the footer:\n%s", size[0], size[1], s.name, h.Key+" "+h.Desc, foot)
				}
				every[h.Key] = true
			}
		}
	}
	for key, seen := range every {
		if !seen {
			t.Errorf("the key %q of the batch screen is in no footer", key)
		}
	}
}

// helpLines lays key entries whole over at most n lines of w cells, the
// note first; one line is the footer every other screen has (entries
// that fit, then an ellipsis).
func TestHelpLines(t *testing.T) {
	m := newTest(t, 80, 24)
	b := func(k, desc string) key.Binding { return key.NewBinding(key.WithKeys(k), key.WithHelp(k, desc)) }
	keys := []key.Binding{b("a", "alpha beta"), b("b", "gamma delta"), b("c", "epsilon zeta"), b("d", "eta theta")}
	one := helpLines(m.help, keys, "", 30, 1)
	if len(one) != 1 || ansi.Strip(one[0]) != ansi.Strip(shortHelp(m.help, keys, 30)) || !strings.HasSuffix(ansi.Strip(one[0]), "…") {
		t.Errorf("one line: %q", one)
	}
	two := helpLines(m.help, keys, "saved  ", 30, 2)
	var all []string
	for _, l := range two {
		l = ansi.Strip(l)
		if width(l) > 30 {
			t.Errorf("line wider than 30: %q", l)
		}
		all = append(all, l)
	}
	if len(two) != 2 || !strings.HasPrefix(all[0], "saved  a alpha beta") || strings.HasPrefix(all[1], " ") {
		t.Errorf("two lines: %q", all)
	}
	joined := strings.Join(all, " ")
	for _, kb := range keys[:3] {
		if !strings.Contains(joined, kb.Help().Key+" "+kb.Help().Desc) {
			t.Errorf("%q not whole in %q", kb.Help().Desc, all)
		}
	}
}

// A note longer than the line (kept table 1 of 1 ...) shares the batch
// screen's footer with the keys without cutting any: at 80x24 it takes
// two lines of its own above the two lines of keys (the screen gives
// them up until the next key clears the note); at 120 and 200 columns
// the note is whole too and every key is named. A kept table's names
// are its own, not "../" paths.
func TestBatchFooterNoteKeepsEveryKey(t *testing.T) {
	for _, size := range goldenSizes {
		m := batchRun(t, plainRenderer(), size[0], size[1])
		m = press(m, "ctrl+k", "pgup")
		note := m.note
		if size[0] == 80 && width(note) <= 78 {
			t.Fatalf("the note %q fits one line: the check would prove nothing", note)
		}
		foot := ansi.Strip(strings.Join(m.footer(), "\n"))
		if size[0] == 80 && len(m.footer()) != 4 {
			t.Errorf("80x24: footer of %d lines, want the note's 2 and the keys' 2: %q", len(m.footer()), foot)
		}
		if got := flat(foot); !strings.HasPrefix(got, flat(note)) {
			t.Errorf("%dx%d: the note is not whole in the footer:\n%s\nwant %q", size[0], size[1], got, note)
		}
		if strings.Contains(foot, "…") {
			t.Errorf("%dx%d: a key is cut:\n%s", size[0], size[1], foot)
		}
		for _, kb := range batchOf(m).footer(m) {
			if h := kb.Help(); kb.Enabled() && !strings.Contains(flat(foot), h.Key+" "+h.Desc) {
				t.Errorf("%dx%d: the footer lacks %q:\n%s", size[0], size[1], h.Key+" "+h.Desc, foot)
			}
		}
		screen := plain(m)
		if n := len(strings.Split(screen, "\n")); n != size[1] {
			t.Errorf("%dx%d: the screen has %d lines", size[0], size[1], n)
		}
		if l := leftOfMap(screen); strings.Contains(l, "../") || !strings.Contains(l, "die_x01_y01.csv") {
			t.Errorf("the kept table's names:\n%s", l)
		}
		// The next key clears the note: the keys alone again.
		m = press(m, "right")
		if m.note != "" || len(m.footer()) > 2 {
			t.Errorf("%dx%d: after a key the footer is %q", size[0], size[1], m.footer())
		}
	}
}

// The table of a batch without die positions keeps names whole where
// the room exists (shortened from the middle beyond half the width) and
// wraps a failed file's error below its row, every word of it shown.
func TestBatchTableKeepsNamesAndErrors(t *testing.T) {
	dir := writeBatchDir(t, 4)
	good, err := os.ReadFile(filepath.Join(dir, "die00.csv"))
	if err != nil {
		t.Fatal(err)
	}
	long := "lot417_wafer07_probe-station-B_repeat-run.csv" // 45 characters
	writeText(t, filepath.Join(dir, long), string(good))
	writeText(t, filepath.Join(dir, "broken.csv"), "no numbers\n")
	for _, size := range goldenSizes {
		m := newTest(t, size[0], size[1])
		m = press(m, "B")
		m = typeText(m, dir)
		m = press(m, "enter")
		v := batchOf(m).view
		if v == nil || v.Failed != 1 {
			t.Fatalf("batch not run as expected: %+v\n%s", v, plain(m))
		}
		screen := plain(m)
		for _, r := range v.Rows {
			if r.Err != nil && !strings.Contains(flat(screen), rowError(r.Err)) {
				t.Errorf("%dx%d: the error %q is not whole:\n%s", size[0], size[1], rowError(r.Err), screen)
			}
		}
		switch {
		case size[0] >= 120 && !strings.Contains(screen, long):
			t.Errorf("%dx%d: the long name is not whole:\n%s", size[0], size[1], screen)
		case size[0] < 120 && !strings.Contains(screen, "lot417_wafer07_pr") && !strings.Contains(screen, "repeat-run.csv"):
			t.Errorf("%dx%d: the long name is not shortened from the middle:\n%s", size[0], size[1], screen)
		}
	}
}

// At 80x24 a die table of long names shortens them from the middle, and
// the die position and value stay whole in their own columns.
func TestBatchDieTableShortensLongNames(t *testing.T) {
	src := writeBatchDir(t, 1)
	good, err := os.ReadFile(filepath.Join(src, "die00.csv"))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, p := range [][2]int{{1, 1}, {2, 1}, {1, 2}} {
		writeText(t, filepath.Join(dir, fmt.Sprintf("lot417_wafer07_probe-station-B_long-name_die_x%02d_y%02d.csv", p[0], p[1])), string(good))
	}
	m := newTest(t, 80, 24)
	m = press(m, "B")
	m = typeText(m, dir)
	m = press(m, "enter")
	if !batchOf(m).wm.hasDies {
		t.Fatalf("no map:\n%s", plain(m))
	}
	left := leftOfMap(plain(m))
	for _, want := range []string{"x1 y1", "x2 y1", "x1 y2", "_y01.csv", "lot417_", "…"} {
		if !strings.Contains(left, want) {
			t.Errorf("%q missing from the die table:\n%s", want, left)
		}
	}
	if rows, cols := batchOf(m).dieRows(m); len(rows) != 3 || cols.name <= dieNameMin {
		t.Fatalf("rows %d, name column %d", len(rows), cols.name)
	}
}

// At 80x24 a failed die's error off the cursor takes one line of the die
// table: the first words of the error, none cut, and the ellipsis; the
// rows after it stay in view. Walking onto the die shows the error whole
// (TestBatchDieTableKeepsNamesAndErrors).
func TestDieTableErrorOneLineOffCursor(t *testing.T) {
	m := batchRun(t, plainRenderer(), 80, 24)
	v := batchOf(m).view
	var msg string
	for _, r := range v.Rows {
		if r.Err != nil {
			msg = rowError(r.Err)
		}
	}
	if msg == "" {
		t.Fatal("the wafer folder must hold a failed file")
	}
	left := strings.Split(leftOfMap(plain(m)), "\n")
	var errLines []string
	for i, l := range left {
		if strings.Contains(l, "✗ failed") && i+2 < len(left) {
			errLines = append(errLines, strings.TrimSpace(left[i+1]))
			if strings.HasPrefix(left[i+2], dieErrIndent) {
				t.Errorf("the error takes more than one line off the cursor:\n%s", strings.Join(left, "\n"))
			}
		}
	}
	if len(errLines) != 1 {
		t.Fatalf("want one failed row in view, got %d:\n%s", len(errLines), plain(m))
	}
	shown, ok := strings.CutSuffix(errLines[0], " …")
	if !ok || !strings.HasPrefix(msg, shown+" ") {
		t.Errorf("error line %q: want the error's first whole words and an ellipsis (error %q)", errLines[0], msg)
	}
	// The rows below the failed one: 13 files, all but the last ones in
	// view (before, the error's 5 lines left "... 7 more").
	if s := plain(m); strings.Contains(s, "... 7 more") || !strings.Contains(s, "die_x02_y02.dat") {
		t.Errorf("the rows after the failed one are not in view:\n%s", s)
	}
}

// errorLine keeps whole words within w cells and says when some are left
// out; a first word longer than the line is cut.
func TestErrorLine(t *testing.T) {
	msg := "line 1: current column: missing column: no column is named like a current"
	for _, w := range []int{12, 20, 36, 50} {
		got := errorLine(msg, w, "…")
		if width(got) > w {
			t.Errorf("w=%d: %q is %d cells wide", w, got, width(got))
		}
		head, ok := strings.CutSuffix(got, " …")
		if !ok || !strings.HasPrefix(msg, head+" ") {
			t.Errorf("w=%d: %q is not whole words and an ellipsis", w, got)
		}
	}
	if got := errorLine(msg, 200, "…"); got != msg {
		t.Errorf("a fitting error is shown whole: %q", got)
	}
	if got := errorLine("unreadable-file-name-without-spaces", 10, "…"); width(got) > 10 || !strings.HasSuffix(got, "…") {
		t.Errorf("a long first word: %q", got)
	}
}
