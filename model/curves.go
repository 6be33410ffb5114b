package model

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"math"
	"strconv"

	"junco/physics"
)

// Axis describes one chart or table axis: its label and the kind of
// quantity (which fixes the trade unit), and whether it is logarithmic.
type Axis struct {
	Label string
	Kind  Kind
	// Unit is the unit the values are expressed in when it differs from
	// the SI unit of Kind (e.g. "um" for profiles); "" means SI.
	Unit string
	// Log marks a logarithmic axis: values are plotted as log10(|y|).
	Log bool
}

// Series is one named line of a curve; Y has the same length as the
// curve's X. NaN marks points where the quantity is not defined.
type Series struct {
	Label string
	Y     []float64
}

// Curve is a computed family of lines over one x axis. Values are SI unless
// the axis names another unit.
type Curve struct {
	ID     string // stable identifier, e.g. "iv"
	Title  string
	X      Axis
	Y      Axis
	Xs     []float64
	Series []Series
	// Flags are validity and safety flags of the sweep as a whole (for
	// example the power limit), nil when none.
	Flags []physics.Flag
}

// Range is a sweep from From to To in steps of Step (all SI).
type Range struct {
	From, To, Step float64
}

// Points returns the sweep values, at most MaxSweepPoints of them; a
// *SweepError names the problem when the range is empty, the step has the
// wrong sign or there are too many points.
func (r Range) Points() ([]float64, error) { return r.PointsUpTo(MaxSweepPoints) }

// sweepCancelEvery is how many points an analytic sweep computes between
// checks of its context (about a millisecond of work or less).
const sweepCancelEvery = 64

// DefaultIVRange is the bias sweep the workbench starts with.
func DefaultIVRange() Range { return Range{From: -1, To: 0.8, Step: 0.01} }

// prepareSweep resolves the junction and the biases of a sweep over r;
// field names the sweep in a validation error.
func prepareSweep(s Spec, r Range, field string) (*physics.Static, []float64, error) {
	st, err := s.Static()
	if err != nil {
		return nil, nil, err
	}
	vs, err := biasPoints(r, field)
	if err != nil {
		return nil, nil, err
	}
	return st, vs, nil
}

// IVCurve computes the current against bias over r, in A: the total
// current with every enabled effect (series 0), the ideal Shockley current
// (1) and its electron and hole parts (2, 3), then the components with the
// effects: diffusion (4), depletion-region recombination/generation (5)
// and shunt (6). Diffusion + recombination/generation + shunt = total. The
// curve carries the power-limit and caution flags when the sweep
// dissipates more than the Spec's power limit.
func IVCurve(s Spec, r Range) (Curve, error) {
	st, vs, err := prepareSweep(s, r, FieldNumericSweep)
	if err != nil {
		return Curve{}, err
	}
	n := len(vs)
	buf := make([]float64, 7*n)
	total, ideal, en, hp := buf[0:n], buf[n:2*n], buf[2*n:3*n], buf[3*n:4*n]
	diff, scr, sh := buf[4*n:5*n], buf[5*n:6*n], buf[6*n:7*n]
	pmax, vmax := 0.0, 0.0
	var flags []physics.Flag
	seen := map[string]bool{}
	var vj [2]float64
	for i, v := range vs {
		// Continuation: extrapolate the junction voltage from the two
		// previous points (the solver brackets and checks it anyway).
		guess := math.NaN()
		if i >= 2 && vs[i-1] != vs[i-2] {
			guess = vj[1] + (vj[1]-vj[0])/(vs[i-1]-vs[i-2])*(v-vs[i-1])
		}
		p := st.SolveFrom(v, guess)
		vj[0], vj[1] = vj[1], p.Vj
		total[i], ideal[i], en[i], hp[i] = p.Current, p.IdealCurrent, p.IdealN, p.IdealP
		diff[i], scr[i], sh[i] = p.Diffusion, p.Recombination+p.Generation, p.Shunt
		if p.Power > pmax {
			pmax, vmax = p.Power, v
		}
		for _, f := range p.Flags {
			if !seen[f.Code] {
				seen[f.Code] = true
				flags = append(flags, f)
			}
		}
	}
	flags = append(flags, sweepFlags(s, pmax, vmax)...)
	return Curve{ID: "iv", Title: "Current against bias",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "current I", Kind: Current},
		Xs: vs, Series: []Series{{"total", total}, {"ideal (Shockley)", ideal},
			{"electron diffusion", en}, {"hole diffusion", hp},
			{"diffusion", diff}, {"recombination/generation", scr}, {"shunt", sh}}, Flags: flags}, nil
}

// sweepFlags returns the power-limit flag (when the largest dissipation
// pmax, at bias vmax, exceeds the Spec's limit) and the caution.
func sweepFlags(s Spec, pmax, vmax float64) []physics.Flag {
	var f []physics.Flag
	if lim := s.PowerLimitOrDefault(); pmax > lim {
		f = append(f, powerFlag(pmax, lim, "the sweep, at "+Format(Voltage, vmax, 4, true)+","))
	}
	return append(f, cautionFlag(false))
}

// IVSweep evaluates the junction at every bias of r with every enabled
// effect and the small-signal quantities (physics.Static.At): the rows of
// `junco calc --sweep`. The flags are those of the sweep as a whole
// (power limit, caution) followed by the distinct flags of its points.
// The context is checked every sweepCancelEvery points; a cancelled sweep
// returns ctx.Err().
func IVSweep(ctx context.Context, s Spec, r Range) ([]physics.Point, []physics.Flag, error) {
	st, vs, err := prepareSweep(s, r, FieldNumericSweep)
	if err != nil {
		return nil, nil, err
	}
	pts := make([]physics.Point, len(vs))
	pmax, vmax := 0.0, 0.0
	var flags []physics.Flag
	seen := map[string]bool{}
	for _, f := range st.Flags {
		seen[f.Code] = true
		flags = append(flags, f)
	}
	for i, v := range vs {
		if i%sweepCancelEvery == 0 {
			if err := ctx.Err(); err != nil {
				return nil, nil, err
			}
		}
		pts[i] = st.At(v)
		if pts[i].Power > pmax {
			pmax, vmax = pts[i].Power, v
		}
		for _, f := range pts[i].Flags {
			if !seen[f.Code] {
				seen[f.Code] = true
				flags = append(flags, f)
			}
		}
	}
	return pts, append(sweepFlags(s, pmax, vmax), flags...), nil
}

// WriteIVCSV writes sweep rows as CSV with unit-labelled headers: bias,
// junction voltage, total current and each component, ideal current,
// avalanche multiplication, total, depletion and diffusion capacitance,
// conductance, local ideality factor and dissipated power (SI units; NaN
// written as empty fields).
func WriteIVCSV(w io.Writer, pts []physics.Point) error {
	bw := bufio.NewWriter(w)
	bw.WriteString("bias_V,junction_voltage_V,current_A,ideal_current_A,diffusion_current_A,recombination_current_A,generation_current_A,shunt_current_A,avalanche_multiplication,capacitance_F,depletion_capacitance_F,diffusion_capacitance_F,conductance_S,ideality_factor,power_W\n")
	for _, p := range pts {
		row := []float64{p.V, p.Vj, p.Current, p.IdealCurrent, p.Diffusion, p.Recombination, p.Generation, p.Shunt,
			p.Mp, p.TotalCap, p.Cap, p.DiffusionCap, p.Conductance, p.Ideality, p.Power}
		for i, v := range row {
			if i > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(csvNumber(v))
		}
		bw.WriteByte('\n')
	}
	return bw.Flush()
}

func csvNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', 8, 64)
}

// ConductanceCurve returns the small-signal conductance G(V) = dI/dV (S)
// at the terminals over r, with every enabled effect (log axis).
func ConductanceCurve(s Spec, r Range) (Curve, error) {
	st, vs, err := prepareSweep(s, r, FieldNumericSweep)
	if err != nil {
		return Curve{}, err
	}
	g := make([]float64, len(vs))
	for i, v := range vs {
		g[i] = st.At(v).Conductance
	}
	return Curve{ID: "gv", Title: "Small-signal conductance against bias", X: Axis{Label: "bias V", Kind: Voltage},
		Y: Axis{Label: "conductance G", Kind: Dimensionless, Unit: "S", Log: true}, Xs: vs, Series: []Series{{"G = dI/dV", g}}}, nil
}

// CVCurve computes the capacitance against bias over r: the depletion
// capacitance (series 0; NaN at or above Vbi, where the depletion
// approximation fails), the low-frequency diffusion capacitance (1) and
// their total (2; the depletion part held at Vbi - 2kT/q beyond), in F,
// and the Mott-Schottky curve 1/Cj^2 (F^-2) of the depletion part.
func CVCurve(s Spec, r Range) (Curve, Curve, error) {
	st, vs, err := prepareSweep(s, r, FieldNumericCV)
	if err != nil {
		return Curve{}, Curve{}, err
	}
	c := make([]float64, len(vs))
	inv := make([]float64, len(vs))
	cd := make([]float64, len(vs))
	ct := make([]float64, len(vs))
	for i, v := range vs {
		p := st.At(v)
		c[i] = p.Cap
		inv[i] = 1 / (p.Cap * p.Cap)
		cd[i], ct[i] = p.DiffusionCap, p.TotalCap
	}
	cv := Curve{ID: "cv", Title: "Capacitance against bias",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "capacitance C", Kind: Capacitance},
		Xs: vs, Series: []Series{{"depletion", c}, {"diffusion", cd}, {"total", ct}}}
	ms := Curve{ID: "inv-c2", Title: "1/C^2 against bias (Mott-Schottky)",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "1/C^2", Kind: Dimensionless, Unit: "F^-2"},
		Xs: vs, Series: []Series{{"1/C^2", inv}}}
	return cv, ms, nil
}

// JunctionProfiles samples the electrostatics across the junction at the
// spec's bias: charge density (C/cm^3 shown as C/m^3 SI), field (V/m),
// potential (V) and the band edges Ec, Ev and the Fermi levels (eV,
// relative to the p-side Fermi level), against position in um, in the
// plain depletion approximation at the junction voltage (Point.Textbook).
// It returns an error when the depletion approximation does not apply at
// that bias.
func JunctionProfiles(s Spec, n int) (charge, field, potential, bands Curve, err error) {
	st, err := s.Static()
	if err != nil {
		return
	}
	p := st.At(s.Bias)
	// The plain depletion approximation at the junction voltage: its
	// potential spans the whole Vbi - Vj, so that the bands join the
	// neutral regions; the tail-corrected solution of the results
	// (Point.Depletion) leaves 2kT/q to the undrawn majority tails.
	pts := p.Textbook.Profile(n)
	if pts == nil {
		err = fmt.Errorf("%s", p.Textbook.Problem)
		return
	}
	xs := make([]float64, len(pts))
	rho := make([]float64, len(pts))
	e := make([]float64, len(pts))
	psi := make([]float64, len(pts))
	ec := make([]float64, len(pts))
	ev := make([]float64, len(pts))
	efp := make([]float64, len(pts))
	efn := make([]float64, len(pts))
	// p-side neutral region: Ev lies Vt ln(Nv/p0) below the Fermi level.
	evP := -st.Vt * math.Log(st.Device.Material.Nv(st.Device.Temperature)/st.P0)
	// The gap drawn is the one the intrinsic density implies,
	// Eg' = kT ln(Nc Nv / ni^2): with a measured ni fit it differs from the
	// Varshni gap by a few meV, and only with it do both neutral regions
	// obey n = Nc exp(-(Ec - EF)/kT), p = Nv exp(-(EF - Ev)/kT).
	mat, tk := st.Device.Material, st.Device.Temperature
	gap := st.Vt * math.Log(mat.Nc(tk)*mat.Nv(tk)/(st.Ni*st.Ni))
	for i, q := range pts {
		xs[i] = q.X * 1e6
		rho[i] = q.Charge
		e[i] = q.Field
		psi[i] = q.Potential
		ev[i] = evP - q.Potential
		ec[i] = ev[i] + gap
		efp[i] = 0
	}
	// A forward junction voltage Vj lowers the p side's electron energies
	// by q Vj against the n side: in this frame (p-side Fermi level 0) the
	// n-side Fermi level sits at +Vj.
	for i := range efn {
		efn[i] = p.Vj
	}
	pos := Axis{Label: "position x", Kind: Length, Unit: "um"}
	charge = Curve{ID: "charge", Title: "Space-charge density", X: pos, Y: Axis{Label: "charge density rho", Kind: Dimensionless, Unit: "C/m^3"}, Xs: xs, Series: []Series{{"rho", rho}}}
	field = Curve{ID: "field", Title: "Electric field", X: pos, Y: Axis{Label: "field E", Kind: Field}, Xs: xs, Series: []Series{{"E", e}}}
	potential = Curve{ID: "potential", Title: "Electrostatic potential", X: pos, Y: Axis{Label: "potential psi", Kind: Voltage}, Xs: xs, Series: []Series{{"psi", psi}}}
	bands = Curve{ID: "bands", Title: "Band edges", X: pos, Y: Axis{Label: "energy", Kind: Energy}, Xs: xs,
		Series: []Series{{"Ec", ec}, {"Ev", ev}, {"EF p side", efp}, {"EF n side", efn}}}
	return
}

// MinorityProfiles samples the excess minority-carrier densities (m^-3) and
// their diffusion current densities (A/m^2) along the two quasi-neutral
// regions at the spec's bias, against the distance from each depletion
// edge in um (p side negative). A long region is drawn over five diffusion
// lengths.
//
// Every profile is driven by what the results use: the junction voltage
// Vj after the series-resistance drop, the edge densities of the
// diffusion model at Vj (with high injection and band-gap narrowing when
// on; physics.DiffusionSide.Injection) and the diffusion currents of the
// results (Point.DiffusionN, DiffusionP, with multiplication in reverse).
// The shape along each region is the low-injection solution of the
// diffusion equation (physics.QuasiNeutral.ExcessProfile) with the
// high-injection diffusivity at the edge, an approximation in high
// injection.
func MinorityProfiles(s Spec, n int) (density, current Curve, err error) {
	st, err := s.Static()
	if err != nil {
		return
	}
	if n < 4 {
		n = 4
	}
	p := st.At(s.Bias)
	hli := st.Effects.HighInjection
	area := st.Device.Area
	var xs, dens, cur []float64
	side := func(r physics.DiffusionSide, sign, pe, i float64) {
		q := r.Effective(pe, hli)
		w := q.Width
		if math.IsInf(w, 1) {
			w = 5 * q.DiffusionLength()
		}
		j0 := i / area
		for k := 0; k < n; k++ {
			x := w * float64(k) / float64(n-1)
			if sign < 0 {
				x = w * float64(n-1-k) / float64(n-1)
			}
			fd, fj := q.ExcessProfile(x)
			xs = append(xs, sign*x*1e6)
			dens = append(dens, pe*fd)
			cur = append(cur, j0*fj)
		}
	}
	side(st.PEff, -1, p.InjectionP*st.P0, p.DiffusionN)
	side(st.NEff, 1, p.InjectionN*st.N0, p.DiffusionP)
	pos := Axis{Label: "distance from depletion edge", Kind: Length, Unit: "um"}
	density = Curve{ID: "minority", Title: "Excess minority carriers (electrons p side, holes n side)", X: pos,
		Y: Axis{Label: "excess density", Kind: Density, Log: true}, Xs: xs, Series: []Series{{"excess minority density", dens}}}
	current = Curve{ID: "diffusion-current", Title: "Minority diffusion current density", X: pos,
		Y: Axis{Label: "current density", Kind: CurrentDensity}, Xs: xs, Series: []Series{{"diffusion current", cur}}}
	return
}

// TemperatureRow is one temperature of a temperature sweep.
type TemperatureRow struct {
	T float64 // K
	// Is is the ideal (Shockley) saturation current and IsDiff the
	// diffusion saturation current with band-gap narrowing and ionisation,
	// A.
	Is, IsDiff float64
	// VF is the forward voltage at the reference current with every
	// enabled effect, V, and DVFDT its temperature coefficient, V/K.
	VF, DVFDT float64
	// Breakdown is the avalanche breakdown voltage, V (NaN when off).
	Breakdown float64
	Flags     []physics.Flag
}

// TemperatureSweep evaluates the spec at every temperature of r (K): Is(T),
// the forward voltage at forward current iF (A) VF(T) and dVF/dT (central
// difference over +-0.5 K), and the breakdown voltage. The context is
// checked every sweepCancelEvery temperatures; a cancelled sweep returns
// ctx.Err().
func TemperatureSweep(ctx context.Context, s Spec, r Range, iF float64) ([]TemperatureRow, error) {
	ts, err := r.Points()
	if err != nil {
		return nil, err
	}
	rows := make([]TemperatureRow, len(ts))
	for i, t := range ts {
		if i%sweepCancelEvery == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		s2 := s
		s2.Temperature = t
		st, e := s2.Static()
		if e != nil {
			return nil, fmt.Errorf("at %g K: %w", t, e)
		}
		vf, dv, e := st.ForwardVoltageTemperature(iF, 0.5)
		if e != nil {
			vf, dv = math.NaN(), math.NaN()
		}
		rows[i] = TemperatureRow{T: t, Is: st.Is, IsDiff: st.IsDiff, VF: vf, DVFDT: dv, Breakdown: st.Breakdown.Voltage, Flags: st.Flags}
	}
	return rows, nil
}

// WriteTemperatureCSV writes temperature-sweep rows as CSV with
// unit-labelled headers (SI; NaN as empty fields).
func WriteTemperatureCSV(w io.Writer, rows []TemperatureRow, iF float64) error {
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "temperature_K,saturation_current_A,diffusion_saturation_current_A,forward_voltage_V_at_%s,forward_voltage_temperature_coefficient_V_per_K,breakdown_voltage_V\n",
		strconv.FormatFloat(iF, 'g', -1, 64)+"A")
	for _, r := range rows {
		for i, v := range []float64{r.T, r.Is, r.IsDiff, r.VF, r.DVFDT, r.Breakdown} {
			if i > 0 {
				bw.WriteByte(',')
			}
			bw.WriteString(csvNumber(v))
		}
		bw.WriteByte('\n')
	}
	return bw.Flush()
}

// TemperatureCurves sweeps the temperature over r (K): the saturation
// current Is against 1000/T (log axis) and the forward voltage at the
// forward current iF (A) against T, with every enabled effect
// (TemperatureSweep).
func TemperatureCurves(s Spec, r Range, iF float64) (isCurve, vfCurve Curve, err error) {
	rows, err := TemperatureSweep(context.Background(), s, r, iF)
	if err != nil {
		return
	}
	ts := make([]float64, len(rows))
	inv := make([]float64, len(rows))
	is := make([]float64, len(rows))
	isd := make([]float64, len(rows))
	vf := make([]float64, len(rows))
	for i, row := range rows {
		ts[i], inv[i], is[i], isd[i], vf[i] = row.T, 1000/row.T, row.Is, row.IsDiff, row.VF
	}
	isCurve = Curve{ID: "is-t", Title: "Saturation current against 1000/T", X: Axis{Label: "1000/T", Kind: Dimensionless, Unit: "1/K"},
		Y: Axis{Label: "saturation current Is", Kind: Current, Log: true}, Xs: inv, Series: []Series{{"Is", is}, {"Is with BGN and ionisation", isd}}}
	vfCurve = Curve{ID: "vf-t", Title: fmt.Sprintf("Forward voltage at %s against temperature", Format(Current, iF, 3, true)),
		X: Axis{Label: "temperature T", Kind: Temperature}, Y: Axis{Label: "forward voltage VF", Kind: Voltage}, Xs: ts, Series: []Series{{"VF", vf}}}
	return
}

// IdealityCurve returns the local ideality factor n(V) = (1/Vt) dV/d ln I
// of the total current over r, by central differences of ln|I|; NaN where
// the current is too small or changes sign.
func IdealityCurve(s Spec, r Range) (Curve, error) {
	iv, err := IVCurve(s, r)
	if err != nil {
		return Curve{}, err
	}
	vt := physics.ThermalVoltage(s.Temperature)
	tot := iv.Series[0].Y
	n := make([]float64, len(tot))
	for i := range n {
		n[i] = math.NaN()
		if i == 0 || i == len(tot)-1 {
			continue
		}
		a, b := tot[i-1], tot[i+1]
		if a <= 0 || b <= 0 {
			continue
		}
		dl := math.Log(b) - math.Log(a)
		if dl == 0 {
			continue
		}
		n[i] = (iv.Xs[i+1] - iv.Xs[i-1]) / dl / vt
	}
	return Curve{ID: "ideality", Title: "Local ideality factor n(V)", X: Axis{Label: "bias V", Kind: Voltage},
		Y: Axis{Label: "ideality n", Kind: Dimensionless}, Xs: iv.Xs, Series: []Series{{"n(V)", n}}}, nil
}
