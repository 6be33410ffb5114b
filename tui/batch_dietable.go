package tui

import (
	"errors"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/charmbracelet/x/ansi"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/sessions"
	"junco/tui/wafermap"
)

// dieRow is one row of the die table as text: the row of the batch (k),
// its file name, die position, value of the column mapped (or the mark
// of a failed fit), the parameters it is an outlier in, and the error of
// a failed fit (wrapped below the row).
type dieRow struct {
	k                   int
	name, pos, val, out string
	err                 string
}

// dieCols are the widths of the die table's columns, and err the width
// of the longest error with its indent (errors wrap below their rows).
type dieCols struct{ name, pos, val, out, err int }

// width is the table's width with these columns: the cursor's mark, the
// columns and their separating spaces (the outlier column only when some
// row has one).
func (c dieCols) width() int {
	w := 2 + c.name + 1 + c.pos + 1 + c.val
	if c.out > 0 {
		w += 1 + c.out
	}
	return w
}

// dieNameMin is the least width of the die table's file names: a name is
// shortened from the middle down to it when the terminal is narrow.
const dieNameMin = 12

// dieRows are the rows of the die table (every file run, in the batch's
// order) and the columns that hold them whole. The outliers are the fit
// layer's (fit.OutlierParams), of every parameter, not only the column
// mapped.
func (b *batchScreen) dieRows(m Model) ([]dieRow, dieCols) {
	g := m.e.g
	p := fit.BatchParams()[b.wm.param]
	outliers := fit.OutlierParams(b.view.Stats)
	cols := dieCols{name: width("file"), pos: width("die"), val: width(p.Symbol)}
	var rows []dieRow
	for k, r := range b.view.Rows {
		if r.Status == fit.StatusNotRun {
			continue
		}
		d := dieRow{k: k, name: b.rowName(r), pos: "-"}
		if r.Die.Known() {
			d.pos = fmt.Sprintf("x%d y%d", r.Die.X, r.Die.Y)
		}
		if r.Err != nil {
			d.val, d.err = g.bad+" failed", b.rowErr(r)
		} else {
			d.val = model.Format(p.Kind, r.Values[b.wm.param], 4, m.e.ascii)
			if r.Lit { // fitted with the lit model (fit.BatchRow.Lit)
				d.val += " lit"
			}
		}
		d.out = outlierSymbols(outliers[k])
		cols.name, cols.pos, cols.val = max(cols.name, width(d.name)), max(cols.pos, width(d.pos)), max(cols.val, width(d.val))
		if d.out != "" {
			cols.out = max(cols.out, width(d.out), width("outlier in"))
		}
		if d.err != "" {
			cols.err = max(cols.err, width(dieErrIndent)+width(d.err))
		}
		rows = append(rows, d)
	}
	return rows, cols
}

// dieErrIndent is the indent of a failed row's error below the row.
const dieErrIndent = "    "

// dieTableWidth is the width of the die table beside a map that needs
// mapNeed columns (wafermap.MinWidth), in w columns with the separator's
// 3: the width that holds the longest name where the room exists (and
// errors on lines up to 80 columns, in at most half the screen), else
// what the map leaves, but never less than the table with its names
// shortened to dieNameMin (the map then cuts its grid, with a note).
func dieTableWidth(w int, cols dieCols, mapNeed int) int {
	least := cols
	least.name = min(cols.name, dieNameMin)
	want := max(cols.width(), min(cols.err, 80, (w-3)/2))
	return max(min(want, w-3-mapNeed), least.width())
}

// dieTable is the file table beside the map, in w columns and at most
// room lines: file, die position, the value of the column mapped (or
// the failure, its error below: see errorLine) and the parameters the row is an
// outlier in (painted as a caution, as in the table without dies). The
// cursor's row is highlighted and kept in view. Where w is short of the
// longest name, names are shortened from the middle: the die position
// and the value keep their own columns whole, so the row still says
// which die it is.
func (b *batchScreen) dieTable(m Model, rows []dieRow, cols dieCols, w, room int) []string {
	st, g := m.e.st, m.e.g
	cols.name = max(min(cols.name, cols.name-(cols.width()-w)), dieNameMin)
	c := func(s string) string { return cut(s, w, g.ellipsis) }
	line := func(name, pos, val, out string) string {
		s := fmt.Sprintf("%-*s %-*s %-*s", cols.name, name, cols.pos, pos, cols.val, val)
		if out != "" {
			s += " " + out
		}
		return strings.TrimRight(s, " ")
	}
	head := line("file", "die", fit.BatchParams()[b.wm.param].Symbol, "")
	if cols.out > 0 {
		head = line("file", "die", fit.BatchParams()[b.wm.param].Symbol, "outlier in")
	}
	out := []string{st.strong.Paint(c("  " + head))}
	var blocks [][]string
	cur := -1
	for i, d := range rows {
		mark, paint := "  ", st.text
		switch {
		case d.k == b.wm.cursor:
			mark, paint, cur = g.cursor+" ", st.selected, i
		case d.err != "":
			paint = st.err
		case d.out != "":
			paint = st.caution
		}
		lines := []string{mark + paint.Paint(c(line(cutMiddle(d.name, cols.name, g.ellipsis), d.pos, d.val, d.out)))}
		switch {
		case d.err != "" && d.k == b.wm.cursor:
			lines = append(lines, wrapped(d.err, w, st.err, dieErrIndent)...)
		case d.err != "":
			lines = append(lines, dieErrIndent+st.err.Paint(errorLine(d.err, w-width(dieErrIndent), g.ellipsis)))
		}
		blocks = append(blocks, lines)
	}
	first, end := rowWindow(blocks, cur, room-1)
	for _, bl := range blocks[first:end] {
		out = append(out, bl...)
	}
	if end < len(blocks) {
		out = append(out, st.muted.Paint(c(fmt.Sprintf("  ... %d more", len(blocks)-end))))
	}
	return out
}

// errorLine is a failed row's error in the die table when the row is not
// under the cursor, in w cells. The rule: such a row's error takes one
// line, the whole error where it fits, else its first words that fit
// (never a word cut) and the ellipsis saying more follows; the row under
// the cursor shows the whole error wrapped below it, as do the die's
// line beside the map and the die's screen (enter), so walking onto a
// die reads its error whole. A table of several failed files thus keeps
// its rows in view at 80x24.
func errorLine(err string, w int, ellipsis string) string {
	if width(err) <= w {
		return err
	}
	more := " " + ellipsis
	words := strings.Fields(err)
	line := ""
	for _, word := range words {
		next := word
		if line != "" {
			next = line + " " + word
		}
		if width(next)+width(more) > w {
			break
		}
		line = next
	}
	if line == "" { // a first word longer than the line: cut it
		return cut(err, w, ellipsis)
	}
	return line + more
}

// rowWindow chooses the rows of several lines each (blocks) shown in
// room lines with the row cur (-1: none) in view: blocks[first:end], and
// a line left for "... n more" when some row is left out. A row taller
// than the room is shown alone (cut below).
func rowWindow(blocks [][]string, cur, room int) (first, end int) {
	fits := func(first int) int {
		used, end := 0, first
		for end < len(blocks) && used+len(blocks[end]) <= room {
			used += len(blocks[end])
			end++
		}
		for end < len(blocks) && end > first && used+1 > room {
			end--
			used -= len(blocks[end])
		}
		return max(end, min(first+1, len(blocks)))
	}
	for cur > first && fits(first) <= cur {
		first++
	}
	return first, fits(first)
}

// rowErr is row r's error as the batch screen shows it (rowError), the
// row's file named by its path in the run's or kept table's folder or
// as the row names it.
func (b *batchScreen) rowErr(r fit.BatchRow) string {
	return rowError(r.Err, filepath.Join(b.dir, r.File), r.File)
}

// rowError is a failed row's error as its table shows it, on one line
// with control characters escaped: an error at a place of the file
// (measure.ParseError, measure.ColumnError; or the text of one kept
// with a table, which starts with one of paths) starts with its line and
// column in words in place of the file's name, which the row shows
// already.
func rowError(err error, paths ...string) string {
	msg := err.Error()
	file, line, col := "", 0, 0
	var pe *measure.ParseError
	var ce *measure.ColumnError
	switch {
	case errors.As(err, &pe):
		file, line, col = pe.File, pe.Line, pe.Column
	case errors.As(err, &ce):
		file, line, col = ce.File, ce.Line, ce.Column
	}
	if file != "" {
		at, say := file+":", []string{}
		if line > 0 {
			at += fmt.Sprintf("%d:", line)
			say = append(say, fmt.Sprintf("line %d", line))
		}
		if col > 0 {
			at += fmt.Sprintf("%d:", col)
			say = append(say, fmt.Sprintf("column %d", col))
		}
		if rest, ok := strings.CutPrefix(msg, at); ok {
			msg = strings.TrimSpace(rest)
			if len(say) > 0 {
				msg = strings.Join(say, ", ") + ": " + msg
			}
		}
	}
	for _, p := range paths {
		if file != "" || p == "" {
			break
		}
		if rest, ok := strings.CutPrefix(msg, p+":"); ok {
			msg, file = placeWords(rest), p
		}
	}
	return sessions.Printable(oneLine(msg), 0, "")
}

// placeWords turns the "LINE:COLUMN: message" after a file's name in an
// error's text into "line LINE, column COLUMN: message" (either number
// may be missing).
func placeWords(rest string) string {
	var say []string
	for _, what := range []string{"line", "column"} {
		num, after, found := strings.Cut(rest, ":")
		n, err := strconv.Atoi(num)
		if !found || err != nil || n <= 0 {
			break
		}
		say = append(say, fmt.Sprintf("%s %d", what, n))
		rest = after
	}
	rest = strings.TrimSpace(rest)
	if len(say) > 0 {
		rest = strings.Join(say, ", ") + ": " + rest
	}
	return rest
}

// cutMiddle shortens s to w cells by taking out its middle (an ellipsis
// in its place), keeping the start and the end (a file's extension and
// the last part of its name).
func cutMiddle(s string, w int, ellipsis string) string {
	if width(s) <= w {
		return s
	}
	if w <= width(ellipsis)+2 {
		return cut(s, w, ellipsis)
	}
	keep := w - width(ellipsis)
	head := ansi.Truncate(s, (keep+1)/2, "")
	r := []rune(s)
	tail := ""
	for i := len(r) - 1; i >= 0 && width(string(r[i:])) <= keep/2; i-- {
		tail = string(r[i:])
	}
	return head + ellipsis + tail
}

// dieMapMin is the least width the map keeps beside a table of long
// names, for its title and the line of the cursor's die.
const dieMapMin = 30

// dieTableAndMap lays the die table and the wafer map side by side in w x
// room: the table as wide as its longest name where the map leaves the
// room (dieTableWidth).
func (b *batchScreen) dieTableAndMap(m Model, w, room int) []string {
	st, g := m.e.st, m.e.g
	rows, cols := b.dieRows(m)
	o := wafermap.Options{Param: b.wm.param, Wafer: b.wm.waferKey(b.view.Rows), ASCII: m.e.ascii}
	need := max(wafermap.MinWidth(b.view.Rows, b.view.Stats, o), dieMapMin)
	tw := dieTableWidth(w, cols, need)
	table := block(b.dieTable(m, rows, cols, tw, room), tw, room, g.ellipsis)
	right := block(b.waferMapLines(m, w-tw-3, room), w-tw-3, room, g.ellipsis)
	return joinColumns(" "+st.faint.Paint(g.vbar)+" ", table, right)
}
