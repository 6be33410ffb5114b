package physics

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// Varshni holds the parameters of the Varshni band-gap law.
//
// Formula: Eg(T) = Eg0 - Alpha T^2 / (T + Beta), Eg in eV, T in K, Alpha in
// eV/K, Beta in K. Source: Y. P. Varshni, "Temperature dependence of the
// energy gap in semiconductors", Physica 34, 149 (1967).
type Varshni struct {
	Eg0   float64 // band gap at 0 K, eV
	Alpha float64 // eV/K
	Beta  float64 // K
}

// Gap returns Eg(T) in eV for T in K by the Varshni law. Valid over the
// temperature range of the fitted parameter set (see Material.TMin/TMax).
func (v Varshni) Gap(t float64) float64 { return v.Eg0 - v.Alpha*t*t/(t+v.Beta) }

// PowerLawNi is a measured fit of the intrinsic density of the form
// ni(T) = A (T/300)^P exp(-B/T), A in m^-3, B in K.
type PowerLawNi struct {
	A, P, B float64
	// Source names the publication of the fit.
	Source string
	// TMin and TMax bound the temperatures the fit was made over, K.
	TMin, TMax float64
}

// At returns ni(T) in m^-3 for T in K.
func (f PowerLawNi) At(t float64) float64 { return f.A * math.Pow(t/300, f.P) * math.Exp(-f.B/t) }

// CaugheyThomas holds the parameters of a doping- and temperature-dependent
// mobility of the Caughey-Thomas form, extended with the Masetti high-doping
// terms and a lattice temperature law.
//
// Formula (N = total ionised impurity density, Tn = T/300):
//
//	mu(N,T) = MuMin1 exp(-Pc/N) + (MuMax Tn^-Zeta - MuMin2)/(1 + (N/Cr)^Alpha) - Mu1/(1 + (Cs/N)^BetaM)
//
// With Pc = Mu1 = 0 and MuMin1 = MuMin2 this is the Caughey-Thomas form
// (D. M. Caughey, R. E. Thomas, Proc. IEEE 55, 2192 (1967)); with all terms it
// is the form of G. Masetti, M. Severi, S. Solmi, IEEE Trans. Electron Devices
// ED-30, 764 (1983). Mobilities in m^2/(V s), densities in m^-3.
type CaugheyThomas struct {
	MuMax, MuMin1, MuMin2, Mu1 float64 // m^2/(V s)
	Pc, Cr, Cs                 float64 // m^-3
	Alpha, BetaM               float64 // dimensionless
	Zeta                       float64 // lattice temperature exponent of MuMax
}

// Mobility returns mu(N, T) in m^2/(V s) for total ionised impurity density
// n (m^-3, clamped below at 1e12 m^-3) and temperature t (K).
func (c CaugheyThomas) Mobility(n, t float64) float64 {
	if n < 1e12 {
		n = 1e12
	}
	lattice := c.MuMax * math.Pow(t/300, -c.Zeta)
	mu := (lattice - c.MuMin2) / (1 + math.Pow(n/c.Cr, c.Alpha))
	if c.Pc > 0 {
		mu += c.MuMin1 * math.Exp(-c.Pc/n)
	} else {
		mu += c.MuMin1
	}
	if c.Mu1 > 0 {
		mu -= c.Mu1 / (1 + math.Pow(c.Cs/n, c.BetaM))
	}
	return mu
}

// Lifetime holds the doping-dependent SRH lifetime parameters (Scharfetter
// form) and the Auger and radiative coefficients of a material.
//
// SRH: tau(N) = TauMax / (1 + N/NRef) (D. L. Scharfetter's form, published
// use in Roulston, Arora, Chamberlain, IEEE Trans. Electron Devices 29, 284
// (1982)). Auger for a minority carrier in a region of majority density N:
// 1/tau_A = C N^2 with C the coefficient of the majority-majority-minority
// process. Radiative: 1/tau_rad = B N.
type Lifetime struct {
	TauMaxN, TauMaxP float64 // s, electron and hole SRH lifetime at low doping
	NRefN, NRefP     float64 // m^-3
	AugerN           float64 // m^6/s, n-type (eeh) coefficient, Cn
	AugerP           float64 // m^6/s, p-type (hhe) coefficient, Cp
	Radiative        float64 // m^3/s, B
}

// Dopant describes one dopant species in a host material.
type Dopant struct {
	Name       string  // lower-case trade name, e.g. "boron"
	Symbol     string  // chemical symbol, e.g. "B"
	Donor      bool    // true for donors, false for acceptors
	Ionisation float64 // ionisation energy from the band edge, eV
	Degeneracy float64 // ground-state degeneracy g (2 donors, 4 acceptors)
	Source     string  // publication of the ionisation energy
}

// Material collects the parameters junco needs for one semiconductor. All
// fields are SI unless the name says otherwise. Each value's source is
// written beside it where the material is defined (materials.go).
type Material struct {
	Key  string // lookup key, e.g. "si"
	Name string // display name, e.g. "Silicon"
	// EpsR is the static relative permittivity.
	EpsR float64
	// Gap is the band-gap law.
	Gap Varshni
	// Nc300, Nv300 are the effective densities of states at 300 K, m^-3.
	Nc300, Nv300 float64
	// Affinity is the electron affinity chi, eV.
	Affinity float64
	// NiFit, if set, is a measured ni(T) fit used instead of
	// sqrt(Nc Nv) exp(-Eg/2kT).
	NiFit *PowerLawNi
	// ElectronMobility and HoleMobility are the mobility models.
	ElectronMobility, HoleMobility CaugheyThomas
	// MobilityByDopant optionally overrides the majority-carrier model by
	// the species of the dominant dopant (e.g. Masetti's arsenic set).
	MobilityByDopant map[string]CaugheyThomas
	// Lifetime are the recombination parameters.
	Lifetime Lifetime
	// Dopants are the common dopant species, by lower-case name.
	Dopants map[string]Dopant
	// DefaultDonor and DefaultAcceptor name the species assumed when the
	// user gives none.
	DefaultDonor, DefaultAcceptor string
	// TMin and TMax bound the temperatures over which the parameter set is
	// trusted, K. Outside, results are extrapolations and flagged.
	TMin, TMax float64
	// MobilityTMin, MobilityTMax bound the mobility model's range, K.
	MobilityTMin, MobilityTMax float64
}

// Permittivity returns eps = EpsR eps0 in F/m.
func (m *Material) Permittivity() float64 { return m.EpsR * Eps0 }

// BandGap returns Eg(T) in eV by the material's Varshni law.
func (m *Material) BandGap(t float64) float64 { return m.Gap.Gap(t) }

// Nc returns the conduction-band effective density of states in m^-3.
//
// Formula: Nc(T) = Nc(300 K) (T/300)^(3/2), the parabolic-band law with a
// temperature-independent effective mass (Sze & Ng 2007, eq. 1.18;
// Neamen 4th ed., section 4.1). Valid where the band is parabolic; the
// effective-mass drift with T is neglected.
func (m *Material) Nc(t float64) float64 { return m.Nc300 * math.Pow(t/300, 1.5) }

// Nv returns the valence-band effective density of states in m^-3.
// Formula: Nv(T) = Nv(300 K) (T/300)^(3/2); as Nc.
func (m *Material) Nv(t float64) float64 { return m.Nv300 * math.Pow(t/300, 1.5) }

// NiFromBands returns sqrt(Nc Nv) exp(-Eg / 2kT) in m^-3.
//
// Formula: ni = sqrt(Nc(T) Nv(T)) exp(-q Eg(T) / (2 k T)) (Sze & Ng 2007,
// eq. 1.22). Units: T in K, result m^-3. Non-degenerate statistics.
func (m *Material) NiFromBands(t float64) float64 {
	return math.Sqrt(m.Nc(t)*m.Nv(t)) * math.Exp(-m.BandGap(t)/(2*ThermalVoltage(t)))
}

// Ni returns the intrinsic carrier density in m^-3 at t kelvin: the
// material's measured fit where one is set (for silicon Misiakos &
// Tsamakis 1993), else NiFromBands.
func (m *Material) Ni(t float64) float64 {
	if m.NiFit != nil {
		return m.NiFit.At(t)
	}
	return m.NiFromBands(t)
}

// Dopant returns the named species (case-insensitive; symbols accepted).
func (m *Material) Dopant(name string) (Dopant, bool) {
	k := strings.ToLower(strings.TrimSpace(name))
	if d, ok := m.Dopants[k]; ok {
		return d, true
	}
	for _, d := range m.Dopants {
		if strings.EqualFold(d.Symbol, k) {
			return d, true
		}
	}
	return Dopant{}, false
}

// DopantNames lists the species known for the material that are donors
// (donor = true) or acceptors, sorted.
func (m *Material) DopantNames(donor bool) []string {
	var out []string
	for k, d := range m.Dopants {
		if d.Donor == donor {
			out = append(out, k)
		}
	}
	sort.Strings(out)
	return out
}

// MaterialKeys returns the lookup keys of the built-in materials, sorted.
func MaterialKeys() []string {
	out := make([]string, 0, 4)
	for _, m := range materials() {
		out = append(out, m.Key)
	}
	sort.Strings(out)
	return out
}

// MaterialByName returns a fresh copy of the built-in material with the
// given key ("si", "ge", "gaas", "4h-sic"; case-insensitive, with a few
// aliases such as "silicon" and "sic"). The copy may be modified freely.
func MaterialByName(name string) (*Material, error) {
	k := strings.ToLower(strings.TrimSpace(name))
	switch k {
	case "silicon":
		k = "si"
	case "germanium":
		k = "ge"
	case "gallium-arsenide", "gallium arsenide":
		k = "gaas"
	case "sic", "4hsic", "4h_sic", "4h sic":
		k = "4h-sic"
	}
	switch k {
	case "si":
		return silicon(), nil
	case "ge":
		return germanium(), nil
	case "gaas":
		return galliumArsenide(), nil
	case "4h-sic":
		return siliconCarbide4H(), nil
	}
	return nil, fmt.Errorf("unknown material %q: choose one of %s", name, strings.Join(MaterialKeys(), ", "))
}
