package physics

import (
	"math"
	"math/cmplx"
)

// DiffusionSide is one quasi-neutral region seen by the diffusion model
// with the non-ideal effects: its minority-carrier transport (QuasiNeutral,
// with Doping the majority-carrier density after ionisation) and the
// effective intrinsic density after band-gap narrowing.
type DiffusionSide struct {
	QuasiNeutral
	NiEff float64 // effective intrinsic density, m^-3
}

// Injection returns the excess minority density at the depletion edge
// (m^-3) at junction voltage v (V) with thermal voltage vt, in low
// injection (hli false) or with the high-injection boundary condition.
//
// Formulas: low injection p' = p0 (exp(V/Vt) - 1), p0 = ni_eff^2/N
// (Shockley's law of the junction). With high injection the minority and
// majority densities at the edge obey n p = ni_eff^2 exp(V/Vt) with
// neutrality n = N + p' (Sze & Ng 2007, section 2.3.2 (from memory);
// R. M. Warner, B. L. Grung, Transistors (1983), ch. 3), giving
//
//	p'^2 + (N + p0) p' - ni_eff^2 (exp(V/Vt) - 1) = 0,
//
// solved in the cancellation-free form p' = 2X/((N + p0) + sqrt((N + p0)^2 + 4X)),
// X = ni_eff^2 (exp(V/Vt) - 1).
// For p' >> N it tends to ni_eff exp(V/2Vt): ideality 2.
func (r DiffusionSide) Injection(v, vt float64, hli bool) float64 {
	n := r.Doping
	ni2 := r.NiEff * r.NiEff
	p0 := ni2 / n
	if !hli {
		return p0 * math.Expm1(v/vt)
	}
	a := n + p0
	if v/vt > 600 { // X overflows; there p' = sqrt(X) to double precision
		return math.Exp(0.5 * (math.Log(ni2) + v/vt))
	}
	x := ni2 * math.Expm1(v/vt)
	// a^2 + 4x written as (N - p0)^2 + 4 ni^2 exp(V/Vt) (N p0 = ni^2), which
	// stays non-negative in rounding near intrinsic doping.
	disc := (n-p0)*(n-p0) + 4*ni2*math.Exp(v/vt)
	return 2 * x / (a + math.Sqrt(disc))
}

// effective returns the diffusivity and diffusion length at edge excess
// density pe: in high injection the minority diffusivity is raised by the
// field of the majority carriers, D_eff = D (1 + p/n) at the edge (the
// Webster effect: W. M. Webster, Proc. IRE 42, 914 (1954); doubling in the
// limit p >> N), with L = sqrt(D_eff tau).
func (r DiffusionSide) effective(pe float64, hli bool) (d, l float64) {
	d = r.Diffusivity
	if hli {
		p0 := r.NiEff * r.NiEff / r.Doping
		if den := r.Doping + pe; den > 0 {
			d *= 1 + math.Min((p0+pe)/den, 1)
		}
	}
	return d, math.Sqrt(d * r.Lifetime)
}

// Effective returns the region as the diffusion model sees it at edge
// excess density pe: its QuasiNeutral with the high-injection diffusivity
// of effective (the Webster doubling) when hli is set.
func (r DiffusionSide) Effective(pe float64, hli bool) QuasiNeutral {
	q := r.QuasiNeutral
	q.Diffusivity, _ = r.effective(pe, hli)
	return q
}

// CurrentDensity returns the minority diffusion current density (A/m^2)
// injected into the region at junction voltage v and the excess edge
// density (m^-3).
//
// Formula: J = q D_eff p' / L_eff G(w, L_eff, S, D_eff), with G the
// finite-width, contact-recombination factor (GeometryFactor). In low
// injection with ni_eff = ni and N the doping this is Shockley's
// q ni^2 D/(L N) G (exp(V/Vt) - 1) (SaturationCurrentDensity). The
// high-injection form keeps the low-injection lifetime (a simplification:
// the SRH lifetime rises towards tau_n + tau_p) and neglects the
// conductivity modulation of the region's resistance.
func (r DiffusionSide) CurrentDensity(v, vt float64, hli bool) (j, pe float64) {
	pe = r.Injection(v, vt, hli)
	d, l := r.effective(pe, hli)
	return Q * d * pe / l * GeometryFactor(r.Width, l, r.Recombination, d), pe
}

// admittance returns the small-signal admittance shape of a quasi-neutral
// region at normalised complex frequency z = j omega tau: the diffusion
// current per unit excess edge density, D k (sigma + tanh kw)/(1 + sigma
// tanh kw) with k = sqrt(1 + z)/L and sigma = S/(D k) (the solution of the
// continuity equation with a harmonic edge density).
func admittance(w, l, s, d float64, z complex128) complex128 {
	k := cmplx.Sqrt(1+z) / complex(l, 0)
	if math.IsInf(w, 1) {
		return complex(d, 0) * k
	}
	kw := k * complex(w, 0)
	var t complex128
	if real(kw) > 20 {
		t = 1
	} else {
		t = cmplx.Tanh(kw)
	}
	if math.IsInf(s, 1) {
		return complex(d, 0) * k / t
	}
	sigma := complex(s/d, 0) / k
	return complex(d, 0) * k * (sigma + t) / (1 + sigma*t)
}

// DiffusionCapacitanceFactor returns K such that the low-frequency
// diffusion (storage) capacitance of the region is Cd = K tau g, with g
// the region's diffusion conductance dI/dV and tau its minority lifetime:
// K = Im(Y(j omega))/(omega tau Y(0)) as omega -> 0.
//
// Limits: long region K = 1/2, the classic Cd = tau I/(2 Vt) (Neamen 4th
// ed., section 8.3, Example 8.7; Sze & Ng 2007, section 2.3.4); short
// region with an ohmic contact K tau = w^2/(3D), the small-signal
// transit-time form (the charge-control transit time is w^2/(2D)).
// Evaluated with a complex frequency of omega tau = 1e-4 (relative error
// about 1e-8).
func DiffusionCapacitanceFactor(w, l, s, d float64) float64 {
	const z = 1e-4
	y0 := admittance(w, l, s, d, 0)
	y1 := admittance(w, l, s, d, complex(0, z))
	return imag(y1/y0) / z
}

// ChargeControlTime returns the stored minority charge divided by the
// injected current, Q/I (s), of a region in steady state: from the
// continuity equation Q = tau (I(0) - I(w)), so Q/I = tau (1 - J(w)/J(0))
// with J(w)/J(0) from ExcessProfile. Long region: tau; short region with an
// ohmic contact: w^2/(2D), the transit time.
func (r QuasiNeutral) ChargeControlTime() float64 {
	if math.IsInf(r.Width, 1) {
		return r.Lifetime
	}
	_, jw := r.ExcessProfile(r.Width)
	return r.Lifetime * (1 - jw)
}
