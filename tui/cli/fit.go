package cli

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// runFit implements `junco fit SUBCOMMAND ...`; args are the words after
// "fit". Exit codes: 0 success, 2 bad input (arguments, files, data), 1
// other failures (a fit that does not converge, an interrupted batch, an
// output that cannot be written).
func runFit(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fitUsage(stderr)
		return exitUsage
	}
	sub, rest := args[0], args[1:]
	var code int
	switch sub {
	case "iv":
		code = fitRunIV(ctx, rest, stdout, stderr)
	case "cv":
		code = fitRunCV(ctx, rest, stdout, stderr)
	case "arrhenius":
		code = fitRunArrhenius(ctx, rest, stdout, stderr)
	case "batch":
		code = fitRunBatch(ctx, rest, stdout, stderr)
	case "help", "-h", "--help":
		fitUsage(stdout)
		return exitOK
	default:
		fmt.Fprintf(stderr, "junco fit: unknown subcommand %q (choose iv, cv, arrhenius or batch)\n\n", sub)
		fitUsage(stderr)
		return exitUsage
	}
	return code
}

func fitUsage(w io.Writer) {
	fmt.Fprint(w, `Usage:
  junco fit iv FILE... [--temp T] [--window V1:V2] [--model single|double]
                       [--leakage-at V] [--model-card NAME] [--json] [--ascii]
                       [--compare SESSION|FILE] [--save-to NAME] [--data DIR]
      Fit the diode equation to forward I-V data (one result per file).
      --compare sets the data against a session's junction: the RMS of
      ln(measured/predicted) over the window, and the minority lifetime of
      the lightly doped side for which the model's diffusion Is equals the
      measured one (with its diffusion length and the assumptions).
  junco fit cv FILE --area A [--material si|ge|gaas|4h-sic] [--window V1:V2]
                       [--profile] [--smooth N] [--model-card NAME] [--json] [--ascii]
                       [--save-to NAME] [--data DIR]
      Mott-Schottky line (built-in potential, doping), doping profile and the
      junction-capacitance fit C = Cj0/(1 - V/Vbi)^m + Cpar.
  junco fit arrhenius FILE... [--temp T1,T2,...] [--gamma G] [--current I]
                       [--window V1:V2] [--json] [--ascii]
      Saturation current against temperature: activation energy; with
      --current also dVF/dT at that current.
  junco fit batch DIR|FILE... [--jobs N] [--csv OUT] [--temp T] [--window V1:V2]
                       [--model single|double] [--json] [--ascii]
      Fit many I-V files in parallel; summary per parameter (median,
      quartiles, outliers) and a CSV table (--csv -, standard output).

--save-to NAME (fit iv and cv) stores each data set fitted (IDs iv-1, cv-1,
...) and its fit (parameters with standard errors; window and residual in
the notes) as the next revision of session NAME, created with the default
junction when missing; failed fits are not stored. --data DIR selects the
session store (default $XDG_DATA_HOME/junco, else ~/.local/share/junco).

Data files: CSV or TSV with a header naming voltage and current (or
capacitance) columns, units in the header (V, mV; A, mA, uA, nA, pA; F, pF,
fF). The temperature comes from --temp, else a temperature column, else a
"# temperature: 300 K" comment; fit iv and batch assume 300 K otherwise
and say so.
Values take units: --temp 300K or 27C (bare: K), --area 1mm2, 1e-4cm2 or
100um2 (bare: cm^2), --window 0.1:0.7 or 100mV:700mV (bare: V), --current
1mA (bare: A).
`)
}

// fitUsageError marks bad arguments (exit 2).
type fitUsageError struct{ msg string }

func (e *fitUsageError) Error() string { return e.msg }

func fitBad(format string, a ...any) error { return &fitUsageError{fmt.Sprintf(format, a...)} }

// fitExitCode maps an error to the exit code: bad input gives 2, an
// interruption (SIGINT, SIGTERM) 130.
func fitExitCode(err error) int {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return exitInterrupted
	}
	var ue *fitUsageError
	var pe *measure.ParseError
	var ce *measure.ColumnError
	var ie *extract.InputError
	var me *model.UnitError
	if errors.As(err, &ue) || errors.As(err, &pe) || errors.As(err, &ce) || errors.As(err, &ie) ||
		errors.As(err, &me) || errors.Is(err, fs.ErrNotExist) || errors.Is(err, fs.ErrPermission) {
		return exitUsage
	}
	return exitFailure
}

// fitArgs holds parsed options and positional arguments.
type fitArgs struct {
	vals  map[string][]string
	bools map[string]bool
	pos   []string
}

func (a *fitArgs) str(name string) (string, bool) {
	v := a.vals[name]
	if len(v) == 0 {
		return "", false
	}
	return v[len(v)-1], true
}

// fitParseArgs reads --name value, --name=value and boolean --name, in any
// order with the positional arguments; "--" ends the options.
func fitParseArgs(cmd string, args []string, valued, boolean []string) (*fitArgs, error) {
	a := &fitArgs{vals: map[string][]string{}, bools: map[string]bool{}}
	isVal := map[string]bool{}
	isBool := map[string]bool{}
	var names []string
	for _, n := range valued {
		isVal[n] = true
		names = append(names, "--"+n+" VALUE")
	}
	for _, n := range boolean {
		isBool[n] = true
		names = append(names, "--"+n)
	}
	for k := 0; k < len(args); k++ {
		s := args[k]
		if s == "--" {
			a.pos = append(a.pos, args[k+1:]...)
			break
		}
		if !strings.HasPrefix(s, "-") || s == "-" || fitLooksNumeric(s) {
			a.pos = append(a.pos, s)
			continue
		}
		name := strings.TrimLeft(s, "-")
		val, hasVal := "", false
		if i := strings.IndexByte(name, '='); i >= 0 {
			name, val, hasVal = name[:i], name[i+1:], true
		}
		switch {
		case name == "h" || name == "help":
			a.bools["help"] = true
		case isBool[name]:
			if hasVal {
				b, err := strconv.ParseBool(val)
				if err != nil {
					return nil, fitBad("junco fit %s: --%s=%q: expected true or false", cmd, name, val)
				}
				a.bools[name] = b
			} else {
				a.bools[name] = true
			}
		case isVal[name]:
			if !hasVal {
				if k+1 >= len(args) {
					return nil, fitBad("junco fit %s: --%s needs a value", cmd, name)
				}
				k++
				val = args[k]
			}
			a.vals[name] = append(a.vals[name], val)
		default:
			return nil, fitBad("junco fit %s: unknown option %q (options: %s)", cmd, s, strings.Join(names, ", "))
		}
	}
	return a, nil
}

// fitLooksNumeric keeps negative numbers ("-0.5:0.5") positional.
func fitLooksNumeric(s string) bool {
	return len(s) > 1 && s[0] == '-' && (s[1] >= '0' && s[1] <= '9' || s[1] == '.')
}

// fitTemperatureFlag parses a temperature (300K, 27C; bare K) in 1..2000 K.
func fitTemperatureFlag(cmd, s string) (float64, error) {
	t, err := model.ParseValue(model.Temperature, s)
	if err != nil {
		return 0, fitBad("junco fit %s: --temp: %v", cmd, err)
	}
	if !(t >= 1 && t <= 2000) {
		return 0, fitBad("junco fit %s: --temp %s = %g K: allowed 1..2000 K", cmd, s, t)
	}
	return t, nil
}

// fitWindowFlag parses "V1:V2" (each with an optional V or mV unit).
func fitWindowFlag(cmd, s string) (extract.Window, error) {
	a, b, ok := strings.Cut(s, ":")
	if !ok {
		return extract.Window{}, fitBad("junco fit %s: --window %q: expected V1:V2, e.g. 0.1:0.7", cmd, s)
	}
	lo, err := model.ParseValue(model.Voltage, a)
	if err != nil {
		return extract.Window{}, fitBad("junco fit %s: --window lower bound: %v", cmd, err)
	}
	hi, err := model.ParseValue(model.Voltage, b)
	if err != nil {
		return extract.Window{}, fitBad("junco fit %s: --window upper bound: %v", cmd, err)
	}
	if !(lo < hi) {
		return extract.Window{}, fitBad("junco fit %s: --window %q: the lower bound must be below the upper bound", cmd, s)
	}
	return extract.Window{MinV: lo, MaxV: hi}, nil
}

// fitCommon holds the options shared by the I-V subcommands.
type fitCommon struct {
	temp     float64
	haveTemp bool
	window   extract.Window
	model    extract.DiodeModel
	json     bool
	ascii    bool
}

func fitParseCommon(cmd string, a *fitArgs) (fitCommon, error) {
	var c fitCommon
	var err error
	if s, ok := a.str("temp"); ok && cmd != "arrhenius" {
		if c.temp, err = fitTemperatureFlag(cmd, s); err != nil {
			return c, err
		}
		c.haveTemp = true
	}
	if s, ok := a.str("window"); ok {
		if c.window, err = fitWindowFlag(cmd, s); err != nil {
			return c, err
		}
	}
	if s, ok := a.str("model"); ok {
		if c.model, err = extract.ParseDiodeModel(s); err != nil {
			return c, fitBad("junco fit %s: --model %q: choose single or double", cmd, s)
		}
	}
	c.json, c.ascii = a.bools["json"], a.bools["ascii"]
	return c, nil
}

// fitTemperature picks the device temperature: option, column, comment,
// else 300 K (source "assumed").
func fitTemperature(ds *measure.DataSet, c fitCommon) (float64, string) {
	switch {
	case c.haveTemp:
		return c.temp, "option"
	case len(ds.TemperatureK) > 0:
		t, _ := ds.Temperature()
		return t, "column"
	case ds.StatedTemperatureK > 0:
		return ds.StatedTemperatureK, "comment"
	}
	return 300, "assumed"
}

func fitImport(ctx context.Context, path string, kind measure.Kind) (*measure.DataSet, error) {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return nil, fitBad("%s: is a directory (fit batch takes directories)", path)
	}
	return measure.ImportFileContext(ctx, path, measure.Options{Kind: kind})
}

// fitNum returns a pointer to v for JSON, nil (null) when not finite.
func fitNum(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// fitIVValues are the diode parameters in SI units; null in JSON means
// not fitted (a standard error), or absent (an infinite shunt resistance).
type fitIVValues struct {
	SaturationCurrentA    *float64 `json:"saturation_current_A"`
	IdealityFactor        *float64 `json:"ideality_factor"`
	SeriesResistanceOhm   *float64 `json:"series_resistance_ohm"`
	ShuntResistanceOhm    *float64 `json:"shunt_resistance_ohm"`
	RecombinationCurrentA *float64 `json:"recombination_current_A,omitempty"`
}

type fitCorrelation struct {
	A string  `json:"a"`
	B string  `json:"b"`
	R float64 `json:"r"`
}

// fitIVReport is the JSON object of one I-V fit.
type fitIVReport struct {
	File              string    `json:"file"`
	Error             string    `json:"error,omitempty"`
	Model             string    `json:"model,omitempty"`
	TemperatureK      *float64  `json:"temperature_K,omitempty"`
	TemperatureSource string    `json:"temperature_source,omitempty"`
	WindowV           []float64 `json:"window_V,omitempty"`
	*fitIVValues
	RMSLogResidual        *float64         `json:"rms_log_residual,omitempty"`
	Points                *int             `json:"points,omitempty"`
	SkippedPoints         int              `json:"skipped_points,omitempty"`
	RowProblems           int              `json:"row_problems,omitempty"`
	StdErr                *fitIVValues     `json:"stderr,omitempty"`
	Correlations          []fitCorrelation `json:"correlations,omitempty"`
	LeakageCurrentA       *float64         `json:"leakage_current_A,omitempty"`
	LeakageBiasV          *float64         `json:"leakage_bias_V,omitempty"`
	ZeroBiasResistanceOhm *float64         `json:"zero_bias_resistance_ohm,omitempty"`
	Notes                 []string         `json:"notes,omitempty"`
	ModelCard             string           `json:"model_card,omitempty"`
	*fitIVCompare

	fit *extract.IVFit
	ds  *measure.DataSet
}

// fitIVCompare is the comparison of the data with a session's junction
// (--compare).
type fitIVCompare struct {
	CompareSession              string   `json:"compare_session"`
	CompareError                string   `json:"compare_error,omitempty"`
	PredictionRMSLogRatio       *float64 `json:"prediction_rms_log_ratio,omitempty"`
	MeasuredDiffusionIsA        *float64 `json:"measured_diffusion_saturation_current_A,omitempty"`
	ModelDiffusionIsA           *float64 `json:"model_diffusion_saturation_current_A,omitempty"`
	LifetimeVaried              string   `json:"lifetime_varied,omitempty"`
	SpecLifetimeS               *float64 `json:"spec_lifetime_s,omitempty"`
	ReconcilingLifetimeS        *float64 `json:"reconciling_lifetime_s,omitempty"`
	ReconcilingDiffusionLengthM *float64 `json:"reconciling_diffusion_length_m,omitempty"`
	Assumptions                 []string `json:"assumptions,omitempty"`
}

// fitCompareIV compares the data set of path with spec over the window.
func fitCompareIV(ctx context.Context, path, session string, spec model.Spec, c fitCommon) *fitIVCompare {
	out := &fitIVCompare{CompareSession: session}
	ds, err := fitImport(ctx, path, measure.KindIV)
	if err != nil {
		out.CompareError = err.Error()
		return out
	}
	if c.haveTemp {
		ds.TemperatureK, ds.StatedTemperatureK = nil, c.temp
	}
	cmp, err := model.CompareIVContext(ctx, spec, ds, c.window.MinV, c.window.MaxV)
	if cmp != nil {
		out.PredictionRMSLogRatio = fitNum(cmp.RMSLogRatio)
		out.ModelDiffusionIsA = fitNum(cmp.ModelIsA)
	}
	if err != nil {
		out.CompareError = err.Error()
		return out
	}
	out.MeasuredDiffusionIsA = fitNum(cmp.MeasuredIsA)
	out.LifetimeVaried, out.SpecLifetimeS = cmp.LifetimeSide, fitNum(cmp.SpecLifetimeS)
	out.ReconcilingLifetimeS = fitNum(cmp.ReconcilingLifetimeS)
	out.ReconcilingDiffusionLengthM = fitNum(cmp.ReconcilingDiffusionLengthM)
	out.Assumptions = cmp.Assumptions
	return out
}

func fitCompareText(w io.Writer, r *fitIVCompare, ascii bool) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "compared with\t%s\n", r.CompareSession)
	if r.PredictionRMSLogRatio != nil {
		fmt.Fprintf(tw, "rms ln(measured/predicted)\t%.4f\n", *r.PredictionRMSLogRatio)
	}
	if r.CompareError != "" {
		fmt.Fprintf(tw, "comparison error\t%s\n", r.CompareError)
		tw.Flush()
		return
	}
	fmt.Fprintf(tw, "diffusion Is, measured\t%s\n", model.Format(model.Current, *r.MeasuredDiffusionIsA, 4, ascii))
	fmt.Fprintf(tw, "diffusion Is, model\t%s\n", model.Format(model.Current, *r.ModelDiffusionIsA, 4, ascii))
	fmt.Fprintf(tw, "lifetime varied\t%s (model: %s)\n", r.LifetimeVaried, model.Format(model.Time, *r.SpecLifetimeS, 4, ascii))
	fmt.Fprintf(tw, "reconciling lifetime\t%s\n", model.Format(model.Time, *r.ReconcilingLifetimeS, 4, ascii))
	fmt.Fprintf(tw, "diffusion length\t%s\n", model.Format(model.Length, *r.ReconcilingDiffusionLengthM, 4, ascii))
	for _, a := range r.Assumptions {
		fmt.Fprintf(tw, "assumes\t%s\n", a)
	}
	tw.Flush()
}

func fitCorrelations(c []extract.Correlation) []fitCorrelation {
	var out []fitCorrelation
	for _, x := range c {
		out = append(out, fitCorrelation{x.A, x.B, x.R})
	}
	return out
}

// fitIVFile imports one file and fits it.
func fitIVFile(ctx context.Context, path string, c fitCommon, leakAt *float64) (*fitIVReport, error) {
	ds, err := fitImport(ctx, path, measure.KindIV)
	if err != nil {
		return nil, err
	}
	t, src := fitTemperature(ds, c)
	f, err := extract.FitIVContext(ctx, ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: t, Window: c.window, Model: c.model})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	r := &fitIVReport{File: path, Model: c.model.String(), TemperatureK: fitNum(t), TemperatureSource: src,
		WindowV: []float64{f.UsedWindow.MinV, f.UsedWindow.MaxV}, RMSLogResidual: fitNum(f.RMSLogResidual),
		Points: &f.Points, SkippedPoints: f.Skipped, RowProblems: ds.ProblemRows, Correlations: fitCorrelations(f.Correlations),
		Notes: f.Notes, fit: f, ds: ds}
	if src == "assumed" {
		r.Notes = append(r.Notes, "temperature not given (no --temp, column or comment): 300 K assumed")
	}
	if ds.ProblemRows > 0 {
		p := ds.Problems[0]
		r.Notes = append(r.Notes, fmt.Sprintf("%d rows left out (first: line %d, %s)", ds.ProblemRows, p.Line, p.Kind))
	}
	if c.model == extract.ModelDouble {
		d, s := f.Double, f.DoubleStdErr
		r.fitIVValues = &fitIVValues{fitNum(d.DiffusionCurrentA), fitNum(1), fitNum(d.SeriesResistanceOhm), fitNum(d.ShuntResistanceOhm), fitNum(d.RecombinationCurrentA)}
		r.StdErr = &fitIVValues{fitNum(s.DiffusionCurrentA), nil, fitNum(s.SeriesResistanceOhm), fitNum(s.ShuntResistanceOhm), fitNum(s.RecombinationCurrentA)}
		if r.RecombinationCurrentA == nil {
			zero := 0.0
			r.RecombinationCurrentA = &zero
		}
	} else {
		d, s := f.Single, f.SingleStdErr
		r.fitIVValues = &fitIVValues{fitNum(d.SaturationCurrentA), fitNum(d.IdealityFactor), fitNum(d.SeriesResistanceOhm), fitNum(d.ShuntResistanceOhm), nil}
		r.StdErr = &fitIVValues{fitNum(s.SaturationCurrentA), fitNum(s.IdealityFactor), fitNum(s.SeriesResistanceOhm), fitNum(s.ShuntResistanceOhm), nil}
	}
	if leakAt != nil {
		rv, err := extract.AnalyzeReverse(ds.VoltageV, ds.CurrentA, extract.ReverseOptions{BiasV: *leakAt})
		if err != nil {
			return nil, fmt.Errorf("%s: reverse bias: %w", path, err)
		}
		r.LeakageCurrentA, r.LeakageBiasV = fitNum(rv.LeakageCurrentA), fitNum(rv.BiasV)
		r.ZeroBiasResistanceOhm = fitNum(rv.ShuntResistanceOhm)
	}
	return r, nil
}

func fitRunIV(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	a, err := fitParseArgs("iv", args, []string{"temp", "window", "model", "model-card", "leakage-at", "compare", "data", "save-to"}, []string{"json", "ascii"})
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	if a.bools["help"] {
		fitUsage(stdout)
		return exitOK
	}
	c, err := fitParseCommon("iv", a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	if len(a.pos) == 0 {
		fmt.Fprintln(stderr, "junco fit iv: no data file given (junco fit iv FILE...)")
		return exitUsage
	}
	card, wantCard := a.str("model-card")
	if wantCard {
		if _, err := extract.ModelCard(card, extract.CardParams{}); err != nil {
			fmt.Fprintf(stderr, "junco fit iv: --model-card: %v\n", err)
			return exitUsage
		}
	}
	var leakAt *float64
	if s, ok := a.str("leakage-at"); ok {
		v, err := model.ParseValue(model.Voltage, s)
		if err != nil || !(v < 0) {
			fmt.Fprintf(stderr, "junco fit iv: --leakage-at %q: expected a reverse bias below 0 V, e.g. -5V\n", s)
			return exitUsage
		}
		leakAt = &v
	}
	saveTo, wantSave := a.str("save-to")
	if wantSave {
		if err := fitSaveCheckName("iv", saveTo); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	var cmpSpec *model.Spec
	cmpName, wantCmp := a.str("compare")
	if wantCmp {
		dir, _ := a.str("data")
		sp, err := loadSpecForCalc(dir, cmpName)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit iv: --compare %s: %v\n", cmpName, err)
			return exitUsage
		}
		cmpSpec = &sp
	}
	code := exitOK
	var reports []*fitIVReport
	for _, p := range a.pos {
		r, err := fitIVFile(ctx, p, c, leakAt)
		if ctx.Err() != nil {
			// SIGINT or SIGTERM: the fit stopped within milliseconds.
			fmt.Fprintln(stderr, "junco fit iv: interrupted")
			return exitInterrupted
		}
		if err == nil && cmpSpec != nil {
			r.fitIVCompare = fitCompareIV(ctx, p, cmpName, *cmpSpec, c)
			if ctx.Err() != nil {
				fmt.Fprintln(stderr, "junco fit iv: interrupted")
				return exitInterrupted
			}
			if r.CompareError != "" {
				fmt.Fprintf(stderr, "junco fit iv: %s: --compare %s: %s\n", p, cmpName, r.CompareError)
				code = max(code, exitFailure)
			}
		}
		if err != nil {
			fmt.Fprintf(stderr, "junco fit iv: %v\n", err)
			code = max(code, fitExitCode(err))
			reports = append(reports, &fitIVReport{File: p, Error: err.Error()})
			continue
		}
		if r.TemperatureSource == "assumed" {
			fmt.Fprintf(stderr, "junco fit iv: %s: no temperature given; 300 K assumed (use --temp)\n", p)
		}
		if wantCard {
			r.ModelCard, err = fitIVCard(card, r)
			if err != nil {
				fmt.Fprintf(stderr, "junco fit iv: %s: model card: %v\n", p, err)
				code = max(code, exitFailure)
			} else if r.fit.Model == extract.ModelDouble || !math.IsInf(r.fit.Single.ShuntResistanceOhm, 1) {
				fmt.Fprintf(stderr, "junco fit iv: %s: the model card holds one diode with IS, N, RS; shunt and recombination paths are not in it\n", p)
			}
		}
		reports = append(reports, r)
	}
	if c.json {
		var v any = reports
		if len(reports) == 1 {
			v = reports[0]
		}
		if err := fitWriteJSON(stdout, v); err != nil {
			fmt.Fprintf(stderr, "junco fit iv: %v\n", err)
			return exitFailure
		}
	} else {
		for k, r := range reports {
			if k > 0 {
				fmt.Fprintln(stdout)
			}
			fitIVText(stdout, r, c.ascii)
			if r.fitIVCompare != nil {
				fitCompareText(stdout, r.fitIVCompare, c.ascii)
			}
		}
	}
	if wantSave {
		var items []fitSaveItem
		now := time.Now()
		for _, r := range reports {
			if r.fit != nil && r.ds != nil {
				items = append(items, fitIVSaveItem(r, now))
			}
		}
		dir, _ := a.str("data")
		code = max(code, fitSaveReport("iv", dir, saveTo, items, stderr))
	}
	return code
}

func fitIVCard(name string, r *fitIVReport) (string, error) {
	f := r.fit
	p := extract.CardParams{TNOM: f.TemperatureK - 273.15}
	if f.Model == extract.ModelDouble {
		p.IS, p.N, p.RS = f.Double.DiffusionCurrentA, 1, f.Double.SeriesResistanceOhm
	} else {
		p.IS, p.N, p.RS = f.Single.SaturationCurrentA, f.Single.IdealityFactor, f.Single.SeriesResistanceOhm
	}
	if p.TNOM == 0 {
		p.TNOM = math.NaN()
	}
	return extract.ModelCard(name, p)
}

func fitWriteJSON(w io.Writer, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return err
	}
	b = append(b, '\n')
	_, err = w.Write(b)
	return err
}

// fitPM formats "value ± se" in trade units.
func fitPM(k model.Kind, v, se float64, ascii bool) string {
	s := model.Format(k, v, 4, ascii)
	if math.IsInf(v, 1) {
		s = "none"
	}
	if !math.IsNaN(se) && !math.IsInf(se, 0) && !math.IsInf(v, 0) {
		pm := "±"
		if ascii {
			pm = "+-"
		}
		s += "  " + pm + " " + model.Format(k, se, 2, ascii)
	} else if !math.IsInf(v, 0) {
		s += "  (fixed)"
	}
	return s
}

func fitIVText(w io.Writer, r *fitIVReport, ascii bool) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "file\t%s\n", r.File)
	if r.Error != "" {
		fmt.Fprintf(tw, "error\t%s\n", r.Error)
		tw.Flush()
		return
	}
	f := r.fit
	fmt.Fprintf(tw, "model\t%s diode, T = %s (%s)\n", r.Model, model.Format(model.Temperature, f.TemperatureK, 4, ascii), r.TemperatureSource)
	fmt.Fprintf(tw, "window\t%s .. %s, %d points (%d skipped)\n", model.Format(model.Voltage, f.UsedWindow.MinV, 3, ascii),
		model.Format(model.Voltage, f.UsedWindow.MaxV, 3, ascii), f.Points, f.Skipped)
	if f.Model == extract.ModelDouble {
		d, s := f.Double, f.DoubleStdErr
		fmt.Fprintf(tw, "diffusion current (n = 1)\tIs1\t%s\n", fitPM(model.Current, d.DiffusionCurrentA, s.DiffusionCurrentA, ascii))
		fmt.Fprintf(tw, "recombination current (n = 2)\tIs2\t%s\n", fitPM(model.Current, d.RecombinationCurrentA, s.RecombinationCurrentA, ascii))
		fmt.Fprintf(tw, "series resistance\tRs\t%s\n", fitPM(model.Resistance, d.SeriesResistanceOhm, s.SeriesResistanceOhm, ascii))
		fmt.Fprintf(tw, "shunt resistance\tRsh\t%s\n", fitPM(model.Resistance, d.ShuntResistanceOhm, s.ShuntResistanceOhm, ascii))
	} else {
		d, s := f.Single, f.SingleStdErr
		fmt.Fprintf(tw, "saturation current\tIs\t%s\n", fitPM(model.Current, d.SaturationCurrentA, s.SaturationCurrentA, ascii))
		fmt.Fprintf(tw, "ideality factor\tn\t%s\n", fitPM(model.Dimensionless, d.IdealityFactor, s.IdealityFactor, ascii))
		fmt.Fprintf(tw, "series resistance\tRs\t%s\n", fitPM(model.Resistance, d.SeriesResistanceOhm, s.SeriesResistanceOhm, ascii))
		fmt.Fprintf(tw, "shunt resistance\tRsh\t%s\n", fitPM(model.Resistance, d.ShuntResistanceOhm, s.ShuntResistanceOhm, ascii))
	}
	fmt.Fprintf(tw, "rms log residual\t\t%.4f\n", f.RMSLogResidual)
	if r.LeakageCurrentA != nil {
		fmt.Fprintf(tw, "leakage at %s\t\t%s\n", model.Format(model.Voltage, *r.LeakageBiasV, 3, ascii), model.Format(model.Current, *r.LeakageCurrentA, 4, ascii))
	}
	if r.ZeroBiasResistanceOhm != nil {
		fmt.Fprintf(tw, "zero-bias resistance\tR0\t%s\n", model.Format(model.Resistance, *r.ZeroBiasResistanceOhm, 4, ascii))
	}
	for _, c := range f.Correlations {
		fmt.Fprintf(tw, "strongly correlated\t\t%s and %s, r = %.3f\n", c.A, c.B, c.R)
	}
	for _, n := range r.Notes {
		fmt.Fprintf(tw, "note\t\t%s\n", n)
	}
	if r.ModelCard != "" {
		fmt.Fprintf(tw, "model card\t\t%s\n", r.ModelCard)
	}
	tw.Flush()
}

// fitCVValues are the C-V results in SI units.
type fitCVValues struct {
	BuiltInPotentialV         *float64 `json:"built_in_potential_V"`
	DopingPerM3               *float64 `json:"doping_per_m3"`
	ZeroBiasCapacitanceF      *float64 `json:"zero_bias_capacitance_F"`
	GradingCoefficient        *float64 `json:"grading_coefficient"`
	ParasiticCapacitanceF     *float64 `json:"parasitic_capacitance_F"`
	JunctionBuiltInPotentialV *float64 `json:"junction_fit_built_in_potential_V"`
}

type fitProfileRow struct {
	BiasV             float64 `json:"bias_V"`
	DepthM            float64 `json:"depth_m"`
	DopingPerM3       float64 `json:"doping_per_m3"`
	DopingStdErrPerM3 float64 `json:"doping_stderr_per_m3"`
}

type fitCVReport struct {
	File              string    `json:"file"`
	Material          string    `json:"material"`
	AreaM2            float64   `json:"area_m2"`
	PermittivityFPerM float64   `json:"permittivity_F_per_m"`
	WindowV           []float64 `json:"window_V,omitempty"`
	fitCVValues
	Points             int              `json:"points"`
	MottSchottkyRMSRel *float64         `json:"mott_schottky_rms_rel_residual,omitempty"`
	JunctionFitRMSRel  *float64         `json:"junction_fit_rms_rel_residual,omitempty"`
	RowProblems        int              `json:"row_problems,omitempty"`
	StdErr             fitCVValues      `json:"stderr"`
	Correlations       []fitCorrelation `json:"correlations,omitempty"`
	Profile            []fitProfileRow  `json:"doping_profile,omitempty"`
	ModelCard          string           `json:"model_card,omitempty"`
	Notes              []string         `json:"notes,omitempty"`
}

func fitRunCV(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	a, err := fitParseArgs("cv", args, []string{"area", "material", "window", "smooth", "model-card", "save-to", "data"}, []string{"json", "ascii", "profile"})
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	if a.bools["help"] {
		fitUsage(stdout)
		return exitOK
	}
	bad := func(format string, x ...any) int {
		fmt.Fprintf(stderr, "junco fit cv: "+format+"\n", x...)
		return exitUsage
	}
	if len(a.pos) != 1 {
		return bad("expected exactly one data file, got %d (junco fit cv FILE --area A)", len(a.pos))
	}
	as, ok := a.str("area")
	if !ok {
		return bad("--area is required (e.g. --area 1mm2): the doping follows from C per unit area")
	}
	area, err := model.ParseValue(model.Area, as)
	if err != nil {
		return bad("--area: %v", err)
	}
	if !(area > 0 && area < 1) {
		return bad("--area %s = %g m^2: allowed above 0 and below 1 m^2", as, area)
	}
	matName := "si"
	if s, ok := a.str("material"); ok {
		matName = s
	}
	mat, err := physics.MaterialByName(matName)
	if err != nil {
		return bad("--material: %v", err)
	}
	eps := mat.Permittivity()
	var win extract.Window
	if s, ok := a.str("window"); ok {
		if win, err = fitWindowFlag("cv", s); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	smooth := 2
	if s, ok := a.str("smooth"); ok {
		if smooth, err = strconv.Atoi(s); err != nil || smooth < 1 || smooth > 100 {
			return bad("--smooth %q: expected a whole number of neighbouring points, 1..100", s)
		}
	}
	card, wantCard := a.str("model-card")
	if wantCard {
		if _, err := extract.ModelCard(card, extract.CardParams{}); err != nil {
			return bad("--model-card: %v", err)
		}
	}
	saveTo, wantSave := a.str("save-to")
	if wantSave {
		if err := fitSaveCheckName("cv", saveTo); err != nil {
			fmt.Fprintln(stderr, err)
			return exitUsage
		}
	}
	ascii := a.bools["ascii"]
	path := a.pos[0]
	ds, err := fitImport(ctx, path, measure.KindCV)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit cv: %v\n", err)
		return fitExitCode(err)
	}
	g := extract.CVGeometry{AreaM2: area, PermittivityFm: eps}
	ms, err := extract.MottSchottky(ds.VoltageV, ds.CapacitanceF, g, win)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit cv: %s: Mott-Schottky: %v\n", path, err)
		return fitExitCode(err)
	}
	r := &fitCVReport{File: path, Material: mat.Key, AreaM2: area, PermittivityFPerM: eps,
		WindowV: []float64{ms.UsedWindow.MinV, ms.UsedWindow.MaxV}, Points: ms.Points,
		MottSchottkyRMSRel: fitNum(ms.RMSRelResidual), RowProblems: ds.ProblemRows}
	r.BuiltInPotentialV, r.DopingPerM3 = fitNum(ms.BuiltInV), fitNum(ms.DopingM3)
	r.StdErr.BuiltInPotentialV, r.StdErr.DopingPerM3 = fitNum(ms.StdErrV), fitNum(ms.StdErrM3)
	code := exitOK
	jf, err := extract.FitJunctionCV(ds.VoltageV, ds.CapacitanceF, extract.CVOptions{Window: win})
	if err != nil {
		fmt.Fprintf(stderr, "junco fit cv: %s: junction-capacitance fit: %v\n", path, err)
		r.Notes = append(r.Notes, "junction-capacitance fit failed: "+err.Error())
		code = fitExitCode(err)
	} else {
		p, s := jf.Params, jf.StdErr
		r.ZeroBiasCapacitanceF, r.GradingCoefficient = fitNum(p.ZeroBiasCapacitanceF), fitNum(p.GradingCoefficient)
		r.ParasiticCapacitanceF, r.JunctionBuiltInPotentialV = fitNum(p.ParasiticCapacitanceF), fitNum(p.BuiltInPotentialV)
		r.StdErr.ZeroBiasCapacitanceF, r.StdErr.GradingCoefficient = fitNum(s.ZeroBiasCapacitanceF), fitNum(s.GradingCoefficient)
		r.StdErr.ParasiticCapacitanceF, r.StdErr.JunctionBuiltInPotentialV = fitNum(s.ParasiticCapacitanceF), fitNum(s.BuiltInPotentialV)
		r.JunctionFitRMSRel = fitNum(jf.RMSRelResidual)
		r.Correlations = fitCorrelations(jf.Correlations)
		if wantCard {
			r.ModelCard, err = extract.ModelCard(card, extract.CardParams{CJO: p.ZeroBiasCapacitanceF, VJ: p.BuiltInPotentialV, M: p.GradingCoefficient})
			if err != nil {
				fmt.Fprintf(stderr, "junco fit cv: model card: %v\n", err)
				code = max(code, exitFailure)
			}
		}
	}
	if ds.ProblemRows > 0 {
		p := ds.Problems[0]
		r.Notes = append(r.Notes, fmt.Sprintf("%d rows left out (first: line %d, %s)", ds.ProblemRows, p.Line, p.Kind))
	}
	if a.bools["profile"] {
		vv, cc := fitWindowed(ds.VoltageV, ds.CapacitanceF, win)
		prof, err := extract.DopingProfile(vv, cc, g, smooth)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit cv: %s: doping profile: %v\n", path, err)
			code = max(code, fitExitCode(err))
		}
		for _, p := range prof {
			r.Profile = append(r.Profile, fitProfileRow{p.VoltageV, p.DepthM, p.DopingM3, p.StdErrM3})
		}
	}
	if a.bools["json"] {
		if err := fitWriteJSON(stdout, r); err != nil {
			fmt.Fprintf(stderr, "junco fit cv: %v\n", err)
			return exitFailure
		}
	} else {
		fitCVText(stdout, r, ascii)
	}
	if wantSave {
		var jfit *extract.CVFit
		if r.ZeroBiasCapacitanceF != nil {
			jfit = jf
		}
		dir, _ := a.str("data")
		item := fitCVSaveItem(ds, r, ms, jfit, time.Now())
		code = max(code, fitSaveReport("cv", dir, saveTo, []fitSaveItem{item}, stderr))
	}
	return code
}

// fitWindowed keeps the points inside w (all for the zero window).
func fitWindowed(v, y []float64, w extract.Window) ([]float64, []float64) {
	if w.IsZero() {
		return v, y
	}
	var a, b []float64
	for k := range v {
		if w.Contains(v[k]) {
			a = append(a, v[k])
			b = append(b, y[k])
		}
	}
	return a, b
}

func fitVal(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

func fitCVText(w io.Writer, r *fitCVReport, ascii bool) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "file\t\t%s\n", r.File)
	fmt.Fprintf(tw, "material, area\t\t%s (eps = %.4g F/m), %s\n", r.Material, r.PermittivityFPerM, model.Format(model.Area, r.AreaM2, 4, ascii))
	fmt.Fprintf(tw, "window\t\t%s .. %s, %d points\n", model.Format(model.Voltage, r.WindowV[0], 3, ascii), model.Format(model.Voltage, r.WindowV[1], 3, ascii), r.Points)
	fmt.Fprintf(tw, "Mott-Schottky\t\t\n")
	fmt.Fprintf(tw, "  built-in potential\tVbi\t%s\n", fitPM(model.Voltage, fitVal(r.BuiltInPotentialV), fitVal(r.StdErr.BuiltInPotentialV), ascii))
	fmt.Fprintf(tw, "  doping\tN\t%s\n", fitPM(model.Density, fitVal(r.DopingPerM3), fitVal(r.StdErr.DopingPerM3), ascii))
	if r.ZeroBiasCapacitanceF != nil {
		fmt.Fprintf(tw, "junction fit\t\tC = Cj0/(1 - V/Vbi)^m + Cpar\n")
		fmt.Fprintf(tw, "  zero-bias capacitance\tCj0\t%s\n", fitPM(model.Capacitance, fitVal(r.ZeroBiasCapacitanceF), fitVal(r.StdErr.ZeroBiasCapacitanceF), ascii))
		fmt.Fprintf(tw, "  built-in potential\tVbi\t%s\n", fitPM(model.Voltage, fitVal(r.JunctionBuiltInPotentialV), fitVal(r.StdErr.JunctionBuiltInPotentialV), ascii))
		fmt.Fprintf(tw, "  grading coefficient\tm\t%s\n", fitPM(model.Dimensionless, fitVal(r.GradingCoefficient), fitVal(r.StdErr.GradingCoefficient), ascii))
		fmt.Fprintf(tw, "  parasitic capacitance\tCpar\t%s\n", fitPM(model.Capacitance, fitVal(r.ParasiticCapacitanceF), fitVal(r.StdErr.ParasiticCapacitanceF), ascii))
		fmt.Fprintf(tw, "  rms relative residual\t\t%.4f\n", fitVal(r.JunctionFitRMSRel))
	}
	for _, c := range r.Correlations {
		fmt.Fprintf(tw, "strongly correlated\t\t%s and %s, r = %.3f\n", c.A, c.B, c.R)
	}
	for _, n := range r.Notes {
		fmt.Fprintf(tw, "note\t\t%s\n", n)
	}
	if r.ModelCard != "" {
		fmt.Fprintf(tw, "model card\t\t%s\n", r.ModelCard)
	}
	tw.Flush()
	if len(r.Profile) > 0 {
		fmt.Fprintln(w, "\ndoping profile (differential C-V)")
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "bias\tdepth\tdoping\t\n")
		for _, p := range r.Profile {
			fmt.Fprintf(tw, "%s\t%s\t%s\t\n", model.Format(model.Voltage, p.BiasV, 4, ascii), model.Format(model.Length, p.DepthM, 4, ascii), model.Format(model.Density, p.DopingPerM3, 4, ascii))
		}
		tw.Flush()
	}
}

type fitArrheniusRow struct {
	File                    string   `json:"file"`
	TemperatureK            float64  `json:"temperature_K"`
	TemperatureSource       string   `json:"temperature_source"`
	SaturationCurrentA      float64  `json:"saturation_current_A"`
	SaturationCurrentStdErr *float64 `json:"saturation_current_stderr_A"`
	IdealityFactor          float64  `json:"ideality_factor"`
	ForwardVoltageV         *float64 `json:"forward_voltage_V,omitempty"`
}

type fitArrheniusReport struct {
	ActivationEnergyEV float64 `json:"activation_energy_eV"`
	StdErr             struct {
		ActivationEnergyEV   float64  `json:"activation_energy_eV"`
		VFTemperatureCoeffVK *float64 `json:"vf_temperature_coefficient_V_per_K,omitempty"`
	} `json:"stderr"`
	PrefactorExponent    float64           `json:"prefactor_exponent"`
	Gamma                float64           `json:"gamma"`
	Points               int               `json:"points"`
	RMSLnResidual        float64           `json:"rms_ln_residual"`
	VFCurrentA           *float64          `json:"vf_current_A,omitempty"`
	VFTemperatureCoeffVK *float64          `json:"vf_temperature_coefficient_V_per_K,omitempty"`
	Temperatures         []fitArrheniusRow `json:"temperatures"`
	Notes                []string          `json:"notes,omitempty"`
}

func fitRunArrhenius(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	a, err := fitParseArgs("arrhenius", args, []string{"temp", "window", "gamma", "current"}, []string{"json", "ascii"})
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	if a.bools["help"] {
		fitUsage(stdout)
		return exitOK
	}
	c, err := fitParseCommon("arrhenius", a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	files := a.pos
	if len(files) < 3 {
		fmt.Fprintf(stderr, "junco fit arrhenius: %d files given; an activation energy with an error estimate needs I-V curves at 3 or more temperatures\n", len(files))
		return exitUsage
	}
	var temps []float64
	for _, v := range a.vals["temp"] {
		for _, s := range strings.Split(v, ",") {
			t, err := fitTemperatureFlag("arrhenius", s)
			if err != nil {
				fmt.Fprintln(stderr, err)
				return exitUsage
			}
			temps = append(temps, t)
		}
	}
	if len(temps) > 0 && len(temps) != len(files) {
		fmt.Fprintf(stderr, "junco fit arrhenius: --temp gives %d temperatures for %d files; give one per file, in file order\n", len(temps), len(files))
		return exitUsage
	}
	gamma := 0.0
	if s, ok := a.str("gamma"); ok {
		if gamma, err = strconv.ParseFloat(s, 64); err != nil || math.Abs(gamma) > 20 {
			fmt.Fprintf(stderr, "junco fit arrhenius: --gamma %q: expected a number in -20..20 (exponent of D/tau against T)\n", s)
			return exitUsage
		}
	}
	var atI *float64
	if s, ok := a.str("current"); ok {
		v, err := model.ParseValue(model.Current, s)
		if err != nil || !(v > 0) {
			fmt.Fprintf(stderr, "junco fit arrhenius: --current %q: expected a forward current above 0, e.g. 1mA\n", s)
			return exitUsage
		}
		atI = &v
	}
	rep := fitArrheniusReport{Gamma: gamma}
	var pts []extract.ArrheniusPoint
	var curves []extract.IVCurve
	nsum := 0.0
	for k, p := range files {
		ds, err := fitImport(ctx, p, measure.KindIV)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: %v\n", err)
			return fitExitCode(err)
		}
		cc := c
		if len(temps) > 0 {
			cc.temp, cc.haveTemp = temps[k], true
		}
		t, src := fitTemperature(ds, cc)
		if src == "assumed" {
			fmt.Fprintf(stderr, "junco fit arrhenius: %s: no temperature (no column, no \"# temperature:\" comment); give --temp T1,T2,... in file order\n", p)
			return exitUsage
		}
		f, err := extract.FitIVContext(ctx, ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: t, Window: c.window})
		if err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: %s: %v\n", p, err)
			return fitExitCode(err)
		}
		pts = append(pts, extract.ArrheniusPoint{TemperatureK: t, SaturationCurrentA: f.Single.SaturationCurrentA, StdErrA: f.SingleStdErr.SaturationCurrentA})
		curves = append(curves, extract.IVCurve{TemperatureK: t, VoltageV: ds.VoltageV, CurrentA: ds.CurrentA})
		rep.Temperatures = append(rep.Temperatures, fitArrheniusRow{File: p, TemperatureK: t, TemperatureSource: src,
			SaturationCurrentA: f.Single.SaturationCurrentA, SaturationCurrentStdErr: fitNum(f.SingleStdErr.SaturationCurrentA), IdealityFactor: f.Single.IdealityFactor})
		nsum += f.Single.IdealityFactor
	}
	af, err := extract.FitArrhenius(pts, extract.ArrheniusOptions{Gamma: gamma})
	if err != nil {
		fmt.Fprintf(stderr, "junco fit arrhenius: %v\n", err)
		return fitExitCode(err)
	}
	rep.ActivationEnergyEV, rep.StdErr.ActivationEnergyEV = af.ActivationEnergyEV, af.StdErrEV
	rep.PrefactorExponent, rep.Points, rep.RMSLnResidual = af.Exponent, af.Points, af.RMSResidual
	if n := nsum / float64(len(files)); n > 1.3 {
		rep.Notes = append(rep.Notes, fmt.Sprintf("mean ideality factor %.2f: Is mixes diffusion and recombination, so Ea lies between Eg/2 and Eg", n))
	}
	if atI != nil {
		vf, err := extract.FitVFTemperature(curves, *atI)
		if err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: --current: %v\n", err)
			return fitExitCode(err)
		}
		rep.VFCurrentA, rep.VFTemperatureCoeffVK, rep.StdErr.VFTemperatureCoeffVK = atI, fitNum(vf.SlopeVPerK), fitNum(vf.StdErrVPerK)
		for k := range rep.Temperatures {
			for j, t := range vf.TemperatureK {
				if t == rep.Temperatures[k].TemperatureK {
					rep.Temperatures[k].ForwardVoltageV = fitNum(vf.ForwardVV[j])
				}
			}
		}
	}
	if c.json {
		if err := fitWriteJSON(stdout, rep); err != nil {
			fmt.Fprintf(stderr, "junco fit arrhenius: %v\n", err)
			return exitFailure
		}
		return exitOK
	}
	ascii := c.ascii
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "activation energy\tEa\t%s\n", fitPM(model.Energy, rep.ActivationEnergyEV, rep.StdErr.ActivationEnergyEV, ascii))
	fmt.Fprintf(tw, "plot\t\tln(Is/T^%g) against 1/T, %d temperatures, rms %.3g\n", rep.PrefactorExponent, rep.Points, rep.RMSLnResidual)
	if atI != nil {
		fmt.Fprintf(tw, "dVF/dT at %s\t\t%.4g mV/K  %s %.2g mV/K\n", model.Format(model.Current, *atI, 3, ascii), 1e3*fitVal(rep.VFTemperatureCoeffVK),
			map[bool]string{true: "+-", false: "±"}[ascii], 1e3*fitVal(rep.StdErr.VFTemperatureCoeffVK))
	}
	for _, n := range rep.Notes {
		fmt.Fprintf(tw, "note\t\t%s\n", n)
	}
	tw.Flush()
	fmt.Fprintln(stdout)
	tw = tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "file\tT\tIs\tn\n")
	for _, r := range rep.Temperatures {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.3f\n", r.File, model.Format(model.Temperature, r.TemperatureK, 4, ascii),
			model.Format(model.Current, r.SaturationCurrentA, 4, ascii), r.IdealityFactor)
	}
	tw.Flush()
	return exitOK
}

// fitBatchRow is one file's outcome in a batch.
type fitBatchRow struct {
	File              string
	Status            string // ok, error, not_run
	Err               string
	TemperatureK      float64
	TemperatureSource string
	Values, StdErr    [5]float64 // Is, n, Rs, Rsh, Is2 (double)
	RMS               float64
	Points            int
}

// fitBatchParam names a batch column: JSON/CSV key, label, kind, and
// whether the summary runs on a log scale.
type fitBatchParam struct {
	key, label string
	kind       model.Kind
	log        bool
}

// fitBatchParams lists the batch columns in row order (Values index).
func fitBatchParams() [5]fitBatchParam {
	return [5]fitBatchParam{
		{"saturation_current_A", "saturation current Is", model.Current, true},
		{"ideality_factor", "ideality factor n", model.Dimensionless, false},
		{"series_resistance_ohm", "series resistance Rs", model.Resistance, false},
		{"shunt_resistance_ohm", "shunt resistance Rsh", model.Resistance, true},
		{"recombination_current_A", "recombination current Is2", model.Current, true},
	}
}

// fitCollect lists the data files: the files given, and the .csv, .tsv,
// .txt and .dat files under each directory (recursively, hidden entries
// skipped), sorted.
func fitCollect(args []string) ([]string, error) {
	var out []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil {
			return nil, err
		}
		if !st.IsDir() {
			out = append(out, a)
			continue
		}
		var found []string
		err = filepath.WalkDir(a, func(p string, d fs.DirEntry, err error) error {
			if err != nil {
				return err
			}
			if p != a && strings.HasPrefix(d.Name(), ".") {
				if d.IsDir() {
					return filepath.SkipDir
				}
				return nil
			}
			if d.Type().IsRegular() {
				switch strings.ToLower(filepath.Ext(p)) {
				case ".csv", ".tsv", ".txt", ".dat":
					found = append(found, p)
				}
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		sort.Strings(found)
		out = append(out, found...)
	}
	return out, nil
}

func fitRunBatch(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	a, err := fitParseArgs("batch", args, []string{"jobs", "csv", "temp", "window", "model"}, []string{"json", "ascii"})
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	if a.bools["help"] {
		fitUsage(stdout)
		return exitOK
	}
	c, err := fitParseCommon("batch", a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
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
	files, err := fitCollect(a.pos)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit batch: %v\n", err)
		return fitExitCode(err)
	}
	if len(files) == 0 {
		fmt.Fprintf(stderr, "junco fit batch: no .csv, .tsv, .txt or .dat files under %s\n", strings.Join(a.pos, ", "))
		return exitUsage
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
			fmt.Fprintf(stderr, "\rjunco fit batch: %d/%d files", done, total)
			if done == total {
				fmt.Fprintln(stderr)
			}
		}
	}
	res, runErr := extract.RunBatch(ctx, files, extract.BatchOptions{Jobs: jobs, Progress: progress},
		func(ctx context.Context, p string) (fitBatchRow, error) { return fitBatchOne(ctx, p, c) })
	if showProgress && runErr != nil {
		fmt.Fprintln(stderr)
	}
	rows := make([]fitBatchRow, len(files))
	ok, failed, notRun, assumed := 0, 0, 0, 0
	allInput := true
	for k, r := range res {
		row := r.Value
		row.File = files[k]
		switch {
		case !r.Done:
			row.Status, row.Err = "not_run", "interrupted before this file"
			notRun++
		case r.Err != nil:
			row.Status, row.Err = "error", r.Err.Error()
			failed++
			if fitExitCode(r.Err) != exitUsage {
				allInput = false
			}
		default:
			row.Status = "ok"
			ok++
			if row.TemperatureSource == "assumed" {
				assumed++
			}
		}
		rows[k] = row
	}
	var sums [5]extract.Summary
	for j, p := range fitBatchParams() {
		vals := make([]float64, len(rows))
		for k, r := range rows {
			vals[k] = math.NaN()
			if r.Status == "ok" {
				vals[k] = r.Values[j]
			}
		}
		sums[j] = extract.Summarize(vals, p.log)
	}
	elapsed := time.Since(start)
	if assumed > 0 {
		fmt.Fprintf(stderr, "junco fit batch: %d files give no temperature; 300 K assumed for them (use --temp)\n", assumed)
	}
	if failed > 0 {
		fmt.Fprintf(stderr, "junco fit batch: %d of %d files failed (listed with their errors)\n", failed, len(files))
	}
	code := exitOK
	switch {
	case runErr != nil:
		fmt.Fprintf(stderr, "junco fit batch: interrupted: %d of %d files done; results so far kept\n", ok+failed, len(files))
		code = exitFailure
	case ok == 0 && allInput:
		code = exitUsage
	case ok == 0:
		code = exitFailure
	}
	if csvOut != nil {
		if err := fitBatchCSV(csvOut, rows, sums); err != nil {
			fmt.Fprintf(stderr, "junco fit batch: --csv: %v\n", err)
			return exitFailure
		}
		if csvPath == "-" {
			return code
		}
	}
	if c.json {
		if err := fitWriteJSON(stdout, fitBatchJSON(rows, sums, ok, failed, notRun, runErr != nil)); err != nil {
			fmt.Fprintf(stderr, "junco fit batch: %v\n", err)
			return exitFailure
		}
		return code
	}
	fitBatchText(stdout, rows, sums, ok, failed, notRun, jobs, elapsed, c)
	return code
}

func fitBatchOne(ctx context.Context, path string, c fitCommon) (fitBatchRow, error) {
	row := fitBatchRow{File: path}
	ds, err := measure.ImportFileContext(ctx, path, measure.Options{Kind: measure.KindIV})
	if err != nil {
		return row, err
	}
	t, src := fitTemperature(ds, c)
	row.TemperatureK, row.TemperatureSource = t, src
	f, err := extract.FitIVContext(ctx, ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: t, Window: c.window, Model: c.model})
	if err != nil {
		return row, fmt.Errorf("%s: %w", path, err)
	}
	if c.model == extract.ModelDouble {
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

func fitCSVNum(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	if math.IsInf(v, 1) {
		return "inf"
	}
	return strconv.FormatFloat(v, 'g', 6, 64)
}

// fitOutlierSet maps row index to the parameters it is an outlier in.
func fitOutlierSet(sums [5]extract.Summary) map[int][]string {
	m := map[int][]string{}
	for j, s := range sums {
		for _, k := range s.Outliers {
			m[k] = append(m[k], fitBatchParams()[j].key)
		}
	}
	return m
}

func fitBatchCSV(w io.Writer, rows []fitBatchRow, sums [5]extract.Summary) error {
	cw := csv.NewWriter(w)
	head := []string{"file", "status", "error", "temperature_K", "temperature_source"}
	for _, p := range fitBatchParams() {
		head = append(head, p.key, p.key+"_stderr")
	}
	head = append(head, "rms_log_residual", "points", "outlier_in")
	if err := cw.Write(head); err != nil {
		return err
	}
	out := fitOutlierSet(sums)
	rec := make([]string, 0, len(head))
	for k, r := range rows {
		rec = rec[:0]
		rec = append(rec, r.File, r.Status, r.Err)
		if r.Status != "ok" {
			for len(rec) < len(head) {
				rec = append(rec, "")
			}
		} else {
			rec = append(rec, fitCSVNum(r.TemperatureK), r.TemperatureSource)
			for j := range fitBatchParams() {
				rec = append(rec, fitCSVNum(r.Values[j]), fitCSVNum(r.StdErr[j]))
			}
			rec = append(rec, fitCSVNum(r.RMS), strconv.Itoa(r.Points), strings.Join(out[k], " "))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
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
	Status            string   `json:"status"`
	Error             string   `json:"error,omitempty"`
	TemperatureK      *float64 `json:"temperature_K,omitempty"`
	TemperatureSource string   `json:"temperature_source,omitempty"`
	*fitIVValues
	RMSLogResidual *float64     `json:"rms_log_residual,omitempty"`
	Points         int          `json:"points,omitempty"`
	StdErr         *fitIVValues `json:"stderr,omitempty"`
}

func fitBatchJSON(rows []fitBatchRow, sums [5]extract.Summary, ok, failed, notRun int, interrupted bool) any {
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
		summary[fitBatchParams()[j].key] = sj
	}
	var out []fitBatchRowJSON
	for _, r := range rows {
		rj := fitBatchRowJSON{File: r.File, Status: r.Status, Error: r.Err}
		if r.Status == "ok" {
			rj.TemperatureK, rj.TemperatureSource = fitNum(r.TemperatureK), r.TemperatureSource
			v, s := r.Values, r.StdErr
			rj.fitIVValues = &fitIVValues{fitNum(v[0]), fitNum(v[1]), fitNum(v[2]), fitNum(v[3]), fitNum(v[4])}
			rj.StdErr = &fitIVValues{fitNum(s[0]), fitNum(s[1]), fitNum(s[2]), fitNum(s[3]), fitNum(s[4])}
			rj.RMSLogResidual, rj.Points = fitNum(r.RMS), r.Points
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
		Results     []fitBatchRowJSON         `json:"results"`
	}{len(rows), ok, failed, notRun, interrupted, summary, out}
}

func fitBatchText(w io.Writer, rows []fitBatchRow, sums [5]extract.Summary, ok, failed, notRun, jobs int, elapsed time.Duration, c fitCommon) {
	fmt.Fprintf(w, "%d files: %d fitted, %d failed", len(rows), ok, failed)
	if notRun > 0 {
		fmt.Fprintf(w, ", %d not run (interrupted)", notRun)
	}
	fmt.Fprintf(w, "; %s diode model, %d workers, %.1f s\n\n", c.model, jobs, elapsed.Seconds())
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "parameter\tN\tmedian\tQ1\tQ3\toutliers\n")
	for j, p := range fitBatchParams() {
		s := sums[j]
		if s.N == 0 {
			continue
		}
		f := func(v float64) string { return model.Format(p.kind, v, 4, c.ascii) }
		var names []string
		for i, k := range s.Outliers {
			if i == 3 {
				names = append(names, fmt.Sprintf("... %d more", len(s.Outliers)-3))
				break
			}
			names = append(names, filepath.Base(rows[k].File))
		}
		o := strconv.Itoa(len(s.Outliers))
		if len(names) > 0 {
			o += " (" + strings.Join(names, ", ") + ")"
		}
		fmt.Fprintf(tw, "%s\t%d\t%s\t%s\t%s\t%s\n", p.label, s.N, f(s.Median), f(s.Q1), f(s.Q3), o)
	}
	tw.Flush()
	fmt.Fprintln(w, "\n(quartiles by linear interpolation; outliers beyond 1.5 IQR, on a log scale for Is, Is2 and Rsh)")
	if failed > 0 {
		fmt.Fprintln(w, "\nfailed:")
		shown := 0
		for _, r := range rows {
			if r.Status == "error" {
				if shown == 20 {
					fmt.Fprintf(w, "  ... %d more (see --csv)\n", failed-20)
					break
				}
				fmt.Fprintf(w, "  %s\n", r.Err)
				shown++
			}
		}
	}
}
