package tui

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
)

// batchScreen is the batch screen: a directory of I-V files fitted one
// by one off the UI thread. seq numbers the runs; a message of an older
// run is dropped. While a run is out, cancel stops it and prog and done
// carry its messages. The workbench keeps the screen (Model.batch) when
// it is closed: B shows the last run again.
type batchScreen struct {
	ed      lineEditor
	seq     int
	running bool
	cancel  context.CancelFunc
	prog    chan batchProgressMsg
	done    chan batchDoneMsg
	// n of total files finished in the run in force.
	n, total int
	view     *fit.BatchResult
	err      string
	dir      string // the directory of the run shown
	// wm is the wafer map of the run shown: focus, die cursor, column,
	// wafer and the die's fit when one is open.
	wm   waferMapState
	keep batchKeepState // kept tables (batch_keep.go)
}

// batchProgressMsg reports n of total files finished in run seq.
type batchProgressMsg struct{ seq, n, total int }

// batchDoneMsg ends run seq: the rows finished (kept on cancellation) or
// the error that stopped the run before any file.
type batchDoneMsg struct {
	seq  int
	view *fit.BatchResult
	err  error
}

// openBatch shows the batch screen, keeping the last run.
func (m *Model) openBatch() {
	if m.batch == nil {
		m.batch = &batchScreen{ed: newLineEditor("")}
	}
	m.push(m.batch)
}

// startBatch cancels a run in force and starts one on the directory
// typed; the fits run in a goroutine that reports through channels.
func (b *batchScreen) start(m Model) tea.Cmd {
	if b.cancel != nil {
		b.cancel()
	}
	b.seq++
	seq := b.seq
	dir := strings.TrimSpace(b.ed.value())
	ctx, cancel := context.WithCancel(context.Background())
	prog := make(chan batchProgressMsg, 16)
	done := make(chan batchDoneMsg, 1)
	b.running, b.cancel, b.prog, b.done = true, cancel, prog, done
	b.n, b.total, b.view, b.err, b.dir = 0, 0, nil, "", dir
	fallbackK := m.form.spec.Temperature
	src := m.sess.files
	send := func(n, total int) {
		select { // never block the workers; the final count comes with done
		case prog <- batchProgressMsg{seq: seq, n: n, total: total}:
		default:
		}
	}
	go func() {
		defer cancel()
		msg := batchDoneMsg{seq: seq}
		defer func() {
			if r := recover(); r != nil {
				msg = batchDoneMsg{seq: seq, err: fmt.Errorf("the batch failed: %v", r)}
			}
			done <- msg
		}()
		files, err := fit.BatchFiles(src, dir)
		if err != nil {
			msg.err = err
			return
		}
		send(0, len(files))
		msg.view, msg.err = fit.Batch(ctx, files, fit.BatchOptions{Files: src, Progress: send,
			IV: fit.IVOptions{Temperature: fit.TemperatureRule{FallbackK: fallbackK, FallbackSource: fit.SourceJunction}}})
	}()
	return waitBatch(prog, done)
}

// waitBatch returns the next message of a run: a progress count or the
// end.
func waitBatch(prog chan batchProgressMsg, done chan batchDoneMsg) tea.Cmd {
	return func() tea.Msg {
		select {
		case d := <-done:
			return d
		case p := <-prog:
			return p
		}
	}
}

// progress takes a count of the run in force and waits for the next
// message.
func (b *batchScreen) progress(msg batchProgressMsg) tea.Cmd {
	if msg.seq != b.seq || !b.running {
		return nil
	}
	if msg.n >= b.n {
		b.n, b.total = msg.n, msg.total
	}
	return waitBatch(b.prog, b.done)
}

// finish takes the end of the run in force.
func (b *batchScreen) finish(msg batchDoneMsg) {
	if msg.seq != b.seq {
		return
	}
	b.running, b.cancel, b.prog, b.done = false, nil, nil, nil
	b.view = msg.view
	b.wm = newWaferMapState(msg.view)
	if v := msg.view; v != nil {
		b.n, b.total = v.Fitted+v.Failed, len(v.Rows)
	}
	switch {
	case msg.err == nil:
	case errors.Is(msg.err, context.Canceled):
		b.err = "cancelled: the files finished are kept"
	default:
		b.err = msg.err.Error()
	}
}

// batchKeys is the key map of the batch screen: the directory, the
// wafer map (measure_batch_map.go) and a die's fit.
type batchKeys struct {
	Run, Focus, Walk, Param, Export, Keep, Kept, Close key.Binding
	// On the map: Walk and Param are their help.
	Left, Right, Up, Down, Open, Next, Prev, Wafer, AddDie key.Binding
}

func (k KeyMap) batchKeys() batchKeys {
	b := func(keys []string, k, desc string) key.Binding {
		return key.NewBinding(key.WithKeys(keys...), key.WithHelp(k, desc))
	}
	return batchKeys{Run: b([]string{"enter"}, "enter", "fit the folder"),
		Focus:  b([]string{"tab", "shift+tab"}, "tab", "map"),
		Export: b([]string{"ctrl+e"}, "ctrl+e", "export CSV"),
		Keep:   b([]string{"ctrl+k"}, "ctrl+k", "keep table"),
		Kept:   b([]string{"pgup", "pgdown"}, "pgup/pgdn", "kept tables"),
		Close:  b([]string{"esc"}, "esc", "close"),
		Walk:   b([]string{"up", "down", "left", "right", "h", "j", "k", "l"}, "arrows", "walk dies"),
		Param:  b([]string{"[", "]"}, "[ ]", "parameter"),
		Left:   b([]string{"left", "h"}, "left", "die on the left"), Right: b([]string{"right", "l"}, "right", "die on the right"),
		Up: b([]string{"up", "k"}, "up", "die above"), Down: b([]string{"down", "j"}, "down", "die below"),
		Open: b([]string{"enter"}, "enter", "open die"),
		Next: b([]string{"]"}, "]", "next parameter"), Prev: b([]string{"["}, "[", "previous parameter"),
		Wafer:  b([]string{"w"}, "w", "next wafer"),
		AddDie: b([]string{"f"}, "f", "add to session and fit")}
}

// FullHelp is every key of the batch screen, for the help screen: Walk
// stands for the arrows (and h, j, k, l), Param for [ and ].
func (k batchKeys) FullHelp() [][]key.Binding {
	help := func(kb key.Binding, desc string) key.Binding {
		kb.SetHelp(kb.Help().Key, desc)
		return kb
	}
	return [][]key.Binding{{k.Run, help(k.Focus, "keys to the map or the folder"), help(k.Walk, "walk dies (a die's fit follows)"),
		k.Open, help(k.Param, "parameter mapped"), k.Wafer, help(k.AddDie, "add the open die to the session and fit"),
		k.Export, help(k.Keep, "keep the table with the session"), help(k.Kept, "show the kept tables"),
		help(k.Close, "close, back to the map, cancel a run")}}
}

// footerLines: the batch screen's keys take two lines at 80 columns, a
// third with a note.
func (b *batchScreen) footerLines() int { return 3 }

// footer is the keys that act in the screen's state, the most used
// first: a run out (esc cancels), a die's fit, the map, the folder field.
// With the note they take more footer lines where one does not hold
// them (tallFooter), so that every key stays in view.
func (b *batchScreen) footer(m Model) []key.Binding {
	k := m.e.keys.batchKeys()
	help := func(kb key.Binding, desc string) key.Binding {
		kb.SetHelp(kb.Help().Key, desc)
		return kb
	}
	if b.running {
		return []key.Binding{help(k.Close, "cancel (the files finished are kept)")}
	}
	table := []key.Binding{k.Export, k.Keep, k.Kept}
	switch {
	case b.wm.die != nil:
		k.AddDie.SetEnabled(b.wm.die.ds != nil)
		return append(append([]key.Binding{help(k.Walk, "next die"), k.AddDie}, table...), help(k.Close, "back to the map"))
	case b.wm.onMap(b.view):
		keys := []key.Binding{k.Walk, k.Open, k.Param}
		if len(fit.Wafers(b.view.Rows)) > 1 {
			keys = append(keys, k.Wafer)
		}
		return append(append(append(keys, help(k.Focus, "folder")), table...), k.Close)
	}
	keys := []key.Binding{k.Run}
	if b.view != nil {
		if b.wm.hasDies {
			keys = append(keys, k.Focus)
		}
		keys = append(keys, k.Export, k.Keep)
	}
	return append(keys, k.Kept, k.Close)
}

// listen takes the run's messages, on top or not.
func (b *batchScreen) listen(_ *Model, msg tea.Msg) tea.Cmd {
	switch msg := msg.(type) {
	case batchProgressMsg:
		return b.progress(msg)
	case batchDoneMsg:
		b.finish(msg)
	}
	return nil
}

// update is the batch screen's key handling: the directory, the run, the
// export, and the wafer map's keys (mapKey).
func (b *batchScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.batchKeys()
	if b.keepKey(m, k, km) {
		return nil
	}
	switch {
	case keyIs(km, k.Close) && b.wm.die != nil:
		b.wm.die = nil
	case keyIs(km, k.Close) && b.running:
		b.cancel()
		m.note = "cancelling the batch: the files finished are kept"
	case keyIs(km, k.Close):
		m.close(b)
	case !b.running && b.view != nil && keyIs(km, k.Export):
		b.export(m)
	case !b.running && b.wm.onMap(b.view) && keyIs(km, m.e.keys.Help):
		m.openHelp() // on the map; in the folder field ? is text
	case !b.running && b.wm.onMap(b.view):
		b.mapKey(m, km)
	case keyIs(km, k.Focus) && !b.running && b.wm.hasDies:
		b.wm.focus = true
	case keyIs(km, k.Run) && b.running:
		m.note = "a batch is running: esc cancels it"
	case keyIs(km, k.Run):
		return b.start(*m)
	default:
		b.ed.handle(km)
	}
	return nil
}

// interrupt: ctrl+c stops a running batch (the files finished are kept)
// before the workbench asks to quit.
func (b *batchScreen) interrupt(*Model) (tea.Cmd, bool) {
	if b.cancel != nil {
		b.cancel()
	}
	return nil, false
}

// view draws the directory field, the progress, the summary and the
// first rows.
func (b *batchScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	ascii := m.e.ascii
	c := func(s string) string { return cut(s, w, g.ellipsis) }
	out := []string{rule("Batch fit of the I-V files of a directory", w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	out = append(out, "directory "+st.text.Paint("["+b.ed.view(max(w-14, 8), st.selected, " ")+"]"))
	switch {
	case b.running && b.total == 0:
		out = append(out, st.muted.Paint(c("listing the files...  esc cancels")))
	case b.running:
		out = append(out, st.strong.Paint(c(fmt.Sprintf("%d of %d files", b.n, b.total)))+st.muted.Paint("  esc cancels"))
	case b.view != nil:
		v := b.view
		out = append(out, st.strong.Paint(c(fmt.Sprintf("%d of %d files: %d fitted, %d failed, %d not run", b.n, b.total, v.Fitted, v.Failed, v.NotRun))))
	default:
		out = append(out, st.muted.Paint(c("type a directory of I-V files (.csv, .tsv, .txt, .dat; subdirectories too); enter fits them all")))
		if m.sess.filesNote != "" {
			out = append(out, wrapped(m.sess.filesNote, w, st.muted, "")...)
		}
	}
	if b.err != "" {
		out = append(out, wrapped(g.bad+" "+sessions.Printable(b.err, 0, ""), w, st.err, "")...)
	}
	v := b.view
	if v == nil {
		return block(out, w, h, g.ellipsis)
	}
	if b.wm.die != nil {
		return block(append(out, b.dieFitView(m, w, h-len(out))...), w, h, g.ellipsis)
	}
	out = append(out, st.strong.Paint(c(fmt.Sprintf("  %-4s %-11s %-11s %-11s %s", "", "median", "Q1", "Q3", "outliers"))))
	params := fit.BatchParams()
	cols := []int{fit.ColIs, fit.ColN, fit.ColRs}
	if v.Stats[fit.ColIph].N > 0 { // lit files: their population's own lines
		if v.Stats[fit.ColIs].N == 0 {
			cols = nil
		}
		cols = append(cols, fit.ColIph, fit.ColVoc, fit.ColFF)
	}
	for _, j := range cols {
		p, sm := params[j], v.Stats[j]
		f := func(x float64) string { return model.Format(p.Kind, x, 3, ascii) }
		out = append(out, c(fmt.Sprintf("  %-4s %-11s %-11s %-11s %d of %d", p.Symbol, f(sm.Median), f(sm.Q1), f(sm.Q3), len(sm.Outliers), sm.N)))
	}
	out = append(out, "")
	room := h - len(out)
	if !b.wm.hasDies {
		return block(append(out, b.table(m, w, room)...), w, h, g.ellipsis)
	}
	return block(append(out, b.dieTableAndMap(m, w, room)...), w, h, g.ellipsis)
}

// table is the file table of a batch without die positions in w
// columns and at most room lines: file names as wide as the longest
// (shortened from the middle beyond half the width), then Is, n and Rs
// (a lit row's from the lit fit, marked "lit") and the parameters the row is an outlier in (painted as a caution), or
// the failure with its error wrapped below.
func (b *batchScreen) table(m Model, w, room int) []string {
	st, g := m.e.st, m.e.g
	ascii := m.e.ascii
	c := func(s string) string { return cut(s, w, g.ellipsis) }
	nameW := width("file")
	for _, r := range b.view.Rows {
		if r.Status != fit.StatusNotRun {
			nameW = max(nameW, width(b.rowName(r)))
		}
	}
	nameW = min(nameW, max(w/2, dieNameMin))
	out := []string{st.strong.Paint(c(fmt.Sprintf("  %-*s %-9s %-6s %-10s %s", nameW, "file", "Is", "n", "Rs", "outlier in")))}
	outliers := fit.OutlierParams(b.view.Stats)
	var blocks [][]string
	for k, r := range b.view.Rows {
		if r.Status == fit.StatusNotRun {
			continue
		}
		name := cutMiddle(b.rowName(r), nameW, g.ellipsis)
		if r.Err != nil {
			head := "  " + st.err.Paint(c(fmt.Sprintf("%-*s %s failed", nameW, name, g.bad)))
			blocks = append(blocks, append([]string{head}, wrapped(b.rowErr(r), w, st.err, dieErrIndent)...))
			continue
		}
		is, n, rs := r.Diode() // a lit row's from the lit fit, marked lit
		line := fmt.Sprintf("%-*s %-9s %-6.3f %-10s", nameW, name, model.Format(model.Current, is, 3, ascii), n,
			model.Format(model.Resistance, rs, 3, ascii))
		if r.Lit {
			line += " lit"
		}
		paint := st.text
		if syms := outlierSymbols(outliers[k]); syms != "" {
			line, paint = line+" "+syms, st.caution
		}
		blocks = append(blocks, []string{"  " + paint.Paint(cut(line, w-2, g.ellipsis))})
	}
	first, end := rowWindow(blocks, -1, room-1)
	for _, bl := range blocks[first:end] {
		out = append(out, bl...)
	}
	if end < len(blocks) {
		out = append(out, st.muted.Paint(c(fmt.Sprintf("  ... %d more", len(blocks)-end))))
	}
	return out
}

// rowName is a row's file name as the batch screen shows it: relative to
// the folder (a kept table's is already), control characters escaped
// (names come from a folder others may fill).
func (b *batchScreen) rowName(r fit.BatchRow) string {
	return sessions.Printable(sessions.BatchFileName(b.dir, r.File), 0, "")
}

// outlierSymbols names the parameters (indices of fit.BatchParams, as
// fit.OutlierParams gives them) a row is an outlier in: "Is, Rs".
func outlierSymbols(js []int) string {
	var syms []string
	for _, j := range js {
		syms = append(syms, fit.BatchParams()[j].Symbol)
	}
	return strings.Join(syms, ", ")
}

// oneLine joins the words of s on one line.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// export writes the batch table as CSV (fit.WriteBatchCSV, the
// command line's table) to a new file batch-TIME.csv: in the batch's
// folder on the local file system, in the inbox when served (whatever
// the folder). It never replaces a file.
func (b *batchScreen) export(m *Model) {
	files := m.sess.files
	if files == nil {
		files = model.LocalFiles{}
	}
	fw, ok := files.(model.FileWriter)
	if !ok {
		m.note = "exports are not available here"
		return
	}
	name := fit.BatchExportName(m.sess.now())
	path := name
	if _, local := files.(model.LocalFiles); local && b.dir != "" {
		dir := b.dir
		if fi, err := os.Stat(dir); err == nil && !fi.IsDir() {
			dir = filepath.Dir(dir)
		}
		path = filepath.Join(dir, name)
	}
	f, err := fw.CreateNew(path)
	if err == nil {
		err = fit.WriteBatchCSV(f, b.view, nil)
		if cerr := f.Close(); err == nil {
			err = cerr
		}
	}
	if err != nil {
		m.note = "export: " + sessions.Printable(err.Error(), 200, "")
		return
	}
	m.note = "batch table written to " + sessions.Printable(path, 200, "")
}
