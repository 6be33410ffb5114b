package tui

import (
	"fmt"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/sessions"
)

// browser is the session browser: the list of sessions with a filter,
// the revision history of one session, and a comparison of two of its
// revisions (or of one and the edits in force).
type browser struct {
	list   []sessions.Summary
	probs  []string // entries that could not be read, with the problem
	drafts map[string]bool
	filter lineEditor
	sel    int
	err    string

	hname  string
	hist   []sessions.Revision // newest first
	hprobs []string
	hsel   int
	mark   int // the revision marked as the older side (0: none)
	herr   string

	dtitle string
	dsub   string
	diff   []sessions.Change
	doff   int
	dback  screen
}

// relPath shows a path of the store relative to its root.
func (m Model) relPath(p string) string {
	if m.sess.store == nil {
		return p
	}
	if r, err := filepath.Rel(m.sess.store.Root(), p); err == nil && !strings.HasPrefix(r, "..") {
		return filepath.ToSlash(r)
	}
	return p
}

func (m Model) problemTexts(probs []*sessions.DamagedError) []string {
	var out []string
	for _, p := range probs {
		out = append(out, m.relPath(p.Path)+": "+fmt.Sprint(p.Err))
	}
	return out
}

// openBrowser reads the list of sessions and shows it.
func (m *Model) openBrowser() {
	if m.sess.store == nil {
		m.note = m.sess.noStoreText("the session browser")
		return
	}
	m.br.filter = newLineEditorN("", nameRunes)
	m.br.sel = 0
	m.loadList()
	m.screen = screenBrowse
}

func (m *Model) loadList() {
	b := &m.br
	list, probs, err := m.sess.store.List()
	b.list, b.probs, b.err = list, m.problemTexts(probs), ""
	if err != nil {
		b.err = err.Error()
	}
	b.drafts = map[string]bool{}
	for _, s := range list {
		if m.sess.store.HasDraft(s.Name, m.sess.editor) {
			b.drafts[s.Name] = true
		}
	}
	b.sel = min(b.sel, max(len(m.shownSessions())-1, 0))
}

// matches reports whether every word of the filter is in one of the
// texts (letter case ignored).
func matches(filter string, texts ...string) bool {
	all := strings.ToLower(strings.Join(texts, " "))
	for _, w := range strings.Fields(strings.ToLower(filter)) {
		if !strings.Contains(all, w) {
			return false
		}
	}
	return true
}

// shownSessions are the sessions the filter lets through.
func (m Model) shownSessions() []sessions.Summary {
	f := m.br.filter.value()
	var out []sessions.Summary
	for _, s := range m.br.list {
		if matches(f, s.Name, s.Latest.Meta.Title, s.Latest.Meta.Author, s.Latest.Meta.SavedBy) {
			out = append(out, s)
		}
	}
	return out
}

func (m Model) shownProblems() []string {
	f := m.br.filter.value()
	var out []string
	for _, p := range m.br.probs {
		if matches(f, p) {
			out = append(out, p)
		}
	}
	return out
}

func (m Model) selected() (sessions.Summary, bool) {
	shown := m.shownSessions()
	if m.br.sel < 0 || m.br.sel >= len(shown) {
		return sessions.Summary{}, false
	}
	return shown[m.br.sel], true
}

func (m Model) browseKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	b := &m.br
	switch {
	case keyIs(km, k.Close):
		m.screen = screenMain
		return m, nil
	case keyIs(km, k.ListDown):
		b.sel = min(b.sel+1, max(len(m.shownSessions())-1, 0))
		return m, nil
	case keyIs(km, k.ListUp):
		b.sel = max(b.sel-1, 0)
		return m, nil
	case keyIs(km, k.Open):
		s, ok := m.selected()
		if !ok {
			b.err = "no session to open: none matches the filter"
			return m, nil
		}
		return m.requestOpen(s.Name, 0, screenBrowse)
	case keyIs(km, k.Revisions):
		s, ok := m.selected()
		if !ok {
			b.err = "no session selected: none matches the filter"
			return m, nil
		}
		m.loadHistory(s.Name)
		m.screen = screenHistory
		return m, nil
	case keyIs(km, k.ClearFilter):
		b.filter = newLineEditorN("", nameRunes)
		b.sel = 0
		return m, nil
	}
	if _, changed := b.filter.handle(km); changed {
		b.sel, b.err = 0, ""
	}
	return m, nil
}

func (m *Model) loadHistory(name string) {
	b := &m.br
	b.hname, b.hsel, b.mark, b.herr = name, 0, 0, ""
	hist, probs, err := m.sess.store.History(name)
	slices.Reverse(hist)
	b.hist, b.hprobs = hist, m.problemTexts(probs)
	if err != nil {
		b.herr = err.Error()
	}
}

func (m Model) historyKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	b := &m.br
	sel := func() (sessions.Revision, bool) {
		if b.hsel < 0 || b.hsel >= len(b.hist) {
			return sessions.Revision{}, false
		}
		return b.hist[b.hsel], true
	}
	r, ok := sel()
	switch {
	case keyIs(km, k.Back):
		m.loadList()
		m.screen = screenBrowse
		return m, nil
	case keyIs(km, k.Down):
		b.hsel = min(b.hsel+1, max(len(b.hist)-1, 0))
		return m, nil
	case keyIs(km, k.Up):
		b.hsel = max(b.hsel-1, 0)
		return m, nil
	case !ok:
		if keyIs(km, k.Mark) || keyIs(km, k.DiffPair) || keyIs(km, k.DiffCurrent) || keyIs(km, k.RestoreRev) || keyIs(km, k.OpenRev) {
			b.herr = "no revision can be read here"
		}
		return m, nil
	case keyIs(km, k.Mark):
		if b.mark == r.Number {
			b.mark = 0
		} else {
			b.mark = r.Number
		}
		return m, nil
	case keyIs(km, k.DiffPair):
		a := b.mark
		if a == 0 || a == r.Number {
			if b.hsel+1 >= len(b.hist) {
				b.herr = fmt.Sprintf("revision %d has no older revision here: mark one with space, or press c to compare it with your current edits", r.Number)
				return m, nil
			}
			a = b.hist[b.hsel+1].Number
		}
		lo, hi := min(a, r.Number), max(a, r.Number)
		if err := m.showDiff(b.hname, lo, hi, screenHistory); err != nil {
			b.herr = err.Error()
		}
		return m, nil
	case keyIs(km, k.DiffCurrent):
		if err := m.showDiffCurrent(b.hname, r.Number); err != nil {
			b.herr = err.Error()
		}
		return m, nil
	case keyIs(km, k.RestoreRev):
		newest := b.hist[0].Number
		if r.Number == newest {
			b.herr = fmt.Sprintf("revision %d is the newest already", r.Number)
			return m, nil
		}
		m.conf = confirmState{kind: confirmRestore, name: b.hname, rev: r.Number, back: screenHistory,
			title: fmt.Sprintf("Restore revision %d of %s?", r.Number, b.hname), yes: "restore as the newest",
			lines: []string{
				fmt.Sprintf("Revision %d (saved %s by %s) is stored again as the newest revision, %d or later. Nothing is removed: %s.",
					r.Number, stamp(r.Meta.Modified), dashed(r.Meta.SavedBy), newest+1, span(r.Number+1, newest)),
			}}
		if b.hname == m.sess.name && m.Dirty() {
			m.conf.lines = append(m.conf.lines, "", "Your unsaved edits are kept; they then start from an older revision, and saving will offer the next revision or a copy.")
		}
		m.screen = screenConfirm
		return m, nil
	case keyIs(km, k.OpenRev):
		return m.requestOpen(b.hname, r.Number, screenHistory)
	}
	return m, nil
}

// span words the revisions a to b that stay.
func span(a, b int) string {
	if a == b {
		return fmt.Sprintf("revision %d stays as it is", a)
	}
	return fmt.Sprintf("revisions %d to %d stay as they are", a, b)
}

// plural writes a count with its noun.
func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}

// showDiff compares revisions a and b of a session.
func (m *Model) showDiff(name string, a, b int, back screen) error {
	st := m.sess.store
	da, ra, err := st.Open(name, a)
	if err != nil {
		return err
	}
	db, rb, err := st.Open(name, b)
	if err != nil {
		return err
	}
	m.br.diff = sessions.Diff(da, db, m.e.ascii)
	m.br.dtitle = fmt.Sprintf("%s: revision %d %s revision %d", name, a, m.e.g.arrow, b)
	m.br.dsub = fmt.Sprintf("from revision %d (saved %s by %s) to revision %d (saved %s by %s)",
		a, stamp(ra.Meta.Modified), dashed(ra.Meta.SavedBy), b, stamp(rb.Meta.Modified), dashed(rb.Meta.SavedBy))
	m.br.doff, m.br.dback = 0, back
	m.screen = screenDiff
	return nil
}

// showDiffCurrent compares a revision with the edits in force.
func (m *Model) showDiffCurrent(name string, rev int) error {
	da, ra, err := m.sess.store.Open(name, rev)
	if err != nil {
		return err
	}
	cur, err := m.document(m.title())
	if err != nil {
		return err
	}
	m.br.diff = sessions.Diff(da, cur, m.e.ascii)
	m.br.dtitle = fmt.Sprintf("%s: revision %d %s your current edits", name, rev, m.e.g.arrow)
	what := "the junction in force"
	if m.sess.name != "" {
		what = fmt.Sprintf("your edits of %s (started from revision %d)", m.sess.name, m.sess.rev)
	}
	if m.Dirty() {
		what += ", not saved"
	}
	m.br.dsub = fmt.Sprintf("from revision %d (saved %s by %s) to %s", rev, stamp(ra.Meta.Modified), dashed(ra.Meta.SavedBy), what)
	m.br.doff, m.br.dback = 0, screenHistory
	m.screen = screenDiff
	return nil
}

func (m Model) diffKey(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	b := &m.br
	page := max(m.h-8, 1)
	switch {
	case keyIs(km, k.Back), km.String() == "q":
		m.screen = b.dback
	case keyIs(km, k.ScrollDown):
		b.doff++
	case keyIs(km, k.ScrollUp):
		b.doff--
	case keyIs(km, k.PageDown):
		b.doff += page
	case keyIs(km, k.PageUp):
		b.doff -= page
	case keyIs(km, k.Top):
		b.doff = 0
	case keyIs(km, k.Bottom):
		b.doff = 1 << 20
	}
	b.doff = max(b.doff, 0)
	return m, nil
}

// requestOpen opens a stored revision, asking first when there are
// unsaved changes.
func (m Model) requestOpen(name string, rev int, back screen) (tea.Model, tea.Cmd) {
	if m.Dirty() {
		what := "the newest revision of " + name
		if rev > 0 {
			what = fmt.Sprintf("revision %d of %s", rev, name)
		}
		m.conf = confirmState{kind: confirmOpen, name: name, rev: rev, back: back,
			title: "Open " + what + "?", yes: "open it and drop the changes",
			lines: []string{"The junction has changes that are not saved. Opening drops them (and their recovery draft).",
				"Press n, then ctrl+s to save them first."}}
		m.screen = screenConfirm
		return m, nil
	}
	return m.openStored(name, rev, back)
}

// openStored opens revision rev (0: the newest) of a stored session for
// editing; on an error the screen it came from shows it.
func (m Model) openStored(name string, rev int, back screen) (tea.Model, tea.Cmd) {
	doc, r, err := m.sess.store.Open(name, rev)
	if err != nil {
		m.screen = back
		if back == screenHistory {
			m.br.herr = err.Error()
		} else {
			m.br.err = err.Error()
		}
		return m, nil
	}
	cmd := m.openDocument(doc, name, r.Number, false)
	m.screen = screenMain
	m.focus = panelDefine
	if m.note == "" {
		m.note = fmt.Sprintf("opened %s, revision %d", name, r.Number)
	}
	if len(r.Skipped) > 0 {
		m.note += fmt.Sprintf(" (the newest readable; unreadable newer revisions: %d, left untouched; saving takes the next free number)", len(r.Skipped))
	}
	m.offerDraft()
	return m, cmd
}

// restoreRevision stores an old revision again as the newest.
func (m Model) restoreRevision(name string, rev int) (tea.Model, tea.Cmd) {
	r, err := m.sess.store.RestoreRevision(name, rev)
	m.screen = screenHistory
	if err != nil && r.Number == 0 {
		m.br.herr = "not restored: " + err.Error()
		return m, nil
	}
	m.note = fmt.Sprintf("revision %d of %s stored again as revision %d", rev, name, r.Number)
	var cmd tea.Cmd
	if name == m.sess.name {
		if m.Dirty() {
			m.note += "; your unsaved edits are kept"
		} else if doc, rr, oerr := m.sess.store.Open(name, r.Number); oerr == nil {
			cmd = m.openDocument(doc, name, rr.Number, false)
			m.note += " and opened"
		}
	}
	m.loadHistory(name)
	return m, cmd
}

// ---------------------------------------------------------------- views

func (m Model) browseScreen(w, h int) []string {
	st, g := m.e.st, m.e.g
	b := m.br
	out := []string{rule("Sessions", w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	shown := m.shownSessions()
	probs := m.shownProblems()
	count := fmt.Sprintf("%d of %s", len(shown), plural(len(b.list), "session", "sessions"))
	if len(b.list) == len(shown) {
		count = plural(len(b.list), "session", "sessions")
	}
	if len(b.probs) > 0 {
		count += ", " + plural(len(b.probs), "entry", "entries") + " cannot be read"
	}
	fw := max(min(30, w-width(count)-14), 8)
	out = append(out, "Filter ["+b.filter.view(fw, st.selected, " ")+"]  "+st.muted.Paint(count))
	if b.err != "" {
		out = append(out, wrapped(g.bad+" "+b.err, w, st.err, "")...)
	}
	out = append(out, "")
	// Columns: name, revisions, saved, by, title.
	nameW := 10
	for _, s := range shown {
		nameW = max(nameW, min(width(s.Name), 28))
	}
	const revW, savedW = 4, 20
	byW := 10
	titleW := w - 2 - nameW - 1 - revW - 1 - savedW - 1 - byW - 1
	showBy := titleW >= 16
	if !showBy {
		titleW += byW + 1
	}
	row := func(name, rev, saved, by, title string) string {
		s := padRight(name, nameW, g.ellipsis) + " " + padLeft(rev, revW) + " " + padRight(saved, savedW, g.ellipsis) + " "
		if showBy {
			s += padRight(by, byW, g.ellipsis) + " "
		}
		return s + cut(title, max(titleW, 0), g.ellipsis)
	}
	out = append(out, "  "+st.muted.Paint(row("NAME", "REVS", "SAVED", "BY", "TITLE")))
	list := make([]string, 0, len(shown))
	for i, s := range shown {
		title := s.Latest.Meta.Title
		switch {
		case len(s.Damaged) > 0 && s.Latest.Number == 0:
			title = "(damaged: no revision can be read) " + title
		case len(s.Damaged) > 0:
			title = fmt.Sprintf("(damaged: newest readable is revision %d) %s", s.Latest.Number, title)
		}
		if b.drafts[s.Name] {
			title = "(your draft) " + title
		}
		echo := func(t string) string { return sessions.Printable(t, sessions.MaxEchoRunes, g.ellipsis) }
		l := row(echo(s.Name), strconv.Itoa(s.Revisions), stamp(s.Latest.Meta.Modified), dashed(echo(s.Latest.Meta.SavedBy)), echo(title))
		if i == b.sel {
			list = append(list, st.accent.Paint(g.cursor)+" "+st.selected.Paint(l))
		} else {
			list = append(list, "  "+l)
		}
	}
	if len(shown) == 0 {
		msg := "no sessions yet: ctrl+s in the workbench saves one"
		if len(b.list) > 0 {
			msg = "no session matches the filter (ctrl+u clears it)"
		}
		list = append(list, "  "+st.muted.Paint(msg))
	}
	var tail []string
	if len(probs) > 0 {
		tail = append(tail, "", st.err.Paint("Cannot be read (left as they are; the others are not affected)"))
		for _, p := range probs {
			tail = append(tail, wrapped(g.bad+" "+p, w, st.err, "  ")...)
		}
	}
	room := h - len(out) - min(len(tail), max(h/3, 3))
	if room < 1 {
		room = 1
	}
	if len(list) > room {
		off := min(max(b.sel-room/2, 0), len(list)-room)
		list = list[off : off+room]
	}
	out = append(out, list...)
	out = append(out, tail...)
	return block(out, w, h, g.ellipsis)
}

func (m Model) historyScreen(w, h int) []string {
	st, g := m.e.st, m.e.g
	b := m.br
	out := []string{rule("Revisions of "+b.hname, w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	info := plural(len(b.hist), "revision", "revisions") + ", newest first"
	if b.mark != 0 {
		info += fmt.Sprintf("; revision %d is marked as the older side of a diff", b.mark)
	}
	if b.hname == m.sess.name {
		info += fmt.Sprintf("; your edits started from revision %d", m.sess.rev)
	}
	out = append(out, wrapped(info, w, st.muted, "")...)
	if b.herr != "" {
		out = append(out, wrapped(g.bad+" "+b.herr, w, st.err, "")...)
	}
	out = append(out, "")
	const revW, savedW, fromW = 5, 20, 5
	byW := 10
	titleW := max(w-4-revW-1-savedW-1-byW-1-fromW-1, 8)
	row := func(rev, saved, by, from, what string) string {
		return padLeft(rev, revW) + " " + padRight(saved, savedW, g.ellipsis) + " " + padRight(by, byW, g.ellipsis) + " " +
			padLeft(from, fromW) + " " + cut(what, titleW, g.ellipsis)
	}
	out = append(out, "    "+st.muted.Paint(row("REV", "SAVED", "BY", "FROM", "NOTE / ORIGIN / TITLE")))
	// The note, origin and title wrap under their column (at most
	// historyLines lines a revision), so that no word of a note is cut.
	const historyLines = 6
	var list []string
	selFrom, selTo := 0, 0
	for i, r := range b.hist {
		from := "-"
		if r.Meta.BasedOn > 0 {
			from = strconv.Itoa(r.Meta.BasedOn)
		}
		what := r.Meta.Title
		if rm := r.Meta.Remark(); rm != "" {
			what = rm + " " + g.dot + " " + what
		}
		lines := wrapText(what, titleW)
		if len(lines) > historyLines {
			lines = lines[:historyLines]
			lines[historyLines-1] = cut(lines[historyLines-1]+" "+g.ellipsis, titleW, g.ellipsis)
		}
		mark := " "
		if r.Number == b.mark {
			mark = st.accent.Paint("A")
		}
		if i == b.hsel {
			selFrom, selTo = len(list), len(list)+len(lines)
		}
		for k, text := range lines {
			l := strings.Repeat(" ", width(row("", "", "", "", "")))
			if k == 0 {
				l = row(strconv.Itoa(r.Number), stamp(r.Meta.Modified), dashed(r.Meta.SavedBy), from, "")
			}
			l += text
			switch {
			case i == b.hsel && k == 0:
				list = append(list, st.accent.Paint(g.cursor)+mark+"  "+st.selected.Paint(l))
			case i == b.hsel:
				list = append(list, "    "+st.selected.Paint(l))
			case k == 0:
				list = append(list, " "+mark+"  "+l)
			default:
				list = append(list, "    "+l)
			}
		}
	}
	var tail []string
	if len(b.hprobs) > 0 {
		tail = append(tail, "", st.err.Paint("Cannot be read (left as they are)"))
		for _, p := range b.hprobs {
			tail = append(tail, wrapped(g.bad+" "+p, w, st.err, "  ")...)
		}
	}
	room := max(h-len(out)-min(len(tail), max(h/3, 3)), 1)
	if len(list) > room {
		// The selected revision in view, whole where it fits.
		off := min(max(selFrom-(room-(selTo-selFrom))/2, 0), len(list)-room)
		list = list[off : off+room]
	}
	out = append(out, list...)
	out = append(out, tail...)
	return block(out, w, h, g.ellipsis)
}

// changeLines lays out changes as a table grouped by section: quantity,
// old, new, change. The value columns are as wide as their longest entry
// and the quantity takes the rest, its name wrapping under itself when
// longer; a change whose values are long texts (a title), or every change
// when the quantity column would be too narrow, takes two lines: the
// quantity, then its values. No name or value is cut.
func (m Model) changeLines(changes []sessions.Change, w int) []string {
	st, g := m.e.st, m.e.g
	if len(changes) == 0 {
		return []string{st.muted.Paint("  no differences in inputs, results, data or notes")}
	}
	const longValue, minQuantityW = 24, 14
	arrow := " " + g.arrow + " "
	aw := width(arrow)
	regular := func(c sessions.Change) bool { return width(c.Old) <= longValue && width(c.New) <= longValue }
	qNeed, oW, nW, cW := 8, 3, 3, 6
	for _, c := range changes {
		qNeed = max(qNeed, width(c.Quantity))
		if regular(c) {
			oW, nW, cW = max(oW, width(c.Old)), max(nW, width(c.New)), max(cW, width(c.Delta))
		}
	}
	qW := min(qNeed, w-(2+2+oW+aw+nW+2+cW))
	table := qW >= minQuantityW
	// twoLines draws a change as its quantity, then its values below.
	twoLines := func(c sessions.Change) []string {
		var out []string
		for _, l := range wrapText(c.Quantity, max(w-2, 8)) {
			out = append(out, "  "+l)
		}
		vals := wrapText(c.Old+" "+g.arrow+" "+c.New, max(w-6, 8))
		for i, l := range vals {
			if i == len(vals)-1 && width(l)+2+width(c.Delta) <= w-6 {
				out = append(out, "      "+st.strong.Paint(l)+"  "+st.pinned.Paint(c.Delta))
				return out
			}
			out = append(out, "      "+st.strong.Paint(l))
		}
		return append(out, "      "+st.pinned.Paint(c.Delta))
	}
	var out []string
	if table {
		out = append(out, "  "+st.muted.Paint(padRight("quantity", qW, "")+"  "+padRight("old", oW, "")+strings.Repeat(" ", aw)+padRight("new", nW, "")+"  change"))
	} else {
		out = append(out, "  "+st.muted.Paint("quantity, then old "+g.arrow+" new  change"))
	}
	sec := ""
	for _, c := range changes {
		if c.Section != sec {
			sec = c.Section
			out = append(out, st.heading.Paint(sec))
		}
		if !table || !regular(c) {
			out = append(out, twoLines(c)...)
			continue
		}
		names := wrapText(c.Quantity, qW)
		out = append(out, "  "+padRight(names[0], qW, g.ellipsis)+"  "+padLeft(c.Old, oW)+st.faint.Paint(arrow)+
			st.strong.Paint(padLeft(c.New, nW))+"  "+st.pinned.Paint(c.Delta))
		for _, l := range names[1:] {
			out = append(out, "    "+l)
		}
	}
	return out
}

func (m Model) diffScreen(w, h int) []string {
	st, g := m.e.st, m.e.g
	b := m.br
	out := []string{rule(b.dtitle, w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	out = append(out, wrapped(b.dsub, w, st.muted, "")...)
	out = append(out, st.muted.Paint(plural(len(b.diff), "change", "changes")), "")
	rows := m.changeLines(b.diff, w)
	room := max(h-len(out), 1)
	off := min(b.doff, max(len(rows)-room, 0))
	rows = rows[off:]
	res := block(append(out, rows...), w, h, g.ellipsis)
	if len(rows) > room && h > 0 {
		res[h-1] = padRight(st.faint.Paint("  "+g.arrow+" more below (j or pgdn)"), w, "")
	}
	return res
}

// ---------------------------------------------------------------- help

type browseHelp struct{ k KeyMap }

func (h browseHelp) ShortHelp() []key.Binding {
	k := h.k
	return []key.Binding{key.NewBinding(key.WithKeys("type"), key.WithHelp("type", "to filter")), choose(k, "choose"), k.Open, k.Revisions, k.ClearFilter, k.Close}
}
func (h browseHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }

type historyHelp struct{ k KeyMap }

func (h historyHelp) ShortHelp() []key.Binding {
	k := h.k
	return []key.Binding{choose(k, "choose"), k.Mark, k.DiffPair, k.DiffCurrent, k.RestoreRev, k.OpenRev, k.Back}
}

// choose is the help entry of moving through a list.
func choose(k KeyMap, what string) key.Binding {
	return key.NewBinding(key.WithKeys("up", "down"), key.WithHelp(k.ListUp.Help().Key+"/"+k.ListDown.Help().Key, what))
}
func (h historyHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }

type diffHelp struct{ k KeyMap }

func (h diffHelp) ShortHelp() []key.Binding {
	k := h.k
	return []key.Binding{k.ScrollDown, k.ScrollUp, k.PageDown, k.PageUp, k.Back}
}
func (h diffHelp) FullHelp() [][]key.Binding { return [][]key.Binding{h.ShortHelp()} }
