package cli

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics/extract"
)

// runFit runs `junco fit ARGS...` (args are the words after "fit")
// through the command tree. Exit codes: 0 success, 2 bad input (arguments,
// files, data), 1 other failures (a fit that does not converge, an output
// that cannot be written), 130 interrupted.
func runFit(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	return execute(ctx, append([]string{"fit"}, args...), nil, stdout, stderr)
}

// fitFlag defines one option of a fit subcommand: arg names its value in
// the help ("" for a boolean option).
type fitFlag struct{ name, arg, help string }

// fitSub is one fit subcommand: its usage line, help and options, and the
// run function it calls with the parsed arguments. Adding a subcommand is
// one file holding its fitSub and run function, plus one line in fitSubs.
type fitSub struct {
	use, short, long string
	// summary is the subcommand's entry on `junco fit --help`: its
	// synopsis lines ("  junco fit NAME ...") and a short paragraph.
	summary string
	flags   []fitFlag
	run     func(ctx context.Context, a *fitArgs, stdout, stderr io.Writer) int
}

// name is the subcommand's name: the first word of its usage line.
func (s fitSub) name() string { return strings.Fields(s.use)[0] }

// fitSubs lists the fit subcommands in help order.
func fitSubs() []fitSub {
	return []fitSub{fitIVSub(), fitCVSub(), fitArrheniusSub(), fitBatchSub(), fitCardSub()}
}

// fitHelp is the page of `junco fit --help`: every subcommand of fitSubs
// in short (its summary), then the options common to several.
func fitHelp() string {
	var b strings.Builder
	b.WriteString(`Extract diode parameters from measured data. Each subcommand has its own
page: junco fit SUBCOMMAND --help.
`)
	for _, s := range fitSubs() {
		b.WriteString("\n")
		b.WriteString(s.summary)
	}
	b.WriteString("\n\n" + fitSaveHelp + "\n\n" + fitDataHelp)
	return b.String()
}

// fitNames is the subcommands' names joined by "|" (the root help's line).
func fitNames() string {
	var names []string
	for _, s := range fitSubs() {
		names = append(names, s.name())
	}
	return strings.Join(names, "|")
}

// fitSaveHelp tells what --save-to and --data do (fit iv and cv).
const fitSaveHelp = `--save-to NAME (fit iv and cv) stores each data set fitted (IDs iv-1, cv-1,
...) and its fit (parameters with standard errors; window and residual in
the notes) as the next revision of session NAME, created with the default
junction when missing; failed fits are not stored (fit batch --save-to
keeps its table: see junco fit batch --help). --data DIR selects the
session store (default $XDG_DATA_HOME/junco, else ~/.local/share/junco).`

// fitDataHelp tells what data files the fits read and the units of values.
const fitDataHelp = `Data files: CSV or TSV with a header naming voltage and current (or
capacitance) columns, units in the header (V, mV; A, mA, uA, nA, pA; F, pF,
fF). The temperature is the file's own (a temperature column, else a
"# temperature: 300 K" comment), else --temp, else 300 K assumed (fit iv
and batch; said in a note); every result gives its temperature source.
Bench artefacts (fit iv and batch): points clipped at the instrument's
compliance are left out, the compliance being --compliance, else a run of
equal current at the top of the sweep; the noise floor is --floor, else
estimated from the reverse and near-zero-bias scatter; forward points below
3 floors are left out and the rest weighted by 1 % relative plus floor
noise; each such step is said in a note.
Values take units: --temp 300K or 27C (bare: K), --area 1mm2, 1e-4cm2 or
100um2 (bare: cm^2), --parasitic 2pF (bare: F), --window 0.1:0.7 or
100mV:700mV (bare: V), --current 1mA (bare: A).`

// newFitCmd is `junco fit` and its subcommands.
func newFitCmd(e *env) *cobra.Command {
	cmd := &cobra.Command{Use: "fit SUBCOMMAND", Short: "extract diode parameters from measured data", Long: fitHelp()}
	commandGroup(cmd, "subcommand")
	for _, s := range fitSubs() {
		cmd.AddCommand(s.command(e))
	}
	return cmd
}

// command builds the cobra command of a fit subcommand.
func (s fitSub) command(e *env) *cobra.Command {
	c := &cobra.Command{Use: s.use, Short: s.short, Long: s.long, Args: cobra.ArbitraryArgs}
	var collect func(pos []string) *fitArgs
	e.lazyFlags(c, func() { collect = defineFitFlags(c.Flags(), s.flags) })
	c.RunE = func(_ *cobra.Command, args []string) error {
		return exited(s.run(e.ctx, collect(args), e.stdout, e.stderr))
	}
	return c
}

// fitValues is a valued fit option: every occurrence is kept, in order
// (fit arrhenius reads all its --temp lists; the others the last value).
type fitValues struct {
	name, arg string
	vals      map[string][]string
}

func (v *fitValues) String() string     { return strings.Join(v.vals[v.name], ",") }
func (v *fitValues) Set(s string) error { v.vals[v.name] = append(v.vals[v.name], s); return nil }
func (v *fitValues) Type() string       { return v.arg }

// defineFitFlags defines flags on fs and returns the function that collects
// the parsed options with the positional arguments.
func defineFitFlags(fs *pflag.FlagSet, flags []fitFlag) func(pos []string) *fitArgs {
	vals := map[string][]string{}
	bools := map[string]*bool{}
	for _, f := range flags {
		if f.arg == "" {
			b := new(bool)
			bools[f.name] = b
			fs.BoolVar(b, f.name, false, f.help)
			continue
		}
		fs.Var(&fitValues{name: f.name, arg: f.arg, vals: vals}, f.name, f.help)
	}
	return func(pos []string) *fitArgs {
		a := &fitArgs{vals: vals, bools: map[string]bool{}, pos: pos}
		for n, b := range bools {
			a.bools[n] = *b
		}
		return a
	}
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
	var fe *fit.FileError
	if errors.As(err, &ue) || errors.As(err, &fe) || errors.As(err, &pe) || errors.As(err, &ce) || errors.As(err, &ie) ||
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

// fitParseArgs parses args with the options named (valued take a value,
// boolean none) by the same definitions as the fit commands.
func fitParseArgs(cmd string, args []string, valued, boolean []string) (*fitArgs, error) {
	var flags []fitFlag
	for _, n := range valued {
		flags = append(flags, fitFlag{name: n, arg: "VALUE"})
	}
	for _, n := range boolean {
		flags = append(flags, fitFlag{name: n})
	}
	c := &cobra.Command{Use: cmd}
	collect := defineFitFlags(c.Flags(), flags)
	if err := c.Flags().Parse(normalizeArgs(c, args)); err != nil {
		return nil, flagError(c, err)
	}
	return collect(c.Flags().Args()), nil
}

// fitTextTail writes the lines that end a fit's text report: strong
// correlations, notes and the model card.
func fitTextTail(tw io.Writer, corr []fitCorrelation, notes []string, card string) {
	for _, c := range corr {
		fmt.Fprintf(tw, "strongly correlated\t\t%s and %s, r = %.3f\n", c.A, c.B, c.R)
	}
	for _, n := range notes {
		fmt.Fprintf(tw, "note\t\t%s\n", n)
	}
	if card != "" {
		fmt.Fprintf(tw, "model card\t\t%s\n", card)
	}
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
	// compliance and floor are --compliance and --floor in A (0: found
	// in the data).
	compliance, floor float64
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
	for _, f := range []struct {
		name string
		to   *float64
	}{{"compliance", &c.compliance}, {"floor", &c.floor}} {
		if s, ok := a.str(f.name); ok {
			v, err := model.ParseValue(model.Current, s)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				return c, fitBad("junco fit %s: --%s %q: expected a current above 0, e.g. 100mA or 20pA", cmd, f.name, s)
			}
			*f.to = v
		}
	}
	return c, nil
}

// fitIVOptions are the fit layer's options for the I-V subcommands: the
// file's temperature, else --temp, else 300 K assumed (fit.TemperatureRule).
func (c fitCommon) ivOptions() fit.IVOptions {
	o := fit.IVOptions{Window: c.window, Model: c.model, ComplianceA: c.compliance, FloorA: c.floor}
	if c.haveTemp {
		o.Temperature.OptionK = c.temp
	}
	return o
}

// fitImport imports one data file for a fit (fit.Import: regular files of
// at most 64 MiB).
func fitImport(ctx context.Context, path string, kind measure.Kind) (*measure.DataSet, error) {
	return fit.ImportContext(ctx, nil, path, kind, nil)
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

func fitCorrelations(c []extract.Correlation) []fitCorrelation {
	var out []fitCorrelation
	for _, x := range c {
		out = append(out, fitCorrelation{x.A, x.B, x.R})
	}
	return out
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

func fitVal(p *float64) float64 {
	if p == nil {
		return math.NaN()
	}
	return *p
}

// fitTable is the one layout of the fits' text tables: columns padded by
// two spaces. Flush it after the rows.
func fitTable(w io.Writer) *tabwriter.Writer {
	return tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
}
