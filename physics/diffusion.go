package physics

import "math"

// QuasiNeutral describes one quasi-neutral region for minority-carrier
// diffusion: the region's majority doping, the minority carrier's
// diffusivity and lifetime, the region's quasi-neutral width and the
// recombination velocity of the contact (or surface) that ends it.
type QuasiNeutral struct {
	Doping      float64 // majority doping, m^-3
	Diffusivity float64 // minority diffusivity D, m^2/s
	Lifetime    float64 // minority lifetime tau, s
	// Width is the quasi-neutral width from the depletion edge to the
	// contact, m; +Inf means a long region.
	Width float64
	// Recombination is the contact recombination velocity S, m/s; +Inf is
	// an ideal ohmic contact, 0 a perfectly passivated (reflecting) one.
	Recombination float64
}

// DiffusionLength returns L = sqrt(D tau), m.
func (r QuasiNeutral) DiffusionLength() float64 { return DiffusionLength(r.Diffusivity, r.Lifetime) }

// GeometryFactor returns the factor G that multiplies the long-base
// saturation current of a quasi-neutral region of width w with a contact of
// recombination velocity s.
//
// Formula (u = w/L, sigma = s L/D):
//
//	G = (sigma cosh u + sinh u) / (sigma sinh u + cosh u)
//	  = (sigma + tanh u) / (1 + sigma tanh u)
//
// Limits: s -> Inf (ohmic) gives coth u, and L/w for w << L (short base);
// s = 0 gives tanh u; w >> L gives 1 (long base); sigma = 1 gives 1 for any
// w. Units: w, l in m, s in m/s, d in m^2/s. Valid in low injection with
// uniform doping. Source: e.g. M. A. Green, Solar Cells (1982), ch. 4;
// Sze & Ng 2007, section 2.3.
func GeometryFactor(w, l, s, d float64) float64 {
	if math.IsInf(w, 1) {
		return 1
	}
	u := w / l
	t := math.Tanh(u)
	if math.IsInf(s, 1) {
		return 1 / t
	}
	sigma := s * l / d
	return (sigma + t) / (1 + sigma*t)
}

// SaturationCurrentDensity returns the minority-carrier diffusion part of
// the saturation current density of the region, A/m^2, for intrinsic
// density ni (m^-3).
//
// Formula: J0 = q ni^2 D / (L N) G(w, L, S, D), with G from GeometryFactor.
// For an n region this is the hole current, for a p region the electron
// current. Valid in low injection, non-degenerate doping. Source: Shockley,
// Bell Syst. Tech. J. 28, 435 (1949); Sze & Ng 2007, eqs. 2.64-2.66;
// Neamen 4th ed., eq. 8.26 (long base).
func (r QuasiNeutral) SaturationCurrentDensity(ni float64) float64 {
	l := r.DiffusionLength()
	return Q * ni * ni * r.Diffusivity / (l * r.Doping) * GeometryFactor(r.Width, l, r.Recombination, r.Diffusivity)
}

// ExcessProfile returns the excess minority density at distance x (m) from
// the depletion edge, divided by its value at the edge, and the diffusion
// current density there divided by its value at the edge.
//
// Formulas (u = (w - x)/L, a = w/L, sigma = S L/D), from the solution of
// D d2(dn)/dx2 = dn/tau with dn(0) = dn0 and -D d(dn)/dx = S dn at x = w:
//
//	dn(x)/dn0 = (cosh u + sigma sinh u) / (cosh a + sigma sinh a)
//	J(x)/J(0) = (sinh u + sigma cosh u) / (sinh a + sigma cosh a)
//
// evaluated in exponentially scaled form so that no overflow occurs for
// w >> L. Long base: both are exp(-x/L). Valid for 0 <= x <= w, low
// injection. Source: as GeometryFactor.
func (r QuasiNeutral) ExcessProfile(x float64) (density, current float64) {
	l := r.DiffusionLength()
	xi := x / l
	decay := math.Exp(-xi)
	if math.IsInf(r.Width, 1) {
		return decay, decay
	}
	a := r.Width / l
	u := math.Max(a-xi, 0)
	eu, ea := math.Exp(-2*u), math.Exp(-2*a)
	if math.IsInf(r.Recombination, 1) {
		return decay * (1 - eu) / (1 - ea), decay * (1 + eu) / (1 + ea)
	}
	sigma := r.Recombination * l / r.Diffusivity
	density = decay * ((1 + sigma) + (1-sigma)*eu) / ((1 + sigma) + (1-sigma)*ea)
	current = decay * ((1 + sigma) - (1-sigma)*eu) / ((1 + sigma) - (1-sigma)*ea)
	return density, current
}

// ShockleyCurrent returns the ideal diode current I = Is (exp(V/Vt) - 1) in
// A for saturation current is (A) at bias v (V, forward positive) and
// temperature t (K).
//
// Source: W. Shockley, "The theory of p-n junctions in semiconductors and
// p-n junction transistors", Bell Syst. Tech. J. 28, 435 (1949); Sze & Ng
// 2007, eq. 2.57. Valid in low injection without series resistance or
// depletion-region recombination; overflows to +Inf above about
// V = 709 Vt.
func ShockleyCurrent(is, v, t float64) float64 { return is * math.Expm1(v/ThermalVoltage(t)) }
