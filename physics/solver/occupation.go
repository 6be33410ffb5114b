package solver

import (
	"fmt"
	"math"

	"junco/physics"
)

// Occupation describes the dopant levels of a node for carrier-dependent
// (incomplete) ionisation: the ionised densities follow the local carrier
// densities,
//
//	Nd+ = Nd [1 - bD (n/n1)/(1 + n/n1)],   n1 = (Nc/gD) exp(-(Ec - Ed)/kT)
//	Na- = Na [1 - bA (p/p1)/(1 + p/p1)],   p1 = (Nv/gA) exp(-(Ea - Ev)/kT)
//
// (Fermi-Dirac occupation of a single level with ground-state degeneracy
// g, Sze & Ng 2007, eqs. 1.33 and 1.36, written with the carrier density
// instead of the Fermi level; b is the fraction of dopants with a bound
// state, 1 for the textbook single level). In a depletion region, where n
// and p fall far below n1 and p1, the dopants are fully ionised; in a
// neutral region the occupation reproduces the freeze-out of
// physics.IonisedDensity.
type Occupation struct {
	// DonorN1 is n1 = (Nc/gD) exp(-(Ec - Ed)/kT), m^-3 (+Inf: the donors
	// are always ionised).
	DonorN1 float64
	// DonorBound is bD in [0, 1], the fraction of donors with a bound
	// state.
	DonorBound float64
	// AcceptorP1 is p1 = (Nv/gA) exp(-(Ea - Ev)/kT), m^-3 (+Inf: always
	// ionised).
	AcceptorP1 float64
	// AcceptorBound is bA in [0, 1].
	AcceptorBound float64
}

func (o Occupation) validate(x float64) error {
	bad := func(name string, v float64, allowed string) error {
		return &ParamError{Field: "Device.Occupation." + name, Value: fmt.Sprintf("%s at x = %s m", fv(v), fv(x)), Allowed: allowed, Why: "sets the ionised dopant densities in Poisson's equation"}
	}
	switch {
	case math.IsNaN(o.DonorN1) || !(o.DonorN1 > 0):
		return bad("DonorN1", o.DonorN1, "> 0 (m^-3; +Inf for always ionised)")
	case math.IsNaN(o.AcceptorP1) || !(o.AcceptorP1 > 0):
		return bad("AcceptorP1", o.AcceptorP1, "> 0 (m^-3; +Inf for always ionised)")
	case !(o.DonorBound >= 0 && o.DonorBound <= 1):
		return bad("DonorBound", o.DonorBound, "in [0, 1]")
	case !(o.AcceptorBound >= 0 && o.AcceptorBound <= 1):
		return bad("AcceptorBound", o.AcceptorBound, "in [0, 1]")
	}
	return nil
}

// occupied returns the ionised fraction 1 - b x/(1 + x), x = dens/level,
// and its derivative with respect to dens (m^3).
func occupied(dens, level, b float64) (f, df float64) {
	if b == 0 || math.IsInf(level, 1) {
		return 1, 0
	}
	x := dens / level
	if math.IsInf(x, 1) {
		return 1 - b, 0
	}
	f = 1 - b*x/(1+x)
	df = -b / (level * (1 + x) * (1 + x))
	return f, df
}

// ionised returns the ionised net doping Nd+ - Na- at node i (m^-3) for
// the carrier densities n, p and its derivatives with respect to n and p.
// With a fixed occupation (st.fix, high-frequency capacitance) the frozen
// value is returned; without Device.Occupation the node's fixed value.
func (s *Solver) ionised(i int, st *state, n, p float64) (c, dcdn, dcdp float64) {
	if st != nil && st.fix != nil {
		return st.fix[i], 0, 0
	}
	if s.occ == nil {
		return s.c[i], 0, 0
	}
	o := s.occ[i]
	fd, dfd := occupied(n, o.DonorN1, o.DonorBound)
	fa, dfa := occupied(p, o.AcceptorP1, o.AcceptorBound)
	return s.nd[i]*fd - s.na[i]*fa, s.nd[i] * dfd, -s.na[i] * dfa
}

// neutralPotential returns the potential psi (kT/q, equilibrium, quasi-
// Fermi potentials 0) at which node i is locally neutral, p - n + Nd+ -
// Na- = 0, and the ionised net doping there. The residual falls
// monotonically with psi, so bisection on a bracket is safe.
func (s *Solver) neutralPotential(i int) (psi, c float64) {
	lnNie := s.lnNie[i]
	g := func(u float64) (float64, float64) {
		n := math.Exp(lnNie + u)
		p := math.Exp(lnNie - u)
		c, _, _ := s.ionised(i, nil, n, p)
		return p - n + c, c
	}
	// The neutral point lies within |asinh(N/(2 n_ie))| + 1 of zero: the
	// ionised doping does not exceed the chemical one.
	span := math.Asinh((s.nd[i]+s.na[i])/(2*math.Exp(lnNie))) + 1
	lo, hi := -span, span
	for it := 0; it < 200 && hi-lo > 1e-13*math.Max(1, math.Abs(lo)); it++ {
		mid := 0.5 * (lo + hi)
		if r, _ := g(mid); r > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	psi = 0.5 * (lo + hi)
	_, c = g(psi)
	return psi, c
}

// DopantOccupation returns an Occupation hook for material m at
// temperature t (K) with the named donor and acceptor species ("" = the
// material's defaults) under the dopant-level model im: each species'
// level is physics.Material.DopantLevelFor at its own chemical density,
// and n1 = (Nc/g) exp(-E/kT), p1 = (Nv/g) exp(-E/kT) (Sze & Ng 2007, eqs.
// 1.33 and 1.36). An unknown species is an error naming it.
func DopantOccupation(m *physics.Material, t float64, donor, acceptor string, im physics.IonisationModel) (func(x, nd, na float64) Occupation, error) {
	if m == nil {
		return nil, &ParamError{Field: "Device.Material", Value: "nil", Allowed: "a material", Why: "the dopant levels come from it"}
	}
	if donor == "" {
		donor = m.DefaultDonor
	}
	if acceptor == "" {
		acceptor = m.DefaultAcceptor
	}
	dd, ok := m.Dopant(donor)
	if !ok || !dd.Donor {
		return nil, &ParamError{Field: "Device.DonorSpecies", Value: fmt.Sprintf("%q", donor), Allowed: fmt.Sprintf("a donor of %s: %v", m.Name, m.DopantNames(true)), Why: "its level sets the donor occupation"}
	}
	da, ok := m.Dopant(acceptor)
	if !ok || da.Donor {
		return nil, &ParamError{Field: "Device.AcceptorSpecies", Value: fmt.Sprintf("%q", acceptor), Allowed: fmt.Sprintf("an acceptor of %s: %v", m.Name, m.DopantNames(false)), Why: "its level sets the acceptor occupation"}
	}
	nc, nv := m.Nc(t), m.Nv(t)
	level := func(d physics.Dopant, dens, nb float64) (float64, float64) {
		if !(dens > 0) {
			return math.Inf(1), 0
		}
		lv := m.DopantLevelFor(d, dens, im)
		return lv.BandDensity(nb, t), lv.Localised
	}
	return func(_, nd, na float64) Occupation {
		var o Occupation
		o.DonorN1, o.DonorBound = level(dd, nd, nc)
		o.AcceptorP1, o.AcceptorBound = level(da, na, nv)
		return o
	}, nil
}
