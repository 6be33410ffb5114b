package model

// This file runs numeric I-V and C-V sweeps and writes them as CSV and JSON.

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"junco/physics"
)

// numericBiases returns the validated points of a numeric sweep.
func numericBiases(r Range, field string) ([]float64, error) {
	vs, err := r.PointsUpTo(MaxNumericSweepPoints)
	if err != nil {
		return nil, &ValidationError{Fields: []FieldError{{Field: field, Value: fmt.Sprintf("%g:%g:%g V", r.From, r.To, r.Step),
			Allowed: fmt.Sprintf("FROM:TO:STEP with a non-zero step pointing from FROM to TO, at most %d points (MaxNumericSweepPoints)", MaxNumericSweepPoints),
			Why:     err.Error()}}}
	}
	if err := checkBiases(field, vs); err != nil {
		return nil, err
	}
	return vs, nil
}

// NumericIVPoint is one bias of a numeric current-voltage sweep.
type NumericIVPoint struct {
	Bias float64 // V
	// Current (A) and CurrentDensity (A/m^2) are the terminal current,
	// forward positive.
	Current, CurrentDensity float64
	// AnalyticCurrent is the analytic total current at the same bias, A
	// (model.IVSweep; NaN when unavailable).
	AnalyticCurrent float64
	// Barrier is the electrostatic barrier Vbi - V, V.
	Barrier float64
	// DepletionWidth (m, NaN when no region is depleted) and PeakField
	// (V/m, numericPeakField: the field of the depletion charge) describe
	// the junction.
	DepletionWidth, PeakField float64
	// Iterations is the Newton iteration count of the last step and
	// CurrentSpread the current-conservation error.
	Iterations    int
	CurrentSpread float64 // max |Jn + Jp - J|/|J| along the device
}

// NumericIVResult is a numeric current-voltage sweep; on cancellation or
// non-convergence it holds the points finished.
type NumericIVResult struct {
	Spec   Spec           // the junction
	Device *NumericDevice // the resolved solver input
	Range  Range          // the sweep asked for, V
	// Requested is the number of biases asked for.
	Requested int
	// Nodes is the mesh node count; BuiltInPotential the equilibrium
	// barrier, V.
	Nodes            int
	BuiltInPotential float64          // see Nodes
	Points           []NumericIVPoint // the points finished, in sweep order
	// Flags are the distinct flags of the device and the points.
	Flags []physics.Flag
}

// flagSet collects distinct flags in order of appearance: flags of the
// device by code and message (two length choices are two flags), flags of
// the sweep's points by code (the first message stands for the others).
type flagSet struct {
	seen  map[string]bool
	flags []physics.Flag
}

func (f *flagSet) addKeyed(key func(physics.Flag) string, fl []physics.Flag) {
	if f.seen == nil {
		f.seen = map[string]bool{}
	}
	for _, x := range fl {
		if k := key(x); !f.seen[k] {
			f.seen[k] = true
			f.flags = append(f.flags, x)
		}
	}
}

// add adds device flags (distinct by code and message).
func (f *flagSet) add(fl ...physics.Flag) {
	f.addKeyed(func(x physics.Flag) string { return x.Code + "\x00" + x.Message }, fl)
}

// addPoint adds the flags of a sweep point (distinct by code).
func (f *flagSet) addPoint(fl ...physics.Flag) {
	f.addKeyed(func(x physics.Flag) string { return x.Code }, fl)
}

// NumericIV sweeps the bias over r (V) with the drift-diffusion solver,
// each point by continuation from the previous one (solver.Sweep), and
// pairs each point with the analytic total current. progress, if not nil,
// is called after each point (Stage "iv", Value the current in A).
//
// On cancellation or non-convergence it returns the points finished
// together with the error (ctx.Err() or a *solver.ConvergenceError naming
// the bias); bad input gives a nil result and a *ValidationError.
func NumericIV(ctx context.Context, spec Spec, num NumericSpec, r Range, progress NumericProgressFunc) (*NumericIVResult, error) {
	sw, err := numericSweepSetup(spec, num, r, FieldNumericSweep)
	if err != nil {
		return nil, err
	}
	vs, nd, s, vbi := sw.vs, sw.nd, sw.s, sw.vbi
	out := &NumericIVResult{Spec: spec, Device: nd, Range: r, Requested: len(vs), Nodes: len(s.Nodes()), BuiltInPotential: vbi}
	analytic := make([]float64, len(vs))
	for i := range analytic {
		analytic[i] = math.NaN()
	}
	if pts, _, aerr := IVSweep(ctx, spec, r); aerr == nil && len(pts) == len(vs) {
		for i, p := range pts {
			analytic[i] = p.Current
		}
	}
	fs := sw.flags()
	res, serr := s.Sweep(ctx, vs, sw.progress("iv", spec.Area, progress))
	for i, x := range res {
		w := math.NaN()
		if x.Depletion.Valid {
			w = x.Depletion.W
		}
		out.Points = append(out.Points, NumericIVPoint{Bias: x.Bias, Current: x.Current * spec.Area, CurrentDensity: x.Current,
			AnalyticCurrent: analytic[i], Barrier: x.Barrier, DepletionWidth: w, PeakField: numericPeakField(x),
			Iterations: x.Iterations, CurrentSpread: x.CurrentSpread})
		fs.addPoint(x.Flags...)
	}
	out.Flags = fs.flags
	return out, serr
}

// NumericCVPoint is one bias of a numeric capacitance-voltage sweep.
type NumericCVPoint struct {
	Bias float64 // V
	// Capacitance (F) and CapacitancePerArea (F/m^2) are the quasi-static
	// depletion capacitance -dQ/dV (solver.CVPoint).
	Capacitance, CapacitancePerArea float64
	// AnalyticCapacitance is the depletion-approximation capacitance at
	// the same bias, F (NaN at or above the built-in potential).
	AnalyticCapacitance float64
	// DepletionWidth and AnalyticDepletionWidth are the numeric
	// (space-charge, solver.Depletion) and depletion-approximation widths, m.
	DepletionWidth, AnalyticDepletionWidth float64
	// Charge is the dipole charge per area, C/m^2; Current the terminal
	// current, A.
	Charge, Current float64
}

// NumericCVResult is a numeric capacitance-voltage sweep; on cancellation
// or non-convergence it holds the points finished.
type NumericCVResult struct {
	Spec             Spec             // the junction
	Device           *NumericDevice   // the resolved solver input
	Range            Range            // the sweep asked for, V
	Requested        int              // biases asked for
	Nodes            int              // mesh node count
	BuiltInPotential float64          // equilibrium barrier, V
	Points           []NumericCVPoint // the points finished, in sweep order
	Flags            []physics.Flag   // distinct flags of the device
	// Mode is CVLowFrequency (the dopant occupation follows the signal)
	// or CVHighFrequency (frozen); the two agree with complete
	// ionisation.
	Mode string
}

// NumericCV computes the quasi-static depletion capacitance at each bias
// of r (V) with the drift-diffusion solver (solver.CV: C = -dQ/dV over 5
// mV, Q the charge on the cathode side of the electrical junction), paired
// with the depletion-approximation capacitance eps A/W of the analytic
// model (Sze & Ng 2007, eq. 2.30). Errors and partial results as
// NumericIV; progress Stage "cv", Value the capacitance in F.
func NumericCV(ctx context.Context, spec Spec, num NumericSpec, r Range, progress NumericProgressFunc) (*NumericCVResult, error) {
	sw, err := numericSweepSetup(spec, num, r, FieldNumericCV)
	if err != nil {
		return nil, err
	}
	vs, nd, s, vbi := sw.vs, sw.nd, sw.s, sw.vbi
	out := &NumericCVResult{Spec: spec, Device: nd, Range: r, Requested: len(vs), Nodes: len(s.Nodes()), BuiltInPotential: vbi,
		Mode: nd.Options.CVMode.String()}
	fs := sw.flags()
	pts, serr := s.CV(ctx, vs, sw.progress("cv", spec.Area, progress))
	for _, p := range pts {
		ap := nd.Static.At(p.Bias)
		out.Points = append(out.Points, NumericCVPoint{Bias: p.Bias, Capacitance: p.Capacitance * spec.Area, CapacitancePerArea: p.Capacitance,
			AnalyticCapacitance: ap.Cap, DepletionWidth: p.Width, AnalyticDepletionWidth: ap.Depletion.W,
			Charge: p.Charge, Current: p.Current * spec.Area})
	}
	out.Flags = fs.flags
	return out, serr
}

// NumericIVCurve returns the numeric and the analytic total current (A)
// against bias, for overlay with the analytic "iv" curve.
func NumericIVCurve(r *NumericIVResult) Curve {
	xs, num, an := overlayColumns(r.Points, func(p NumericIVPoint) (float64, float64, float64) {
		return p.Bias, p.Current, p.AnalyticCurrent
	})
	return Curve{ID: CurveNumericIV, Title: "Current against bias: drift-diffusion and analytic",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "current I", Kind: Current}, Xs: xs,
		Series: []Series{{"drift-diffusion", num}, {"analytic (total)", an}}, Flags: r.Flags}
}

// NumericCVCurve returns the numeric and the depletion-approximation
// capacitance (F) against bias, for overlay with the analytic "cv" curve.
func NumericCVCurve(r *NumericCVResult) Curve {
	xs, num, an := overlayColumns(r.Points, func(p NumericCVPoint) (float64, float64, float64) {
		return p.Bias, p.Capacitance, p.AnalyticCapacitance
	})
	return Curve{ID: CurveNumericCV, Title: "Depletion capacitance against bias: drift-diffusion and analytic",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "capacitance C", Kind: Capacitance}, Xs: xs,
		Series: []Series{{"drift-diffusion", num}, {"depletion approximation", an}}, Flags: r.Flags}
}

// overlayColumns returns the bias, numeric and analytic columns of a
// sweep's points, as col reads them from a point.
func overlayColumns[P any](points []P, col func(P) (bias, numeric, analytic float64)) (xs, num, an []float64) {
	n := len(points)
	xs, num, an = make([]float64, n), make([]float64, n), make([]float64, n)
	for i, p := range points {
		xs[i], num[i], an[i] = col(p)
	}
	return xs, num, an
}

// relDiff returns (a - b)/|b|, NaN when undefined.
func relDiff(a, b float64) float64 {
	if !physics.Finite(a) || !physics.Finite(b) || b == 0 {
		return math.NaN()
	}
	return (a - b) / math.Abs(b)
}

// writeCSVRow writes one CSV row of numbers (NaN as empty fields).
func writeCSVRow(b *bytes.Buffer, row []float64) {
	for i, v := range row {
		if i > 0 {
			b.WriteByte(',')
		}
		if v == 0 {
			v = 0 // no "-0"
		}
		b.WriteString(csvNumber(v))
	}
	b.WriteByte('\n')
}

// NumericProfileCSVHeader is the header of WriteNumericProfileCSV.
const NumericProfileCSVHeader = "x_m,position_from_junction_m,potential_V,field_V_per_m,ec_eV,ev_eV,efn_eV,efp_eV," +
	"electron_density_per_m3,hole_density_per_m3,donor_density_per_m3,acceptor_density_per_m3,net_ionised_doping_per_m3," +
	"charge_density_C_per_m3,recombination_rate_per_m3_s,electron_current_density_A_per_m2,hole_current_density_A_per_m2,total_current_density_A_per_m2"

// WriteNumericProfileCSV writes the solution at the nodes as CSV with
// unit-labelled SI headers: x from the left contact, position from the
// junction (p side negative), potential relative to the anode, field,
// band edges and quasi-Fermi levels relative to the anode's hole
// quasi-Fermi level, densities, chemical and ionised doping, charge,
// recombination rate, current densities. Field and current densities
// live on the cells; at a node they are the mean of the adjacent cells,
// signed as in the curves (positive from p to n).
func WriteNumericProfileCSV(w io.Writer, r *NumericResult) error {
	sol := r.Solution
	xj, orient, ia := frame(sol)
	shift := -sol.Efp[ia]
	cell := func(v []float64, i int) float64 {
		switch {
		case len(v) == 0:
			return math.NaN()
		case i == 0:
			return v[0]
		case i >= len(v):
			return v[len(v)-1]
		}
		return 0.5 * (v[i-1] + v[i])
	}
	var b bytes.Buffer
	b.WriteString(NumericProfileCSVHeader + "\n")
	for i, x := range sol.X {
		jn, jp := orient*cell(sol.Jn, i), orient*cell(sol.Jp, i)
		writeCSVRow(&b, []float64{x, orient * (x - xj), sol.Potential[i] - sol.Potential[ia], orient * cell(sol.Field, i),
			sol.Ec[i] + shift, sol.Ev[i] + shift, sol.Efn[i] + shift, sol.Efp[i] + shift,
			sol.N[i], sol.P[i], r.Donors[i], r.Acceptors[i], sol.NetDoping[i], sol.Charge[i], sol.Recombination[i], jn, jp, jn + jp})
	}
	_, err := w.Write(b.Bytes())
	return err
}

// NumericIVCSVHeader is the header of WriteNumericIVCSV.
const NumericIVCSVHeader = "bias_V,current_A,current_density_A_per_m2,analytic_current_A,relative_difference,barrier_V,depletion_width_m,peak_field_V_per_m,newton_iterations,current_conservation_error"

// WriteNumericIVCSV writes a numeric I-V sweep as CSV with unit-labelled
// SI headers, one row per finished point; relative_difference is
// (numeric - analytic)/|analytic|.
func WriteNumericIVCSV(w io.Writer, r *NumericIVResult) error {
	return writeCSVTable(w, NumericIVCSVHeader, rowsOf(r.Points))
}

// row is the point's row in the columns of NumericIVCSVHeader.
func (p NumericIVPoint) row() []float64 {
	return []float64{p.Bias, p.Current, p.CurrentDensity, p.AnalyticCurrent, relDiff(p.Current, p.AnalyticCurrent),
		p.Barrier, p.DepletionWidth, p.PeakField, float64(p.Iterations), p.CurrentSpread}
}

// NumericCVCSVHeader is the header of WriteNumericCVCSV.
const NumericCVCSVHeader = "bias_V,capacitance_F,capacitance_per_area_F_per_m2,analytic_capacitance_F,relative_difference,depletion_width_m,analytic_depletion_width_m,charge_C_per_m2,current_A"

// WriteNumericCVCSV writes a numeric C-V sweep as CSV with unit-labelled
// SI headers, one row per finished point.
func WriteNumericCVCSV(w io.Writer, r *NumericCVResult) error {
	return writeCSVTable(w, NumericCVCSVHeader, rowsOf(r.Points))
}

// row is the point's row in the columns of NumericCVCSVHeader.
func (p NumericCVPoint) row() []float64 {
	return []float64{p.Bias, p.Capacitance, p.CapacitancePerArea, p.AnalyticCapacitance, relDiff(p.Capacitance, p.AnalyticCapacitance),
		p.DepletionWidth, p.AnalyticDepletionWidth, p.Charge, p.Current}
}

// rowsOf returns the rows of a sweep's points.
func rowsOf[P interface{ row() []float64 }](points []P) [][]float64 {
	rows := make([][]float64, len(points))
	for i, p := range points {
		rows[i] = p.row()
	}
	return rows
}

// writeCSVTable writes a header line and the rows as CSV (NaN as empty
// fields).
func writeCSVTable(w io.Writer, header string, rows [][]float64) error {
	var b bytes.Buffer
	b.WriteString(header + "\n")
	for _, row := range rows {
		writeCSVRow(&b, row)
	}
	_, err := w.Write(b.Bytes())
	return err
}

// JSON encodes a numeric I-V sweep: "nodes", "built_in_potential_V",
// "requested_points", "complete", "points" (bias_V, current_A,
// current_density_A_per_m2, analytic_current_A, relative_difference,
// barrier_V, depletion_width_m, peak_field_V_per_m, newton_iterations,
// current_conservation_error) and "flags".
func (r *NumericIVResult) JSON() []byte {
	return sweepJSON(r.Nodes, r.BuiltInPotential, r.Requested, "", strings.Split(NumericIVCSVHeader, ","), rowsOf(r.Points), r.Flags)
}

// JSON encodes a numeric C-V sweep like NumericIVResult.JSON, with the
// columns of WriteNumericCVCSV and "cv_mode" (CVLowFrequency or
// CVHighFrequency).
func (r *NumericCVResult) JSON() []byte {
	return sweepJSON(r.Nodes, r.BuiltInPotential, r.Requested, r.Mode, strings.Split(NumericCVCSVHeader, ","), rowsOf(r.Points), r.Flags)
}

// sweepJSON writes a sweep; mode, when not empty, is written as
// "cv_mode".
func sweepJSON(nodes int, vbi float64, requested int, mode string, keys []string, rows [][]float64, flags []physics.Flag) []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "{\n  \"nodes\": %d,\n  \"built_in_potential_V\": %s,\n  \"requested_points\": %d,\n  \"complete\": %t,\n",
		nodes, jsonNumber(vbi), requested, len(rows) == requested)
	if mode != "" {
		fmt.Fprintf(&b, "  \"cv_mode\": %q,\n", mode)
	}
	b.WriteString("  \"points\": [")
	for i, row := range rows {
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n    {")
		for k, v := range row {
			if k > 0 {
				b.WriteString(", ")
			}
			fmt.Fprintf(&b, "%q: %s", keys[k], jsonNumber(v))
		}
		b.WriteString("}")
	}
	if len(rows) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("],\n")
	writeJSONFlags(&b, flags)
	b.WriteString("\n}\n")
	return b.Bytes()
}
