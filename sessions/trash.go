package sessions

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"path/filepath"
	"slices"
	"strings"
	"time"
)

// TrashEntry is one trashed session.
type TrashEntry struct {
	Session   string
	Trashed   time.Time
	Path      string
	Revisions int
}

// Trash moves a session, with all its revisions, to the trash, from where
// Restore brings it back. Drafts stay where they are.
func (s *Store) Trash(name string) (TrashEntry, error) {
	latest, err := s.Latest(name)
	if err != nil {
		return TrashEntry{}, err
	}
	if latest == 0 {
		return TrashEntry{}, &NotFoundError{Session: name}
	}
	revs, _, err := s.revisions(name)
	if err != nil {
		return TrashEntry{}, err
	}
	parent := filepath.Join(s.root, trashDir, name)
	if err := s.fs.MkdirAll(parent); err != nil {
		return TrashEntry{}, fmt.Errorf("creating %s: %w", parent, err)
	}
	src := s.sessionDir(name)
	when := s.now().UTC()
	for tries := 0; tries < 1000; tries++ {
		dst := filepath.Join(parent, when.Format(trashStamp))
		if _, err := s.fs.Stat(dst); err == nil {
			when = when.Add(time.Nanosecond)
			continue
		}
		if err := s.fs.Rename(src, dst); err != nil {
			return TrashEntry{}, fmt.Errorf("moving session %q to the trash: %w", name, err)
		}
		if err := s.fs.SyncDir(parent); err != nil {
			return TrashEntry{}, fmt.Errorf("session %q is in the trash but %s could not be flushed: %w", name, parent, err)
		}
		if err := s.fs.SyncDir(filepath.Dir(src)); err != nil {
			return TrashEntry{}, fmt.Errorf("session %q is in the trash but %s could not be flushed: %w", name, filepath.Dir(src), err)
		}
		return TrashEntry{Session: name, Trashed: when, Path: dst, Revisions: len(revs)}, nil
	}
	return TrashEntry{}, fmt.Errorf("moving session %q to the trash: no free trash slot", name)
}

// Trashed lists the trash, newest first within each session name.
func (s *Store) Trashed() ([]TrashEntry, []*DamagedError, error) {
	top := filepath.Join(s.root, trashDir)
	ents, err := s.fs.ReadDir(top)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, nil, nil
		}
		return nil, nil, &DamagedError{Path: top, Err: err}
	}
	var out []TrashEntry
	var probs []*DamagedError
	for _, e := range ents {
		name := e.Name()
		if strings.HasPrefix(name, ".") {
			continue
		}
		if ValidateName(name) != nil || !e.IsDir() {
			probs = append(probs, &DamagedError{Path: filepath.Join(top, name), Err: errors.New("not a trashed session; ignored")})
			continue
		}
		list, p := s.trashedOf(name)
		out = append(out, list...)
		probs = append(probs, p...)
	}
	return out, probs, nil
}

// trashedOf lists the trash entries of one name, newest first.
func (s *Store) trashedOf(name string) ([]TrashEntry, []*DamagedError) {
	dir := filepath.Join(s.root, trashDir, name)
	ents, err := s.fs.ReadDir(dir)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, nil
		}
		return nil, []*DamagedError{{Path: dir, Err: err}}
	}
	var out []TrashEntry
	var probs []*DamagedError
	for _, e := range ents {
		path := filepath.Join(dir, e.Name())
		when, err := time.Parse(trashStamp, e.Name())
		if err != nil || !e.IsDir() {
			probs = append(probs, &DamagedError{Path: path, Err: errors.New("not a trash entry; ignored")})
			continue
		}
		n := 0
		if revs, err := s.fs.ReadDir(path); err == nil {
			for _, r := range revs {
				if _, ok := parseRevFile(r.Name()); ok {
					n++
				}
			}
		}
		out = append(out, TrashEntry{Session: name, Trashed: when, Path: path, Revisions: n})
	}
	slices.SortFunc(out, func(a, b TrashEntry) int { return b.Trashed.Compare(a.Trashed) })
	return out, probs
}

// Restore brings the most recently trashed session called name back. It
// refuses when a session of that name exists (*ExistsError).
func (s *Store) Restore(name string) (TrashEntry, error) {
	if err := ValidateName(name); err != nil {
		return TrashEntry{}, err
	}
	list, _ := s.trashedOf(name)
	if len(list) == 0 {
		return TrashEntry{}, &NotFoundError{Session: name, What: "nothing of that name is in the trash"}
	}
	if latest, err := s.Latest(name); err == nil && latest > 0 {
		return TrashEntry{}, &ExistsError{Session: name, Why: fmt.Sprintf("a session of that name exists (revision %d); trash it first or import the trashed copy under another name", latest)}
	}
	if err := s.checkCase(name); err != nil {
		return TrashEntry{}, err
	}
	e := list[0]
	top := filepath.Join(s.root, sessionsDir)
	if err := s.fs.MkdirAll(top); err != nil {
		return TrashEntry{}, fmt.Errorf("creating %s: %w", top, err)
	}
	// An empty directory left by an unfinished first save is replaced by
	// the rename; a non-empty one makes it fail, and nothing moves.
	if err := s.fs.Rename(e.Path, s.sessionDir(name)); err != nil {
		return TrashEntry{}, fmt.Errorf("restoring session %q from %s: %w", name, e.Path, err)
	}
	_ = s.fs.Remove(filepath.Dir(e.Path)) // only succeeds when empty
	if err := s.fs.SyncDir(top); err != nil {
		return e, fmt.Errorf("session %q is restored but %s could not be flushed: %w", name, top, err)
	}
	return e, nil
}

// ---------------------------------------------------------------- drafts

// Draft is a crash-recovery copy of a session being edited: which
// session, which editor, the revision the editing started from, when the
// draft was saved and the document as it was.
type Draft struct {
	Session  string
	Editor   string
	Base     int
	Saved    time.Time
	Document *Document
	Path     string
}

// draftFile is the JSON form of a draft; the document inside is decoded
// (and migrated) like any session document.
type draftFile struct {
	Session  string          `json:"session"`
	Editor   string          `json:"editor"`
	Base     int             `json:"base_revision"`
	Saved    time.Time       `json:"saved"`
	Document json.RawMessage `json:"document"`
}

func (s *Store) draftPath(name, editor string) string {
	return filepath.Join(s.root, draftsDir, name, editor+draftSuffix)
}

// SaveDraft replaces the draft of session name by editor with doc
// (started from revision base). The replacement is atomic: a crash leaves
// the old draft or the new one. Callers save drafts every few seconds
// while a session has unsaved changes and discard them after a save.
func (s *Store) SaveDraft(name, editor string, base int, doc *Document) error {
	if err := ValidateName(name); err != nil {
		return err
	}
	if err := ValidateName(editor); err != nil {
		return fmt.Errorf("editor: %w", err)
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
		Base     int       `json:"base_revision"`
		Saved    time.Time `json:"saved"`
		Document rawJSON   `json:"document"`
	}
	data, err := encodeJSON(out{Session: name, Editor: editor, Base: base, Saved: s.now().UTC(), Document: rawJSON(body)})
	if err != nil {
		return err
	}
	dir := filepath.Dir(s.draftPath(name, editor))
	if err := s.fs.MkdirAll(dir); err != nil {
		return fmt.Errorf("creating %s: %w", dir, err)
	}
	tmp, err := s.writeTemp(dir, data, draftMode)
	if err != nil {
		return err
	}
	if err := s.fs.Rename(tmp, s.draftPath(name, editor)); err != nil {
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
		if ValidateName(name) != nil || !e.IsDir() {
			probs = append(probs, &DamagedError{Path: dir, Err: errors.New("not a draft directory; ignored")})
			continue
		}
		files, err := s.fs.ReadDir(dir)
		if err != nil {
			probs = append(probs, &DamagedError{Path: dir, Err: err})
			continue
		}
		for _, f := range files {
			fn := f.Name()
			if strings.HasPrefix(fn, ".") {
				s.sweepTemp(dir, f)
				continue
			}
			path := filepath.Join(dir, fn)
			editor, ok := strings.CutSuffix(fn, draftSuffix)
			if !ok || ValidateName(editor) != nil {
				probs = append(probs, &DamagedError{Path: path, Err: errors.New("not a draft file; ignored")})
				continue
			}
			d, err := s.readDraft(path)
			if err != nil {
				probs = append(probs, asDamaged(path, err))
				continue
			}
			if d.Session != name || d.Editor != editor {
				probs = append(probs, &DamagedError{Path: path, Err: fmt.Errorf("names session %q by %q, but is stored as %q by %q; ignored", d.Session, d.Editor, name, editor)})
				continue
			}
			out = append(out, *d)
		}
	}
	return out, probs, nil
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
	if err := decodeJSON(data, &f); err != nil {
		return nil, &DamagedError{Path: path, Err: err}
	}
	doc, err := Decode(f.Document)
	if err != nil {
		return nil, &DamagedError{Path: path, Err: fmt.Errorf("document: %w", err)}
	}
	return &Draft{Session: f.Session, Editor: f.Editor, Base: f.Base, Saved: f.Saved, Document: doc, Path: path}, nil
}

// DiscardDraft removes the draft of session name by editor; a missing
// draft is not an error.
func (s *Store) DiscardDraft(name, editor string) error {
	if err := ValidateName(name); err != nil {
		return err
	}
	if err := ValidateName(editor); err != nil {
		return fmt.Errorf("editor: %w", err)
	}
	path := s.draftPath(name, editor)
	if err := s.fs.Remove(path); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("discarding draft of %q: %w", name, err)
	}
	_ = s.fs.Remove(filepath.Dir(path)) // only succeeds when empty
	return nil
}
