package physics

import "math"

// Chynoweth is one field range of an impact-ionisation coefficient of the
// generalised Chynoweth form alpha(E) = A exp(-(B/E)^M), alpha in m^-1,
// E in V/m (M = 1 is Chynoweth's law, A. G. Chynoweth, Phys. Rev. 109,
// 1537 (1958)). The piece applies for fields from EFrom upwards, up to the
// next piece.
type Chynoweth struct {
	EFrom float64 // V/m
	A     float64 // m^-1
	B     float64 // V/m
	M     float64 // dimensionless exponent (1 for Chynoweth's law)
}

// ImpactModel holds the electron and hole impact-ionisation coefficients
// of a material at 300 K, their temperature law and validity.
//
// Temperature law: A(T) = gamma A, B(T) = gamma B with
// gamma = tanh(hw/(2 k 300 K)) / tanh(hw/(2 k T)), hw the optical-phonon
// energy (the form used with the van Overstraeten-de Man set in device
// simulators, after C. R. Crowell and S. M. Sze, Appl. Phys. Lett. 9, 242
// (1966); from memory). It makes the breakdown voltage rise with
// temperature. Checked for 4H-SiC only: (1/V) dV/dT = 2.6e-4 K^-1 at
// 270-290 V over 300-573 K (Vasilevskii et al. 2000, as quoted by the Ioffe
// archive) against 2.57e-4 K^-1 from this law. For Si it gives +0.21 %/K at
// 1e16 cm^-3 (51.6 V at 300 K, 62.4 V at 400 K), about twice the +0.1 %/K
// that measured avalanche diodes are recalled to show (from memory, low
// confidence; not corrected without a checked source), and GaAs +0.39 %/K:
// flagged.
type ImpactModel struct {
	Electron, Hole []Chynoweth // pieces sorted by EFrom
	PhononEnergy   float64     // optical-phonon energy hw, eV
	// EMin, EMax bound the fields of the measurements, V/m; TMin, TMax the
	// temperatures the parameters (with their law) are trusted over, K.
	EMin, EMax float64
	TMin, TMax float64
	Source     string
	// TempLawCheck names the measurement the temperature law was checked
	// against; "" when it was not, and then a breakdown away from 300 K is
	// flagged (FlagBreakdownTemperature).
	TempLawCheck string
}

// perCm and vPerCm write the published cm-based coefficients in SI.
const (
	perCm  = 1e2 // cm^-1 -> m^-1
	vPerCm = 1e2 // V/cm -> V/m
)

// ImpactModelFor returns the impact-ionisation model of the material, and
// false when none is known.
func ImpactModelFor(m *Material) (ImpactModel, bool) {
	switch m.Key {
	case "si":
		// R. van Overstraeten, H. de Man, Solid-State Electron. 13, 583
		// (1970): electrons a = 7.03e5 cm^-1, b = 1.231e6 V/cm; holes
		// a = 1.582e6, b = 2.036e6 below 4e5 V/cm and a = 6.71e5,
		// b = 1.693e6 from 4e5 V/cm; measured 1.75e5-6e5 V/cm (values as
		// used by device simulators; from memory). hw = 0.063 eV (from
		// memory).
		return ImpactModel{
			Electron:     []Chynoweth{{0, 7.03e5 * perCm, 1.231e6 * vPerCm, 1}},
			Hole:         []Chynoweth{{0, 1.582e6 * perCm, 2.036e6 * vPerCm, 1}, {4e5 * vPerCm, 6.71e5 * perCm, 1.693e6 * vPerCm, 1}},
			PhononEnergy: 0.063, EMin: 1.75e5 * vPerCm, EMax: 6e5 * vPerCm, TMin: 250, TMax: 500,
			Source: "van Overstraeten & de Man, Solid-State Electron. 13, 583 (1970)"}, true
	case "ge":
		// Electrons a = 1.55e7 cm^-1, b = 1.56e6 V/cm; holes a = 1.0e7,
		// b = 1.28e6 V/cm, for about 2e5-5.6e5 V/cm, as tabulated in Sze &
		// Ng 2007, ch. 1 (from memory). hw = 0.037 eV (from memory).
		return ImpactModel{
			Electron:     []Chynoweth{{0, 1.55e7 * perCm, 1.56e6 * vPerCm, 1}},
			Hole:         []Chynoweth{{0, 1.0e7 * perCm, 1.28e6 * vPerCm, 1}},
			PhononEnergy: 0.037, EMin: 2e5 * vPerCm, EMax: 5.6e5 * vPerCm, TMin: 250, TMax: 400,
			Source: "Sze & Ng 2007, ch. 1 (Ge; from memory)"}, true
	case "gaas":
		// alpha = 1.889e5 exp(-(5.75e5/E)^1.82) cm^-1 (electrons),
		// beta = 2.215e5 exp(-(6.57e5/E)^1.75) cm^-1 (holes), as quoted in
		// Sze & Ng 2007, ch. 1 (from memory). hw = 0.035 eV (from memory).
		return ImpactModel{
			Electron:     []Chynoweth{{0, 1.889e5 * perCm, 5.75e5 * vPerCm, 1.82}},
			Hole:         []Chynoweth{{0, 2.215e5 * perCm, 6.57e5 * vPerCm, 1.75}},
			PhononEnergy: 0.035, EMin: 2e5 * vPerCm, EMax: 6e5 * vPerCm, TMin: 250, TMax: 450,
			Source: "Sze & Ng 2007, ch. 1 (GaAs; from memory)"}, true
	case "4h-sic":
		// Along <0001>: electrons a = 1.76e8 cm^-1, b = 3.30e7 V/cm; holes
		// a = 3.41e8 cm^-1, b = 2.50e7 V/cm: T. Hatakeyama et al., Appl.
		// Phys. Lett. 85, 1380 (2004) (from memory). hw = 0.19 eV (from
		// memory). Measured roughly 1-4 MV/cm.
		return ImpactModel{
			Electron:     []Chynoweth{{0, 1.76e8 * perCm, 3.30e7 * vPerCm, 1}},
			Hole:         []Chynoweth{{0, 3.41e8 * perCm, 2.50e7 * vPerCm, 1}},
			PhononEnergy: 0.19, EMin: 1e6 * vPerCm, EMax: 4e6 * vPerCm, TMin: 250, TMax: 600,
			Source:       "Hatakeyama et al., Appl. Phys. Lett. 85, 1380 (2004)",
			TempLawCheck: "Vasilevskii et al. (2000): (1/V) dV/dT = 2.6e-4 per K, 300-573 K"}, true
	}
	return ImpactModel{}, false
}

// impactCoefficients is an ImpactModel evaluated at one temperature.
type impactCoefficients struct {
	n, p   [2]Chynoweth // at most two pieces each
	nn, np int
}

// at returns the model's coefficients scaled to temperature t (K).
func (im ImpactModel) at(t float64) impactCoefficients {
	kt := ThermalVoltage(t)
	g := math.Tanh(im.PhononEnergy/(2*ThermalVoltage(300))) / math.Tanh(im.PhononEnergy/(2*kt))
	var c impactCoefficients
	for i, p := range im.Electron {
		c.n[i] = Chynoweth{p.EFrom, g * p.A, g * p.B, p.M}
	}
	for i, p := range im.Hole {
		c.p[i] = Chynoweth{p.EFrom, g * p.A, g * p.B, p.M}
	}
	c.nn, c.np = len(im.Electron), len(im.Hole)
	return c
}

func chyn(ps *[2]Chynoweth, n int, e float64) float64 {
	if e <= 0 {
		return 0
	}
	p := ps[0]
	if n > 1 && e >= ps[1].EFrom {
		p = ps[1]
	}
	x := p.B / e
	if p.M != 1 {
		x = math.Pow(x, p.M)
	}
	return p.A * math.Exp(-x)
}

// alpha returns the electron and hole coefficients (m^-1) at field e (V/m).
func (c *impactCoefficients) alpha(e float64) (an, ap float64) {
	return chyn(&c.n, c.nn, e), chyn(&c.p, c.np, e)
}

// Alpha returns the electron and hole impact-ionisation coefficients, m^-1,
// at field e (V/m, magnitude) and temperature t (K).
func (im ImpactModel) Alpha(e, t float64) (an, ap float64) {
	c := im.at(t)
	return c.alpha(math.Abs(e))
}
