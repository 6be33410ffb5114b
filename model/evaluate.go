package model

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"

	"junco/physics"
)

// Result group names, in display order.
const (
	GroupConditions     = "Material and conditions"
	GroupElectrostatics = "Electrostatics"
	GroupCapacitance    = "Capacitance"
	GroupTransport      = "Transport"
	GroupCurrents       = "Currents"
)

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
}

// Evaluate validates the spec and evaluates it at its bias. The error is a
// *ValidationError for bad fields, or a plain error when the physics
// refuses the combination (for example Na Nd <= ni^2).
func Evaluate(s Spec) (*Result, error) {
	d, err := s.Device()
	if err != nil {
		return nil, err
	}
	st, err := d.Prepare()
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
	r.Quantities = []Quantity{
		{"thermal_voltage_V", GroupConditions, "thermal voltage", "kT/q", Voltage, st.Vt, nil},
		{"band_gap_eV", GroupConditions, "band gap", "Eg", Energy, st.Eg, nil},
		{"intrinsic_density_per_m3", GroupConditions, "intrinsic density", "ni", Density, st.Ni, nil},
		{"built_in_potential_V", GroupElectrostatics, "built-in potential", "Vbi", Voltage, st.Vbi, nil},
		{"depletion_width_m", GroupElectrostatics, "depletion width", "W", Length, dep.W, nil},
		{"depletion_width_n_m", GroupElectrostatics, "  into n side", "xn", Length, dep.Xn, nil},
		{"depletion_width_p_m", GroupElectrostatics, "  into p side", "xp", Length, dep.Xp, nil},
		{"peak_field_V_per_m", GroupElectrostatics, "peak field", "Emax", Field, dep.PeakField, nil},
		{"junction_capacitance_F", GroupCapacitance, "depletion capacitance", "Cj", Capacitance, p.Cap, nil},
		{"junction_capacitance_per_area_F_per_m2", GroupCapacitance, "  per area", "Cj/A", CapacitancePerArea, p.CapPerArea, nil},
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
		{"ideal_current_A", GroupCurrents, "Shockley current at bias", "I_ideal", Current, p.IdealCurrent, nil},
		{"current_A", GroupCurrents, "total current at bias", "I", Current, p.Current, nil},
	}
	r.attachFlags()
	return r
}

// attachFlags marks each quantity with the codes of flags that concern it,
// matching a flag's quantity names against the quantity labels.
func (r *Result) attachFlags() {
	for i := range r.Quantities {
		q := &r.Quantities[i]
		label := strings.TrimSpace(q.Label)
		for _, f := range r.Flags {
			for _, name := range f.Quantities {
				if name == "all" || strings.Contains(label, name) || (strings.HasPrefix(q.Label, "  ") && strings.Contains(r.parentLabel(i), name)) {
					q.Flags = append(q.Flags, f.Code)
					break
				}
			}
		}
	}
}

// parentLabel returns the label of the nearest preceding top-level quantity.
func (r *Result) parentLabel(i int) string {
	for j := i; j >= 0; j-- {
		if !strings.HasPrefix(r.Quantities[j].Label, "  ") {
			return r.Quantities[j].Label
		}
	}
	return ""
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
// in SI units (null where not applicable), "depletion_valid", and "flags"
// (code and message). Keys keep the display order.
func (r *Result) JSON() []byte {
	var b bytes.Buffer
	b.WriteString("{\n")
	for _, q := range r.Quantities {
		fmt.Fprintf(&b, "  %q: %s,\n", q.Key, jsonNumber(q.Value))
	}
	fmt.Fprintf(&b, "  \"depletion_valid\": %t,\n", r.Point.Depletion.Valid)
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
			fmt.Fprintf(&b, "  %-30s %-8s %16s%s\n", q.Label, q.Symbol, q.Text(4, ascii), mark)
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
