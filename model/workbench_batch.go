package model

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"junco/physics/extract"
)

// BatchRow is the single-diode fit of one file of a batch: the file name
// (without directory), Is in A, n, Rs in ohm, or the error that stopped
// the file (then the numbers are zero).
type BatchRow struct {
	File      string
	Is, N, Rs float64
	Err       error
}

// BatchStat is the distribution of one fitted parameter over the files
// fitted: Summary is computed on log10 for Is and Rs, which span decades.
// Outliers names the files whose value lies outside the Tukey fences.
type BatchStat struct {
	Name     string
	Kind     Kind
	Summary  extract.Summary
	Outliers []string
}

// BatchView is a batch of I-V fits prepared for the workbench.
type BatchView struct {
	// Files is the number of files given; Rows holds one row per file
	// that ran to the end (fitted or failed), in the order given.
	Files int
	Rows  []BatchRow
	// Fitted and Failed count the rows; NotRun counts the files never
	// started because the batch was cancelled.
	Fitted, Failed, NotRun int
	Cancelled              bool
	// Stats summarises Is, n and Rs over the fitted rows.
	Stats []BatchStat
}

// BatchFitIV imports from files (nil: LocalFiles) and fits (single
// diode, all forward points) every file in paths on jobs workers (0: one per CPU). fallbackK is the
// temperature for files that state none. A file that fails is a row with
// its error and never stops the batch. When ctx is cancelled no new file
// starts; the rows finished are kept and the error is ctx.Err() (with the
// view). progress, when set, is called after each file with the number
// done and the total.
func BatchFitIV(ctx context.Context, files Files, paths []string, fallbackK float64, jobs int, progress func(done, total int)) (*BatchView, error) {
	fit := func(ctx context.Context, p string) (BatchRow, error) {
		r := BatchRow{File: filepath.Base(p)}
		if err := ctx.Err(); err != nil {
			return r, err
		}
		ds, err := ImportMeasurement(files, p, nil)
		if err != nil {
			return r, err
		}
		if err := ctx.Err(); err != nil {
			return r, err
		}
		v, err := FitMeasuredIV(ds, IVFitWindow{}, fallbackK)
		if err != nil {
			return r, err
		}
		d := v.Fit.Single
		r.Is, r.N, r.Rs = d.SaturationCurrentA, d.IdealityFactor, d.SeriesResistanceOhm
		return r, nil
	}
	res, err := extract.RunBatch(ctx, paths, extract.BatchOptions{Jobs: jobs, Progress: progress}, fit)
	v := &BatchView{Files: len(paths), Cancelled: err != nil}
	for k, r := range res {
		if !r.Done {
			v.NotRun++
			continue
		}
		row := r.Value
		row.File = filepath.Base(paths[k])
		if r.Err != nil {
			row = BatchRow{File: row.File, Err: r.Err}
			v.Failed++
		} else {
			v.Fitted++
		}
		v.Rows = append(v.Rows, row)
	}
	v.Stats = batchStats(v.Rows)
	return v, err
}

// batchStats summarises Is, n and Rs over the rows without error.
func batchStats(rows []BatchRow) []BatchStat {
	var ok []BatchRow
	for _, r := range rows {
		if r.Err == nil {
			ok = append(ok, r)
		}
	}
	params := []struct {
		name string
		kind Kind
		log  bool
		get  func(BatchRow) float64
	}{
		{"Is", Current, true, func(r BatchRow) float64 { return r.Is }},
		{"n", Dimensionless, false, func(r BatchRow) float64 { return r.N }},
		{"Rs", Resistance, true, func(r BatchRow) float64 { return r.Rs }},
	}
	out := make([]BatchStat, 0, len(params))
	for _, p := range params {
		xs := make([]float64, len(ok))
		for i, r := range ok {
			xs[i] = p.get(r)
		}
		s := extract.Summarize(xs, p.log)
		st := BatchStat{Name: p.name, Kind: p.kind, Summary: s}
		for _, i := range s.Outliers {
			st.Outliers = append(st.Outliers, ok[i].File)
		}
		out = append(out, st)
	}
	return out
}

// BatchFiles lists the CSV and TSV files (by extension, any case) of
// directory dir in files (nil: LocalFiles), sorted by name. A missing
// directory, a path that is not a directory, and a directory without such
// files are errors.
func BatchFiles(files Files, dir string) ([]string, error) {
	dir = strings.TrimSpace(dir)
	if files == nil {
		files = LocalFiles{}
		if dir == "" {
			return nil, errors.New("no directory named: type the path of a directory of CSV or TSV files")
		}
		fi, err := os.Stat(dir)
		if errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("no directory %s", dir)
		}
		if err != nil {
			return nil, err
		}
		if !fi.IsDir() {
			return nil, fmt.Errorf("%s is not a directory", dir)
		}
	}
	ents, err := files.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var out []string
	for _, e := range ents {
		ext := strings.ToLower(filepath.Ext(e.Name()))
		if (ext != ".csv" && ext != ".tsv") || !e.Type().IsRegular() {
			continue
		}
		out = append(out, filepath.Join(dir, e.Name()))
	}
	if len(out) == 0 {
		if dir == "" {
			return nil, errors.New("no CSV or TSV file here")
		}
		return nil, fmt.Errorf("no CSV or TSV file in %s", dir)
	}
	return out, nil
}
