package physics

import "math"

// Carrier names the kind of charge carrier.
type Carrier int

const (
	// Electron is the conduction-band carrier.
	Electron Carrier = iota
	// Hole is the valence-band carrier.
	Hole
)

// String returns "electron" or "hole".
func (c Carrier) String() string {
	if c == Electron {
		return "electron"
	}
	return "hole"
}

// Mobility returns the low-field mobility in m^2/(V s) of carrier c in the
// material at total ionised impurity density nTotal (m^-3) and temperature t
// (K). donor names the donor species (selects Masetti's arsenic set for
// electrons in silicon; "" means the default).
//
// Formula: the material's CaugheyThomas model (Caughey-Thomas form with the
// Masetti terms for Si; see CaugheyThomas). For a minority carrier pass the
// doping of the region the carrier is minority in. Valid over
// [MobilityTMin, MobilityTMax] of the material; outside it is an
// extrapolation of the lattice law.
func (m *Material) Mobility(c Carrier, nTotal, t float64, donor string) float64 {
	model := m.HoleMobility
	if c == Electron {
		model = m.ElectronMobility
		if alt, ok := m.MobilityByDopant[donor]; ok {
			model = alt
		}
	}
	return model.Mobility(nTotal, t)
}

// Diffusivity returns the diffusion coefficient D in m^2/s from the mobility
// mu (m^2/(V s)) at temperature t (K) by the Einstein relation.
//
// Formula: D = mu k T / q. Valid for non-degenerate carriers (Boltzmann
// statistics). Source: A. Einstein, Ann. Phys. 17, 549 (1905); Sze & Ng
// 2007, eq. 1.75.
func Diffusivity(mu, t float64) float64 { return mu * ThermalVoltage(t) }

// DiffusionLength returns L = sqrt(D tau) in m for diffusivity d (m^2/s) and
// lifetime tau (s). Source: Shockley, Bell Syst. Tech. J. 28, 435 (1949);
// Sze & Ng 2007, eq. 2.60. Valid in low injection.
func DiffusionLength(d, tau float64) float64 { return math.Sqrt(d * tau) }

// SRHLifetime returns the doping-dependent Shockley-Read-Hall lifetime in s.
//
// Formula: tau = tauMax / (1 + N / nRef) (Scharfetter form; published use:
// Roulston, Arora, Chamberlain, IEEE Trans. Electron Devices 29, 284 (1982)).
// N and nRef in m^-3. Valid as a model default where no measured lifetime
// is known; real lifetimes depend on process and contamination.
func SRHLifetime(tauMax, nRef, n float64) float64 { return tauMax / (1 + n/nRef) }

// LifetimeParts holds the components of a minority-carrier lifetime, s.
type LifetimeParts struct {
	SRH, Auger, Radiative, Total float64
}

// MinorityLifetime returns the default lifetime of minority carrier c in a
// region of majority doping n (m^-3) and its parts.
//
// Formula: 1/tau = 1/tau_SRH(N) + C N^2 + B N, with C the Auger coefficient
// of the majority-majority-minority process (Cp for electrons in p-type,
// Cn for holes in n-type) and B the radiative coefficient. Sources: SRH
// Scharfetter form (SRHLifetime); Auger J. Dziewior, W. Schmid, Appl. Phys.
// Lett. 31, 346 (1977) for Si; radiative T. Trupke et al., J. Appl. Phys. 94,
// 4930 (2003) for Si. Low injection; parameters are temperature independent
// (a simplification).
func (m *Material) MinorityLifetime(c Carrier, n float64) LifetimeParts {
	lt := m.Lifetime
	var srh, auger float64
	if c == Electron { // electrons are minority in p-type: hhe process, Cp
		srh = SRHLifetime(lt.TauMaxN, lt.NRefN, n)
		auger = 1 / (lt.AugerP * n * n)
	} else {
		srh = SRHLifetime(lt.TauMaxP, lt.NRefP, n)
		auger = 1 / (lt.AugerN * n * n)
	}
	rad := 1 / (lt.Radiative * n)
	return LifetimeParts{SRH: srh, Auger: auger, Radiative: rad, Total: 1 / (1/srh + 1/auger + 1/rad)}
}
