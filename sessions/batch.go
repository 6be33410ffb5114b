package sessions

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"junco/model/fit"
	"junco/physics"
)

// Limits of the batch tables a session keeps: a batch is one row per file
// (fit.MaxBatchFiles may be fitted at once, far more than a session
// should carry), and a session keeps a few of them.
const (
	// MaxBatches is the number of batch tables one session keeps.
	MaxBatches = 20
	// MaxBatchRows is the number of rows (files) of one kept batch table:
	// a 300 mm wafer of 1 mm^2 dies, with room to spare. A row is about
	// 1 kB of JSON; the whole document must stay within MaxDocumentBytes,
	// which Encode checks.
	MaxBatchRows = 100000
)

// Batch is a kept batch table: the I-V fit of every file of a folder
// (fit.Batch), one row per file with its parameters, standard errors and
// die, the limits it was judged against and the diode model. The
// statistics, outliers and yield are computed again from the rows
// (fit.Statistics, fit.BatchYield), so that they cannot disagree with
// them.
type Batch struct {
	// ID names the table within the session (fit.BatchRecordID: batch-K).
	ID string `json:"id"`
	// Folder is the folder (or file) the batch was run on, as given.
	Folder    string    `json:"folder"`
	Performed time.Time `json:"performed"`
	// Model is the diode model fitted: "single" or "double".
	Model string `json:"model"`
	// Interrupted says the batch was stopped before every file was fitted
	// (the rows not reached are "not_run").
	Interrupted bool         `json:"interrupted"`
	Limits      []BatchLimit `json:"limits"`
	// Notes explain the batch's options, one per element.
	Notes []string   `json:"notes"`
	Rows  []BatchRow `json:"rows"`
}

// BatchLimit is a pass band of one batch column (fit.Limit): the column's
// key (fit.BatchParams) and its sides in SI, null for an open side.
type BatchLimit struct {
	Parameter string   `json:"parameter"`
	Min       *float64 `json:"min"`
	Max       *float64 `json:"max"`
}

// BatchRow is one file of a kept batch: its name relative to the folder,
// the fit's status (fit.StatusOK, fit.StatusError, fit.StatusNotRun) and
// error, the die, and for a fitted file the temperature with its source,
// whether it was recognised as a lit curve and fitted with the lit model
// (Lit: its values are in the lit columns, fit.BatchParams with Lit; a
// dark row's in the dark columns), the parameters (keys of
// fit.BatchParams, SI; a parameter not determined is absent, one that is
// infinite is listed in Infinite), their standard errors (absent: not
// estimated), the RMS log residual (dark) or RMS residual in A (lit) and
// the points used. Lit and rms_residual_A are optional fields added
// within schema 2: a document without lit rows is written as before.
type BatchRow struct {
	File              string             `json:"file"`
	Status            string             `json:"status"`
	Error             string             `json:"error,omitempty"`
	Die               *BatchDie          `json:"die,omitempty"`
	TemperatureK      float64            `json:"temperature_K,omitempty"`
	TemperatureSource string             `json:"temperature_source,omitempty"`
	Lit               bool               `json:"lit,omitempty"`
	Values            map[string]float64 `json:"values,omitempty"`
	Infinite          []string           `json:"infinite,omitempty"`
	StdErrors         map[string]float64 `json:"std_errors,omitempty"`
	RMSLogResidual    float64            `json:"rms_log_residual,omitempty"`
	RMSResidualA      float64            `json:"rms_residual_A,omitempty"`
	Points            int                `json:"points,omitempty"`
}

// BatchDie is a row's die (fit.Die) when its position is known.
type BatchDie struct {
	X      int    `json:"x"`
	Y      int    `json:"y"`
	Wafer  string `json:"wafer,omitempty"`
	Lot    string `json:"lot,omitempty"`
	Source string `json:"source"`
	Note   string `json:"note,omitempty"`
}

// BatchLimitError is a batch that a session cannot keep: more rows than
// MaxBatchRows, or a session that already keeps MaxBatches.
type BatchLimitError struct {
	What  string // "rows" or "batches"
	N     int
	Limit int
}

func (e *BatchLimitError) Error() string {
	if e.What == "rows" {
		return fmt.Sprintf("the batch has %d files: a session keeps a batch table of at most %d rows (MaxBatchRows); write it as CSV instead", e.N, e.Limit)
	}
	return fmt.Sprintf("the session keeps %d batch tables already: at most %d (MaxBatches); start a new session for more", e.N, e.Limit)
}

// NewBatch makes the record of a batch fit run on folder (file names are
// stored relative to it when they lie within it) with the fit options
// opt (the model, and the notes of fit.BatchNotes), judged against
// limits, performed at now. Its ID is given by AppendBatch. The command
// line and the workbench both call it, so that the same folder gives the
// same record.
func NewBatch(folder string, res *fit.BatchResult, limits []fit.Limit, opt fit.IVOptions, now time.Time) Batch {
	if folder != "" {
		folder = filepath.Clean(folder)
	}
	b := Batch{Folder: folder, Performed: now.UTC(), Model: opt.Model.String(), Interrupted: res.Interrupted, Notes: fit.OneLine(fit.BatchNotes(opt))}
	for _, l := range limits {
		bl := BatchLimit{Parameter: fit.BatchParams()[l.Param].Key}
		if !math.IsInf(l.Min, 0) {
			v := l.Min
			bl.Min = &v
		}
		if !math.IsInf(l.Max, 0) {
			v := l.Max
			bl.Max = &v
		}
		b.Limits = append(b.Limits, bl)
	}
	b.Rows = make([]BatchRow, 0, len(res.Rows))
	for _, r := range res.Rows {
		row := BatchRow{File: BatchFileName(folder, r.File), Status: r.Status}
		if r.Err != nil {
			row.Error = oneLine(r.Err.Error(), maxLineRunes)
		}
		if d := r.Die; d.Known() {
			row.Die = &BatchDie{X: d.X, Y: d.Y, Wafer: d.Wafer, Lot: d.Lot, Source: d.Source, Note: oneLine(d.Note, maxLineRunes)}
		}
		if r.Status == fit.StatusOK {
			row.TemperatureK, row.TemperatureSource = r.Temperature.K, r.Temperature.Source
			row.Values, row.StdErrors = map[string]float64{}, map[string]float64{}
			for j, p := range fit.BatchParams() {
				switch v := r.Values[j]; {
				case physics.Finite(v):
					row.Values[p.Key] = v
				case math.IsInf(v, 1):
					row.Infinite = append(row.Infinite, p.Key)
				}
				if se := r.StdErr[j]; physics.Finite(se) && se >= 0 {
					row.StdErrors[p.Key] = se
				}
			}
			if len(row.Values) == 0 {
				row.Values = nil
			}
			if len(row.StdErrors) == 0 {
				row.StdErrors = nil
			}
			row.Lit = r.Lit
			switch {
			case !physics.Finite(r.RMS):
			case r.Lit:
				row.RMSResidualA = r.RMS
			default:
				row.RMSLogResidual = r.RMS
			}
			row.Points = r.Points
		}
		b.Rows = append(b.Rows, row)
	}
	return b
}

// BatchFileName is file relative to folder when it lies within it (the
// base name when file is the folder), file otherwise: the name a kept
// batch stores and the batch screen shows.
func BatchFileName(folder, file string) string {
	if folder == "" {
		return file
	}
	rel, err := filepath.Rel(folder, file)
	switch {
	case err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)):
		return file
	case rel == ".":
		return filepath.Base(file)
	}
	return filepath.ToSlash(rel)
}

// AppendBatch appends b to the session's batches under a new ID
// (fit.BatchRecordID: batch-K, never one in batches) and returns the
// longer slice and the ID. A batch over MaxBatchRows, or a session that
// keeps MaxBatches already, is refused with a *BatchLimitError.
func AppendBatch(batches []Batch, b Batch) ([]Batch, string, error) {
	if len(b.Rows) > MaxBatchRows {
		return batches, "", &BatchLimitError{What: "rows", N: len(b.Rows), Limit: MaxBatchRows}
	}
	if len(batches) >= MaxBatches {
		return batches, "", &BatchLimitError{What: "batches", N: len(batches), Limit: MaxBatches}
	}
	b.ID = fit.BatchRecordID(func(s string) bool {
		return slices.ContainsFunc(batches, func(x Batch) bool { return x.ID == s })
	})
	return append(slices.Clone(batches), b), b.ID, nil
}

// Result returns the batch as the fit layer's result (its statistics
// computed again from the rows) and its limits, for the wafer maps, the
// CSV table, the yield and the workbench's batch screen. File names are
// joined to the folder again only for display by the callers.
func (b Batch) Result() (*fit.BatchResult, []fit.Limit) {
	res := &fit.BatchResult{Rows: make([]fit.BatchRow, len(b.Rows)), Interrupted: b.Interrupted}
	for k, r := range b.Rows {
		row := fit.BatchRow{File: r.File, Status: r.Status, Temperature: fit.Temperature{K: r.TemperatureK, Source: r.TemperatureSource},
			Lit: r.Lit, RMS: r.RMSLogResidual, Points: r.Points}
		if r.Lit {
			row.RMS = r.RMSResidualA
		}
		if r.Error != "" || r.Status != fit.StatusOK {
			row.Err = errors.New(r.Error)
		}
		if d := r.Die; d != nil {
			row.Die = fit.Die{X: d.X, Y: d.Y, Wafer: d.Wafer, Lot: d.Lot, Source: d.Source, Note: d.Note}
		}
		for j, p := range fit.BatchParams() {
			if r.Status != fit.StatusOK {
				break // as fit.Batch leaves them: zero
			}
			row.Values[j], row.StdErr[j] = math.NaN(), math.NaN()
			if v, ok := r.Values[p.Key]; ok {
				row.Values[j] = v
			} else if slices.Contains(r.Infinite, p.Key) {
				row.Values[j] = math.Inf(1)
			}
			if se, ok := r.StdErrors[p.Key]; ok {
				row.StdErr[j] = se
			}
		}
		switch r.Status {
		case fit.StatusOK:
			res.Fitted++
		case fit.StatusError:
			res.Failed++
		default:
			res.NotRun++
		}
		res.Rows[k] = row
	}
	res.Stats = fit.Statistics(res.Rows)
	var limits []fit.Limit
	for _, l := range b.Limits {
		j, err := fit.BatchParamIndex(l.Parameter)
		if err != nil {
			continue // Validate refuses it
		}
		fl := fit.Limit{Param: j, Min: math.Inf(-1), Max: math.Inf(1)}
		if l.Min != nil {
			fl.Min = *l.Min
		}
		if l.Max != nil {
			fl.Max = *l.Max
		}
		limits = append(limits, fl)
	}
	return res, limits
}

// Summary is one line on a kept batch: "batch-1: wafer12, 97 files (95
// fitted, 2 failed), single diode, 2026-01-02 15:04".
func (b Batch) Summary() string {
	ok, failed, notRun := b.counts()
	s := fmt.Sprintf("%s: %s, %d files (%d fitted, %d failed", b.ID, orDashText(b.Folder), len(b.Rows), ok, failed)
	if notRun > 0 {
		s += fmt.Sprintf(", %d not run", notRun)
	}
	s += fmt.Sprintf("), %s diode, %s", b.Model, b.Performed.Format("2006-01-02 15:04"))
	return s
}

func (b Batch) counts() (ok, failed, notRun int) {
	for _, r := range b.Rows {
		switch r.Status {
		case fit.StatusOK:
			ok++
		case fit.StatusError:
			failed++
		default:
			notRun++
		}
	}
	return
}

func orDashText(s string) string {
	if strings.TrimSpace(s) == "" {
		return "-"
	}
	return s
}

// batchProblems checks the kept batches of a document.
func batchProblems(bs []Batch) []FieldProblem {
	var ps []FieldProblem
	add := func(path, value, allowed, why string) {
		ps = append(ps, FieldProblem{Path: path, Value: value, Allowed: allowed, Why: why})
	}
	text := textChecker(add)
	if len(bs) > MaxBatches {
		add("$.batches", fmt.Sprintf("%d batch tables", len(bs)), fmt.Sprintf("at most %d (MaxBatches)", MaxBatches), "keeps one session within memory")
	}
	keys := map[string]bool{} // key: a lit column
	for _, p := range fit.BatchParams() {
		keys[p.Key] = p.Lit
	}
	ids := map[string]bool{}
	for i, b := range bs {
		p := fmt.Sprintf("$.batches[%d]", i)
		if err := ValidateName(b.ID); err != nil {
			add(p+".id", fmt.Sprintf("%q", b.ID), nameRule, err.(*NameError).Why)
		} else if ids[b.ID] {
			add(p+".id", fmt.Sprintf("%q", b.ID), "a unique ID", "another batch has it")
		}
		ids[b.ID] = true
		text(p+".folder", b.Folder, maxLineRunes, false, false)
		if b.Performed.IsZero() {
			add(p+".performed", "unset", "the time the batch was fitted", "a record says when it was made")
		}
		if b.Model != "single" && b.Model != "double" {
			add(p+".model", fmt.Sprintf("%q", b.Model), `"single" or "double"`, "the diode models a batch fits")
		}
		if len(b.Limits) > fit.MaxLimits {
			add(p+".limits", fmt.Sprintf("%d limits", len(b.Limits)), fmt.Sprintf("at most %d (MaxLimits)", fit.MaxLimits), "the limits of one batch")
		}
		for j, l := range b.Limits {
			lp := fmt.Sprintf("%s.limits[%d]", p, j)
			if _, ok := keys[l.Parameter]; !ok {
				add(lp+".parameter", fmt.Sprintf("%q", l.Parameter), "a batch column key", "the columns a batch fits")
			}
			for _, side := range []*float64{l.Min, l.Max} {
				if side != nil && !physics.Finite(*side) {
					add(lp, fmt.Sprint(*side), "a finite number or null (open)", "JSON has no NaN or infinity")
				}
			}
			switch {
			case l.Min == nil && l.Max == nil:
				add(lp, "both sides open", "MIN, MAX or both", "a limit bounds something")
			case l.Min != nil && l.Max != nil && *l.Min > *l.Max:
				add(lp, fmt.Sprintf("%g to %g", *l.Min, *l.Max), "MIN <= MAX", "a pass band")
			}
		}
		if len(b.Notes) > maxParameters {
			add(p+".notes", fmt.Sprintf("%d notes", len(b.Notes)), fmt.Sprintf("at most %d", maxParameters), "notes on the batch's options")
		}
		for j, n := range b.Notes {
			text(fmt.Sprintf("%s.notes[%d]", p, j), n, maxLineRunes, false, false)
		}
		if len(b.Rows) > MaxBatchRows {
			add(p+".rows", fmt.Sprintf("%d rows", len(b.Rows)), fmt.Sprintf("at most %d (MaxBatchRows)", MaxBatchRows), "keeps one session within memory")
			continue // rows are not checked one by one
		}
		for k, r := range b.Rows {
			ps = append(ps, r.problems(fmt.Sprintf("%s.rows[%d]", p, k), keys, text)...)
		}
	}
	return ps
}

func (r BatchRow) problems(p string, keys map[string]bool, text func(path, s string, maxRunes int, required, multiline bool)) []FieldProblem {
	var ps []FieldProblem
	add := func(path, value, allowed, why string) {
		ps = append(ps, FieldProblem{Path: path, Value: value, Allowed: allowed, Why: why})
	}
	text(p+".file", r.File, maxLineRunes, true, false)
	text(p+".error", r.Error, maxLineRunes, false, false)
	switch r.Status {
	case fit.StatusOK, fit.StatusError, fit.StatusNotRun:
	default:
		add(p+".status", fmt.Sprintf("%q", r.Status), strings.Join([]string{fit.StatusOK, fit.StatusError, fit.StatusNotRun}, ", "), "the outcomes of a batch row")
	}
	if d := r.Die; d != nil {
		if d.X < -fit.MaxDieCoord || d.X > fit.MaxDieCoord || d.Y < -fit.MaxDieCoord || d.Y > fit.MaxDieCoord {
			add(p+".die", fmt.Sprintf("x %d, y %d", d.X, d.Y), fmt.Sprintf("-%d to %d", fit.MaxDieCoord, fit.MaxDieCoord), "die coordinates (MaxDieCoord)")
		}
		if d.Source != fit.DieFromManifest && d.Source != fit.DieFromName {
			add(p+".die.source", fmt.Sprintf("%q", d.Source), fmt.Sprintf("%q or %q", fit.DieFromManifest, fit.DieFromName), "where a die position comes from")
		}
		text(p+".die.wafer", d.Wafer, 64, false, false)
		text(p+".die.lot", d.Lot, 64, false, false)
		text(p+".die.note", d.Note, maxLineRunes, false, false)
	}
	if r.Status != fit.StatusOK && (len(r.Values) > 0 || len(r.StdErrors) > 0 || len(r.Infinite) > 0) {
		add(p+".values", "values on a row not fitted", "none", "only a fitted row has parameters")
	}
	if !physics.Finite(r.TemperatureK) || r.TemperatureK < 0 || r.TemperatureK > 2000 {
		add(p+".temperature_K", fmt.Sprint(r.TemperatureK), "0 (none) to 2000 K", "a measurement temperature")
	}
	text(p+".temperature_source", r.TemperatureSource, 64, false, false)
	for _, m := range []struct {
		name string
		vals map[string]float64
		se   bool
	}{{"values", r.Values, false}, {"std_errors", r.StdErrors, true}} {
		for k, v := range m.vals {
			if lit, ok := keys[k]; !ok {
				add(p+"."+m.name, fmt.Sprintf("%q", k), "a batch column key", "the columns a batch fits")
			} else if lit != r.Lit {
				add(p+"."+m.name, fmt.Sprintf("%q", k), fmt.Sprintf("a column of the %s rows", rowPopulation(r.Lit)), "a row has values only in the columns of the model that fitted it")
			}
			if !physics.Finite(v) || (m.se && v < 0) {
				add(p+"."+m.name+"."+k, fmt.Sprint(v), "a finite number (0 or more for a standard error)", "JSON has no NaN or infinity")
			}
		}
	}
	for _, k := range r.Infinite {
		lit, ok := keys[k]
		if _, both := r.Values[k]; both || !ok || lit != r.Lit {
			add(p+".infinite", fmt.Sprintf("%q", k), "a batch column key without a value", "an infinite parameter has no finite value")
		}
	}
	if !physics.Finite(r.RMSLogResidual) || r.RMSLogResidual < 0 {
		add(p+".rms_log_residual", fmt.Sprint(r.RMSLogResidual), "0 or more", "a residual")
	}
	if !physics.Finite(r.RMSResidualA) || r.RMSResidualA < 0 || (r.RMSResidualA > 0 && !r.Lit) {
		add(p+".rms_residual_A", fmt.Sprint(r.RMSResidualA), "0 or more, on a lit row only", "the residual of a lit fit")
	}
	if r.Lit && r.Status != fit.StatusOK {
		add(p+".lit", "true on a row not fitted", "false", "only a fitted row has a model")
	}
	if r.Points < 0 {
		add(p+".points", fmt.Sprint(r.Points), "0 or more", "the points a fit used")
	}
	return ps
}

func rowPopulation(lit bool) string {
	if lit {
		return fit.BatchModelLit
	}
	return fit.BatchModelDark
}

// cloneBatches deep-copies kept batches.
func cloneBatches(bs []Batch) []Batch {
	return cloneSlice(bs, func(b Batch) Batch {
		b.Limits = cloneSlice(b.Limits, func(l BatchLimit) BatchLimit { l.Min, l.Max = clonePtr(l.Min), clonePtr(l.Max); return l })
		b.Notes = cloneSlice(b.Notes, nil)
		b.Rows = cloneSlice(b.Rows, func(r BatchRow) BatchRow {
			r.Die = clonePtr(r.Die)
			r.Values = cloneMap(r.Values)
			r.StdErrors = cloneMap(r.StdErrors)
			r.Infinite = cloneSlice(r.Infinite, nil)
			return r
		})
		return b
	})
}

func cloneMap(m map[string]float64) map[string]float64 {
	if m == nil {
		return nil
	}
	out := make(map[string]float64, len(m))
	for k, v := range m {
		out[k] = v
	}
	return out
}
