package sessions

import (
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"
)

// On-disk layout under the store's root directory:
//
//	sessions/NAME/rev-000001.json   revision 1 of session NAME (immutable)
//	sessions/NAME/rev-000002.json   revision 2, ...
//	sessions/NAME/.tmp-*            a revision being written (ignored)
//	drafts/NAME/EDITOR.json         crash-recovery draft of NAME by EDITOR
//	trash/NAME/STAMP/rev-*.json     a trashed session, STAMP its UTC time
//
// A revision is written to a temporary file in the session's directory,
// flushed, and then given its final name with link(2), which fails if the
// name exists: a revision number is claimed by exactly one writer, and a
// revision file, once visible, is complete and never changes. The
// directory is flushed after the link. Drafts are replaced atomically by
// rename. Trash and restore rename whole directories.
const (
	sessionsDir   = "sessions"
	draftsDir     = "drafts"
	trashDir      = "trash"
	tempPattern   = ".tmp-*"
	revPrefix     = "rev-"
	revSuffix     = ".json"
	draftSuffix   = ".json"
	trashStamp    = "20060102T150405.000000000Z"
	headerPrefix  = 4 << 10 // bytes read to list a revision
	maxClaimTries = 1 << 20 // revision numbers tried by SaveNext
)

// Store keeps the sessions of one user under a root directory. Its
// methods may be called from several goroutines, and several processes
// may share one root.
type Store struct {
	root string
	fs   fileSystem
	now  func() time.Time
	tool string
	user string
	// notices say what opening the store changed (modes tightened).
	notices []string
	// maxBytes caps the store's files (0: no cap; store_quota.go).
	maxBytes     int64
	maxBytesFlag string
}

// Options configure a Store.
type Options struct {
	// ToolVersion is written into every saved revision.
	ToolVersion string
	// User is written into every saved revision as who saved it.
	User string
	// Now returns the current time; nil means time.Now.
	Now func() time.Time
	// MaxBytes caps what the store's files may hold in all (revisions,
	// drafts, review notes; 0 = no cap): a write beyond is refused with a
	// *StoreQuotaError. MaxBytesFlag names the option that sets it.
	MaxBytes     int64
	MaxBytesFlag string
}

// New returns the store rooted at root (made absolute). Directories are
// created when the first session is saved, private to the owner. A store
// that other accounts can read (one written by an older junco) is made
// private here; Notices says so.
func New(root string, o Options) (*Store, error) {
	s, err := newStore(root, o, osFS{})
	if err != nil {
		return nil, err
	}
	s.notices = tightenNotices(s.root)
	return s, nil
}

// Notices returns what opening the store changed or could not change,
// one sentence each, for the user or a server's log.
func (s *Store) Notices() []string { return s.notices }

func newStore(root string, o Options, fsys fileSystem) (*Store, error) {
	if strings.TrimSpace(root) == "" {
		return nil, errors.New("session store: no data directory given")
	}
	abs, err := filepath.Abs(root)
	if err != nil {
		return nil, fmt.Errorf("session store %q: %w", root, err)
	}
	now := o.Now
	if now == nil {
		now = time.Now
	}
	return &Store{root: abs, fs: fsys, now: now, tool: o.ToolVersion, user: o.User, maxBytes: o.MaxBytes, maxBytesFlag: o.MaxBytesFlag}, nil
}

// Root returns the store's root directory.
func (s *Store) Root() string { return s.root }

// DefaultRoot returns the default store directory from the environment
// given by getenv: $XDG_DATA_HOME/junco when XDG_DATA_HOME is an absolute
// path (the XDG base-directory rule ignores relative ones), else
// $HOME/.local/share/junco.
func DefaultRoot(getenv func(string) string) (string, error) {
	if x := getenv("XDG_DATA_HOME"); x != "" && filepath.IsAbs(x) {
		return filepath.Join(x, "junco"), nil
	}
	if h := getenv("HOME"); h != "" && filepath.IsAbs(h) {
		return filepath.Join(h, ".local", "share", "junco"), nil
	}
	return "", errors.New("neither XDG_DATA_HOME nor HOME is set to an absolute path, so there is no default data directory; give one with --data DIR")
}

// ---------------------------------------------------------------- errors

// StaleError is returned by Save when the session has a revision newer
// than the one the editor started from.
type StaleError struct {
	Session string
	Base    int // the revision the editor started from
	Latest  int // the newest revision at the time of the save
}

func (e *StaleError) Error() string {
	if e.Base == 0 {
		return fmt.Sprintf("session %q already exists (revision %d); save as its next revision or as a copy under a new name", e.Session, e.Latest)
	}
	return fmt.Sprintf("session %q has revision %d, newer than revision %d you started from; save as the next revision anyway (revision %d is kept) or as a copy under a new name", e.Session, e.Latest, e.Base, e.Latest)
}

// NotFoundError is a session, revision, draft or trash entry that does
// not exist.
type NotFoundError struct {
	Session  string
	Revision int // 0 when the whole session is meant
	What     string
}

func (e *NotFoundError) Error() string {
	if e.What != "" {
		return fmt.Sprintf("session %q: %s", e.Session, e.What)
	}
	if e.Revision > 0 {
		return fmt.Sprintf("session %q has no revision %d", e.Session, e.Revision)
	}
	return fmt.Sprintf("no session named %q", e.Session)
}

// ExistsError is a name that is taken.
type ExistsError struct {
	Session string
	Why     string
}

func (e *ExistsError) Error() string { return fmt.Sprintf("session %q: %s", e.Session, e.Why) }

// DamagedError is a file of the store that cannot be read: it names the
// file and the problem. The file is left as it is.
type DamagedError struct {
	Path string
	Err  error
}

func (e *DamagedError) Error() string {
	return fmt.Sprintf("%s: %v (the file was left as it is)", e.Path, e.Err)
}

func (e *DamagedError) Unwrap() error { return e.Err }

// ---------------------------------------------------------------- paths

func (s *Store) sessionDir(name string) string { return filepath.Join(s.root, sessionsDir, name) }

func revFile(n int) string { return fmt.Sprintf("%s%06d%s", revPrefix, n, revSuffix) }

// parseRevFile returns the number of a revision file name in canonical
// form (rev-000001.json; more digits above 999999).
func parseRevFile(name string) (int, bool) {
	digits, ok := strings.CutPrefix(name, revPrefix)
	if !ok {
		return 0, false
	}
	digits, ok = strings.CutSuffix(digits, revSuffix)
	if !ok || len(digits) < 6 {
		return 0, false
	}
	n, err := strconv.Atoi(digits)
	if err != nil || n < 1 || revFile(n) != name {
		return 0, false
	}
	return n, true
}

// Revision describes one stored revision.
type Revision struct {
	Session string
	Number  int
	Path    string
	Size    int64
	Meta    Meta
	// Skipped are the newer revisions that could not be read when the
	// newest readable one was asked for (Open with revision 0).
	Skipped []*DamagedError
}

// revisions lists the revision numbers of a session directory, ascending,
// with problems for entries that do not belong there. A missing directory
// gives a *NotFoundError.
func (s *Store) revisions(name string) ([]int, []*DamagedError, error) {
	dir := s.sessionDir(name)
	ents, err := s.fs.ReadDir(dir)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, nil, &NotFoundError{Session: name}
		}
		return nil, nil, &DamagedError{Path: dir, Err: err}
	}
	var revs []int
	var probs []*DamagedError
	for _, e := range ents {
		n := e.Name()
		if strings.HasPrefix(n, ".") {
			s.sweepTemp(dir, e) // revisions being written, editor backups
			continue
		}
		r, ok := parseRevFile(n)
		if !ok || e.IsDir() {
			probs = append(probs, &DamagedError{Path: filepath.Join(dir, n), Err: errors.New("not a revision file (expected rev-NNNNNN.json); ignored")})
			continue
		}
		revs = append(revs, r)
	}
	slices.Sort(revs)
	return revs, probs, nil
}

// Latest returns the newest revision number of a session (0 for a
// session directory without revisions).
func (s *Store) Latest(name string) (int, error) {
	if err := ValidateName(name); err != nil {
		return 0, err
	}
	revs, _, err := s.revisions(name)
	if err != nil {
		return 0, err
	}
	if len(revs) == 0 {
		return 0, nil
	}
	return revs[len(revs)-1], nil
}

// ---------------------------------------------------------------- saving

// stamp returns the encoding of doc as revision of session name started
// from base: schema, modification time, tool version and base revision
// are set; the caller's document is not changed.
func (s *Store) stamp(doc *Document, base int) ([]byte, Meta, error) {
	if doc == nil {
		return nil, Meta{}, errors.New("no document to save")
	}
	c := *doc // only value fields of Meta change; slices are shared read-only
	now := s.now().UTC()
	c.Schema = SchemaVersion
	c.Meta.Modified = now
	if c.Meta.Created.IsZero() {
		c.Meta.Created = now
	}
	c.Meta.ToolVersion = s.tool
	c.Meta.SavedBy = s.user
	c.Meta.BasedOn = base
	data, err := Encode(&c)
	if err != nil {
		return nil, Meta{}, err
	}
	return data, c.Meta, nil
}

// Save stores doc as the next revision of session name. base is the
// revision the editor started from: 0 for a new session. When the session
// has a newer revision than base (another editor saved meanwhile, or the
// name is taken), Save stores nothing and returns a *StaleError; the
// caller may then use SaveNext or save a copy under another name.
// The document is validated first (*InvalidError).
func (s *Store) Save(name string, doc *Document, base int) (Revision, error) {
	if err := ValidateName(name); err != nil {
		return Revision{}, err
	}
	if base < 0 {
		return Revision{}, fmt.Errorf("session %q: base revision %d: allowed 0 (a new session) or a revision number", name, base)
	}
	data, meta, err := s.stamp(doc, base)
	if err != nil {
		return Revision{}, err
	}
	dir := s.sessionDir(name)
	latest := 0
	revs, _, err := s.revisions(name)
	var nf *NotFoundError
	switch {
	case errors.As(err, &nf):
		if base != 0 {
			return Revision{}, &NotFoundError{Session: name, What: fmt.Sprintf("the session no longer exists (revision %d was the base; it may have been trashed); save it as a new session", base)}
		}
	case err != nil:
		return Revision{}, err
	case len(revs) > 0:
		latest = revs[len(revs)-1]
	}
	next := base + 1
	if latest != base {
		if latest < base {
			return Revision{}, &NotFoundError{Session: name, Revision: base}
		}
		if base == 0 || !s.allDamaged(name, revs, base) {
			return Revision{}, &StaleError{Session: name, Base: base, Latest: latest}
		}
		// Every revision after base is unreadable: base is the newest
		// one can work from, and the next free number is taken.
		next = latest + 1
	}
	if base == 0 {
		if err := s.checkCase(name); err != nil {
			return Revision{}, err
		}
		if err := s.makeDir(dir); err != nil {
			return Revision{}, err
		}
	}
	return s.claim(name, data, meta, next, false)
}

// SaveNext stores doc as the next free revision of an existing session,
// whatever revision is newest: the choice of an editor whose base is
// stale and who wants to keep both. base is recorded as the revision the
// editor started from. It never fails because another writer was faster.
func (s *Store) SaveNext(name string, doc *Document, base int) (Revision, error) {
	if err := ValidateName(name); err != nil {
		return Revision{}, err
	}
	if base < 0 {
		return Revision{}, fmt.Errorf("session %q: base revision %d: allowed 0 or more", name, base)
	}
	data, meta, err := s.stamp(doc, base)
	if err != nil {
		return Revision{}, err
	}
	revs, _, err := s.revisions(name)
	if err != nil {
		return Revision{}, err
	}
	next := 1
	if len(revs) > 0 {
		next = revs[len(revs)-1] + 1
	}
	return s.claim(name, data, meta, next, true)
}

// makeDir creates a session directory and flushes its parents.
func (s *Store) makeDir(dir string) error {
	if err := s.fs.MkdirAll(dir); err != nil {
		return fmt.Errorf("creating %s: %w", dir, err)
	}
	if err := s.fs.SyncDir(filepath.Dir(dir)); err != nil {
		return fmt.Errorf("flushing %s: %w", filepath.Dir(dir), err)
	}
	return nil
}

// checkCase refuses a new name that differs from an existing session's
// only in letter case: on case-insensitive file systems they would be one
// directory.
func (s *Store) checkCase(name string) error {
	ents, err := s.fs.ReadDir(filepath.Join(s.root, sessionsDir))
	if err != nil {
		return nil // no sessions yet, or the create will report the problem
	}
	for _, e := range ents {
		if n := e.Name(); n != name && strings.EqualFold(n, name) {
			return &ExistsError{Session: name, Why: fmt.Sprintf("session %q exists; names that differ only in letter case would be the same on some file systems", n)}
		}
	}
	return nil
}

// Modes of what the store writes, whatever the umask: every directory
// and file of a store is private to its owner, so that other accounts of
// a shared host read no session; revisions and review notes are also
// read-only (they never change), drafts are replaced. Exports go where
// the user asks and are ordinary files.
const (
	dirMode      fs.FileMode = 0o700
	revisionMode fs.FileMode = 0o400
	draftMode    fs.FileMode = 0o600
	exportMode   fs.FileMode = 0o644
)

// writeTemp writes data to a new temporary file in dir with the given
// mode and flushes it.
func (s *Store) writeTemp(dir string, data []byte, mode fs.FileMode) (string, error) {
	if s.inStore(dir) {
		if err := s.checkQuota(int64(len(data))); err != nil {
			return "", err
		}
	}
	f, err := s.fs.CreateTemp(dir, tempPattern)
	if err != nil {
		return "", fmt.Errorf("writing in %s: %w", dir, err)
	}
	tmp := f.Name()
	fail := func(err error) (string, error) {
		f.Close()
		s.fs.Remove(tmp)
		return "", fmt.Errorf("writing %s: %w", tmp, err)
	}
	if _, err := f.Write(data); err != nil {
		return fail(err)
	}
	if err := f.Chmod(mode); err != nil {
		return fail(err)
	}
	if err := f.Sync(); err != nil {
		return fail(err)
	}
	if err := f.Close(); err != nil {
		s.fs.Remove(tmp)
		return "", fmt.Errorf("writing %s: %w", tmp, err)
	}
	return tmp, nil
}

// claim writes data and links it as revision n of the session (or, when
// next is set, the first free number from n on).
func (s *Store) claim(name string, data []byte, meta Meta, n int, next bool) (Revision, error) {
	dir := s.sessionDir(name)
	tmp, err := s.writeTemp(dir, data, revisionMode)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return Revision{}, &NotFoundError{Session: name, What: "the session was moved away while saving (trashed?); nothing was saved"}
		}
		return Revision{}, err
	}
	for tries := 0; ; tries++ {
		err = s.fs.Link(tmp, filepath.Join(dir, revFile(n)))
		if err == nil {
			break
		}
		if errors.Is(err, fs.ErrExist) {
			if !next {
				s.fs.Remove(tmp)
				latest, lerr := s.Latest(name)
				if lerr != nil || latest < n {
					latest = n
				}
				return Revision{}, &StaleError{Session: name, Base: meta.BasedOn, Latest: latest}
			}
			if tries < maxClaimTries {
				n++
				continue
			}
		}
		s.fs.Remove(tmp)
		if errors.Is(err, fs.ErrNotExist) {
			return Revision{}, &NotFoundError{Session: name, What: "the session was moved away while saving (trashed?); nothing was saved"}
		}
		return Revision{}, fmt.Errorf("saving revision %d of %q: %w", n, name, err)
	}
	rev := Revision{Session: name, Number: n, Path: filepath.Join(dir, revFile(n)), Size: int64(len(data)), Meta: meta}
	// The revision is complete under its name; the temporary name goes.
	// A failure to remove it leaves a hidden file that listing ignores.
	_ = s.fs.Remove(tmp)
	if err := s.fs.SyncDir(dir); err != nil {
		return rev, fmt.Errorf("revision %d of %q is written but %s could not be flushed, so it may not survive a power failure: %w", n, name, dir, err)
	}
	return rev, nil
}

// ---------------------------------------------------------------- reading

// Open reads revision rev of session name (0: the newest). A file that
// cannot be read or decoded gives a *DamagedError naming it.
func (s *Store) Open(name string, rev int) (*Document, Revision, error) {
	if err := ValidateName(name); err != nil {
		return nil, Revision{}, err
	}
	if rev < 0 {
		return nil, Revision{}, fmt.Errorf("session %q: revision %d: allowed 1 or more (0 for the newest)", name, rev)
	}
	if rev == 0 {
		return s.openNewest(name)
	}
	return s.openRevision(name, rev)
}

// openRevision reads revision rev (1 or more) of session name.
func (s *Store) openRevision(name string, rev int) (*Document, Revision, error) {
	path := filepath.Join(s.sessionDir(name), revFile(rev))
	doc, size, err := s.readDocument(path)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			if _, _, derr := s.revisions(name); derr != nil {
				return nil, Revision{}, derr
			}
			return nil, Revision{}, &NotFoundError{Session: name, Revision: rev}
		}
		return nil, Revision{}, err
	}
	// Review notes reviewers added beside the revisions join the ones the
	// revision carries (AddReviewNote); damaged note files are left out
	// here and reported by ReviewNotes.
	if side, _, err := s.ReviewNotes(name); err == nil && len(side) > 0 {
		doc.Reviews = mergeReviews(doc.Reviews, side)
	}
	return doc, Revision{Session: name, Number: rev, Path: path, Size: size, Meta: doc.Meta}, nil
}

// mergeReviews adds the notes of extra not already in have (same author,
// time and text), keeping time order.
func mergeReviews(have, extra []ReviewNote) []ReviewNote {
	out := append([]ReviewNote(nil), have...)
	for _, n := range extra {
		dup := false
		for _, h := range have {
			if h.Author == n.Author && h.Text == n.Text && h.Time.Equal(n.Time) {
				dup = true
				break
			}
		}
		if !dup {
			out = append(out, n)
		}
	}
	slices.SortStableFunc(out, func(a, b ReviewNote) int { return a.Time.Compare(b.Time) })
	return out
}

// readDocument reads and decodes a document file.
func (s *Store) readDocument(path string) (*Document, int64, error) {
	data, more, err := s.fs.ReadFile(path, MaxDocumentBytes)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, 0, err
		}
		return nil, 0, &DamagedError{Path: path, Err: err}
	}
	if more {
		return nil, 0, &DamagedError{Path: path, Err: fmt.Errorf("larger than the %d MiB a session may have", MaxDocumentBytes>>20)}
	}
	doc, err := Decode(data)
	if err != nil {
		return nil, 0, &DamagedError{Path: path, Err: err}
	}
	return doc, int64(len(data)), nil
}

// readHeader reads the metadata of a revision file, decoding only its
// first bytes when they hold the whole header.
func (s *Store) readHeader(path string) (Meta, int64, error) {
	prefix, more, err := s.fs.ReadFile(path, headerPrefix)
	if err != nil {
		return Meta{}, 0, &DamagedError{Path: path, Err: err}
	}
	h, err := decodeHeader(prefix, more)
	if err == nil {
		if ps := h.Meta.problems(); len(ps) > 0 {
			return Meta{}, 0, &DamagedError{Path: path, Err: &InvalidError{Problems: ps}}
		}
		info, serr := s.fs.Stat(path)
		if serr != nil {
			return Meta{}, 0, &DamagedError{Path: path, Err: serr}
		}
		return h.Meta, info.Size(), nil
	}
	if err != errShort {
		return Meta{}, 0, &DamagedError{Path: path, Err: err}
	}
	doc, size, err := s.readDocument(path)
	if err != nil {
		return Meta{}, 0, err
	}
	return doc.Meta, size, nil
}

// History lists the revisions of a session, oldest first, with the files
// that could not be read. Only each revision's header is read; Open reads
// and checks a whole revision.
func (s *Store) History(name string) ([]Revision, []*DamagedError, error) {
	if err := ValidateName(name); err != nil {
		return nil, nil, err
	}
	revs, probs, err := s.revisions(name)
	if err != nil {
		return nil, nil, err
	}
	if len(revs) == 0 {
		return nil, probs, &NotFoundError{Session: name}
	}
	out := make([]Revision, 0, len(revs))
	for _, n := range revs {
		path := filepath.Join(s.sessionDir(name), revFile(n))
		meta, size, err := s.readHeader(path)
		if err != nil {
			probs = append(probs, asDamaged(path, err))
			continue
		}
		out = append(out, Revision{Session: name, Number: n, Path: path, Size: size, Meta: meta})
	}
	return out, probs, nil
}

func asDamaged(path string, err error) *DamagedError {
	var de *DamagedError
	if errors.As(err, &de) {
		return de
	}
	return &DamagedError{Path: path, Err: err}
}

// Summary is one session in a listing: its newest readable revision and
// how many there are.
type Summary struct {
	Name      string
	Revisions int
	// Latest is the newest revision whose header reads (Number 0 when
	// none does).
	Latest Revision
	// Damaged are the revisions newer than Latest that cannot be read,
	// newest first: a session with any is damaged, and shown so.
	Damaged []*DamagedError
}

// List returns every session, sorted by name, with its newest readable
// revision, and a problem for every entry that cannot be read: an
// unreadable revision (also in its session's Damaged), a directory with an
// invalid name, a stray file. Problems never hide a session. Only
// revision headers are read, from the newest down to the first that reads.
func (s *Store) List() ([]Summary, []*DamagedError, error) {
	top := filepath.Join(s.root, sessionsDir)
	ents, err := s.fs.ReadDir(top)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, nil, nil
		}
		return nil, nil, &DamagedError{Path: top, Err: err}
	}
	var out []Summary
	var probs []*DamagedError
	for _, e := range ents {
		name := e.Name()
		if strings.HasPrefix(name, ".") {
			continue
		}
		path := filepath.Join(top, name)
		if !e.IsDir() {
			probs = append(probs, &DamagedError{Path: path, Err: errors.New("not a session directory; ignored")})
			continue
		}
		if err := ValidateName(name); err != nil {
			probs = append(probs, &DamagedError{Path: path, Err: fmt.Errorf("not a valid session name (%s); ignored", err.(*NameError).Why)})
			continue
		}
		revs, p, err := s.revisions(name)
		probs = append(probs, p...)
		if err != nil {
			probs = append(probs, asDamaged(path, err))
			continue
		}
		if len(revs) == 0 {
			continue // created, first revision never completed
		}
		sum := Summary{Name: name, Revisions: len(revs)}
		for i := len(revs) - 1; i >= 0; i-- {
			rpath := filepath.Join(path, revFile(revs[i]))
			meta, size, err := s.readHeader(rpath)
			if err != nil {
				sum.Damaged = append(sum.Damaged, asDamaged(rpath, err))
				continue
			}
			sum.Latest = Revision{Session: name, Number: revs[i], Path: rpath, Size: size, Meta: meta}
			break
		}
		probs = append(probs, sum.Damaged...)
		out = append(out, sum)
	}
	slices.SortFunc(out, func(a, b Summary) int { return strings.Compare(a.Name, b.Name) })
	return out, probs, nil
}

// Import decodes a session document from elsewhere (validated like any
// other, its schema migrated) and stores it as revision 1 of a new session
// named as, or, when as is empty, after the file's base name without
// extension. source names the file in messages and in the record.
func (s *Store) Import(data []byte, source, as string) (Revision, error) {
	doc, err := Decode(data)
	if err != nil {
		return Revision{}, fmt.Errorf("%s: %w", source, err)
	}
	name := as
	if name == "" {
		base := filepath.Base(source)
		name = strings.TrimSuffix(base, filepath.Ext(base))
		if err := ValidateName(name); err != nil {
			return Revision{}, fmt.Errorf("%s: the file name does not make a session name (%w); choose one with --as NAME", source, err)
		}
	}
	doc.Meta.Origin = "imported from " + filepath.Base(source)
	rev, err := s.Save(name, doc, 0)
	var se *StaleError
	if errors.As(err, &se) {
		return Revision{}, &ExistsError{Session: name, Why: fmt.Sprintf("a session of that name already exists (revision %d); nothing was imported; choose another name with --as NAME", se.Latest)}
	}
	return rev, err
}

// RestoreRevision stores an old revision of a session again as its newest
// revision, recording where it came from. Nothing is removed.
func (s *Store) RestoreRevision(name string, rev int) (Revision, error) {
	if rev < 1 {
		return Revision{}, fmt.Errorf("session %q: revision %d: allowed 1 or more", name, rev)
	}
	doc, _, err := s.Open(name, rev)
	if err != nil {
		return Revision{}, err
	}
	doc.Meta.Origin = fmt.Sprintf("restored from revision %d", rev)
	doc.Meta.Note = "" // the note of the old save is not this one's
	return s.SaveNext(name, doc, rev)
}
