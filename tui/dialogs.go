package tui

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"github.com/charmbracelet/bubbles/key"
	tea "github.com/charmbracelet/bubbletea"

	"junco/sessions"
)

// Limits of the dialog fields, in runes (the store's own limits are
// larger or equal).
const (
	nameRunes  = 64
	titleRunes = 200
	noteRunes  = 1000
)

// dialogKind says what a text dialog is for.
type dialogKind int

const (
	dlgSave    dialogKind = iota // the next revision of the session in force: title, note
	dlgSaveNew                   // a new session: name, title, note
	dlgNote                      // a session note
	dlgReview                    // a review note
	dlgCopy                      // a copy in the user's own sessions: name
	dlgShare                     // who may review the saved session
)

// dialogField is one text box of a dialog.
type dialogField struct {
	label, hint string
	ed          lineEditor
	err         string
}

func (f dialogField) value() string { return strings.TrimSpace(f.ed.value()) }

// dialogScreen is a small form of text boxes. Enter submits from any box;
// an error is shown under the box it concerns and nothing typed is lost.
// quitAfter quits once the save succeeds (save first, at the quit
// question).
type dialogScreen struct {
	kind      dialogKind
	title     string
	intro     []string
	fields    []dialogField
	row       int
	err       string
	quitAfter bool
}

// staleScreen is the choice after a save found a newer revision.
type staleScreen struct {
	info      sessions.StaleError
	latest    *sessions.Revision // the newest revision's record, when readable
	req       saveRequest
	err       string
	quitAfter bool
}

// confirmScreen is a yes/no question before an action: y runs yes (with
// the question closed), n and esc close the question.
type confirmScreen struct {
	title string
	lines []string
	what  string // what y does
	yes   func(m *Model) tea.Cmd
}

// draftScreen offers the recovery drafts found at start or on opening a
// session: the one shown, and those still to offer (one per connection
// that stopped with unsaved changes).
type draftScreen struct {
	draft   *sessions.Draft
	changes []sessions.Change
	queue   []*sessions.Draft
	shown   int // drafts shown so far, this one included
}

// ---------------------------------------------------------------- opening

// openSave opens the save dialog: the next revision of the session in
// force, or with asNew (and before the first save) a new session. It
// returns the dialog (nil when saving is not available).
func (m *Model) openSave(asNew bool) *dialogScreen {
	if m.sess.store == nil {
		m.note = m.sess.noStoreText("saving")
		return nil
	}
	title := m.title()
	var d *dialogScreen
	if asNew || m.sess.name == "" {
		name := m.sess.suggest
		intro := "A session keeps every revision you save; nothing is overwritten."
		heading := "Save the junction as a session"
		if m.sess.name != "" {
			name = copyName(m.sess.name)
			intro = fmt.Sprintf("A new session starts from what is in force; %s keeps its revisions as they are.", m.sess.name)
			heading = "Save as a new session"
		}
		d = saveNewDialog(heading, intro, name, title, "")
	} else {
		d = &dialogScreen{kind: dlgSave, title: fmt.Sprintf("Save %s as revision %d", m.sess.name, m.sess.rev+1),
			intro: []string{fmt.Sprintf("Revision %d and older stay as they are.", m.sess.rev)},
			fields: []dialogField{
				{label: "Title", hint: "what the session is about (up to 200 characters)", ed: newLineEditorN(title, titleRunes)},
				{label: "Note", hint: "optional: a line for the session's notes, dated and signed", ed: newLineEditorN("", noteRunes)},
			}, row: 1}
	}
	m.push(d)
	return d
}

// copyName is the name offered for a copy of session name.
func copyName(name string) string {
	name += "-copy"
	if len(name) > nameRunes {
		name = name[:nameRunes]
	}
	return name
}

func saveNewDialog(heading, intro, name, title, note string) *dialogScreen {
	return &dialogScreen{kind: dlgSaveNew, title: heading, intro: []string{intro},
		fields: []dialogField{
			{label: "Session name", hint: "1 to 64 letters, digits, '-', '_' or '.', e.g. d7-lot417", ed: newLineEditorN(name, nameRunes)},
			{label: "Title", hint: "what the session is about (up to 200 characters)", ed: newLineEditorN(title, titleRunes)},
			{label: "Note", hint: "optional: a line for the session's notes, dated and signed", ed: newLineEditorN(note, noteRunes)},
		}}
}

// openNote opens the note dialog: a review note in review mode, else a
// session note.
func (m *Model) openNote() {
	if m.sess.readOnly {
		if m.sess.addReview == nil {
			m.note = "review notes cannot be added here: this workbench has no review service"
			return
		}
		m.push(&dialogScreen{kind: dlgReview, title: "Add a review note",
			intro:  []string{fmt.Sprintf("The note is kept with the session, signed %s and dated.", m.sess.user)},
			fields: []dialogField{{label: "Note", hint: "your remark for the session's owner", ed: newLineEditorN("", noteRunes)}}})
		return
	}
	m.push(&dialogScreen{kind: dlgNote, title: "Add a note to the session",
		intro:  []string{"The note is dated and signed, and saved with the next save (ctrl+s)."},
		fields: []dialogField{{label: "Note", hint: "e.g. lifetime from the decay of wafer 3", ed: newLineEditorN("", noteRunes)}}})
}

// openShare opens the dialog that shares the saved session read-only
// with other users of the server.
func (m *Model) openShare() {
	switch {
	case m.sess.readOnly:
		m.note = "read-only review: only the owner can share this session"
		return
	case m.sess.share == nil:
		m.note = "sharing needs the workbench served to a group (junco serve); here there is nobody to share with"
		return
	case m.sess.name == "":
		m.note = "save the session first (ctrl+s): only saved sessions can be shared"
		return
	}
	var now []string
	if m.sess.readers != nil {
		now = m.sess.readers(m.sess.name)
	}
	m.push(&dialogScreen{kind: dlgShare, title: "Share " + m.sess.name + " for review",
		intro: []string{"Reviewers see every revision read-only and can add review notes; they never change your session.",
			"Leave the box empty to stop sharing; it takes effect for new openings at once."},
		fields: []dialogField{{label: "Reviewers", hint: "user names separated by spaces or commas; * for everyone on the server",
			ed: newLineEditorN(strings.Join(now, " "), noteRunes)}}})
}

// parseReaders splits a reviewer list on spaces and commas.
func parseReaders(text string) []string {
	return strings.FieldsFunc(text, func(r rune) bool { return r == ',' || r == ' ' || r == ';' })
}

// openCopy opens the dialog that copies a reviewed session into the
// user's own sessions.
func (m *Model) openCopy() {
	if m.sess.copyToOwn == nil && m.sess.store == nil {
		m.note = m.sess.noStoreText("copying into your own sessions")
		return
	}
	name := m.sess.name
	if name == "" {
		name = "review-copy"
	} else if len(name)+5 <= nameRunes {
		name += "-mine"
	}
	m.push(&dialogScreen{kind: dlgCopy, title: "Copy into your own sessions",
		intro:  []string{"The copy is yours to change; the reviewed session stays as it is."},
		fields: []dialogField{{label: "Session name", hint: "1 to 64 letters, digits, '-', '_' or '.'", ed: newLineEditorN(name, nameRunes)}}})
}

// ---------------------------------------------------------------- keys

// dialogKeys is the key map of a text dialog.
type dialogKeys struct{ Submit, Next, Prev, Clear, Dismiss key.Binding }

func (k KeyMap) dialogKeys() dialogKeys {
	return dialogKeys{Submit: k.Submit, Next: k.NextField, Prev: k.PrevField, Clear: k.ClearToStart, Dismiss: k.Dismiss}
}

func (k dialogKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.Submit, k.Next, k.Prev, k.Clear, k.Dismiss}
}

// FullHelp is every key of a dialog, for the help screen.
func (k dialogKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (d *dialogScreen) footer(m Model) []key.Binding { return m.e.keys.dialogKeys().ShortHelp() }

func (d *dialogScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.dialogKeys()
	switch {
	case keyIs(km, k.Dismiss):
		m.close(d)
		switch d.kind {
		case dlgSave, dlgSaveNew, dlgCopy:
			m.note = "not saved; your edits are kept"
		case dlgShare:
			m.note = "sharing unchanged"
		default:
			m.note = "no note added"
		}
		return nil
	case keyIs(km, k.Submit):
		return d.submit(m)
	case keyIs(km, k.Next):
		d.row = (d.row + 1) % len(d.fields)
		return nil
	case keyIs(km, k.Prev):
		d.row = (d.row + len(d.fields) - 1) % len(d.fields)
		return nil
	}
	if d.row >= 0 && d.row < len(d.fields) {
		if _, changed := d.fields[d.row].ed.handle(km); changed {
			d.fields[d.row].err = ""
		}
	}
	return nil
}

func (d *dialogScreen) submit(m *Model) tea.Cmd {
	for i := range d.fields {
		d.fields[i].err = ""
	}
	d.err = ""
	switch d.kind {
	case dlgSave, dlgSaveNew:
		req := saveRequest{name: m.sess.name}
		f := d.fields
		if d.kind == dlgSaveNew {
			req.name, req.asNew = f[0].value(), true
			f = f[1:]
		}
		req.title, req.note = f[0].value(), f[1].value()
		if d.kind == dlgSaveNew {
			if err := checkNewName(req.name); err != nil {
				d.fields[0].err = err.Error()
				d.row = 0
				return nil
			}
		}
		err := m.save(req, false)
		return d.afterSave(m, req, err)
	case dlgNote:
		if err := m.addNote(d.fields[0].ed.value()); err != nil {
			d.fields[0].err = err.Error()
			return nil
		}
	case dlgReview:
		if err := m.addReview(d.fields[0].ed.value()); err != nil {
			d.fields[0].err = err.Error()
			return nil
		}
	case dlgShare:
		readers := parseReaders(d.fields[0].value())
		if err := m.sess.share(m.sess.name, readers); err != nil {
			d.fields[0].err = err.Error()
			return nil
		}
		if len(readers) == 0 {
			m.note = m.sess.name + " is no longer shared"
		} else {
			m.note = "shared " + m.sess.name + " read-only with " + strings.Join(readers, ", ")
		}
	case dlgCopy:
		cmd, err := m.copyToOwn(d.fields[0].value())
		if err != nil {
			d.fields[0].err = err.Error()
			return nil
		}
		m.close(d)
		return cmd
	}
	m.close(d)
	return nil
}

// afterSave shows the outcome of a save: the workbench on success (or
// quits when the save came from the quit question), else the error in
// place, or the choice when the revision the edits started from is no
// longer the newest.
func (d *dialogScreen) afterSave(m *Model, req saveRequest, err error) tea.Cmd {
	if err == nil {
		m.close(d)
		if d.quitAfter {
			return tea.Quit
		}
		return nil
	}
	var se *sessions.StaleError
	var ne *sessions.NameError
	var ee *sessions.ExistsError
	var nf *sessions.NotFoundError
	switch {
	case errors.As(err, &se) && !req.asNew:
		s := &staleScreen{info: *se, req: req, quitAfter: d.quitAfter}
		if hist, _, herr := m.sess.store.History(se.Session); herr == nil && len(hist) > 0 {
			r := hist[len(hist)-1]
			s.latest = &r
		}
		m.replace(d, s)
	case errors.As(err, &se):
		d.fields[0].err = fmt.Sprintf("a session named %s already exists (revision %d): choose another name, or open it with ctrl+o", req.name, se.Latest)
		d.row = 0
	case req.asNew && (errors.As(err, &ne) || errors.As(err, &ee)):
		d.fields[0].err = err.Error()
		d.row = 0
	case !req.asNew && errors.As(err, &nf):
		n := saveNewDialog("Save as a new session", "", req.name+"-copy", req.title, req.note)
		n.err = err.Error() + ". Give a name to save your edits as a new session."
		n.quitAfter = d.quitAfter
		m.replace(d, n)
	default:
		d.err = "not saved: " + err.Error() + ". Your edits are kept."
	}
	return nil
}

// staleKeys is the key map of the choice after a stale save.
type staleKeys struct{ SaveNext, SaveCopy, ShowNewer, Dismiss key.Binding }

func (k KeyMap) staleKeys() staleKeys {
	return staleKeys{SaveNext: k.SaveNext, SaveCopy: k.SaveCopy, ShowNewer: k.ShowNewer, Dismiss: k.Dismiss}
}

func (k staleKeys) ShortHelp() []key.Binding {
	return []key.Binding{k.SaveNext, k.SaveCopy, k.ShowNewer, k.Dismiss}
}

// FullHelp is every key of the newer-revision choice, for the help
// screen.
func (k staleKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (s *staleScreen) footer(m Model) []key.Binding { return m.e.keys.staleKeys().ShortHelp() }

func (s *staleScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.staleKeys()
	switch {
	case keyIs(km, k.SaveNext):
		req := s.req
		req.name = s.info.Session
		if err := m.save(req, true); err != nil {
			s.err = "not saved: " + err.Error() + ". Your edits are kept."
			return nil
		}
		m.close(s)
		if s.quitAfter {
			return tea.Quit
		}
	case keyIs(km, k.SaveCopy):
		r := s.req
		d := saveNewDialog("Save your edits as a new session",
			fmt.Sprintf("%s keeps its revisions as they are; your edits become revision 1 of the new session.", s.info.Session),
			copyName(s.info.Session), r.title, r.note)
		d.quitAfter = s.quitAfter
		m.replace(s, d)
	case keyIs(km, k.ShowNewer):
		in := s.info
		if in.Base < 1 {
			s.err = "your edits did not start from a revision of this session, so there is no older side to compare"
			return nil
		}
		if err := m.showDiff(in.Session, in.Base, in.Latest); err != nil {
			s.err = err.Error()
		}
	case keyIs(km, k.Dismiss):
		m.close(s)
		m.note = "not saved; your edits are kept (ctrl+s tries again)"
	}
	return nil
}

// confirmKeys is the key map of a yes/no question.
type confirmKeys struct{ Yes, No key.Binding }

func (c *confirmScreen) confirmKeys(k KeyMap) confirmKeys {
	return confirmKeys{Yes: key.NewBinding(key.WithKeys(k.Yes.Keys()...), key.WithHelp("y", c.what)),
		No: key.NewBinding(key.WithKeys(k.No.Keys()...), key.WithHelp("n/esc", "cancel"))}
}

func (c *confirmScreen) footer(m Model) []key.Binding { return c.confirmKeys(m.e.keys).ShortHelp() }

func (k confirmKeys) ShortHelp() []key.Binding { return []key.Binding{k.Yes, k.No} }

// FullHelp is every key of a yes/no question, for the help screen.
func (k confirmKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (c *confirmScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := c.confirmKeys(m.e.keys)
	switch {
	case keyIs(km, k.Yes):
		m.close(c)
		return c.yes(m)
	case keyIs(km, k.No):
		m.close(c)
		m.note = "nothing changed"
	}
	return nil
}

// draftKeys is the key map of the draft offer.
type draftKeys struct{ Restore, Discard, Later key.Binding }

func (k KeyMap) draftKeys() draftKeys {
	return draftKeys{Restore: k.DraftRestore, Discard: k.DraftDiscard, Later: k.DraftLater}
}

func (k draftKeys) ShortHelp() []key.Binding { return []key.Binding{k.Restore, k.Discard, k.Later} }

// FullHelp is every key of the draft offer, for the help screen.
func (k draftKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (d *draftScreen) footer(m Model) []key.Binding { return m.e.keys.draftKeys().ShortHelp() }

func (d *draftScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.e.keys.draftKeys()
	switch {
	case keyIs(km, k.Restore):
		return m.restoreDraft(d)
	case keyIs(km, k.Discard):
		if d.draft != nil {
			if err := m.sess.store.DiscardDraft(m.draftName(), d.draft.Key()); err != nil {
				m.note = "the draft could not be removed: " + err.Error()
			} else {
				m.note = "draft discarded"
			}
		}
		if !d.next(m) {
			m.close(d)
		}
	case keyIs(km, k.Later):
		return tea.Quit
	}
	return nil
}

// interrupt: ctrl+c at the offer quits and keeps the drafts for the
// next start.
func (d *draftScreen) interrupt(*Model) (tea.Cmd, bool) { return tea.Quit, true }

// quitScreen asks before dropping changes.
type quitScreen struct{}

// quitKeys is the key map of the quit question; SaveFirst is off without
// a store or in review.
type quitKeys struct{ SaveFirst, Yes, No key.Binding }

func (m Model) quitKeys() quitKeys {
	k := m.e.keys
	save := k.SaveFirst
	save.SetEnabled(m.sess.store != nil && !m.sess.readOnly)
	no := k.No
	no.SetKeys(slices.Concat(no.Keys(), []string{"q"})...)
	return quitKeys{SaveFirst: save, Yes: k.Yes, No: no}
}

func (k quitKeys) ShortHelp() []key.Binding { return []key.Binding{k.SaveFirst, k.Yes, k.No} }

// FullHelp is every key of the quit question, for the help screen.
func (k quitKeys) FullHelp() [][]key.Binding { return [][]key.Binding{k.ShortHelp()} }

func (s *quitScreen) footer(m Model) []key.Binding { return m.quitKeys().ShortHelp() }

func (s *quitScreen) update(m *Model, km tea.KeyMsg) tea.Cmd {
	k := m.quitKeys()
	switch {
	case keyIs(km, k.Yes):
		m.discardDraft()
		return tea.Quit
	case keyIs(km, k.SaveFirst):
		m.close(s)
		if d := m.openSave(false); d != nil {
			d.quitAfter = true
		}
	case keyIs(km, k.No):
		m.close(s)
	}
	return nil
}

// interrupt: ctrl+c at the question quits at once, writing the draft.
func (s *quitScreen) interrupt(m *Model) (tea.Cmd, bool) {
	_, cmd := m.shutdown()
	return cmd, true
}

func (s *quitScreen) draw(m Model, w, h int) []string {
	st := m.e.st
	msg := []string{
		st.strong.Paint("Quit junco?"),
		"",
		"The junction has changes that are not saved.",
	}
	keys := st.keyName.Paint("y") + " quit and drop the changes    " + st.keyName.Paint("n") + " or " + st.keyName.Paint("esc") + " stay"
	if m.sess.store != nil {
		msg = append(msg, "Saving keeps them as a new revision.", "", st.keyName.Paint("s")+" save first    "+keys)
	} else {
		msg = append(msg, wrapText(m.sess.noStoreText("saving")+".", min(w-4, 46))...)
		msg = append(msg, "", keys)
	}
	boxW := 0
	for _, l := range msg {
		boxW = max(boxW, width(l))
	}
	padTop := max((h-len(msg))/2, 0)
	padLeft := max((w-boxW)/2, 0)
	out := make([]string, padTop)
	for _, l := range msg {
		out = append(out, strings.Repeat(" ", padLeft)+l)
	}
	return block(out, w, h, m.e.g.ellipsis)
}

// ---------------------------------------------------------------- views

// frame draws a titled box of body lines in the middle of w x h.
func (m Model) frame(title string, body []string, w, h int) []string {
	st, g := m.e.st, m.e.g
	bw := m.frameWidth(w)
	lines := append([]string{rule(title, bw, glyphs{hbar: g.hbarHeavy}, st.heading), ""}, body...)
	top := max((h-len(lines))/2, 0)
	left := max((w-bw)/2, 0)
	out := make([]string, top, top+len(lines))
	for _, l := range lines {
		out = append(out, strings.Repeat(" ", left)+padRight(l, bw, g.ellipsis))
	}
	return block(out, w, h, g.ellipsis)
}

func (m Model) frameWidth(w int) int { return max(min(w-4, 88), 10) }

// wrapped wraps text to the frame and paints every line.
func wrapped(text string, w int, paint ink, indent string) []string {
	var out []string
	for _, l := range wrapText(text, max(w-len(indent), 8)) {
		out = append(out, indent+paint.Paint(l))
	}
	return out
}

func (d *dialogScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	bw := m.frameWidth(w)
	var body []string
	for _, t := range d.intro {
		if t != "" {
			body = append(body, wrapped(t, bw, st.muted, "")...)
		}
	}
	if len(body) > 0 {
		body = append(body, "")
	}
	labelW := 0
	for _, f := range d.fields {
		labelW = max(labelW, width(f.label))
	}
	labelW += 2
	boxW := max(bw-labelW-4, 6)
	for i, f := range d.fields {
		mark := "  "
		box := padRight(f.ed.value(), boxW, g.ellipsis)
		label := padRight(f.label, labelW, g.ellipsis)
		if i == d.row {
			mark = st.accent.Paint(g.cursor) + " "
			box = f.ed.view(boxW, st.selected, " ")
			label = st.strong.Paint(label)
		}
		body = append(body, mark+label+"["+box+"]")
		indent := strings.Repeat(" ", labelW+3)
		switch {
		case f.err != "":
			body = append(body, wrapped(g.bad+" "+f.err, bw, st.err, indent)...)
		case i == d.row && f.hint != "":
			body = append(body, wrapped(f.hint, bw, st.faint, indent)...)
		}
	}
	if d.err != "" {
		body = append(body, "")
		body = append(body, wrapped(g.bad+" "+d.err, bw, st.err, "")...)
	}
	return m.frame(d.title, body, w, h)
}

func (s *staleScreen) draw(m Model, w, h int) []string {
	st, g := m.e.st, m.e.g
	bw := m.frameWidth(w)
	in := s.info
	var body []string
	who := ""
	if s.latest != nil {
		who = fmt.Sprintf(", saved %s by %s", stamp(s.latest.Meta.Modified), dashed(s.latest.Meta.SavedBy))
	}
	if in.Base < 1 {
		body = append(body, wrapped(fmt.Sprintf("Session %s already exists: its newest revision is %d%s.", in.Session, in.Latest, who), bw, st.text, "")...)
	} else {
		body = append(body, wrapped(fmt.Sprintf("Session %s has revision %d%s, newer than revision %d your edits started from.", in.Session, in.Latest, who, in.Base), bw, st.text, "")...)
	}
	body = append(body, "")
	body = append(body, wrapped("Nothing is saved yet and your edits are kept. Choose:", bw, st.muted, "")...)
	k := m.e.keys
	opt := func(b key.Binding, text string) {
		body = append(body, "  "+st.keyName.Paint(padRight(b.Help().Key, 5, ""))+" "+text)
	}
	opt(k.SaveNext, fmt.Sprintf("save as the next revision anyway (revision %d stays as it is)", in.Latest))
	opt(k.SaveCopy, "save as a copy under a new name")
	if in.Base >= 1 {
		opt(k.ShowNewer, fmt.Sprintf("see what revision %d changed against revision %d", in.Latest, in.Base))
	}
	opt(k.Dismiss, "back to the workbench without saving")
	if s.err != "" {
		body = append(body, "")
		body = append(body, wrapped(g.bad+" "+s.err, bw, st.err, "")...)
	}
	return m.frame("A newer revision exists", body, w, h)
}

func (c *confirmScreen) draw(m Model, w, h int) []string {
	st := m.e.st
	bw := m.frameWidth(w)
	var body []string
	for _, l := range c.lines {
		body = append(body, wrapped(l, bw, st.text, "")...)
	}
	body = append(body, "", st.keyName.Paint("y")+" "+c.what+"    "+st.keyName.Paint("n")+" or "+st.keyName.Paint("esc")+" cancel")
	return m.frame(c.title, body, w, h)
}

func (o *draftScreen) draw(m Model, w, h int) []string {
	st := m.e.st
	d := o.draft
	bw := m.frameWidth(w)
	var body []string
	if d == nil {
		return m.frame("Recovery draft", nil, w, h)
	}
	what := "the junction that had not been saved yet"
	if d.Session != sessions.UnnamedDraft {
		what = "session " + d.Session
		if d.Base > 0 {
			what += fmt.Sprintf(" (started from revision %d)", d.Base)
		}
	}
	body = append(body, wrapped(fmt.Sprintf("The workbench stopped with unsaved changes to %s. A recovery draft of them was kept on %s.", what, stamp(d.Saved)), bw, st.text, "")...)
	if total := o.shown + len(o.queue); total > 1 {
		body = append(body, wrapped(fmt.Sprintf("Draft %d of %d: each connection that stopped with unsaved changes kept its own; discard this one to see the next.", o.shown, total), bw, st.muted, "")...)
	}
	body = append(body, "", st.strong.Paint("The draft against what is open now ("+plural(len(o.changes), "change", "changes")+")"))
	room := max(h-len(body)-7, 3)
	rows := m.changeLines(o.changes, bw)
	if len(rows) > room {
		more := len(rows) - room + 1
		rows = append(rows[:room-1], st.faint.Paint(fmt.Sprintf("  %s and %d more lines", m.e.g.ellipsis, more)))
	}
	body = append(body, rows...)
	k := m.e.keys
	body = append(body, "",
		st.keyName.Paint(k.DraftRestore.Help().Key)+" restore the draft    "+
			st.keyName.Paint(k.DraftDiscard.Help().Key)+" discard it    "+
			st.keyName.Paint(k.DraftLater.Help().Key)+" quit and decide later")
	return m.frame("A recovery draft was kept", body, w, h)
}

func dashed(s string) string {
	if strings.TrimSpace(s) == "" {
		return "-"
	}
	return s
}
