package model

import (
	"fmt"
	"math"

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
}

// Range is a sweep from From to To in steps of Step (all SI).
type Range struct {
	From, To, Step float64
}

// maxSweepPoints bounds a sweep so that no request exhausts memory.
const maxSweepPoints = 100001

// Points returns the sweep values; an error names the problem when the
// range is empty, the step has the wrong sign or there are too many points.
func (r Range) Points() ([]float64, error) {
	for _, v := range []float64{r.From, r.To, r.Step} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("sweep %g:%g:%g: values must be finite", r.From, r.To, r.Step)
		}
	}
	if r.Step == 0 || (r.To-r.From)*r.Step < 0 {
		return nil, fmt.Errorf("sweep %g:%g:%g: the step must be non-zero and point from the start to the end", r.From, r.To, r.Step)
	}
	n := int(math.Floor((r.To-r.From)/r.Step+1e-9)) + 1
	if n > maxSweepPoints {
		return nil, fmt.Errorf("sweep %g:%g:%g has %d points; at most %d are allowed", r.From, r.To, r.Step, n, maxSweepPoints)
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = r.From + float64(i)*r.Step
	}
	return out, nil
}

// DefaultIVRange is the bias sweep the workbench starts with.
func DefaultIVRange() Range { return Range{From: -1, To: 0.8, Step: 0.01} }

// prepare converts and prepares a spec.
func prepare(s Spec) (*physics.Static, error) {
	d, err := s.Device()
	if err != nil {
		return nil, err
	}
	return d.Prepare()
}

// IVCurve computes the current against bias over r: the total current and
// each component (electron and hole diffusion), in A.
func IVCurve(s Spec, r Range) (Curve, error) {
	st, err := prepare(s)
	if err != nil {
		return Curve{}, err
	}
	vs, err := r.Points()
	if err != nil {
		return Curve{}, err
	}
	total := make([]float64, len(vs))
	ideal := make([]float64, len(vs))
	en := make([]float64, len(vs))
	hp := make([]float64, len(vs))
	for i, v := range vs {
		p := st.At(v)
		total[i], ideal[i], en[i], hp[i] = p.Current, p.IdealCurrent, p.IdealN, p.IdealP
	}
	return Curve{ID: "iv", Title: "Current against bias",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "current I", Kind: Current},
		Xs: vs, Series: []Series{{"total", total}, {"ideal (Shockley)", ideal},
			{"electron diffusion", en}, {"hole diffusion", hp}}}, nil
}

// CVCurve computes the depletion capacitance C (F) and 1/C^2 (F^-2) against
// bias over r. Points at or above Vbi are NaN (the depletion approximation
// fails there).
func CVCurve(s Spec, r Range) (Curve, Curve, error) {
	st, err := prepare(s)
	if err != nil {
		return Curve{}, Curve{}, err
	}
	vs, err := r.Points()
	if err != nil {
		return Curve{}, Curve{}, err
	}
	c := make([]float64, len(vs))
	inv := make([]float64, len(vs))
	for i, v := range vs {
		p := st.At(v)
		c[i] = p.Cap
		inv[i] = 1 / (p.Cap * p.Cap)
	}
	cv := Curve{ID: "cv", Title: "Depletion capacitance against bias",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "capacitance C", Kind: Capacitance},
		Xs: vs, Series: []Series{{"depletion", c}}}
	ms := Curve{ID: "inv-c2", Title: "1/C^2 against bias (Mott-Schottky)",
		X: Axis{Label: "bias V", Kind: Voltage}, Y: Axis{Label: "1/C^2", Kind: Dimensionless, Unit: "F^-2"},
		Xs: vs, Series: []Series{{"1/C^2", inv}}}
	return cv, ms, nil
}

// JunctionProfiles samples the electrostatics across the junction at the
// spec's bias: charge density (C/cm^3 shown as C/m^3 SI), field (V/m),
// potential (V) and the band edges Ec, Ev and the Fermi levels (eV,
// relative to the p-side Fermi level), against position in um. It returns
// an error when the depletion approximation does not apply at that bias.
func JunctionProfiles(s Spec, n int) (charge, field, potential, bands Curve, err error) {
	st, err := prepare(s)
	if err != nil {
		return
	}
	p := st.At(s.Bias)
	pts := p.Depletion.Profile(n)
	if pts == nil {
		err = fmt.Errorf("%s", p.Depletion.Problem)
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
	// p-side neutral region: Ev lies Vt ln(Nv/Na) below the Fermi level.
	evP := -st.Vt * math.Log(st.Device.Material.Nv(st.Device.Temperature)/st.Device.Na)
	for i, q := range pts {
		xs[i] = q.X * 1e6
		rho[i] = q.Charge
		e[i] = q.Field
		psi[i] = q.Potential
		ev[i] = evP - q.Potential
		ec[i] = ev[i] + st.Eg
		efp[i] = 0
	}
	// In electron energy the n-side Fermi level is lower by qV under forward bias.
	for i := range efn {
		efn[i] = -s.Bias
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
// their diffusion current densities J = q D d(dn)/dx (A/m^2) along the two
// quasi-neutral regions at the spec's bias, against the distance from each
// depletion edge in um (p side negative). A long region is drawn over five
// diffusion lengths.
func MinorityProfiles(s Spec, n int) (density, current Curve, err error) {
	st, err := prepare(s)
	if err != nil {
		return
	}
	if n < 4 {
		n = 4
	}
	e := math.Expm1(s.Bias / st.Vt)
	ni2 := st.Ni * st.Ni
	var xs, dens, cur []float64
	side := func(r physics.QuasiNeutral, sign float64, j0 float64) {
		w := r.Width
		if math.IsInf(w, 1) {
			w = 5 * r.DiffusionLength()
		}
		d0 := ni2 / r.Doping * e
		for i := 0; i < n; i++ {
			x := w * float64(i) / float64(n-1)
			if sign < 0 {
				x = w * float64(n-1-i) / float64(n-1)
			}
			fd, fj := r.ExcessProfile(x)
			xs = append(xs, sign*x*1e6)
			dens = append(dens, d0*fd)
			cur = append(cur, j0*e*fj)
		}
	}
	side(st.P, -1, st.JsN)
	side(st.N, 1, st.JsP)
	pos := Axis{Label: "distance from depletion edge", Kind: Length, Unit: "um"}
	density = Curve{ID: "minority", Title: "Excess minority carriers (electrons p side, holes n side)", X: pos,
		Y: Axis{Label: "excess density", Kind: Density, Log: true}, Xs: xs, Series: []Series{{"excess minority density", dens}}}
	current = Curve{ID: "diffusion-current", Title: "Minority diffusion current density", X: pos,
		Y: Axis{Label: "current density", Kind: CurrentDensity}, Xs: xs, Series: []Series{{"diffusion current", cur}}}
	return
}

// TemperatureCurves sweeps the temperature over r (K): the saturation
// current Is against 1000/T (log axis) and the forward voltage at the
// forward current iF (A) against T.
func TemperatureCurves(s Spec, r Range, iF float64) (isCurve, vfCurve Curve, err error) {
	ts, err := r.Points()
	if err != nil {
		return
	}
	inv := make([]float64, len(ts))
	is := make([]float64, len(ts))
	vf := make([]float64, len(ts))
	for i, t := range ts {
		s2 := s
		s2.Temperature = t
		st, e := prepare(s2)
		if e != nil {
			err = fmt.Errorf("at %g K: %w", t, e)
			return
		}
		inv[i] = 1000 / t
		is[i] = st.Is
		vf[i] = st.Vt * math.Log1p(iF/st.Is)
	}
	isCurve = Curve{ID: "is-t", Title: "Saturation current against 1000/T", X: Axis{Label: "1000/T", Kind: Dimensionless, Unit: "1/K"},
		Y: Axis{Label: "saturation current Is", Kind: Current, Log: true}, Xs: inv, Series: []Series{{"Is", is}}}
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
