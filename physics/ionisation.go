package physics

import (
	"fmt"
	"math"
)

// pearsonBardeenAlphaSi is the coefficient of the ionisation-energy
// lowering E(N) = E0 - alpha N^(1/3) in silicon, eV m (3.1e-8 eV cm).
// Source: G. L. Pearson, J. Bardeen, Phys. Rev. 75, 865 (1949); the value
// 3.1e-8 eV cm is the one device simulators use for P and As in Si (from
// memory). For other hosts junco scales it by eps_r(Si)/eps_r (a
// hydrogenic estimate, approximate).
const pearsonBardeenAlphaSi = 3.1e-8 * 1e-2

// IonisationLowering returns the coefficient alpha (eV m) of the
// ionisation-energy lowering E(N) = E0 - alpha N^(1/3) in material m: the
// silicon value of Pearson & Bardeen (1949) scaled by 11.7/eps_r for other
// hosts (approximate).
func (m *Material) IonisationLowering() float64 { return pearsonBardeenAlphaSi * 11.7 / m.EpsR }

// IonisationModel selects the description of the dopant levels used for
// incomplete ionisation.
type IonisationModel int

const (
	// IonisationSingleLevel is the textbook single level: the isolated
	// dopant's ionisation energy and degeneracy, every dopant localised
	// (Sze & Ng 2007, section 1.4.2; Neamen 4th ed., section 4.5), below
	// the Mott density of the dopant (MottDensity); at and above it the
	// dopants form a band and count as fully ionised. It is the default.
	// The switch at the Mott density is abrupt (the single level knows no
	// impurity band); dopings within a factor 10 below it are flagged
	// (FlagMottTransition), where the single level overstates freeze-out.
	IonisationSingleLevel IonisationModel = iota
	// IonisationLowered lowers the level with density, E = E0 - alpha
	// N^(1/3) (after Pearson & Bardeen 1949), and counts a fraction
	// 1 - b(N) of the dopants as ionised (impurity band), with b of the
	// form of Altermatt et al. (2006) but junco's own parameters
	// (LoweredDopantLevel): not a published parameter set, and not
	// checked against measured ionised fractions. Si:P 1e17 cm^-3 at
	// 77 K: ionised 0.35 against the single level's 0.135.
	IonisationLowered
)

// String returns "single-level" or "lowered".
func (im IonisationModel) String() string {
	if im == IonisationLowered {
		return "lowered"
	}
	return "single-level"
}

// ParseIonisationModel reads "single-level" (also "" for the default) or
// "lowered".
func ParseIonisationModel(s string) (IonisationModel, error) {
	switch s {
	case "", "single-level":
		return IonisationSingleLevel, nil
	case "lowered":
		return IonisationLowered, nil
	}
	return 0, fmt.Errorf("ionisation model %q: allowed single-level (default) or lowered", s)
}

// DopantLevelFor returns the level of dopant d at total density n (m^-3)
// in material m under ionisation model im: the isolated level (energy
// d.Ionisation, degeneracy d.Degeneracy, all localised) for
// IonisationSingleLevel, EffectiveDopantLevel for IonisationLowered.
func (m *Material) DopantLevelFor(d Dopant, n float64, im IonisationModel) DopantLevel {
	if im == IonisationLowered {
		return m.LoweredDopantLevel(d, n)
	}
	nm := m.MottDensity(d)
	b := 1.0
	if n >= nm {
		b = 0
	}
	return DopantLevel{Energy: d.Ionisation, Degeneracy: d.Degeneracy, Localised: b, MottDensity: nm}
}

// MottDensity returns the density (m^-3) above which dopant d in material
// m forms a metallic impurity band, from the Mott criterion
// N_c^(1/3) a* = 0.26 (P. P. Edwards, M. J. Sienko, Phys. Rev. B 17, 2575
// (1978); N. F. Mott, Rev. Mod. Phys. 40, 677 (1968); from memory) with the
// hydrogenic Bohr radius of the level, a* = q^2/(8 pi eps E0). Si with a
// 45 meV level: 6.9e18 cm^-3 (measured for Si:P about 3.7e18 cm^-3, from
// memory: the estimate is good to a factor of two).
func (m *Material) MottDensity(d Dopant) float64 {
	a := Q / (8 * math.Pi * m.Permittivity() * d.Ionisation) // q^2/(8 pi eps E0 q) with E0 in eV
	c := 0.26 / a
	return c * c * c
}

// DopantLevel is the effective description of one dopant species at one
// density: the lowered ionisation energy, the degeneracy and the fraction b
// of dopants whose states are still localised.
type DopantLevel struct {
	Energy     float64 // effective ionisation energy from the band edge, eV (>= 0)
	Degeneracy float64 // ground-state degeneracy g
	// Localised is the fraction b of dopants with a bound state; the rest
	// (1 - b) sit in the impurity band merged with the majority band and
	// count as ionised.
	Localised float64
	// MottDensity is the density at which the lowered energy reaches zero,
	// m^-3.
	MottDensity float64
}

// BandDensity returns n1 = (Nb/g) exp(-E/kT), m^-3: the majority density at
// which the level is half occupied (for g = 1), for band effective density
// of states nb (Nc for donors, Nv for acceptors, m^-3) at temperature t (K).
//
// Source: Sze & Ng 2007, section 1.4.2 (the occupation of a donor level
// written with n1); Neamen 4th ed., section 4.5.
func (lv DopantLevel) BandDensity(nb, t float64) float64 {
	return nb / lv.Degeneracy * math.Exp(-lv.Energy/ThermalVoltage(t))
}

// EffectiveDopantLevel returns the level of dopant d at density n (m^-3)
// under the default ionisation model (IonisationSingleLevel; see
// DopantLevelFor).
func (m *Material) EffectiveDopantLevel(d Dopant, n float64) DopantLevel {
	return m.DopantLevelFor(d, n, IonisationSingleLevel)
}

// LoweredDopantLevel returns the lowered level of dopant d at total
// density n (m^-3) in material m (the IonisationLowered model).
//
// Formulas: E(N) = max(E0 - alpha N^(1/3), 0) (Pearson & Bardeen 1949) with
// alpha from IonisationLowering; the Mott density N_M = (E0/alpha)^3 where
// E reaches zero; localised fraction b(N) = 1/(1 + (N/N_M)^2), the form of
// P. P. Altermatt et al., J. Appl. Phys. 100, 113715 (2006), with junco's
// own choice N_b = N_M and exponent 2 (approximate, not a fit). In silicon
// N_M = 3.1e18 cm^-3 for phosphorus, close to the measured metal-insulator
// transition near 3.7e18 cm^-3 (from memory).
func (m *Material) LoweredDopantLevel(d Dopant, n float64) DopantLevel {
	alpha := m.IonisationLowering()
	e := d.Ionisation - alpha*math.Cbrt(n)
	if e < 0 {
		e = 0
	}
	nm := math.Pow(d.Ionisation/alpha, 3)
	r := n / nm
	return DopantLevel{Energy: e, Degeneracy: d.Degeneracy, Localised: 1 / (1 + r*r), MottDensity: nm}
}

// IonisedDensity returns the majority-carrier density and the ionised
// dopant density (m^-3) of a neutral region doped with n (m^-3) dopants of
// one species with level lv, with band effective density of states nb
// (Nc for donors, Nv for acceptors, m^-3), intrinsic density ni (m^-3) at
// temperature t (K).
//
// Formulas (donors; acceptors alike with p, Nv):
//
//	n1 = (Nc/g) exp(-E/kT)
//	Nd+ = Nd [1 - b (n/n1)/(1 + n/n1)]     Fermi-Dirac occupation of the level
//	n = Nd+ + ni^2/n                        charge neutrality, Boltzmann bands
//
// solved for n by bisection-safeguarded Newton iteration (the residual is
// monotone in n). With b = 1 this is the textbook single-level result,
// Nd+ = Nd/(1 + g exp((EF - Ed)/kT)) (Sze & Ng 2007, section 1.4.2;
// Neamen 4th ed., section 4.5). Valid for non-degenerate doping (flagged by
// FlagDegenerate) and one dominant species per region.
func IonisedDensity(n float64, lv DopantLevel, nb, ni, t float64) (majority, ionised float64) {
	n1 := lv.BandDensity(nb, t)
	b := lv.Localised
	ion := func(x float64) float64 { return n * (1 - b*x/(n1+x)) }
	f := func(x float64) float64 { return x - ion(x) - ni*ni/x }
	lo := ni * ni / (n + ni)
	hi := n + ni
	x := math.Min(hi, math.Max(lo, 2*n/(1+math.Sqrt(1+4*n*b/n1))+ni*ni/n))
	for i := 0; i < 200; i++ {
		fx := f(x)
		if fx > 0 {
			hi = x
		} else {
			lo = x
		}
		d := 1 + n*b*n1/((n1+x)*(n1+x)) + ni*ni/(x*x)
		nx := x - fx/d
		if !(nx > lo && nx < hi) {
			nx = 0.5 * (lo + hi)
		}
		if math.Abs(nx-x) <= 1e-14*x {
			x = nx
			break
		}
		x = nx
	}
	return x, ion(x)
}
