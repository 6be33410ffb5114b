package tui

import (
	"errors"
	"fmt"
	"reflect"
	"slices"
	"strings"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/sessions"
)

// ShutdownMsg asks the workbench to write its crash-recovery draft at once
// (when there are unsaved changes) and quit. A server sends it to every
// connection when it shuts down.
type ShutdownMsg struct{}

// defaultDraftEvery is how long after a change the recovery draft is
// written.
const defaultDraftEvery = 3 * time.Second

// pinReference is the name under which the workbench stores its pin among
// a session's references.
const pinReference = "workbench pin"

// snapshot is the saveable state as last opened or saved: Dirty compares
// the state in force against it.
type snapshot struct {
	spec model.Spec
	iv   model.Range
	temp model.Range
	pin  *model.Spec
	// notes are the session notes.
	notes []string
	// measN is the number of measurements, extrN of kept fits, batchN of
	// kept batch tables.
	measN, extrN, batchN int
	// sweeps are the document's sweeps as opened: a sweep the user has
	// not changed is saved as it was.
	sweeps sessions.Sweeps
}

// editKey identifies the saveable state cheaply, so that a draft is only
// written when something changed since the last one.
type editKey struct {
	formRev  int
	iv, temp model.Range
	pin      *model.Result
	notes    int
	meas     int
	extr     int
	batches  int
}

// session is the persistence side of a workbench: the store, who works,
// which session and revision the edits started from, and the parts of the
// document the panels do not edit.
type session struct {
	store   *sessions.Store
	noStore string // why store is nil
	user    string // author of saves and notes
	editor  string // user as a draft editor name
	conn    string // this workbench run, for its drafts (sessions.NewConnID)
	// restored is whose draft was restored into the edits in force: it is
	// removed with this workbench's own draft after a save.
	restored *sessions.DraftKey
	now      func() time.Time
	// files is where measurements are read (nil: the local file system);
	// filesNote says where, for the import and batch screens.
	files     model.Files
	filesNote string

	name    string // session name; "" = not stored yet
	suggest string // suggested name for the first save
	rev     int    // revision the edits started from (0: none)
	// doc is the document as opened or last saved (nil: none yet); what
	// the workbench does not edit (measurements, extractions, other
	// references) is saved from it unchanged.
	doc     *sessions.Document
	notes   []string
	reviews []sessions.ReviewNote
	// meas are the measurements in force (imported data sets are
	// appended; nothing else changes them).
	meas []sessions.Measurement
	// extr are the fits kept with the session (ctrl+k on the fit screen).
	extr []sessions.Extraction
	// batches are the batch tables kept with the session (ctrl+k on the
	// batch screen; batch_keep.go).
	batches []sessions.Batch
	// pinRef names the reference the pin stands for; pinnedAt is when the
	// user pinned.
	pinRef   string
	pinnedAt time.Time
	base     snapshot

	readOnly  bool
	addReview func(text string) error
	copyToOwn func(doc *sessions.Document, name string) (int, error)
	share     func(session string, readers []string) error
	readers   func(session string) []string

	draftEvery   time.Duration
	draftPending bool
	draftKey     editKey
}

// noStoreText says why the session keys do nothing.
func (s session) noStoreText(what string) string {
	why := s.noStore
	if why == "" {
		why = "this workbench has no session store"
	}
	return strings.ToUpper(what[:1]) + what[1:] + " is not available here: " + why
}

// editKey returns the key of the saveable state in force.
func (m Model) editKey() editKey {
	return editKey{formRev: m.form.rev, iv: m.chart.iv, temp: m.chart.temp, pin: m.pin, notes: len(m.sess.notes), meas: len(m.sess.meas), extr: len(m.sess.extr), batches: len(m.sess.batches)}
}

// Dirty reports whether there are changes not yet saved: the junction, the
// I-V or temperature sweep, the pin or the notes differ from what was
// opened or last saved, or a field has text that is not in force. A
// workbench in review mode is never dirty.
func (m Model) Dirty() bool {
	if m.sess.readOnly {
		return false
	}
	b := m.sess.base
	if !reflect.DeepEqual(m.form.spec, b.spec) || len(m.form.bad()) > 0 {
		return true
	}
	if m.chart.iv != b.iv || m.chart.temp != b.temp || !slices.Equal(m.sess.notes, b.notes) || len(m.sess.meas) != b.measN || len(m.sess.extr) != b.extrN || len(m.sess.batches) != b.batchN {
		return true
	}
	switch {
	case m.pin == nil && b.pin == nil:
		return false
	case m.pin == nil || b.pin == nil:
		return true
	}
	return !reflect.DeepEqual(m.pin.Spec, *b.pin)
}

// setBaseline records the state in force as saved.
func (m *Model) setBaseline() {
	b := snapshot{spec: m.form.spec, iv: m.chart.iv, temp: m.chart.temp, notes: slices.Clone(m.sess.notes), measN: len(m.sess.meas), extrN: len(m.sess.extr), batchN: len(m.sess.batches)}
	if m.pin != nil {
		s := m.pin.Spec
		b.pin = &s
	}
	if m.sess.doc != nil {
		b.sweeps = m.sess.doc.Sweeps
	} else {
		b.sweeps = sessions.Sweeps{Bias: sweepOf(m.chart.iv), Temperature: sweepOf(m.chart.temp)}
	}
	m.sess.base = b
	m.sess.draftKey = m.editKey()
}

func sweepOf(r model.Range) sessions.Sweep {
	return sessions.Sweep{From: r.From, To: r.To, Step: r.Step}
}

// docChart names a chart of the workbench as a session does (the session
// format has one I-V chart).
func docChart(id string) string {
	if id == "iv-log" {
		return "iv"
	}
	return id
}

// title is the title the session has or, before the first save, would
// get.
func (m Model) title() string {
	switch {
	case m.sess.doc != nil:
		return m.sess.doc.Meta.Title
	case m.demo:
		return model.DemoJunction().Title
	}
	return m.name
}

// sweeps returns the sweeps to save: those the user changed, the others
// as opened. The session format has one bias sweep, the I-V one; the C-V
// sweep and the VF current of the temperature charts are view settings.
func (m Model) sweeps() sessions.Sweeps {
	b := m.sess.base
	s := b.sweeps
	s.Chart = docChart(m.chart.kind().id)
	if m.chart.iv != b.iv {
		s.Bias = sweepOf(m.chart.iv)
	}
	if m.chart.temp != b.temp {
		s.Temperature = sweepOf(m.chart.temp)
	}
	return s
}

// references returns the document's references with the pin: an
// unchanged pin keeps its stored record (results as computed when it was
// pinned), a new pin is computed now, no pin removes the workbench's.
func (m Model) references() ([]sessions.Reference, error) {
	var refs []sessions.Reference
	if m.sess.doc != nil {
		refs = slices.Clone(m.sess.doc.References)
	}
	name := m.sess.pinRef
	if name == "" {
		name = pinReference
	}
	at := slices.IndexFunc(refs, func(r sessions.Reference) bool { return r.Name == name })
	if m.pin == nil {
		if at >= 0 {
			refs = slices.Delete(refs, at, at+1)
		}
		return refs, nil
	}
	if b := m.sess.base.pin; b != nil && at >= 0 && reflect.DeepEqual(*b, m.pin.Spec) {
		return refs, nil
	}
	when := m.sess.pinnedAt
	if when.IsZero() {
		when = m.sess.now()
	}
	ref, err := sessions.Pin(name, m.pin.Spec, when)
	if err != nil {
		return nil, fmt.Errorf("the pinned junction cannot be evaluated: %w", err)
	}
	if at >= 0 {
		refs[at] = ref
	} else {
		refs = append(refs, ref)
	}
	return refs, nil
}

// document builds the session document of the state in force, titled
// title. It shares nothing the workbench changes later.
func (m Model) document(title string) (*sessions.Document, error) {
	var d sessions.Document
	if m.sess.doc != nil {
		d = *m.sess.doc
	} else {
		d = *sessions.NewDocument(title, m.sess.user, m.form.spec, m.sess.now())
	}
	d.Schema = sessions.SchemaVersion
	d.Meta.Title = title
	if d.Meta.Author == "" {
		d.Meta.Author = m.sess.user
	}
	d.Spec = m.form.spec
	d.Sweeps = m.sweeps()
	refs, err := m.references()
	if err != nil {
		return nil, err
	}
	d.References = refs
	d.Notes = slices.Clone(m.sess.notes)
	d.Reviews = slices.Clone(m.sess.reviews)
	if len(m.sess.meas) > 0 || len(d.Measurements) > 0 {
		d.Measurements = slices.Clone(m.sess.meas)
	}
	if len(m.sess.extr) > 0 || len(d.Extractions) > 0 {
		d.Extractions = slices.Clone(m.sess.extr)
	}
	if len(m.sess.batches) > 0 || len(d.Batches) > 0 {
		d.Batches = slices.Clone(m.sess.batches)
	}
	return &d, nil
}

// applyExtras puts what a document holds beyond the junction into the
// panels: the sweeps and chart, the pin and the notes. The form already
// has the document's Spec.
func (m *Model) applyExtras(doc *sessions.Document) {
	var notes []string
	fit := func(what string, s sessions.Sweep, into *model.Range) {
		r := s.Range()
		pts, err := r.Points()
		switch {
		case err != nil:
			notes = append(notes, fmt.Sprintf("the session's %s sweep cannot be drawn (%v); the workbench's default is shown and the session's is kept unless you change it", what, err))
		case len(pts) > maxChartPoints:
			notes = append(notes, fmt.Sprintf("the session's %s sweep has %d points, more than the %d the workbench draws; the default is shown and the session's is kept unless you change it", what, len(pts), maxChartPoints))
		case len(pts) < 2:
		default:
			*into = r
		}
	}
	fit("bias", doc.Sweeps.Bias, &m.chart.iv)
	fit("temperature", doc.Sweeps.Temperature, &m.chart.temp)
	m.chart.iF = doc.Spec.ForwardCurrentOrDefault()
	for i, k := range m.chart.kinds {
		if k.id == doc.Sweeps.Chart {
			m.chart.idx = i
		}
	}
	m.pin, m.sess.pinRef, m.sess.pinnedAt = nil, "", time.Time{}
	if len(doc.References) > 0 {
		ref := doc.References[0]
		for _, r := range doc.References {
			if r.Name == pinReference {
				ref = r
			}
		}
		m.sess.pinRef, m.sess.pinnedAt = ref.Name, ref.Pinned
		res, err := model.Evaluate(ref.Spec)
		if err != nil {
			notes = append(notes, fmt.Sprintf("reference %q cannot be evaluated (%v); it is kept in the session but not pinned", ref.Name, err))
			m.sess.pinRef = ""
		} else {
			m.pin = res
		}
	}
	m.sess.notes = slices.Clone(doc.Notes)
	m.sess.meas = slices.Clone(doc.Measurements)
	m.sess.extr = slices.Clone(doc.Extractions)
	m.sess.batches = slices.Clone(doc.Batches)
	if n := len(doc.Batches); n > 0 {
		notes = append(notes, "the session keeps "+plural(n, "batch table", "batch tables")+": B, then pgup shows them")
	}
	m.sess.reviews = slices.Clone(doc.Reviews)
	m.pushNotes()
	m.chart.render()
	if len(notes) > 0 {
		m.note = strings.Join(notes, "; ")
	}
}

// pushNotes hands the notes to the results sheet, made printable
// (sessions.Printable): a note from a file or a reviewer cannot reach the
// terminal with a control sequence.
func (m *Model) pushNotes() {
	notes := make([]string, len(m.sess.notes))
	for i, n := range m.sess.notes {
		notes[i] = sessions.Printable(n, 0, "")
	}
	reviews := slices.Clone(m.sess.reviews)
	for i := range reviews {
		reviews[i].Author = sessions.Printable(reviews[i].Author, 0, "")
		reviews[i].Text = sessions.Printable(reviews[i].Text, 0, "")
	}
	m.sheet.setNotes(notes, reviews)
}

// openDocument puts a stored (or imported) document in force in place of
// everything shown, as revision rev of session name ("" when not stored).
func (m *Model) openDocument(doc *sessions.Document, name string, rev int, readOnly bool) tea.Cmd {
	m.form = newForm(m.e, doc.Spec)
	m.formRev = m.form.rev
	m.chart = newChart(m.e, m.form.spec)
	m.chart.sync = m.syncCharts
	m.chart.w, m.chart.h = 0, 0
	m.sess.doc, m.sess.name, m.sess.rev = doc, name, rev
	m.sess.readOnly = readOnly
	m.demo = false
	m.name = doc.Meta.Title
	m.e.keys = m.e.keys.forMode(readOnly)
	m.applyExtras(doc)
	m.setBaseline()
	m.sheet.scroll = 0
	return tea.Batch(m.sync(), m.relayout())
}

// draftable reports whether drafts are written.
func (m Model) draftable() bool { return m.sess.store != nil && !m.sess.readOnly }

// draftKey is whose drafts this workbench writes: its user on its
// connection.
func (m Model) draftID() sessions.DraftKey {
	return sessions.DraftKey{Editor: m.sess.editor, Conn: m.sess.conn}
}

// dropDrafts removes this workbench's draft of session name and the one
// it restored from, if any.
func (m *Model) dropDrafts(name string) error {
	err := m.sess.store.DiscardDraft(name, m.draftID())
	if r := m.sess.restored; r != nil {
		if rerr := m.sess.store.DiscardDraft(name, *r); err == nil {
			err = rerr
		}
	}
	return err
}

// draftName is the session name the draft is kept under.
func (m Model) draftName() string {
	if m.sess.name != "" {
		return m.sess.name
	}
	return sessions.UnnamedDraft
}

type draftTickMsg struct{}

type draftWrittenMsg struct {
	name string
	err  error
}

// scheduleDraft starts the draft timer after a change: one tick, only
// while there are unsaved changes not yet in a draft, so that an idle
// workbench runs no timer.
func (m Model) scheduleDraft() (Model, tea.Cmd) {
	if _, offer := find[*draftScreen](m); !m.draftable() || m.sess.draftPending || offer {
		return m, nil
	}
	if m.editKey() == m.sess.draftKey || !m.Dirty() {
		return m, nil
	}
	m.sess.draftPending = true
	return m, tea.Tick(m.sess.draftEvery, func(time.Time) tea.Msg { return draftTickMsg{} })
}

// writeDraft returns a command that writes the draft of the state in
// force off the event loop.
func (m *Model) writeDraft() tea.Cmd {
	m.sess.draftPending = false
	if !m.draftable() || !m.Dirty() || m.editKey() == m.sess.draftKey {
		return nil
	}
	doc, err := m.document(m.title())
	name := m.draftName()
	if err != nil {
		return func() tea.Msg { return draftWrittenMsg{name: name, err: err} }
	}
	m.sess.draftKey = m.editKey()
	st, key, base := m.sess.store, m.draftID(), m.sess.rev
	return func() tea.Msg {
		return draftWrittenMsg{name: name, err: st.SaveDraft(name, key, base, doc)}
	}
}

// draftWritten handles the end of a draft write.
func (m *Model) draftWritten(msg draftWrittenMsg) {
	if msg.err != nil {
		// Tried again after the next change, not on a timer.
		m.note = "recovery draft not written: " + msg.err.Error()
		return
	}
	if !m.Dirty() || msg.name != m.draftName() {
		// Saved (or another session opened) while the draft was written.
		_ = m.sess.store.DiscardDraft(msg.name, m.draftID())
	}
}

// shutdown writes the draft at once and quits.
func (m Model) shutdown() (tea.Model, tea.Cmd) {
	if m.draftable() && m.Dirty() {
		if doc, err := m.document(m.title()); err == nil {
			_ = m.sess.store.SaveDraft(m.draftName(), m.draftID(), m.sess.rev, doc)
		}
	}
	return m, tea.Quit
}

// discardDraft removes the draft of the session in force (and the one
// restored into it).
func (m *Model) discardDraft() {
	if m.draftable() {
		if err := m.dropDrafts(m.draftName()); err != nil {
			m.note = "the recovery draft could not be removed: " + err.Error()
		}
	}
	m.sess.restored = nil
	m.sess.draftKey = m.editKey()
}

// offerDraft looks for the drafts of the session in force by this user,
// from any connection, and shows the offer of the newest that differs
// from what is open; the others follow when it is discarded. Drafts equal
// to what is open are removed.
func (m *Model) offerDraft() {
	if !m.draftable() {
		return
	}
	ds, probs, err := m.sess.store.DraftsOf(m.draftName(), m.sess.editor)
	if err == nil && len(probs) > 0 {
		err = probs[0]
	}
	if err != nil {
		m.note = "a recovery draft could not be read (it was left as it is): " + err.Error()
	}
	var queue []*sessions.Draft
	for i := range ds {
		queue = append(queue, &ds[i])
	}
	if d := (&draftScreen{queue: queue}); d.next(m) {
		m.push(d)
	}
}

// next moves the offer to the first draft of the queue that differs from
// what is open; false when none is left.
func (d *draftScreen) next(m *Model) bool {
	cur, err := m.document(m.title())
	for err == nil && len(d.queue) > 0 {
		x := d.queue[0]
		d.queue = d.queue[1:]
		changes := sessions.Diff(cur, x.Document, m.e.ascii)
		if len(changes) == 0 {
			_ = m.sess.store.DiscardDraft(m.draftName(), x.Key())
			continue
		}
		d.draft, d.changes = x, changes
		d.shown++
		return true
	}
	return false
}

// restoreDraft puts the offered draft in force as unsaved changes to the
// revision it started from. Other drafts of the offer stay where they are
// and are offered at the next opening.
func (m *Model) restoreDraft(o *draftScreen) tea.Cmd {
	d := o.draft
	left := len(o.queue)
	m.close(o)
	if d == nil {
		return nil
	}
	base := m.sess.base
	name, demo := m.sess.name, m.demo
	cmd := m.openDocument(d.Document, name, d.Base, false)
	if m.demo = demo && name == ""; m.demo {
		m.name = model.DemoJunction().Title
	}
	// The baseline stays what was opened: the draft's changes show as
	// unsaved until saved.
	m.sess.base = base
	m.sess.base.sweeps = d.Document.Sweeps
	m.sess.draftKey = m.editKey()
	if k := d.Key(); k != m.draftID() {
		m.sess.restored = &k
	}
	m.note = "draft of " + stamp(d.Saved) + " restored: its changes are not saved yet"
	if name != "" && d.Base > 0 {
		if latest, err := m.sess.store.Latest(name); err == nil && latest > d.Base {
			m.note += fmt.Sprintf("; it started from revision %d and the session now has revision %d", d.Base, latest)
		}
	}
	if left > 0 {
		m.note += "; " + plural(left, "other draft", "other drafts") + " of this session from other connections are kept and offered at the next opening"
	}
	return cmd
}

// stamp writes a time for the screen.
func stamp(t time.Time) string {
	if t.IsZero() {
		return "-"
	}
	return t.UTC().Format("2006-01-02 15:04 UTC")
}

// noteLine dates and signs a note for the session's notes.
func (m Model) noteLine(text string) string {
	return stamp(m.sess.now()) + ", " + m.sess.user + ": " + strings.TrimSpace(text)
}

// saveRequest is what a save asks for.
type saveRequest struct {
	name  string // the session to save into
	asNew bool   // a new session: first save, save as, copy
	title string
	note  string
}

// save stores the state in force. next saves as the next revision whatever
// is newest (the choice after a stale base). On success the state in
// force becomes the saved one; on any error nothing in the workbench
// changes.
func (m *Model) save(req saveRequest, next bool) error {
	st := m.sess.store
	if st == nil {
		return errors.New(m.sess.noStoreText("saving"))
	}
	doc, err := m.document(req.title)
	if err != nil {
		return err
	}
	if req.asNew && m.demo && m.sess.name == "" {
		doc.Notes = append([]string{"Started from the built-in demo junction of junco: invented demo data."}, doc.Notes...)
	}
	doc.Meta.Note = ""
	if strings.TrimSpace(req.note) != "" {
		doc.Notes = append(doc.Notes, m.noteLine(req.note))
		doc.Meta.Note = strings.TrimSpace(req.note)
	}
	var rev sessions.Revision
	switch {
	case req.asNew:
		if err := checkNewName(req.name); err != nil {
			return err
		}
		if m.sess.name != "" {
			doc.Meta.Origin = fmt.Sprintf("copied from session %s, revision %d", m.sess.name, m.sess.rev)
		}
		doc.Meta.Created = time.Time{}
		if m.sess.user != "" {
			doc.Meta.Author = m.sess.user
		}
		rev, err = st.Save(req.name, doc, 0)
	case next:
		doc.Meta.Origin = ""
		rev, err = st.SaveNext(req.name, doc, m.sess.rev)
	default:
		doc.Meta.Origin = ""
		rev, err = st.Save(req.name, doc, m.sess.rev)
	}
	if err != nil && rev.Number == 0 {
		return err
	}
	warn := err // written, but not flushed
	oldDraft := m.draftName()
	saved := *doc
	saved.Meta = rev.Meta
	m.sess.doc, m.sess.name, m.sess.rev = &saved, req.name, rev.Number
	m.sess.notes = slices.Clone(saved.Notes)
	if m.sess.pinRef == "" && m.pin != nil {
		m.sess.pinRef = pinReference
	}
	m.name = saved.Meta.Title
	m.pushNotes()
	m.setBaseline()
	if m.draftable() {
		_ = m.dropDrafts(oldDraft)
		if oldDraft != req.name {
			_ = st.DiscardDraft(req.name, m.draftID())
		}
		m.sess.restored = nil
	}
	m.note = fmt.Sprintf("saved as session %s, revision %d", req.name, rev.Number)
	if bad := m.form.bad(); len(bad) > 0 {
		var labels []string
		for _, i := range bad {
			labels = append(labels, m.form.defs[i].label)
		}
		m.note += "; the text not in force under " + strings.Join(labels, ", ") + " is not saved (its value in force is)"
	}
	if warn != nil {
		m.note += "; warning: " + warn.Error()
	}
	return nil
}

// checkNewName checks the name of a new session (sessions.ValidateName
// also refuses the reserved ones).
func checkNewName(name string) error { return sessions.ValidateName(name) }

// addReview adds a review note through the review service.
func (m *Model) addReview(text string) error {
	text = strings.TrimSpace(text)
	if text == "" {
		return errors.New("review note: the text is empty; write the note, or esc to cancel")
	}
	if m.sess.addReview == nil {
		return errors.New("review notes cannot be added here: this workbench has no review service")
	}
	if err := m.sess.addReview(text); err != nil {
		return err
	}
	m.sess.reviews = append(slices.Clone(m.sess.reviews), sessions.ReviewNote{Author: m.sess.user, Time: m.sess.now().UTC(), Text: text})
	m.pushNotes()
	m.note = "review note added"
	return nil
}

// addNote adds a dated line to the session notes (saved with the next
// save).
func (m *Model) addNote(text string) error {
	if strings.TrimSpace(text) == "" {
		return errors.New("note: the text is empty; write the note, or esc to cancel")
	}
	m.sess.notes = append(slices.Clone(m.sess.notes), m.noteLine(text))
	m.pushNotes()
	m.note = "note added; it is saved with the session (ctrl+s)"
	return nil
}

// copyToOwn copies the reviewed session into the user's own sessions and,
// when the copy can be opened there, opens it for editing.
func (m *Model) copyToOwn(name string) (tea.Cmd, error) {
	if err := checkNewName(name); err != nil {
		return nil, err
	}
	doc, err := m.document(m.title())
	if err != nil {
		return nil, err
	}
	from := m.sess.name
	if from == "" {
		from = m.title()
	}
	doc.Meta.Origin = fmt.Sprintf("copied from session %s, revision %d, under review", from, m.sess.rev)
	doc.Meta.Created = time.Time{}
	if m.sess.user != "" {
		doc.Meta.Author = m.sess.user
	}
	var rev int
	switch {
	case m.sess.copyToOwn != nil:
		rev, err = m.sess.copyToOwn(doc, name)
	case m.sess.store != nil:
		var r sessions.Revision
		r, err = m.sess.store.Save(name, doc, 0)
		rev = r.Number
		var se *sessions.StaleError
		if errors.As(err, &se) {
			err = &sessions.ExistsError{Session: name, Why: fmt.Sprintf("you already have a session of that name (revision %d); choose another name", se.Latest)}
		}
	default:
		err = errors.New(m.sess.noStoreText("copying"))
	}
	if err != nil {
		return nil, err
	}
	if m.sess.store != nil {
		if d, r, err := m.sess.store.Open(name, rev); err == nil {
			cmd := m.openDocument(d, name, r.Number, false)
			m.note = fmt.Sprintf("copied into your session %s (revision %d), open for editing", name, r.Number)
			return cmd, nil
		}
	}
	m.note = fmt.Sprintf("copied as your session %s, revision %d", name, rev)
	return nil, nil
}
