package fit

import (
	"context"
	"errors"
	"fmt"
	"math"

	"junco/model"
	"junco/model/measure"
	"junco/physics/extract"
)

// Status of a batch row.
const (
	StatusOK     = "ok"
	StatusError  = "error"
	StatusNotRun = "not_run"
)

// BatchParam names a batch column: its JSON/CSV key, its label, its kind,
// whether its statistics run on log10 (the statistics policy: log for
// the positive quantities that span decades, Is, Is2 and Rsh; linear for n
// and Rs, whose fitted value may be 0, and for the lit figures), and
// whether it is a column of the lit rows (Lit) or of the dark rows.
type BatchParam struct {
	Key, Label, Symbol string
	Kind               model.Kind
	Log                bool
	Lit                bool
}

// NumBatchParams is the number of batch columns (BatchParams).
const NumBatchParams = 14

// BatchStats is the statistics of each batch column (Statistics), in
// BatchParams order.
type BatchStats = [NumBatchParams]extract.Summary

// BatchParams lists the batch columns in the order of BatchRow.Values:
// first the dark rows' (Is, n, Rs, Rsh, Is2: the dark fit, IV), then the
// lit rows' (the lit single-diode fit, LitIV: Iph, its Is, n, Rs and Rsh,
// and the figures of merit of the fitted curve, Voc, Isc, FF and Pmax).
// A row has values only in the columns of its population (BatchRow.Lit),
// so that no statistic, outlier, map shade or limit ever mixes a dark
// fit's Is with a lit fit's: the two are fits of different models to
// different curves.
func BatchParams() [NumBatchParams]BatchParam {
	return [NumBatchParams]BatchParam{
		{"saturation_current_A", "saturation current Is", "Is", model.Current, true, false},
		{"ideality_factor", "ideality factor n", "n", model.Dimensionless, false, false},
		{"series_resistance_ohm", "series resistance Rs", "Rs", model.Resistance, false, false},
		{"shunt_resistance_ohm", "shunt resistance Rsh", "Rsh", model.Resistance, true, false},
		{"recombination_current_A", "recombination current Is2", "Is2", model.Current, true, false},
		{"photocurrent_A", "photocurrent Iph (lit)", "Iph", model.Current, false, true},
		{"lit_saturation_current_A", "saturation current Is (lit)", "Is_lit", model.Current, true, true},
		{"lit_ideality_factor", "ideality factor n (lit)", "n_lit", model.Dimensionless, false, true},
		{"lit_series_resistance_ohm", "series resistance Rs (lit)", "Rs_lit", model.Resistance, false, true},
		{"lit_shunt_resistance_ohm", "shunt resistance Rsh (lit)", "Rsh_lit", model.Resistance, true, true},
		{"open_circuit_voltage_V", "open-circuit voltage Voc (lit)", "Voc", model.Voltage, false, true},
		{"short_circuit_current_A", "short-circuit current Isc (lit)", "Isc", model.Current, false, true},
		{"fill_factor", "fill factor FF (lit)", "FF", model.Dimensionless, false, true},
		{"max_power_W", "maximum power Pmax (lit)", "Pmax", model.Power, false, true},
	}
}

// Indices of the batch columns (BatchParams).
const (
	ColIs = iota
	ColN
	ColRs
	ColRsh
	ColIs2
	ColIph
	ColLitIs
	ColLitN
	ColLitRs
	ColLitRsh
	ColVoc
	ColIsc
	ColFF
	ColPmax
)

// BatchModelDark and BatchModelLit name the model that fitted a row (the
// "model" column of the batch table).
const (
	BatchModelDark = "dark"
	BatchModelLit  = "lit"
)

// BatchRow is one file's outcome. Lit says the file was recognised as a
// lit curve (IsLit, as fit iv recognises it) and fitted with the lit
// single-diode model. Values and StdErr hold, in SI units and in
// BatchParams order, the dark columns of a dark row: Is (Is1 for the
// double diode), n (1 for the double diode), Rs, Rsh and Is2 (double
// diode); or the lit columns of a lit row: Iph, Is, n, Rs, Rsh and the
// figures of the fitted curve (Voc, Isc, FF, Pmax; their standard errors
// are not estimated). Every other column is NaN (not determined). RMS is
// the RMS log residual of a dark fit, the RMS residual in A of a lit fit.
type BatchRow struct {
	File           string
	Die            Die
	Status         string
	Err            error
	Temperature    Temperature
	Lit            bool
	Values, StdErr [NumBatchParams]float64
	RMS            float64
	Points         int
}

// Model is the model that fitted the row: BatchModelLit or
// BatchModelDark ("" for a row not fitted).
func (r BatchRow) Model() string {
	switch {
	case r.Status != StatusOK:
		return ""
	case r.Lit:
		return BatchModelLit
	}
	return BatchModelDark
}

// Diode is the row's Is, n and Rs from the model that fitted it (the
// dark or the lit columns), for a table that shows one set.
func (r BatchRow) Diode() (is, n, rs float64) {
	if r.Lit {
		return r.Values[ColLitIs], r.Values[ColLitN], r.Values[ColLitRs]
	}
	return r.Values[ColIs], r.Values[ColN], r.Values[ColRs]
}

// changesSign reports whether the currents hold finite values of both
// signs: a condition every lit curve meets (IsLit needs the current to
// change sign at open circuit), checked first so that a dark sweep, all
// of one sign, costs the batch one pass without allocation instead of
// the recognition.
func changesSign(i []float64) bool {
	neg, pos := false, false
	for _, x := range i {
		neg, pos = neg || x < 0, pos || x > 0
		if neg && pos {
			return true
		}
	}
	return false
}

// nanColumns is every column not determined.
func nanColumns() [NumBatchParams]float64 { return BatchColumns() }

// BatchColumns is a row's Values (or StdErr) with vals in the first
// columns (BatchParams order) and every other column NaN (not
// determined); more than NumBatchParams values are an error of the
// caller's and are cut.
func BatchColumns(vals ...float64) [NumBatchParams]float64 {
	var v [NumBatchParams]float64
	for j := range v {
		v[j] = math.NaN()
		if j < len(vals) {
			v[j] = vals[j]
		}
	}
	return v
}

// BatchResult is a batch: one row per file in the order given (whatever
// the number of workers), the counts, and the statistics of each column
// over the rows fitted (Summary.Outliers index Rows).
type BatchResult struct {
	Rows                   []BatchRow
	Fitted, Failed, NotRun int
	Interrupted            bool
	Stats                  BatchStats
}

// BatchOptions configures Batch: the I-V fit of every file, the number of
// workers (0: one per CPU) and a progress callback (files done, total).
type BatchOptions struct {
	Files    model.Files // where the files are read (nil: local)
	IV       IVOptions
	Jobs     int
	Progress func(done, total int)
}

// Batch imports (Import) and fits (IV) every file on a pool of workers.
// Each worker keeps one file's data only while fitting it: the curves are
// dropped and only the row (a few numbers) is kept, so memory grows with
// the number of files by a row each, never by their points. A file that
// fails is a row with its error and never stops the batch. When ctx is
// cancelled no new file starts, the finished rows are kept, the others are
// "not_run" (those cut short too), and the error is ctx.Err() (with the
// result). Every row carries its die (Dies); a manifest that cannot be
// used stops the batch before any fit, with a nil result.
func Batch(ctx context.Context, files []string, opt BatchOptions) (*BatchResult, error) {
	dt, err := dieManifests(opt.Files, files)
	if err != nil {
		return nil, err
	}
	// Each worker finds the die of the files it fits (dieTable.die only
	// reads the manifests): no pass over the names before the first fit.
	dies, dieSet := make([]Die, len(files)), make([]bool, len(files))
	idx := make([]int, len(files))
	for k := range idx {
		idx[k] = k
	}
	one := func(ctx context.Context, k int) (BatchRow, error) {
		p := files[k]
		dies[k], dieSet[k] = dt.die(p), true
		row := BatchRow{File: p}
		if err := ctx.Err(); err != nil {
			return row, err
		}
		ds, err := ImportContext(ctx, opt.Files, p, measure.KindIV, nil)
		if err != nil {
			return row, err
		}
		if err := ctx.Err(); err != nil {
			return row, err
		}
		row.Values, row.StdErr = nanColumns(), nanColumns()
		if changesSign(ds.CurrentA) && IsLit(ds) {
			r, err := LitIVContext(ctx, ds, LitOptions{Window: opt.IV.Window, Temperature: opt.IV.Temperature})
			if err != nil {
				return row, fmt.Errorf("%s: lit fit: %w", p, err)
			}
			row.Lit, row.Temperature = true, r.Temperature
			f := r.Fit
			d, s, m := f.Diode, f.StdErr, f.Model
			for j, v := range map[int][2]float64{
				ColIph: {d.PhotocurrentA, s.PhotocurrentA}, ColLitIs: {d.SaturationCurrentA, s.SaturationCurrentA},
				ColLitN: {d.IdealityFactor, s.IdealityFactor}, ColLitRs: {d.SeriesResistanceOhm, s.SeriesResistanceOhm},
				ColLitRsh: {d.ShuntResistanceOhm, s.ShuntResistanceOhm},
				ColVoc:    {m.Voc, math.NaN()}, ColIsc: {m.Isc, math.NaN()}, ColFF: {m.FF, math.NaN()}, ColPmax: {m.Pmax, math.NaN()},
			} {
				row.Values[j], row.StdErr[j] = v[0], v[1]
			}
			row.RMS, row.Points = f.RMSResidualA, f.Points
			return row, nil
		}
		r, err := IVContext(ctx, ds, opt.IV)
		if err != nil {
			return row, fmt.Errorf("%s: %w", p, err)
		}
		row.Temperature = r.Temperature
		f := r.Fit
		if f.Model == extract.ModelDouble {
			d, s := f.Double, f.DoubleStdErr
			copy(row.Values[:], []float64{d.DiffusionCurrentA, 1, d.SeriesResistanceOhm, d.ShuntResistanceOhm, d.RecombinationCurrentA})
			copy(row.StdErr[:], []float64{s.DiffusionCurrentA, math.NaN(), s.SeriesResistanceOhm, s.ShuntResistanceOhm, s.RecombinationCurrentA})
		} else {
			d, s := f.Single, f.SingleStdErr
			copy(row.Values[:], []float64{d.SaturationCurrentA, d.IdealityFactor, d.SeriesResistanceOhm, d.ShuntResistanceOhm})
			copy(row.StdErr[:], []float64{s.SaturationCurrentA, s.IdealityFactor, s.SeriesResistanceOhm, s.ShuntResistanceOhm})
		}
		row.RMS, row.Points = f.RMSLogResidual, f.Points
		return row, nil
	}
	res, runErr := extract.RunBatch(ctx, idx, extract.BatchOptions{Jobs: opt.Jobs, Progress: opt.Progress}, one)
	out := &BatchResult{Rows: make([]BatchRow, len(files)), Interrupted: runErr != nil}
	for k, r := range res {
		row := r.Value
		row.File = files[k]
		switch {
		case !r.Done:
			row = BatchRow{File: files[k], Status: StatusNotRun, Err: fmt.Errorf("interrupted before this file")}
			out.NotRun++
		case r.Err != nil && ctx.Err() != nil && errors.Is(r.Err, ctx.Err()):
			// Cut short by the interruption: nothing is wrong with it.
			row = BatchRow{File: files[k], Status: StatusNotRun, Err: fmt.Errorf("interrupted while this file was fitted")}
			out.NotRun++
		case r.Err != nil:
			row = BatchRow{File: files[k], Status: StatusError, Err: r.Err}
			out.Failed++
		default:
			row.Status = StatusOK
			out.Fitted++
		}
		if !dieSet[k] { // not run
			dies[k] = dt.die(files[k])
		}
		row.Die = dies[k]
		out.Rows[k] = row
	}
	out.Stats = Statistics(out.Rows)
	return out, runErr
}

// Statistics summarises each column over the rows fitted
// (extract.Summarize, on log10 where BatchParams says so); outlier indices
// refer to rows. A column has values only in the rows of its population
// (BatchParams: dark or lit), so each statistic is over one population:
// dark and lit rows are never mixed.
func Statistics(rows []BatchRow) BatchStats {
	var sums BatchStats
	for j, p := range BatchParams() {
		vals := make([]float64, len(rows))
		for k, r := range rows {
			vals[k] = math.NaN()
			if r.Status == StatusOK {
				vals[k] = r.Values[j]
			}
		}
		sums[j] = extract.Summarize(vals, p.Log)
	}
	return sums
}

// OutlierParams maps a row index of a batch to the indices (in
// BatchParams order) of the parameters it is an outlier in, by the batch
// statistics (Statistics: outside the quartile fences).
func OutlierParams(stats BatchStats) map[int][]int {
	m := map[int][]int{}
	for j, s := range stats {
		for _, k := range s.Outliers {
			m[k] = append(m[k], j)
		}
	}
	return m
}

// BatchNotes says, one line each, the options of a batch's fits that a
// kept batch table records beside its rows: the window, the compliance
// and the noise floor when given (each row carries its own temperature
// and its source).
func BatchNotes(opt IVOptions) []string {
	var out []string
	if w := opt.Window; w.IsZero() {
		out = append(out, "window: every forward point")
	} else {
		out = append(out, fmt.Sprintf("window %g V to %g V", w.MinV, w.MaxV))
	}
	if opt.ComplianceA > 0 {
		out = append(out, fmt.Sprintf("compliance %g A (given)", opt.ComplianceA))
	}
	if opt.FloorA > 0 {
		out = append(out, fmt.Sprintf("noise floor %g A (given)", opt.FloorA))
	}
	return out
}
