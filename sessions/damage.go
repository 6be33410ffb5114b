package sessions

import (
	"errors"
	"io/fs"
	"path/filepath"
	"strings"
	"time"
)

// A revision file can become unreadable after it was written (a disk
// error, an edit by hand, a copy cut short). Such a revision is left as it
// is and never hides the rest of its session: List shows the session with
// its newest readable revision and the damaged ones, Open with revision 0
// reads the newest readable one, and Save from that revision takes the
// next free number after the damaged ones.

// staleTempAge is how old a temporary file of a save or draft must be
// before it is taken for the leftover of a save that was killed, and
// removed. A save writes at most MaxDocumentBytes and flushes it, which
// takes seconds; an hour leaves room for a slow disk.
const staleTempAge = time.Hour

// sweepTemp removes e, an entry of dir, when it is a temporary file (see
// tempPattern) last changed more than staleTempAge ago. Anything else, and
// any failure, is left alone: the entry is ignored by listings anyway.
func (s *Store) sweepTemp(dir string, e fs.DirEntry) {
	prefix, _, _ := strings.Cut(tempPattern, "*")
	if !strings.HasPrefix(e.Name(), prefix) || !e.Type().IsRegular() {
		return
	}
	info, err := e.Info()
	if err != nil || s.now().Sub(info.ModTime()) < staleTempAge {
		return
	}
	_ = s.fs.Remove(filepath.Join(dir, e.Name()))
}

// allDamaged reports whether every revision of revs (ascending) newer
// than base is unreadable.
func (s *Store) allDamaged(name string, revs []int, base int) bool {
	for i := len(revs) - 1; i >= 0 && revs[i] > base; i-- {
		_, _, err := s.readDocument(filepath.Join(s.sessionDir(name), revFile(revs[i])))
		var de *DamagedError
		if !errors.As(err, &de) {
			return false
		}
	}
	return true
}

// openNewest reads the newest readable revision of session name; the
// newer ones that cannot be read are in the revision's Skipped. When none
// reads, the error is the newest one's.
func (s *Store) openNewest(name string) (*Document, Revision, error) {
	revs, _, err := s.revisions(name)
	if err != nil {
		return nil, Revision{}, err
	}
	if len(revs) == 0 {
		return nil, Revision{}, &NotFoundError{Session: name}
	}
	var skipped []*DamagedError
	for i := len(revs) - 1; i >= 0; i-- {
		doc, rev, err := s.openRevision(name, revs[i])
		var de *DamagedError
		switch {
		case err == nil:
			rev.Skipped = skipped
			return doc, rev, nil
		case errors.As(err, &de):
			skipped = append(skipped, de)
		case errors.Is(err, fs.ErrNotExist) || isNotFound(err):
			// removed meanwhile (trashed?): try the one before
		default:
			return nil, Revision{}, err
		}
	}
	if len(skipped) > 0 {
		return nil, Revision{}, skipped[0]
	}
	return nil, Revision{}, &NotFoundError{Session: name}
}

func isNotFound(err error) bool {
	var nf *NotFoundError
	return errors.As(err, &nf)
}
