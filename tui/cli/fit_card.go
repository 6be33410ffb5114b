package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
)

// fitCardParam is one card parameter in JSON: SI value (eV for EG, degC
// for TNOM), standard error (null when held or chosen) and its source.
type fitCardParam struct {
	Value  *float64 `json:"value"`
	StdErr *float64 `json:"stderr"`
	Unit   string   `json:"unit,omitempty"`
	Source string   `json:"source"`
}

type fitCardSweep struct {
	File              string    `json:"file"`
	Reference         bool      `json:"reference,omitempty"`
	TemperatureK      float64   `json:"temperature_K"`
	TemperatureSource string    `json:"temperature_source"`
	WindowV           []float64 `json:"window_V"`
	Points            int       `json:"points"`
	RMSLogResidual    *float64  `json:"rms_log_residual"`
}

type fitCardRanges struct {
	ForwardV     []float64 `json:"forward_V"`
	ForwardA     []float64 `json:"forward_A"`
	TemperatureK []float64 `json:"temperature_K"`
	CVBiasV      []float64 `json:"cv_bias_V,omitempty"`
	ReverseV     float64   `json:"reverse_V"`
	BreakdownV   *float64  `json:"breakdown_V"`
}

type fitCardCheckIV struct {
	File         string  `json:"file"`
	TemperatureK float64 `json:"temperature_K"`
	Points       int     `json:"points"`
	RMSLogRatio  float64 `json:"rms_log_ratio"`
	Pass         bool    `json:"pass"`
}

type fitCardCheckCV struct {
	Points         int     `json:"points"`
	MaxRelError    float64 `json:"max_rel_error"`
	RMSRelError    float64 `json:"rms_rel_error"`
	Pass           bool    `json:"pass"`
	AnalysisFreqHz float64 `json:"analysis_frequency_Hz"`
}

type fitCardCheckBV struct {
	BiasV      float64 `json:"bias_V"`
	IBV        float64 `json:"ibv_A"`
	SimulatedA float64 `json:"simulated_A"`
}

// fitCardCheckTT is the storage time of the card's transient (current
// step IF to -IR) beside the measured one: reported, not judged.
type fitCardCheckTT struct {
	ForwardA   float64 `json:"forward_A"`
	ReverseA   float64 `json:"reverse_A"`
	MeasuredS  float64 `json:"measured_s"`
	SimulatedS float64 `json:"simulated_s"`
}

type fitCardCheck struct {
	Simulator string             `json:"simulator"`
	Installed bool               `json:"installed"`
	Error     string             `json:"error,omitempty"`
	Element   string             `json:"element,omitempty"`
	IV        []fitCardCheckIV   `json:"iv,omitempty"`
	CV        *fitCardCheckCV    `json:"cv,omitempty"`
	Breakdown *fitCardCheckBV    `json:"breakdown,omitempty"`
	Storage   *fitCardCheckTT    `json:"storage_time,omitempty"`
	Pass      bool               `json:"pass"`
	Limits    map[string]float64 `json:"limits"`
}

// fitCardReport is the JSON object of `fit card`.
type fitCardReport struct {
	Name       string                  `json:"name"`
	ModelCard  string                  `json:"model_card"`
	Subckt     string                  `json:"subckt,omitempty"`
	ShuntOhm   *float64                `json:"shunt_ohm,omitempty"`
	ShuntErr   *float64                `json:"shunt_stderr_ohm,omitempty"`
	Parameters map[string]fitCardParam `json:"parameters"`
	Order      []string                `json:"parameter_order"`
	Sweeps     []fitCardSweep          `json:"iv_sweeps"`
	Ranges     fitCardRanges           `json:"measured_ranges"`
	Cautions   []string                `json:"cautions"`
	Notes      []string                `json:"notes,omitempty"`
	Check      *fitCardCheck           `json:"check,omitempty"`
}

// fitCardSub is `junco fit card`.
func fitCardSub() fitSub {
	return fitSub{
		use:   "card --iv FILE... | --session NAME|FILE  --name NAME [flags]",
		short: "build a SPICE diode model card from a whole characterisation",
		summary: `  junco fit card --iv FILE... | --session NAME|FILE  --name NAME
                       [--cv FILE] [--reverse FILE] [--recovery FILE] [--temp T]
                       [--window V1:V2] [--check] [--json] [--ascii] [--data DIR]
      One SPICE diode model card (.model NAME D(...)) from a whole
      characterisation: IS, N, RS (ISR, NR) from the forward I-V sweeps,
      EG and XTI when they span several temperatures (the first --iv file
      is the reference, TNOM its temperature); CJO, VJ, M from C-V; BV,
      IBV from a reverse sweep to breakdown; TT from a recovery file or
      forward C-V. Each parameter comes with its standard error and
      source; what nothing measured is left out; a .subckt holds an
      observable shunt. --check runs the card in ngspice against the data.`,
		long: `Build one SPICE diode model card from a characterisation: IS, N, RS
(ISR, NR when a second diode is significant) from the forward I-V sweeps,
fitted jointly with EG and XTI when they span several temperatures (the
first --iv file is the reference: TNOM is its temperature; more files may
follow it); CJO, VJ, M from the C-V junction fit with the fixture
capacitance removed (FC = 0.5, SPICE's default, stated); BV and IBV from a
reverse sweep that reaches breakdown; TT from a recovery file (lines
"forward current: 10 mA", "reverse current: 10 mA", "storage time: 40 ns")
or else from forward C-V points. Parameters nothing measured are left out.
With an observable shunt a .subckt is offered. Each I-V sweep is fitted
over its points well above the noise floor and below a compliance plateau
unless --window is given. --check runs the card in ngspice (batch mode)
against the data: rms ln(I_sim/I_meas) < 0.05 per sweep and C within 3 %
at every reverse C-V bias (with --recovery it also prints the card's
storage time beside the measured one, not judged); exit 1 when it fails or
cannot run.

` + fitDataHelp,
		flags: []fitFlag{
			{"iv", "FILE", "forward I-V sweep; repeat, or list more files after it (the first is the reference, TNOM)"},
			{"cv", "FILE", "C-V sweep: CJO, VJ, M (forward points: TT)"},
			{"reverse", "FILE", "reverse I-V sweep that reaches breakdown: BV, IBV"},
			{"recovery", "FILE", "reverse-recovery (storage time) file: TT"},
			{"session", "NAME|FILE", "take the sweeps from a session's data sets instead of files (dark forward I-V, the one nearest the junction's temperature the reference; a reverse sweep; a C-V sweep)"},
			{"data", "DIR", "session store of --session (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)"},
			{"name", "NAME", "the card's model name (a letter first, then letters, digits, _ - . +)"},
			{"temp", "T", "temperature of a file that states none, e.g. 300K or 27C (else 300 K assumed)"},
			{"window", "V1:V2", "forward-bias window of every I-V sweep (default: above the noise floor)"},
			{"check", "", "run the card in ngspice against the data and print the figures"},
			{"json", "", "print JSON in SI units instead of text"},
			{"ascii", "", "plain ASCII output (u for micro)"},
		},
		run: fitRunCard,
	}
}

func fitRunCard(ctx context.Context, a *fitArgs, stdout, stderr io.Writer) int {
	var code int
	in, err := fitCardInputs(ctx, a)
	if err != nil {
		fmt.Fprintf(stderr, "junco fit card: %v\n", err)
		return fitExitCode(err)
	}
	res, err := fit.Card(ctx, *in)
	if ctx.Err() != nil {
		fmt.Fprintln(stderr, "junco fit card: interrupted")
		return exitInterrupted
	}
	if err != nil {
		fmt.Fprintf(stderr, "junco fit card: %v\n", err)
		return fitExitCode(err)
	}
	for _, c := range res.Curves {
		if c.Temperature.Source == fit.SourceAssumed {
			fmt.Fprintf(stderr, "junco fit card: %s: no temperature given; 300 K assumed (use --temp)\n", c.File)
		}
	}
	rep := fitCardBuild(res)
	code = exitOK
	if a.bools["check"] {
		rep.Check = &fitCardCheck{Simulator: fit.SimulatorProgram, Installed: fit.SimulatorInstalled(),
			Limits: map[string]float64{"rms_log_ratio": fit.CheckMaxRMSLog, "max_rel_error": fit.CheckMaxCVRel}}
		chk, err := fit.CheckCard(ctx, res)
		if ctx.Err() != nil {
			fmt.Fprintln(stderr, "junco fit card: interrupted")
			return exitInterrupted
		}
		switch {
		case errors.Is(err, fit.ErrNoSimulator):
			rep.Check.Error = err.Error()
			fmt.Fprintf(stderr, "junco fit card: --check: %v\n", err)
			code = exitFailure
		case err != nil:
			rep.Check.Error = err.Error()
			fmt.Fprintf(stderr, "junco fit card: --check: %v\n", err)
			code = exitFailure
		default:
			fitCardCheckReport(rep.Check, chk)
			if !chk.Pass {
				code = exitFailure
			}
		}
	}
	if a.bools["json"] {
		if err := fitWriteJSON(stdout, rep); err != nil {
			fmt.Fprintf(stderr, "junco fit card: %v\n", err)
			return exitFailure
		}
		return code
	}
	fitCardText(stdout, rep, a.bools["ascii"])
	return code
}

// fitCardInputs imports the files named by the options: --iv (repeatable;
// extra positional files are I-V sweeps too), --cv, --reverse, --recovery.
func fitCardInputs(ctx context.Context, a *fitArgs) (*fit.CardInputs, error) {
	name, ok := a.str("name")
	if !ok {
		return nil, fitBad("--name is required: the card's model name, e.g. --name D1N_lab")
	}
	in := &fit.CardInputs{Name: name}
	if sess, ok := a.str("session"); ok {
		if len(a.vals["iv"]) > 0 || len(a.pos) > 0 || len(a.vals["cv"]) > 0 || len(a.vals["reverse"]) > 0 {
			return nil, fitBad("--session takes the sweeps from the session: give it or --iv/--cv/--reverse files, not both")
		}
		dir, _ := a.str("data")
		doc, err := loadSessionDoc(dir, sess)
		if err != nil {
			return nil, fitBad("--session %s: %v", sess, err)
		}
		sets := make([]fit.NamedDataSet, 0, len(doc.Measurements))
		for i := range doc.Measurements {
			sets = append(sets, fit.NamedDataSet{Name: doc.Measurements[i].ID, DataSet: &doc.Measurements[i].DataSet})
		}
		fromSession, err := fit.CardInputsFrom(name, sets, doc.Spec.Temperature)
		if err != nil {
			return nil, fitBad("--session %s: %v", sess, err)
		}
		*in = fromSession
	}
	if s, ok := a.str("temp"); ok {
		t, err := fitTemperatureFlag("card", s)
		if err != nil {
			return nil, err
		}
		in.Temperature.OptionK = t
	}
	if s, ok := a.str("window"); ok {
		w, err := fitWindowFlag("card", s)
		if err != nil {
			return nil, err
		}
		in.Window = w
	}
	files := append(append([]string(nil), a.vals["iv"]...), a.pos...)
	if len(files) == 0 && len(in.IV) > 0 {
		files = nil // from the session
	} else if len(files) == 0 {
		return nil, fitBad("no forward I-V file given (--iv FILE...; the first is the reference, its temperature TNOM)")
	}
	for _, p := range files {
		ds, err := fitImport(ctx, p, measure.KindIV)
		if err != nil {
			return nil, err
		}
		in.IV = append(in.IV, ds)
		in.IVFiles = append(in.IVFiles, p)
	}
	if p, ok := a.str("cv"); ok {
		ds, err := fitImport(ctx, p, measure.KindCV)
		if err != nil {
			return nil, err
		}
		in.CV = ds
	}
	if p, ok := a.str("reverse"); ok {
		ds, err := fitImport(ctx, p, measure.KindIV)
		if err != nil {
			return nil, err
		}
		in.Reverse = ds
	}
	if p, ok := a.str("recovery"); ok {
		rc, err := fit.ImportRecovery(nil, p)
		if err != nil {
			return nil, fitBad("--recovery: %v", err)
		}
		in.Recovery = rc
	}
	return in, nil
}

func fitCardBuild(r *fit.CardResult) *fitCardReport {
	rep := &fitCardReport{Name: r.Name, ModelCard: r.Card, Subckt: r.Subckt, ShuntOhm: fitNum(r.ShuntOhm), ShuntErr: fitNum(r.ShuntStdErrOhm),
		Parameters: map[string]fitCardParam{}, Cautions: r.Cautions, Notes: r.Notes}
	for _, p := range r.Params {
		rep.Parameters[p.Name] = fitCardParam{Value: fitNum(p.Value), StdErr: fitNum(p.StdErr), Unit: p.Unit, Source: p.Source}
		rep.Order = append(rep.Order, p.Name)
	}
	for _, c := range r.Curves {
		rep.Sweeps = append(rep.Sweeps, fitCardSweep{File: c.File, Reference: c.Reference, TemperatureK: c.Temperature.K,
			TemperatureSource: c.Temperature.Source, WindowV: []float64{c.Window.MinV, c.Window.MaxV}, Points: c.Points, RMSLogResidual: fitNum(c.RMSLog)})
	}
	g := r.Ranges
	rep.Ranges = fitCardRanges{ForwardV: g.ForwardV[:], ForwardA: g.ForwardA[:], TemperatureK: g.TemperatureK[:],
		ReverseV: g.ReverseV, BreakdownV: fitNum(g.BreakdownV)}
	if physics.Finite(g.CVBiasV[0]) {
		rep.Ranges.CVBiasV = g.CVBiasV[:]
	}
	return rep
}

func fitCardCheckReport(out *fitCardCheck, chk *fit.CardCheck) {
	out.Element, out.Pass = chk.Deck, chk.Pass
	for _, c := range chk.IV {
		out.IV = append(out.IV, fitCardCheckIV{File: c.File, TemperatureK: c.TemperatureK, Points: len(c.VoltageV), RMSLogRatio: c.RMSLog, Pass: c.Pass})
	}
	if c := chk.CV; c != nil {
		out.CV = &fitCardCheckCV{Points: len(c.VoltageV), MaxRelError: c.MaxRel, RMSRelError: c.RMSRel, Pass: c.Pass, AnalysisFreqHz: 1e6}
	}
	if b := chk.BV; b != nil {
		out.Breakdown = &fitCardCheckBV{BiasV: b.BiasV, IBV: b.IBV, SimulatedA: b.SimulatedA}
	}
	if s := chk.TT; s != nil {
		out.Storage = &fitCardCheckTT{ForwardA: s.ForwardA, ReverseA: s.ReverseA, MeasuredS: s.MeasuredS, SimulatedS: s.SimulatedS}
	}
}

func fitCardText(w io.Writer, r *fitCardReport, ascii bool) {
	tw := fitTable(w)
	fmt.Fprintf(tw, "model card\t%s\n", r.Name)
	for _, s := range r.Sweeps {
		ref := ""
		if s.Reference {
			ref = ", reference (TNOM)"
		}
		fmt.Fprintf(tw, "I-V sweep\t%s: T = %s (%s)%s, %s .. %s, %d points, rms ln(card/measured) %.4f\n", s.File,
			model.Format(model.Temperature, s.TemperatureK, 4, ascii), s.TemperatureSource, ref,
			model.Format(model.Voltage, s.WindowV[0], 3, ascii), model.Format(model.Voltage, s.WindowV[1], 3, ascii), s.Points, fitVal(s.RMSLogResidual))
	}
	tw.Flush()
	fmt.Fprintln(w)
	tw = fitTable(w)
	fmt.Fprintf(tw, "parameter\tvalue\tstandard error\tfrom\n")
	for _, n := range r.Order {
		p := r.Parameters[n]
		se := "-"
		if p.StdErr != nil {
			se = fmt.Sprintf("%.3g", *p.StdErr)
		}
		unit := p.Unit
		if unit != "" {
			unit = " " + unit
		}
		fmt.Fprintf(tw, "%s\t%.5g%s\t%s\t%s\n", n, fitVal(p.Value), unit, se, p.Source)
	}
	tw.Flush()
	fmt.Fprintln(w)
	fmt.Fprintln(w, "* measured ranges and cautions:")
	for _, c := range r.Cautions {
		fmt.Fprintf(w, "* %s\n", c)
	}
	fmt.Fprintln(w, r.ModelCard)
	if r.Subckt != "" {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "* the shunt is observable and matters: this subcircuit holds it (the .model above cannot)")
		fmt.Fprintln(w, r.Subckt)
	}
	if len(r.Notes) > 0 {
		fmt.Fprintln(w)
		for _, n := range r.Notes {
			fmt.Fprintf(w, "note: %s\n", n)
		}
	}
	if c := r.Check; c != nil {
		fmt.Fprintln(w)
		if c.Error != "" {
			fmt.Fprintf(w, "check: NOT RUN: %s\n", c.Error)
			return
		}
		verdict := map[bool]string{true: "pass", false: "FAIL"}
		fmt.Fprintf(w, "check in %s (the %s), limits: rms ln(I_sim/I_meas) < %g, |C_sim/C_meas - 1| <= %g %%\n", c.Simulator, c.Element, fit.CheckMaxRMSLog, 100*fit.CheckMaxCVRel)
		for _, v := range c.IV {
			fmt.Fprintf(w, "  I-V %s at %s: rms ln ratio %.4f over %d points: %s\n", v.File, model.Format(model.Temperature, v.TemperatureK, 4, ascii), v.RMSLogRatio, v.Points, verdict[v.Pass])
		}
		if v := c.CV; v != nil {
			fmt.Fprintf(w, "  C-V at %d reverse biases (AC, 1 MHz): largest error %.2f %%, rms %.2f %%: %s\n", v.Points, 100*v.MaxRelError, 100*v.RMSRelError, verdict[v.Pass])
		}
		if b := c.Breakdown; b != nil {
			fmt.Fprintf(w, "  breakdown: at %s the card carries %s (IBV %s)\n", model.Format(model.Voltage, b.BiasV, 4, ascii),
				model.Format(model.Current, b.SimulatedA, 3, ascii), model.Format(model.Current, b.IBV, 3, ascii))
		}
		if s := c.Storage; s != nil {
			fmt.Fprintf(w, "  storage time: IF %s to IR %s: measured %s, card %s (%.3g times; reported, not judged: the card's junction charge lengthens it)\n",
				model.Format(model.Current, s.ForwardA, 3, ascii), model.Format(model.Current, s.ReverseA, 3, ascii),
				model.Format(model.Time, s.MeasuredS, 3, ascii), model.Format(model.Time, s.SimulatedS, 3, ascii), s.SimulatedS/s.MeasuredS)
		}
		fmt.Fprintf(w, "check: %s\n", strings.ToUpper(verdict[c.Pass]))
	}
}
