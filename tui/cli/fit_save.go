package cli

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"time"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/sessions"
)

// fitSaveItem is one fitted data set to store in a session (--save-to):
// the imported data set, its kind prefix for the measurement ID ("iv",
// "cv") and the records of its fits (fit.IVRecord, fit.CVRecords).
type fitSaveItem struct {
	prefix  string
	ds      *measure.DataSet
	records []fit.Record
}

// fitSaveCheckName checks the --save-to session name before any fitting,
// so that a bad name fails at once and nothing is fitted for nothing.
func fitSaveCheckName(cmd, name string) error {
	if err := sessions.ValidateName(name); err != nil {
		return fitBad("junco fit %s: --save-to %q: %v", cmd, name, err)
	}
	return nil
}

// fitAppendItems adds the items to doc: each data set as a measurement
// under a free ID ("iv-1", "iv-2", ...) and its records under the IDs the
// fit layer gives ("iv-1-fit-1", ...; sessions.AppendFitRecords).
func fitAppendItems(doc *sessions.Document, items []fitSaveItem, now time.Time) []string {
	mids := map[string]bool{}
	for _, m := range doc.Measurements {
		mids[m.ID] = true
	}
	var added []string
	for _, it := range items {
		id := fit.FreeID(it.prefix, func(s string) bool { return mids[s] })
		mids[id] = true
		doc.Measurements = append(doc.Measurements, sessions.Measurement{ID: id, DataSet: *it.ds})
		doc.Extractions, _ = sessions.AppendFitRecords(doc.Extractions, id, now, it.records...)
		added = append(added, id)
	}
	return added
}

// fitSaveResult says what a --save-to stored.
type fitSaveResult struct {
	Revision     int
	Created      bool
	Measurements []string
}

// fitSaveToSession stores the items as the next revision of session name
// in the store at dataDir (default location when empty): the items are
// appended to the newest readable revision and saved on top of it; when
// another save came first, they are appended again to the new newest
// revision (sessions.Store.Update, the one save-with-retry of every front
// end). A session that does not exist is created with the default
// junction. Either the whole revision is stored or nothing.
func fitSaveToSession(dataDir, name string, items []fitSaveItem, now time.Time, stderr io.Writer) (fitSaveResult, error) {
	if len(items) == 0 {
		return fitSaveResult{}, errors.New("no successful fit to store")
	}
	var added []string
	res, err := fitUpdateSession(dataDir, name, now, stderr, func(doc *sessions.Document) error {
		added = fitAppendItems(doc, items, now)
		return nil
	})
	res.Measurements = added
	return res, err
}

// fitUpdateSession stores the next revision of session name in the store
// at dataDir (default location when empty): add changes the newest
// readable revision (a new document with the default junction when the
// session does not exist) and the result is saved on top of it; when
// another save came first, add runs again on the new newest revision
// (sessions.Store.Update, the one save-with-retry of every front end).
// Either the whole revision is stored or nothing.
func fitUpdateSession(dataDir, name string, now time.Time, stderr io.Writer, add func(doc *sessions.Document) error) (fitSaveResult, error) {
	if err := sessions.ValidateName(name); err != nil {
		return fitSaveResult{}, err
	}
	author := currentUser()
	st, err := openStore(dataDir, author, stderr)
	if err != nil {
		return fitSaveResult{}, err
	}
	var res fitSaveResult
	r, err := st.Update(name, func(doc *sessions.Document, rev int) (*sessions.Document, error) {
		if doc == nil {
			doc = sessions.NewDocument(name, author, model.DefaultSpec(), now)
		}
		res = fitSaveResult{Created: rev == 0}
		return doc, add(doc)
	})
	if err != nil {
		return fitSaveResult{}, err
	}
	res.Revision = r.Number
	return res, nil
}

// fitSaveReport runs fitSaveToSession for a fit subcommand and reports on
// stderr; it returns the exit code of the save (exitOK when stored).
func fitSaveReport(cmd, dataDir, name string, items []fitSaveItem, stderr io.Writer) int {
	if len(items) == 0 {
		fmt.Fprintf(stderr, "junco fit %s: --save-to %s: no fit succeeded; nothing saved\n", cmd, name)
		return exitFailure
	}
	res, err := fitSaveToSession(dataDir, name, items, time.Now(), stderr)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit %s: --save-to %s: %v; nothing saved\n", cmd, name, err)
		return exitFailure
	}
	if res.Created {
		fmt.Fprintf(stderr, "junco fit %s: session %s did not exist; created it with the default junction (%s)\n", cmd, name, fitDefaultJunction())
	}
	fmt.Fprintf(stderr, "saved as revision %d of session %s (data sets %s)\n", res.Revision, name, strings.Join(res.Measurements, ", "))
	return exitOK
}

// fitDefaultJunction describes model.DefaultSpec briefly.
func fitDefaultJunction() string {
	s := model.DefaultSpec()
	return fmt.Sprintf("%s %s, Na %g cm^-3, Nd %g cm^-3, %g K", s.Material, s.Profile, s.AcceptorDensity/1e6, s.DonorDensity/1e6, s.Temperature)
}
