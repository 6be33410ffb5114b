package solver

import (
	"fmt"
	"junco/physics"
	"math"
	"sort"
)

// Shape is one dopant distribution along the device: a concentration in
// m^-3 as a function of the position x in m (x = 0 is the left contact).
// Shapes are summed by Profile; a user type may implement Shape too.
//
// Shapes placed in Profile.Donors or Profile.Acceptors must be
// non-negative; shapes in Profile.Net are signed (donors positive).
type Shape interface {
	// At returns the concentration at x, m^-3.
	At(x float64) float64
	// Knots returns positions (m) where the shape is discontinuous or has
	// a feature the mesh should see (edges, peaks, table points).
	Knots() []float64
	// Validate reports a parameter outside the shape's domain as a
	// *ParamError whose Field is relative to the shape.
	Validate() error
}

// finitePos reports whether v is finite and > 0.
func finitePos(v float64) bool { return v > 0 && !math.IsInf(v, 0) && !math.IsNaN(v) }

// finite reports whether v is a finite number.

// Uniform is a constant concentration between two positions: a step.
//
// Formula: N(x) = Concentration for From <= x < To, 0 elsewhere. To may be
// +Inf. Units: m^-3, m. Source: the abrupt (step) junction model, Sze & Ng,
// Physics of Semiconductor Devices, 3rd ed. (2007), section 2.2.1.
type Uniform struct {
	Concentration float64 // m^-3, >= 0
	From, To      float64 // m, From < To
}

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (u Uniform) At(x float64) float64 {
	if x >= u.From && x < u.To {
		return u.Concentration
	}
	return 0
}

// Knots returns the positions (m) the mesh should see (Shape).
func (u Uniform) Knots() []float64 { return finiteOnly(u.From, u.To) }

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (u Uniform) Validate() error {
	if !(u.Concentration >= 0) || !physics.Finite(u.Concentration) {
		return paramErr("Concentration", u.Concentration, ">= 0 and finite (m^-3)", "a dopant concentration")
	}
	if math.IsNaN(u.From) || math.IsInf(u.From, 1) {
		return paramErr("From", u.From, "a number below To (m)", "start of the doped layer")
	}
	if math.IsNaN(u.To) || !(u.To > u.From) {
		return paramErr("To", u.To, fmt.Sprintf("> From = %s (m)", fv(u.From)), "the layer must have a positive thickness")
	}
	return nil
}

// LinearGraded is a concentration that rises linearly from zero at
// Position with slope Gradient and saturates at Max.
//
// Formula: N(x) = clamp(Gradient (x - Position), 0, Max). A linearly
// graded junction of gradient a is donors LinearGraded{xj, a, Nd} plus
// acceptors LinearGraded{xj, -a, Na}: net N(x) = clamp(a (x - xj), -Na, Nd).
// Units: m, m^-4, m^-3. Source: Sze & Ng 2007, section 2.2.2.
type LinearGraded struct {
	Position float64 // m, where the concentration is zero
	Gradient float64 // m^-4, non-zero; negative rises toward smaller x
	Max      float64 // m^-3, > 0 (may be +Inf)
}

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (l LinearGraded) At(x float64) float64 {
	v := l.Gradient * (x - l.Position)
	if v <= 0 {
		return 0
	}
	return math.Min(v, l.Max)
}

// Knots returns the positions (m) the mesh should see (Shape).
func (l LinearGraded) Knots() []float64 {
	return finiteOnly(l.Position, l.Position+l.Max/l.Gradient)
}

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (l LinearGraded) Validate() error {
	if !physics.Finite(l.Position) {
		return paramErr("Position", l.Position, "finite (m)", "where the graded concentration starts")
	}
	if !physics.Finite(l.Gradient) || l.Gradient == 0 {
		return paramErr("Gradient", l.Gradient, "non-zero and finite (m^-4)", "a graded profile needs a slope")
	}
	if !(l.Max > 0) {
		return paramErr("Max", l.Max, "> 0 (m^-3; +Inf allowed)", "the plateau the ramp saturates at")
	}
	return nil
}

// Gaussian is an ion-implanted distribution described by its first two
// moments.
//
// Formula: N(x) = Dose / (sqrt(2 pi) Straggle) exp(-(x - Range)^2 / (2
// Straggle^2)), Dose in m^-2, Range (projected range Rp, measured from
// x = 0) and Straggle (Delta Rp) in m. Valid as a first-order implant model
// (no channelling tail, no skewness). Source: J. D. Plummer, M. D. Deal,
// P. B. Griffin, Silicon VLSI Technology (2000), ch. 8; S. M. Sze (ed.),
// VLSI Technology, 2nd ed. (1988), ch. 8. Use Mirrored for an implant into
// the right-hand face.
type Gaussian struct {
	Dose     float64 // m^-2, > 0
	Range    float64 // m, projected range Rp (finite)
	Straggle float64 // m, > 0
}

// Peak returns the peak concentration Dose/(sqrt(2 pi) Straggle), m^-3.
func (g Gaussian) Peak() float64 { return g.Dose / (math.Sqrt(2*math.Pi) * g.Straggle) }

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (g Gaussian) At(x float64) float64 {
	u := (x - g.Range) / g.Straggle
	return g.Peak() * math.Exp(-0.5*u*u)
}

// Knots returns the positions (m) the mesh should see (Shape).
func (g Gaussian) Knots() []float64 { return finiteOnly(g.Range) }

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (g Gaussian) Validate() error {
	if !finitePos(g.Dose) {
		return paramErr("Dose", g.Dose, "> 0 and finite (m^-2)", "the implanted areal density")
	}
	if !physics.Finite(g.Range) {
		return paramErr("Range", g.Range, "finite (m)", "the projected range is a depth")
	}
	if !finitePos(g.Straggle) {
		return paramErr("Straggle", g.Straggle, "> 0 and finite (m)", "the straggle is a standard deviation")
	}
	return nil
}

// Erfc is a constant-surface-concentration (predeposition) diffusion.
//
// Formula: N(x) = Surface erfc((x - Start) / (2 Length)) for x >= Start and
// N = Surface for x < Start, with Length = sqrt(D t) the diffusion length
// (D diffusivity, t time), Surface in m^-3, Start and Length in m. Valid
// for a concentration-independent diffusivity. Source: Plummer, Deal,
// Griffin 2000, ch. 7; Sze (ed.) 1988, ch. 7.
type Erfc struct {
	Surface float64 // m^-3, surface concentration, > 0
	Length  float64 // m, sqrt(D t), > 0
	Start   float64 // m, surface position (finite)
}

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (e Erfc) At(x float64) float64 {
	if x < e.Start {
		return e.Surface
	}
	return e.Surface * math.Erfc((x-e.Start)/(2*e.Length))
}

// Knots returns the positions (m) the mesh should see (Shape).
func (e Erfc) Knots() []float64 { return finiteOnly(e.Start) }

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (e Erfc) Validate() error {
	if !finitePos(e.Surface) {
		return paramErr("Surface", e.Surface, "> 0 and finite (m^-3)", "the surface concentration of the diffusion")
	}
	if !finitePos(e.Length) {
		return paramErr("Length", e.Length, "> 0 and finite (m)", "the diffusion length sqrt(D t)")
	}
	if !physics.Finite(e.Start) {
		return paramErr("Start", e.Start, "finite (m)", "the diffusion surface")
	}
	return nil
}

// Tabulated is a measured or imported depth profile of one species.
//
// Formula: between table points the concentration is interpolated
// log-linearly, ln N linear in x (linearly where an end value is 0);
// outside the table the end values are held. Units: Depth in m (strictly
// increasing), Concentration in m^-3 (>= 0). Reading a file into the slices
// is the caller's business.
type Tabulated struct {
	Depth         []float64 // m, strictly increasing
	Concentration []float64 // m^-3, >= 0
}

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (t Tabulated) At(x float64) float64 { return tableAt(t.Depth, t.Concentration, x) }

// Knots returns the positions (m) the mesh should see (Shape).
func (t Tabulated) Knots() []float64 { return append([]float64(nil), t.Depth...) }

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (t Tabulated) Validate() error {
	return validateTable(t.Depth, t.Concentration, "Concentration", false)
}

// TabulatedNet is a tabulated net doping Nd - Na (signed: donors positive),
// for a Profile.Net entry.
//
// Formula: between points of the same sign, |N| is interpolated
// log-linearly; across a sign change (or next to a zero) linearly; outside
// the table the end values are held. Units as Tabulated. A net table
// carries no compensation: the ionised-impurity total used for mobility is
// |N|, which overestimates the mobility of compensated material.
type TabulatedNet struct {
	Depth []float64 // m, strictly increasing
	Net   []float64 // m^-3, Nd - Na
}

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (t TabulatedNet) At(x float64) float64 { return tableAt(t.Depth, t.Net, x) }

// Knots returns the positions (m) the mesh should see (Shape).
func (t TabulatedNet) Knots() []float64 { return append([]float64(nil), t.Depth...) }

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (t TabulatedNet) Validate() error { return validateTable(t.Depth, t.Net, "Net", true) }

func validateTable(d, c []float64, name string, signed bool) error {
	if len(d) < 2 {
		return &ParamError{Field: "Depth", Value: fmt.Sprintf("%d points", len(d)), Allowed: "at least 2 points", Why: "interpolation needs two points"}
	}
	if len(c) != len(d) {
		return &ParamError{Field: name, Value: fmt.Sprintf("%d points", len(c)), Allowed: fmt.Sprintf("%d points, as many as Depth", len(d)), Why: "one value per depth"}
	}
	for i, v := range d {
		if !physics.Finite(v) {
			return paramErr(fmt.Sprintf("Depth[%d]", i), v, "finite (m)", "a depth")
		}
		if i > 0 && !(v > d[i-1]) {
			return paramErr(fmt.Sprintf("Depth[%d]", i), v, fmt.Sprintf("> Depth[%d] = %s", i-1, fv(d[i-1])), "depths must increase strictly")
		}
	}
	for i, v := range c {
		if !physics.Finite(v) || (!signed && v < 0) {
			allowed := ">= 0 and finite (m^-3)"
			if signed {
				allowed = "finite (m^-3)"
			}
			return paramErr(fmt.Sprintf("%s[%d]", name, i), v, allowed, "a concentration")
		}
	}
	return nil
}

// tableAt interpolates sign-aware log-linearly in a validated table.
func tableAt(d, c []float64, x float64) float64 {
	n := len(d)
	if n == 0 {
		return 0
	}
	if x <= d[0] {
		return c[0]
	}
	if x >= d[n-1] {
		return c[n-1]
	}
	k := sort.SearchFloat64s(d, x) // d[k-1] < x <= d[k]
	a, b := c[k-1], c[k]
	s := (x - d[k-1]) / (d[k] - d[k-1])
	if a != 0 && b != 0 && (a > 0) == (b > 0) {
		return a * math.Exp(s*math.Log(b/a))
	}
	return a + s*(b-a)
}

// Mirrored reflects a shape about a surface: At(x) = Shape.At(Surface -
// x). With Surface = the device length it turns a depth profile measured
// from the left face into one measured from the right face (for example a
// back-side contact implant).
type Mirrored struct {
	Shape   Shape   // the shape in its own depth coordinate
	Surface float64 // m, position of the mirror plane
}

// At returns the concentration (m^-3) at x (m) by the formula above
// (Shape).
func (m Mirrored) At(x float64) float64 { return m.Shape.At(m.Surface - x) }

// Knots returns the positions (m) the mesh should see (Shape).
func (m Mirrored) Knots() []float64 {
	k := m.Shape.Knots()
	out := make([]float64, 0, len(k))
	for _, v := range k {
		out = append(out, m.Surface-v)
	}
	return out
}

// Validate reports a parameter outside its range as a *ParamError
// (Shape).
func (m Mirrored) Validate() error {
	if m.Shape == nil {
		return &ParamError{Field: "Shape", Value: "nil", Allowed: "a Shape", Why: "nothing to mirror"}
	}
	if !physics.Finite(m.Surface) {
		return paramErr("Surface", m.Surface, "finite (m)", "the mirror plane")
	}
	if err := m.Shape.Validate(); err != nil {
		if pe, ok := err.(*ParamError); ok {
			return pe.prefixed("Shape")
		}
		return err
	}
	return nil
}

// Profile is the doping of the device: sums of donor shapes, acceptor
// shapes and signed net shapes.
//
// Formulas: Nd(x) = sum Donors + max(sum Net, 0); Na(x) = sum Acceptors +
// max(-sum Net, 0); the net doping is Nd - Na (before ionisation; see
// Device.Ionisation).
type Profile struct {
	Donors    []Shape // donor distributions, m^-3 (non-negative)
	Acceptors []Shape // acceptor distributions, m^-3 (non-negative)
	Net       []Shape // signed net-doping distributions Nd - Na, m^-3
}

// At returns the donor and acceptor concentrations at x, m^-3.
func (p Profile) At(x float64) (nd, na float64) {
	for _, s := range p.Donors {
		nd += s.At(x)
	}
	for _, s := range p.Acceptors {
		na += s.At(x)
	}
	if len(p.Net) > 0 {
		var net float64
		for _, s := range p.Net {
			net += s.At(x)
		}
		if net > 0 {
			nd += net
		} else {
			na -= net
		}
	}
	return nd, na
}

// NetAt returns Nd(x) - Na(x), m^-3.
func (p Profile) NetAt(x float64) float64 {
	nd, na := p.At(x)
	return nd - na
}

// Knots returns the sorted, de-duplicated knots of all shapes.
func (p Profile) Knots() []float64 {
	var k []float64
	for _, group := range [][]Shape{p.Donors, p.Acceptors, p.Net} {
		for _, s := range group {
			k = append(k, s.Knots()...)
		}
	}
	sort.Float64s(k)
	out := k[:0]
	for i, v := range k {
		if !physics.Finite(v) {
			continue
		}
		if i == 0 || len(out) == 0 || v != out[len(out)-1] {
			out = append(out, v)
		}
	}
	return out
}

// Validate checks every shape; the error's Field names the list and index,
// e.g. "Profile.Donors[1].Straggle".
func (p Profile) Validate() error {
	if len(p.Donors)+len(p.Acceptors)+len(p.Net) == 0 {
		return &ParamError{Field: "Profile", Value: "empty", Allowed: "at least one shape", Why: "a diode needs doping"}
	}
	for _, g := range []struct {
		name   string
		shapes []Shape
	}{{"Donors", p.Donors}, {"Acceptors", p.Acceptors}, {"Net", p.Net}} {
		for i, s := range g.shapes {
			f := fmt.Sprintf("Profile.%s[%d]", g.name, i)
			if s == nil {
				return &ParamError{Field: f, Value: "nil", Allowed: "a Shape", Why: "every entry must describe a distribution"}
			}
			if err := s.Validate(); err != nil {
				if pe, ok := err.(*ParamError); ok {
					return pe.prefixed(f)
				}
				return fmt.Errorf("%s: %w", f, err)
			}
		}
	}
	return nil
}

// StepProfile returns the abrupt junction of the depletion approximation:
// acceptors na (m^-3) for x < xj and donors nd (m^-3) for x >= xj (m), so
// that the anode is the left contact. Source: Sze & Ng 2007, section 2.2.1.
func StepProfile(na, nd, xj float64) Profile {
	return Profile{
		Acceptors: []Shape{Uniform{Concentration: na, From: math.Inf(-1), To: xj}},
		Donors:    []Shape{Uniform{Concentration: nd, From: xj, To: math.Inf(1)}},
	}
}

func finiteOnly(v ...float64) []float64 {
	out := make([]float64, 0, len(v))
	for _, x := range v {
		if physics.Finite(x) {
			out = append(out, x)
		}
	}
	return out
}
