package sessions

import (
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
