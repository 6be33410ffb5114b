package model

// This file draws numeric solutions in the frame of the analytic curves.

import (
	"math"
)

// Curve IDs of the numeric curves (Curve.ID).
const (
	CurveNumericPotential = "numeric-potential"       // NumericPotentialCurve
	CurveNumericField     = "numeric-field"           // NumericFieldCurve
	CurveNumericBands     = "numeric-bands"           // NumericBandCurve
	CurveNumericCarriers  = "numeric-carriers"        // NumericCarrierCurve
	CurveNumericCurrent   = "numeric-current-density" // NumericCurrentCurve
	CurveNumericCharge    = "numeric-charge"          // NumericChargeCurve
	CurveNumericIV        = "numeric-iv"              // NumericIVCurve
	CurveNumericCV        = "numeric-cv"              // NumericCVCurve
)

// positionAxis is the x axis of the numeric profiles: as the analytic
// JunctionProfiles, um from the metallurgical junction, p side negative.
func positionAxis() Axis {
	return Axis{Label: "position from junction x - xj", Kind: Length, Unit: "um"}
}

// sampled returns the positions (um from the junction, p side negative,
// increasing) and the matching permutation of the solver's indices.
func sampled(xs []float64, xj, orient float64) (pos []float64, idx []int) {
	n := len(xs)
	pos, idx = make([]float64, n), make([]int, n)
	for k := 0; k < n; k++ {
		i := k
		if orient < 0 {
			i = n - 1 - k
		}
		idx[k] = i
		pos[k] = orient * (xs[i] - xj) * 1e6
	}
	return pos, idx
}

// pick returns v permuted by idx and scaled by f.
func pick(v []float64, idx []int, f float64) []float64 {
	out := make([]float64, len(idx))
	for k, i := range idx {
		out[k] = f * v[i]
	}
	return out
}

// NumericPotentialCurve returns the electrostatic potential (V) relative to
// the anode (p-side) contact against position (um from the junction, p
// side negative): the frame of the analytic potential curve, which starts
// at 0 in the neutral p region and rises by Vbi - V.
func NumericPotentialCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, ia := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	psi := pick(sol.Potential, idx, 1)
	for k := range psi {
		psi[k] -= sol.Potential[ia]
	}
	return Curve{ID: CurveNumericPotential, Title: "Electrostatic potential (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "potential psi", Kind: Voltage}, Xs: pos, Series: []Series{{"psi (numeric)", psi}}, Flags: r.Flags}
}

// NumericFieldCurve returns the electric field (V/m) on the cell midpoints
// against position, positive toward the n side (negative in the
// depletion region, as the analytic field curve).
func NumericFieldCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.XMid, xj, orient)
	return Curve{ID: CurveNumericField, Title: "Electric field (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "field E", Kind: Field}, Xs: pos, Series: []Series{{"E (numeric)", pick(sol.Field, idx, orient)}}, Flags: r.Flags}
}

// NumericBandCurve returns the band diagram, eV, relative to the anode's
// (p-side) hole quasi-Fermi level, against position: Ec, Ev and the
// quasi-Fermi levels Efn and Efp (Ec and Ev include the band-gap
// narrowing split between the bands when it is on).
func NumericBandCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, ia := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	shift := -sol.Efp[ia]
	series := []Series{{"Ec", pick(sol.Ec, idx, 1)}, {"Ev", pick(sol.Ev, idx, 1)}, {"Efn", pick(sol.Efn, idx, 1)}, {"Efp", pick(sol.Efp, idx, 1)}}
	for _, s := range series {
		for k := range s.Y {
			s.Y[k] += shift
		}
	}
	return Curve{ID: CurveNumericBands, Title: "Band diagram (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "energy", Kind: Energy}, Xs: pos, Series: series, Flags: r.Flags}
}

// NumericCarrierCurve returns the electron and hole densities and the
// magnitude of the ionised net doping |Nd+ - Na-| (m^-3, log axis)
// against position.
func NumericCarrierCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	net := pick(sol.NetDoping, idx, 1)
	for k := range net {
		net[k] = math.Abs(net[k])
	}
	return Curve{ID: CurveNumericCarriers, Title: "Carrier densities and net doping (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "density", Kind: Density, Log: true}, Xs: pos,
		Series: []Series{{"n", pick(sol.N, idx, 1)}, {"p", pick(sol.P, idx, 1)}, {"|net doping|", net}}, Flags: r.Flags}
}

// NumericCurrentCurve returns the electron, hole and total current
// densities (A/m^2) on the cell midpoints against position, positive from
// the p side to the n side (forward current positive).
func NumericCurrentCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.XMid, xj, orient)
	jn, jp := pick(sol.Jn, idx, orient), pick(sol.Jp, idx, orient)
	tot := make([]float64, len(jn))
	for k := range tot {
		tot[k] = jn[k] + jp[k]
	}
	return Curve{ID: CurveNumericCurrent, Title: "Current densities (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "current density", Kind: CurrentDensity}, Xs: pos,
		Series: []Series{{"Jn", jn}, {"Jp", jp}, {"total", tot}}, Flags: r.Flags}
}

// NumericChargeCurve returns the space-charge density q (p - n + Nd+ -
// Na-) in C/m^3 against position.
func NumericChargeCurve(r *NumericResult) Curve {
	sol := r.Solution
	xj, orient, _ := frame(sol)
	pos, idx := sampled(sol.X, xj, orient)
	return Curve{ID: CurveNumericCharge, Title: "Space-charge density (drift-diffusion)", X: positionAxis(),
		Y: Axis{Label: "charge density rho", Kind: Dimensionless, Unit: "C/m^3"}, Xs: pos, Series: []Series{{"rho (numeric)", pick(sol.Charge, idx, 1)}}, Flags: r.Flags}
}

// NumericCurves returns every profile curve of a numeric result, in the
// order potential, field, bands, carriers, current densities, charge.
func NumericCurves(r *NumericResult) []Curve {
	return []Curve{NumericPotentialCurve(r), NumericFieldCurve(r), NumericBandCurve(r), NumericCarrierCurve(r), NumericCurrentCurve(r), NumericChargeCurve(r)}
}
