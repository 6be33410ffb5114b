// Package tui is the junco workbench: a keyboard-driven terminal program
// in which an engineer defines a pn junction step by step, reads every
// result with its unit, charts its curves, and compares it with a pinned
// reference. Everything it shows is computed by package model.
//
// One Model serves one terminal. It is built by New from Options that
// carry the terminal's lipgloss renderer; all styles come from that
// renderer, and there is no package state, so a server can run one Model
// per connection.
package tui

import (
	"io"
	"reflect"
	"strings"
	"time"

	"github.com/charmbracelet/bubbles/help"
	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/muesli/termenv"

	"junco/model"
	"junco/sessions"
)

// Options configure a workbench.
type Options struct {
	// Renderer draws for the terminal the workbench runs on; every style is
	// built from it. nil gives a renderer without colour.
	Renderer *lipgloss.Renderer
	// ASCII draws with plain ASCII characters only (see DetectASCII).
	ASCII bool
	// NoColor draws without colour (see DetectNoColor); bold, underline
	// and reversed colours still mark focus and state.
	NoColor bool
	// Spec is the junction to open; nil opens the built-in demo.
	Spec *model.Spec
	// Name is shown in the title bar for Spec (a session name, say).
	Name string
	// Width and Height are the terminal size until the first
	// tea.WindowSizeMsg arrives; 0 means 80 x 24.
	Width, Height int

	// Store is the user's own session store: saving, the session browser
	// and recovery drafts use it. nil turns persistence off; the session
	// keys then say why (NoStoreReason, or a general reason).
	Store *sessions.Store
	// NoStoreReason says why Store is nil, for the session keys.
	NoStoreReason string
	// User is the author of saves, notes and review notes ("" =
	// "unknown").
	User string
	// Session, Document and Revision open the workbench on revision
	// Revision of stored session Session, whose document is Document.
	// With Document and no Session the document is new to the store (a
	// file): the first save asks for a name. With Session and no
	// Document, the revision (0: the newest) is read from Store.
	Session  string
	Document *sessions.Document
	Revision int
	// ReadOnly opens the document for review: everything is shown,
	// nothing can be changed; n adds a review note (AddReview) and
	// ctrl+s copies the session into the user's own sessions
	// (CopyToOwn).
	ReadOnly bool
	// AddReview stores a review note by User on the reviewed session.
	AddReview func(text string) error
	// CopyToOwn stores doc as a new session called name among the user's
	// own sessions (in Store, so that the workbench can open it) and
	// returns its revision. nil copies into Store directly.
	CopyToOwn func(doc *sessions.Document, name string) (int, error)
	// Now returns the current time (notes, pins); nil means time.Now.
	Now func() time.Time
	// Share shares the saved session (by name) read-only with readers
	// (user names, or "*" for everyone); an empty list stops sharing.
	// Readers returns the current readers. nil: sharing is not offered
	// (it needs a server with several users).
	Share   func(session string, readers []string) error
	Readers func(session string) []string
	// Files is where the import and batch screens read measurement
	// files: nil is the local file system; a server passes the user's
	// inbox. FilesNote, when set, tells the user where files come from
	// (shown on those screens).
	Files     model.Files
	FilesNote string

	// syncCharts computes chart curves inside Update rather than in a
	// command, so that a test program's final state is deterministic.
	syncCharts bool
	// draftEvery is how long after a change the recovery draft is
	// written (0: defaultDraftEvery).
	draftEvery time.Duration
}

// DetectASCII reports whether the locale in the environment lacks UTF-8:
// the first set of LC_ALL, LC_CTYPE and LANG decides; C, POSIX, anything
// without UTF-8, or none set at all means ASCII. getenv is os.Getenv or a
// lookup in a remote session's environment.
func DetectASCII(getenv func(string) string) bool {
	for _, k := range []string{"LC_ALL", "LC_CTYPE", "LANG"} {
		v := getenv(k)
		if v == "" {
			continue
		}
		u := strings.ToUpper(v)
		return !(strings.Contains(u, "UTF-8") || strings.Contains(u, "UTF8"))
	}
	return true
}

// DetectNoColor reports whether colour should be off: NO_COLOR set to a
// non-empty value, or TERM=dumb.
func DetectNoColor(getenv func(string) string) bool {
	return getenv("NO_COLOR") != "" || getenv("TERM") == "dumb"
}

// Panels of the main screen.
type panel int

const (
	panelDefine panel = iota
	panelResults
	panelCharts
	panelCount
)

func (p panel) title() string {
	switch p {
	case panelDefine:
		return "Define"
	case panelResults:
		return "Results"
	}
	return "Charts"
}

// Smallest terminal the workbench draws panels in.
const minWidth, minHeight = 40, 12

// Model is the workbench. Use New.
type Model struct {
	e     env
	w, h  int
	focus panel
	right panel // what the right side shows in the pair layout
	// stack holds the screens over the panels, the top one last
	// (screen.go).
	stack []screen

	form  formModel
	sheet sheetModel
	chart chartModel
	help  help.Model

	pin     *model.Result
	geo     [6]int // panel boxes from geometry, set by relayout
	name    string
	short   string
	demo    bool
	note    string
	formRev int

	sess session
	// batch is the batch screen, kept with its last run when closed;
	// importPath is the path last typed on the import screen.
	batch      *batchScreen
	importPath string
	syncCharts bool
}

// New builds a workbench.
func New(o Options) Model {
	r := o.Renderer
	if r == nil {
		r = lipgloss.NewRenderer(io.Discard)
		r.SetColorProfile(termenv.Ascii)
	}
	e := newEnv(r, o.ASCII, !o.NoColor)
	e.keys = e.keys.forASCII(o.ASCII).forMode(o.ReadOnly)
	m := Model{e: e, w: o.Width, h: o.Height, right: panelResults, syncCharts: o.syncCharts}
	if m.w <= 0 || m.h <= 0 {
		m.w, m.h = 80, 24
	}
	m.sess = newSession(o)
	doc, rev := o.Document, o.Revision
	var openErr error
	if doc == nil && o.Session != "" && o.Store != nil {
		d, r, err := o.Store.Open(o.Session, o.Revision)
		if err != nil {
			openErr = err
		} else {
			doc, rev = d, r.Number
		}
	}
	spec := model.DemoJunction().Spec
	m.demo = true
	m.name = model.DemoJunction().Title
	m.short = model.DemoJunction().Short
	switch {
	case doc != nil:
		spec, m.demo, m.name = doc.Spec, false, doc.Meta.Title
		if m.name == "" {
			m.name = o.Name
		}
	case o.Spec != nil:
		spec, m.demo, m.name = *o.Spec, false, o.Name
	}
	if !m.demo && m.name == "" {
		m.name = "new junction"
	}
	if !m.demo {
		m.short = m.name
	}
	m.form = newForm(e, spec)
	m.formRev = m.form.rev
	m.sheet = sheetModel{e: e}
	m.chart = newChart(e, m.form.spec)
	m.chart.sync = o.syncCharts
	m.help = m.newHelp()
	if doc != nil {
		m.sess.doc = doc
		if o.Session != "" {
			m.sess.name, m.sess.rev = o.Session, rev
		}
		m.applyExtras(doc)
	}
	if m.sess.name == "" {
		m.sess.suggest = suggestName(o.Name)
		if m.demo {
			m.sess.suggest = "d7-demo"
		}
	}
	if m.demo && doc == nil {
		// The demo comes with its invented measurements (made by our own
		// model with noise and labelled so), ready for the fit screen.
		if sets, err := model.DemoMeasurements(1); err == nil {
			for _, ds := range sets {
				if ds.ImportedAt.IsZero() {
					ds.ImportedAt = m.sess.now().UTC()
				}
				m.sess.meas = append(m.sess.meas, sessions.Measurement{ID: ds.ID, DataSet: ds.DataSet})
			}
		}
	}
	m.setBaseline()
	m.sync()
	m.relayout()
	// The commands of the calls above are not run: Init asks again.
	m.chart.lastReq = nil
	if openErr != nil {
		m.note = "session " + o.Session + " could not be opened (" + openErr.Error() + "); the demo is shown"
	}
	if o.ReadOnly {
		m.focus = panelDefine
	} else {
		m.offerDraft()
	}
	return m
}

// newSession sets up the persistence side from the options.
func newSession(o Options) session {
	s := session{store: o.Store, noStore: o.NoStoreReason, user: strings.TrimSpace(o.User), now: o.Now,
		readOnly: o.ReadOnly, addReview: o.AddReview, copyToOwn: o.CopyToOwn, draftEvery: o.draftEvery,
		share: o.Share, readers: o.Readers, files: o.Files, filesNote: o.FilesNote}
	if s.user == "" {
		s.user = "unknown"
	}
	s.editor = sessions.EditorID(s.user)
	if s.now == nil {
		s.now = time.Now
	}
	s.conn = sessions.NewConnID(s.now())
	if s.draftEvery <= 0 {
		s.draftEvery = defaultDraftEvery
	}
	return s
}

// suggestName turns a title or file name into a session name to offer
// at the first save ("" when nothing usable).
func suggestName(name string) string {
	var b strings.Builder
	for _, r := range strings.TrimSpace(name) {
		switch {
		case r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.':
			b.WriteRune(r)
		case r == ' ':
			b.WriteByte('-')
		}
		if b.Len() >= nameRunes {
			break
		}
	}
	s := strings.Trim(b.String(), ".-")
	if checkNewName(s) != nil {
		return ""
	}
	return s
}

// Init asks for the first chart's curves.
func (m Model) Init() tea.Cmd { return m.chart.request() }

func (m Model) newHelp() help.Model {
	st, g := m.e.st, m.e.g
	sep := " " + g.dot + " "
	return help.Model{ShortSeparator: sep, FullSeparator: "   ", Ellipsis: g.ellipsis,
		Styles: help.Styles{Ellipsis: st.helpSep, ShortKey: st.helpKey, ShortDesc: st.helpDesc, ShortSeparator: st.helpSep,
			FullKey: st.helpKey, FullDesc: st.helpDesc, FullSeparator: st.helpSep}}
}

// Spec returns the junction in force (every accepted value).
func (m Model) Spec() model.Spec { return m.form.spec }

// Result returns the evaluation of the junction in force.
func (m Model) Result() *model.Result { return m.form.res }

// sync pushes the form's spec and result to the sheet and charts; the
// command computes the charts' curves.
func (m *Model) sync() tea.Cmd {
	var stale []string
	for _, i := range m.form.bad() {
		stale = append(stale, m.form.defs[i].label)
	}
	if m.sheet.res != m.form.res || m.sheet.pin != m.pin || !reflect.DeepEqual(m.sheet.stale, stale) {
		m.sheet.set(m.form.res, m.pin, stale)
	}
	var pinSpec *model.Spec
	if m.pin != nil {
		s := m.pin.Spec
		pinSpec = &s
	}
	return tea.Batch(m.chart.setSpec(m.form.spec, pinSpec), m.chart.solveRequest(m.form.spec, m.form.res))
}

// Update handles a message. After a change not yet saved it starts the
// timer of the recovery draft (once; see scheduleDraft).
func (m Model) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	if km, ok := msg.(tea.KeyMsg); ok && km.Type == tea.KeyRunes && len(km.Runes) > 1 && !km.Paste {
		return m.eachKey(km)
	}
	tm, cmd := m.update(msg)
	nm, ok := tm.(Model)
	if !ok {
		return tm, cmd
	}
	nm, dcmd := nm.scheduleDraft()
	if dcmd != nil {
		cmd = tea.Batch(cmd, dcmd)
	}
	return nm, cmd
}

func (m Model) update(msg tea.Msg) (tea.Model, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		m.w, m.h = max(msg.Width, 0), max(msg.Height, 0)
		cmd := m.broadcast(msg)
		return m, tea.Batch(cmd, m.relayout())
	case chartDataMsg:
		m.chart.apply(msg)
		return m, nil
	case solveDoneMsg:
		m.chart.applySolve(msg)
		return m, nil
	case batchProgressMsg, batchDoneMsg:
		return m, m.broadcast(msg)
	case draftTickMsg:
		cmd := m.writeDraft()
		return m, cmd
	case draftWrittenMsg:
		m.draftWritten(msg)
		return m, nil
	case ShutdownMsg:
		return m.shutdown()
	case tea.KeyMsg:
		return m.key(msg)
	case tea.MouseMsg:
		return m.chartMouse(msg), nil
	}
	return m, nil
}

func keyIs(km tea.KeyMsg, b key.Binding) bool { return key.Matches(km, b) }

func (m Model) key(km tea.KeyMsg) (tea.Model, tea.Cmd) {
	k := m.e.keys
	m.note = ""
	if km.Type == tea.KeyCtrlC {
		return m.interrupt()
	}
	if s := m.top(); s != nil {
		return m.screenKey(s, km)
	}
	typing := (m.focus == panelDefine && m.form.typing) || (m.focus == panelCharts && m.chart.editing)
	if typing && (keyIs(km, k.Save) || keyIs(km, k.Browse) || keyIs(km, k.CopyOwn)) && km.Type != tea.KeyRunes {
		if m.chart.editing && m.focus == panelCharts {
			m.note = "finish the sweep first: enter applies it, esc cancels"
			return m, nil
		}
		// The text typed stays on screen (marked when not accepted).
		m.form.finishTyping()
		m.formRev = m.form.rev
		cmd := tea.Batch(m.sync(), m.relayout())
		switch {
		case keyIs(km, k.Save):
			m.openSave(false)
		case keyIs(km, k.CopyOwn):
			m.openCopy()
		default:
			m.openBrowser()
		}
		return m, cmd
	}
	if m.sess.readOnly && !typing {
		if why := m.refusal(km); why != "" {
			m.note = "read-only review: " + why + " cannot be changed; ctrl+s copies it to your sessions"
			return m, nil
		}
	}
	if !typing {
		for _, o := range openers(k) {
			if keyIs(km, o.key) {
				o.open(&m)
				return m, nil
			}
		}
		switch {
		case keyIs(km, k.NextPanel):
			return m, m.setFocus((m.focus + 1) % panelCount)
		case keyIs(km, k.PrevPanel):
			return m, m.setFocus((m.focus + panelCount - 1) % panelCount)
		case keyIs(km, k.Step):
			// The steps answer in every panel: the key shows Define at
			// that step.
			cmd := m.setFocus(panelDefine)
			m.form, _ = m.form.Update(km)
			return m, cmd
		case keyIs(km, k.Quit):
			return m.quit()
		case keyIs(km, k.Pin):
			m.pin = m.form.res
			m.sess.pinnedAt = m.sess.now()
			m.note = "pinned the present result as the reference: the sheet shows changes against it, the charts overlay it"
			return m, tea.Batch(m.sync(), m.relayout())
		case keyIs(km, k.Unpin):
			if m.pin == nil {
				m.note = "nothing is pinned (p pins the present result)"
				return m, nil
			}
			m.pin = nil
			m.note = "pin dropped"
			return m, tea.Batch(m.sync(), m.relayout())
		case keyIs(km, k.ASCII):
			m.setASCII(!m.e.ascii)
			return m, nil
		case keyIs(km, k.Solver):
			return m, m.toggleSolver()
		}
	}
	var cmd tea.Cmd
	switch m.focus {
	case panelDefine:
		m.form, _ = m.form.Update(km)
		cmd = m.sync()
		if m.form.rev != m.formRev {
			m.formRev = m.form.rev
			if pickLayout(m.w, m.h) == layoutTrio {
				cmd = tea.Batch(cmd, m.relayout())
			}
		}
	case panelResults:
		m.sheet, _ = m.sheet.Update(km)
	case panelCharts:
		m.chart, cmd = m.chart.Update(km)
	}
	return m, cmd
}

// opener is a key of the panels that opens a screen.
type opener struct {
	key  key.Binding
	open func(m *Model)
}

// openers are the screens the panels open, by key (outside text entry).
// A new screen is one line here, its binding in KeyMap and its own file.
func openers(k KeyMap) []opener {
	return []opener{
		{k.Save, func(m *Model) { m.openSave(false) }},
		{k.SaveAs, func(m *Model) { m.openSave(true) }},
		{k.CopyOwn, (*Model).openCopy},
		{k.Browse, (*Model).openBrowser},
		{k.Note, (*Model).openNote},
		{k.Share, (*Model).openShare},
		{k.Import, (*Model).openImport},
		{k.Fit, func(m *Model) { m.openFit(-1) }},
		{k.Arrhenius, (*Model).openArrhenius},
		{k.Batch, (*Model).openBatch},
		{k.Card, (*Model).openCard},
		{k.Help, (*Model).openHelp},
	}
}

// refusal names what a key would change in review mode ("" when the key
// changes nothing).
func (m Model) refusal(km tea.KeyMsg) string {
	k := m.e.keys
	switch {
	case keyIs(km, k.Pin), keyIs(km, k.Unpin):
		return "the pinned reference"
	case m.focus == panelCharts && keyIs(km, k.Sweep):
		return "the sweep"
	case m.focus != panelDefine:
		return ""
	}
	f := m.form
	if f.cur < 0 || f.cur >= len(f.defs) {
		return ""
	}
	d := f.defs[f.cur]
	switch {
	case keyIs(km, k.RestoreDefault):
		return d.label
	case d.choice && keyIs(km, k.Change):
		return d.label
	case !d.choice && keyIs(km, k.Edit):
		return d.label
	}
	return ""
}

func (m *Model) setFocus(p panel) tea.Cmd {
	mouse := mouseFor(m.focus, p)
	m.focus = p
	if p == panelResults || p == panelCharts {
		m.right = p
	}
	if mouse != nil {
		return tea.Batch(m.relayout(), mouse)
	}
	return m.relayout()
}

func (m *Model) setASCII(on bool) {
	e := newEnv(m.e.r, on, m.e.color)
	e.keys = e.keys.forASCII(on).forMode(m.sess.readOnly)
	m.e = e
	m.form.setEnv(e)
	m.sheet.setEnv(e)
	m.help = m.newHelp()
	m.chart.setEnv(e)
	if on {
		m.note = "ASCII drawing on (a switches back)"
	} else {
		m.note = "Unicode drawing on (a switches back)"
	}
}

func (m Model) quit() (tea.Model, tea.Cmd) {
	if m.Dirty() {
		m.push(&quitScreen{})
		return m, nil
	}
	return m, tea.Quit
}

// View draws the screen: exactly the terminal's size, every line cut to
// its width.
func (m Model) View() string {
	w, h := m.w, m.h
	if w < minWidth || h < minHeight {
		msg := "junco: enlarge the terminal (at least 40 x 12)"
		if w < 1 || h < 1 {
			return msg
		}
		lines := wrapText(msg, w)
		return strings.Join(block(lines, w, h, ""), "\n")
	}
	var lines []string
	lines = append(lines, m.header())
	foot := m.footer()
	if s := m.top(); s != nil {
		lines = append(lines, s.draw(m, w, h-1-len(foot))...)
	} else {
		body := m.body()
		if extra := len(foot) - 1; extra > 0 { // a long note (footer)
			body = body[:max(len(body)-extra, 0)]
		}
		lines = append(lines, body...)
	}
	lines = append(lines, foot...)
	return strings.Join(block(lines, w, h, m.e.g.ellipsis), "\n")
}

// footer is the note and the keys of the panel or the screen on top: one
// line, more for a screen that asks for them (tallFooter) when one line
// does not hold them. There the note never cuts a key: it stands before
// the keys where every key still fits in the lines they may take, else
// it takes lines of its own above them (the screen gives them up until
// the next key clears the note).
func (m Model) footer() []string {
	st := m.e.st
	var hk help.KeyMap
	switch m.focus {
	case panelDefine:
		hk = formHelp{k: m.e.keys, typing: m.form.typing}
	case panelResults:
		hk = sheetHelp{k: m.e.keys}
	default:
		hk = chartHelp{k: m.e.keys, typing: m.chart.editing}
	}
	keys, n := hk.ShortHelp(), 1
	w := max(m.w, 0)
	if s := m.top(); s != nil {
		keys = s.footer(m)
		if t, ok := s.(tallFooter); ok {
			n = max(min(t.footerLines(), 1+(m.h-minHeight)/6), 1)
			if m.note != "" {
				return m.noteAboveKeys(keys, n)
			}
		}
	}
	if m.top() == nil && m.note != "" && width(m.note)+2 > w {
		// On the panels a note longer than the line is wrapped above the
		// keys, never cut: the panels give up their bottom lines until the
		// next key clears it (View).
		return m.noteAboveKeys(keys, 1)
	}
	note := ""
	if m.note != "" {
		note = st.warn.Paint(cut(m.note, max(m.w-2, 0), m.e.g.ellipsis)) + "  "
	}
	return helpLines(m.help, keys, note, w, n)
}

// footerNoteLines is the most lines a note takes above a tall footer's
// keys; a longer note is cut at its end.
const footerNoteLines = 3

// noteAboveKeys is a tall footer of at most n lines of keys with the
// note: before the keys when all of them still fit in n lines, else
// wrapped on lines of its own above them.
func (m Model) noteAboveKeys(keys []key.Binding, n int) []string {
	st, g := m.e.st, m.e.g
	w := max(m.w, 0)
	unbounded := len(keys) + 2 // more lines than keys: helpLines cuts nothing
	lead := st.warn.Paint(m.note) + "  "
	if width(lead) <= w && len(helpLines(m.help, keys, lead, w, unbounded)) <= n {
		return helpLines(m.help, keys, lead, w, n)
	}
	nl := wrapText(m.note, max(w-2, 1))
	if len(nl) > footerNoteLines {
		nl = append(nl[:footerNoteLines-1], cut(strings.Join(nl[footerNoteLines-1:], " "), max(w-2, 0), g.ellipsis))
	}
	var out []string
	for _, l := range nl {
		out = append(out, st.warn.Paint(l))
	}
	return append(out, helpLines(m.help, keys, "", w, min(n, len(helpLines(m.help, keys, "", w, unbounded))))...)
}
