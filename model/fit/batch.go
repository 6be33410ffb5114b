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
// and whether its statistics run on log10 (the statistics policy: log for
// the positive quantities that span decades, Is, Is2 and Rsh; linear for n
// and Rs, whose fitted value may be 0).
type BatchParam struct {
	Key, Label, Symbol string
	Kind               model.Kind
	Log                bool
}

// BatchParams lists the batch columns in the order of BatchRow.Values.
func BatchParams() [5]BatchParam {
	return [5]BatchParam{
		{"saturation_current_A", "saturation current Is", "Is", model.Current, true},
		{"ideality_factor", "ideality factor n", "n", model.Dimensionless, false},
		{"series_resistance_ohm", "series resistance Rs", "Rs", model.Resistance, false},
		{"shunt_resistance_ohm", "shunt resistance Rsh", "Rsh", model.Resistance, true},
		{"recombination_current_A", "recombination current Is2", "Is2", model.Current, true},
	}
}

// BatchRow is one file's outcome: Values and StdErr hold Is (Is1 for the
// double diode), n (1 for the double diode), Rs, Rsh and Is2 (double
// diode; NaN otherwise), in SI units.
type BatchRow struct {
	File           string
	Die            Die
	Status         string
	Err            error
	Temperature    Temperature
	Values, StdErr [5]float64
	RMS            float64
	Points         int
}

// BatchResult is a batch: one row per file in the order given (whatever
// the number of workers), the counts, and the statistics of each column
// over the rows fitted (Summary.Outliers index Rows).
type BatchResult struct {
	Rows                   []BatchRow
	Fitted, Failed, NotRun int
	Interrupted            bool
	Stats                  [5]extract.Summary
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
		r, err := IVContext(ctx, ds, opt.IV)
		if err != nil {
			return row, fmt.Errorf("%s: %w", p, err)
		}
		row.Temperature = r.Temperature
		f := r.Fit
		if f.Model == extract.ModelDouble {
			d, s := f.Double, f.DoubleStdErr
			row.Values = [5]float64{d.DiffusionCurrentA, 1, d.SeriesResistanceOhm, d.ShuntResistanceOhm, d.RecombinationCurrentA}
			row.StdErr = [5]float64{s.DiffusionCurrentA, math.NaN(), s.SeriesResistanceOhm, s.ShuntResistanceOhm, s.RecombinationCurrentA}
		} else {
			d, s := f.Single, f.SingleStdErr
			row.Values = [5]float64{d.SaturationCurrentA, d.IdealityFactor, d.SeriesResistanceOhm, d.ShuntResistanceOhm, math.NaN()}
			row.StdErr = [5]float64{s.SaturationCurrentA, s.IdealityFactor, s.SeriesResistanceOhm, s.ShuntResistanceOhm, math.NaN()}
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
// refer to rows.
func Statistics(rows []BatchRow) [5]extract.Summary {
	var sums [5]extract.Summary
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
func OutlierParams(stats [5]extract.Summary) map[int][]int {
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
