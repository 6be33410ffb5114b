package fit

import (
	"encoding/csv"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// BatchExportName is the name of a batch table the workbench writes
// beside the files at t: batch-YYYYMMDD-HHMMSS.csv (UTC).
func BatchExportName(t time.Time) string {
	return "batch-" + t.UTC().Format("20060102-150405") + ".csv"
}

// IsBatchExport reports whether the base name of path is a batch table
// written by BatchExportName: such a table is never a data file of a
// batch (BatchFiles leaves it out), so that a folder fitted again does not
// take its own exported table for a measurement.
func IsBatchExport(path string) bool {
	b := filepath.Base(path)
	if len(b) != len("batch-20060102-150405.csv") || !strings.HasPrefix(b, "batch-") || !strings.EqualFold(b[len(b)-4:], ".csv") {
		return false
	}
	_, err := time.Parse("20060102-150405", b[6:len(b)-4])
	return err == nil
}

func csvNum(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	if math.IsInf(v, 1) {
		return "inf"
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// outlierKeys maps row index to the keys of the parameters it is an
// outlier in (OutlierParams).
func outlierKeys(sums BatchStats) map[int][]string {
	m := map[int][]string{}
	for row, js := range OutlierParams(sums) {
		for _, j := range js {
			m[row] = append(m[row], BatchParams()[j].Key)
		}
	}
	return m
}

// WriteBatchCSV writes a batch as CSV, one row per file in the batch's
// order, with unit-labelled SI headers: file, status, error, the model
// that fitted it (dark or lit), temperature and its source, each
// parameter and its standard error (empty where not determined: the lit
// columns of a dark row, the dark columns of a lit row), the RMS log
// residual (dark) or RMS residual in A (lit), the points, the parameters the row is an outlier in, the die
// position (die_x, die_y, wafer, lot) and, with limits, the limits the
// row is outside. The one batch table of the command line and the
// workbench.
func WriteBatchCSV(w io.Writer, res *BatchResult, limits []Limit) error {
	rows, sums := res.Rows, res.Stats
	cw := csv.NewWriter(w)
	head := []string{"file", "status", "error", "model", "temperature_K", "temperature_source"}
	for _, p := range BatchParams() {
		head = append(head, p.Key, p.Key+"_stderr")
	}
	head = append(head, "rms_log_residual", "rms_residual_A", "points", "outlier_in")
	fitted := len(head)
	head = append(head, "die_x", "die_y", "wafer", "lot")
	if len(limits) > 0 {
		head = append(head, "out_of_limits")
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	out := outlierKeys(sums)
	rec := make([]string, 0, len(head))
	for k, r := range rows {
		rec = rec[:0]
		errText := ""
		if r.Err != nil {
			errText = r.Err.Error()
		}
		rec = append(rec, r.File, r.Status, errText)
		if r.Status != StatusOK {
			for len(rec) < fitted {
				rec = append(rec, "")
			}
		} else {
			rec = append(rec, r.Model(), csvNum(r.Temperature.K), r.Temperature.Source)
			for j := range BatchParams() {
				rec = append(rec, csvNum(r.Values[j]), csvNum(r.StdErr[j]))
			}
			rmsLog, rmsA := r.RMS, math.NaN()
			if r.Lit {
				rmsLog, rmsA = rmsA, rmsLog
			}
			rec = append(rec, csvNum(rmsLog), csvNum(rmsA), strconv.Itoa(r.Points), strings.Join(out[k], " "))
		}
		if r.Die.Known() {
			rec = append(rec, strconv.Itoa(r.Die.X), strconv.Itoa(r.Die.Y))
		} else {
			rec = append(rec, "", "")
		}
		rec = append(rec, r.Die.Wafer, r.Die.Lot)
		if len(limits) > 0 {
			rec = append(rec, strings.Join(OutOfLimits(r, limits), " "))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
