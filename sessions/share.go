package sessions

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"
)

// Review notes written by reviewers live beside the owner's revisions, one
// immutable file per note, so that a reviewer adds to a session without
// ever writing a revision of it:
//
//	reviews/NAME/20060102T150405.000000000Z-AUTHOR.json
const (
	reviewsDir = "reviews"
	maxNoteLen = 8 << 10 // bytes of one review note
	// MaxReviewNotes is how many review notes reviewers may add beside
	// one session's revisions: a reviewer writes into the owner's space,
	// so the notes are bounded (8 MiB a session at most), and a session
	// that merges them stays within the notes a document may keep
	// (maxReviewNotes), so that the owner can still save it.
	MaxReviewNotes = 1000
)

// AddReviewNote stores a review note on session name (which must exist).
// The note is a new file; nothing of the session is changed.
func (s *Store) AddReviewNote(name string, note ReviewNote) error {
	if err := ValidateName(name); err != nil {
		return err
	}
	if err := ValidateName(note.Author); err != nil {
		return fmt.Errorf("review note author: %w", err)
	}
	text := strings.TrimSpace(note.Text)
	if text == "" {
		return errors.New("review note: the text is empty")
	}
	if len(text) > maxNoteLen {
		return fmt.Errorf("review note: %d bytes; at most %d are kept in one note", len(text), maxNoteLen)
	}
	if _, err := s.Latest(name); err != nil {
		return err
	}
	if note.Time.IsZero() {
		note.Time = s.now()
	}
	note.Text = text
	note.Time = note.Time.UTC()
	data, err := json.MarshalIndent(note, "", "  ")
	if err != nil {
		return err
	}
	dir := filepath.Join(s.root, reviewsDir, name)
	if err := s.makeDir(dir); err != nil {
		return err
	}
	if n, err := s.countNotes(dir); err != nil {
		return err
	} else if n >= MaxReviewNotes {
		return fmt.Errorf("review note: %q has %d review notes, the most a session keeps (MaxReviewNotes); ask its owner to copy the session for more", name, MaxReviewNotes)
	}
	tmp, err := s.writeTemp(dir, append(data, '\n'), revisionMode)
	if err != nil {
		return err
	}
	defer s.fs.Remove(tmp)
	base := note.Time.Format(trashStamp) + "-" + note.Author
	for i := 0; i < 100; i++ {
		file := base + ".json"
		if i > 0 {
			file = fmt.Sprintf("%s-%d.json", base, i)
		}
		err = s.fs.Link(tmp, filepath.Join(dir, file))
		if err == nil {
			return s.fs.SyncDir(dir)
		}
		if !errors.Is(err, fs.ErrExist) {
			return fmt.Errorf("saving review note on %q: %w", name, err)
		}
	}
	return fmt.Errorf("saving review note on %q: too many notes at the same instant", name)
}

// countNotes counts the note files in dir.
func (s *Store) countNotes(dir string) (int, error) {
	entries, err := s.fs.ReadDir(dir)
	if err != nil {
		return 0, err
	}
	n := 0
	for _, e := range entries {
		if !e.IsDir() && !strings.HasPrefix(e.Name(), ".") && strings.HasSuffix(e.Name(), ".json") {
			n++
		}
	}
	return n, nil
}

// ReviewNotes returns the review notes reviewers added to session name,
// oldest first. Notes saved inside revisions are in Document.Reviews.
func (s *Store) ReviewNotes(name string) ([]ReviewNote, []*DamagedError, error) {
	if err := ValidateName(name); err != nil {
		return nil, nil, err
	}
	dir := filepath.Join(s.root, reviewsDir, name)
	entries, err := s.fs.ReadDir(dir)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil, nil
	}
	if err != nil {
		return nil, nil, err
	}
	var notes []ReviewNote
	var damaged []*DamagedError
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			s.sweepTemp(dir, e)
			continue
		}
		if e.IsDir() || !strings.HasSuffix(e.Name(), ".json") {
			continue
		}
		path := filepath.Join(dir, e.Name())
		data, _, err := s.fs.ReadFile(path, maxNoteLen*8)
		if err != nil {
			damaged = append(damaged, asDamaged(path, err))
			continue
		}
		var n ReviewNote
		if err := json.Unmarshal(data, &n); err != nil || n.Author == "" || n.Text == "" {
			if err == nil {
				err = errors.New("not a review note")
			}
			damaged = append(damaged, &DamagedError{Path: path, Err: err})
			continue
		}
		notes = append(notes, n)
	}
	slices.SortStableFunc(notes, func(a, b ReviewNote) int { return a.Time.Compare(b.Time) })
	return notes, damaged, nil
}

// Everyone, as a reader, shares a session with every user of the server.
const Everyone = "*"

// Shares records which sessions their owners share read-only with whom,
// for a server whose users each keep a store under one data root:
//
//	users/USER/...                 USER's store (UserStoreRoot)
//	shares/OWNER/NAME.json         who may read OWNER's session NAME
//
// A share file is replaced atomically (temporary file and rename). Removing
// it unshares at once: every opening checks it.
type Shares struct {
	root string
	now  func() time.Time
}

// Share is one shared session.
type Share struct {
	Owner    string    `json:"owner"`
	Session  string    `json:"session"`
	Readers  []string  `json:"readers"` // user names, or Everyone
	Modified time.Time `json:"modified"`
}

// NewShares returns the share registry of the server data root.
func NewShares(dataRoot string, now func() time.Time) (*Shares, error) {
	abs, err := filepath.Abs(dataRoot)
	if err != nil {
		return nil, err
	}
	if now == nil {
		now = time.Now
	}
	return &Shares{root: abs, now: now}, nil
}

// UserStoreRoot returns the directory of user's store under a server data
// root; the user name is validated first so that no path leaves the root.
func UserStoreRoot(dataRoot, user string) (string, error) {
	if err := ValidateName(user); err != nil {
		return "", fmt.Errorf("user name: %w", err)
	}
	return filepath.Join(dataRoot, "users", user), nil
}

func (s *Shares) file(owner, name string) (string, error) {
	if err := ValidateName(owner); err != nil {
		return "", fmt.Errorf("owner: %w", err)
	}
	if err := ValidateName(name); err != nil {
		return "", err
	}
	return filepath.Join(s.root, "shares", owner, name+".json"), nil
}

// Set shares owner's session name read-only with readers (user names, or
// Everyone). An empty list unshares.
func (s *Shares) Set(owner, name string, readers []string) error {
	path, err := s.file(owner, name)
	if err != nil {
		return err
	}
	var clean []string
	for _, r := range readers {
		r = strings.TrimSpace(r)
		if r == "" || r == owner {
			continue
		}
		if r != Everyone {
			if err := ValidateName(r); err != nil {
				return fmt.Errorf("reader: %w", err)
			}
		}
		if !slices.Contains(clean, r) {
			clean = append(clean, r)
		}
	}
	if len(clean) == 0 {
		err := os.Remove(path)
		if errors.Is(err, fs.ErrNotExist) {
			return nil
		}
		return err
	}
	slices.Sort(clean)
	data, err := json.MarshalIndent(Share{Owner: owner, Session: name, Readers: clean, Modified: s.now().UTC()}, "", "  ")
	if err != nil {
		return err
	}
	dir := filepath.Dir(path)
	if err := mkdirPrivate(dir); err != nil {
		return err
	}
	f, err := os.CreateTemp(dir, ".tmp-*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	defer os.Remove(tmp)
	if _, err := f.Write(append(data, '\n')); err != nil {
		f.Close()
		return err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	if err := os.Rename(tmp, path); err != nil {
		return err
	}
	return osFS{}.SyncDir(dir)
}

// Get returns the share of owner's session name (ok false when unshared).
func (s *Shares) Get(owner, name string) (Share, bool, error) {
	path, err := s.file(owner, name)
	if err != nil {
		return Share{}, false, err
	}
	data, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return Share{}, false, nil
	}
	if err != nil {
		return Share{}, false, err
	}
	var sh Share
	if err := json.Unmarshal(data, &sh); err != nil {
		return Share{}, false, &DamagedError{Path: path, Err: err}
	}
	if sh.Owner != owner || sh.Session != name {
		return Share{}, false, &DamagedError{Path: path, Err: errors.New("owner or session does not match the file's place")}
	}
	return sh, true, nil
}

// CanRead reports whether user may open owner's session name: owners
// always, others only while it is shared with them or with everyone.
func (s *Shares) CanRead(user, owner, name string) bool {
	if user == owner {
		return true
	}
	sh, ok, err := s.Get(owner, name)
	if err != nil || !ok {
		return false
	}
	return slices.Contains(sh.Readers, user) || slices.Contains(sh.Readers, Everyone)
}

// SharedWith lists the sessions other users share with user, sorted by
// owner and name. Unreadable share files are skipped.
func (s *Shares) SharedWith(user string) ([]Share, error) {
	owners, err := os.ReadDir(filepath.Join(s.root, "shares"))
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, err
	}
	var out []Share
	for _, o := range owners {
		if !o.IsDir() || o.Name() == user || ValidateName(o.Name()) != nil {
			continue
		}
		files, err := os.ReadDir(filepath.Join(s.root, "shares", o.Name()))
		if err != nil {
			continue
		}
		for _, f := range files {
			name, ok := strings.CutSuffix(f.Name(), ".json")
			if !ok || strings.HasPrefix(f.Name(), ".") {
				continue
			}
			sh, ok, err := s.Get(o.Name(), name)
			if err != nil || !ok {
				continue
			}
			if slices.Contains(sh.Readers, user) || slices.Contains(sh.Readers, Everyone) {
				out = append(out, sh)
			}
		}
	}
	slices.SortFunc(out, func(a, b Share) int {
		if c := strings.Compare(a.Owner, b.Owner); c != 0 {
			return c
		}
		return strings.Compare(a.Session, b.Session)
	})
	return out, nil
}
