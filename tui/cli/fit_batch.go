package cli

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
)

// fitBatchSub is `junco fit batch`.
func fitBatchSub() fitSub {
	return fitSub{
		use:   "batch DIR|FILE... [flags]",
		short: "fit many I-V files in parallel, with a summary per parameter",
		summary: `  junco fit batch DIR|FILE... [--jobs N] [--csv OUT] [--temp T] [--window V1:V2]
                       [--model single|double] [--compliance I] [--floor I]
                       [--json] [--ascii]
                       [--map PARAM] [--limit PARAM:MIN:MAX]... [--report FILE.md]
                       [--save-to NAME] [--data DIR]
      Fit many I-V files in parallel: the files named and every .csv,
      .tsv, .txt and .dat file under each directory (subdirectories too,
      hidden entries skipped), in sorted order; summary per parameter
      (median, quartiles, outliers; log scale for Is, Is2 and Rsh) and a
      CSV table (--csv -, standard output). Ctrl-C keeps the rows done.
      Die positions come from a dies.csv manifest (file,x,y[,wafer,lot])
      in the files' folder, else from names like die_x03_y07 or r07c03.
      --map draws the wafer map of PARAM (Is, n, Rs, Rsh, Is2); --limit
      marks dies out of limits and prints the yield (n:1.0:1.2, Rs::5ohm);
      --report writes a Markdown report with SVG wafer maps beside it;
      --save-to keeps the batch table with a session (batch-1, ...).`,
		long: `Fit many I-V files in parallel: the files named and every .csv, .tsv, .txt
and .dat file under each directory (subdirectories too, hidden entries
skipped), in sorted order; summary per parameter (median, quartiles,
outliers; log scale for Is, Is2 and Rsh) and a CSV table (--csv -, standard
output). Ctrl-C keeps the rows done. Die positions come from a dies.csv
manifest (file,x,y[,wafer,lot]) in the files' folder, else from names like
die_x03_y07 or r07c03. --map draws the wafer map of PARAM (Is, n, Rs, Rsh,
Is2); --limit marks dies out of limits and prints the yield (n:1.0:1.2,
Rs::5ohm); --report writes a Markdown report with SVG wafer maps beside it.

` + fitBatchSaveHelp + "\n\n" + fitDataHelp,
		flags: []fitFlag{
			{"jobs", "N", "workers fitting at once, 1..1024 (default: the number of CPUs)"},
			{"csv", "OUT", "write the table of every file's parameters as CSV to OUT (- for standard output)"},
			{"temp", "T", "temperature for files that state none, e.g. 300K (else 300 K assumed)"},
			{"window", "V1:V2", "forward-bias window of each fit, e.g. 0.1:0.7"},
			{"model", "single|double", "diode model: single or double"},
			{"compliance", "I", "the instrument's current compliance: points clipped at it are left out (else found from each sweep)"},
			{"floor", "I", "the noise floor of the current (else estimated from each file)"},
			{"map", "PARAM", "draw the wafer map of PARAM: Is, n, Rs, Rsh or Is2"},
			{"limit", "PARAM:MIN:MAX", "mark dies out of limits and print the yield, e.g. n:1.0:1.2 or Rs::5ohm (repeatable)"},
			{"report", "FILE.md", "write a Markdown report with SVG wafer maps beside it"},
			fitBatchSaveFlags()[0], fitBatchSaveFlags()[1],
			{"json", "", "print JSON in SI units instead of text"},
			{"ascii", "", "plain ASCII output (u for micro)"},
		},
		run: fitRunBatch,
	}
}

func fitRunBatch(ctx context.Context, a *fitArgs, stdout, stderr io.Writer) int {
	c, err := fitParseCommon("batch", a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	wo, err := fitParseWafer(a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	saveTo, wantSave := a.str("save-to")
	if wantSave {
		if err := fitSaveCheckName("batch", saveTo); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	code := exitOK
	jobs := runtime.NumCPU()
	if s, ok := a.str("jobs"); ok {
		if jobs, err = strconv.Atoi(s); err != nil || jobs < 1 || jobs > 1024 {
			fmt.Fprintf(stderr, "junco fit batch: --jobs %q: expected a whole number of workers, 1..1024\n", s)
			return exitUsage
		}
	}
	if len(a.pos) == 0 {
		fmt.Fprintln(stderr, "junco fit batch: no directory or file given (junco fit batch DIR|FILE...)")
		return exitUsage
	}
	files, err := fit.BatchFiles(nil, a.pos...)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit batch: %v\n", err)
		return exitUsage // nothing to fit: bad input
	}
	csvPath, wantCSV := a.str("csv")
	var csvOut io.Writer
	if wantCSV {
		if csvPath == "-" {
			csvOut = stdout
		} else {
			f, err := os.Create(csvPath)
			if err != nil {
				fmt.Fprintf(stderr, "junco fit batch: --csv: %v\n", err)
				return exitUsage
			}
			defer f.Close()
			csvOut = f
		}
	}
	start := time.Now()
	showProgress := len(files) >= 100
	last := time.Time{}
	progress := func(done, total int) {
		if !showProgress {
			return
		}
		if now := time.Now(); done == total || now.Sub(last) >= 500*time.Millisecond {
			last = now
			fmt.Fprintf(stderr, "\rjunco fit batch: %s", fitProgressLine(done, total, now.Sub(start)))
			if done == total {
				fmt.Fprintln(stderr)
			}
		}
	}
	if os.Getenv("GOGC") == "" { // a GOGC set by the user wins
		defer debug.SetGCPercent(debug.SetGCPercent(batchGCPercent(len(files))))
	}
	res, runErr := fit.Batch(ctx, files, fit.BatchOptions{IV: c.ivOptions(), Jobs: jobs, Progress: progress})
	if res == nil { // a die manifest that cannot be used: nothing was fitted
		fmt.Fprintf(stderr, "junco fit batch: %v\n", runErr)
		return exitUsage
	}
	if showProgress && runErr != nil {
		fmt.Fprintln(stderr)
	}
	rows, sums := res.Rows, res.Stats
	ok, failed, notRun, assumed := res.Fitted, res.Failed, res.NotRun, 0
	allInput := true
	for _, r := range rows {
		switch {
		case r.Status == fit.StatusError && fitExitCode(r.Err) != exitUsage:
			allInput = false
		case r.Status == fit.StatusOK && r.Temperature.Source == fit.SourceAssumed:
			assumed++
		}
	}
	elapsed := time.Since(start)
	if assumed > 0 {
		fmt.Fprintf(stderr, "junco fit batch: %d files give no temperature; 300 K assumed for them (use --temp)\n", assumed)
	}
	if failed > 0 {
		fmt.Fprintf(stderr, "junco fit batch: %d of %d files failed (listed with their errors)\n", failed, len(files))
	}
	code = exitOK
	switch {
	case runErr != nil:
		fmt.Fprintf(stderr, "junco fit batch: interrupted: %d of %d files done; results so far kept\n", ok+failed, len(files))
		code = exitFailure
	case ok == 0 && allInput:
		code = exitUsage
	case ok == 0:
		code = exitFailure
	}
	if n := fitDieNotes(rows); n != "" {
		fmt.Fprintln(stderr, "junco fit batch: "+n)
	}
	if wo.report != "" {
		paths, err := fitBatchReport(wo, res, c)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit batch: --report: %v\n", err)
			return exitFailure
		}
		fmt.Fprintf(stderr, "junco fit batch: wrote %s\n", strings.Join(paths, ", "))
	}
	if wantSave {
		dir, _ := a.str("data")
		b := sessions.NewBatch(fitBatchFolder(a.pos), res, wo.limits, c.ivOptions(), time.Now())
		code = max(code, fitBatchSave(dir, saveTo, b, ok, stderr))
	}
	if csvOut != nil {
		if err := fit.WriteBatchCSV(csvOut, res, wo.limits); err != nil {
			fmt.Fprintf(stderr, "junco fit batch: --csv: %v\n", err)
			return exitFailure
		}
		if csvPath == "-" {
			return code
		}
	}
	if c.json {
		if err := fitWriteJSON(stdout, fitBatchJSON(rows, sums, ok, failed, notRun, runErr != nil, wo.limits)); err != nil {
			fmt.Fprintf(stderr, "junco fit batch: %v\n", err)
			return exitFailure
		}
		return code
	}
	fitBatchText(stdout, rows, sums, ok, failed, notRun, jobs, elapsed, c)
	fitWaferText(stdout, res, wo, c.ascii)
	return code
}

// batchGCPercent is the garbage collector's percentage for a batch of n
// files. Each fit makes about 25 KB of garbage and keeps only its row, so
// the live heap is small (a few MiB plus about 512 bytes a row with its
// file name, an upper estimate), and at the default 100 the collector
// would run every 4 MiB, some 30 times for 2,000 files. The percentage
// lets the heap grow to 32 MiB, or to twice the estimated live heap when
// that is larger (the default then): the heap stays bounded by
// max(32 MiB, 2 x live) for the estimate, whatever the number of files.
func batchGCPercent(n int) int {
	const floor = 32 << 20
	live := 4<<20 + 512*n
	if 2*live >= floor {
		return 100
	}
	return floor*100/live - 100
}

// fitProgressLine says how far a batch is: files done of total, the rate
// so far and the time left at that rate.
func fitProgressLine(done, total int, elapsed time.Duration) string {
	s := fmt.Sprintf("%d/%d files", done, total)
	if done == 0 || elapsed <= 0 {
		return s
	}
	rate := float64(done) / elapsed.Seconds()
	left := time.Duration(float64(total-done) / rate * float64(time.Second)).Round(time.Second)
	return s + fmt.Sprintf(", %.0f files/s, %s left ", rate, left)
}

// fitErrText is the message of err, "" for nil.
func fitErrText(err error) string {
	if err == nil {
		return ""
	}
	return err.Error()
}

type fitSummaryJSON struct {
	N         int      `json:"n"`
	Median    *float64 `json:"median"`
	Q1        *float64 `json:"q1"`
	Q3        *float64 `json:"q3"`
	LowFence  *float64 `json:"low_fence"`
	HighFence *float64 `json:"high_fence"`
	LogScale  bool     `json:"log_scale"`
	Outliers  []string `json:"outliers"`
}

type fitBatchRowJSON struct {
	File              string   `json:"file"`
	DieX              *int     `json:"die_x,omitempty"`
	DieY              *int     `json:"die_y,omitempty"`
	Wafer             string   `json:"wafer,omitempty"`
	Lot               string   `json:"lot,omitempty"`
	DieSource         string   `json:"die_source,omitempty"`
	DieNote           string   `json:"die_note,omitempty"`
	OutOfLimits       []string `json:"out_of_limits,omitempty"`
	Status            string   `json:"status"`
	Error             string   `json:"error,omitempty"`
	TemperatureK      *float64 `json:"temperature_K,omitempty"`
	TemperatureSource string   `json:"temperature_source,omitempty"`
	Model             string   `json:"model,omitempty"`
	*fitIVValues
	*fitBatchLitValues
	RMSLogResidual *float64 `json:"rms_log_residual,omitempty"`
	RMSResidualA   *float64 `json:"rms_residual_A,omitempty"`
	Points         int      `json:"points,omitempty"`
	StdErr         any      `json:"stderr,omitempty"`
}

// fitBatchLitValues are the columns of a lit row of a batch (fit.BatchParams
// with Lit): the lit fit's parameters and the figures of its curve.
type fitBatchLitValues struct {
	PhotocurrentA       *float64 `json:"photocurrent_A"`
	SaturationCurrentA  *float64 `json:"lit_saturation_current_A"`
	IdealityFactor      *float64 `json:"lit_ideality_factor"`
	SeriesResistanceOhm *float64 `json:"lit_series_resistance_ohm"`
	ShuntResistanceOhm  *float64 `json:"lit_shunt_resistance_ohm"`
	OpenCircuitVoltageV *float64 `json:"open_circuit_voltage_V,omitempty"`
	ShortCircuitA       *float64 `json:"short_circuit_current_A,omitempty"`
	FillFactor          *float64 `json:"fill_factor,omitempty"`
	MaxPowerW           *float64 `json:"max_power_W,omitempty"`
}

// fitBatchLitValuesOf is the lit columns of v; the figures are left out
// of a standard error (not estimated).
func fitBatchLitValuesOf(v [fit.NumBatchParams]float64, figures bool) *fitBatchLitValues {
	o := &fitBatchLitValues{fitNum(v[fit.ColIph]), fitNum(v[fit.ColLitIs]), fitNum(v[fit.ColLitN]), fitNum(v[fit.ColLitRs]), fitNum(v[fit.ColLitRsh]), nil, nil, nil, nil}
	if figures {
		o.OpenCircuitVoltageV, o.ShortCircuitA, o.FillFactor, o.MaxPowerW = fitNum(v[fit.ColVoc]), fitNum(v[fit.ColIsc]), fitNum(v[fit.ColFF]), fitNum(v[fit.ColPmax])
	}
	return o
}

func fitBatchJSON(rows []fit.BatchRow, sums fit.BatchStats, ok, failed, notRun int, interrupted bool, limits []fit.Limit) any {
	summary := map[string]fitSummaryJSON{}
	for j, s := range sums {
		if s.N == 0 {
			continue
		}
		sj := fitSummaryJSON{N: s.N, Median: fitNum(s.Median), Q1: fitNum(s.Q1), Q3: fitNum(s.Q3),
			LowFence: fitNum(s.LowFence), HighFence: fitNum(s.HiFence), LogScale: s.Log, Outliers: []string{}}
		for _, k := range s.Outliers {
			sj.Outliers = append(sj.Outliers, rows[k].File)
		}
		summary[fit.BatchParams()[j].Key] = sj
	}
	var out []fitBatchRowJSON
	for _, r := range rows {
		rj := fitBatchRowJSON{File: r.File, Status: r.Status, Error: fitErrText(r.Err),
			Wafer: r.Die.Wafer, Lot: r.Die.Lot, DieSource: r.Die.Source, DieNote: r.Die.Note, OutOfLimits: fit.OutOfLimits(r, limits)}
		if r.Die.Known() {
			x, y := r.Die.X, r.Die.Y
			rj.DieX, rj.DieY = &x, &y
		}
		if r.Status == fit.StatusOK {
			rj.TemperatureK, rj.TemperatureSource = fitNum(r.Temperature.K), r.Temperature.Source
			v, s := r.Values, r.StdErr
			rj.Model, rj.Points = r.Model(), r.Points
			if r.Lit {
				rj.fitBatchLitValues = fitBatchLitValuesOf(v, true)
				rj.StdErr = fitBatchLitValuesOf(s, false)
				rj.RMSResidualA = fitNum(r.RMS)
			} else {
				rj.fitIVValues = &fitIVValues{fitNum(v[0]), fitNum(v[1]), fitNum(v[2]), fitNum(v[3]), fitNum(v[4])}
				rj.StdErr = &fitIVValues{fitNum(s[0]), fitNum(s[1]), fitNum(s[2]), fitNum(s[3]), fitNum(s[4])}
				rj.RMSLogResidual = fitNum(r.RMS)
			}
		}
		out = append(out, rj)
	}
	return struct {
		Files       int                       `json:"files"`
		Fitted      int                       `json:"fitted"`
		Failed      int                       `json:"failed"`
		NotRun      int                       `json:"not_run"`
		Interrupted bool                      `json:"interrupted"`
		Summary     map[string]fitSummaryJSON `json:"summary"`
		Yield       *fitYieldJSON             `json:"yield,omitempty"`
		Results     []fitBatchRowJSON         `json:"results"`
	}{len(rows), ok, failed, notRun, interrupted, summary, fitYieldOf(rows, limits), out}
}

func fitBatchText(w io.Writer, rows []fit.BatchRow, sums fit.BatchStats, ok, failed, notRun, jobs int, elapsed time.Duration, c fitCommon) {
	fmt.Fprintf(w, "%d files: %d fitted, %d failed", len(rows), ok, failed)
	if notRun > 0 {
		fmt.Fprintf(w, ", %d not run (interrupted)", notRun)
	}
	lit := 0
	for _, r := range rows {
		if r.Status == fit.StatusOK && r.Lit {
			lit++
		}
	}
	fmt.Fprintf(w, "; %s diode model, %d workers, %.1f s\n", c.model, jobs, elapsed.Seconds())
	if lit > 0 {
		fmt.Fprintf(w, "%d lit files fitted with the lit single-diode model (their columns marked lit; dark and lit files are summarised apart)\n", lit)
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "parameter\tN\tmedian\tQ1\tQ3\toutliers\n")
	for j, p := range fit.BatchParams() {
		s := sums[j]
		if s.N == 0 {
			continue
		}
		f := func(v float64) string { return model.Format(p.Kind, v, 4, c.ascii) }
		var names []string
		for i, k := range s.Outliers {
			if i == 3 {
				names = append(names, fmt.Sprintf("... %d more", len(s.Outliers)-3))
				break
			}
			names = append(names, filepath.Base(rows[k].File)+fitDieText(rows[k].Die))
		}
		o := strconv.Itoa(len(s.Outliers))
		if len(names) > 0 {
			o += " (" + strings.Join(names, ", ") + ")"
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\n", p.Label, s.N, f(s.Median), f(s.Q1), f(s.Q3), o)
	}
	tw.Flush()
	logs := "Is, Is2 and Rsh"
	if lit > 0 {
		logs = "Is, Is2, Rsh, Is_lit and Rsh_lit; lit and dark files apart"
	}
	fmt.Fprintf(w, "\n(quartiles by linear interpolation; outliers beyond 1.5 IQR, on a log scale for %s)\n", logs)
	if failed > 0 {
		fmt.Fprintln(w, "\nfailed:")
		shown := 0
		for _, r := range rows {
			if r.Status == fit.StatusError {
				if shown == 20 {
					fmt.Fprintf(w, "  ... %d more (see --csv)\n", failed-20)
					break
				}
				fmt.Fprintf(w, "  %s%s\n", fitErrText(r.Err), fitDieText(r.Die))
				shown++
			}
		}
	}
}
