package physics

// Unit factors used only to write the published (cm-based) parameter values
// below in SI. They are exact definitions of the centimetre, not constants
// of nature.
const (
	perCm3  = 1e6   // cm^-3 -> m^-3
	cm2     = 1e-4  // cm^2/(V s) -> m^2/(V s)
	cm3PerS = 1e-6  // cm^3/s -> m^3/s
	cm6PerS = 1e-12 // cm^6/s -> m^6/s
	meV     = 1e-3  // meV -> eV
)

// materials builds the table of built-in materials. A fresh copy is built on
// every call so that callers can modify what they receive and no package
// state is shared.
func materials() []*Material {
	return []*Material{silicon(), germanium(), galliumArsenide(), siliconCarbide4H()}
}

func silicon() *Material {
	return &Material{
		Key:  "si",
		Name: "Silicon",
		// Neamen, Semiconductor Physics and Devices, 4th ed. (2012), App. B;
		// Levinshtein et al., Handbook Series on Semiconductor Parameters (1996).
		EpsR: 11.7,
		// C. D. Thurmond, J. Electrochem. Soc. 122, 1133 (1975), as used in
		// Sze, Physics of Semiconductor Devices, 2nd ed. (1981): Eg(300 K) = 1.1245 eV.
		Gap: Varshni{Eg0: 1.17, Alpha: 4.73e-4, Beta: 636},
		// M. A. Green, J. Appl. Phys. 67, 2944 (1990) (attribution from memory;
		// values as quoted in O'Reilly, Nanoelectronics, App. B): Nc 2.86e19,
		// Nv 3.10e19 cm^-3 at 300 K, consistent with a measured ni near 1e10.
		Nc300: 2.86e19 * perCm3,
		Nv300: 3.10e19 * perCm3,
		// Sze & Ng 2007, App. G; Levinshtein et al. 1996.
		Affinity: 4.05,
		// P. Misiakos, D. Tsamakis, "Accurate measurements of the silicon
		// intrinsic carrier density from 78 to 340 K", J. Appl. Phys. 74, 3293
		// (1993): ni = 5.29e19 (T/300)^2.54 exp(-6726/T) cm^-3 (9.70e9 at 300 K).
		NiFit: &PowerLawNi{A: 5.29e19 * perCm3, P: 2.54, B: 6726,
			Source: "Misiakos & Tsamakis, J. Appl. Phys. 74, 3293 (1993)", TMin: 78, TMax: 340},
		// Masetti, Severi, Solmi, IEEE Trans. Electron Devices ED-30, 764
		// (1983), Table I: phosphorus set for electrons, boron set for holes.
		// Lattice temperature exponents 2.33 (electrons) and 2.23 (holes) from
		// Arora, Hauser, Roulston, IEEE Trans. Electron Devices ED-29, 292
		// (1982), whose model is stated for 250-500 K.
		ElectronMobility: CaugheyThomas{MuMax: 1414 * cm2, MuMin1: 68.5 * cm2, MuMin2: 68.5 * cm2, Mu1: 56.1 * cm2,
			Pc: 0, Cr: 9.20e16 * perCm3, Cs: 3.41e20 * perCm3, Alpha: 0.711, BetaM: 1.98, Zeta: 2.33},
		HoleMobility: CaugheyThomas{MuMax: 470.5 * cm2, MuMin1: 44.9 * cm2, MuMin2: 0, Mu1: 29.0 * cm2,
			Pc: 9.23e16 * perCm3, Cr: 2.23e17 * perCm3, Cs: 6.10e20 * perCm3, Alpha: 0.719, BetaM: 2.0, Zeta: 2.23},
		MobilityByDopant: map[string]CaugheyThomas{
			// Masetti et al. 1983, Table I, arsenic set.
			"arsenic": {MuMax: 1417 * cm2, MuMin1: 52.2 * cm2, MuMin2: 52.2 * cm2, Mu1: 43.4 * cm2,
				Pc: 0, Cr: 9.68e16 * perCm3, Cs: 3.43e20 * perCm3, Alpha: 0.680, BetaM: 2.0, Zeta: 2.33},
		},
		Lifetime: Lifetime{
			// Scharfetter-form model defaults (from memory; commonly used
			// simulator defaults, not measurements): tau_max,n 10 us,
			// tau_max,p 3 us, N_ref 1e16 cm^-3.
			TauMaxN: 1.0e-5, TauMaxP: 3.0e-6, NRefN: 1e16 * perCm3, NRefP: 1e16 * perCm3,
			// J. Dziewior, W. Schmid, Appl. Phys. Lett. 31, 346 (1977):
			// Cn 2.8e-31, Cp 0.99e-31 cm^6/s.
			AugerN: 2.8e-31 * cm6PerS, AugerP: 0.99e-31 * cm6PerS,
			// T. Trupke et al., J. Appl. Phys. 94, 4930 (2003): B_low 4.73e-15 cm^3/s.
			Radiative: 4.73e-15 * cm3PerS,
		},
		// Ionisation energies: Sze 1981 and Kasap, Principles of Electronic
		// Materials and Devices, 2nd ed., Table 5.2. Degeneracy 2 (donors) and
		// 4 (acceptors): Sze & Ng 2007, section 1.4.
		Dopants: map[string]Dopant{
			"phosphorus": {Name: "phosphorus", Symbol: "P", Donor: true, Ionisation: 45 * meV, Degeneracy: 2, Source: "Sze 1981"},
			"arsenic":    {Name: "arsenic", Symbol: "As", Donor: true, Ionisation: 54 * meV, Degeneracy: 2, Source: "Sze 1981; Kasap Table 5.2"},
			"antimony":   {Name: "antimony", Symbol: "Sb", Donor: true, Ionisation: 39 * meV, Degeneracy: 2, Source: "Kasap Table 5.2"},
			"boron":      {Name: "boron", Symbol: "B", Donor: false, Ionisation: 45 * meV, Degeneracy: 4, Source: "Sze 1981"},
			"aluminium":  {Name: "aluminium", Symbol: "Al", Donor: false, Ionisation: 57 * meV, Degeneracy: 4, Source: "Kasap Table 5.2"},
			"gallium":    {Name: "gallium", Symbol: "Ga", Donor: false, Ionisation: 72 * meV, Degeneracy: 4, Source: "Kasap Table 5.2"},
		},
		DefaultDonor: "phosphorus", DefaultAcceptor: "boron",
		TMin: 77, TMax: 600,
		MobilityTMin: 250, MobilityTMax: 500,
	}
}

func germanium() *Material {
	return &Material{
		Key:  "ge",
		Name: "Germanium",
		// Sze 1981; Kasap 2nd ed. Table 5.1.
		EpsR: 16.0,
		// Thurmond 1975 (from memory): Eg(300 K) = 0.6634 eV.
		Gap: Varshni{Eg0: 0.7437, Alpha: 4.774e-4, Beta: 235},
		// Sze 1981; Neamen 4th ed. Table 4.1.
		Nc300: 1.04e19 * perCm3,
		Nv300: 6.0e18 * perCm3,
		// Sze 1981; Levinshtein et al. 1996.
		Affinity: 4.0,
		// Lattice mobilities 3900 and 1900 cm^2/(V s): Sze 1981; Neamen Table
		// 5.1. Doping dependence: Caughey-Thomas form with approximate
		// parameters (mu_min, N_ref, alpha from memory; no published set was
		// verified). Lattice exponents 1.66 (electrons) and 2.33 (holes): Sze
		// & Ng 2007, section 1.5 (from memory).
		ElectronMobility: CaugheyThomas{MuMax: 3900 * cm2, MuMin1: 150 * cm2, MuMin2: 150 * cm2,
			Cr: 1e17 * perCm3, Alpha: 0.5, Zeta: 1.66},
		HoleMobility: CaugheyThomas{MuMax: 1900 * cm2, MuMin1: 100 * cm2, MuMin2: 100 * cm2,
			Cr: 1e17 * perCm3, Alpha: 0.5, Zeta: 2.33},
		Lifetime: Lifetime{
			// Model defaults (from memory), not measurements.
			TauMaxN: 1e-5, TauMaxP: 1e-5, NRefN: 1e16 * perCm3, NRefP: 1e16 * perCm3,
			// Auger about 1e-31 cm^6/s for both (from memory; Levinshtein 1996).
			AugerN: 1e-31 * cm6PerS, AugerP: 1e-31 * cm6PerS,
			// Radiative 6.4e-14 cm^3/s (from memory; Levinshtein 1996).
			Radiative: 6.4e-14 * cm3PerS,
		},
		// Neamen 4th ed. Table 4.3.
		Dopants: map[string]Dopant{
			"phosphorus": {Name: "phosphorus", Symbol: "P", Donor: true, Ionisation: 12 * meV, Degeneracy: 2, Source: "Neamen Table 4.3"},
			"arsenic":    {Name: "arsenic", Symbol: "As", Donor: true, Ionisation: 12.7 * meV, Degeneracy: 2, Source: "Neamen Table 4.3"},
			"boron":      {Name: "boron", Symbol: "B", Donor: false, Ionisation: 10.4 * meV, Degeneracy: 4, Source: "Neamen Table 4.3"},
			"aluminium":  {Name: "aluminium", Symbol: "Al", Donor: false, Ionisation: 10.2 * meV, Degeneracy: 4, Source: "Neamen Table 4.3"},
		},
		DefaultDonor: "phosphorus", DefaultAcceptor: "boron",
		TMin: 77, TMax: 400,
		MobilityTMin: 77, MobilityTMax: 400,
	}
}

func galliumArsenide() *Material {
	return &Material{
		Key:  "gaas",
		Name: "Gallium arsenide",
		// Sze 1981; Levinshtein et al. 1996.
		EpsR: 12.9,
		// J. S. Blakemore, J. Appl. Phys. 53, R123 (1982) (from memory):
		// Eg(300 K) = 1.4225 eV.
		Gap: Varshni{Eg0: 1.519, Alpha: 5.405e-4, Beta: 204},
		// Sze 1981; Neamen 4th ed. Table 4.1.
		Nc300: 4.7e17 * perCm3,
		Nv300: 7.0e18 * perCm3,
		// Neamen Table 9.2; Kasap Table 5.1.
		Affinity: 4.07,
		// M. Sotoodeh, A. H. Khalid, A. A. Rezazadeh, J. Appl. Phys. 87, 2890
		// (2000) (from memory): electrons 9400/500/6.0e16/0.394, holes
		// 491.5/20/1.48e17/0.38; lattice exponents 2.1 and 2.2 (from memory).
		ElectronMobility: CaugheyThomas{MuMax: 9400 * cm2, MuMin1: 500 * cm2, MuMin2: 500 * cm2,
			Cr: 6.0e16 * perCm3, Alpha: 0.394, Zeta: 2.1},
		HoleMobility: CaugheyThomas{MuMax: 491.5 * cm2, MuMin1: 20 * cm2, MuMin2: 20 * cm2,
			Cr: 1.48e17 * perCm3, Alpha: 0.38, Zeta: 2.2},
		Lifetime: Lifetime{
			// Model defaults (from memory): nanosecond-scale SRH lifetimes.
			TauMaxN: 1e-8, TauMaxP: 1e-8, NRefN: 1e17 * perCm3, NRefP: 1e17 * perCm3,
			// Auger about 1e-30 cm^6/s (from memory; Levinshtein 1996).
			AugerN: 1e-30 * cm6PerS, AugerP: 1e-30 * cm6PerS,
			// Radiative 7.2e-10 cm^3/s (from memory; Levinshtein 1996).
			Radiative: 7.2e-10 * cm3PerS,
		},
		// Neamen 4th ed. Table 4.4 (carbon from memory).
		Dopants: map[string]Dopant{
			"silicon":   {Name: "silicon", Symbol: "Si", Donor: true, Ionisation: 5.8 * meV, Degeneracy: 2, Source: "Neamen Table 4.4"},
			"selenium":  {Name: "selenium", Symbol: "Se", Donor: true, Ionisation: 5.9 * meV, Degeneracy: 2, Source: "Neamen Table 4.4"},
			"zinc":      {Name: "zinc", Symbol: "Zn", Donor: false, Ionisation: 30.7 * meV, Degeneracy: 4, Source: "Neamen Table 4.4"},
			"beryllium": {Name: "beryllium", Symbol: "Be", Donor: false, Ionisation: 28 * meV, Degeneracy: 4, Source: "Neamen Table 4.4"},
			"carbon":    {Name: "carbon", Symbol: "C", Donor: false, Ionisation: 26 * meV, Degeneracy: 4, Source: "from memory"},
		},
		DefaultDonor: "silicon", DefaultAcceptor: "zinc",
		TMin: 77, TMax: 600,
		MobilityTMin: 77, MobilityTMax: 500,
	}
}

func siliconCarbide4H() *Material {
	return &Material{
		Key:  "4h-sic",
		Name: "4H silicon carbide",
		// Parallel to the c axis (the field direction of vertical devices):
		// 10.03, W. J. Choyke, L. Patrick, measured on 6H (from memory);
		// measured 4H values reach 10.27 (Li et al., IEEE J. Microwaves 2024).
		EpsR: 10.03,
		// Form Eg0 - 6.5e-4 T^2/(T + 1300) after Levinshtein, Rumyantsev,
		// Shur, Properties of Advanced Semiconductor Materials (2001), with Eg0
		// set so that Eg(300 K) = 3.23 eV (from memory).
		Gap: Varshni{Eg0: 3.2666, Alpha: 6.5e-4, Beta: 1300},
		// Levinshtein et al. 2001: Nc = 3.25e15 T^1.5, Nv = 4.8e15 T^1.5
		// cm^-3 (from memory).
		Nc300: 1.69e19 * perCm3,
		Nv300: 2.49e19 * perCm3,
		// About 3.17 eV (from memory; literature spans 3.1-3.3 eV).
		Affinity: 3.17,
		// Roschke & Schwierz, IEEE Trans. Electron Devices 48, 1442 (2001)
		// (attribution and exponents from memory): electrons 947/40/1.94e17/0.61,
		// holes 124/15.9/1.76e19/0.34, mu_max ~ (T/300)^-2.15.
		ElectronMobility: CaugheyThomas{MuMax: 947 * cm2, MuMin1: 40 * cm2, MuMin2: 40 * cm2,
			Cr: 1.94e17 * perCm3, Alpha: 0.61, Zeta: 2.15},
		HoleMobility: CaugheyThomas{MuMax: 124 * cm2, MuMin1: 15.9 * cm2, MuMin2: 15.9 * cm2,
			Cr: 1.76e19 * perCm3, Alpha: 0.34, Zeta: 2.15},
		Lifetime: Lifetime{
			// Model defaults (from memory): sub-microsecond epitaxial lifetimes.
			TauMaxN: 5e-7, TauMaxP: 5e-7, NRefN: 3e17 * perCm3, NRefP: 3e17 * perCm3,
			// A. Galeckas et al., Appl. Phys. Lett. 71, 3269 (1997) (from memory):
			// Cn 5e-31, Cp 2e-31 cm^6/s; radiative 1.5e-12 cm^3/s.
			AugerN: 5e-31 * cm6PerS, AugerP: 2e-31 * cm6PerS,
			Radiative: 1.5e-12 * cm3PerS,
		},
		Dopants: map[string]Dopant{
			// Shallowest nitrogen donor (hexagonal site): Ivanov et al., Mater.
			// Sci. Forum 483-485, 511 (2005); cubic-site donors lie deeper.
			"nitrogen": {Name: "nitrogen", Symbol: "N", Donor: true, Ionisation: 61.35 * meV, Degeneracy: 2, Source: "Ivanov et al. 2005"},
			// About 200 meV: Matsuura et al., Appl. Phys. Lett. (2003).
			"aluminium": {Name: "aluminium", Symbol: "Al", Donor: false, Ionisation: 200 * meV, Degeneracy: 4, Source: "Matsuura et al. 2003"},
			// About 300 meV (from memory).
			"boron": {Name: "boron", Symbol: "B", Donor: false, Ionisation: 300 * meV, Degeneracy: 4, Source: "from memory"},
		},
		DefaultDonor: "nitrogen", DefaultAcceptor: "aluminium",
		TMin: 77, TMax: 700,
		MobilityTMin: 200, MobilityTMax: 600,
	}
}
