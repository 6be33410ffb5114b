package solver

import (
	"fmt"
	"math"

	"junco/physics"
)

// Result is the solution at one bias. Node quantities are at X, edge
// quantities at XMid (the midpoints, where the Scharfetter-Gummel fluxes
// live). Energies are in eV relative to the equilibrium Fermi level of
// the cathode, which is held at 0 V; the potential is the electrostatic
// potential psi in V with n = n_ie exp((psi - phi_n)/V_t).
type Result struct {
	// Bias is the anode bias, V (forward positive).
	Bias float64
	// Temperature, K, and ThermalVoltage kT/q, V.
	Temperature, ThermalVoltage float64
	// X are the node positions, m; XMid the edge midpoints, m.
	X, XMid []float64
	// Potential is psi at the nodes, V.
	Potential []float64
	// Field is E = -(psi_{i+1} - psi_i)/h_i on the edges, V/m.
	Field []float64
	// Ec and Ev are the band edges, eV: Ec = -q psi - kT ln(n_ie/ni) + kT
	// ln(Nc/ni), Ev = -q psi + kT ln(n_ie/ni) - kT ln(Nv/ni) (consistent
	// with n = Nc exp((Efn - Ec)/kT), p = Nv exp((Ev - Efp)/kT)).
	Ec, Ev []float64
	// Efn and Efp are the electron and hole quasi-Fermi levels, eV.
	Efn, Efp []float64
	// N and P are the electron and hole densities, m^-3.
	N, P []float64
	// NetDoping is the ionised net doping Nd+ - Na- at the nodes, m^-3.
	NetDoping []float64
	// Charge is the space-charge density q (p - n + Nd+ - Na-), C/m^3.
	Charge []float64
	// Recombination is the net recombination rate, m^-3 s^-1.
	Recombination []float64
	// Generation is the optical generation rate (Device.Light), m^-3
	// s^-1: the exact integral over each node's box divided by its width
	// (zero in the dark and at equilibrium). The continuity equations
	// carry R - G.
	Generation []float64
	// Jn and Jp are the electron and hole current densities on the edges
	// along +x, A/m^2 (q times the Scharfetter-Gummel fluxes).
	Jn, Jp []float64
	// Current is the terminal current density, A/m^2, positive when
	// conventional current enters at the anode (forward); it is the mean
	// of Jn + Jp over the edges, with the sign of the anode side.
	Current float64
	// CurrentSpread is max |Jn + Jp - mean| / |mean| over the edges (0 for
	// zero current): the discrete current-conservation error.
	CurrentSpread float64
	// JunctionCharge is the charge per area of each layer of the junction
	// dipole, C/m^2: eps times the peak field (Gauss's law; the peak sits
	// where the space charge changes sign and the field vanishes at the
	// neutral contacts), taking the larger of the edge fields and the
	// field reconstructed at the metallurgical junction. For a step
	// junction in reverse bias it is the depletion charge q Nd xn = q Na
	// xp; at low bias it also holds the majority tail that a heavily doped
	// side spills across the junction.
	JunctionCharge float64
	// PeakField is the largest |E|, V/m: of the edge fields and the field
	// reconstructed at the metallurgical junction. For an
	// ideally abrupt asymmetric step it includes the dipole of the heavy
	// side's majority carriers spilling over the junction (a real feature
	// of the Poisson-Boltzmann solution of a zero-width step, converged
	// on the automatic mesh, which resolves the heavy side's Debye length
	// at every abrupt step, and under mesh refinement: Si 1e19/1e16 at
	// -5 V without band-gap narrowing gives 2.04e7 V/m against 1.34e7
	// V/m of the depletion charge, the first integral
	// E^2 = 2 q Na (kT/q)(e^-u - 1 + u)/eps at u = 1 + (Nd/Na)(w - 1) kT/q
	// on the heavy side; own derivation). Depletion.Field is the field of
	// the depletion charge alone.
	PeakField float64
	// Barrier is psi(cathode) - psi(anode), V: the built-in potential at
	// equilibrium, Vbi - V under bias.
	Barrier float64
	// Depletion describes the depleted region of the main junction.
	Depletion Depletion
	// Iterations, Update and Residual describe the last Newton (or, at
	// equilibrium, Poisson) iteration: count, last update norm (kT/q) and
	// row-equilibrated residual norm before it (kT/q).
	Iterations       int
	Update, Residual float64
	// Flags are the validity warnings.
	Flags []physics.Flag
}

// Depletion is the depleted region of the main junction (the first
// junction seen from the anode) as the solver sees it.
//
// Definition (Gauss's law, valid in reverse and forward bias): the space
// charge of each side of the metallurgical junction xj, counting the
// ionised doping and that side's majority carriers (the other carrier is
// the minority there: injected, or spilled over from the other side's
// Debye tail), Q = q int max(0, |N| - majority) dx (N the ionised net
// doping), is placed as a fully depleted and fully ionised layer against
// xj: the edge is where the chemical dopant count from xj reaches Q/q. For a step junction in reverse bias this is the
// depletion-approximation edge with Vbi - V - 2kT/q (one kT/q per side,
// from the Poisson-Boltzmann first integral E^2 = (2 q N/eps)(V - kT/q
// (1 - e^(-qV/kT))) of each side; Sze & Ng 2007, section 2.2). Unlike a
// carrier-density threshold it keeps working when the carriers in the
// depletion region exceed the doping's half in forward bias. The region
// is Valid when both sides hold space charge and W exceeds the Debye
// length of the lighter side (else only Debye tails remain: flat band,
// high injection).
type Depletion struct {
	// Valid is false when no depleted node exists between the edges'
	// search limits (forward bias near flat band, high injection).
	Valid bool
	// Junction is the metallurgical junction, m.
	Junction float64
	// XAnode and XCathode are the edges on the anode (p) and cathode (n)
	// sides, m.
	XAnode, XCathode float64
	// W is |XCathode - XAnode|, m (NaN when not Valid).
	W float64
	// ReachThrough is true when an edge reaches a contact.
	ReachThrough bool
	// OutsideZone is true when an edge lies outside the refined mesh zone.
	OutsideZone bool
	// Field is the field at the junction of the depletion charge alone,
	// V/m: q min(Q_anode, Q_cathode)/eps with each side's charge counted
	// as in the definition above (Gauss's law). The side without the
	// other side's spilled carriers gives it, so it leaves out the
	// majority-carrier dipole that an ideally abrupt asymmetric step holds
	// within a Debye length of its heavy side (see Result.PeakField). It
	// is the peak field of the depletion approximation, q Nd xn / eps
	// with Vbi - V - 2kT/q, and the one that sets the avalanche margin.
	Field float64
	// MinorityRatio is the larger of the minority/majority density ratios
	// at the two quasi-neutral edges, the first node beyond each depletion
	// edge (from the junction when no region is Valid) where the space
	// charge is below 1 % of the local doping (> 0.1 means high
	// injection). It is set also when the region is not Valid.
	MinorityRatio float64
}

// electricalEdge returns the edge that contains the electrical junction of
// the state, the point where n = p (sign change of ln n - ln p = 2 psi -
// phi_n - phi_p, in kT/q), searched outward from the node nearest the main
// metallurgical junction; the nearest crossing wins.
func (s *Solver) electricalEdge(st *state) int {
	g := func(i int) float64 { return 2*st.psi[i] - st.phin[i] - st.phip[i] - st.v }
	nn := len(s.x)
	for d := 0; d < nn; d++ {
		for _, k := range []int{s.jNode + d, s.jNode - 1 - d} {
			if k >= 0 && k+1 < nn && (g(k) < 0) != (g(k+1) < 0) {
				return k
			}
		}
	}
	return min(s.jNode, nn-2)
}

// junctionField returns the field at the main metallurgical junction, V/m:
// the field on the edge left of the junction's node plus (q/eps) times the
// charge of the part of the node's box up to the junction (doping from the
// profile, carriers n, p of the node). The discrete edge fields alone would
// miss the half-box of charge next to the peak, an O(h) error.
func (s *Solver) junctionField(st *state, n, p float64) float64 {
	if s.jEdge < 0 {
		return 0
	}
	k := s.jNode - 1
	e := -(st.psi[k+1] - st.psi[k]) * s.vt / s.h[k]
	left, _ := s.junctionSplit(st, n, p)
	return e + physics.Q/s.eps*(left+(p-n)*s.jPart)
}

// junctionSplit returns the ionised net doping (m^-2) of the junction
// node's box left and right of the metallurgical junction: the profile's
// dopant counts of each part times the node's ionised fractions (from
// its carriers n, p with Device.Occupation, else the node's fixed ones).
func (s *Solver) junctionSplit(st *state, n, p float64) (left, right float64) {
	m := s.jNode
	fd, fa := 1.0, 1.0
	switch {
	case st != nil && st.fix != nil:
		// Frozen occupation: scale the node's frozen net doping.
		chem := s.nd[m] - s.na[m]
		if chem != 0 {
			fd = st.fix[m] / chem
			fa = fd
		}
	case s.occ != nil:
		o := s.occ[m]
		fd, _ = occupied(n, o.DonorN1, o.DonorBound)
		fa, _ = occupied(p, o.AcceptorP1, o.AcceptorBound)
	default:
		if s.nd[m] > 0 {
			fd = s.ndi[m] / s.nd[m]
		}
		if s.na[m] > 0 {
			fa = s.nai[m] / s.na[m]
		}
	}
	left = fd*s.jPartNd - fa*s.jPartNa
	right = fd*(s.nd[m]*s.d[m]-s.jPartNd) - fa*(s.na[m]*s.d[m]-s.jPartNa)
	return left, right
}

// junctionCharge returns the charge per area between edge k and the
// cathode, C/m^2, by Gauss's law from the field on the edge (the field
// vanishes at the neutral cathode; in the box method the charge sits at
// the nodes, so the value is exact for the discrete solution).
func (s *Solver) junctionCharge(st *state, k int) float64 {
	q := s.eps * (st.psi[k+1] - st.psi[k]) * s.vt / s.h[k] // -eps E
	if s.anodeLeft {
		return q
	}
	return -q
}

// summary returns the depletion width (m), terminal current density
// (A/m^2) and dipole charge (C/m^2) of a state as result would, without
// building the arrays (used by CV).
func (s *Solver) summary(st *state, w *work) (width, current, charge float64) {
	n, p := w.n, w.p
	s.carriers(st, n, p)
	width = s.depletion(st, n, p).W
	peak, mean := 0.0, 0.0
	for k := range s.h {
		peak = absMax(peak, (st.psi[k+1]-st.psi[k])*s.vt/s.h[k])
		fn, fp := s.edgeFluxes(k, st, n, p)
		mean += fn + fp
	}
	current = physics.Q * mean / float64(len(s.h))
	if !s.anodeLeft {
		current = -current
	}
	charge = s.eps * math.Max(peak, math.Abs(s.junctionField(st, n[s.jNode], p[s.jNode])))
	return width, current, charge
}

// result builds the output arrays for a converged state.
func (s *Solver) result(st *state, w *work, iters int, upd, res float64) *Result {
	nn := len(s.x)
	vt := s.vt
	r := &Result{Bias: st.v * vt, Temperature: s.dev.Temperature, ThermalVoltage: vt,
		X: append([]float64(nil), s.x...), XMid: append([]float64(nil), s.xm...),
		Iterations: iters, Update: upd, Residual: res}
	n := make([]float64, nn)
	p := make([]float64, nn)
	s.carriers(st, n, p)
	r.N, r.P = n, p
	mk := func() []float64 { return make([]float64, nn) }
	r.Potential, r.Ec, r.Ev, r.Efn, r.Efp = mk(), mk(), mk(), mk(), mk()
	r.NetDoping, r.Charge, r.Recombination, r.Generation = mk(), mk(), mk(), mk()
	lnc, lnv := math.Log(s.nc/s.ni), math.Log(s.nv/s.ni)
	for i := 0; i < nn; i++ {
		r.Potential[i] = st.psi[i] * vt
		r.Ec[i] = vt * (-(st.psi[i] + s.theta[i]) + lnc)
		r.Ev[i] = vt * (-(st.psi[i] - s.theta[i]) - lnv)
		r.Efn[i] = -vt * st.phin[i]
		r.Efp[i] = -vt * (st.phip[i] + st.v)
		r.NetDoping[i], _, _ = s.ionised(i, st, n[i], p[i])
		r.Charge[i] = physics.Q * (p[i] - n[i] + r.NetDoping[i])
		r.Recombination[i], _, _, _ = s.recombination(i, st, n[i], p[i])
		if s.d[i] > 0 {
			r.Generation[i] = s.generation(st, i) / s.d[i]
		}
	}
	r.Field, r.Jn, r.Jp = make([]float64, nn-1), make([]float64, nn-1), make([]float64, nn-1)
	mean := 0.0
	for k := 0; k < nn-1; k++ {
		r.Field[k] = -(st.psi[k+1] - st.psi[k]) * vt / s.h[k]
		r.PeakField = math.Max(r.PeakField, math.Abs(r.Field[k]))
		fn, fp := s.edgeFluxes(k, st, n, p)
		r.Jn[k], r.Jp[k] = physics.Q*fn, physics.Q*fp
		mean += r.Jn[k] + r.Jp[k]
	}
	mean /= float64(nn - 1)
	spread := 0.0
	for k := range r.Jn {
		spread = math.Max(spread, math.Abs(r.Jn[k]+r.Jp[k]-mean))
	}
	if mean != 0 {
		r.CurrentSpread = spread / math.Abs(mean)
	} else if spread != 0 {
		r.CurrentSpread = math.Inf(1)
	}
	if s.anodeLeft {
		r.Current = mean
	} else {
		r.Current = -mean
	}
	r.Barrier = (st.psi[s.ic] - st.psi[s.ia]) * vt
	// The edge fields live at the midpoints; the peak of a step junction
	// sits at the metallurgical junction, half a cell away, where the
	// field is reconstructed from the charge of the junction node's box
	// (junctionField): without it the peak converges only as O(h).
	if s.jEdge >= 0 {
		r.PeakField = math.Max(r.PeakField, math.Abs(s.junctionField(st, n[s.jNode], p[s.jNode])))
	}
	r.JunctionCharge = s.eps * r.PeakField
	r.Depletion = s.depletion(st, n, p)
	r.Flags = append(r.Flags, s.flags...)
	if r.CurrentSpread > 1e-6 {
		r.Flags = append(r.Flags, physics.Flag{Code: FlagCurrentUnresolved, Affects: []physics.Class{physics.ClassCurrent},
			Message: fmt.Sprintf("Jn + Jp varies by %.2g relative along the device: the current (%.3g A/m^2) is below what the solver resolves", r.CurrentSpread, r.Current)})
	}
	d := r.Depletion
	if d.MinorityRatio > 0.1 {
		r.Flags = append(r.Flags, physics.Flag{Code: FlagHighInjection, Affects: []physics.Class{physics.ClassCurrent},
			Message: fmt.Sprintf("minority density %.3g of the majority density at a quasi-neutral edge: low-injection formulas do not apply", d.MinorityRatio)})
	}
	switch {
	case !d.Valid:
		r.Flags = append(r.Flags, physics.Flag{Code: FlagNoDepletion, Affects: []physics.Class{physics.ClassDepletion},
			Message: fmt.Sprintf("no depleted region (the space-charge width is below the Debye length of the lighter side) at %.4g V", r.Bias)})
	default:
		if d.ReachThrough {
			r.Flags = append(r.Flags, physics.Flag{Code: FlagReachThrough, Affects: []physics.Class{physics.ClassDepletion, physics.ClassCapacitance},
				Message: "the depletion region reaches a contact"})
		}
		if d.OutsideZone {
			r.Flags = append(r.Flags, physics.Flag{Code: FlagMeshZone, Affects: []physics.Class{physics.ClassDepletion, physics.ClassCapacitance},
				Message: "a depletion edge lies outside the refined mesh zone: raise Options.Mesh.MaxReverseBias"})
		}
	}
	return r
}

// clone returns a deep copy of the result.
func (r *Result) clone() *Result {
	c := *r
	cp := func(s []float64) []float64 { return append([]float64(nil), s...) }
	c.X, c.XMid, c.Potential, c.Field = cp(r.X), cp(r.XMid), cp(r.Potential), cp(r.Field)
	c.Ec, c.Ev, c.Efn, c.Efp = cp(r.Ec), cp(r.Ev), cp(r.Efn), cp(r.Efp)
	c.N, c.P, c.NetDoping, c.Charge = cp(r.N), cp(r.P), cp(r.NetDoping), cp(r.Charge)
	c.Recombination, c.Generation, c.Jn, c.Jp = cp(r.Recombination), cp(r.Generation), cp(r.Jn), cp(r.Jp)
	c.Flags = append([]physics.Flag(nil), r.Flags...)
	return &c
}
