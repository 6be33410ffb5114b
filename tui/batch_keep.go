package tui

import (
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
)

// batchKeepState is what the batch screen knows of the batch tables kept
// with the session: the kept table on view (shown, an index of the
// session's batches, valid while shownSeq is the run number in force) and
// the run kept last (keptSeq, under keptID), so that one run is kept
// once.
type batchKeepState struct {
	shown, shownSeq int
	keptSeq         int
	keptID          string
}

// keepKey handles the batch screen's keys for kept tables (not while a
// run is out) and reports whether it did: k.Keep keeps the table on view
// with the session (saved with ctrl+s, as a kept fit), k.Kept (pgup,
// pgdn) shows the tables the session keeps.
func (b *batchScreen) keepKey(m *Model, k batchKeys, km tea.KeyMsg) bool {
	if b.running {
		return false
	}
	switch {
	case keyIs(km, k.Keep):
		b.keepRun(m)
	case keyIs(km, k.Kept):
		b.showKept(m, km.Type == tea.KeyPgDown)
	default:
		return false
	}
	return true
}

// viewIsKept reports whether the batch screen shows a table kept with
// the session (not a run).
func (b *batchScreen) viewIsKept(m *Model) bool {
	kb := b.keep
	return b.view != nil && kb.shownSeq == b.seq && kb.shown >= 0 && kb.shown < len(m.sess.batches)
}

// keepBatch keeps the table of the run on view with the session
// (sessions.NewBatch and AppendBatch, as fit batch --save-to keeps it),
// saved with ctrl+s.
func (b *batchScreen) keepRun(m *Model) {
	switch {
	case m.sess.readOnly:
		m.note = "read-only review: batch tables cannot be kept here"
		return
	case b.view == nil:
		m.note = "no batch table to keep: type a folder and press enter to fit it first"
		return
	case b.viewIsKept(m):
		m.note = m.sess.batches[b.keep.shown].ID + " is kept with the session already"
		return
	case b.keep.keptSeq == b.seq && b.keep.keptID != "":
		m.note = "this run is kept already as " + b.keep.keptID + "; ctrl+s saves it"
		return
	}
	// The options of startBatch's fits: the single-diode model over every
	// forward point (the temperature of each row is in the row).
	rec := sessions.NewBatch(b.dir, b.view, nil, fit.IVOptions{}, m.sess.now())
	batches, id, err := sessions.AppendBatch(m.sess.batches, rec)
	if err != nil {
		m.note = "not kept: " + sessions.Printable(err.Error(), 200, "")
		return
	}
	m.sess.batches = batches
	b.keep.keptSeq, b.keep.keptID = b.seq, id
	what := fmt.Sprintf("kept %s (%d files) with the session; ctrl+s saves it", id, len(rec.Rows))
	if rec.Interrupted {
		what = fmt.Sprintf("kept %s (%d files, interrupted: the files not run are marked) with the session; ctrl+s saves it", id, len(rec.Rows))
	}
	m.note = what
}

// showKeptBatch shows the next (or previous) batch table kept with the
// session in place of the run on view: its rows, statistics and wafer
// map, computed from the kept rows (Batch.Result).
func (b *batchScreen) showKept(m *Model, next bool) {
	n := len(m.sess.batches)
	if n == 0 {
		m.note = "this session keeps no batch table: fit a folder, then ctrl+k keeps it"
		return
	}
	i := n - 1 // the newest first
	if b.viewIsKept(m) {
		i = b.keep.shown
		if next {
			i = min(i+1, n-1)
		} else {
			i = max(i-1, 0)
		}
	}
	kb := m.sess.batches[i]
	res, _ := kb.Result()
	b.view, b.wm, b.dir, b.err = res, newWaferMapState(res), kb.Folder, ""
	b.n, b.total = res.Fitted+res.Failed, len(res.Rows)
	b.keep.shown, b.keep.shownSeq = i, b.seq
	m.note = fmt.Sprintf("kept table %d of %d (pgup/pgdn): %s", i+1, n, sessions.Printable(kb.Summary(), 200, ""))
}

// errKeptDieInReview refuses to read a die's file of a kept table in a
// served review.
var errKeptDieInReview = errors.New("the files of a kept table are in its owner's inbox, which a review does not read; the kept row gives this die's parameters")

// dieFile names the file to read again for the die's fit of row r. A
// run's rows name their files as the run read them. A kept table's rows
// name them relative to its folder: on the local file system the folder
// is joined again; served, the folder was the owner's inbox, so one's own
// kept table reads one's inbox, and a review reads nothing (its files are
// the reviewer's inbox: a file of the reviewer's with the same name was
// fitted and shown as the owner's die).
func (b *batchScreen) dieFile(m *Model, r fit.BatchRow) (string, error) {
	if !b.viewIsKept(m) {
		return r.File, nil
	}
	_, local := m.sess.files.(model.LocalFiles)
	switch served := m.sess.files != nil && !local; {
	case served && m.sess.readOnly:
		return "", errKeptDieInReview
	case served:
		return r.File, nil
	}
	folder := m.sess.batches[b.keep.shown].Folder
	if fi, err := os.Stat(folder); err == nil && !fi.IsDir() {
		return folder, nil // a batch of one file
	}
	return filepath.Join(folder, r.File), nil
}

// keptTolerance is the relative difference beyond which today's fit of a
// kept row's file no longer matches the row: the fit is deterministic
// (the same file and temperature give the same doubles, and the session
// keeps them whole), so a difference beyond rounding means other data.
const keptTolerance = 1e-6

// keptChange says how the file of a kept row r compares with the row,
// after the die's screen read it again into d (readErr: the reading's
// error): "" when today's fit gives the kept parameters (Is, n, Rs, Rsh
// within keptTolerance), both fail, or the row is lit (not compared);
// otherwise the plain words the die's screen shows above today's chart.
func keptChange(r fit.BatchRow, d *dieFit, readErr error) string {
	switch {
	case errors.Is(readErr, fs.ErrNotExist):
		return "the file is gone since the table was kept: the row shows the kept values, and there is no chart"
	case readErr != nil:
		return "the file cannot be read since the table was kept: the row shows the kept values, and there is no chart"
	case r.Lit:
		// A lit row holds the lit fit's columns; the die's screen fits
		// the dark model, which has none of them to compare.
		return ""
	case r.Status == fit.StatusOK && d.view == nil:
		return "the file has changed since the table was kept: the row shows the kept values; today's file does not fit"
	case r.Status != fit.StatusOK && d.view != nil:
		return "the file has changed since the table was kept: the row shows the kept failure, the chart today's file"
	case d.view == nil:
		return ""
	}
	f := d.view.Fit.Single
	// The dark row's columns (fit.BatchParams) of the single diode.
	today := map[int]float64{fit.ColIs: f.SaturationCurrentA, fit.ColN: f.IdealityFactor,
		fit.ColRs: f.SeriesResistanceOhm, fit.ColRsh: f.ShuntResistanceOhm}
	for j, x := range today {
		if !sameWithin(x, r.Values[j], keptTolerance) {
			return "the file has changed since the table was kept: the row shows the kept values, the chart today's file"
		}
	}
	return ""
}

// sameWithin reports whether a and b agree to the relative tolerance
// tol: equal infinities and two NaNs (a parameter not fitted) agree.
func sameWithin(a, b, tol float64) bool {
	switch {
	case math.IsNaN(a) || math.IsNaN(b):
		return math.IsNaN(a) && math.IsNaN(b)
	case math.IsInf(a, 0) || math.IsInf(b, 0):
		return a == b
	}
	return math.Abs(a-b) <= tol*math.Max(math.Abs(a), math.Abs(b))
}

// keptValues is the kept row's parameters as the die's screen states
// them beside today's fit: "kept: Is 1.058 pA, n 1.410, Rs 8.09 ohm";
// "" for a failed row.
func keptValues(r fit.BatchRow, ascii bool) string {
	if r.Status != fit.StatusOK {
		return ""
	}
	ps := fit.BatchParams()
	is, n, rs := r.Diode() // a lit row's from the lit fit
	var parts []string
	for _, c := range []struct {
		j int
		x float64
	}{{fit.ColIs, is}, {fit.ColN, n}, {fit.ColRs, rs}} {
		parts = append(parts, ps[c.j].Symbol+" "+model.Format(ps[c.j].Kind, c.x, 4, ascii))
	}
	return "kept: " + strings.Join(parts, ", ")
}
