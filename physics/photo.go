package physics

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/unit/constant"
)

// Physical constants for light, from gonum's CODATA 2018 set (both exact).
const (
	// Planck is the Planck constant h in J s.
	Planck = float64(constant.Planck)
	// LightSpeed is the speed of light in vacuum c in m/s.
	LightSpeed = float64(constant.LightSpeedInVacuum)
)

// Light describes the illumination of a junction for its photocurrent. The
// zero value is the dark junction.
type Light struct {
	// Generation is a pair-generation rate uniform through the whole
	// device, m^-3 s^-1 (0 = none): the usual idealisation of weakly
	// absorbed light or of particle irradiation.
	Generation float64
	// PhotonFlux is the flux of monochromatic photons entering the
	// illuminated surface (after any reflection), m^-2 s^-1, and
	// Absorption their absorption coefficient alpha, 1/m; the generation
	// falls off as alpha PhotonFlux exp(-alpha x) from that surface
	// (Beer-Lambert). PhotonFlux 0 means no monochromatic light.
	PhotonFlux, Absorption float64
	// FromN puts the illuminated surface on the n region's side (the
	// contact that ends the n region); false, the p region's.
	FromN bool
}

// Lit reports whether l generates any carriers.
func (l Light) Lit() bool { return l.Generation > 0 || (l.PhotonFlux > 0 && l.Absorption > 0) }

// PhotonFluxOf returns the photon flux, m^-2 s^-1, of monochromatic light of
// power density p (W/m^2) and vacuum wavelength lambda (m).
//
// Formula: Phi = p lambda / (h c), each photon carrying h c / lambda.
// Source: definition (Planck-Einstein relation E = h nu).
func PhotonFluxOf(p, lambda float64) float64 { return p * lambda / (Planck * LightSpeed) }

// UniformPhotocurrentDensity returns the short-circuit current density,
// A/m^2, that a quasi-neutral region collects from pairs generated in it
// at the uniform rate g (m^-3 s^-1): the minority-carrier diffusion current
// at its depletion edge, where the excess density is held at zero.
//
// Formula, from D d2(dp)/dx2 - dp/tau = -g with dp = 0 at the depletion
// edge and -D d(dp)/dx = S dp at the contact a width w away (u = w/L,
// sigma = S L/D):
//
//	J = q g L (sinh u + sigma (cosh u - 1)) / (sigma sinh u + cosh u)
//
// Limits: a long region (w >> L) collects q g L; a reflecting contact
// (S = 0) q g L tanh u, all pairs (q g w) when w << L; an ohmic contact
// (S -> Inf) q g L tanh(u/2). With the depletion region's q g W this is
// the long-base J_L = q g (Ln + W + Lp) (Sze & Ng 2007, ch. 13, the
// photocurrent of a uniformly illuminated pn junction). Valid in low
// injection, uniform doping, generation independent of position.
func (r QuasiNeutral) UniformPhotocurrentDensity(g float64) float64 {
	l := r.DiffusionLength()
	if g == 0 {
		return 0
	}
	if math.IsInf(r.Width, 1) {
		return Q * g * l
	}
	u := r.Width / l
	t := math.Tanh(u)
	sech := sechOf(u)
	if math.IsInf(r.Recombination, 1) {
		return Q * g * l * math.Tanh(u/2)
	}
	sigma := r.Recombination * l / r.Diffusivity
	// Numerator and denominator divided by cosh u, so nothing overflows.
	return Q * g * l * (t + sigma*(1-sech)) / (sigma*t + 1)
}

// sechOf returns 1/cosh(u) without overflow for large u.
func sechOf(u float64) float64 {
	e := math.Exp(-math.Abs(u))
	return 2 * e / (1 + e*e)
}

// FrontPhotocurrentDensity returns the short-circuit current density, A/m^2,
// collected from the quasi-neutral region r that lies under the
// illuminated surface, for photons of flux phi (m^-2 s^-1, entering the
// surface) and absorption coefficient alpha (1/m). r.Width is the distance
// from the surface to the depletion edge and r.Recombination the surface
// recombination velocity.
//
// Formula (Hovel 1975, as given in Sze & Ng 2007, ch. 13; equation number
// from memory), with H = r.Width, u = H/L, sigma = S L/D, a = alpha L:
//
//	J = q phi a / (a^2 - 1) [ (sigma + a - e^(-alpha H) (sigma cosh u + sinh u))
//	                          / (sigma sinh u + cosh u) - a e^(-alpha H) ]
//
// The apparent singularity at a = 1 is removable: there the value is the
// mean of a = 1 -+ 1e-4 (relative error of order 1e-8). With alpha -> 0 at
// fixed alpha phi it tends to UniformPhotocurrentDensity(alpha phi). Valid
// in low injection, uniform doping, no reflection inside the device.
// Source: H. J. Hovel, Solar Cells, Semiconductors and Semimetals vol. 11
// (1975), ch. 2.
func (r QuasiNeutral) FrontPhotocurrentDensity(phi, alpha float64) float64 {
	l := r.DiffusionLength()
	a := alpha * l
	if math.Abs(a-1) < 1e-6 {
		lo := r.FrontPhotocurrentDensity(phi, alpha*(1-1e-4))
		hi := r.FrontPhotocurrentDensity(phi, alpha*(1+1e-4))
		return (lo + hi) / 2
	}
	h := r.Width
	if math.IsInf(h, 1) {
		return 0 // no light reaches the junction
	}
	u := h / l
	t, sech := math.Tanh(u), sechOf(u)
	eh := math.Exp(-alpha * h)
	var ratio float64 // the bracketed fraction, numerator and denominator over cosh u
	if math.IsInf(r.Recombination, 1) {
		ratio = (sech - eh) / t
	} else {
		sigma := r.Recombination * l / r.Diffusivity
		ratio = (sigma*sech + a*sech - eh*(sigma+t)) / (sigma*t + 1)
	}
	return Q * phi * a / (a*a - 1) * (ratio - a*eh)
}

// BackPhotocurrentDensity returns the short-circuit current density, A/m^2,
// collected from the quasi-neutral region r that lies beyond the depletion
// region, seen from the illuminated surface, when phi photons per m^2 and
// second still reach its depletion edge (the entering flux times
// exp(-alpha depth)). r.Width is the distance from the depletion edge to
// the back contact and r.Recombination that contact's recombination
// velocity.
//
// Formula (Hovel 1975, as given in Sze & Ng 2007, ch. 13; equation number
// from memory), with H = r.Width, u = H/L, sigma = S L/D, a = alpha L:
//
//	J = q phi a / (a^2 - 1) [ a - (sigma (cosh u - e^(-alpha H)) + sinh u + a e^(-alpha H))
//	                              / (sigma sinh u + cosh u) ]
//
// A long region gives q phi a / (a + 1). The singularity at a = 1 is
// removable and treated as in FrontPhotocurrentDensity. Validity and
// source as FrontPhotocurrentDensity.
func (r QuasiNeutral) BackPhotocurrentDensity(phi, alpha float64) float64 {
	l := r.DiffusionLength()
	a := alpha * l
	if math.Abs(a-1) < 1e-6 {
		lo := r.BackPhotocurrentDensity(phi, alpha*(1-1e-4))
		hi := r.BackPhotocurrentDensity(phi, alpha*(1+1e-4))
		return (lo + hi) / 2
	}
	if math.IsInf(r.Width, 1) {
		return Q * phi * a / (a + 1)
	}
	h := r.Width
	u := h / l
	t, sech := math.Tanh(u), sechOf(u)
	eh := math.Exp(-alpha * h)
	var ratio float64
	if math.IsInf(r.Recombination, 1) {
		ratio = (1 - eh*sech) / t
	} else {
		sigma := r.Recombination * l / r.Diffusivity
		ratio = (sigma*(1-eh*sech) + t + a*eh*sech) / (sigma*t + 1)
	}
	return Q * phi * a / (a*a - 1) * (a - ratio)
}

// Photocurrent is the short-circuit photocurrent of a junction, A, by where
// the collected pairs were generated.
type Photocurrent struct {
	P, Depletion, N float64 // from the p region, the depletion region and the n region, A
}

// Total returns the whole photocurrent, A.
func (p Photocurrent) Total() float64 { return p.P + p.Depletion + p.N }

// JunctionPhotocurrent returns the photocurrent of a junction of area a
// (m^2) with quasi-neutral regions pr and nr, depletion width w (m) under
// light l: the sum of the regions' collected currents (superposition of
// the dark and the illuminated solutions, valid in low injection; the
// photocurrent is taken as independent of bias, with w the depletion width
// at zero bias). Every pair generated in the depletion region is collected
// (no recombination there).
//
// Uniform generation: each region's UniformPhotocurrentDensity and q g w
// from the depletion region. Monochromatic light entering the p side (or
// the n side with l.FromN): FrontPhotocurrentDensity for the region under
// the surface, q phi e^(-alpha Hf) (1 - e^(-alpha w)) from the depletion
// region (Hf the front region's width) and BackPhotocurrentDensity with the
// flux left after the front region and the depletion region. These are the
// collected currents at short circuit; the diode model multiplies each part
// by the avalanche in reverse bias (Static.MultiplicationAt).
func JunctionPhotocurrent(pr, nr QuasiNeutral, w, a float64, l Light) (Photocurrent, error) {
	if l.Generation < 0 || l.PhotonFlux < 0 || l.Absorption < 0 || !Finite(l.Generation) || !Finite(l.PhotonFlux) || !Finite(l.Absorption) {
		return Photocurrent{}, fmt.Errorf("light: generation %g m^-3 s^-1, photon flux %g m^-2 s^-1 and absorption %g 1/m must be finite and not negative", l.Generation, l.PhotonFlux, l.Absorption)
	}
	if !(w >= 0) || !(a > 0) {
		return Photocurrent{}, errors.New("light: the depletion width must be known and the area positive")
	}
	var pc Photocurrent
	if g := l.Generation; g > 0 {
		pc.P += pr.UniformPhotocurrentDensity(g) * a
		pc.N += nr.UniformPhotocurrentDensity(g) * a
		pc.Depletion += Q * g * w * a
	}
	if l.PhotonFlux > 0 && l.Absorption > 0 {
		front, back := pr, nr
		if l.FromN {
			front, back = nr, pr
		}
		if math.IsInf(front.Width, 1) {
			return pc, errors.New("light: the illuminated region is long (no width given); give its width so that light can reach the junction")
		}
		phi, alpha := l.PhotonFlux, l.Absorption
		jf := front.FrontPhotocurrentDensity(phi, alpha) * a
		atEdge := phi * math.Exp(-alpha*front.Width)
		jd := Q * atEdge * -math.Expm1(-alpha*w) * a
		jb := back.BackPhotocurrentDensity(atEdge*math.Exp(-alpha*w), alpha) * a
		if l.FromN {
			pc.N += jf
			pc.P += jb
		} else {
			pc.P += jf
			pc.N += jb
		}
		pc.Depletion += jd
	}
	return pc, nil
}

// LitFigures are the figures of merit of an illuminated junction read off
// its lit I-V curve (the dark current with every enabled effect minus the
// photocurrent). Currents are counted positive when the junction delivers
// them (generator sign).
type LitFigures struct {
	Isc  float64 // short-circuit current, A
	Voc  float64 // open-circuit voltage, V
	Pmax float64 // largest power delivered, W
	Vmp  float64 // voltage at Pmax, V
	Imp  float64 // current at Pmax, A
	FF   float64 // fill factor Pmax / (Isc Voc)
}

// LitFigures computes the figures of merit of the lit junction with
// LitFiguresOf on its current s.Solve(v).Current. It returns an error in
// the dark.
func (s *Static) LitFigures() (LitFigures, error) {
	if !(s.IL > 0) {
		return LitFigures{}, errors.New("the junction is not lit: no photocurrent")
	}
	return LitFiguresOf(func(v float64) float64 { return s.Solve(v).Current })
}

// LitFiguresOf computes the figures of merit of a lit I-V curve given as
// its terminal current cur(V) (A, forward positive): Isc = -I(0), Voc
// from I(Voc) = 0 by bisection on the terminal voltage (the current
// rises monotonically with bias), and the maximum of the delivered power
// -V I(V) on [0, Voc] by golden-section search (the power is unimodal
// there for a diode with series and shunt resistance), each to 1e-9 V.
// It returns an error when no open-circuit voltage below 100 V exists.
// cur may be an analytic model or a numerical solution (it is called
// about 80 times, in a sequence of nearby voltages).
//
// Definitions: Sze & Ng 2007, ch. 13 (short-circuit current, open-circuit
// voltage, fill factor FF = Im Vm / (Isc Voc)).
func LitFiguresOf(cur func(v float64) float64) (LitFigures, error) {
	f := LitFigures{Isc: -cur(0)}
	lo, hi := 0.0, 0.1
	for cur(hi) < 0 {
		lo, hi = hi, 2*hi
		if hi > 100 {
			return f, errors.New("no open-circuit voltage below 100 V: the photocurrent exceeds the forward current the model reaches")
		}
	}
	for hi-lo > 1e-9 {
		mid := (lo + hi) / 2
		if cur(mid) < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	f.Voc = (lo + hi) / 2
	power := func(v float64) float64 { return -v * cur(v) }
	a, b := 0.0, f.Voc
	const r = 0.6180339887498949 // (sqrt 5 - 1)/2
	x1, x2 := b-r*(b-a), a+r*(b-a)
	p1, p2 := power(x1), power(x2)
	for b-a > 1e-9 {
		if p1 < p2 {
			a, x1, p1 = x1, x2, p2
			x2 = a + r*(b-a)
			p2 = power(x2)
		} else {
			b, x2, p2 = x2, x1, p1
			x1 = b - r*(b-a)
			p1 = power(x1)
		}
	}
	f.Vmp = (a + b) / 2
	f.Imp = -cur(f.Vmp)
	f.Pmax = f.Vmp * f.Imp
	if f.Isc > 0 && f.Voc > 0 {
		f.FF = f.Pmax / (f.Isc * f.Voc)
	}
	return f, nil
}
