package model

import (
	"bytes"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"

	"junco/physics"
)

// Result group names, in display order.
const (
	GroupConditions     = "Material and conditions"
	GroupElectrostatics = "Electrostatics"
	GroupCapacitance    = "Capacitance"
	GroupTransport      = "Transport"
	GroupCurrents       = "Currents"
	GroupHeavyDoping    = "Ionisation and band-gap narrowing"
	GroupResistance     = "Resistance"
	GroupTemperature    = "Temperature"
	GroupSwitching      = "Switching"
	GroupBreakdown      = "Breakdown"
	GroupLight          = "Light"
)

// Caution is the safety note shown wherever a breakdown voltage or a
// dissipated power is shown (CLI, workbench, reports).
const Caution = "Estimates only: breakdown voltages and dissipated power are model predictions. High-voltage and high-current measurements are hazardous; local codes, lab safety rules and the device's rated limits govern."

// Flag codes added by package model.
const (
	FlagCaution    = "caution"     // the safety caution, attached to breakdown and power values
	FlagPowerLimit = "power-limit" // the dissipated power exceeds the user's limit
)

// cautionFlag is the flag carrying Caution; near breakdown (near) it
// also concerns the multiplication and the photocurrent at the bias,
// figures of a junction held at a high reverse voltage.
func cautionFlag(near bool) physics.Flag {
	cs := []physics.Class{physics.ClassBreakdown, physics.ClassPunchThrough, physics.ClassPower}
	if near {
		cs = append(cs, physics.ClassMultiplication, physics.ClassLightAtBias)
	}
	return physics.Flag{Code: FlagCaution, Affects: cs, Message: Caution}
}

// nearBreakdown reports whether p carries the analytic model's
// near-breakdown (a multiplication factor above 1.1), capped-multiplication
// or beyond-breakdown flag: the caution then concerns the lit results, and
// Compare leaves the current out (the solver has no impact ionisation).
func nearBreakdown(p physics.Point) bool {
	for _, f := range p.Flags {
		switch f.Code {
		case physics.FlagNearBreakdown, physics.FlagMultiplicationCapped, physics.FlagBeyondBreakdown:
			return true
		}
	}
	return false
}

// powerFlag returns the power-limit flag for power p (W) against limit (W)
// at the bias or sweep described by where.
func powerFlag(p, limit float64, where string) physics.Flag {
	return physics.Flag{Code: FlagPowerLimit, Affects: []physics.Class{physics.ClassPower, physics.ClassCurrent},
		Message: fmt.Sprintf("%s dissipates %s, above the power limit of %s: the device may heat or fail; check its rated limits", where, Format(Power, p, 3, true), Format(Power, limit, 3, true))}
}

// Quantity is one computed result with its JSON key (SI unit in the name),
// display group, label, symbol and kind (which fixes the trade unit).
type Quantity struct {
	Key    string
	Group  string
	Label  string
	Symbol string
	Kind   Kind
	Value  float64 // SI; NaN when not applicable at this bias
	// Flags lists the codes of the validity flags that affect the value.
	Flags []string
}

// Text formats the value in trade units with sig significant figures.
func (q Quantity) Text(sig int, ascii bool) string { return Format(q.Kind, q.Value, sig, ascii) }

// Result is a junction evaluated at its bias.
type Result struct {
	Spec       Spec
	Static     *physics.Static
	Point      physics.Point
	Quantities []Quantity
	Flags      []physics.Flag
	// Cautions are safety notes to show with the result (Caution).
	Cautions []string
}

// Evaluate validates the spec and evaluates it at its bias. The error is a
// *ValidationError for bad fields, or a plain error when the physics
// refuses the combination (for example Na Nd <= ni^2).
func Evaluate(s Spec) (*Result, error) {
	st, err := s.Static()
	if err != nil {
		return nil, err
	}
	return resultAt(s, st, s.Bias), nil
}

func resultAt(s Spec, st *physics.Static, v float64) *Result {
	p := st.At(v)
	r := &Result{Spec: s, Static: st, Point: p}
	r.Flags = append(append([]physics.Flag(nil), st.Flags...), p.Flags...)
	dep := p.Depletion
	nan := math.NaN()
	iF, iR := s.ForwardCurrentOrDefault(), s.ReverseCurrentOrDefault()
	fw := st.ForwardAndCoefficient(iF, 0.5)
	vf, dvf := fw.VF, fw.DVFDT
	sw := physics.Switching{StorageTime: nan, Lifetime: nan}
	if fw.OK {
		sw = st.StorageTimeAt(fw.Vj, iF, iR)
	}
	bd := st.Breakdown
	rsh := st.Rsh
	if math.IsInf(rsh, 1) {
		rsh = nan
	}
	shuntI := p.Shunt
	if math.IsInf(st.Rsh, 1) {
		shuntI = 0
	}
	res := p.Conductance
	if res != 0 {
		res = 1 / res
	}
	r.Quantities = []Quantity{
		{"thermal_voltage_V", GroupConditions, "thermal voltage", "kT/q", Voltage, st.Vt, nil},
		{"band_gap_eV", GroupConditions, "band gap", "Eg", Energy, st.Eg, nil},
		{"intrinsic_density_per_m3", GroupConditions, "intrinsic density", "ni", Density, st.Ni, nil},
		{"acceptor_ionised_density_per_m3", GroupHeavyDoping, "ionised acceptors (p side)", "Na-", Density, st.NaIonised, nil},
		{"donor_ionised_density_per_m3", GroupHeavyDoping, "ionised donors (n side)", "Nd+", Density, st.NdIonised, nil},
		{"acceptor_ionised_fraction", GroupHeavyDoping, "  ionised fraction, acceptors", "Na-/Na", Dimensionless, st.NaIonised / st.Device.Na, nil},
		{"donor_ionised_fraction", GroupHeavyDoping, "  ionised fraction, donors", "Nd+/Nd", Dimensionless, st.NdIonised / st.Device.Nd, nil},
		{"hole_density_p_side_per_m3", GroupHeavyDoping, "majority holes (p side)", "p0", Density, st.P0, nil},
		{"electron_density_n_side_per_m3", GroupHeavyDoping, "majority electrons (n side)", "n0", Density, st.N0, nil},
		{"band_gap_narrowing_p_eV", GroupHeavyDoping, "band-gap narrowing (p side)", "dEg,p", Energy, st.DEgP, nil},
		{"band_gap_narrowing_n_eV", GroupHeavyDoping, "band-gap narrowing (n side)", "dEg,n", Energy, st.DEgN, nil},
		{"effective_intrinsic_density_p_per_m3", GroupHeavyDoping, "effective ni (p side)", "ni,eff,p", Density, st.NiEffP, nil},
		{"effective_intrinsic_density_n_per_m3", GroupHeavyDoping, "effective ni (n side)", "ni,eff,n", Density, st.NiEffN, nil},
		{"built_in_potential_V", GroupElectrostatics, "built-in potential", "Vbi", Voltage, st.VbiNoBGN, nil},
		{"built_in_potential_full_ionisation_V", GroupElectrostatics, "  with full ionisation", "Vbi,full", Voltage, st.VbiFullIonisation, nil},
		{"built_in_potential_electrostatic_V", GroupElectrostatics, "  with BGN (electrostatic; W, Cj use it)", "Vbi,es", Voltage, st.Vbi, nil},
		{"majority_tail_potential_V", GroupElectrostatics, "  majority-carrier tails (2kT/q or Vbi - Vg)", "Vtail", Voltage, st.Tail, nil},
		{"gradient_voltage_V", GroupElectrostatics, "  gradient voltage (graded junction)", "Vg", Voltage, st.GradientVoltage, nil},
		{"junction_voltage_V", GroupElectrostatics, "junction voltage", "Vj", Voltage, p.Vj, nil},
		{"depletion_width_m", GroupElectrostatics, "depletion width", "W", Length, dep.W, nil},
		{"depletion_width_n_m", GroupElectrostatics, "  into n side", "xn", Length, dep.Xn, nil},
		{"depletion_width_p_m", GroupElectrostatics, "  into p side", "xp", Length, dep.Xp, nil},
		{"depletion_width_textbook_m", GroupElectrostatics, "  textbook form (no tails)", "W,tb", Length, p.Textbook.W, nil},
		{"peak_field_V_per_m", GroupElectrostatics, "peak field", "Emax", Field, dep.PeakField, nil},
		{"junction_capacitance_F", GroupCapacitance, "depletion capacitance", "Cj", Capacitance, p.Cap, nil},
		{"junction_capacitance_per_area_F_per_m2", GroupCapacitance, "  per area", "Cj/A", CapacitancePerArea, p.CapPerArea, nil},
		{"junction_capacitance_textbook_F", GroupCapacitance, "  textbook form (no tails)", "Cj,tb", Capacitance, p.CapTextbook, nil},
		{"diffusion_capacitance_F", GroupCapacitance, "diffusion capacitance", "Cd", Capacitance, p.DiffusionCap, nil},
		{"total_capacitance_F", GroupCapacitance, "total capacitance", "C", Capacitance, p.TotalCap, nil},
		{"electron_mobility_m2_per_Vs", GroupTransport, "electron mobility (p side)", "mu_n", Mobility, st.MuN, nil},
		{"hole_mobility_m2_per_Vs", GroupTransport, "hole mobility (n side)", "mu_p", Mobility, st.MuP, nil},
		{"electron_diffusivity_m2_per_s", GroupTransport, "electron diffusivity", "Dn", Diffusivity, st.DN, nil},
		{"hole_diffusivity_m2_per_s", GroupTransport, "hole diffusivity", "Dp", Diffusivity, st.DP, nil},
		{"electron_lifetime_s", GroupTransport, "electron lifetime", "tau_n", Time, st.TauN, nil},
		{"hole_lifetime_s", GroupTransport, "hole lifetime", "tau_p", Time, st.TauP, nil},
		{"electron_diffusion_length_m", GroupTransport, "electron diffusion length", "Ln", Length, st.LN, nil},
		{"hole_diffusion_length_m", GroupTransport, "hole diffusion length", "Lp", Length, st.LP, nil},
		{"saturation_current_density_A_per_m2", GroupCurrents, "saturation current density", "Js", CurrentDensity, st.Js, nil},
		{"saturation_current_A", GroupCurrents, "saturation current", "Is", Current, st.Is, nil},
		{"electron_saturation_current_A", GroupCurrents, "  electrons from p side", "Is,n", Current, st.IsN, nil},
		{"hole_saturation_current_A", GroupCurrents, "  holes from n side", "Is,p", Current, st.IsP, nil},
		{"diffusion_saturation_current_A", GroupCurrents, "Is with BGN and ionisation", "Is,diff", Current, st.IsDiff, nil},
		{"ideal_current_A", GroupCurrents, "Shockley current at bias", "I_ideal", Current, p.IdealCurrent, nil},
		{"diffusion_current_A", GroupCurrents, "diffusion current", "I_diff", Current, p.Diffusion, nil},
		{"electron_diffusion_current_A", GroupCurrents, "  electrons into p side", "I_diff,n", Current, p.DiffusionN, nil},
		{"hole_diffusion_current_A", GroupCurrents, "  holes into n side", "I_diff,p", Current, p.DiffusionP, nil},
		{"recombination_current_A", GroupCurrents, "SCR recombination current", "I_rec", Current, p.Recombination, nil},
		{"generation_current_A", GroupCurrents, "SCR generation current", "I_gen", Current, p.Generation, nil},
		{"shunt_current_A", GroupCurrents, "shunt current", "I_sh", Current, shuntI, nil},
		{"avalanche_multiplication", GroupCurrents, "avalanche multiplication Mp", "Mp", Dimensionless, p.Mp, nil},
		{"current_A", GroupCurrents, "total current at bias", "I", Current, p.Current, nil},
		{"ideality_factor", GroupCurrents, "local ideality factor", "n", Dimensionless, p.Ideality, nil},
		{"conductance_S", GroupCurrents, "conductance dI/dV", "G", Conductance, p.Conductance, nil},
		{"small_signal_resistance_ohm", GroupCurrents, "small-signal resistance", "r", Resistance, res, nil},
		{"dissipated_power_W", GroupCurrents, "dissipated power", "P", Power, p.Power, nil},
		{"series_resistance_ohm", GroupResistance, "series resistance", "Rs", Resistance, st.Rs, nil},
		{"p_region_resistance_ohm", GroupResistance, "  p region", "Rp", Resistance, st.RP, nil},
		{"n_region_resistance_ohm", GroupResistance, "  n region", "Rn", Resistance, st.RN, nil},
		{"contact_resistance_ohm", GroupResistance, "  contact", "Rc", Resistance, st.RContact, nil},
		{"shunt_resistance_ohm", GroupResistance, "shunt resistance", "Rsh", Resistance, rsh, nil},
		{"series_voltage_drop_V", GroupResistance, "series-resistance drop", "I Rs", Voltage, p.SeriesDrop, nil},
		{"forward_voltage_reference_current_A", GroupTemperature, "reference forward current", "IF", Current, iF, nil},
		{"forward_voltage_V", GroupTemperature, "forward voltage at IF", "VF", Voltage, vf, nil},
		{"forward_voltage_temperature_coefficient_V_per_K", GroupTemperature, "dVF/dT at IF", "dVF/dT", TemperatureCoefficient, dvf, nil},
		{"switching_reverse_current_A", GroupSwitching, "switching reverse current", "IR", Current, iR, nil},
		{"storage_time_s", GroupSwitching, "storage time (IF to IR)", "ts", Time, sw.StorageTime, nil},
		{"storage_time_constant_s", GroupSwitching, "  time constant used", "tau_s", Time, sw.Lifetime, nil},
		{"breakdown_voltage_V", GroupBreakdown, "breakdown voltage (reverse)", "VB", Voltage, bd.Effective, nil},
		{"avalanche_breakdown_voltage_V", GroupBreakdown, "  avalanche (ionisation integral)", "VB,av", Voltage, bd.AvalancheVoltage, nil},
		{"tunnelling_breakdown_voltage_V", GroupBreakdown, "  Zener onset (tunnelling field)", "VB,tun", Voltage, bd.TunnellingVoltage, nil},
		{"breakdown_peak_field_V_per_m", GroupBreakdown, "  peak field at breakdown", "EB", Field, bd.PeakField, nil},
		{"breakdown_depletion_width_m", GroupBreakdown, "  depletion width at breakdown", "WB", Length, bd.Width, nil},
		{"punch_through_voltage_V", GroupBreakdown, "punch-through voltage", "Vpt", Voltage, bd.PunchThroughVoltage, nil},
		{"tunnelling_limit_V", GroupBreakdown, "Zener limit 4Eg/q (breakdown)", "4Eg/q", Voltage, bd.TunnellingLimit, nil},
		{"breakdown_sze_gibbons_V", GroupBreakdown, "Sze-Gibbons breakdown estimate", "VB,SG", Voltage, bd.SzeGibbons, nil},
	}
	r.Quantities = append(r.Quantities, litQuantities(s, st, p)...)
	r.Flags = append(r.Flags, cautionFlag(nearBreakdown(p)))
	r.Cautions = []string{Caution}
	if lim := s.PowerLimitOrDefault(); p.Power > lim {
		r.Flags = append(r.Flags, powerFlag(p.Power, lim, fmt.Sprintf("the bias %s", Format(Voltage, v, 4, true))))
	}
	r.attachFlags()
	return r
}

// attachFlags marks each quantity with the codes of the flags that
// concern its classes (QuantityClasses).
func (r *Result) attachFlags() {
	if len(r.Flags) == 0 {
		return
	}
	for i := range r.Quantities {
		q := &r.Quantities[i]
		classes := QuantityClasses(q.Key)
		for _, f := range r.Flags {
			// One code once: two flags of one code (boron and
			// phosphorus both past their Mott density) mark a value once.
			if f.Concerns(classes) && !slices.Contains(q.Flags, f.Code) {
				q.Flags = append(q.Flags, f.Code)
			}
		}
	}
}

// Get returns the value of the quantity with the given JSON key.
func (r *Result) Get(key string) (float64, bool) {
	for _, q := range r.Quantities {
		if q.Key == key {
			return q.Value, true
		}
	}
	return math.NaN(), false
}

// Groups returns the group names present, in display order.
func (r *Result) Groups() []string {
	var out []string
	seen := map[string]bool{}
	for _, q := range r.Quantities {
		if !seen[q.Group] {
			seen[q.Group] = true
			out = append(out, q.Group)
		}
	}
	return out
}

// JSON encodes the result as one JSON object: every quantity under its key
// in SI units (null where not applicable), "depletion_valid",
// "ionisation_model" (the dopant-level model used, physics.IonisationModel;
// null with ionisation off), and "flags" (code and message). Keys keep the
// display order.
func (r *Result) JSON() []byte {
	var b bytes.Buffer
	b.WriteString("{\n")
	for _, q := range r.Quantities {
		fmt.Fprintf(&b, "  %q: %s,\n", q.Key, jsonNumber(q.Value))
	}
	fmt.Fprintf(&b, "  \"depletion_valid\": %t,\n", r.Point.Depletion.Valid)
	if e := r.Static.Effects; e.Ionisation {
		fmt.Fprintf(&b, "  \"ionisation_model\": %q,\n", e.IonisationModel.String())
	} else {
		b.WriteString("  \"ionisation_model\": null,\n")
	}
	b.WriteString("  \"flags\": [")
	for i, f := range r.Flags {
		if i > 0 {
			b.WriteString(",")
		}
		fmt.Fprintf(&b, "\n    {\"code\": %q, \"message\": %q}", f.Code, f.Message)
	}
	if len(r.Flags) > 0 {
		b.WriteString("\n  ")
	}
	b.WriteString("],\n  \"cautions\": [")
	for i, c := range r.Cautions {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%q", c)
	}
	b.WriteString("]\n}\n")
	return b.Bytes()
}

func jsonNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "null"
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// Text renders the result as aligned, grouped lines in trade units with
// validity flags beside the values they affect.
func (r *Result) Text(ascii bool) string {
	var b strings.Builder
	// The columns are as wide as their longest entry.
	labelW, symW, valW := 0, 0, 0
	for _, q := range r.Quantities {
		labelW = max(labelW, utf8.RuneCountInString(q.Label))
		symW = max(symW, utf8.RuneCountInString(q.Symbol))
		valW = max(valW, utf8.RuneCountInString(q.Text(4, ascii)))
	}
	pad := func(s string, w int, left bool) string {
		fill := strings.Repeat(" ", max(w-utf8.RuneCountInString(s), 0))
		if left {
			return fill + s
		}
		return s + fill
	}
	for _, g := range r.Groups() {
		fmt.Fprintf(&b, "%s\n", g)
		for _, q := range r.Quantities {
			if q.Group != g {
				continue
			}
			mark := ""
			if len(q.Flags) > 0 {
				mark = "  [" + strings.Join(q.Flags, ", ") + "]"
			}
			fmt.Fprintf(&b, "  %s %s %s%s\n", pad(q.Label, labelW, false), pad(q.Symbol, symW, false), pad(q.Text(4, ascii), valW, true), mark)
		}
	}
	if len(r.Flags) > 0 {
		b.WriteString("Warnings\n")
		for _, f := range r.Flags {
			fmt.Fprintf(&b, "  [%s] %s\n", f.Code, f.Message)
		}
	}
	return b.String()
}
