package physics

import (
	"math"
)

// sideCharge returns the depleted charge per area / q (m^-2) from the
// metallurgical junction to depth u (m) into a side whose plateau density
// is nPlat (m^-3): nPlat u for the step junction; a u^2/2 inside the graded
// region and nPlat (u - xb/2) beyond it, xb = nPlat/a.
func (j Junction) sideCharge(u, nPlat float64) float64 {
	if j.Profile == Abrupt {
		return nPlat * u
	}
	xb := nPlat / j.Gradient
	if u <= xb {
		return j.Gradient * u * u / 2
	}
	return nPlat * (u - xb/2)
}

// sideEdge inverts sideCharge: the depth whose depleted charge / q is qs.
func (j Junction) sideEdge(qs, nPlat float64) float64 {
	if j.Profile == Abrupt {
		return qs / nPlat
	}
	xb := nPlat / j.Gradient
	if qs <= j.Gradient*xb*xb/2 {
		return math.Sqrt(2 * qs / j.Gradient)
	}
	return qs/nPlat + xb/2
}

// sideField returns, for a peak (junction) field e0 (V/m) and a layer of
// thickness thick (m) from the junction to its contact, the depleted depth
// uEnd (the natural edge where the field vanishes, or the contact when the
// layer is punched through) and the potential drop psi over the side (V).
//
// Formulas: E(u) = e0 - (q/eps) Q(u) with Q = sideCharge;
// psi = e0 uEnd - (q/eps) (uEnd Q(uEnd) - int_0^uEnd s N(s) ds) (Poisson's
// equation in the depletion approximation; beyond punch-through the field
// at the contact is non-zero and the contact's heavily doped side is taken
// to absorb it in a sheet charge).
func (j Junction) sideField(e0, nPlat, thick float64) (uEnd, psi float64) {
	uEnd = j.sideEdge(j.Eps*e0/Q, nPlat)
	if uEnd > thick {
		uEnd = thick
	}
	psi = e0*uEnd - Q/j.Eps*(uEnd*j.sideCharge(uEnd, nPlat)-j.moment(uEnd, nPlat))
	return uEnd, psi
}

// avalanche is the breakdown problem of one junction at one temperature.
type avalanche struct {
	j              Junction
	c              impactCoefficients
	thickP, thickN float64 // layer thicknesses from the junction to the contacts, m
	vbi            float64 // built-in potential, V
}

// reverse returns the reverse bias (V, positive in reverse) at which the
// peak field is e0, the depletion width and the side depths.
func (a *avalanche) reverse(e0 float64) (vr, w, up, un float64) {
	up, pp := a.j.sideField(e0, a.j.Na, a.thickP)
	un, pn := a.j.sideField(e0, a.j.Nd, a.thickN)
	return pp + pn - a.vbi, up + un, up, un
}

// peakField returns the peak field (V/m) at reverse bias vr (V) by Newton
// iteration on reverse(e0) = vr, whose derivative is the depletion width.
func (a *avalanche) peakField(vr, guess float64) float64 {
	e := guess
	if !(e > 0) {
		e = 1e6
	}
	lo, hi := 0.0, math.Inf(1)
	for i := 0; i < 100; i++ {
		v, w, _, _ := a.reverse(e)
		f := v - vr
		if f > 0 {
			hi = e
		} else {
			lo = e
		}
		ne := e - f/w
		if !(ne > lo && ne < hi) {
			if math.IsInf(hi, 1) {
				ne = 2 * e
			} else {
				ne = 0.5 * (lo + hi)
			}
		}
		if math.Abs(ne-e) <= 1e-13*e {
			return ne
		}
		e = ne
	}
	return e
}

// ionisationGrid is the number of intervals per side of the ionisation
// integrals (even): nodes at u_k = uEnd (k/N)^2, trapezoid rule with
// Richardson extrapolation from the N/2 subgrid. Convergence was checked
// against the plain trapezoid rule with N = 400 (breakdown voltages agree
// to better than 0.05%).
const ionisationGrid = 16

// ionisation holds the ionisation integrals at one peak field.
type ionisation struct {
	// An = int_0^W alpha_n exp(-phi) dx with phi(x) = int_0^x (alpha_n -
	// alpha_p) dx' measured from the p-side edge; 1 - An = 1/Mn.
	An float64
	// ExpPhiW = exp(-phi(W)): Mp = ExpPhiW / (1 - An).
	ExpPhiW float64
	// MeanExp = (1/W) int exp(-phi) dx: the multiplication of pairs
	// generated uniformly in the depletion region is MeanExp / (1 - An).
	MeanExp float64
}

// integrals evaluates the ionisation integrals of Sze & Ng 2007, section
// 2.4.1 (eqs. 2.96-2.98 in the two-carrier form; from memory) over the
// field profile of peak field e0:
//
//	1 - 1/Mn = int_0^W alpha_n exp(-int_0^x (alpha_n - alpha_p) dx') dx
//
// with x from the p-side edge (electrons drift towards the n side). The
// general solution of the current continuity with impact ionisation gives
// Mn = 1/(1 - An), Mp = exp(-phi(W))/(1 - An) and, for a pair generated at
// x, exp(-phi(x))/(1 - An); breakdown is An = 1 (all three diverge).
func (a *avalanche) integrals(e0 float64) ionisation { return a.integralsN(e0, ionisationGrid) }

// gridPoint is node i of the ionisation grid of n intervals per side: its
// position x (m, from the metallurgical junction, p side negative) and the
// field there (V/m), e0 at the junction less the depleted charge between
// (Gauss's law, e = e0 - q/eps * charge per area from 0 to |x|). The nodes
// crowd quadratically towards the junction (x = -up (1 - i/n)^2 on the p
// side, un ((i-n)/n)^2 on the n side), where the field and the ionisation
// rates peak; up and un are the depleted widths of each side.
func (a *avalanche) gridPoint(i, n int, e0, up, un float64) (x, e float64) {
	k := Q / a.j.Eps
	if i <= n {
		r := float64(n-i) / float64(n)
		u := up * r * r
		return -u, e0 - k*a.j.sideCharge(u, a.j.Na)
	}
	r := float64(i-n) / float64(n)
	u := un * r * r
	return u, e0 - k*a.j.sideCharge(u, a.j.Nd)
}

// integralsN is integrals on a grid of n intervals per side (even, at most
// ionisationGrid).
func (a *avalanche) integralsN(e0 float64, n int) ionisation {
	var xs, an, ap [2*ionisationGrid + 1]float64
	up, _ := a.j.sideField(e0, a.j.Na, a.thickP)
	un, _ := a.j.sideField(e0, a.j.Nd, a.thickN)
	for i := 0; i <= 2*n; i++ {
		var e float64
		xs[i], e = a.gridPoint(i, n, e0, up, un)
		an[i], ap[i] = a.c.alpha(e)
	}
	// Trapezoid sums on the grid and on its every-other-node subgrid,
	// combined by Richardson extrapolation (error O(N^-4)).
	phi, sumA, sumE := 0.0, 0.0, 0.0
	prevA, prevE := an[0], 1.0
	phiC, sumAC, sumEC := 0.0, 0.0, 0.0
	prevAC, prevEC := an[0], 1.0
	for i := 1; i <= 2*n; i++ {
		h := xs[i] - xs[i-1]
		phi += 0.5 * h * ((an[i] - ap[i]) + (an[i-1] - ap[i-1]))
		ex := math.Exp(-phi)
		ca := an[i] * ex
		sumA += 0.5 * h * (ca + prevA)
		sumE += 0.5 * h * (ex + prevE)
		prevA, prevE = ca, ex
		if i%2 == 0 {
			hc := xs[i] - xs[i-2]
			phiC += 0.5 * hc * ((an[i] - ap[i]) + (an[i-2] - ap[i-2]))
			exC := math.Exp(-phiC)
			caC := an[i] * exC
			sumAC += 0.5 * hc * (caC + prevAC)
			sumEC += 0.5 * hc * (exC + prevEC)
			prevAC, prevEC = caC, exC
		}
	}
	w := up + un
	// The extrapolation is only trusted while the two sums agree to 10%
	// (far above breakdown the integrands grow steeply and the sums can
	// differ by orders of magnitude; the plain sum is then kept).
	rich := func(f, c float64) float64 {
		if math.Abs(f-c) > 0.1*math.Abs(f) {
			return f
		}
		return (4*f - c) / 3
	}
	return ionisation{An: rich(sumA, sumAC), ExpPhiW: math.Exp(-rich(phi, phiC)), MeanExp: rich(sumE, sumEC) / w}
}

// Breakdown is the result of the avalanche breakdown search.
type Breakdown struct {
	// Voltage is the reverse breakdown voltage, V, as a positive number
	// (the junction breaks down at a bias of -Voltage); NaN if not found.
	Voltage float64
	// PeakField is the field at the junction at breakdown, V/m.
	PeakField float64
	// Width, Xp, Xn are the depletion width and its p and n parts at
	// breakdown, m (clipped at the layer thicknesses when punched through).
	Width, Xp, Xn float64
	// ThicknessP, ThicknessN are the layer thicknesses assumed from the
	// junction to the contacts, m; AssumedP, AssumedN mark a default.
	ThicknessP, ThicknessN float64
	AssumedP, AssumedN     bool
	// PunchThrough is true when a depletion edge reaches its contact before
	// breakdown; PunchThroughVoltage is the reverse bias (V, positive) at
	// which it first does (NaN otherwise).
	PunchThrough        bool
	PunchThroughVoltage float64
	// TunnellingLimit is 4 Eg/q (V): below it Zener tunnelling dominates;
	// between it and 6 Eg/q both mechanisms act (Sze & Ng 2007, section
	// 2.4.1; from memory).
	TunnellingLimit float64
	Tunnelling      bool // Voltage < 4 Eg/q
	Mixed           bool // 4 Eg/q <= Voltage < 6 Eg/q
	// SzeGibbons is the universal estimate of Sze & Gibbons 1966 for the
	// one-sided junction (abrupt: 60 (Eg/1.1)^1.5 (NB/1e16)^-0.75 V,
	// NB = NaNd/(Na+Nd); graded: 60 (Eg/1.1)^1.2 (a/3e20 cm^-4)^-0.4 V),
	// for comparison; NaN for materials the law was not fitted to
	// (SzeGibbonsFitted).
	SzeGibbons float64
	// AvalancheVoltage is the avalanche breakdown voltage (V, positive)
	// from the ionisation integral (equal to Voltage).
	AvalancheVoltage float64
	// TunnellingVoltage is the reverse bias (V, positive) at which the peak
	// field reaches TunnellingField: the onset of Zener breakdown; NaN
	// when the junction punches through first.
	TunnellingVoltage float64
	// Effective is the lower of the avalanche and tunnelling voltages: the
	// breakdown a user will meet first.
	Effective  float64
	Converged  bool
	Iterations int
	Model      string
}

// TunnellingField returns the peak field (V/m) at which band-to-band
// (Zener) tunnelling sets in for a band gap eg (eV).
//
// Formula: E_t = 1e8 V/m (eg / 1.12 eV)^(3/2). The 1e6 V/cm for silicon is
// the field at which tunnelling breakdown is usually placed (Sze & Ng 2007,
// section 2.4.1; from memory); the Eg^(3/2) scaling to other materials
// follows the exponent of the Kane tunnelling rate, exp(-pi m*^(1/2)
// Eg^(3/2) / (2 sqrt(2) q hbar E)), at equal effective mass (E. O. Kane,
// J. Phys. Chem. Solids 12, 181 (1960); the scaling is an approximation of
// our own). Valid as an order-of-magnitude onset, not a current.
func TunnellingField(eg float64) float64 { return 1e8 * math.Pow(eg/1.12, 1.5) }

// defaultLayerThickness is the thickness assumed for a long region in
// breakdown and series resistance when the user gives none: 300 um, a
// typical diced-wafer thickness (common practice; an assumption, flagged).
const defaultLayerThickness = 300e-6

// SzeGibbonsBreakdown returns the universal breakdown estimates of S. M.
// Sze, G. Gibbons, Appl. Phys. Lett. 8, 111 (1966), V: for one-sided abrupt
// junctions VB = 60 (Eg/1.1)^(3/2) (NB/1e16 cm^-3)^(-3/4), and for linearly
// graded ones VB = 60 (Eg/1.1)^(6/5) (a/3e20 cm^-4)^(-2/5); Eg in eV, NB in
// m^-3, a in m^-4. Valid for avalanche breakdown (above about 6 Eg/q);
// Sze & Gibbons' curves carry a scatter of some tens of percent.
func SzeGibbonsBreakdown(profile ProfileKind, eg, nb, a float64) float64 {
	if profile == LinearGraded {
		return 60 * math.Pow(eg/1.1, 1.2) * math.Pow(a/(3e20*1e8), -0.4)
	}
	return 60 * math.Pow(eg/1.1, 1.5) * math.Pow(nb/(1e16*perCm3), -0.75)
}

// SzeGibbonsFitted reports whether the universal law of Sze & Gibbons
// (1966) was fitted to the material with key k: their curves cover Ge, Si,
// GaAs and GaP only (S. M. Sze, G. Gibbons, Appl. Phys. Lett. 8, 111
// (1966); Sze & Ng 2007, section 2.4.1). Outside these hosts (4H-SiC, for
// one) the law is an extrapolation with no data behind it and junco reports
// no value.
func SzeGibbonsFitted(k string) bool {
	switch k {
	case "si", "ge", "gaas", "gap":
		return true
	}
	return false
}

// searchBreakdown finds the peak field at which An = 1 by false position
// (Illinois variant) on ln An against ln e0, bracketed first by steps of
// x1.3; ln An is monotone in e0. Returns the field, the iteration count and
// whether it converged.
func (a *avalanche) searchBreakdown(guess float64) (float64, int, bool) {
	h := func(t float64) float64 {
		v := a.integrals(math.Exp(t)).An
		if v <= 0 {
			return -745
		}
		r := math.Log(v)
		if math.IsNaN(r) {
			return 745
		}
		return math.Min(r, 745)
	}
	it := 0
	t0 := math.Log(guess)
	f0 := h(t0)
	it++
	step := math.Log(1.3)
	if f0 > 0 {
		step = -step
	}
	t1, f1 := t0, f0
	for {
		t1 += step
		f1 = h(t1)
		it++
		if (f1 > 0) != (f0 > 0) {
			break
		}
		t0, f0 = t1, f1
		if it > 80 {
			return math.NaN(), it, false
		}
	}
	// Now f0 and f1 straddle zero.
	side := 0
	for it < 200 {
		t := (t0*f1 - t1*f0) / (f1 - f0)
		if !(t > math.Min(t0, t1) && t < math.Max(t0, t1)) {
			t = 0.5 * (t0 + t1)
		}
		f := h(t)
		it++
		if math.Abs(f) < 1e-10 || math.Abs(t1-t0) < 1e-12 {
			return math.Exp(t), it, true
		}
		if (f > 0) == (f1 > 0) {
			t1, f1 = t, f
			if side == -1 {
				f0 /= 2
			}
			side = -1
		} else {
			t0, f0 = t, f
			if side == 1 {
				f1 /= 2
			}
			side = 1
		}
	}
	return math.Exp(0.5 * (t0 + t1)), it, false
}
