package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"

	"junco/model"
	"junco/physics"
	"junco/sessions"
)

// calcOptions holds the inputs of `junco calc`.
type calcOptions struct {
	spec   model.Spec
	json   bool
	ascii  bool
	csv    bool
	sweep  string // bias sweep FROM:TO:STEP
	tsweep string // temperature sweep FROM:TO:STEP
	ideal  bool
}

// specFlag is a flag.Value that parses a trade-unit value into a Spec field.
type specFlag struct {
	kind  model.Kind
	set   func(float64)
	shown string
}

func (f *specFlag) String() string { return f.shown }
func (f *specFlag) Set(s string) error {
	v, err := model.ParseValue(f.kind, s)
	if err != nil {
		return err
	}
	f.set(v)
	f.shown = s
	return nil
}

// newCalcFlags builds the flag set shared by calc and the commands that
// take a junction on the command line.
func newCalcFlags(o *calcOptions, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("calc", flag.ContinueOnError)
	fs.SetOutput(stderr)
	s := &o.spec
	val := func(name string, k model.Kind, set func(float64), help string) {
		fs.Var(&specFlag{kind: k, set: set}, name, fmt.Sprintf("%s (bare number: %s)", help, model.DefaultUnit(k)))
	}
	fs.Func("material", "semiconductor: si, ge, gaas, 4h-sic (default si)", func(v string) error {
		s.Material = strings.ToLower(v)
		return nil
	})
	fs.Func("profile", "doping profile: abrupt or linear (default abrupt)", func(v string) error {
		s.Profile = strings.ToLower(v)
		return nil
	})
	val("na", model.Density, func(v float64) { s.AcceptorDensity = v }, "acceptor doping of the p side, e.g. 1e16cm-3")
	val("nd", model.Density, func(v float64) { s.DonorDensity = v }, "donor doping of the n side, e.g. 1e15cm-3")
	val("gradient", model.Gradient, func(v float64) { s.Gradient = v }, "net-doping gradient of a linear profile, e.g. 1e20cm-4")
	fs.StringVar(&s.AcceptorSpecies, "acceptor", "", "acceptor species, e.g. boron (default: the material's usual one)")
	fs.StringVar(&s.DonorSpecies, "donor", "", "donor species, e.g. phosphorus or arsenic")
	val("temp", model.Temperature, func(v float64) { s.Temperature = v }, "temperature, e.g. 300K or 27C (default 300 K)")
	val("area", model.Area, func(v float64) { s.Area = v }, "junction area, e.g. 1mm2, 1e-4cm2, 100um2 (default 1 mm^2)")
	val("bias", model.Voltage, func(v float64) { s.Bias = v }, "applied bias, forward positive (p side positive), e.g. -5V, 0.6V")
	val("wp", model.Length, func(v float64) { s.PWidth = v }, "quasi-neutral width of the p side, e.g. 200um (omitted: long)")
	val("wn", model.Length, func(v float64) { s.NWidth = v }, "quasi-neutral width of the n side (omitted: long)")
	val("taun", model.Time, func(v float64) { s.ElectronLifetime = v }, "electron lifetime in the p side, e.g. 1us (omitted: doping-dependent default)")
	val("taup", model.Time, func(v float64) { s.HoleLifetime = v }, "hole lifetime in the n side (omitted: default)")
	val("sp", model.Velocity, func(v float64) { s.PContactVelocity = &v }, "recombination velocity of the p-side contact, e.g. 1e3cm/s (omitted: ohmic)")
	val("sn", model.Velocity, func(v float64) { s.NContactVelocity = &v }, "recombination velocity of the n-side contact (omitted: ohmic)")
	val("rc", model.Resistance, func(v float64) { s.ContactResistance = v }, "contact and lead resistance in series, e.g. 0.5ohm (omitted: none)")
	val("rsh", model.Resistance, func(v float64) { s.ShuntResistance = v }, "shunt resistance across the junction, e.g. 1Mohm (omitted: none)")
	val("tp", model.Length, func(v float64) { s.PThickness = v }, "thickness of a long p layer for its resistance and punch-through (omitted: 300 um)")
	val("tn", model.Length, func(v float64) { s.NThickness = v }, "thickness of a long n layer, e.g. a 525um substrate (omitted: 300 um)")
	val("power-limit", model.Power, func(v float64) { s.PowerLimit = v }, "flag a bias or sweep dissipating more than this, e.g. 250mW (omitted: 1 W)")
	val("if", model.Current, func(v float64) { s.ForwardCurrent = v }, "reference forward current of VF, dVF/dT and the storage time (omitted: 1 mA)")
	val("ir", model.Current, func(v float64) { s.ReverseCurrent = v }, "reverse current the diode is switched to for the storage time (omitted: equal to --if)")
	fs.BoolVar(&s.Effects.NoSRH, "no-srh", false, "effect off: depletion-region SRH recombination and generation")
	fs.BoolVar(&s.Effects.NoHighInjection, "no-hli", false, "effect off: high injection")
	fs.BoolVar(&s.Effects.NoSeriesResistance, "no-rs", false, "effect off: series resistance of the regions and --rc")
	fs.BoolVar(&s.Effects.NoBGN, "no-bgn", false, "effect off: band-gap narrowing")
	fs.BoolVar(&s.Effects.NoIonisation, "no-ion", false, "effect off: incomplete ionisation (dopants fully ionised)")
	fs.BoolVar(&s.Effects.NoBreakdown, "no-breakdown", false, "effect off: avalanche breakdown search and multiplication")
	fs.BoolVar(&o.ideal, "ideal", false, "every effect off: the ideal Shockley diode (a shunt set with --rsh still applies)")
	fs.StringVar(&s.Effects.BGNModel, "bgn-model", "", "band-gap narrowing set: klaassen1992 (default) or slotboom1976")
	fs.StringVar(&s.Effects.IonisationModel, "ion-model", "", "dopant levels of incomplete ionisation: single-level (default) or lowered")
	fs.StringVar(&o.sweep, "sweep", "", "bias sweep FROM:TO:STEP, e.g. -2V:0.9V:10mV: one row per bias")
	fs.StringVar(&o.tsweep, "tsweep", "", "temperature sweep FROM:TO:STEP, e.g. 250K:400K:10K: Is, VF at --if, dVF/dT, breakdown")
	fs.BoolVar(&o.csv, "csv", false, "with --sweep or --tsweep: CSV with unit-labelled headers (SI) instead of a table")
	fs.BoolVar(&o.json, "json", false, "print one JSON object in SI units instead of text")
	fs.BoolVar(&o.ascii, "ascii", false, "plain ASCII output (u for micro)")
	return fs
}

// calcHelp is the description printed by `junco calc --help`.
const calcHelp = `Usage: junco calc [flags]

Evaluate one pn junction: depletion-approximation electrostatics, the ideal
(Shockley) diffusion currents and, on by default, the non-ideal effects of a
real diode. Values take units (1e17cm-3, 300K, 1mm2, 10ohm); a bare number
takes the unit named in brackets. Positive bias is forward.

Effects (all on by default; each flag turns one off, --ideal turns all off):
  --no-srh        depletion-region recombination/generation (Sah-Noyce-Shockley)
  --no-hli        high injection at the depletion edges
  --no-rs         series resistance of the regions (+ --rc), solved self-consistently
  --no-bgn        band-gap narrowing (Klaassen-Slotboom-de Graaff 1992; Si only)
  --no-ion        incomplete ionisation of the dopants (Fermi-Dirac); --ion-model
                  single-level (default: one isolated level per dopant, fully
                  ionised above its Mott density) or lowered (level lowered
                  with doping)
  --no-breakdown  avalanche breakdown (ionisation integral) and multiplication
current_A is the total with the enabled effects; ideal_current_A stays the
Shockley current.

Sweeps: --sweep FROM:TO:STEP (bias) or --tsweep FROM:TO:STEP (temperature),
as a table or, with --csv, as CSV with unit-labelled SI headers.

Caution: ` + model.Caution + `

Flags:`

// runCalc implements `junco calc`.
func runCalc(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	o := calcOptions{spec: model.DefaultSpec()}
	sess, args, err := calcSessionOptions(args)
	if err != nil {
		fmt.Fprintf(stderr, "junco calc: %v\n", err)
		return exitUsage
	}
	if sess.Save != "" {
		if err := sessions.ValidateName(sess.Save); err != nil {
			fmt.Fprintf(stderr, "junco calc: --save: %v\n", err)
			return exitUsage
		}
	}
	if sess.Next && sess.Save == "" {
		fmt.Fprintln(stderr, "junco calc: --next-revision needs --save NAME")
		return exitUsage
	}
	if sess.Session != "" {
		spec, err := loadSpecForCalc(sess.DataDir, sess.Session)
		if err != nil {
			fmt.Fprintf(stderr, "junco calc: --session %s: %v\n", sess.Session, err)
			return exitUsage
		}
		o.spec = spec
	}
	fs := newCalcFlags(&o, stderr)
	fs.Usage = func() {
		fmt.Fprintln(stderr, calcHelp)
		fmt.Fprintln(stderr, "  -session NAME|FILE\n    \tstart from a stored session or a session file (flags override its values)")
		fmt.Fprintln(stderr, "  -save NAME\n    \tstore the evaluated junction as a new session, or as the next revision of NAME")
		fmt.Fprintln(stderr, "  -next-revision\n    \twith --save: when another save of NAME came first, save again on top of it\n    \t(retrying), so that scripts saving at the same time lose nothing and fail\n    \tnothing. Never automatic: without it such a save stores nothing and exits 1")
		fmt.Fprintln(stderr, "  -data DIR\n    \tsession store (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)")
		fmt.Fprintln(stderr, "  -author NAME\n    \twho saves (default $USER)")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return exitOK
		}
		return exitUsage
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "junco calc: unexpected argument %q\n", fs.Arg(0))
		return exitUsage
	}
	if o.ideal {
		bgn, im := o.spec.Effects.BGNModel, o.spec.Effects.IonisationModel
		o.spec.Effects = model.IdealEffects()
		o.spec.Effects.BGNModel, o.spec.Effects.IonisationModel = bgn, im
	}
	if err := o.spec.Validate(); err != nil {
		return reportError(stderr, err)
	}
	switch {
	case o.sweep != "" && o.tsweep != "":
		fmt.Fprintln(stderr, "junco calc: give --sweep or --tsweep, not both")
		return exitUsage
	case o.sweep != "":
		return runSweep(ctx, o, stdout, stderr)
	case o.tsweep != "":
		return runTSweep(ctx, o, stdout, stderr)
	case o.csv:
		fmt.Fprintln(stderr, "junco calc: --csv needs --sweep or --tsweep")
		return exitUsage
	}
	res, err := model.Evaluate(o.spec)
	if err != nil {
		return reportError(stderr, err)
	}
	if sess.Save != "" {
		author := sess.Author
		if author == "" {
			author = currentUser()
		}
		rev, err := saveSpecFromCalc(sess.DataDir, sess.Save, o.spec, author, sess.Next, stderr)
		var se *sessions.StaleError
		if errors.As(err, &se) {
			fmt.Fprintf(stderr, "junco calc: --save %s: another save of the session came first (revision %d); nothing was saved: run again, or add --next-revision to save on top of whatever is newest\n", sess.Save, se.Latest)
			return exitFailure
		}
		if err != nil {
			fmt.Fprintf(stderr, "junco calc: --save %s: %s\n", sess.Save, sessions.Printable(err.Error(), 0, ""))
			return exitFailure
		}
		fmt.Fprintf(stderr, "junco calc: saved as revision %d of session %q\n", rev, sess.Save)
	}
	if o.json {
		stdout.Write(res.JSON())
		return exitOK
	}
	fmt.Fprint(stdout, res.Text(o.ascii))
	return exitOK
}

func reportError(stderr io.Writer, err error) int {
	var ve *model.ValidationError
	if errors.As(err, &ve) {
		for _, f := range ve.Fields {
			fmt.Fprintf(stderr, "junco calc: --%s\n", f.Error())
		}
	} else {
		fmt.Fprintf(stderr, "junco calc: %v\n", err)
	}
	return exitUsage
}

// parseRange parses a sweep flag FROM:TO:STEP with units of kind k, at
// most limit points (model.ParseSweep, the one sweep parser).
func parseRange(flagName, text string, k model.Kind, limit int) (model.Range, error) {
	r, err := model.ParseSweep(k, text, limit)
	if err != nil {
		return model.Range{}, fmt.Errorf("--%s: %v", flagName, err)
	}
	return r, nil
}

// printFlags writes the distinct flags of a sweep to stderr.
func printFlags(stderr io.Writer, flags []physics.Flag) {
	for _, f := range flags {
		fmt.Fprintf(stderr, "junco calc: [%s] %s\n", f.Code, f.Message)
	}
}

// interrupted reports a sweep stopped by SIGINT or SIGTERM (the context)
// and returns exitInterrupted; it returns -1 for any other error.
func interrupted(stderr io.Writer, err error) int {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		fmt.Fprintln(stderr, "junco calc: interrupted; nothing was written")
		return exitInterrupted
	}
	return -1
}

func runSweep(ctx context.Context, o calcOptions, stdout, stderr io.Writer) int {
	r, err := parseRange("sweep", o.sweep, model.Voltage, model.MaxSweepPoints)
	if err != nil {
		fmt.Fprintln(stderr, "junco calc:", err)
		return exitUsage
	}
	pts, flags, err := model.IVSweep(ctx, o.spec, r)
	if code := interrupted(stderr, err); code >= 0 {
		return code
	}
	if err != nil {
		return reportError(stderr, err)
	}
	printFlags(stderr, flags)
	if o.csv {
		if err := model.WriteIVCSV(stdout, pts); err != nil {
			fmt.Fprintln(stderr, "junco calc:", err)
			return exitFailure
		}
		return exitOK
	}
	f := func(k model.Kind, v float64) string { return model.Format(k, v, 4, o.ascii) }
	fmt.Fprintf(stdout, "%10s %12s %12s %12s %12s %12s %12s %8s %12s %7s\n", "V", "I", "I_diff", "I_rec/gen", "I_shunt", "I_ideal", "C", "M", "G (S)", "n")
	for _, p := range pts {
		fmt.Fprintf(stdout, "%10s %12s %12s %12s %12s %12s %12s %8s %12s %7s\n", f(model.Voltage, p.V), f(model.Current, p.Current),
			f(model.Current, p.Diffusion), f(model.Current, p.Recombination+p.Generation), f(model.Current, p.Shunt),
			f(model.Current, p.IdealCurrent), f(model.Capacitance, p.TotalCap), f(model.Dimensionless, p.Mp),
			strconv.FormatFloat(p.Conductance, 'g', 4, 64), f(model.Dimensionless, p.Ideality))
	}
	return exitOK
}

func runTSweep(ctx context.Context, o calcOptions, stdout, stderr io.Writer) int {
	r, err := parseRange("tsweep", o.tsweep, model.Temperature, model.MaxSweepPoints)
	if err != nil {
		fmt.Fprintln(stderr, "junco calc:", err)
		return exitUsage
	}
	iF := o.spec.ForwardCurrentOrDefault()
	rows, err := model.TemperatureSweep(ctx, o.spec, r, iF)
	if code := interrupted(stderr, err); code >= 0 {
		return code
	}
	if err != nil {
		return reportError(stderr, err)
	}
	seen := map[string]bool{}
	var flags []physics.Flag
	for _, row := range rows {
		for _, f := range row.Flags {
			if !seen[f.Code] {
				seen[f.Code] = true
				flags = append(flags, f)
			}
		}
	}
	printFlags(stderr, append(flags, physics.Flag{Code: model.FlagCaution, Message: model.Caution}))
	if o.csv {
		if err := model.WriteTemperatureCSV(stdout, rows, iF); err != nil {
			fmt.Fprintln(stderr, "junco calc:", err)
			return exitFailure
		}
		return exitOK
	}
	f := func(k model.Kind, v float64) string { return model.Format(k, v, 4, o.ascii) }
	fmt.Fprintf(stdout, "%9s %12s %12s %12s %14s %12s\n", "T", "Is", "Is,diff", "VF@"+model.Format(model.Current, iF, 3, true), "dVF/dT (mV/K)", "VB")
	for _, row := range rows {
		fmt.Fprintf(stdout, "%9s %12s %12s %12s %14s %12s\n", f(model.Temperature, row.T), f(model.Current, row.Is), f(model.Current, row.IsDiff),
			f(model.Voltage, row.VF), strconv.FormatFloat(row.DVFDT*1e3, 'f', 3, 64), f(model.Voltage, row.Breakdown))
	}
	return exitOK
}
