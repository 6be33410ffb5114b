package physics

import "math"

// depletionPotential returns the electrostatic potential psi(x) (V,
// relative to the p-side depletion edge, so psi(xn) = Vbi - V) and the
// field magnitude |E(x)| (V/m) of the depletion solution d at x (m, p side
// negative), for -xp <= x <= xn.
//
// Formulas (Poisson's equation in the depletion approximation, with
// Q(u) the depleted charge / q from the junction to depth u and
// F(u) = int_0^u Q):
//
//	p side, u = -x:  psi = (q/eps) [Q(xp)(xp - u) - F(xp) + F(u)],  |E| = (q/eps)(Q(xp) - Q(u))
//	n side, u = x:   psi = (Vbi - V) - (q/eps) [Q(xn)(xn - u) - F(xn) + F(u)]
//
// For the step junction these are the parabolas of Sze & Ng 2007, eq. 2.12.
func (d Depletion) depletionPotential(x float64) (psi, e float64) {
	j := d.j
	k := Q / j.Eps
	f := func(u, n float64) float64 { return u*j.sideCharge(u, n) - j.moment(u, n) }
	if x <= 0 {
		u := math.Min(-x, d.Xp)
		qx := j.sideCharge(d.Xp, j.Na)
		return k * (qx*(d.Xp-u) - f(d.Xp, j.Na) + f(u, j.Na)), k * (qx - j.sideCharge(u, j.Na))
	}
	u := math.Min(x, d.Xn)
	qx := j.sideCharge(d.Xn, j.Nd)
	return d.Drop() - k*(qx*(d.Xn-u)-f(d.Xn, j.Nd)+f(u, j.Nd)), k * (qx - j.sideCharge(u, j.Nd))
}

// positionOfPotential inverts depletionPotential: the x at which psi = ps,
// clamped to [-xp, xn]; closed form for the step junction, bisection for
// the graded one.
func (d Depletion) positionOfPotential(ps float64) float64 {
	tot := d.Drop()
	if ps <= 0 {
		return -d.Xp
	}
	if ps >= tot {
		return d.Xn
	}
	j := d.j
	if j.Profile == Abrupt {
		k := Q / j.Eps
		p0 := k * j.Na * d.Xp * d.Xp / 2 // potential at x = 0
		if ps <= p0 {
			return -d.Xp + math.Sqrt(2*ps/(k*j.Na))
		}
		return d.Xn - math.Sqrt(2*(tot-ps)/(k*j.Nd))
	}
	lo, hi := -d.Xp, d.Xn
	for i := 0; i < 80 && hi-lo > 1e-14*d.W; i++ {
		m := 0.5 * (lo + hi)
		if p, _ := d.depletionPotential(m); p < ps {
			lo = m
		} else {
			hi = m
		}
	}
	return 0.5 * (lo + hi)
}

// SCRParams are the inputs of the space-charge-region recombination
// integral.
type SCRParams struct {
	Ni         float64 // intrinsic density, m^-3
	P0, N0     float64 // majority densities at the p and n edges at equilibrium, m^-3 (P0 N0 = ni^2 exp(Vbi/Vt))
	TauN, TauP float64 // SRH electron and hole lifetimes in the depletion region, s
	// Local, when set, gives the SRH lifetimes (tau_n, tau_p) at position
	// x (m, p side negative) and replaces TauN, TauP: the lifetimes follow
	// the local doping, tau(N(x)), so that the depletion region, which lies
	// mostly in the lightly doped side, recombines with that side's
	// lifetimes. It must be piecewise smooth with its only jump at x = 0.
	Local func(x float64) (tn, tp float64)
	// TrapLevel is Et - Ei, eV (0 = midgap trap, the most effective).
	TrapLevel float64
	Vt        float64 // thermal voltage, V
}

// SCRCurrentDensity returns the net recombination current density of the
// depletion region J = q int_{-xp}^{xn} U dx (A/m^2; positive =
// recombination in forward bias, negative = generation in reverse bias)
// at junction voltage v (V), with the geometry of the depletion solution
// dep, and an estimate of dJ/dV (A/(m^2 V)) for Newton iterations (the
// carrier densities' part at fixed geometry plus the moving edges' part;
// within about 10%).
//
// Formulas (W. Shockley, W. T. Read, Phys. Rev. 87, 835 (1952); R. N. Hall,
// Phys. Rev. 87, 387 (1952); the depletion-region integral of C. T. Sah,
// R. N. Noyce, W. Shockley, Proc. IRE 45, 1228 (1957)):
//
//	U = (n p - ni^2) / (tau_p (n + n1) + tau_n (p + p1)),  n1 = ni e^(Et-Ei)/kT, p1 = ni e^-(Et-Ei)/kT
//	p(x) = P0 exp(-psi(x)/Vt),  n(x) = N0 exp((psi(x) - (Vbi - V))/Vt)
//
// so that n p = ni^2 exp(V/Vt) throughout (flat quasi-Fermi levels) and
// psi(x) is the depletion-approximation potential. The integral is a
// 10-point (forward) or 8-point (reverse) Gauss-Legendre rule on up to
// four pieces, split at x = 0 and at
// the maximum of U (where tau_p n = tau_n p), each mapped by
// x = x* + l sinh(t) with l = Vt/|E(x*)|, which resolves the narrow peak
// of forward bias and the flat generation profile of reverse bias alike.
// Limits: deep reverse bias gives J = -q ni W/(tau_n + tau_p), i.e.
// q ni W/(2 tau0) with tau0 = (tau_n + tau_p)/2 (Neamen 4th ed., eq. 8.74);
// forward bias gives ideality near 2 (exp(V/2Vt) with
// tau_eff = sqrt(tau_n tau_p) at the peak). With position-dependent
// lifetimes (SCRParams.Local) tau_n, tau_p are taken at each x inside the
// integral, and the deep-reverse limit becomes
// J = -q ni int dx/(tau_n(x) + tau_p(x)). Valid where the depletion
// approximation holds (V below Vbi - 2 Vt; callers clamp the geometry) and
// where the SRH rate of one trap level describes the recombination.
func SCRCurrentDensity(dep Depletion, v float64, sp SCRParams) (j, dj float64) {
	if !dep.Valid || !(dep.W > 0) {
		return 0, 0
	}
	vt := sp.Vt
	ni := sp.Ni
	n1 := ni * math.Exp(sp.TrapLevel/vt)
	p1 := ni * ni / n1
	psiTot := dep.Drop()
	lc := (v - dep.V) / (2 * vt) // the bias beyond the geometry's, split evenly
	lnP0, lnN0 := math.Log(sp.P0), math.Log(sp.N0)
	num := ni * ni * math.Expm1(v/vt)
	dnum := ni * ni * math.Exp(v/vt) / vt
	tn, tp := sp.TauN, sp.TauP
	// Lifetimes of the p and n sides (equal without Local): they place the
	// quadrature pieces; the integrand itself takes them at each x.
	tnP, tpP, tnN, tpN := tn, tp, tn, tp
	if sp.Local != nil {
		tnP, tpP = sp.Local(-0.5 * dep.Xp)
		tnN, tpN = sp.Local(0.5 * dep.Xn)
	}
	reverse := v < 0
	jn := dep.j
	abrupt := jn.Profile == Abrupt
	kp, kn := Q/jn.Eps*jn.Na/2, Q/jn.Eps*jn.Nd/2
	np := ni * ni * math.Exp(v/vt)
	useDiv := np > 1e-250 && np < 1e250
	ivt := 1 / vt
	f := func(x float64) (float64, float64) {
		var psi float64
		switch {
		case !abrupt:
			psi, _ = dep.depletionPotential(x)
		case x <= 0:
			psi = kp * (x + dep.Xp) * (x + dep.Xp)
		default:
			psi = psiTot - kn*(dep.Xn-x)*(dep.Xn-x)
		}
		lp := lnP0 - psi*ivt + lc
		p := math.Exp(lp)
		var n float64
		if useDiv && lp > -500 && lp < 500 {
			n = np / p
		} else {
			n = math.Exp(lnN0 + (psi-psiTot)*ivt + lc)
		}
		tn, tp := tn, tp
		if sp.Local != nil {
			tn, tp = sp.Local(x)
		}
		iden := 1 / (tp*(n+n1) + tn*(p+p1))
		u := num * iden
		if reverse {
			return u, dnum * iden
		}
		return u, (dnum - u*(tp*n+tn*p)*0.5*ivt) * iden
	}
	// Peak of U: tau_p n = tau_n p (with the n side's lifetimes when the
	// p side's put it beyond the junction).
	ps := 0.5 * (psiTot + vt*math.Log(sp.P0*tnP/(sp.N0*tpP)))
	if sp.Local != nil && dep.positionOfPotential(ps) > 0 {
		ps = 0.5 * (psiTot + vt*math.Log(sp.P0*tnN/(sp.N0*tpN)))
		if dep.positionOfPotential(ps) < 0 {
			ps, _ = dep.depletionPotential(0)
		}
	}
	var sum, dsum float64
	rule8, rule10 := gl8(), gl10()
	// piece integrates from focus c towards end b with the sinh map of
	// scale l = Vt/|E(c)|.
	piece := func(c, b float64) {
		d := b - c
		if d == 0 {
			return
		}
		sgn := 1.0
		if d < 0 {
			sgn, d = -1, -d
		}
		_, ec := dep.depletionPotential(c)
		l := dep.W
		if ec > 0 {
			l = math.Min(vt/ec, dep.W)
		}
		tmax := math.Asinh(d / l)
		h := 0.5 * tmax
		// Nodes t = h (1 -+ x_k): exp(t) for the pair from one exponential.
		e2h := math.Exp(tmax)
		rule := rule10[:]
		if reverse {
			rule = rule8[:] // the plateau pieces are smoother
		}
		for _, nw := range rule {
			a := math.Exp(h * (1 + nw[0])) // t = h (1 + x)
			b := e2h / a                   // t = h (1 - x)
			for _, et := range [2]float64{a, b} {
				ie := 1 / et
				jac := l * 0.5 * (et + ie)
				u, du := f(c + sgn*l*0.5*(et-ie))
				sum += nw[1] * h * u * jac
				dsum += nw[1] * h * du * jac
			}
		}
	}
	// Reverse bias: a plateau -ni/(tau_n + tau_p) between the points where
	// tau_n p and tau_p n reach the plateau's denominator (the edges of the
	// generating region); the pieces are mapped from those two points.
	psA := vt * (math.Log(sp.P0*tnP/(tpP*n1+tnP*p1)) + lc)
	psB := psiTot - vt*(math.Log(sp.N0*tpN/(tpN*n1+tnN*p1))+lc)
	// split integrates from c towards b, cutting at the junction where
	// local lifetimes jump.
	split := func(c, b float64) {
		if sp.Local != nil && c*b < 0 {
			piece(c, 0)
			piece(0, b)
			return
		}
		piece(c, b)
	}
	if v < 0 && psA < psB {
		xa, xb := dep.positionOfPotential(psA), dep.positionOfPotential(psB)
		split(xa, -dep.Xp)
		split(xb, dep.Xn)
		switch {
		case xa < 0 && xb > 0:
			piece(xa, 0)
			piece(xb, 0)
		case xb <= 0: // the whole plateau on the p side
			m := 0.5 * (xa + xb)
			piece(xa, m)
			piece(xb, m)
			// [xb, xn] contains 0: covered by split(xb, xn); the kink of
			// the potential at 0 is mild in the decaying tail.
		default: // xa >= 0: the whole plateau on the n side
			m := 0.5 * (xa + xb)
			piece(xa, m)
			piece(xb, m)
		}
		// The moving edges generate with the lifetimes of the side they
		// move into, weighted by the side's share of the width.
		edge := (dep.Xp/(tnP+tpP) + dep.Xn/(tnN+tpN))
		return Q * sum, Q * (dsum + geometricSlope(dep)*ni*edge)
	}
	xs := dep.positionOfPotential(ps)
	switch {
	case xs < 0:
		piece(xs, -dep.Xp)
		piece(xs, 0)
		piece(0, dep.Xn)
	default:
		piece(xs, dep.Xn)
		piece(xs, 0)
		piece(0, -dep.Xp)
	}
	if !reverse && psiTot > 8*vt {
		dsum += geometricSlope(dep) * sum
	}
	return Q * sum, Q * dsum
}

// geometricSlope returns d ln W/d(-V) ~ m/(Vbi - V) of the depletion width,
// m = 1/2 for the step and 1/3 for the graded junction: the part of
// dJ/dV of the depletion-region current that comes from the moving edges
// (the generating width in reverse bias, the peak width in forward bias).
func geometricSlope(dep Depletion) float64 {
	m := 0.5
	if dep.j.Profile == LinearGraded {
		m = 1.0 / 3
	}
	return m / dep.Drop()
}
