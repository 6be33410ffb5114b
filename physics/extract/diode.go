package extract

import "math"

// SingleDiode holds the parameters of the single-diode model with series and
// shunt resistance,
//
//	I = Is (exp((V - I Rs)/(n Vt)) - 1) + (V - I Rs)/Rsh,
//
// where Vt = kT/q. Units: Is in A (> 0), n dimensionless (> 0, typically
// 1..2), Rs in ohm (>= 0; 0 means no series resistance), Rsh in ohm (> 0;
// +Inf means no shunt). Valid for any bias V (forward positive) as long as
// the lumped-element picture holds (no high injection beyond what n absorbs,
// no breakdown).
// Source: Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007), ch. 2
// (ideal diode with ideality factor); the lumped Rs/Rsh form is the one
// solved explicitly by Ortiz-Conde, García Sánchez & Muci, Solid-State
// Electron. 44, 1861 (2000).
type SingleDiode struct {
	SaturationCurrentA  float64 // Is, A
	IdealityFactor      float64 // n
	SeriesResistanceOhm float64 // Rs, ohm; 0 = none
	ShuntResistanceOhm  float64 // Rsh, ohm; +Inf = none
}

// Current returns the terminal current I(V) in A of the single-diode model
// at bias v (V) and thermal voltage vt = kT/q (V), explicitly via the
// principal branch of the Lambert W function (no iteration on I):
//
//   - Rs = 0: I = Is (exp(V/(n Vt)) - 1) + V/Rsh (closed form);
//   - Rsh = +Inf: I = (n Vt/Rs) W0((Is Rs/(n Vt)) exp((V + Is Rs)/(n Vt))) - Is
//     (Banwell & Jayakumar, Electron. Lett. 36, 291 (2000));
//   - both: I = (n Vt/Rs) W0(Is Rs Rsh/(n Vt (Rs+Rsh)) exp(Rsh (V + Is Rs)/(n Vt (Rs+Rsh))))
//   - (V - Is Rsh)/(Rs + Rsh) (Ortiz-Conde et al., Solid-State Electron.
//     44, 1861 (2000), with zero photocurrent).
//
// The W argument is passed in logarithmic form to physics.LambertW0Exp, so
// large forward bias does not overflow. Returns NaN for non-physical
// parameters (Is <= 0, n <= 0, Rs < 0, Rsh <= 0, vt <= 0). It is the lit
// model's current (lambertCurrent, LitDiode) with no photocurrent.
func (d SingleDiode) Current(v, vt float64) float64 {
	return lambertCurrent(d.SaturationCurrentA, d.IdealityFactor*vt, d.SeriesResistanceOhm, d.ShuntResistanceOhm, 0, v)
}

// DoubleDiode holds the parameters of the double-diode model: a diffusion
// diode with ideality 1 and a recombination diode with ideality 2 in
// parallel, with series resistance Rs and shunt Rsh,
//
//	I = Is1 (exp(Vd/Vt) - 1) + Is2 (exp(Vd/(2 Vt)) - 1) + Vd/Rsh,  Vd = V - I Rs.
//
// Units: Is1, Is2 in A (> 0), Rs in ohm (>= 0), Rsh in ohm (> 0, +Inf =
// none). Valid in low and moderate injection.
// Source: Sah, Noyce & Shockley, Proc. IRE 45, 1228 (1957) for the n = 2
// recombination current; Sze & Ng (2007), ch. 2.
type DoubleDiode struct {
	DiffusionCurrentA     float64 // Is1, A (ideality 1)
	RecombinationCurrentA float64 // Is2, A (ideality 2)
	SeriesResistanceOhm   float64 // Rs, ohm; 0 = none
	ShuntResistanceOhm    float64 // Rsh, ohm; +Inf = none
}

// Current returns the terminal current I(V) in A of the double-diode model
// at bias v (V) and thermal voltage vt (V). The model has no closed form; the
// junction voltage Vd solves f(Vd) = Vd + Rs j(Vd) - V = 0, with j the
// junction current, by Newton's method started above the root. f is
// increasing and convex, so the iterates decrease monotonically onto the
// root (standard Newton convergence for convex functions). Returns NaN for
// non-physical parameters.
func (d DoubleDiode) Current(v, vt float64) float64 {
	i, _ := d.solve(v, vt)
	return i
}

func (d DoubleDiode) junction(x, vt float64) (j, dj float64) {
	e1 := math.Exp(x / vt)
	e2 := math.Exp(x / (2 * vt))
	j = d.DiffusionCurrentA*math.Expm1(x/vt) + d.RecombinationCurrentA*math.Expm1(x/(2*vt)) + x/d.ShuntResistanceOhm
	dj = d.DiffusionCurrentA*e1/vt + d.RecombinationCurrentA*e2/(2*vt) + 1/d.ShuntResistanceOhm
	return j, dj
}

// solve returns the current and the junction voltage Vd.
func (d DoubleDiode) solve(v, vt float64) (float64, float64) {
	is1, is2, rs, rsh := d.DiffusionCurrentA, d.RecombinationCurrentA, d.SeriesResistanceOhm, d.ShuntResistanceOhm
	if !(is1 > 0) || !(is2 > 0) || !(rs >= 0) || !(rsh > 0) || !(vt > 0) || math.IsNaN(v) {
		return math.NaN(), math.NaN()
	}
	if rs == 0 {
		j, _ := d.junction(v, vt)
		return j, v
	}
	// Upper bound of the root: Vd <= V, and for V > 0 every diode term is
	// below V/Rs, so Vd <= n Vt ln(1 + V/(Rs Is)) for each diode.
	x := 0.0
	if v > 0 {
		x = math.Min(v, vt*math.Log1p(v/(rs*is1)))
		x = math.Min(x, 2*vt*math.Log1p(v/(rs*is2)))
	}
	for k := 0; k < 200; k++ {
		j, dj := d.junction(x, vt)
		f := x + rs*j - v
		dx := f / (1 + rs*dj)
		x -= dx
		if math.Abs(dx) <= 1e-15*(math.Abs(x)+vt) {
			break
		}
	}
	j, _ := d.junction(x, vt)
	return j, x
}

// grad returns I and dI/dln(p) for p = Is1, Is2, Rs, Rsh.
func (d DoubleDiode) grad(v, vt float64, g *[4]float64) float64 {
	i, vd := d.solve(v, vt)
	is1, is2, rs, rsh := d.DiffusionCurrentA, d.RecombinationCurrentA, d.SeriesResistanceOhm, d.ShuntResistanceOhm
	e1 := math.Exp(vd / vt)
	e2 := math.Exp(vd / (2 * vt))
	gd := is1*e1/vt + is2*e2/(2*vt) + 1/rsh
	den := 1 + rs*gd
	g[0] = is1 * (e1 - 1) / den
	g[1] = is2 * (e2 - 1) / den
	g[2] = rs * (-i * gd) / den
	g[3] = rsh * (-vd / (rsh * rsh)) / den
	return i
}
