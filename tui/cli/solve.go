package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"github.com/spf13/cobra"

	"junco/model"
	"junco/physics"
	"junco/physics/solver"
)

// solveOptions holds the inputs of `junco solve`: the junction flags of
// `junco calc` and the numeric refinements.
type solveOptions struct {
	calc calcOptions
	num  model.NumericSpec
	// shapeText is the flag and text of each shape, for error messages.
	shapeText []string
	lengths   string // P:N
	length    string
	file      string
	species   string
	face      string
	cv        string
	csv       string
	qe        string // wavelengths FROM:TO:STEP of the quantum efficiency
}

// shapeFlag is a repeatable flag.Value that parses one doping shape.
type shapeFlag struct {
	o     *solveOptions
	name  string
	parse func(fields []string) (model.DopingShape, error)
}

// String implements flag.Value (shapes accumulate; there is no default).
func (f *shapeFlag) String() string { return "" }

// Set implements flag.Value: it parses one shape and appends it.
func (f *shapeFlag) Set(s string) error {
	fields := strings.Split(s, ":")
	for i := range fields {
		fields[i] = strings.TrimSpace(fields[i])
	}
	face := ""
	if n := len(fields); n > 0 {
		switch strings.ToLower(fields[n-1]) {
		case model.FaceLeft, model.FaceRight:
			face = strings.ToLower(fields[n-1])
			fields = fields[:n-1]
		}
	}
	sh, err := f.parse(fields)
	if err != nil {
		return err
	}
	sh.Face = face
	f.o.num.Shapes = append(f.o.num.Shapes, sh)
	f.o.shapeText = append(f.o.shapeText, "--"+f.name+" "+s)
	return nil
}

// parseSpecies reads a shape's species token.
func parseSpecies(s string) (string, error) {
	switch strings.ToLower(s) {
	case "donor", "donors":
		return model.SpeciesDonor, nil
	case "acceptor", "acceptors":
		return model.SpeciesAcceptor, nil
	}
	return "", fmt.Errorf("species %q: want donor or acceptor", s)
}

// shapeParser returns the parser of one shape flag: the expected field
// counts (without the optional face), the usage and the constructor.
func shapeParser(usage string, counts []int, build func(species string, f []string) (model.DopingShape, error)) func([]string) (model.DopingShape, error) {
	return func(f []string) (model.DopingShape, error) {
		ok := false
		for _, c := range counts {
			ok = ok || len(f) == c
		}
		if !ok {
			return model.DopingShape{}, fmt.Errorf("want %s", usage)
		}
		sp, err := parseSpecies(f[0])
		if err != nil {
			return model.DopingShape{}, fmt.Errorf("%v (%s)", err, usage)
		}
		return build(sp, f[1:])
	}
}

// parseValues parses the fields with the given kinds.
func parseValues(f []string, kinds ...model.Kind) ([]float64, error) {
	out := make([]float64, len(kinds))
	for i, k := range kinds {
		v, err := model.ParseValue(k, f[i])
		if err != nil {
			return nil, err
		}
		out[i] = v
	}
	return out, nil
}

// Usages of the shape flags.
const (
	implantUsage   = "SPECIES:DOSE:RANGE:STRAGGLE[:left|right], e.g. acceptor:1e14cm-2:0.1um:0.03um"
	diffusionUsage = "SPECIES:SURFACE:SQRT(DT)[:left|right], e.g. donor:1e19cm-3:0.5um"
	uniformUsage   = "SPECIES:CONC[:FROM:TO][:left|right], e.g. donor:1e16cm-3 or donor:1e18cm-3:40um:end"
	gradedUsage    = "SPECIES:GRADIENT:POSITION:PLATEAU[:left|right], e.g. donor:1e20cm-4:1um:1e17cm-3"
)

func (o *solveOptions) addShapeFlags(fs *flag.FlagSet) {
	reg := func(name, help string, p func([]string) (model.DopingShape, error)) {
		fs.Var(&shapeFlag{o: o, name: name, parse: p}, name, help)
	}
	reg("implant", "Gaussian implant "+implantUsage+" (repeatable; depths from the left contact unless :right)",
		shapeParser(implantUsage, []int{4}, func(sp string, f []string) (model.DopingShape, error) {
			dose, err := model.ParseDose(f[0])
			if err != nil {
				return model.DopingShape{}, err
			}
			v, err := parseValues(f[1:], model.Length, model.Length)
			if err != nil {
				return model.DopingShape{}, err
			}
			return model.DopingShape{Kind: model.ShapeGaussian, Species: sp, Dose: dose, Range: v[0], Straggle: v[1]}, nil
		}))
	reg("diffusion", "erfc diffusion from a surface "+diffusionUsage+" (repeatable)",
		shapeParser(diffusionUsage, []int{3}, func(sp string, f []string) (model.DopingShape, error) {
			v, err := parseValues(f, model.Density, model.Length)
			if err != nil {
				return model.DopingShape{}, err
			}
			return model.DopingShape{Kind: model.ShapeErfc, Species: sp, Concentration: v[0], DiffusionLength: v[1]}, nil
		}))
	reg("uniform", "uniform layer "+uniformUsage+"; without FROM:TO the whole device (repeatable)",
		shapeParser(uniformUsage, []int{2, 4}, func(sp string, f []string) (model.DopingShape, error) {
			c, err := model.ParseValue(model.Density, f[0])
			if err != nil {
				return model.DopingShape{}, err
			}
			sh := model.DopingShape{Kind: model.ShapeUniform, Species: sp, Concentration: c}
			if len(f) == 3 {
				if sh.From, err = model.ParseValue(model.Length, f[1]); err != nil {
					return model.DopingShape{}, err
				}
				if !strings.EqualFold(f[2], "end") {
					if sh.To, err = model.ParseValue(model.Length, f[2]); err != nil {
						return model.DopingShape{}, err
					}
					if sh.To == 0 {
						return model.DopingShape{}, fmt.Errorf("TO = 0: a layer ending at the surface is empty; write end for the far contact")
					}
				}
			}
			return sh, nil
		}))
	reg("graded", "linearly graded layer "+gradedUsage+" (repeatable)",
		shapeParser(gradedUsage, []int{4}, func(sp string, f []string) (model.DopingShape, error) {
			v, err := parseValues(f, model.Gradient, model.Length, model.Density)
			if err != nil {
				return model.DopingShape{}, err
			}
			return model.DopingShape{Kind: model.ShapeLinear, Species: sp, Gradient: v[0], Position: v[1], Concentration: v[2]}, nil
		}))
}

// newSolveFlags builds the flag set of `junco solve`: the junction flags
// of `junco calc` (without --tsweep and its boolean --csv) and the numeric
// ones.
func newSolveFlags(o *solveOptions, stderr io.Writer) *flag.FlagSet {
	calc := newCalcFlags(&o.calc, io.Discard)
	fs := flag.NewFlagSet("solve", flag.ContinueOnError)
	fs.SetOutput(stderr)
	calc.VisitAll(func(f *flag.Flag) {
		switch f.Name {
		case "csv", "tsweep":
			return
		case "sweep":
			fs.Var(f.Value, f.Name, "numeric I-V sweep FROM:TO:STEP, e.g. -1V:0.7V:50mV (each point continues from the previous)")
			return
		case "json":
			fs.Var(f.Value, f.Name, "print one JSON object in SI units: the numeric values under calc's keys, \"analytic\" and \"difference\"")
			return
		}
		fs.Var(f.Value, f.Name, f.Usage)
	})
	fs.StringVar(&o.cv, "cv", "", "numeric C-V sweep FROM:TO:STEP, e.g. -5V:0V:0.5V (quasi-static depletion capacitance)")
	fs.StringVar(&o.qe, "qe", "", "internal quantum efficiency at wavelengths FROM:TO:STEP, e.g. 400nm:1000nm:50nm, analytic and numeric (with --absorption FILE, or one --absorption value for every wavelength)")
	fs.StringVar(&o.csv, "csv", "", "CSV with unit-labelled SI headers: profile (the solution along the device), iv (with --sweep) or cv (with --cv)")
	fs.StringVar(&o.lengths, "lengths", "", "lengths of the p and n regions P:N, e.g. 5um:50um; auto for either (default: width + depletion edge, or 5 diffusion lengths for a long region)")
	fs.StringVar(&o.length, "length", "", "device length of a profile device (--base donor|acceptor|none), e.g. 20um (default: deepest feature + 20 um)")
	fs.IntVar(&o.num.Nodes, "nodes", 0, "mesh node count, 20 to 200000 (default: automatic)")
	fs.StringVar(&o.num.CVMode, "cv-mode", "", "with incomplete ionisation: low-frequency (default; the dopant occupation follows the signal) or high-frequency (frozen)")
	fs.StringVar(&o.num.Base, "base", "", "doping the shapes are added to: junction (the --na/--nd junction at the p length), donor (--nd everywhere), acceptor (--na everywhere) or none (default: junction without shapes, none with them)")
	o.addShapeFlags(fs)
	fs.StringVar(&o.file, "profile-file", "", "imported depth profile, CSV with a unit-labelled header, e.g. depth_um,net_cm-3 or \"depth (nm);acceptors (cm^-3)\"")
	fs.StringVar(&o.species, "profile-species", "", "species of a conc column in --profile-file: donor, acceptor or net")
	fs.StringVar(&o.face, "profile-face", "", "contact the --profile-file depths are measured from: left (default) or right")
	return fs
}

// solveHelp is the description printed by `junco solve --help`.
const solveHelp = `Solve the junction numerically: Poisson's equation and the electron and
hole continuity equations on a mesh (drift-diffusion), side by side with
the analytic values of junco calc, so that you see where the depletion
approximation and the diode formulas stop being trustworthy. The junction
flags are those of junco calc; values take units, a bare number takes the
unit named in brackets.

Doping beyond the step or graded junction of --profile:
  --implant   SPECIES:DOSE:RANGE:STRAGGLE   Gaussian implant (dose in cm^-2)
  --diffusion SPECIES:SURFACE:SQRT(DT)      erfc diffusion from the surface
  --uniform   SPECIES:CONC[:FROM:TO]        a layer (TO may be end)
  --graded    SPECIES:GRADIENT:POSITION:PLATEAU
  --profile-file FILE                       an imported depth profile
Each shape may end in :right to measure its depth from the right contact;
shapes are summed per species and added to --base.

Geometry: --lengths P:N sets the p and n region lengths of a junction (a
long region gets 5 minority diffusion lengths), --length L the length of a
profile device, --nodes N the mesh; each choice made for you is flagged.

Outputs: a comparison table (default), --json, --csv profile|iv|cv.
--sweep and --cv report progress on stderr and stop on Ctrl-C, writing the
points finished; the exit status is then 130. Exit 1: the iteration did
not converge (the message names the bias); exit 2: bad input.`

// newSolveCmd is `junco solve`.
func newSolveCmd(e *env) *cobra.Command {
	o := &solveOptions{calc: calcOptions{spec: model.DefaultSpec()}}
	var sess calcSessionArgs
	var gfs *flag.FlagSet
	cmd := &cobra.Command{
		Use:   "solve [flags]",
		Short: "solve the junction numerically (drift-diffusion) beside calc",
		Long:  solveHelp,
		Args:  noArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := checkSessionFlags(cmd); err != nil {
				return err
			}
			if sess.Save != "" {
				return usagef(cmd, "--save is not available here: store the junction with junco calc --save")
			}
			if code := loadSessionSpec("solve", sess, &o.calc.spec, gfs, cmd.Flags().Changed, e.stderr); code != exitOK {
				return exited(code)
			}
			return exited(runSolve(e.ctx, o, e.stdout, e.stderr))
		},
	}
	e.lazyFlags(cmd, func() {
		gfs = newSolveFlags(o, io.Discard)
		cmd.Flags().AddGoFlagSet(gfs)
		addCalcSessionFlags(cmd.Flags(), &sess, false)
	})
	return cmd
}

// runSolve runs `junco solve` on parsed options.
func runSolve(ctx context.Context, o *solveOptions, stdout, stderr io.Writer) int {
	if o.calc.ideal {
		bgn, im := o.calc.spec.Effects.BGNModel, o.calc.spec.Effects.IonisationModel
		o.calc.spec.Effects = model.IdealEffects()
		o.calc.spec.Effects.BGNModel, o.calc.spec.Effects.IonisationModel = bgn, im
	}
	if msg := o.checkModes(); msg != "" {
		fmt.Fprintln(stderr, "junco solve:", msg)
		return exitUsage
	}
	if err := o.resolve(); err != nil {
		fmt.Fprintln(stderr, "junco solve:", err)
		return exitUsage
	}
	if err := o.calc.applyAbsorption(); err != nil {
		fmt.Fprintln(stderr, "junco solve:", err)
		return exitUsage
	}
	if code, bad := o.validate(stderr); bad {
		return code
	}
	switch {
	case o.qe != "":
		return o.runQE(ctx, stdout, stderr)
	case o.calc.sweep != "":
		return o.runIV(ctx, stdout, stderr)
	case o.cv != "":
		return o.runCV(ctx, stdout, stderr)
	}
	return o.runPoint(ctx, stdout, stderr)
}

// checkModes checks that the output flags go together; it returns the
// problem, "" when none.
func (o *solveOptions) checkModes() string {
	switch o.csv {
	case "", "profile", "iv", "cv":
	default:
		return fmt.Sprintf("--csv %q: allowed profile, iv (with --sweep) or cv (with --cv) (the table to write)", o.csv)
	}
	switch {
	case o.calc.sweep != "" && o.cv != "":
		return "give --sweep or --cv, not both (each is its own sweep)"
	case o.qe != "" && (o.calc.sweep != "" || o.cv != "" || o.csv != ""):
		return "--qe is its own table: it does not go with --sweep, --cv or --csv"
	case o.calc.json && o.csv != "":
		return "give --json or --csv, not both"
	case o.csv == "iv" && o.calc.sweep == "":
		return "--csv iv needs --sweep FROM:TO:STEP"
	case o.csv == "cv" && o.cv == "":
		return "--csv cv needs --cv FROM:TO:STEP"
	case o.csv == "profile" && (o.calc.sweep != "" || o.cv != ""):
		return "--csv profile writes the solution at --bias; it does not go with --sweep or --cv"
	case o.csv == "iv" && o.cv != "", o.csv == "cv" && o.calc.sweep != "":
		return "--csv iv goes with --sweep, --csv cv with --cv"
	}
	return ""
}

// resolve turns the text flags into the NumericSpec.
func (o *solveOptions) resolve() error {
	if o.lengths != "" {
		parts := strings.Split(o.lengths, ":")
		if len(parts) != 2 {
			return fmt.Errorf("--lengths %q: want P:N, e.g. 5um:50um (auto for either)", o.lengths)
		}
		dst := []*float64{&o.num.PLength, &o.num.NLength}
		for i, p := range parts {
			p = strings.TrimSpace(p)
			if p == "" || strings.EqualFold(p, "auto") {
				continue
			}
			v, err := model.ParseValue(model.Length, p)
			if err != nil {
				return fmt.Errorf("--lengths %q: %v", o.lengths, err)
			}
			if v == 0 {
				return fmt.Errorf("--lengths %q: a region of zero length; write auto to have it chosen", o.lengths)
			}
			*dst[i] = v
		}
	}
	if o.length != "" {
		v, err := model.ParseValue(model.Length, o.length)
		if err != nil {
			return fmt.Errorf("--length: %v", err)
		}
		if v == 0 {
			return fmt.Errorf("--length 0: a device needs a length; omit the flag to have it chosen")
		}
		o.num.Length = v
	}
	switch strings.ToLower(o.species) {
	case "", model.SpeciesDonor, model.SpeciesAcceptor, model.SpeciesNet:
	default:
		return fmt.Errorf("--profile-species %q: allowed donor, acceptor, net (the species of a conc column)", o.species)
	}
	switch strings.ToLower(o.face) {
	case "", model.FaceLeft, model.FaceRight:
	default:
		return fmt.Errorf("--profile-face %q: allowed left, right (the contact the depths are measured from)", o.face)
	}
	if o.file == "" {
		if o.species != "" || o.face != "" {
			return fmt.Errorf("--profile-species and --profile-face need --profile-file")
		}
		return nil
	}
	f, err := os.Open(o.file)
	if err != nil {
		return fmt.Errorf("--profile-file: %v", err)
	}
	defer f.Close()
	p, err := model.ParseDepthProfile(o.file, f, strings.ToLower(o.species))
	if err != nil {
		return fmt.Errorf("--profile-file: %v", err)
	}
	p.Face = strings.ToLower(o.face)
	o.num.File = p
	return nil
}

// validate checks the Spec and the NumericSpec and prints every bad
// field; it returns the exit code and whether anything was bad.
func (o *solveOptions) validate(stderr io.Writer) (int, bool) {
	var fields []model.FieldError
	for _, err := range []error{o.calc.spec.Validate(), o.num.Validate()} {
		var ve *model.ValidationError
		if errors.As(err, &ve) {
			fields = append(fields, ve.Fields...)
		}
	}
	if len(fields) == 0 {
		return exitOK, false
	}
	o.printFields(stderr, fields)
	return exitUsage, true
}

// printFields writes field errors under the flag names a user typed.
func (o *solveOptions) printFields(stderr io.Writer, fields []model.FieldError) {
	for _, f := range fields {
		name := f.Field
		switch {
		case strings.HasPrefix(name, "shape["):
			var i int
			var rest string
			if k := strings.Index(name, "]"); k > 0 {
				i, _ = strconv.Atoi(name[len("shape["):k])
				rest = strings.TrimPrefix(name[k+1:], ".")
			}
			if i >= 0 && i < len(o.shapeText) {
				fmt.Fprintf(stderr, "junco solve: %s: %s = %s: allowed %s (%s)\n", o.shapeText[i], rest, f.Value, f.Allowed, f.Why)
				continue
			}
		case name == model.FieldNumericPLength:
			name = "lengths (p region)"
		case name == model.FieldNumericNLength:
			name = "lengths (n region)"
		case name == model.FieldNumericProfile:
			name = "profile doping at the contacts"
		}
		fmt.Fprintf(stderr, "junco solve: --%s = %s: allowed %s (%s)\n", name, f.Value, f.Allowed, f.Why)
	}
}

// fail reports an error of a solve and returns the exit code: 2 for bad
// input, 1 for non-convergence, exitInterrupted for cancellation.
func (o *solveOptions) fail(stderr io.Writer, err error) int {
	var ve *model.ValidationError
	var pe *solver.ParamError
	var ce *solver.ConvergenceError
	switch {
	case errors.As(err, &ve):
		o.printFields(stderr, ve.Fields)
		return exitUsage
	case errors.As(err, &ce):
		fmt.Fprintf(stderr, "junco solve: the drift-diffusion iteration failed at %s: %v\n", model.Format(model.Voltage, ce.Bias, 4, true), err)
		fmt.Fprintln(stderr, "junco solve: try a smaller sweep step, a bias nearer 0 V, or another mesh (--nodes)")
		return exitFailure
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		fmt.Fprintln(stderr, "junco solve: interrupted")
		return exitInterrupted
	case errors.As(err, &pe):
		fmt.Fprintf(stderr, "junco solve: %v\n", err)
		return exitUsage
	}
	// The analytic model refused the combination (e.g. Na Nd <= ni^2).
	fmt.Fprintf(stderr, "junco solve: %v\n", err)
	return exitUsage
}

// runPoint solves at --bias and writes the comparison, JSON or the
// profile CSV.
func (o *solveOptions) runPoint(ctx context.Context, stdout, stderr io.Writer) int {
	spec := o.calc.spec
	analytic, err := model.Evaluate(spec)
	if err != nil {
		return o.fail(stderr, err)
	}
	r, err := model.Solve(ctx, spec, o.num, nil)
	if err != nil {
		return o.fail(stderr, err)
	}
	switch {
	case o.calc.json:
		stdout.Write(model.NumericJSON(r, analytic))
	case o.csv == "profile":
		if err := model.WriteNumericProfileCSV(stdout, r); err != nil {
			fmt.Fprintln(stderr, "junco solve:", err)
			return exitFailure
		}
		printSolveFlags(stderr, r.Flags)
	default:
		writeComparison(stdout, r, analytic, o.calc.ascii)
	}
	return exitOK
}

// writeComparison writes the analytic-numeric table, the numeric extras
// and the warnings.
func writeComparison(w io.Writer, r *model.NumericResult, a *model.Result, ascii bool) {
	f := func(k model.Kind, v float64) string { return model.Format(k, v, 5, ascii) }
	d := r.Device
	where := fmt.Sprintf("device %s", f(model.Length, d.Length))
	if d.Base == model.BaseJunction {
		where = fmt.Sprintf("p region %s, n region %s", f(model.Length, d.PLength), f(model.Length, d.NLength))
	}
	fmt.Fprintf(w, "Drift-diffusion solution at %s (%d nodes; %s)\n", f(model.Voltage, r.Solution.Bias), r.Nodes(), where)
	fmt.Fprintf(w, "  %-28s %-6s %16s %16s %11s\n", "", "", "analytic", "numeric", "difference")
	marked := false
	for _, x := range model.Compare(a, r) {
		diff, mark := "n/a", ""
		if !math.IsNaN(x.Relative) {
			diff = fmt.Sprintf("%+.2f %%", 100*x.Relative)
			if x.Flagged {
				mark, marked = "  *", true
			}
		}
		fmt.Fprintf(w, "  %-28s %-6s %16s %16s %11s%s\n", x.Label, x.Symbol, f(x.Kind, x.Analytic), f(x.Kind, x.Numeric), diff, mark)
	}
	if marked {
		fmt.Fprintln(w, "  * differs by more than its tolerance (built-in potential 1 %, the others 5 %): the analytic model is not to be trusted here (or describes another device)")
	}
	fmt.Fprintln(w, model.GroupNumeric)
	labels := map[string]string{
		"barrier_V": "electrostatic barrier at bias", "depletion_width_n_m": "depletion width into n side",
		"depletion_width_p_m": "depletion width into p side", "current_density_A_per_m2": "current density",
		"minority_injection_ratio": "minority/majority at quasi-neutral edges", "nodes": "mesh nodes",
		"newton_iterations": "Newton iterations (last bias step)", "current_conservation_error": "current conservation error",
	}
	for _, q := range model.NumericQuantities(r) {
		label, ok := labels[q.Key]
		if !ok {
			continue
		}
		var text string
		switch q.Key {
		case "nodes", "newton_iterations":
			text = strconv.Itoa(int(q.Value))
		case "current_conservation_error", "minority_injection_ratio":
			text = strconv.FormatFloat(q.Value, 'g', 3, 64)
		default:
			text = q.Text(4, ascii)
		}
		fmt.Fprintf(w, "  %-38s %-7s %14s\n", label, q.Symbol, text)
	}
	if len(r.Flags) > 0 {
		fmt.Fprintln(w, "Warnings")
		for _, fl := range r.Flags {
			fmt.Fprintf(w, "  [%s] %s\n", fl.Code, fl.Message)
		}
	}
}

// printSolveFlags writes flags to stderr (beside CSV output).
func printSolveFlags(stderr io.Writer, flags []physics.Flag) {
	for _, f := range flags {
		fmt.Fprintf(stderr, "junco solve: [%s] %s\n", f.Code, f.Message)
	}
}

// progressPrinter shows the advance of a sweep on stderr: one updating
// line on a terminal, else a line about every tenth of the sweep.
type progressPrinter struct {
	w       io.Writer
	tty     bool
	what    string
	printed bool
}

func newProgressPrinter(w io.Writer, what string) *progressPrinter {
	return &progressPrinter{w: w, tty: isTerminal(w), what: what}
}

// isTerminal reports whether w is a character device (a terminal).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

func (p *progressPrinter) update(pr model.NumericProgress) {
	v := model.Format(model.Voltage, pr.Bias, 4, true)
	if pr.Stage == "qe" {
		v = model.Format(model.Length, pr.Wavelength, 4, true)
	}
	if p.tty {
		fmt.Fprintf(p.w, "\rjunco solve: %s %d/%d points, at %s   ", p.what, pr.Done, pr.Total, v)
		p.printed = true
		return
	}
	every := max(1, pr.Total/10)
	if pr.Done%every == 0 || pr.Done == pr.Total {
		fmt.Fprintf(p.w, "junco solve: %s %d/%d points, at %s\n", p.what, pr.Done, pr.Total, v)
	}
}

// finish ends the updating line.
func (p *progressPrinter) finish() {
	if p.tty && p.printed {
		fmt.Fprintln(p.w)
	}
}

// sweepEnd reports how a sweep ended and returns the exit code.
func (o *solveOptions) sweepEnd(stderr io.Writer, err error, done, total int) int {
	if err == nil {
		return exitOK
	}
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		fmt.Fprintf(stderr, "junco solve: interrupted after %d of %d points; the finished points were written\n", done, total)
		return exitInterrupted
	}
	code := o.fail(stderr, err)
	if done > 0 {
		fmt.Fprintf(stderr, "junco solve: %d of %d points were finished and written\n", done, total)
	}
	return code
}

// solveSweep is what the numeric sweeps (--sweep, --cv) differ in: the
// flag and its progress label, the --csv name that selects CSV, the model
// function that runs it and how its result is written.
type solveSweep[R any] struct {
	flag, label, csv string
	run              func(context.Context, model.Spec, model.NumericSpec, model.Range, model.NumericProgressFunc) (*R, error)
	json             func(*R) []byte
	writeCSV         func(io.Writer, *R) error
	table            func(io.Writer, *R, func(model.Kind, float64) string)
	// flags and counts give the result's flags, its finished points and
	// the points asked for.
	flags  func(*R) []physics.Flag
	counts func(*R) (done, requested int)
}

// runNumericSweep runs a numeric sweep over the range value and writes it as
// JSON, CSV or a table; the flags go to stderr.
func runNumericSweep[R any](o *solveOptions, ctx context.Context, stdout, stderr io.Writer, value string, sw solveSweep[R]) int {
	rng, err := parseRange(sw.flag, value, model.Voltage, model.MaxNumericSweepPoints)
	if err != nil {
		fmt.Fprintln(stderr, "junco solve:", err)
		return exitUsage
	}
	pp := newProgressPrinter(stderr, sw.label)
	res, err := sw.run(ctx, o.calc.spec, o.num, rng, pp.update)
	pp.finish()
	if res == nil {
		return o.fail(stderr, err)
	}
	switch {
	case o.calc.json:
		stdout.Write(sw.json(res))
	case o.csv == sw.csv:
		if werr := sw.writeCSV(stdout, res); werr != nil {
			fmt.Fprintln(stderr, "junco solve:", werr)
			return exitFailure
		}
		printSolveFlags(stderr, sw.flags(res))
	default:
		sw.table(stdout, res, func(k model.Kind, v float64) string { return model.Format(k, v, 4, o.calc.ascii) })
		printSolveFlags(stderr, sw.flags(res))
	}
	done, requested := sw.counts(res)
	return o.sweepEnd(stderr, err, done, requested)
}

// runIV runs --sweep.
func (o *solveOptions) runIV(ctx context.Context, stdout, stderr io.Writer) int {
	return runNumericSweep(o, ctx, stdout, stderr, o.calc.sweep, solveSweep[model.NumericIVResult]{
		flag: "sweep", label: "I-V", csv: "iv", run: model.NumericIV,
		json: (*model.NumericIVResult).JSON, writeCSV: model.WriteNumericIVCSV,
		table: func(w io.Writer, res *model.NumericIVResult, f func(model.Kind, float64) string) {
			fmt.Fprintf(w, "Drift-diffusion I-V (%d nodes), analytic total current beside it\n", res.Nodes)
			fmt.Fprintf(w, "%10s %14s %14s %11s %12s\n", "V", "I numeric", "I analytic", "difference", "W numeric")
			for _, p := range res.Points {
				fmt.Fprintf(w, "%10s %14s %14s %11s %12s\n", f(model.Voltage, p.Bias), f(model.Current, p.Current),
					f(model.Current, p.AnalyticCurrent), percent(p.Current, p.AnalyticCurrent), f(model.Length, p.DepletionWidth))
			}
		},
		flags:  func(r *model.NumericIVResult) []physics.Flag { return r.Flags },
		counts: func(r *model.NumericIVResult) (int, int) { return len(r.Points), r.Requested },
	})
}

// runCV runs --cv.
func (o *solveOptions) runCV(ctx context.Context, stdout, stderr io.Writer) int {
	return runNumericSweep(o, ctx, stdout, stderr, o.cv, solveSweep[model.NumericCVResult]{
		flag: "cv", label: "C-V", csv: "cv", run: model.NumericCV,
		json: (*model.NumericCVResult).JSON, writeCSV: model.WriteNumericCVCSV,
		table: func(w io.Writer, res *model.NumericCVResult, f func(model.Kind, float64) string) {
			fmt.Fprintf(w, "Drift-diffusion C-V, %s (%d nodes), depletion-approximation capacitance beside it\n", res.Mode, res.Nodes)
			fmt.Fprintf(w, "%10s %14s %14s %11s %12s %12s\n", "V", "C numeric", "C analytic", "difference", "W numeric", "W analytic")
			for _, p := range res.Points {
				fmt.Fprintf(w, "%10s %14s %14s %11s %12s %12s\n", f(model.Voltage, p.Bias), f(model.Capacitance, p.Capacitance),
					f(model.Capacitance, p.AnalyticCapacitance), percent(p.Capacitance, p.AnalyticCapacitance),
					f(model.Length, p.DepletionWidth), f(model.Length, p.AnalyticDepletionWidth))
			}
		},
		flags:  func(r *model.NumericCVResult) []physics.Flag { return r.Flags },
		counts: func(r *model.NumericCVResult) (int, int) { return len(r.Points), r.Requested },
	})
}

// percent formats (a - b)/|b| in percent, "n/a" when undefined.
func percent(a, b float64) string {
	if math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0) || b == 0 {
		return "n/a"
	}
	return fmt.Sprintf("%+.2f %%", 100*(a-b)/math.Abs(b))
}
