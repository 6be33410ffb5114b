package solver

import (
	"context"
	"errors"
	"math"
)

// state is one solution in scaled variables (units of kT/q):
//
//	psi   electrostatic potential; n = n_ie exp(psi - phin), p = n_ie exp(phip + v - psi)
//	phin  electron quasi-Fermi potential relative to the cathode (held at 0)
//	phip  hole quasi-Fermi potential relative to the anode (held at v)
//
// Referring each quasi-Fermi potential to the contact where its carrier is
// the majority keeps it near zero where that carrier carries the current,
// so the small differences that set a majority current are resolved to
// full precision.
type state struct {
	v               float64
	psi, phin, phip []float64
	// lit is the light level, 0 (dark) to 1 (Device.Light in full): the
	// generation of the continuity equations is lit times the device's.
	lit float64
	// fix, when not nil, is a frozen ionised net doping per node (m^-3)
	// that replaces the carrier-dependent occupation (high-frequency C-V).
	fix []float64
}

func (s *Solver) newState(v float64) *state {
	n := len(s.x)
	return &state{v: v, psi: make([]float64, n), phin: make([]float64, n), phip: make([]float64, n)}
}

func (st *state) clone() *state {
	c := &state{v: st.v, lit: st.lit, psi: append([]float64(nil), st.psi...),
		phin: append([]float64(nil), st.phin...), phip: append([]float64(nil), st.phip...)}
	if st.fix != nil {
		c.fix = append([]float64(nil), st.fix...)
	}
	return c
}

// copyFrom copies src into st without allocating (same mesh).
func (st *state) copyFrom(src *state) {
	st.v, st.lit = src.v, src.lit
	copy(st.psi, src.psi)
	copy(st.phin, src.phin)
	copy(st.phip, src.phip)
	if src.fix == nil {
		st.fix = nil
	} else {
		st.fix = append(st.fix[:0], src.fix...)
	}
}

// applyContacts imposes the ohmic boundary values: charge neutrality and
// equilibrium at both contacts, bias v at the anode.
func (s *Solver) applyContacts(st *state) {
	a, c := s.ia, s.ic
	st.psi[a] = s.psiA + st.v
	st.phin[a] = st.v
	st.phip[a] = 0
	st.psi[c] = s.psiC
	st.phin[c] = 0
	st.phip[c] = -st.v
}

// work holds the buffers of one solve sequence.
type work struct {
	// ctx, when set, is checked at every Newton iteration and Gummel
	// sweep, so that a cancelled continuation step stops within one
	// iteration (milliseconds even on the finest mesh).
	ctx            context.Context
	n, p           []float64
	band           *bandLU
	f              []float64
	ta, tb, tc, td []float64
	tw             []float64
	dlt            []float64
	best           *state // the polishing's best iterate (allocated on first use)
	save           *state // the Gummel sweeps' last good iterate (allocated on first use)
	polishSweeps   int    // polishing sweeps run (for benchmarks)
}

func (s *Solver) newWork() *work {
	n := len(s.x)
	mk := func() []float64 { return make([]float64, n) }
	return &work{n: mk(), p: mk(), band: newBandLU(3*n, 5, 5), f: make([]float64, 3*n),
		ta: mk(), tb: mk(), tc: mk(), td: mk(), tw: mk(), dlt: make([]float64, 3*n)}
}

// carriers fills n and p from the state.
func (s *Solver) carriers(st *state, n, p []float64) {
	for i := range n {
		n[i] = math.Exp(s.lnNie[i] + st.psi[i] - st.phin[i])
		p[i] = math.Exp(s.lnNie[i] + st.phip[i] + st.v - st.psi[i])
	}
}

// recombination returns the net recombination rate at node i (m^-3 s^-1)
// and its derivatives with respect to psi, phin and phip (per kT/q).
//
// Formulas (np - n_ie^2 written as n_ie^2 expm1(phip_abs - phin_abs) so
// that it is exact near equilibrium):
//
//	SRH:       (np - n_ie^2) / (tau_p (n + n1) + tau_n (p + p1))
//	Auger:     (C_n n + C_p p)(np - n_ie^2)
//	radiative: B (np - n_ie^2)
//
// Sources: W. Shockley, W. T. Read, Phys. Rev. 87, 835 (1952); R. N. Hall,
// Phys. Rev. 87, 387 (1952); Auger and radiative coefficients of the
// material (physics.Lifetime).
func (s *Solver) recombination(i int, st *state, n, p float64) (r, dpsi, dphin, dphip float64) {
	e := math.Expm1(st.phip[i] + st.v - st.phin[i])
	a := s.nie2[i] * e
	np := n * p
	// dA: d/dpsi 0, d/dphin -np, d/dphip +np
	if s.srh {
		den := s.tauP[i]*(n+s.n1[i]) + s.tauN[i]*(p+s.p1[i])
		r = a / den
		inv2 := 1 / (den * den)
		dpsi += -a * (s.tauP[i]*n - s.tauN[i]*p) * inv2
		dphin += (-np*den + a*s.tauP[i]*n) * inv2
		dphip += (np*den - a*s.tauN[i]*p) * inv2
	}
	if s.augN != 0 || s.augP != 0 {
		k := s.augN*n + s.augP*p
		r += k * a
		dpsi += (s.augN*n - s.augP*p) * a
		dphin += -s.augN*n*a - k*np
		dphip += s.augP*p*a + k*np
	}
	if s.brad != 0 {
		r += s.brad * a
		dphin -= s.brad * np
		dphip += s.brad * np
	}
	return r, dpsi, dphin, dphip
}

// sgSwitch is the quasi-Fermi difference (kT/q) below which the
// Scharfetter-Gummel flux and its potential derivatives are evaluated in
// quasi-Fermi form (no cancellation between drift and diffusion); above
// it the density form has no cancellation and cannot overflow.
const sgSwitch = 0.5

// sgElectron returns the electron particle flux Jn/q (m^-2 s^-1, along +x)
// on an edge and its derivatives with respect to psi_i, psi_j, phin_i and
// phin_j, for a = Dn/h, dl = (psi + theta)_j - (psi + theta)_i, densities
// ni, nj and dphi = phin_j - phin_i.
//
// Density form: Jn/q = a [B(dl) n_j - B(-dl) n_i]; quasi-Fermi form (the
// same value, using n_i = n_j e^(-dl) e^(dphi)): Jn/q = -a B(dl) n_j
// expm1(dphi). Source: Scharfetter & Gummel 1969.
func sgElectron(a, dl, ni, nj, dphi float64) (f, dPsiI, dPsiJ, dPhiI, dPhiJ float64) {
	b1, b2 := Bernoulli(dl), Bernoulli(-dl)
	db1 := bernoulliDeriv(dl, b1)
	if math.Abs(dphi) < sgSwitch {
		e := math.Expm1(dphi)
		f = -a * b1 * nj * e
		dPsiJ = -a * e * nj * (db1 + b1)
		dPsiI = a * e * nj * db1
	} else {
		db2 := bernoulliDeriv(-dl, b2)
		f = a * (b1*nj - b2*ni)
		dPsiJ = a * (db1*nj + b1*nj + db2*ni)
		dPsiI = a * (-db1*nj - db2*ni - b2*ni)
	}
	return f, dPsiI, dPsiJ, a * b2 * ni, -a * b1 * nj
}

// sgHole returns the hole particle flux Jp/q (m^-2 s^-1, along +x) on an
// edge and its derivatives with respect to psi_i, psi_j, phip_i and
// phip_j, for a = Dp/h, dl = (psi - theta)_j - (psi - theta)_i, densities
// pi, pj and dphi = phip_j - phip_i.
//
// Density form: Jp/q = a [B(dl) p_i - B(-dl) p_j]; quasi-Fermi form: Jp/q =
// -a B(dl) p_i expm1(dphi). Source: Scharfetter & Gummel 1969.
func sgHole(a, dl, pi, pj, dphi float64) (f, dPsiI, dPsiJ, dPhiI, dPhiJ float64) {
	b1, b2 := Bernoulli(dl), Bernoulli(-dl)
	db1 := bernoulliDeriv(dl, b1)
	if math.Abs(dphi) < sgSwitch {
		e := math.Expm1(dphi)
		f = -a * b1 * pi * e
		dPsiJ = -a * e * pi * db1
		dPsiI = a * e * pi * (db1 + b1)
	} else {
		db2 := bernoulliDeriv(-dl, b2)
		f = a * (b1*pi - b2*pj)
		dPsiJ = a * (db1*pi + db2*pj + b2*pj)
		dPsiI = a * (-db1*pi - b1*pi - db2*pj)
	}
	return f, dPsiI, dPsiJ, a * b1 * pi, -a * b2 * pj
}

// edgeFluxes returns the Scharfetter-Gummel particle fluxes Jn/q and Jp/q
// (m^-2 s^-1, positive along +x) on edge k; electrons drift in psi +
// theta, holes in psi - theta (theta = ln(n_ie/ni)).
func (s *Solver) edgeFluxes(k int, st *state, n, p []float64) (fn, fp float64) {
	i, j := k, k+1
	h := s.h[k]
	dn := (st.psi[j] + s.theta[j]) - (st.psi[i] + s.theta[i])
	dp := (st.psi[j] - s.theta[j]) - (st.psi[i] - s.theta[i])
	fn, _, _, _, _ = sgElectron(s.dn[k]/h, dn, n[i], n[j], st.phin[j]-st.phin[i])
	fp, _, _, _, _ = sgHole(s.dp[k]/h, dp, p[i], p[j], st.phip[j]-st.phip[i])
	return fn, fp
}

// assemble builds the row-equilibrated Jacobian and residual of the coupled
// system (3 unknowns per node: psi, phin, phip) and returns the infinity
// norm of the equilibrated residual (kT/q).
//
// Box (finite-volume) discretisation on the non-uniform mesh, node i with
// box width d_i = (h_{i-1} + h_i)/2:
//
//	Poisson:   (eps kT/q^2)[(psi_{i+1}-psi_i)/h_i - (psi_i-psi_{i-1})/h_{i-1}] + d_i (p - n + N) = 0
//	electrons: Jn/q|_{i+1/2} - Jn/q|_{i-1/2} - (d_i R - G_i) = 0
//	holes:     -(Jp/q|_{i+1/2} - Jp/q|_{i-1/2}) - (d_i R - G_i) = 0
//
// with G_i the optical generation integrated over the box (m^-2 s^-1,
// setupGeneration; the rows are particle fluxes per area, like d_i R). G
// does not depend on the state, so the Jacobian is that of the dark
// device.
// Contact rows are identities (Dirichlet values already in the state).
func (s *Solver) assemble(st *state, w *work) float64 {
	nn := len(s.x)
	n, p := w.n, w.p
	s.carriers(st, n, p)
	b := w.band
	b.reset()
	f := w.f
	clear(f)
	inner := func(i int) bool { return i > 0 && i < nn-1 }
	for k := 0; k < nn-1; k++ {
		i, j := k, k+1
		h := s.h[k]
		ri, rj := 3*i, 3*j
		ii, ij := inner(i), inner(j)
		// Poisson flux.
		g := s.lam / h
		fl := g * (st.psi[j] - st.psi[i])
		if ii {
			f[ri] += fl
			b.add(ri, ri, -g)
			b.add(ri, rj, g)
		}
		if ij {
			f[rj] -= fl
			b.add(rj, rj, -g)
			b.add(rj, ri, g)
		}
		// Electrons.
		dl := (st.psi[j] + s.theta[j]) - (st.psi[i] + s.theta[i])
		fn, dPsiI, dPsiJ, dPhiI, dPhiJ := sgElectron(s.dn[k]/h, dl, n[i], n[j], st.phin[j]-st.phin[i])
		if ii {
			f[ri+1] += fn
			b.add(ri+1, ri, dPsiI)
			b.add(ri+1, ri+1, dPhiI)
			b.add(ri+1, rj, dPsiJ)
			b.add(ri+1, rj+1, dPhiJ)
		}
		if ij {
			f[rj+1] -= fn
			b.add(rj+1, ri, -dPsiI)
			b.add(rj+1, ri+1, -dPhiI)
			b.add(rj+1, rj, -dPsiJ)
			b.add(rj+1, rj+1, -dPhiJ)
		}
		// Holes.
		dl = (st.psi[j] - s.theta[j]) - (st.psi[i] - s.theta[i])
		fp, qPsiI, qPsiJ, qPhiI, qPhiJ := sgHole(s.dp[k]/h, dl, p[i], p[j], st.phip[j]-st.phip[i])
		if ii {
			f[ri+2] -= fp
			b.add(ri+2, ri, -qPsiI)
			b.add(ri+2, ri+2, -qPhiI)
			b.add(ri+2, rj, -qPsiJ)
			b.add(ri+2, rj+2, -qPhiJ)
		}
		if ij {
			f[rj+2] += fp
			b.add(rj+2, ri, qPsiI)
			b.add(rj+2, ri+2, qPhiI)
			b.add(rj+2, rj, qPsiJ)
			b.add(rj+2, rj+2, qPhiJ)
		}
	}
	for i := 1; i < nn-1; i++ {
		r := 3 * i
		d := s.d[i]
		// Ionised doping c(n, p): dc/dpsi = c_n n - c_p p, dc/dphin =
		// -c_n n, dc/dphip = c_p p (n = n_ie e^(psi - phin), p = n_ie
		// e^(phip + v - psi)).
		c, cn, cp := s.ionised(i, st, n[i], p[i])
		f[r] += d * (p[i] - n[i] + c)
		b.add(r, r, -d*(n[i]+p[i]-cn*n[i]+cp*p[i]))
		b.add(r, r+1, d*(n[i]-cn*n[i]))
		b.add(r, r+2, d*(p[i]+cp*p[i]))
		rr, rpsi, rn, rp := s.recombination(i, st, n[i], p[i])
		net := d*rr - s.generation(st, i)
		f[r+1] -= net
		f[r+2] -= net
		for q := 1; q <= 2; q++ {
			b.add(r+q, r, -d*rpsi)
			b.add(r+q, r+1, -d*rn)
			b.add(r+q, r+2, -d*rp)
		}
	}
	for _, i := range []int{0, nn - 1} {
		for q := 0; q < 3; q++ {
			b.set(3*i+q, 3*i+q, 1)
			f[3*i+q] = 0
		}
	}
	// A carrier whose density has underflowed at a node (below tinyDensity,
	// far below one carrier in any device) no longer influences anything
	// there, so its quasi-Fermi potential would be an undetermined unknown
	// (an empty Jacobian column): hold it for this step.
	for i := 1; i < nn-1; i++ {
		for q, dens := range [2]float64{n[i], p[i]} {
			if dens < tinyDensity {
				r := 3*i + 1 + q
				b.scaleRow(r, 0)
				b.set(r, r, 1)
				f[r] = 0
			}
		}
	}
	res := 0.0
	for r := range f {
		m := b.rowMax(r)
		if math.IsNaN(m) || math.IsInf(m, 0) || math.IsNaN(f[r]) || math.IsInf(f[r], 0) {
			return math.NaN()
		}
		if m < tinyRow {
			// The carrier of this continuity row has underflowed (density
			// below ~1e-290 m^-3 around the node): the carrier is absent
			// there and its quasi-Fermi potential is held for this step.
			b.scaleRow(r, 0)
			b.set(r, r, 1)
			f[r] = 0
			continue
		}
		sc := 1 / m
		b.scaleRow(r, sc)
		f[r] *= sc
		res = absMax(res, f[r])
	}
	return res
}

// tinyRow is the row magnitude below which a Jacobian row counts as
// underflowed (its inverse would overflow).
const tinyRow = 1e-290

// tinyDensity is the carrier density (m^-3) below which a carrier counts as
// absent at a node: ~e^-645, where exp is about to underflow.
const tinyDensity = 1e-280

const errNoConvergence = solverError("iteration limit reached")

// errSlowConvergence reports a Newton iteration that has not reached its
// quadratic basin (update still above 1e-2 kT/q) after slowAfter steps.
const errSlowConvergence = solverError("Newton iteration not converging (update above 1e-2 kT/q after 12 steps)")

// slowAfter is the iteration count after which a still large update aborts
// a bias step (common practice in continuation: halve rather than grind).
const slowAfter = 12

// newton runs the damped coupled Newton iteration on st in place. The
// update is scaled down uniformly when it would raise a carrier density by
// more than riseLimit allows; convergence is a full step whose infinity
// norm is below the tolerance.
func (s *Solver) newton(st *state, w *work) (iters int, upd, res float64, err error) {
	tol := s.opt.Tolerance
	for it := 1; it <= s.opt.MaxIterations; it++ {
		if w.ctx != nil && w.ctx.Err() != nil {
			return it, upd, res, w.ctx.Err()
		}
		res = s.assemble(st, w)
		if math.IsNaN(res) || math.IsInf(res, 0) {
			return it, upd, res, errors.New("non-finite residual (overflow in the carrier densities)")
		}
		if e := w.band.factor(); e != nil {
			return it, upd, res, e
		}
		dl := w.dlt
		for r := range dl {
			dl[r] = -w.f[r]
		}
		w.band.solve(dl)
		upd = 0
		for _, v := range dl {
			upd = absMax(upd, v)
		}
		if math.IsNaN(upd) || math.IsInf(upd, 0) {
			return it, upd, res, errors.New("non-finite Newton update")
		}
		// Damping: scale the whole update so that no density rises by more
		// than riseLimit allows (ln n changes by dpsi - dphin, ln p by
		// dphip - dpsi); falling densities and large potential changes in
		// depleted regions are harmless and pass unscaled.
		t := 1.0
		for i := 1; i < len(st.psi)-1; i++ {
			ref := math.Abs(s.c[i]) + w.n[i] + w.p[i]
			if rn := dl[3*i] - dl[3*i+1]; rn > 0 {
				t = math.Min(t, riseLimit(w.n[i], ref)/rn)
			}
			if rp := dl[3*i+2] - dl[3*i]; rp > 0 {
				t = math.Min(t, riseLimit(w.p[i], ref)/rp)
			}
		}
		for i := range st.psi {
			st.psi[i] += t * dl[3*i]
			st.phin[i] += t * dl[3*i+1]
			st.phip[i] += t * dl[3*i+2]
		}
		if it >= slowAfter && upd > 1e-2 && it < s.opt.MaxIterations {
			// Not in the quadratic basin after slowAfter iterations: give
			// up early so that the continuation halves the step, which is
			// cheaper than iterating on from a poor start.
			return it, upd, res, errSlowConvergence
		}
		if t == 1 && upd <= tol {
			// Converged in the update norm; a state that is a result is
			// polished next (see polish), a continuation step is not.
			return it, upd, res, nil
		}
	}
	return s.opt.MaxIterations, upd, res, errNoConvergence
}

// polishTarget returns the current spread (relative) the polishing aims
// at: 1e-11, or the rounding floor of the discrete current on a mesh of
// nn nodes, 20 nn times the double-precision epsilon (the spread of Jn +
// Jp over the edges grows linearly with the node count once the
// quasi-Fermi differences are at rounding level; measured 5e-16 nn), when
// that is larger. A fixed target is unreachable on fine meshes and made
// every bias step run all six sweeps.
func polishTarget(nn int) float64 {
	return math.Max(1e-11, 20*float64(nn)*0x1p-52)
}

// polish runs the carrier polishing sweeps on a state converged by newton
// when its current spread exceeds ten times polishTarget.
//
// After newton the potential is known to rounding (~1e-16 relative), but
// a tiny majority current is set by quasi-Fermi differences far below
// that level, which the coupled solve mixes with the rounding noise of
// Poisson's rows (the error grows as the cells shrink where the majority
// density is high: the flux of a cell is D p/h times the difference).
// Polish them with psi frozen: decoupled Newton steps on each continuity
// equation alone (tridiagonal), until the total current is constant
// along the device to polishTarget (at most six sweeps, stopping when a
// sweep no longer halves the spread; the best iterate is kept in a
// preallocated buffer). Only the states that are results are polished
// (the end of a continuation, the frozen-occupation C-V point): the
// polish changes the quasi-Fermi potentials by far less than the Newton
// tolerance, so an intermediate continuation step, which only starts the
// next, gains nothing from it.
func (s *Solver) polish(st *state, w *work) {
	target := polishTarget(len(s.x))
	spread := s.currentSpread(st, w)
	if !(spread > 10*target) {
		return
	}
	if w.best == nil {
		w.best = s.newState(st.v)
	}
	best, bestSpread := w.best, spread
	best.copyFrom(st)
	for extra := 0; extra < 6; extra++ {
		if w.ctx != nil && w.ctx.Err() != nil {
			break
		}
		w.polishSweeps++
		if s.polishCarrier(st, w, true) != nil || s.polishCarrier(st, w, false) != nil {
			break
		}
		ns := s.currentSpread(st, w)
		improved := ns < 0.5*bestSpread
		if ns < bestSpread {
			best.copyFrom(st)
			bestSpread = ns
		}
		if ns <= target || !improved {
			break
		}
	}
	st.copyFrom(best)
}

// polishCarrier takes one Newton step on the continuity equation of one
// carrier for its quasi-Fermi potential, with psi and the other
// quasi-Fermi potential frozen. The tridiagonal Jacobian (Scharfetter-
// Gummel in the quasi-Fermi variables) is an M-matrix, solved by the
// Thomas algorithm; rows whose carrier has underflowed are held.
func (s *Solver) polishCarrier(st *state, w *work, electrons bool) error {
	nn := len(s.x)
	n, p := w.n, w.p
	s.carriers(st, n, p)
	a, b, c, d := w.ta, w.tb, w.tc, w.td
	clear(a)
	clear(b)
	clear(c)
	clear(d)
	for k := 0; k < nn-1; k++ {
		i, j := k, k+1
		h := s.h[k]
		var f, dI, dJ float64
		if electrons {
			dl := (st.psi[j] + s.theta[j]) - (st.psi[i] + s.theta[i])
			f, _, _, dI, dJ = sgElectron(s.dn[k]/h, dl, n[i], n[j], st.phin[j]-st.phin[i])
			// row i: +flux, row j: -flux
			d[i] += f
			b[i] += dI
			c[i] += dJ
			d[j] -= f
			a[j] -= dI
			b[j] -= dJ
		} else {
			dl := (st.psi[j] - s.theta[j]) - (st.psi[i] - s.theta[i])
			f, _, _, dI, dJ = sgHole(s.dp[k]/h, dl, p[i], p[j], st.phip[j]-st.phip[i])
			// row i: -flux, row j: +flux
			d[i] -= f
			b[i] -= dI
			c[i] -= dJ
			d[j] += f
			a[j] += dI
			b[j] += dJ
		}
	}
	for i := 1; i < nn-1; i++ {
		r, _, rn, rp := s.recombination(i, st, n[i], p[i])
		d[i] -= s.d[i]*r - s.generation(st, i)
		if electrons {
			b[i] -= s.d[i] * rn
		} else {
			b[i] -= s.d[i] * rp
		}
		dens := n[i]
		if !electrons {
			dens = p[i]
		}
		m := math.Max(math.Abs(b[i]), math.Max(math.Abs(a[i]), math.Abs(c[i])))
		if m < tinyRow || dens < tinyDensity {
			a[i], b[i], c[i], d[i] = 0, 1, 0, 0
			continue
		}
		a[i], b[i], c[i], d[i] = a[i]/m, b[i]/m, c[i]/m, -d[i]/m
	}
	for _, i := range []int{0, nn - 1} {
		a[i], b[i], c[i], d[i] = 0, 1, 0, 0
	}
	if err := solveTridiagonal(a, b, c, d, w.tw); err != nil {
		return err
	}
	for i := 1; i < nn-1; i++ {
		if math.IsNaN(d[i]) || math.IsInf(d[i], 0) {
			return errors.New("non-finite polish update")
		}
		if electrons {
			st.phin[i] += d[i]
		} else {
			st.phip[i] += d[i]
		}
	}
	return nil
}

// currentSpread returns max |J_k - mean| / |mean| of the total particle
// flux over the edges (0 when it is identically zero).
func (s *Solver) currentSpread(st *state, w *work) float64 {
	n, p := w.n, w.p
	s.carriers(st, n, p)
	m := len(s.h)
	tot := w.ta[:m]
	mean := 0.0
	for k := 0; k < m; k++ {
		fn, fp := s.edgeFluxes(k, st, n, p)
		tot[k] = fn + fp
		mean += tot[k]
	}
	mean /= float64(m)
	spread := 0.0
	for _, v := range tot {
		spread = absMax(spread, v-mean)
	}
	if spread == 0 {
		return 0
	}
	return spread / math.Abs(mean)
}

// poisson solves the nonlinear Poisson equation for psi with the
// quasi-Fermi potentials frozen (equilibrium when they are zero), by
// Newton's method limited node by node so that neither density rises by
// more than riseLimit allows (the exponential nonlinearity makes Newton
// overshoot only upward in density; the equation is the Euler-Lagrange
// equation of a convex functional, so the limited iteration converges from
// the neutral guess).
func (s *Solver) poisson(st *state, w *work, tol float64, maxIter int) (iters int, upd, res float64, err error) {
	nn := len(s.x)
	n, p := w.n, w.p
	a, b, c, d := w.ta, w.tb, w.tc, w.td
	for it := 1; it <= maxIter; it++ {
		s.carriers(st, n, p)
		res = 0
		for i := 1; i < nn-1; i++ {
			gl, gr := s.lam/s.h[i-1], s.lam/s.h[i]
			ci, cn, cp := s.ionised(i, st, n[i], p[i])
			fi := gr*(st.psi[i+1]-st.psi[i]) - gl*(st.psi[i]-st.psi[i-1]) + s.d[i]*(p[i]-n[i]+ci)
			a[i], c[i] = gl, gr
			b[i] = -gl - gr - s.d[i]*(n[i]+p[i]-cn*n[i]+cp*p[i])
			d[i] = -fi
			// |b| exceeds gl and gr (the diagonal dominates the stencil).
			if r := math.Abs(fi) / -b[i]; r > res || r != r {
				res = r
			}
		}
		a[0], b[0], c[0], d[0] = 0, 1, 0, 0
		a[nn-1], b[nn-1], c[nn-1], d[nn-1] = 0, 1, 0, 0
		if math.IsNaN(res) || math.IsInf(res, 0) {
			return it, upd, res, errors.New("non-finite residual (overflow in the carrier densities)")
		}
		if e := solveTridiagonal(a, b, c, d, w.tw); e != nil {
			return it, upd, res, e
		}
		upd = 0
		for i := 1; i < nn-1; i++ {
			v := d[i]
			av := math.Abs(v)
			if av > upd || av != av {
				upd = av
			}
			ref := math.Abs(s.c[i]) + n[i] + p[i]
			if v > 0 {
				v = math.Min(v, riseLimit(n[i], ref))
			} else {
				v = math.Max(v, -riseLimit(p[i], ref))
			}
			st.psi[i] += v
		}
		if math.IsNaN(upd) {
			return it, upd, res, errors.New("non-finite Newton update")
		}
		if upd <= tol {
			return it, upd, res, nil
		}
	}
	return maxIter, upd, res, errNoConvergence
}

// gummelCarrier solves the continuity equation of one carrier for its
// density with psi and the other quasi-Fermi potential frozen (one
// decoupled Gummel step; H. K. Gummel, IEEE Trans. Electron Devices ED-11,
// 455 (1964)). The Scharfetter-Gummel equation is linear in the density;
// the recombination is linearised as R = K (n p - n_ie^2) with K frozen,
// which keeps the matrix an M-matrix with a non-negative right-hand side
// (the optical generation only adds to it), so the density stays
// positive. The result is stored back as a
// quasi-Fermi potential.
func (s *Solver) gummelCarrier(st *state, w *work, electrons bool) error {
	nn := len(s.x)
	n, p := w.n, w.p
	s.carriers(st, n, p)
	a, b, c, d := w.ta, w.tb, w.tc, w.td
	for i := 1; i < nn-1; i++ {
		k := 0.0
		if s.srh {
			k += 1 / (s.tauP[i]*(n[i]+s.n1[i]) + s.tauN[i]*(p[i]+s.p1[i]))
		}
		k += s.augN*n[i] + s.augP*p[i] + s.brad
		kl, kr := i-1, i
		if electrons {
			dl := (st.psi[i] + s.theta[i]) - (st.psi[i-1] + s.theta[i-1])
			dr := (st.psi[i+1] + s.theta[i+1]) - (st.psi[i] + s.theta[i])
			bl, br := Bernoulli(dl), Bernoulli(dr)
			al, ar := s.dn[kl]/s.h[kl], s.dn[kr]/s.h[kr]
			a[i] = al * Bernoulli(-dl)
			c[i] = ar * br
			b[i] = -al*bl - ar*Bernoulli(-dr) - s.d[i]*k*p[i]
		} else {
			dl := (st.psi[i] - s.theta[i]) - (st.psi[i-1] - s.theta[i-1])
			dr := (st.psi[i+1] - s.theta[i+1]) - (st.psi[i] - s.theta[i])
			bl, br := Bernoulli(dl), Bernoulli(dr)
			al, ar := s.dp[kl]/s.h[kl], s.dp[kr]/s.h[kr]
			a[i] = al * bl
			c[i] = ar * Bernoulli(-dr)
			b[i] = -ar*br - al*Bernoulli(-dl) - s.d[i]*k*n[i]
		}
		d[i] = -s.d[i]*k*s.nie2[i] - s.generation(st, i)
	}
	for _, i := range []int{0, nn - 1} {
		a[i], b[i], c[i] = 0, 1, 0
		if electrons {
			d[i] = n[i]
		} else {
			d[i] = p[i]
		}
	}
	if e := solveTridiagonal(a, b, c, d, w.tw); e != nil {
		return e
	}
	for i := 1; i < nn-1; i++ {
		if !(d[i] > 0) || math.IsInf(d[i], 0) {
			return errors.New("non-positive density in a Gummel step")
		}
	}
	for i := 1; i < nn-1; i++ {
		if electrons {
			st.phin[i] = s.lnNie[i] + st.psi[i] - math.Log(d[i])
		} else {
			st.phip[i] = math.Log(d[i]) - s.lnNie[i] + st.psi[i] - st.v
		}
	}
	return nil
}

// gummel runs the configured number of decoupled sweeps (Poisson, then
// electrons, then holes). A failing sweep leaves the last good iterate in
// place: the sweeps only provide the starting point of the Newton
// iteration, which decides convergence.
func (s *Solver) gummel(st *state, w *work) {
	if s.opt.GummelIterations > 0 && w.save == nil {
		w.save = s.newState(st.v)
	}
	save := w.save
	for k := 0; k < s.opt.GummelIterations; k++ {
		if w.ctx != nil && w.ctx.Err() != nil {
			return
		}
		save.copyFrom(st)
		_, _, _, err := s.poisson(st, w, 1e-8, 30)
		if err == nil {
			err = s.gummelCarrier(st, w, true)
		}
		if err == nil {
			err = s.gummelCarrier(st, w, false)
		}
		if err != nil {
			st.copyFrom(save)
			return
		}
	}
}

// absMax returns max(m, |v|), propagating NaN in v (cheaper than math.Max,
// which handles signed zeros and infinities generally).
func absMax(m, v float64) float64 {
	if v < 0 {
		v = -v
	}
	if v > m || v != v {
		return v
	}
	return m
}

// riseLimit returns how far (in kT/q) ln of a density may rise in one
// Newton step at a node with density dens and charge scale ref = |N| + n +
// p: 3 (a factor e^3) plus the room below ref. A depleted carrier may thus
// come back to about the doping in one step, while a density at or above
// the doping grows by at most e^3 per step, which keeps the exponential
// from overshooting (common practice for Newton on exponential
// nonlinearities, in the spirit of R. E. Bank, D. J. Rose, Numer. Math.
// 37, 279 (1981), citation from memory).
func riseLimit(dens, ref float64) float64 {
	if !(dens < ref) {
		return 3
	}
	return 3 + math.Log(ref/dens)
}
