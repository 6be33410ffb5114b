package model

// This file solves a Spec at one bias with the drift-diffusion solver and
// compares the result with the analytic model.

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"strings"

	"junco/physics"
	"junco/physics/solver"
)

// NumericProgress reports the advance of a numeric solve or sweep.
type NumericProgress struct {
	// Stage is "equilibrium", "bias" or "capacitance" (Solve), "iv"
	// (NumericIV) or "cv" (NumericCV).
	Stage string
	// Done and Total count the finished and requested steps or points.
	Done, Total int
	// Bias is the bias just finished, V (0 for "qe").
	Bias float64
	// Wavelength is the wavelength just finished for "qe", m.
	Wavelength float64
	// Value is the result of the step: the built-in potential (V) at
	// equilibrium, the current (A) for bias and iv, the capacitance (F)
	// for capacitance and cv.
	Value float64
}

// NumericProgressFunc receives progress on the solving goroutine; it must
// return quickly. It may be nil.
type NumericProgressFunc func(NumericProgress)

// NumericResult is the drift-diffusion solution of a Spec at its bias.
type NumericResult struct {
	Spec    Spec        // the junction as given
	Numeric NumericSpec // the numeric refinement as given
	// Device is the resolved solver input.
	Device *NumericDevice
	// Solution is the solver's result at the bias (node and edge arrays).
	Solution *solver.Result
	// BuiltInPotential is the equilibrium electrostatic barrier, V.
	BuiltInPotential float64
	// CapacitancePerArea (F/m^2) and Capacitance (F) are the quasi-static
	// depletion capacitance -dQ/dV (solver.CV, the stored minority charge
	// excluded); NaN when it could not be computed.
	CapacitancePerArea, Capacitance float64
	// CurrentDensity (A/m^2) and Current (A, times the Spec's area) are the
	// terminal current, forward positive.
	CurrentDensity, Current float64
	// Donors and Acceptors are the chemical dopant concentrations at the
	// nodes, m^-3 (point values of the profile).
	Donors, Acceptors []float64
	// Junctions are the metallurgical junctions (zero crossings of the
	// net doping), m from the left contact.
	Junctions []float64
	// Lit says whether the Spec is lit; LitFigures are then the figures
	// of merit of the solver's lit I-V (A, V, W; NaN when they could not
	// be computed, with FlagNumericLight).
	Lit        bool
	LitFigures physics.LitFigures
	// Flags are the adapter's flags followed by the solver's.
	Flags []physics.Flag
}

// numericSweep is what a numeric sweep starts from: its biases, the most
// reverse of them (which sizes the device), the device, the solver and
// its built-in potential.
type numericSweep struct {
	vs   []float64
	vmin float64
	nd   *NumericDevice
	s    *solver.Solver
	vbi  float64
}

// numericSweepSetup validates the range (errors name field), builds the
// device for its most reverse bias and solves the equilibrium.
func numericSweepSetup(spec Spec, num NumericSpec, r Range, field string) (numericSweep, error) {
	vs, err := numericBiases(r, field)
	if err != nil {
		return numericSweep{}, err
	}
	vmin := 0.0
	for _, v := range vs {
		vmin = math.Min(vmin, v)
	}
	nd, s, err := numericBuild(spec, num, vmin)
	if err != nil {
		return numericSweep{}, err
	}
	vbi, err := s.BuiltInPotential()
	if err != nil {
		return numericSweep{}, err
	}
	return numericSweep{vs: vs, vmin: vmin, nd: nd, s: s, vbi: vbi}, nil
}

// flags starts the flags of a sweep: the device's, those of breakdown at
// its most reverse bias and the solver's.
func (sw numericSweep) flags() *flagSet {
	var fs flagSet
	fs.add(sw.nd.Flags...)
	fs.add(breakdownFlags(sw.nd.Static, sw.vmin)...)
	fs.add(sw.s.Flags()...)
	return &fs
}

// progress reports the solver's progress of stage to the caller's
// function (nil: none), Value the solver's current (A/m^2) times area.
func (sw numericSweep) progress(stage string, area float64, progress NumericProgressFunc) solver.ProgressFunc {
	return func(p solver.Progress) {
		if progress != nil {
			progress(NumericProgress{Stage: stage, Done: p.Done, Total: p.Total, Bias: p.Bias, Value: p.Current * area})
		}
	}
}

// numericBuild validates, builds and meshes.
func numericBuild(spec Spec, num NumericSpec, vmin float64) (*NumericDevice, *solver.Solver, error) {
	nd, err := BuildNumericDevice(spec, num, vmin)
	if err != nil {
		return nil, nil, err
	}
	s, err := solver.New(nd.Device, nd.Options)
	if err != nil {
		return nil, nil, err
	}
	return nd, s, nil
}

// Solve computes the drift-diffusion solution of the Spec at its bias with
// the refinements of num: the equilibrium (for the built-in potential),
// the solution at the bias by continuation from equilibrium, and the
// capacitance from a second continuation (solver.CV, over 5 mV). Method,
// discretisation and validity: package physics/solver. progress, if not
// nil, is called after each of the three stages.
//
// Errors: a *ValidationError or *solver.ParamError for bad input, a
// *solver.ConvergenceError (naming the bias) when the iteration fails,
// ctx.Err() when cancelled. A capacitance that fails alone gives NaN and
// the FlagNumericCapacitance flag.
func Solve(ctx context.Context, spec Spec, num NumericSpec, progress NumericProgressFunc) (*NumericResult, error) {
	nd, s, err := numericBuild(spec, num, spec.Bias)
	if err != nil {
		return nil, err
	}
	total := 3
	if spec.Light.Lit() {
		total = 4
	}
	report := func(stage string, done int, v, val float64) {
		if progress != nil {
			progress(NumericProgress{Stage: stage, Done: done, Total: total, Bias: v, Value: val})
		}
	}
	vbi, err := s.BuiltInPotential()
	if err != nil {
		return nil, err
	}
	report("equilibrium", 1, 0, vbi)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	sol, err := s.SolveContext(ctx, spec.Bias)
	if err != nil {
		return nil, err
	}
	r := &NumericResult{Spec: spec, Numeric: num, Device: nd, Solution: sol, BuiltInPotential: vbi,
		CurrentDensity: sol.Current, Current: sol.Current * spec.Area,
		CapacitancePerArea: math.NaN(), Capacitance: math.NaN()}
	report("bias", 2, spec.Bias, r.Current)
	r.Flags = append(r.Flags, nd.Flags...)
	cv, cerr := s.CV(ctx, []float64{spec.Bias}, nil)
	switch {
	case ctx.Err() != nil:
		return nil, ctx.Err()
	case cerr != nil || len(cv) == 0:
		r.Flags = append(r.Flags, physics.Flag{Code: FlagNumericCapacitance, Affects: []physics.Class{physics.ClassCapacitance},
			Message: fmt.Sprintf("the capacitance could not be computed: %v", cerr)})
	default:
		r.CapacitancePerArea = cv[0].Capacitance
		r.Capacitance = cv[0].Capacitance * spec.Area
	}
	report("capacitance", 3, spec.Bias, r.Capacitance)
	if spec.Light.Lit() {
		r.Lit = true
		f, err := numericLitFigures(ctx, s, spec.Area)
		if cerr := ctx.Err(); cerr != nil {
			return nil, cerr
		}
		if err != nil {
			f = litFiguresNaN()
			r.Flags = append(r.Flags, physics.Flag{Code: FlagNumericLight, Affects: []physics.Class{physics.ClassLight},
				Message: fmt.Sprintf("the figures of the lit curve could not be computed: %v", err)})
		}
		r.LitFigures = f
		report("light", 4, f.Voc, f.Pmax)
	}
	r.Junctions = s.Junctions()
	r.Donors, r.Acceptors = make([]float64, len(sol.X)), make([]float64, len(sol.X))
	for i, x := range sol.X {
		r.Donors[i], r.Acceptors[i] = nd.Device.Profile.At(x)
	}
	r.Flags = append(r.Flags, breakdownFlags(nd.Static, spec.Bias)...)
	r.Flags = append(r.Flags, multiplicationFlags(nd.Static, spec.Bias)...)
	r.Flags = append(r.Flags, sol.Flags...)
	return r, nil
}

// breakdownFlags flags a reverse bias beyond the analytic breakdown
// voltage (with the safety caution).
func breakdownFlags(st *physics.Static, vmin float64) []physics.Flag {
	vb := st.Breakdown.Voltage
	if !(vb > 0) || !(-vmin >= vb) {
		return nil
	}
	return []physics.Flag{{Code: FlagNumericBreakdown, Affects: []physics.Class{physics.ClassCurrent},
		Message: fmt.Sprintf("%s is beyond the analytic avalanche breakdown voltage (%s): the solver has no impact ionisation and shows no breakdown",
			Format(Voltage, vmin, 4, true), Format(Voltage, -vb, 4, true))}, cautionFlag(true)}
}

// multiplicationFlags flags a bias at which the analytic model multiplies
// the current by the avalanche (its near-breakdown flag, a factor above
// 1.1) while the solver, without impact ionisation, does not: the numeric
// current and photocurrent there are unmultiplied and Compare leaves the
// current out (multipliedAt).
func multiplicationFlags(st *physics.Static, v float64) []physics.Flag {
	if vb := st.Breakdown.Voltage; vb > 0 && -v >= vb {
		return nil // beyond breakdown: breakdownFlags says it
	}
	p := st.Solve(v)
	if !nearBreakdown(p) {
		return nil
	}
	what := ""
	if st.IL > 0 {
		what = fmt.Sprintf(" and its photocurrent by %.3g", p.PhotoGain)
	}
	return []physics.Flag{{Code: FlagNumericNoMultiplication, Affects: []physics.Class{physics.ClassCurrent, physics.ClassLightAtBias},
		Message: fmt.Sprintf("at %s the analytic model multiplies the reverse current by the avalanche (up to %.3g)%s; the solver has no impact ionisation, so its current is not multiplied and the two are not compared",
			Format(Voltage, v, 4, true), math.Max(p.Mn, p.Mp), what)}, cautionFlag(true)}
}

// Nodes returns the number of mesh nodes of the solution.
func (r *NumericResult) Nodes() int { return len(r.Solution.X) }

// frame returns the quantities that put a solution into the frame of the
// analytic curves: the main metallurgical junction xj (m), the
// orientation (+1 when the anode is the left contact) and the anode's
// node index.
func frame(sol *solver.Result) (xj, orient float64, ia int) {
	xj = sol.Depletion.Junction
	orient, ia = 1, 0
	if len(sol.NetDoping) > 0 && sol.NetDoping[0] > 0 {
		orient, ia = -1, len(sol.X)-1
	}
	return xj, orient, ia
}

// NumericQuantities returns the numeric result as quantities under the
// JSON keys of `junco calc` where they mean the same (SI values): bias,
// built-in potential (equilibrium electrostatic barrier), barrier at the
// bias, depletion width and its parts (space-charge edges,
// solver.Depletion), peak field (numericPeakField) and the largest field
// of the solution (solver.Result.PeakField), capacitance (also per area), current
// (also density), the minority/majority ratio at the quasi-neutral edges, the
// lengths, node count, Newton iterations of the last bias step and the
// current-conservation error max|Jn + Jp - J|/|J|; for a lit Spec the
// lit figures (numericLitQuantities).
func NumericQuantities(r *NumericResult) []Quantity {
	sol := r.Solution
	d := sol.Depletion
	xj, _, _ := frame(sol)
	w, xn, xp := math.NaN(), math.NaN(), math.NaN()
	if d.Valid {
		w, xn, xp = d.W, math.Abs(d.XCathode-xj), math.Abs(xj-d.XAnode)
	}
	pl, nl := r.Device.PLength, r.Device.NLength
	if r.Device.Base != BaseJunction {
		pl, nl = math.NaN(), math.NaN()
	}
	g := GroupElectrostatics
	q := []Quantity{
		{"bias_V", GroupConditions, "bias", "V", Voltage, sol.Bias, nil},
		{"built_in_potential_V", g, "built-in potential", "Vbi", Voltage, r.BuiltInPotential, nil},
		{"barrier_V", g, "electrostatic barrier at bias", "Vbi-V", Voltage, sol.Barrier, nil},
		{"depletion_width_m", g, "depletion width", "W", Length, w, nil},
		{"depletion_width_n_m", g, "  into n side", "xn", Length, xn, nil},
		{"depletion_width_p_m", g, "  into p side", "xp", Length, xp, nil},
		{"peak_field_V_per_m", g, "peak field", "Emax", Field, numericPeakField(sol), nil},
		{"peak_field_total_V_per_m", g, "  largest field incl. junction dipole", "Emax,tot", Field, sol.PeakField, nil},
		{"junction_capacitance_F", GroupCapacitance, "depletion capacitance", "Cj", Capacitance, r.Capacitance, nil},
		{"junction_capacitance_per_area_F_per_m2", GroupCapacitance, "  per area", "Cj/A", CapacitancePerArea, r.CapacitancePerArea, nil},
		{"current_A", GroupCurrents, "total current at bias", "I", Current, r.Current, nil},
		{"current_density_A_per_m2", GroupCurrents, "  density", "J", CurrentDensity, r.CurrentDensity, nil},
		{"minority_injection_ratio", GroupCurrents, "minority/majority at quasi-neutral edges", "inj", Dimensionless, d.MinorityRatio, nil},
		{"p_length_m", GroupNumeric, "p region length", "Lp,dev", Length, pl, nil},
		{"n_length_m", GroupNumeric, "n region length", "Ln,dev", Length, nl, nil},
		{"device_length_m", GroupNumeric, "device length", "L", Length, r.Device.Length, nil},
		{"nodes", GroupNumeric, "mesh nodes", "N", Dimensionless, float64(r.Nodes()), nil},
		{"newton_iterations", GroupNumeric, "Newton iterations (last bias step)", "it", Dimensionless, float64(sol.Iterations), nil},
		{"current_conservation_error", GroupNumeric, "current conservation error", "dJ/J", Dimensionless, sol.CurrentSpread, nil},
	}
	return append(q, numericLitQuantities(r)...)
}

// numericPeakField returns the peak field that compares with the analytic
// one, V/m: the field of the depletion charge (solver.Depletion.Field,
// Gauss's law), which leaves out the majority-carrier dipole an ideally
// abrupt asymmetric step holds within a Debye length of its heavy side;
// the largest field of the solution when no region is depleted.
func numericPeakField(sol *solver.Result) float64 {
	if sol.Depletion.Valid {
		return sol.Depletion.Field
	}
	return sol.PeakField
}

// GroupNumeric is the display group of the numeric solution's own
// quantities (lengths, mesh, iterations).
const GroupNumeric = "Numerical solution"

// Difference is one line of the analytic-numeric comparison.
type Difference struct {
	// Key is the JSON key of the quantity (as in `junco calc --json`).
	Key, Label, Symbol string
	Kind               Kind // fixes the trade unit of the two values
	// Analytic and Numeric are the two values, SI.
	Analytic, Numeric float64
	// Relative is (Numeric - Analytic)/|Analytic|; NaN when either value
	// is NaN or the analytic value is 0.
	Relative float64
	// Tolerance is the relative difference beyond which the two models
	// disagree for this quantity (CompareTolerance), and Flagged says
	// whether |Relative| exceeds it.
	Tolerance float64
	Flagged   bool
}

// compareKeys returns the quantities Compare reads out, in order, with
// the lit ones (litCompareKeys) after them when lit is set; a fresh slice
// each call.
func compareKeys(lit bool) []string {
	keys := []string{"built_in_potential_V", "depletion_width_m", "peak_field_V_per_m", "junction_capacitance_F", "current_A"}
	if lit {
		keys = append(keys, litCompareKeys()...)
	}
	return keys
}

// CompareTolerance returns the relative difference beyond which Compare
// flags a quantity: 1 % for the built-in potential (the two models give
// the same Vbi to 1 mV when they contain the same physics,
// TestMatrixIdealBuiltIn, so 1 % of a Vbi near 0.8 V, about 8 mV, is a
// model difference such as band-gap narrowing), 5 % for the others (the
// solver's readouts are mesh-converged to 0.5 %; the rest is the
// depletion approximation and the analytic current formulas).
//
// Lit figures: 5 % for the short-circuit current and the maximum power
// (the solver's photocurrent is within 0.3 % of the closed forms in low
// injection, TestLitShortCircuitAgainstClosedForms; the rest is the
// analytic collection model), 2 % for the open-circuit voltage and the
// fill factor, which depend on the currents only through their logarithm
// (a 5 % current difference moves Voc by kT/q ln 1.05 = 1.3 mV, 0.3 % of
// 0.5 V).
func CompareTolerance(key string) float64 {
	switch key {
	case "built_in_potential_V":
		return 0.01
	case "open_circuit_voltage_V", "fill_factor":
		return 0.02
	}
	return 0.05
}

// Compare reads out the analytic and numeric values of the built-in
// potential, depletion width, peak field, depletion capacitance and
// current with their relative difference. The analytic values are those
// of `junco calc` (depletion approximation, the Spec's Effects); the
// numeric ones those of the drift-diffusion solution, with the width from
// the space charge (solver.Depletion) and the peak field of the depletion
// charge (numericPeakField), so that a difference is one of the models,
// not of the readout. Agreement measured over a grid of materials,
// dopings, biases and temperatures (TestAnalyticNumericMatrix, which
// states every tolerance and its reason): the built-in potential within 2
// mV plus half the band-gap narrowing (which calc leaves out of its
// electrostatic Vbi); width, capacitance and peak field in reverse bias
// within 1 % (symmetric) and 4 % (one-sided: the heavy side's majority
// spill-over); the low-injection forward current within 5 % where it is a
// diffusion current and 15 % where depletion-region recombination is a
// large share. Larger differences mark where the analytic model is not to
// be trusted (Difference.Flagged, at CompareTolerance). A lit Spec adds
// the short-circuit current, open-circuit voltage, maximum power and fill
// factor of the lit I-V (physics.LitFiguresOf on each model's curve).
// Near breakdown, where the analytic current is multiplied by the
// avalanche and the solver's is not, the current's Relative is NaN and not
// flagged (the numeric result carries FlagNumericNoMultiplication).
func Compare(analytic *Result, numeric *NumericResult) []Difference {
	if analytic == nil || numeric == nil {
		return nil
	}
	nq := map[string]Quantity{}
	for _, q := range NumericQuantities(numeric) {
		nq[q.Key] = q
	}
	keys := compareKeys(numeric.Lit)
	out := make([]Difference, 0, len(keys))
	for _, k := range keys {
		q := nq[k]
		a, _ := analytic.Get(k)
		rel := math.NaN()
		if physics.Finite(a) && physics.Finite(q.Value) && a != 0 {
			rel = (q.Value - a) / math.Abs(a)
		}
		if k == "current_A" && nearBreakdown(analytic.Point) {
			// The solver has no impact ionisation: the difference is the
			// multiplication (FlagNumericNoMultiplication), not compared.
			rel = math.NaN()
		}
		tol := CompareTolerance(k)
		out = append(out, Difference{Key: k, Label: strings.TrimSpace(q.Label), Symbol: q.Symbol, Kind: q.Kind, Analytic: a, Numeric: q.Value, Relative: rel,
			Tolerance: tol, Flagged: math.Abs(rel) > tol})
	}
	return out
}

// NumericJSON encodes a numeric result as one JSON object: every
// NumericQuantities key (SI, null where not applicable),
// "depletion_valid", "cv_mode" (the capacitance's small-signal
// assumption, CVLowFrequency or CVHighFrequency), "junctions_m" (the
// metallurgical junctions), "flags"
// (code, message), and, when analytic is not nil, "analytic" (the
// compared quantities under their `junco calc` keys) and "difference"
// (the relative differences of Compare).
func NumericJSON(r *NumericResult, analytic *Result) []byte {
	var b bytes.Buffer
	b.WriteString("{\n")
	for _, q := range NumericQuantities(r) {
		fmt.Fprintf(&b, "  %q: %s,\n", q.Key, jsonNumber(q.Value))
	}
	fmt.Fprintf(&b, "  \"depletion_valid\": %t,\n", r.Solution.Depletion.Valid)
	fmt.Fprintf(&b, "  \"cv_mode\": %q,\n", r.Device.Options.CVMode.String())
	b.WriteString("  \"junctions_m\": [")
	for i, x := range r.Junctions {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(jsonNumber(x))
	}
	b.WriteString("],\n")
	writeJSONFlags(&b, r.Flags)
	if analytic != nil {
		diffs := Compare(analytic, r)
		b.WriteString(",\n  \"analytic\": {")
		for i, d := range diffs {
			if i > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "\n    %q: %s", d.Key, jsonNumber(d.Analytic))
		}
		b.WriteString("\n  },\n  \"difference\": {")
		for i, d := range diffs {
			if i > 0 {
				b.WriteString(",")
			}
			fmt.Fprintf(&b, "\n    %q: %s", d.Key, jsonNumber(d.Relative))
		}
		b.WriteString("\n  }")
	}
	b.WriteString("\n}\n")
	return b.Bytes()
}

// writeJSONFlags writes the "flags" member (without a trailing comma).
func writeJSONFlags(b *bytes.Buffer, flags []physics.Flag) {
	b.WriteString("  \"flags\": [")
	for i, f := range flags {
		if i > 0 {
			b.WriteString(",")
		}
		fmt.Fprintf(b, "\n    {\"code\": %q, \"message\": %q}", f.Code, f.Message)
	}
	if len(flags) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("]")
}
