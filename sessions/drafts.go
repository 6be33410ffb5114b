package sessions

import (
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"junco/sessions/internal/strictjson"
	"path/filepath"
	"slices"
	"strings"
	"time"
)

// Drafts are kept per editor and per connection, so that one user
// working on one session from two connections keeps two drafts:
//
//	drafts/NAME/EDITOR/CONN.json   draft of NAME by EDITOR on connection CONN
//	drafts/NAME/EDITOR.json        draft written before drafts had connections
//
// A workbench makes a connection ID when it starts (NewConnID), writes its
// drafts under it, and at the next opening of a session offers every
// draft of the user on that session, whichever connection wrote it.

// DraftKey names whose draft it is: the editor (a user name, see EditorID)
// and the connection (a workbench run, see NewConnID; "" for drafts of
// older versions, one per editor).
type DraftKey struct {
	Editor string
	Conn   string
}

func (k DraftKey) validate() error {
	if err := ValidateName(k.Editor); err != nil {
		return fmt.Errorf("editor: %w", err)
	}
	if k.Conn != "" {
		if err := ValidateName(k.Conn); err != nil {
			return fmt.Errorf("connection: %w", err)
		}
	}
	return nil
}

// NewConnID returns a new connection ID for drafts: the UTC time of now
// and 48 random bits, a valid name unique in practice.
func NewConnID(now time.Time) string {
	var b [6]byte
	_, _ = rand.Read(b[:]) // crypto/rand.Read never fails
	return now.UTC().Format("20060102T150405Z") + "-" + hex.EncodeToString(b[:])
}

// Draft is a crash-recovery copy of a session being edited: which
// session, which editor on which connection, the revision the editing
// started from, when the draft was saved and the document as it was.
type Draft struct {
	Session  string
	Editor   string
	Conn     string // "" for a draft of an older version
	Base     int
	Saved    time.Time
	Document *Document
	Path     string
}

// Key returns whose draft it is.
func (d *Draft) Key() DraftKey { return DraftKey{Editor: d.Editor, Conn: d.Conn} }

// draftFile is the JSON form of a draft; the document inside is decoded
// (and migrated) like any session document.
type draftFile struct {
	Session  string          `json:"session"`
	Editor   string          `json:"editor"`
	Conn     string          `json:"connection,omitempty"`
	Base     int             `json:"base_revision"`
	Saved    time.Time       `json:"saved"`
	Document json.RawMessage `json:"document"`
}

// draftPath is the file of the draft of name by k (both validated).
func (s *Store) draftPath(name string, k DraftKey) string {
	if k.Conn == "" {
		return filepath.Join(s.root, draftsDir, name, k.Editor+draftSuffix)
	}
	return filepath.Join(s.root, draftsDir, name, k.Editor, k.Conn+draftSuffix)
}

// SaveDraft replaces the draft of session name by k with doc (started
// from revision base). The replacement is atomic: a crash leaves the old
// draft or the new one. Callers save drafts every few seconds while a
// session has unsaved changes and discard them after a save.
func (s *Store) SaveDraft(name string, k DraftKey, base int, doc *Document) error {
	if err := validateDraftSession(name); err != nil {
		return err
	}
	if err := k.validate(); err != nil {
		return err
	}
	if doc == nil {
		return errors.New("no document to keep as a draft")
	}
	c := *doc
	c.Schema = SchemaVersion
	body, err := Encode(&c)
	if err != nil {
		return err
	}
	type out struct {
		Session  string    `json:"session"`
		Editor   string    `json:"editor"`
		Conn     string    `json:"connection,omitempty"`
		Base     int       `json:"base_revision"`
		Saved    time.Time `json:"saved"`
		Document rawJSON   `json:"document"`
	}
	data, err := strictjson.Encode(out{Session: name, Editor: k.Editor, Conn: k.Conn, Base: base, Saved: s.now().UTC(), Document: rawJSON(body)})
	if err != nil {
		return err
	}
	path := s.draftPath(name, k)
	dir := filepath.Dir(path)
	if err := s.fs.MkdirAll(dir); err != nil {
		return fmt.Errorf("creating %s: %w", dir, err)
	}
	tmp, err := s.writeTemp(dir, data, draftMode)
	if err != nil {
		return err
	}
	if err := s.fs.Rename(tmp, path); err != nil {
		s.fs.Remove(tmp)
		return fmt.Errorf("saving draft of %q: %w", name, err)
	}
	if err := s.fs.SyncDir(dir); err != nil {
		return fmt.Errorf("draft of %q is written but %s could not be flushed: %w", name, dir, err)
	}
	return nil
}

// rawJSON is pre-encoded JSON, embedded in compact form (a draft is a
// recovery copy, not a record to review, so it need not diff well).
type rawJSON []byte

func (r rawJSON) MarshalJSON() ([]byte, error) { return r, nil }

// Drafts returns every draft in the store, for offering recovery at
// start, with problems for drafts that cannot be read.
func (s *Store) Drafts() ([]Draft, []*DamagedError, error) {
	top := filepath.Join(s.root, draftsDir)
	ents, err := s.fs.ReadDir(top)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, nil, nil
		}
		return nil, nil, &DamagedError{Path: top, Err: err}
	}
	var out []Draft
	var probs []*DamagedError
	for _, e := range ents {
		name := e.Name()
		if strings.HasPrefix(name, ".") {
			continue
		}
		dir := filepath.Join(top, name)
		if validateDraftSession(name) != nil || !e.IsDir() {
			probs = append(probs, &DamagedError{Path: dir, Err: errors.New("not a draft directory; ignored")})
			continue
		}
		ds, p := s.draftsIn(name, "")
		out = append(out, ds...)
		probs = append(probs, p...)
	}
	return out, probs, nil
}

// draftsIn reads the drafts of session name: by editor only, or by every
// editor when editor is "".
func (s *Store) draftsIn(name, editor string) ([]Draft, []*DamagedError) {
	dir := filepath.Join(s.root, draftsDir, name)
	files, err := s.fs.ReadDir(dir)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, nil
		}
		return nil, []*DamagedError{{Path: dir, Err: err}}
	}
	var out []Draft
	var probs []*DamagedError
	read := func(path string, k DraftKey) {
		d, err := s.readDraft(path)
		switch {
		case err != nil:
			probs = append(probs, asDamaged(path, err))
		case d.Session != name || d.Key() != k:
			probs = append(probs, &DamagedError{Path: path, Err: fmt.Errorf("names session %q by %q (connection %q), but is stored as %q by %q (connection %q); ignored", d.Session, d.Editor, d.Conn, name, k.Editor, k.Conn)})
		default:
			out = append(out, *d)
		}
	}
	for _, f := range files {
		fn := f.Name()
		path := filepath.Join(dir, fn)
		if strings.HasPrefix(fn, ".") {
			s.sweepTemp(dir, f)
			continue
		}
		if f.IsDir() {
			if ValidateName(fn) != nil {
				probs = append(probs, &DamagedError{Path: path, Err: errors.New("not a draft directory; ignored")})
				continue
			}
			if editor != "" && fn != editor {
				continue
			}
			conns, err := s.fs.ReadDir(path)
			if err != nil {
				probs = append(probs, &DamagedError{Path: path, Err: err})
				continue
			}
			for _, c := range conns {
				if strings.HasPrefix(c.Name(), ".") {
					s.sweepTemp(path, c)
					continue
				}
				conn, ok := strings.CutSuffix(c.Name(), draftSuffix)
				if !ok || conn == "" || ValidateName(conn) != nil || c.IsDir() {
					probs = append(probs, &DamagedError{Path: filepath.Join(path, c.Name()), Err: errors.New("not a draft file; ignored")})
					continue
				}
				read(filepath.Join(path, c.Name()), DraftKey{Editor: fn, Conn: conn})
			}
			continue
		}
		ed, ok := strings.CutSuffix(fn, draftSuffix)
		if !ok || ValidateName(ed) != nil {
			probs = append(probs, &DamagedError{Path: path, Err: errors.New("not a draft file; ignored")})
			continue
		}
		if editor != "" && ed != editor {
			continue
		}
		read(path, DraftKey{Editor: ed})
	}
	return out, probs
}

func (s *Store) readDraft(path string) (*Draft, error) {
	data, more, err := s.fs.ReadFile(path, MaxDocumentBytes)
	if err != nil {
		return nil, &DamagedError{Path: path, Err: err}
	}
	if more {
		return nil, &DamagedError{Path: path, Err: errors.New("too large")}
	}
	var f draftFile
	if err := strictjson.Decode(data, &f); err != nil {
		return nil, &DamagedError{Path: path, Err: err}
	}
	doc, err := Decode(f.Document)
	if err != nil {
		return nil, &DamagedError{Path: path, Err: fmt.Errorf("document: %w", err)}
	}
	return &Draft{Session: f.Session, Editor: f.Editor, Conn: f.Conn, Base: f.Base, Saved: f.Saved, Document: doc, Path: path}, nil
}

// DiscardDraft removes the draft of session name by k; a missing draft is
// not an error.
func (s *Store) DiscardDraft(name string, k DraftKey) error {
	if err := validateDraftSession(name); err != nil {
		return err
	}
	if err := k.validate(); err != nil {
		return err
	}
	path := s.draftPath(name, k)
	if err := s.fs.Remove(path); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("discarding draft of %q: %w", name, err)
	}
	// Folders left empty go; these removals only succeed when empty.
	dir := filepath.Dir(path)
	if k.Conn != "" {
		_ = s.fs.Remove(dir)
		dir = filepath.Dir(dir)
	}
	_ = s.fs.Remove(dir)
	return nil
}

// DraftsOf returns every draft of session name by editor, whichever
// connection wrote it, newest first, with problems for the draft files of
// that editor that cannot be read (they are left as they are).
func (s *Store) DraftsOf(name, editor string) ([]Draft, []*DamagedError, error) {
	if err := validateDraftSession(name); err != nil {
		return nil, nil, err
	}
	if err := ValidateName(editor); err != nil {
		return nil, nil, fmt.Errorf("editor: %w", err)
	}
	out, probs := s.draftsIn(name, editor)
	slices.SortStableFunc(out, func(a, b Draft) int { return b.Saved.Compare(a.Saved) })
	return out, probs, nil
}

// DraftOf returns the newest draft of session name by editor (of any
// connection), or nil and no error when there is none. A draft file that
// cannot be read gives a *DamagedError naming it when no other draft
// reads; the file is left as it is.
func (s *Store) DraftOf(name, editor string) (*Draft, error) {
	ds, probs, err := s.DraftsOf(name, editor)
	switch {
	case err != nil:
		return nil, err
	case len(ds) > 0:
		return &ds[0], nil
	case len(probs) > 0:
		return nil, probs[0]
	}
	return nil, nil
}

// HasDraft reports whether editor has a draft of session name, of any
// connection.
func (s *Store) HasDraft(name, editor string) bool {
	if validateDraftSession(name) != nil || ValidateName(editor) != nil {
		return false
	}
	if _, err := s.fs.Stat(s.draftPath(name, DraftKey{Editor: editor})); err == nil {
		return true
	}
	ents, err := s.fs.ReadDir(filepath.Join(s.root, draftsDir, name, editor))
	if err != nil {
		return false
	}
	for _, e := range ents {
		if strings.HasSuffix(e.Name(), draftSuffix) && !strings.HasPrefix(e.Name(), ".") {
			return true
		}
	}
	return false
}
