package solver

import (
	"fmt"
	"math"
	"sort"
	"sync"

	"junco/physics"
)

// Device describes a one-dimensional diode for the numerical solver, in SI
// units. The device spans 0 <= x <= Length with an ohmic contact at each
// end; the contact in p-type material is the anode, to which the bias is
// applied (forward positive), the other is the cathode (held at 0 V).
type Device struct {
	// Material supplies permittivity, ni(T), Nc, Nv, mobility and
	// recombination parameters.
	Material *physics.Material
	// Temperature is the lattice temperature, K (> 0). Outside the
	// material's trusted range results are flagged, not refused.
	Temperature float64
	// Length is the device length, m.
	Length float64
	// Profile is the doping; the net doping at the two ends must have
	// opposite signs.
	Profile Profile
	// DonorSpecies and AcceptorSpecies name the dopants ("" = the
	// material's defaults); the donor selects the electron mobility set.
	DonorSpecies, AcceptorSpecies string
	// TauN and TauP, if > 0, are the SRH electron and hole lifetimes (s)
	// used everywhere; 0 selects the doping-dependent Scharfetter form
	// physics.SRHLifetime(tau_max, N_ref, Nd + Na) of the material. Auger
	// and radiative recombination are added separately (Options).
	TauN, TauP float64
	// Ionisation, if set, returns the ionised donor and acceptor densities
	// (m^-3) at position x for the chemical densities nd, na (box averages
	// over the node's cell). nil means complete ionisation. It is
	// evaluated once per node from the doping and fixed: it cannot tell a
	// depletion region from a neutral one (use Occupation for that).
	Ionisation func(x, nd, na float64) (ndIonised, naIonised float64)
	// Occupation, if set, returns the dopant levels at position x for the
	// chemical densities nd, na (box averages): the ionised densities then
	// follow the local carrier densities (see Occupation), with their
	// derivatives in the Newton Jacobian, so that dopants in a depletion
	// region are fully ionised and those of a neutral region frozen out.
	// Ionisation and Occupation exclude each other.
	Occupation func(x, nd, na float64) Occupation
	// IntrinsicDensity, if set, returns the effective intrinsic density
	// n_ie(x) in m^-3 (for band-gap narrowing: n_ie = ni exp(dEg/2kT)).
	// nil means Material.Ni(T). The narrowing is split equally between the
	// bands: electrons drift in psi + ln(n_ie/ni), holes in psi -
	// ln(n_ie/ni) (the Slotboom band-gap-narrowing form).
	IntrinsicDensity func(x, nd, na float64) float64
	// Light illuminates the biased solutions (the zero value: dark). Its
	// pairs enter both continuity equations as the generation G(x) (see
	// Generation); the equilibrium stays dark. PhotonFlux enters through
	// the anode's contact (the p side), or the cathode's with FromN.
	Light physics.Light
}

// Recombination selects the recombination terms. The zero value enables
// SRH, Auger and radiative recombination with a mid-gap trap.
type Recombination struct {
	// DisableSRH removes Shockley-Read-Hall recombination.
	DisableSRH bool
	// DisableAuger removes band-to-band Auger recombination.
	DisableAuger bool
	// DisableRadiative removes radiative recombination.
	DisableRadiative bool
	// TrapLevel is the SRH trap energy relative to the intrinsic level,
	// Et - Ei in eV (0 = mid-gap).
	TrapLevel float64
}

// Options tunes the solver. The zero value gives the defaults named in each
// field.
type Options struct {
	// Mesh chooses the node positions.
	Mesh MeshOptions
	// Recombination selects the recombination terms.
	Recombination Recombination
	// MaxIterations bounds the Newton iterations per bias step; 0 means 40.
	MaxIterations int
	// Tolerance is the convergence threshold on the infinity norm of the
	// Newton update, in units of kT/q; 0 means 1e-10.
	Tolerance float64
	// MaxBiasStep is the largest continuation step in forward bias, V; 0
	// means 0.1. In reverse bias the step may grow to a quarter of the
	// bias (a tenth when returning toward zero).
	MaxBiasStep float64
	// MinBiasStep is the smallest step after repeated halving before the
	// solver gives up, V; 0 means 1e-4.
	MinBiasStep float64
	// GummelIterations is the number of decoupled Gummel sweeps that start
	// every bias step before the coupled Newton; 0 means 2, negative
	// disables them.
	GummelIterations int
	// CVStep is the bias difference dV used for C = -dQ/dV, V; 0 means
	// 5e-3.
	CVStep float64
	// CVMode chooses whether the dopant occupation follows the small
	// signal (CVLowFrequency, the default) or is frozen at its
	// steady-state value (CVHighFrequency). It matters only with
	// Device.Occupation.
	CVMode CVMode
}

// CVMode is the small-signal assumption of a C-V point.
type CVMode int

// The C-V modes.
const (
	// CVLowFrequency: quasi-static; the dopant occupation follows the
	// signal (both solutions of dQ/dV are full steady states).
	CVLowFrequency CVMode = iota
	// CVHighFrequency: the dopant occupation is frozen at its value at V
	// - dV/2 when the second solution of dQ/dV is taken (deep levels that
	// cannot follow the signal).
	CVHighFrequency
)

// String returns the label of the mode as written in outputs.
func (m CVMode) String() string {
	if m == CVHighFrequency {
		return "high-frequency"
	}
	return "low-frequency"
}

func (o Options) withDefaults() Options {
	if o.MaxIterations <= 0 {
		o.MaxIterations = 40
	}
	if o.Tolerance <= 0 {
		o.Tolerance = 1e-10
	}
	if o.MaxBiasStep <= 0 {
		o.MaxBiasStep = 0.1
	}
	if o.MinBiasStep <= 0 {
		o.MinBiasStep = 1e-4
	}
	if o.GummelIterations == 0 {
		o.GummelIterations = 2
	}
	if o.CVStep <= 0 {
		o.CVStep = 5e-3
	}
	if o.Mesh.MaxReverseBias <= 0 {
		o.Mesh.MaxReverseBias = 5
	}
	return o
}

func (o Options) validate() error {
	switch {
	case math.IsNaN(o.Tolerance) || o.Tolerance > 1e-3:
		return paramErr("Options.Tolerance", o.Tolerance, "in (0, 1e-3] (kT/q)", "a looser tolerance would return unconverged solutions")
	case !physics.Finite(o.MaxBiasStep) || o.MaxBiasStep > 1:
		return paramErr("Options.MaxBiasStep", o.MaxBiasStep, "in (0, 1] V", "continuation needs moderate steps")
	case !physics.Finite(o.MinBiasStep) || o.MinBiasStep > o.MaxBiasStep:
		return paramErr("Options.MinBiasStep", o.MinBiasStep, fmt.Sprintf("in (0, MaxBiasStep = %s] V", fv(o.MaxBiasStep)), "the step is halved down to it")
	case o.CVMode != CVLowFrequency && o.CVMode != CVHighFrequency:
		return &ParamError{Field: "Options.CVMode", Value: fmt.Sprint(int(o.CVMode)), Allowed: "CVLowFrequency (0) or CVHighFrequency (1)", Why: "the small-signal assumption of C-V"}
	case !physics.Finite(o.CVStep) || o.CVStep > 0.1:
		return paramErr("Options.CVStep", o.CVStep, "in (0, 0.1] V", "dQ/dV needs a small bias difference")
	case !physics.Finite(o.Mesh.MaxReverseBias) || o.Mesh.MaxReverseBias > 1e5:
		return paramErr("Options.Mesh.MaxReverseBias", o.Mesh.MaxReverseBias, "in (0, 1e5] V", "sizes the refined depletion zone")
	case o.Mesh.Nodes < 0 || o.Mesh.Nodes == 1 || o.Mesh.Nodes == 2 || o.Mesh.Nodes > 200000:
		return &ParamError{Field: "Options.Mesh.Nodes", Value: fmt.Sprint(o.Mesh.Nodes), Allowed: "0 (automatic) or 3 to 200000", Why: "node count of the mesh"}
	case o.Mesh.MaxNodes < 0 || (o.Mesh.MaxNodes > 0 && o.Mesh.MaxNodes < 3):
		return &ParamError{Field: "Options.Mesh.MaxNodes", Value: fmt.Sprint(o.Mesh.MaxNodes), Allowed: "0 (20000) or >= 3", Why: "cap on the automatic node count"}
	case math.IsNaN(o.Mesh.Density) || o.Mesh.Density < 0 || o.Mesh.Density > 100:
		return paramErr("Options.Mesh.Density", o.Mesh.Density, "in [0, 100] (0 = 1)", "multiplier of the automatic node density")
	case !physics.Finite(o.Recombination.TrapLevel) || math.Abs(o.Recombination.TrapLevel) > 2:
		return paramErr("Options.Recombination.TrapLevel", o.Recombination.TrapLevel, "within +-2 eV of the intrinsic level", "a trap inside the gap")
	}
	return nil
}

// Solver holds a meshed, parameterised device. It is safe for concurrent
// use: every method works on its own buffers; the equilibrium solution is
// computed once and shared read-only.
type Solver struct {
	dev Device
	opt Options

	vt, ni, lnNi, eps, lam float64
	nc, nv                 float64
	donor                  string

	x, h, d            []float64    // nodes, spacings, box widths (m)
	xm                 []float64    // midpoints
	nd, na, ndi, nai   []float64    // chemical and ionised doping at nodes (m^-3)
	c                  []float64    // ionised net doping (m^-3; with occupation, that of local neutrality)
	occ                []Occupation // dopant levels per node; nil for fixed ionisation
	psiNeutral         []float64    // locally neutral equilibrium potential per node (kT/q)
	theta, lnNie, nie2 []float64    // ln(n_ie/ni), ln n_ie, n_ie^2
	tauN, tauP, n1, p1 []float64    // SRH parameters per node
	dn, dp             []float64    // diffusivities on edges (m^2/s)
	augN, augP, brad   float64
	srh                bool

	anodeLeft  bool
	ia, ic     int     // anode and cathode node indices
	psiA, psiC float64 // equilibrium contact potentials, kT/q
	junctions  []float64
	jEdge      int     // -1 when the profile has no junction
	jNode      int     // node nearest the main metallurgical junction
	xj         float64 // the main metallurgical junction, m
	jPart      float64 // length from the left edge midpoint of jNode's box to xj, m
	jPartNd    float64 // donors integrated over that length, m^-2
	jPartNa    float64 // acceptors integrated over that length, m^-2
	zones      []zone
	meshCapped int // nodes the automatic mesh wanted when MaxNodes capped it
	flags      []physics.Flag
	gen        []float64 // optical generation integrated over each node's box, m^-2 s^-1 (nil in the dark)
	genTotal   float64   // optical generation integrated over the device, m^-2 s^-1

	eqOnce sync.Once
	eq     *state
	eqRes  *Result
	eqErr  error
}

// Nodes returns a copy of the node positions, m.
func (s *Solver) Nodes() []float64 { return append([]float64(nil), s.x...) }

// Junctions returns the metallurgical junctions (zero crossings of the net
// doping), m.
func (s *Solver) Junctions() []float64 { return append([]float64(nil), s.junctions...) }

// Device returns the device the solver was built for.
func (s *Solver) Device() Device { return s.dev }

// ThermalVoltage returns kT/q at the device temperature, V.
func (s *Solver) ThermalVoltage() float64 { return s.vt }

// Flags returns the bias-independent validity warnings (temperature
// outside the material's ranges, degenerate doping, capped mesh).
func (s *Solver) Flags() []physics.Flag { return append([]physics.Flag(nil), s.flags...) }

// New validates the device and options, builds the mesh and the node
// parameters, and returns a Solver. Errors are *ParamError values naming
// the field.
//
// Node parameters: doping as the average of the profile over the node's
// box (exact dopant count per box, by 4-point Gauss-Legendre quadrature
// split at profile knots); mobility Material.Mobility(carrier, Nd+ + Na-,
// T, donor) at nodes, averaged arithmetically onto edges, D = mu kT/q
// (physics.Diffusivity); SRH lifetimes physics.SRHLifetime at Nd + Na, or
// Device.TauN/TauP.
//
// Automatic mesh: target spacing h(x) = min of L/30; 0.08 L_diff (the
// minority diffusion length at the local doping); max(0.2 / |d ln|N|/dx|,
// 0.25 L_D) where the doping varies; and, in the zone around each junction
// that spans the depletion-approximation edges (for the actual profile)
// from zero to Options.Mesh.MaxReverseBias plus 6 Debye lengths,
// min(W0/50, 0.25 L_D) with W0 the zero-bias width and L_D = sqrt(eps kT /
// (q^2 |N|)) the local Debye length; at every abrupt doping step (a knot
// where |N| jumps by more than 20 % or changes sign) 0.2 L_D of the heavy
// side, growing by 15 % of the distance from the step. h is then limited
// to grow by 15 % per cell (and kept above a floor between L/(4 MaxNodes)
// and 4096 times less, the finest that keeps the auxiliary grid within 8
// points per node of the cap), the nodes are placed by equidistributing
// 1/h, and each step is moved to the middle of its cell (the shift fading
// over 8 cells on each side), so that each box holds one side's doping;
// under monochromatic light (Device.Light) h is also kept below 0.1
// (1/alpha + depth) from the illuminated contact; when more than MaxNodes
// nodes would be needed the count is capped and flagged (FlagMeshCapped).
func New(dev Device, opt Options) (*Solver, error) {
	if err := opt.validate(); err != nil {
		return nil, err
	}
	opt = opt.withDefaults()
	m := dev.Material
	if m == nil {
		return nil, &ParamError{Field: "Device.Material", Value: "nil", Allowed: "a material (physics.MaterialByName)", Why: "every parameter comes from it"}
	}
	t := dev.Temperature
	if !finitePos(t) || t < 1 || t > 2000 {
		return nil, paramErr("Device.Temperature", t, "in [1, 2000] K", "the lattice temperature")
	}
	if !finitePos(dev.Length) || dev.Length > 1 {
		return nil, paramErr("Device.Length", dev.Length, "in (0, 1] m", "the device length")
	}
	if dev.Ionisation != nil && dev.Occupation != nil {
		return nil, &ParamError{Field: "Device.Occupation", Value: "set together with Device.Ionisation", Allowed: "at most one of the two", Why: "both set the ionised dopant densities"}
	}
	if err := dev.Profile.Validate(); err != nil {
		if pe, ok := err.(*ParamError); ok && pe.Field != "Profile" {
			pe2 := *pe
			pe2.Field = "Device." + pe.Field
			return nil, &pe2
		}
		return nil, err
	}
	if err := validateLight(dev.Light); err != nil {
		return nil, err
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"Device.TauN", dev.TauN}, {"Device.TauP", dev.TauP}} {
		if math.IsNaN(c.v) || c.v < 0 || math.IsInf(c.v, 0) {
			return nil, paramErr(c.name, c.v, ">= 0 and finite (s; 0 = doping-dependent default)", "a carrier lifetime")
		}
	}
	donor := dev.DonorSpecies
	if donor == "" {
		donor = m.DefaultDonor
	}
	if dd, ok := m.Dopant(donor); !ok || !dd.Donor {
		return nil, &ParamError{Field: "Device.DonorSpecies", Value: fmt.Sprintf("%q", dev.DonorSpecies), Allowed: fmt.Sprintf("a donor of %s: %v", m.Name, m.DopantNames(true)), Why: "selects the mobility model"}
	} else {
		donor = dd.Name
	}
	acc := dev.AcceptorSpecies
	if acc == "" {
		acc = m.DefaultAcceptor
	}
	if da, ok := m.Dopant(acc); !ok || da.Donor {
		return nil, &ParamError{Field: "Device.AcceptorSpecies", Value: fmt.Sprintf("%q", dev.AcceptorSpecies), Allowed: fmt.Sprintf("an acceptor of %s: %v", m.Name, m.DopantNames(false)), Why: "names the dopant"}
	}

	s := &Solver{dev: dev, opt: opt, donor: donor}
	s.vt = physics.ThermalVoltage(t)
	s.ni = m.Ni(t)
	if !finitePos(s.ni) {
		return nil, paramErr("Device.Temperature", t, "a temperature at which the material's ni is positive and finite", fmt.Sprintf("ni = %s m^-3", fv(s.ni)))
	}
	s.lnNi = math.Log(s.ni)
	s.eps = m.Permittivity()
	s.lam = s.eps * s.vt / physics.Q
	s.nc, s.nv = m.Nc(t), m.Nv(t)
	rec := opt.Recombination
	s.srh = !rec.DisableSRH
	if !rec.DisableAuger {
		s.augN, s.augP = m.Lifetime.AugerN, m.Lifetime.AugerP
	}
	if !rec.DisableRadiative {
		s.brad = m.Lifetime.Radiative
	}

	// Contacts and junctions from the profile.
	netL, netR := dev.Profile.NetAt(0), dev.Profile.NetAt(dev.Length)
	if sign(netL)*sign(netR) >= 0 {
		return nil, &ParamError{Field: "Device.Profile", Value: fmt.Sprintf("net doping %s m^-3 at x = 0 and %s m^-3 at x = Length", fv(netL), fv(netR)),
			Allowed: "p-type at one contact and n-type at the other", Why: "a diode needs a pn junction between its contacts"}
	}
	s.anodeLeft = netL < 0
	s.junctions = findJunctions(dev.Profile, dev.Length)

	env := &meshEnv{length: dev.Length, prof: dev.Profile, eps: s.eps, vt: s.vt, ni: s.ni, temp: t,
		junctions: s.junctions, vr: opt.Mesh.MaxReverseBias, lDiff: s.diffusionLength}
	env.minFloor, env.maxFloor = meshFloors(dev.Length, opt.Mesh)
	env.floor = env.maxFloor
	env.steps = env.findSteps()
	if l := dev.Light; l.PhotonFlux > 0 && l.Absorption > 0 {
		env.absorb = l.Absorption
		if s.anodeLeft == l.FromN { // the illuminated contact is at x = Length
			env.surface = dev.Length
		}
	}
	s.zones = env.zones()
	if len(opt.Mesh.Positions) > 0 {
		if err := checkPositions(opt.Mesh.Positions, dev.Length); err != nil {
			return nil, err
		}
		s.x = append([]float64(nil), opt.Mesh.Positions...)
		s.x[0], s.x[len(s.x)-1] = 0, dev.Length
	} else {
		var wanted int
		s.x, wanted = env.autoMesh(opt.Mesh, s.zones)
		if opt.Mesh.Nodes == 0 && wanted > len(s.x)-1 {
			s.meshCapped = wanted + 1
		}
	}
	if err := s.setupNodes(); err != nil {
		return nil, err
	}
	s.setupGeneration()
	s.flags = s.staticFlags()
	return s, nil
}

// diffusionLength returns the minority-carrier diffusion length (m) at
// position-independent doping net (m^-3) for mesh sizing: sqrt(D tau) with
// the minority mobility and the low-injection lifetime (SRH, plus Auger
// and radiative when enabled). Source: Sze & Ng 2007, eq. 2.60.
func (s *Solver) diffusionLength(_ float64, net float64) float64 {
	m, t := s.dev.Material, s.dev.Temperature
	n := math.Abs(net)
	c := physics.Hole
	tauUser := s.dev.TauP
	if net < 0 {
		c = physics.Electron
		tauUser = s.dev.TauN
	}
	parts := m.MinorityLifetime(c, math.Max(n, 1))
	inv := 0.0
	if s.srh {
		if tauUser > 0 {
			inv += 1 / tauUser
		} else {
			inv += 1 / parts.SRH
		}
	}
	if s.augN > 0 || s.augP > 0 {
		inv += 1 / parts.Auger
	}
	if s.brad > 0 {
		inv += 1 / parts.Radiative
	}
	if !(inv > 0) {
		return 0
	}
	d := physics.Diffusivity(m.Mobility(c, n, t, s.donor), t)
	return math.Sqrt(d / inv)
}

// boxAverage returns the mean donor and acceptor concentrations over [a, b].
func boxAverage(p Profile, knots []float64, a, b float64) (nd, na float64) {
	if !(b > a) {
		return p.At(a)
	}
	pts := []float64{a}
	k := sort.SearchFloat64s(knots, a)
	for ; k < len(knots) && knots[k] < b; k++ {
		if knots[k] > a {
			pts = append(pts, knots[k])
		}
	}
	pts = append(pts, b)
	// 4-point Gauss-Legendre nodes and weights on [-1, 1] (Abramowitz &
	// Stegun, Handbook of Mathematical Functions, Table 25.4).
	gauss4 := [4][2]float64{
		{-0.8611363115940526, 0.3478548451374538},
		{-0.3399810435848563, 0.6521451548625461},
		{0.3399810435848563, 0.6521451548625461},
		{0.8611363115940526, 0.3478548451374538},
	}
	for i := 0; i+1 < len(pts); i++ {
		l, r := pts[i], pts[i+1]
		c, hw := 0.5*(l+r), 0.5*(r-l)
		for _, g := range gauss4 {
			d, acc := p.At(c + hw*g[0])
			nd += g[1] * hw * d
			na += g[1] * hw * acc
		}
	}
	return nd / (b - a), na / (b - a)
}

// setupNodes fills the per-node and per-edge parameters.
func (s *Solver) setupNodes() error {
	dev, m, t := s.dev, s.dev.Material, s.dev.Temperature
	n := len(s.x)
	s.h = make([]float64, n-1)
	s.xm = make([]float64, n-1)
	for i := range s.h {
		s.h[i] = s.x[i+1] - s.x[i]
		s.xm[i] = 0.5 * (s.x[i] + s.x[i+1])
	}
	s.d = make([]float64, n)
	mk := func() []float64 { return make([]float64, n) }
	s.nd, s.na, s.ndi, s.nai, s.c = mk(), mk(), mk(), mk(), mk()
	s.theta, s.lnNie, s.nie2, s.psiNeutral = mk(), mk(), mk(), mk()
	s.tauN, s.tauP, s.n1, s.p1 = mk(), mk(), mk(), mk()
	mun, mup := mk(), mk()
	knots := dev.Profile.Knots()
	et := s.opt.Recombination.TrapLevel / s.vt
	for i := 0; i < n; i++ {
		a, b := s.x[i], s.x[i]
		if i > 0 {
			a -= 0.5 * s.h[i-1]
			s.d[i] += 0.5 * s.h[i-1]
		}
		if i < n-1 {
			b += 0.5 * s.h[i]
			s.d[i] += 0.5 * s.h[i]
		}
		if i == 0 || i == n-1 {
			// Contacts: the boundary condition is neutrality at the
			// contact plane itself, so the point value is used there.
			s.nd[i], s.na[i] = dev.Profile.At(s.x[i])
		} else {
			s.nd[i], s.na[i] = boxAverage(dev.Profile, knots, a, b)
		}
		s.ndi[i], s.nai[i] = s.nd[i], s.na[i]
		if dev.Ionisation != nil {
			p, q := dev.Ionisation(s.x[i], s.nd[i], s.na[i])
			if !(p >= 0) || !(q >= 0) || !physics.Finite(p) || !physics.Finite(q) {
				return &ParamError{Field: "Device.Ionisation", Value: fmt.Sprintf("(%s, %s) at x = %s m", fv(p), fv(q), fv(s.x[i])), Allowed: "ionised densities >= 0 and finite", Why: "they enter Poisson's equation"}
			}
			s.ndi[i], s.nai[i] = p, q
		}
		s.lnNie[i] = s.lnNi
		if dev.IntrinsicDensity != nil {
			v := dev.IntrinsicDensity(s.x[i], s.nd[i], s.na[i])
			if !finitePos(v) {
				return &ParamError{Field: "Device.IntrinsicDensity", Value: fmt.Sprintf("%s at x = %s m", fv(v), fv(s.x[i])), Allowed: "> 0 and finite (m^-3)", Why: "an effective intrinsic density"}
			}
			s.lnNie[i] = math.Log(v)
		}
		s.c[i] = s.ndi[i] - s.nai[i]
		s.psiNeutral[i] = math.Asinh(s.c[i] / (2 * math.Exp(s.lnNie[i])))
		if dev.Occupation != nil {
			o := dev.Occupation(s.x[i], s.nd[i], s.na[i])
			if err := o.validate(s.x[i]); err != nil {
				return err
			}
			if s.occ == nil {
				s.occ = make([]Occupation, n)
			}
			s.occ[i] = o
			s.psiNeutral[i], s.c[i] = s.neutralPotential(i)
			// The neutral-region ionised densities (for mobility, flags).
			fd, _ := occupied(math.Exp(s.lnNie[i]+s.psiNeutral[i]), o.DonorN1, o.DonorBound)
			fa, _ := occupied(math.Exp(s.lnNie[i]-s.psiNeutral[i]), o.AcceptorP1, o.AcceptorBound)
			s.ndi[i], s.nai[i] = s.nd[i]*fd, s.na[i]*fa
		}
		s.theta[i] = s.lnNie[i] - s.lnNi
		s.nie2[i] = math.Exp(2 * s.lnNie[i])
		ntot := s.ndi[i] + s.nai[i]
		mun[i] = m.Mobility(physics.Electron, ntot, t, s.donor)
		mup[i] = m.Mobility(physics.Hole, ntot, t, s.donor)
		chem := s.nd[i] + s.na[i]
		s.tauN[i], s.tauP[i] = dev.TauN, dev.TauP
		if dev.TauN == 0 {
			s.tauN[i] = physics.SRHLifetime(m.Lifetime.TauMaxN, m.Lifetime.NRefN, chem)
		}
		if dev.TauP == 0 {
			s.tauP[i] = physics.SRHLifetime(m.Lifetime.TauMaxP, m.Lifetime.NRefP, chem)
		}
		s.n1[i] = math.Exp(s.lnNie[i] + et)
		s.p1[i] = math.Exp(s.lnNie[i] - et)
		if s.srh && !(s.tauN[i] > 0 && s.tauP[i] > 0) {
			return paramErr("Device.Material.Lifetime", math.Min(s.tauN[i], s.tauP[i]), "> 0 (s)", "SRH recombination needs positive lifetimes")
		}
	}
	s.dn = make([]float64, n-1)
	s.dp = make([]float64, n-1)
	for k := 0; k < n-1; k++ {
		s.dn[k] = physics.Diffusivity(0.5*(mun[k]+mun[k+1]), t)
		s.dp[k] = physics.Diffusivity(0.5*(mup[k]+mup[k+1]), t)
		if !finitePos(s.dn[k]) || !finitePos(s.dp[k]) {
			return paramErr("Device.Material (mobility)", math.Min(s.dn[k], s.dp[k]), "> 0 and finite", fmt.Sprintf("diffusivity at x = %s m", fv(s.xm[k])))
		}
	}
	if s.anodeLeft {
		s.ia, s.ic = 0, n-1
	} else {
		s.ia, s.ic = n-1, 0
	}
	if sign(s.c[0])*sign(s.c[n-1]) >= 0 {
		return &ParamError{Field: "Device.Ionisation", Value: "same sign at both contacts", Allowed: "p-type at one contact and n-type at the other", Why: "a diode needs a pn junction"}
	}
	s.psiA, s.psiC = s.psiNeutral[s.ia], s.psiNeutral[s.ic]
	// The main junction (the first seen from the anode) and the node
	// nearest to it, where the search for the electrical junction starts.
	s.jEdge = -1
	if len(s.junctions) > 0 {
		xj := s.junctions[0]
		if !s.anodeLeft {
			xj = s.junctions[len(s.junctions)-1]
		}
		m := 0
		for i, v := range s.x {
			if math.Abs(v-xj) < math.Abs(s.x[m]-xj) {
				m = i
			}
		}
		s.jNode = min(max(m, 1), n-2)
		s.jEdge = s.jNode
		s.xj = xj
		// Part of the node's box between its left edge midpoint and the
		// junction, and its chemical dopant counts, for the field at the
		// junction and the split of the node's charge between the sides.
		m = s.jNode
		a := s.xm[m-1]
		s.jPart = math.Max(xj-a, 0)
		if s.jPart > 0 {
			nd, na := boxAverage(dev.Profile, knots, a, xj)
			s.jPartNd, s.jPartNa = nd*s.jPart, na*s.jPart
		}
	}
	return nil
}

// Flag codes added by the solver (the physics.Flag* codes are used for
// temperature and degeneracy).
const (
	// FlagHighInjection: a minority density exceeds 10 % of the majority
	// density at a quasi-neutral edge; low-injection formulas do not apply.
	FlagHighInjection = "high-injection"
	// FlagNoDepletion: no depleted region was found (forward bias near or
	// beyond flat band, or high injection).
	FlagNoDepletion = "no-depletion"
	// FlagMeshZone: a depletion edge lies outside the refined mesh zone
	// (raise Options.Mesh.MaxReverseBias).
	FlagMeshZone = "mesh-zone"
	// FlagReachThrough: the depletion region reaches a contact.
	FlagReachThrough = "reach-through"
	// FlagCurrentUnresolved: Jn + Jp is not constant along the device to
	// 1e-6 relative; the terminal current is below the solver's
	// resolution.
	FlagCurrentUnresolved = "current-unresolved"
	// FlagMeshCapped: the automatic mesh wanted more nodes than
	// Options.Mesh.MaxNodes allows; accuracy is reduced.
	FlagMeshCapped = "mesh-capped"
)

func (s *Solver) staticFlags() []physics.Flag {
	m, t := s.dev.Material, s.dev.Temperature
	var f []physics.Flag
	if t < m.TMin || t > m.TMax {
		f = append(f, physics.Flag{Code: physics.FlagTemperatureRange, Affects: []physics.Class{physics.ClassAll},
			Message: fmt.Sprintf("%g K is outside %g-%g K, the range %s's parameters are trusted over", t, m.TMin, m.TMax, m.Name)})
	}
	if t < m.MobilityTMin || t > m.MobilityTMax {
		f = append(f, physics.Flag{Code: physics.FlagMobilityRange, Affects: []physics.Class{physics.ClassCurrent},
			Message: fmt.Sprintf("mobility model used outside its %g-%g K range", m.MobilityTMin, m.MobilityTMax)})
	}
	if m.NiFit != nil && (t < m.NiFit.TMin || t > m.NiFit.TMax) {
		f = append(f, physics.Flag{Code: physics.FlagNiFitRange, Affects: []physics.Class{physics.ClassBuiltIn, physics.ClassCurrent},
			Message: fmt.Sprintf("intrinsic density extrapolated: the fit of %s covers %g-%g K", m.NiFit.Source, m.NiFit.TMin, m.NiFit.TMax)})
	}
	if s.meshCapped > 0 {
		f = append(f, physics.Flag{Code: FlagMeshCapped, Affects: []physics.Class{physics.ClassAll},
			Message: fmt.Sprintf("the profile asks for %d nodes; the mesh was capped at %d (Options.Mesh.MaxNodes): results are less accurate", s.meshCapped, len(s.x))})
	}
	for i := range s.x {
		if s.ndi[i] > 0.1*s.nc || s.nai[i] > 0.1*s.nv {
			f = append(f, physics.Flag{Code: physics.FlagDegenerate, Affects: []physics.Class{physics.ClassBuiltIn, physics.ClassCurrent},
				Message: fmt.Sprintf("doping above a tenth of the effective density of states near x = %.4g um: the solver's Boltzmann statistics and complete ionisation are doubtful there", s.x[i]*1e6)})
			break
		}
	}
	return f
}

// FromPhysics builds a solver Device from the analytic model's device: an
// abrupt or linearly graded junction at x = pLength with p-type material
// (anode) on the left and n-type on the right, total length pLength +
// nLength (m). Temperature, dopings, species and lifetime overrides are
// copied; d.Area and d.Wp/d.Wn are not used (the lengths are physical
// region lengths, not quasi-neutral widths). The solver's contacts are
// ohmic, so d.Sp and d.Sn must be +Inf.
//
// Note on lifetimes: the analytic model's TauN/TauP override replaces the
// whole minority lifetime, while the solver adds Auger and radiative
// recombination to a user SRH lifetime unless they are disabled in
// Options.Recombination.
func FromPhysics(d physics.Device, pLength, nLength float64) (Device, error) {
	if d.Material == nil {
		return Device{}, &ParamError{Field: "Device.Material", Value: "nil", Allowed: "a material", Why: "every parameter comes from it"}
	}
	if !finitePos(pLength) {
		return Device{}, paramErr("pLength", pLength, "> 0 and finite (m)", "length of the p region")
	}
	if !finitePos(nLength) {
		return Device{}, paramErr("nLength", nLength, "> 0 and finite (m)", "length of the n region")
	}
	if !finitePos(d.Na) || !finitePos(d.Nd) {
		return Device{}, paramErr("Na/Nd", math.Min(d.Na, d.Nd), "> 0 and finite (m^-3)", "region dopings")
	}
	if !math.IsInf(d.Sp, 1) {
		return Device{}, paramErr("Sp", d.Sp, "+Inf (ohmic)", "the solver models ohmic contacts only")
	}
	if !math.IsInf(d.Sn, 1) {
		return Device{}, paramErr("Sn", d.Sn, "+Inf (ohmic)", "the solver models ohmic contacts only")
	}
	out := Device{Material: d.Material, Temperature: d.Temperature, Length: pLength + nLength,
		DonorSpecies: d.DonorSpecies, AcceptorSpecies: d.AcceptorSpecies, TauN: d.TauN, TauP: d.TauP}
	switch d.Profile {
	case physics.LinearGraded:
		if !finitePos(d.Gradient) {
			return Device{}, paramErr("Gradient", d.Gradient, "> 0 and finite (m^-4)", "slope of the graded junction")
		}
		out.Profile = Profile{
			Donors:    []Shape{LinearGraded{Position: pLength, Gradient: d.Gradient, Max: d.Nd}},
			Acceptors: []Shape{LinearGraded{Position: pLength, Gradient: -d.Gradient, Max: d.Na}},
		}
	default:
		out.Profile = StepProfile(d.Na, d.Nd, pLength)
	}
	return out, nil
}
