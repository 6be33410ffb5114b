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

// The session browser: the list of sessions with a filter
// (browseScreen), the revision history of one session (historyScreen,
// opened over the list), and a comparison of two of its revisions, or of
// one and the edits in force (diffScreen, opened over the history or over
// the choice after a stale save).

// browseScreen is the list of sessions.
type browseScreen struct {
	list   []sessions.Summary
	probs  []string // entries that could not be read, with the problem
	drafts map[string]bool
	filter lineEditor
	sel    int
	err    string
}

// historyScreen is the revisions of session hname.
type historyScreen struct {
	hname  string
	hist   []sessions.Revision // newest first
	hprobs []string
	hsel   int
	mark   int // the revision marked as the older side (0: none)
	herr   string
}

// diffScreen is the changes between two revisions.
type diffScreen struct {
	dtitle string
	dsub   string
	diff   []sessions.Change
	doff   int
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
	b := &browseScreen{filter: newLineEditorN("", nameRunes)}
	b.load(m)
	m.push(b)
}

func (b *browseScreen) load(m *Model) {
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
	b.sel = min(b.sel, max(len(b.shown())-1, 0))
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

// shown are the sessions the filter lets through.
func (b *browseScreen) shown() []sessions.Summary {
	f := b.filter.value()
	var out []sessions.Summary
	for _, s := range b.list {
		if matches(f, s.Name, s.Latest.Meta.Title, s.Latest.Meta.Author, s.Latest.Meta.SavedBy) {
			out = append(out, s)
		}
	}
	return out
}

func (b *browseScreen) shownProblems() []string {
	f := b.filter.value()
	var out []string
	for _, p := range b.probs {
		if matches(f, p) {
			out = append(out, p)
		}
	}
	return out
}

func (b *browseScreen) selected() (sessions.Summary, bool) {
	shown := b.shown()
	if b.sel < 0 || b.sel >= len(shown) {
		return sessions.Summary{}, false
	}
	return shown[b.sel], true
}

// browseKeys is the key map of the session list (typing filters it).
type browseKeys struct{ Type, Choose, Up, Down, Open, Revisions, Clear, Close key.Binding }

func (k KeyMap) browseKeys() browseKeys {
	return browseKeys{Type: key.NewBinding(key.WithKeys("type"), key.WithHelp("type", "to filter")), Choose: choose(k, "choose"),
		Up: k.ListUp, Down: k.ListDown, Open: k.Open, Revisions: k.Revisions, Clear: k.ClearFilter, Close: k.Close}
}

func (k browseKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Type, k.Choose, k.Open, k.Revisions, k.Clear, k.Close}
}

// FullHelp is every key of the session list, for the help screen (Choose
// stands for Up and Down).
func (k browseKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (b *browseScreen) footer(m Model) []key.Binding { return m.e.keys.browseKeys().ShortHelp() }

func (b *browseScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.browseKeys()
	switch {
	case keyIs(km, k.Close):
		m.close(b)
		return nil
	case keyIs(km, k.Down):
		b.sel = min(b.sel+1, max(len(b.shown())-1, 0))
		return nil
	case keyIs(km, k.Up):
		b.sel = max(b.sel-1, 0)
		return nil
	case keyIs(km, k.Open):
		s, ok := b.selected()
		if !ok {
			b.err = "no session to open: none matches the filter"
			return nil
		}
		return m.requestOpen(s.Name, 0, func(err string) { b.err = err })
	case keyIs(km, k.Revisions):
		s, ok := b.selected()
		if !ok {
			b.err = "no session selected: none matches the filter"
			return nil
		}
		h := &historyScreen{}
		h.load(m, s.Name)
		m.push(h)
		return nil
	case keyIs(km, k.Clear):
		b.filter = newLineEditorN("", nameRunes)
		b.sel = 0
		return nil
	}
	if _, changed := b.filter.handle(km); changed {
		b.sel, b.err = 0, ""
	}
	return nil
}

func (b *historyScreen) load(m *Model, name string) {
	b.hname, b.hsel, b.mark, b.herr = name, 0, 0, ""
	hist, probs, err := m.sess.store.History(name)
	slices.Reverse(hist)
	b.hist, b.hprobs = hist, m.problemTexts(probs)
	if err != nil {
		b.herr = err.Error()
	}
}

// historyKeys is the key map of the revision history.
type historyKeys struct {
	Choose, Up, Down, Mark, DiffPair, DiffCurrent, Restore, Open, Back key.Binding
}

func (k KeyMap) historyKeys() historyKeys {
	return historyKeys{Choose: choose(k, "choose"), Up: k.Up, Down: k.Down, Mark: k.Mark, DiffPair: k.DiffPair,
		DiffCurrent: k.DiffCurrent, Restore: k.RestoreRev, Open: k.OpenRev, Back: k.Back}
}

func (k historyKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Choose, k.Mark, k.DiffPair, k.DiffCurrent, k.Restore, k.Open, k.Back}
}

// FullHelp is every key of the revision history, for the help screen:
// Choose stands for Up and Down (the arrows and k, j).
func (k historyKeys) FullHelp() [][]key.Binding {
	choose := k.Choose
	choose.SetKeys(slices.Concat(k.Up.Keys(), k.Down.Keys())...)
	choose.SetHelp(k.Up.Help().Key+" "+k.Down.Help().Key, choose.Help().Desc)
	return [][]key.Binding{{choose, k.Mark, k.DiffPair, k.DiffCurrent, k.Restore, k.Open, k.Back}}
}

func (b *historyScreen) footer(m Model) []key.Binding { return m.e.keys.historyKeys().ShortHelp() }

func (b *historyScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.historyKeys()
	sel := func() (sessions.Revision, bool) {
		if b.hsel < 0 || b.hsel >= len(b.hist) {
			return sessions.Revision{}, false
		}
		return b.hist[b.hsel], true
	}
	r, ok := sel()
	switch {
	case keyIs(km, k.Back):
		m.close(b)
		if l, ok := m.top().(*browseScreen); ok {
			l.load(m)
		}
		return nil
	case keyIs(km, k.Down):
		b.hsel = min(b.hsel+1, max(len(b.hist)-1, 0))
		return nil
	case keyIs(km, k.Up):
		b.hsel = max(b.hsel-1, 0)
		return nil
	case !ok:
		if keyIs(km, k.Mark) || keyIs(km, k.DiffPair) || keyIs(km, k.DiffCurrent) || keyIs(km, k.Restore) || keyIs(km, k.Open) {
			b.herr = "no revision can be read here"
		}
		return nil
	case keyIs(km, k.Mark):
		if b.mark == r.Number {
			b.mark = 0
		} else {
			b.mark = r.Number
		}
		return nil
	case keyIs(km, k.DiffPair):
		a := b.mark
		if a == 0 || a == r.Number {
			if b.hsel+1 >= len(b.hist) {
				b.herr = fmt.Sprintf("revision %d has no older revision here: mark one with space, or press c to compare it with your current edits", r.Number)
				return nil
			}
			a = b.hist[b.hsel+1].Number
		}
		lo, hi := min(a, r.Number), max(a, r.Number)
		if err := m.showDiff(b.hname, lo, hi); err != nil {
			b.herr = err.Error()
		}
		return nil
	case keyIs(km, k.DiffCurrent):
		if err := m.showDiffCurrent(b.hname, r.Number); err != nil {
			b.herr = err.Error()
		}
		return nil
	case keyIs(km, k.Restore):
		newest := b.hist[0].Number
		if r.Number == newest {
			b.herr = fmt.Sprintf("revision %d is the newest already", r.Number)
			return nil
		}
		name, rev := b.hname, r.Number
		c := &confirmScreen{title: fmt.Sprintf("Restore revision %d of %s?", r.Number, b.hname), what: "restore as the newest",
			lines: []string{
				fmt.Sprintf("Revision %d (saved %s by %s) is stored again as the newest revision, %d or later. Nothing is removed: %s.",
					r.Number, stamp(r.Meta.Modified), dashed(r.Meta.SavedBy), newest+1, span(r.Number+1, newest)),
			},
			yes: func(m *Model) tea.Cmd { return m.restoreRevision(b, name, rev) }}
		if b.hname == m.sess.name && m.Dirty() {
			c.lines = append(c.lines, "", "Your unsaved edits are kept; they then start from an older revision, and saving will offer the next revision or a copy.")
		}
		m.push(c)
		return nil
	case keyIs(km, k.Open):
		return m.requestOpen(b.hname, r.Number, func(err string) { b.herr = err })
	}
	return nil
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
func (m *Model) showDiff(name string, a, b int) error {
	st := m.sess.store
	da, ra, err := st.Open(name, a)
	if err != nil {
		return err
	}
	db, rb, err := st.Open(name, b)
	if err != nil {
		return err
	}
	m.push(&diffScreen{diff: sessions.Diff(da, db, m.e.ascii),
		dtitle: fmt.Sprintf("%s: revision %d %s revision %d", name, a, m.e.g.arrow, b),
		dsub: fmt.Sprintf("from revision %d (saved %s by %s) to revision %d (saved %s by %s)",
			a, stamp(ra.Meta.Modified), dashed(ra.Meta.SavedBy), b, stamp(rb.Meta.Modified), dashed(rb.Meta.SavedBy))})
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
	what := "the junction in force"
	if m.sess.name != "" {
		what = fmt.Sprintf("your edits of %s (started from revision %d)", m.sess.name, m.sess.rev)
	}
	if m.Dirty() {
		what += ", not saved"
	}
	m.push(&diffScreen{diff: sessions.Diff(da, cur, m.e.ascii),
		dtitle: fmt.Sprintf("%s: revision %d %s your current edits", name, rev, m.e.g.arrow),
		dsub:   fmt.Sprintf("from revision %d (saved %s by %s) to %s", rev, stamp(ra.Meta.Modified), dashed(ra.Meta.SavedBy), what)})
	return nil
}

// diffKeys is the key map of a comparison.
type diffKeys struct {
	scrollKeys
	Back key.Binding
}

func (k KeyMap) diffKeys() diffKeys {
	back := k.Back
	back.SetKeys(slices.Concat(back.Keys(), []string{"q"})...)
	return diffKeys{scrollKeys: k.scrollKeys(), Back: back}
}

func (k diffKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Down, k.Up, k.PageDown, k.PageUp, k.Back}
}

// FullHelp is every key of a comparison, for the help screen.
func (k diffKeys) FullHelp() [][]key.Binding {
	return [][]key.Binding{append(k.scrollKeys.list(), k.Back)}
}

func (b *diffScreen) footer(m Model) []key.Binding { return m.e.keys.diffKeys().ShortHelp() }

func (b *diffScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.diffKeys()
	head, rows := b.lines(*m, m.w)
	end := max(len(rows)-max(m.h-2-len(head), 1), 0)
	if !k.scroll(&b.doff, km, max(m.h-8, 1), end) && keyIs(km, k.Back) {
		m.close(b)
	}
	return nil
}

// requestOpen opens a stored revision, asking first when there are
// unsaved changes; fail shows an error on the screen that asked.
func (m *Model) requestOpen(name string, rev int, fail func(string)) tea.Cmd {
	if m.Dirty() {
		what := "the newest revision of " + name
		if rev > 0 {
			what = fmt.Sprintf("revision %d of %s", rev, name)
		}
		m.push(&confirmScreen{title: "Open " + what + "?", what: "open it and drop the changes",
			lines: []string{"The junction has changes that are not saved. Opening drops them (and their recovery draft).",
				"Press n, then ctrl+s to save them first."},
			yes: func(m *Model) tea.Cmd {
				m.discardDraft()
				return m.openStored(name, rev, fail)
			}})
		return nil
	}
	return m.openStored(name, rev, fail)
}

// openStored opens revision rev (0: the newest) of a stored session for
// editing; on an error the screen that asked shows it (fail).
func (m *Model) openStored(name string, rev int, fail func(string)) tea.Cmd {
	doc, r, err := m.sess.store.Open(name, rev)
	if err != nil {
		fail(err.Error())
		return nil
	}
	cmd := m.openDocument(doc, name, r.Number, false)
	m.closeAll()
	m.focus = panelDefine
	if m.note == "" {
		m.note = fmt.Sprintf("opened %s, revision %d", name, r.Number)
	}
	if len(r.Skipped) > 0 {
		m.note += fmt.Sprintf(" (the newest readable; unreadable newer revisions: %d, left untouched; saving takes the next free number)", len(r.Skipped))
	}
	m.offerDraft()
	return cmd
}

// restoreRevision stores an old revision again as the newest; the
// history h shows the outcome.
func (m *Model) restoreRevision(h *historyScreen, name string, rev int) tea.Cmd {
	r, err := m.sess.store.RestoreRevision(name, rev)
	if err != nil && r.Number == 0 {
		h.herr = "not restored: " + err.Error()
		return nil
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
	h.load(m, name)
	return cmd
}

// ---------------------------------------------------------------- views

func (b *browseScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	out := []string{rule("Sessions", w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	shown := b.shown()
	probs := b.shownProblems()
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

func (b *historyScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
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

// lines are the head and the rows of the comparison for width w.
func (b *diffScreen) lines(m Model, w int) (head, rows []string) {
	st, g := m.e.st, m.e.g
	head = []string{rule(b.dtitle, w, glyphs{hbar: g.hbarHeavy}, st.heading)}
	head = append(head, wrapped(b.dsub, w, st.muted, "")...)
	head = append(head, st.muted.Paint(plural(len(b.diff), "change", "changes")), "")
	return head, m.changeLines(b.diff, w)
}

func (b *diffScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	out, rows := b.lines(m, w)
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

// choose is the help entry of moving through a list.
func choose(k KeyMap, what string) key.Binding {
	return key.NewBinding(key.WithKeys("up", "down"), key.WithHelp(k.ListUp.Help().Key+"/"+k.ListDown.Help().Key, what))
}
