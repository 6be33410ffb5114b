package cli

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// fitIVReport is the JSON object of one I-V fit.
type fitIVReport struct {
	File              string    `json:"file"`
	Model             string    `json:"model,omitempty"`
	TemperatureK      *float64  `json:"temperature_K,omitempty"`
	TemperatureSource string    `json:"temperature_source,omitempty"`
	WindowV           []float64 `json:"window_V,omitempty"`
	*fitIVValues
	RMSLogResidual        *float64         `json:"rms_log_residual,omitempty"`
	Points                *int             `json:"points,omitempty"`
	SkippedPoints         int              `json:"skipped_points,omitempty"`
	RowProblems           int              `json:"row_problems,omitempty"`
	ComplianceA           *float64         `json:"compliance_A,omitempty"`
	ClippedPoints         int              `json:"clipped_points,omitempty"`
	NoiseFloorA           *float64         `json:"noise_floor_A,omitempty"`
	NoiseFloorSource      string           `json:"noise_floor_source,omitempty"`
	BelowFloorPoints      int              `json:"below_floor_points,omitempty"`
	StdErr                *fitIVValues     `json:"stderr,omitempty"`
	Correlations          []fitCorrelation `json:"correlations,omitempty"`
	LeakageCurrentA       *float64         `json:"leakage_current_A,omitempty"`
	LeakageBiasV          *float64         `json:"leakage_bias_V,omitempty"`
	ZeroBiasResistanceOhm *float64         `json:"zero_bias_resistance_ohm,omitempty"`
	Notes                 []string         `json:"notes,omitempty"`
	ModelCard             string           `json:"model_card,omitempty"`
	*fitIVCompare
	*fitLitFields // lit curves (fit_lit.go)

	fit *extract.IVFit
	res *fit.IVResult
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

// fitCompareIV compares the data set of a fit with spec over the window,
// at the fit's temperature when the file states none and --temp gave one.
func fitCompareIV(ctx context.Context, r *fitIVReport, session string, spec model.Spec, c fitCommon) *fitIVCompare {
	out := &fitIVCompare{CompareSession: session}
	ds := *r.res.DataSet
	if t := r.res.Temperature; t.Source == fit.SourceOption {
		ds.TemperatureK, ds.StatedTemperatureK = nil, t.K
	}
	cmp, err := fit.CompareIVContext(ctx, spec, &ds, c.window.MinV, c.window.MaxV)
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
	tw := fitTable(w)
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

// fitIVFile imports one file and fits it (a lit curve with the lit model).
func fitIVFile(ctx context.Context, path string, c fitCommon, leakAt *float64) (*fitIVReport, error) {
	return fitIVFileLit(ctx, path, c, leakAt, false)
}

// fitIVFileLit is fitIVFile that fits a lit curve (fit.IsLit, or any
// curve when light) with the lit model.
func fitIVFileLit(ctx context.Context, path string, c fitCommon, leakAt *float64, light bool) (*fitIVReport, error) {
	ds, err := fitImport(ctx, path, measure.KindIV)
	if err != nil {
		return nil, err
	}
	if light || fit.IsLit(ds) {
		return fitLitFile(ctx, path, ds, c, leakAt)
	}
	res, err := fit.IVContext(ctx, ds, c.ivOptions())
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	f, t := res.Fit, res.Temperature
	r := &fitIVReport{File: path, Model: c.model.String(), TemperatureK: fitNum(t.K), TemperatureSource: t.Source,
		WindowV: []float64{f.UsedWindow.MinV, f.UsedWindow.MaxV}, RMSLogResidual: fitNum(f.RMSLogResidual),
		Points: &f.Points, SkippedPoints: f.Skipped, RowProblems: ds.ProblemRows, Correlations: fitCorrelations(f.Correlations),
		Notes: res.Notes, fit: f, res: res}
	if f.Clip.CurrentA != 0 {
		r.ComplianceA, r.ClippedPoints = fitNum(f.Clip.CurrentA), len(f.Clip.Indices)
	}
	if f.NoiseFloorA > 0 {
		r.NoiseFloorA, r.NoiseFloorSource, r.BelowFloorPoints = fitNum(f.NoiseFloorA), f.FloorSource, f.BelowFloor
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

// fitIVSub is `junco fit iv`.
func fitIVSub() fitSub {
	return fitSub{
		use:   "iv FILE... [flags]",
		short: "fit the diode equation to forward I-V data",
		summary: `  junco fit iv FILE... [--temp T] [--window V1:V2] [--model single|double]
                       [--compliance I] [--floor I]
                       [--leakage-at V] [--model-card NAME] [--json] [--ascii]
                       [--compare SESSION|FILE] [--save-to NAME] [--data DIR] [--light]
      Fit the diode equation to forward I-V data (one result per file).
      A lit curve (current of one sign at zero bias, changing sign at
      open circuit; load or generator sign) gets the lit single-diode fit
      (Iph, Is, n, Rs, Rsh; Isc, Voc, maximum power, fill factor);
      --light forces it.
      --compare sets the data against a session's junction: the RMS of
      ln(measured/predicted) over the window, and the minority lifetime of
      the lightly doped side for which the model's diffusion Is equals the
      measured one (with its diffusion length and the assumptions).`,
		long: `Fit the diode equation to forward I-V data (one result per file).
--compare sets the data against a session's junction: the RMS of
ln(measured/predicted) over the window, and the minority lifetime of the
lightly doped side for which the model's diffusion Is equals the measured
one (with its diffusion length and the assumptions). A lit curve (current
of one sign at zero bias, changing sign at open circuit; load or generator
sign) gets the lit single-diode fit (Iph, Is, n, Rs, Rsh; Isc, Voc, maximum
power, fill factor); --light forces it.

` + fitSaveHelp + "\n\n" + fitDataHelp,
		flags: []fitFlag{
			{"temp", "T", "temperature when the file states none, e.g. 300K or 27C (else 300 K assumed)"},
			{"window", "V1:V2", "forward-bias window of the fit, e.g. 0.1:0.7 or 100mV:700mV"},
			{"model", "single|double", "diode model: single (Is, n, Rs, Rsh) or double (Is1, Is2, Rs, Rsh)"},
			{"compliance", "I", "the instrument's current compliance, e.g. 100mA: points clipped at it are left out (else found from the sweep)"},
			{"floor", "I", "the noise floor of the current, e.g. 1pA (else estimated from the data)"},
			{"leakage-at", "V", "also report the leakage current at this reverse bias, e.g. -5V"},
			{"model-card", "NAME", "also write a SPICE diode model card of this name"},
			{"compare", "SESSION|FILE", "set the data against the junction of a session or session file"},
			{"save-to", "NAME", "store the data and the fit as the next revision of session NAME"},
			{"data", "DIR", "session store (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)"},
			{"json", "", "print JSON in SI units instead of text"},
			{"ascii", "", "plain ASCII output (u for micro)"},
			{"light", "", "fit every curve as a lit one (photocurrent Iph, Is, n, Rs, Rsh; Isc, Voc, maximum power, fill factor)"},
		},
		run: fitRunIV,
	}
}

func fitRunIV(ctx context.Context, a *fitArgs, stdout, stderr io.Writer) int {
	c, err := fitParseCommon("iv", a)
	if err != nil {
		fmt.Fprintln(stderr, err)
		return exitUsage
	}
	code := exitOK
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
	code = exitOK
	var reports []*fitIVReport
	for _, p := range a.pos {
		r, err := fitIVFileLit(ctx, p, c, leakAt, a.bools["light"])
		if ctx.Err() != nil {
			fmt.Fprintln(stderr, "junco fit iv: interrupted")
			return exitInterrupted
		}
		if err == nil && cmpSpec != nil && r.fitLitFields != nil {
			r.Notes = append(r.Notes, "--compare does not apply to a lit curve (the prediction is of the dark junction)")
		} else if err == nil && cmpSpec != nil {
			r.fitIVCompare = fitCompareIV(ctx, r, cmpName, *cmpSpec, c)
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
			continue
		}
		if r.TemperatureSource == fit.SourceAssumed {
			fmt.Fprintf(stderr, "junco fit iv: %s: no temperature given; 300 K assumed (use --temp)\n", p)
		}
		if wantCard && r.fitLitFields != nil {
			r.Notes = append(r.Notes, "--model-card: not written for a lit fit")
		} else if wantCard {
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
	// A file that fails is reported on standard error only; standard
	// output holds the fits (an array when several files were named).
	if c.json && len(reports) > 0 {
		var v any = reports
		if len(a.pos) == 1 {
			v = reports[0]
		}
		if err := fitWriteJSON(stdout, v); err != nil {
			fmt.Fprintf(stderr, "junco fit iv: %v\n", err)
			return exitFailure
		}
	} else if !c.json {
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
		for _, r := range reports {
			if r.res != nil {
				items = append(items, fitSaveItem{prefix: "iv", ds: r.res.DataSet, records: []fit.Record{fit.IVRecord(r.res)}})
			} else if r.fitLitFields != nil {
				items = append(items, fitSaveItem{prefix: "iv", ds: r.lit.DataSet, records: []fit.Record{fit.LitRecord(r.lit)}})
			}
		}
		dir, _ := a.str("data")
		code = max(code, fitSaveReport("iv", dir, saveTo, items, stderr))
	}
	return code
}

// fitIVCard is the card of one fit: IS, N, RS (when the fit has a series
// resistance; its 0 means none) and TNOM, the fit's temperature (0 degC
// included).
func fitIVCard(name string, r *fitIVReport) (string, error) {
	f := r.fit
	p := extract.CardParams{TNOM: extract.Given(extract.TNOMCelsius(f.TemperatureK))}
	is, n, rs := f.Single.SaturationCurrentA, f.Single.IdealityFactor, f.Single.SeriesResistanceOhm
	if f.Model == extract.ModelDouble {
		is, n, rs = f.Double.DiffusionCurrentA, 1, f.Double.SeriesResistanceOhm
	}
	p.IS, p.N = extract.Given(is), extract.Given(n)
	if rs > 0 {
		p.RS = extract.Given(rs)
	}
	return extract.ModelCard(name, p)
}

func fitIVText(w io.Writer, r *fitIVReport, ascii bool) {
	tw := fitTable(w)
	if r.fitLitFields != nil {
		fitLitText(w, r, ascii)
		return
	}
	fmt.Fprintf(tw, "file\t%s\n", r.File)
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
	fitTextTail(tw, r.Correlations, r.Notes, r.ModelCard)
	tw.Flush()
}

// fitLitFields are the JSON fields only a lit I-V fit has (fit iv on a lit
// curve, or with --light); Is, n, Rs and Rsh (and their standard errors)
// go in fitIVValues like the dark fit's.
type fitLitFields struct {
	PhotocurrentA       *float64       `json:"photocurrent_A"`
	PhotocurrentStdErrA *float64       `json:"photocurrent_stderr_A"`
	CurrentSign         string         `json:"current_sign"`
	CurrentSignReason   string         `json:"current_sign_reason"`
	RMSResidualA        *float64       `json:"rms_residual_A"`
	FromData            *fitLitFigures `json:"figures_from_data"`
	FromFit             *fitLitFigures `json:"figures_from_fit"`
	StartPoints         int            `json:"start_points"`
	StartPointsAtBest   int            `json:"start_points_at_best"`

	lit *fit.LitResult
}

// fitLitFigures are the figures of merit of a lit curve (generator sign:
// the delivered current and power are positive); null when not found.
type fitLitFigures struct {
	ShortCircuitCurrentA *float64 `json:"short_circuit_current_A"`
	OpenCircuitVoltageV  *float64 `json:"open_circuit_voltage_V"`
	MaxPowerW            *float64 `json:"max_power_W"`
	MaxPowerVoltageV     *float64 `json:"max_power_voltage_V"`
	MaxPowerCurrentA     *float64 `json:"max_power_current_A"`
	FillFactor           *float64 `json:"fill_factor"`
}

func fitLitFiguresOf(f physics.LitFigures) *fitLitFigures {
	return &fitLitFigures{fitNum(f.Isc), fitNum(f.Voc), fitNum(f.Pmax), fitNum(f.Vmp), fitNum(f.Imp), fitNum(f.FF)}
}

// fitLitFile fits a lit I-V data set (model/fit's LitIV) and makes its
// report; options that only the dark fit honours are noted.
func fitLitFile(ctx context.Context, path string, ds *measure.DataSet, c fitCommon, leakAt *float64) (*fitIVReport, error) {
	o := c.ivOptions()
	res, err := fit.LitIVContext(ctx, ds, fit.LitOptions{Window: o.Window, Temperature: o.Temperature})
	if err != nil {
		return nil, fmt.Errorf("%s: lit fit: %w", path, err)
	}
	f, t := res.Fit, res.Temperature
	d, s := f.Diode, f.StdErr
	r := &fitIVReport{File: path, Model: "lit", TemperatureK: fitNum(t.K), TemperatureSource: t.Source,
		WindowV: []float64{f.UsedWindow.MinV, f.UsedWindow.MaxV}, Points: &f.Points, SkippedPoints: f.Skipped,
		RowProblems: ds.ProblemRows, Correlations: fitCorrelations(f.Correlations), Notes: res.Notes,
		fitIVValues: &fitIVValues{SaturationCurrentA: fitNum(d.SaturationCurrentA),
			IdealityFactor: fitNum(d.IdealityFactor), SeriesResistanceOhm: fitNum(d.SeriesResistanceOhm), ShuntResistanceOhm: fitNum(d.ShuntResistanceOhm)},
		StdErr: &fitIVValues{SaturationCurrentA: fitNum(s.SaturationCurrentA),
			IdealityFactor: fitNum(s.IdealityFactor), SeriesResistanceOhm: fitNum(s.SeriesResistanceOhm), ShuntResistanceOhm: fitNum(s.ShuntResistanceOhm)},
		fitLitFields: &fitLitFields{PhotocurrentA: fitNum(d.PhotocurrentA), PhotocurrentStdErrA: fitNum(s.PhotocurrentA), CurrentSign: f.Sign.String(), CurrentSignReason: f.SignWhy, RMSResidualA: fitNum(f.RMSResidualA),
			FromData: fitLitFiguresOf(f.Data), FromFit: fitLitFiguresOf(f.Model), StartPoints: f.StartsTried, StartPointsAtBest: f.StartsAtBest, lit: res}}
	if c.model == extract.ModelDouble {
		r.Notes = append(r.Notes, "--model double does not apply to a lit curve: the lit fit has one diode")
	}
	if leakAt != nil {
		r.Notes = append(r.Notes, "--leakage-at does not apply to a lit curve: the reverse current holds the photocurrent")
	}
	return r, nil
}

// fitLitText writes the text report of a lit fit.
func fitLitText(w io.Writer, r *fitIVReport, ascii bool) {
	tw := fitTable(w)
	f := r.lit.Fit
	d, s := f.Diode, f.StdErr
	fmt.Fprintf(tw, "file\t%s\n", r.File)
	fmt.Fprintf(tw, "model\tlit single diode, T = %s (%s)\n", model.Format(model.Temperature, f.TemperatureK, 4, ascii), r.TemperatureSource)
	fmt.Fprintf(tw, "current sign\t%s (%s)\n", f.Sign, f.SignWhy)
	fmt.Fprintf(tw, "window\t%s .. %s, %d points (%d skipped)\n", model.Format(model.Voltage, f.UsedWindow.MinV, 3, ascii),
		model.Format(model.Voltage, f.UsedWindow.MaxV, 3, ascii), f.Points, f.Skipped)
	fmt.Fprintf(tw, "photocurrent\tIph\t%s\n", fitLitPM(model.Current, d.PhotocurrentA, s.PhotocurrentA, ascii))
	fmt.Fprintf(tw, "saturation current\tIs\t%s\n", fitLitPM(model.Current, d.SaturationCurrentA, s.SaturationCurrentA, ascii))
	fmt.Fprintf(tw, "ideality factor\tn\t%s\n", fitLitPM(model.Dimensionless, d.IdealityFactor, s.IdealityFactor, ascii))
	fmt.Fprintf(tw, "series resistance\tRs\t%s\n", fitLitPM(model.Resistance, d.SeriesResistanceOhm, s.SeriesResistanceOhm, ascii))
	fmt.Fprintf(tw, "shunt resistance\tRsh\t%s\n", fitLitPM(model.Resistance, d.ShuntResistanceOhm, s.ShuntResistanceOhm, ascii))
	fmt.Fprintf(tw, "rms residual\t\t%s\n", model.Format(model.Current, f.RMSResidualA, 4, ascii))
	fmt.Fprintf(tw, "start points\t\t%d of %d reached the best fit\n", f.StartsAtBest, f.StartsTried)
	fig := func(name string, k model.Kind, a, b float64) {
		fmt.Fprintf(tw, "%s\t\t%s (data)  %s (fit)\n", name, fitLitNum(k, a, ascii), fitLitNum(k, b, ascii))
	}
	fig("short-circuit current Isc", model.Current, f.Data.Isc, f.Model.Isc)
	fig("open-circuit voltage Voc", model.Voltage, f.Data.Voc, f.Model.Voc)
	fig("maximum power Pmax", model.Power, f.Data.Pmax, f.Model.Pmax)
	fig("at Vmp", model.Voltage, f.Data.Vmp, f.Model.Vmp)
	fig("at Imp", model.Current, f.Data.Imp, f.Model.Imp)
	fig("fill factor FF", model.Dimensionless, f.Data.FF, f.Model.FF)
	var notes []string
	for _, n := range r.Notes {
		if !strings.HasPrefix(n, "current sign: ") { // shown above
			notes = append(notes, n)
		}
	}
	fitTextTail(tw, r.Correlations, notes, "")
	tw.Flush()
}

// fitLitNum formats a figure, "n/a" when it was not found.
func fitLitNum(k model.Kind, x float64, ascii bool) string {
	if fitNum(x) == nil {
		return "n/a"
	}
	return model.Format(k, x, 4, ascii)
}

// fitLitPM formats "value ± se", or the value "(not determined)" when the
// standard error could not be estimated (every lit parameter is fitted,
// none is held fixed).
func fitLitPM(k model.Kind, v, se float64, ascii bool) string {
	if fitNum(se) == nil {
		return model.Format(k, v, 4, ascii) + "  (not determined)"
	}
	return fitPM(k, v, se, ascii)
}
