package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

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
	// absorption is the absorption table given as --absorption FILE (nil
	// when --absorption gave a value or nothing).
	absorption *model.AbsorptionTable
}

// specValue is a flag.Value on one field of the junction catalogue
// (model.Catalogue): it parses a value in trade units (a number field), a
// word (a text field) or a boolean (an effect switch) and sets the field
// of the Spec it points at. It keeps the text it was given, so that the
// flag can be applied again on top of a junction loaded from a session.
type specValue struct {
	f     model.CatalogueField
	spec  *model.Spec
	shown string
	on    bool // an effect switch's value
}

// String implements flag.Value.
func (v *specValue) String() string {
	if v == nil {
		return ""
	}
	if v.f.Class == model.ClassEffect {
		return strconv.FormatBool(v.on)
	}
	return v.shown
}

// Set implements flag.Value.
func (v *specValue) Set(s string) error {
	switch v.f.Class {
	case model.ClassValue:
		// The catalogue's reading: a value in units, or a word for the
		// empty value (--wp long, --sp ohmic), as the workbench takes it.
		x, given, err := v.f.Parse(s)
		if err != nil {
			return err
		}
		if given {
			v.f.SetValue(v.spec, x)
		} else {
			v.f.Clear(v.spec)
		}
	case model.ClassText:
		if v.f.Lower {
			s = strings.ToLower(s)
		}
		v.f.SetText(v.spec, s)
	case model.ClassEffect:
		b, err := strconv.ParseBool(s)
		if err != nil {
			return fmt.Errorf("allowed true or false (the flag alone means true)")
		}
		v.on = b
		v.f.SetOff(v.spec, b)
	}
	v.shown = s
	return nil
}

// IsBoolFlag makes an effect switch a boolean flag (--no-srh alone is
// true).
func (v *specValue) IsBoolFlag() bool { return v.f.Class == model.ClassEffect }

// reapply sets the field again from the text given: after a session's
// junction replaced the Spec, the flags typed override its values.
func (v *specValue) reapply() error { return v.Set(v.shown) }

// newCalcFlags builds the flag set shared by calc and the commands that
// take a junction on the command line: one flag per entry of the junction
// catalogue (model.Catalogue), then calc's own.
func newCalcFlags(o *calcOptions, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("calc", flag.ContinueOnError)
	fs.SetOutput(stderr)
	for _, f := range model.Catalogue() {
		help := f.Help
		if f.Class == model.ClassValue {
			help = fmt.Sprintf("%s (bare number: %s)", help, model.DefaultUnit(f.Kind))
		}
		sv := &specValue{f: f, spec: &o.spec}
		if f.Flag == model.FieldAbsorption {
			fs.Var(&absorptionFlag{sv: sv, o: o}, f.Flag, help+"; or a FILE: a CSV table of wavelength and absorption with units in its header, e.g. \"wavelength (nm), alpha (1/cm)\" (junco ships none)")
			continue
		}
		fs.Var(sv, f.Flag, help)
	}
	fs.Var(&lightPairFlag{spec: &o.spec}, "light", "monochromatic light WAVELENGTH:POWER_DENSITY, e.g. 650nm:100mW/cm2 (sets --wavelength and --light-power; give --absorption too)")
	fs.BoolVar(&o.ideal, "ideal", false, "every effect off: the ideal Shockley diode (a shunt set with --rsh still applies)")
	fs.StringVar(&o.sweep, "sweep", "", "bias sweep FROM:TO:STEP, e.g. -2V:0.9V:10mV: one row per bias")
	fs.StringVar(&o.tsweep, "tsweep", "", "temperature sweep FROM:TO:STEP, e.g. 250K:400K:10K: Is, VF at --if, dVF/dT, breakdown")
	fs.BoolVar(&o.csv, "csv", false, "with --sweep or --tsweep: CSV with unit-labelled headers (SI) instead of a table")
	fs.BoolVar(&o.json, "json", false, "print one JSON object in SI units instead of text")
	fs.BoolVar(&o.ascii, "ascii", false, "plain ASCII output (u for micro)")
	return fs
}

// calcHelp is the description printed by `junco calc --help`; its list
// of effects comes from the catalogue (model.Catalogue).
func calcHelp() string {
	return `Evaluate one pn junction: depletion-approximation electrostatics, the ideal
(Shockley) diffusion currents and, on by default, the non-ideal effects of a
real diode. Values take units (1e17cm-3, 300K, 1mm2, 10ohm); a bare number
takes the unit named in brackets. Positive bias is forward.

Effects (all on by default; each flag turns one off, --ideal turns all off):
` + effectsHelp() + `current_A is the total with the enabled effects; ideal_current_A stays the
Shockley current.

Sweeps: --sweep FROM:TO:STEP (bias) or --tsweep FROM:TO:STEP (temperature),
as a table or, with --csv, as CSV with unit-labelled SI headers.

Sessions: --session NAME|FILE starts from a stored junction (the flags given
override its values); --save NAME stores the evaluated junction.

Caution: ` + model.Caution
}

// effectsHelp lists the catalogue's effect switches, each with the fields
// that refine it, one per entry wrapped at 80 columns.
func effectsHelp() string {
	var b strings.Builder
	cat := model.Catalogue()
	for _, f := range cat {
		if f.Class != model.ClassEffect {
			continue
		}
		writeHanging(&b, fmt.Sprintf("  --%-13s ", f.Flag), strings.TrimPrefix(f.Help, "effect off: "))
		for _, r := range cat {
			if r.Parent == f.Flag {
				_, choices, _ := strings.Cut(r.Help, ": ")
				writeHanging(&b, strings.Repeat(" ", 18), "--"+r.Flag+" "+choices)
			}
		}
	}
	return b.String()
}

// writeHanging writes text after head, wrapped at 80 columns, its further
// lines indented as far as head.
func writeHanging(b *strings.Builder, head, text string) {
	line := head
	n := 0
	for _, w := range strings.Fields(text) {
		if n > 0 && len(line)+1+len(w) > 80 {
			b.WriteString(line + "\n")
			line, n = strings.Repeat(" ", len(head)), 0
		}
		if n > 0 {
			line += " "
		}
		line += w
		n++
	}
	b.WriteString(line + "\n")
}

// addCalcSessionFlags defines the session flags of calc (all) and solve
// (--session and --data; --save hidden, only to say it belongs to calc).
func addCalcSessionFlags(fs *pflag.FlagSet, sess *calcSessionArgs, all bool) {
	fs.StringVar(&sess.Session, "session", "", "start from a stored session or a session file `NAME|FILE` (flags override its values)")
	fs.StringVar(&sess.DataDir, "data", "", "session store `DIR` (default $XDG_DATA_HOME/junco, else ~/.local/share/junco)")
	fs.StringVar(&sess.Save, "save", "", "store the evaluated junction as a new session, or as the next revision of `NAME`")
	if !all {
		_ = fs.MarkHidden("save")
		return
	}
	fs.BoolVar(&sess.Next, "next-revision", false, "with --save: when another save of NAME came first, save again on top of it\n(retrying), so that scripts saving at the same time lose nothing and fail\nnothing. Never automatic: without it such a save stores nothing and exits 1")
	fs.StringVar(&sess.Author, "author", "", "who saves, a `NAME` (default $USER)")
}

// checkSessionFlags refuses a session flag given with an empty value.
func checkSessionFlags(cmd *cobra.Command) error {
	for _, n := range []string{"session", "save", "data", "author"} {
		if f := cmd.Flags().Lookup(n); f != nil && f.Changed && f.Value.String() == "" {
			return usagef(cmd, "flag --%s needs a non-empty value", n)
		}
	}
	return nil
}

// loadSessionSpec replaces spec by the junction of --session, when given,
// and applies the junction flags of fs that were typed (typed(name)) again
// on top of it: the flags override the session's values.
func loadSessionSpec(cmdName string, sess calcSessionArgs, spec *model.Spec, fs *flag.FlagSet, typed func(string) bool, stderr io.Writer) int {
	if sess.Session == "" {
		return exitOK
	}
	loaded, err := loadSpecForCalc(sess.DataDir, sess.Session)
	if err != nil {
		fmt.Fprintf(stderr, "junco %s: --session %s: %v\n", cmdName, sess.Session, err)
		return exitUsage
	}
	*spec = loaded
	code := exitOK
	fs.VisitAll(func(f *flag.Flag) {
		if v, ok := f.Value.(*specValue); ok && typed(f.Name) {
			if err := v.reapply(); err != nil {
				fmt.Fprintf(stderr, "junco %s: --%s: %v\n", cmdName, f.Name, err)
				code = exitUsage
			}
		}
	})
	return code
}

// newCalcCmd is `junco calc`.
func newCalcCmd(e *env) *cobra.Command {
	o := &calcOptions{spec: model.DefaultSpec()}
	var sess calcSessionArgs
	var gfs *flag.FlagSet
	cmd := &cobra.Command{
		Use:   "calc [flags]",
		Short: "evaluate one junction",
		Long:  calcHelp(),
		Args:  noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := checkSessionFlags(cmd); err != nil {
				return err
			}
			if code := loadSessionSpec("calc", sess, &o.spec, gfs, cmd.Flags().Changed, e.stderr); code != exitOK {
				return exited(code)
			}
			return exited(runCalc(e.ctx, o, sess, e.stdout, e.stderr))
		},
	}
	e.lazyFlags(cmd, func() {
		gfs = newCalcFlags(o, io.Discard)
		cmd.Flags().AddGoFlagSet(gfs)
		addCalcSessionFlags(cmd.Flags(), &sess, true)
	})
	return cmd
}

// runCalc runs `junco calc` on parsed options: o holds the junction (the
// session's, when --session was given, with the flags typed on top).
func runCalc(ctx context.Context, o *calcOptions, sess calcSessionArgs, stdout, stderr io.Writer) int {
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
	if o.ideal {
		bgn, im := o.spec.Effects.BGNModel, o.spec.Effects.IonisationModel
		o.spec.Effects = model.IdealEffects()
		o.spec.Effects.BGNModel, o.spec.Effects.IonisationModel = bgn, im
	}
	if err := o.applyAbsorption(); err != nil {
		fmt.Fprintf(stderr, "junco calc: %v\n", err)
		return exitUsage
	}
	if err := o.spec.Validate(); err != nil {
		return reportError(stderr, err)
	}
	switch {
	case o.sweep != "" && o.tsweep != "":
		fmt.Fprintln(stderr, "junco calc: give --sweep or --tsweep, not both")
		return exitUsage
	case o.sweep != "":
		return runSweep(ctx, *o, stdout, stderr)
	case o.tsweep != "":
		return runTSweep(ctx, *o, stdout, stderr)
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
