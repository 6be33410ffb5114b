package sessions

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"time"
)

// Retry bounds of Update: the change is applied again after each
// conflict, with a random pause that grows with the attempt, so that
// writers that collided do not collide again in step.
const (
	maxUpdateTries = 40
	updatePause    = 2 * time.Millisecond
)

// Update saves a change as the next revision of session name, retrying on
// conflict: this is the save of every front end that means "whatever
// others saved meanwhile, store mine on top of it" (the command line's
// --next-revision, a script, a batch). The change is applied to the newest
// readable revision (or to nil, creating the session) and saved with that
// revision as its base; when another writer saved first, the newest
// revision is read again and the change applied again. After
// maxUpdateTries conflicts the last document is stored as the next free
// revision (SaveNext), based on the revision it was made from. Nothing
// another writer saved is lost or changed, and the save does not fail
// because others were faster; it fails for what the change returns, an
// invalid document, or the file system.
//
// change makes the document to save from the newest readable revision:
// newest is a fresh copy it may modify (nil when the session does not
// exist yet) and rev its number (0 then). It may be called several times.
func (s *Store) Update(name string, change func(newest *Document, rev int) (*Document, error)) (Revision, error) {
	if err := ValidateName(name); err != nil {
		return Revision{}, err
	}
	if change == nil {
		return Revision{}, errors.New("no change to save")
	}
	var doc *Document
	base := 0
	for try := range maxUpdateTries {
		if try > 0 {
			time.Sleep(time.Duration(1+rand.IntN(try+1)) * updatePause)
		}
		newest, rev, err := s.Open(name, 0)
		base = rev.Number
		switch {
		case err == nil:
		case isNotFound(err):
			newest, base = nil, 0
		default:
			return Revision{}, err
		}
		if newest != nil {
			// Where the newest revision came from and the note of its
			// save describe it, not the revision made from it.
			newest.Meta.Origin, newest.Meta.Note = "", ""
		}
		doc, err = change(newest, base)
		if err != nil {
			return Revision{}, err
		}
		if doc == nil {
			return Revision{}, fmt.Errorf("session %q: the change gave no document to save", name)
		}
		r, err := s.Save(name, doc, base)
		var se *StaleError
		switch {
		case errors.As(err, &se):
			continue // another writer came first
		case isNotFound(err) && base > 0:
			continue // trashed meanwhile: start again from what is there
		}
		return r, err
	}
	return s.SaveNext(name, doc, base)
}
