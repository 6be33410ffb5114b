package solver

import (
	"fmt"
	"math"
	"sort"

	"junco/physics"
)

// MeshOptions controls the node positions.
//
// By default the mesh is chosen from the doping profile (see New): a target
// local spacing h(x) is built from the local Debye length, the doping
// gradient, the minority diffusion length, the estimated depletion region
// of every junction and the heavy side's Debye length at every abrupt
// doping step, graded so that neighbouring cells differ by at most about
// 15 %, the nodes are placed by equidistribution of 1/h, and every abrupt
// step is centred in a cell.
type MeshOptions struct {
	// Positions, if set, are the node positions in m, used as given: they
	// must start at 0, end at Device.Length and increase strictly, with at
	// least 3 nodes. They override every other field.
	Positions []float64
	// Nodes, if > 0, sets the node count of the automatic mesh (3 to
	// 200000); the relative spacing stays the automatic one.
	Nodes int
	// MaxReverseBias is the largest reverse bias (V, a positive number) at
	// which the depletion region must be resolved; the refined zone around
	// each junction covers the depletion edges from forward bias up to it.
	// 0 means 5 V.
	MaxReverseBias float64
	// MaxNodes caps the automatic node count; 0 means 20000.
	MaxNodes int
	// Density multiplies the automatic node density (1 = default; 2 about
	// doubles the nodes). 0 means 1.
	Density float64
}

// Refinement constants of the automatic mesh (common practice; chosen so
// that doubling the mesh changes currents, widths and capacitances by
// well under 0.1 %).
const (
	meshCellsBase   = 30   // at least this many cells over the device
	meshDebye       = 0.25 // spacing <= 0.25 L_D where the potential can vary
	meshDiffusion   = 0.08 // spacing <= 0.08 L_diffusion of the minority carrier
	meshDopingLog   = 0.2  // |d ln N| <= 0.2 per cell where N varies slowly vs L_D
	meshJunction    = 50   // at least 50 cells across the zero-bias depletion width
	meshGrading     = 0.15 // neighbouring cells differ by <= ~15 %
	meshMarginDebye = 6    // zone margin beyond the depletion edge, in L_D
	meshAbsorption  = 0.1  // spacing <= 0.1 (1/alpha + depth) under monochromatic light

	meshDefaultMaxNodes = 20000 // node cap when MeshOptions.MaxNodes is 0
	meshAuxBudget       = 8     // auxiliary grid points per node of the cap
	meshFloorRange      = 4096  // finest / coarsest smallest spacing tried
	meshFloorStep       = 8     // coarsening factor of the floor per try
)

// Bisect returns the mesh with a node added at the middle of every
// interval (2n-1 nodes): the exact mesh doubling used in convergence
// checks.
func Bisect(x []float64) []float64 {
	if len(x) < 2 {
		return append([]float64(nil), x...)
	}
	out := make([]float64, 0, 2*len(x)-1)
	for i := 0; i < len(x)-1; i++ {
		out = append(out, x[i], 0.5*(x[i]+x[i+1]))
	}
	return append(out, x[len(x)-1])
}

// meshEnv is what the automatic mesh needs to know about the device.
type meshEnv struct {
	length    float64
	prof      Profile
	eps, vt   float64
	ni, temp  float64
	lDiff     func(x, net float64) float64 // minority diffusion length, m
	junctions []float64
	steps     []step // abrupt doping steps, sorted (findSteps)
	vr        float64
	floor     float64 // smallest spacing the auxiliary grid resolves, m
	minFloor  float64 // finest floor tried, m
	maxFloor  float64 // coarsest floor, m (the grid always fits)
	absorb    float64 // absorption coefficient of the monochromatic light, 1/m (0 = none)
	surface   float64 // position of the illuminated contact, m
}

// debye returns the extrinsic Debye length sqrt(eps kT/(q^2 |N|)) in m
// (Sze & Ng 2007, eq. 2.27; common practice for mesh sizing).
func (e *meshEnv) debye(absN float64) float64 {
	return math.Sqrt(e.eps * e.vt / (physics.Q * math.Max(absN, e.ni)))
}

// zone is the refined region around one junction.
type zone struct {
	lo, hi, h float64
}

// checkPositions validates an explicit mesh.
func checkPositions(x []float64, length float64) error {
	if len(x) < 3 {
		return &ParamError{Field: "Options.Mesh.Positions", Value: fmt.Sprintf("%d nodes", len(x)), Allowed: "at least 3 nodes", Why: "a box discretisation needs an interior node"}
	}
	tol := 1e-9 * length
	if math.Abs(x[0]) > tol {
		return paramErr("Options.Mesh.Positions[0]", x[0], "0", "the first node is the left contact")
	}
	if math.Abs(x[len(x)-1]-length) > tol {
		return paramErr(fmt.Sprintf("Options.Mesh.Positions[%d]", len(x)-1), x[len(x)-1], fmt.Sprintf("Device.Length = %s", fv(length)), "the last node is the right contact")
	}
	for i := 1; i < len(x); i++ {
		if !(x[i] > x[i-1]) || !physics.Finite(x[i]) {
			return paramErr(fmt.Sprintf("Options.Mesh.Positions[%d]", i), x[i], fmt.Sprintf("> Positions[%d] = %s", i-1, fv(x[i-1])), "nodes must increase strictly")
		}
	}
	return nil
}

// findJunctions returns the zero crossings of the net doping in (0, L),
// located by bisection between samples (knots, midpoints of knots and a
// uniform grid of 4000 points).
func findJunctions(p Profile, length float64) []float64 {
	xs := []float64{0, length}
	for _, k := range p.Knots() {
		if k > 0 && k < length {
			xs = append(xs, k)
		}
	}
	const nu = 4000
	for i := 1; i < nu; i++ {
		xs = append(xs, length*float64(i)/nu)
	}
	sort.Float64s(xs)
	m := len(xs)
	for i := 0; i+1 < m; i++ {
		xs = append(xs, 0.5*(xs[i]+xs[i+1]))
	}
	sort.Float64s(xs)
	var out []float64
	prevX, prevS := 0.0, 0.0
	for _, x := range xs {
		v := p.NetAt(x)
		s := sign(v)
		if s == 0 {
			continue
		}
		if prevS != 0 && s != prevS {
			a, b := prevX, x
			for it := 0; it < 200 && b-a > 1e-15*length; it++ {
				mid := 0.5 * (a + b)
				if sign(p.NetAt(mid)) == prevS {
					a = mid
				} else {
					b = mid
				}
			}
			xj := 0.5 * (a + b)
			if len(out) == 0 || xj-out[len(out)-1] > 1e-12*length {
				out = append(out, xj)
			}
		}
		prevX, prevS = x, s
	}
	return out
}

func sign(v float64) float64 {
	switch {
	case v > 0:
		return 1
	case v < 0:
		return -1
	}
	return 0
}

// sideIntegrals samples one side of a junction from xj toward limit and
// returns positions, cumulative |N| charge (m^-2) and cumulative first
// moment about xj (m^-1), by the trapezoidal rule on a geometric grid.
func sideIntegrals(p Profile, xj, limit float64) (pos, q, mom []float64) {
	dist := math.Abs(limit - xj)
	dir := 1.0
	if limit < xj {
		dir = -1
	}
	const k = 800
	d0 := math.Min(1e-11, dist/k)
	r := math.Pow(dist/d0, 1.0/(k-1))
	ds := []float64{0}
	for i := 0; i < k; i++ {
		ds = append(ds, d0*math.Pow(r, float64(i)))
	}
	ds[len(ds)-1] = dist
	for _, kn := range p.Knots() {
		if d := (kn - xj) * dir; d > 0 && d < dist {
			ds = append(ds, d)
		}
	}
	sort.Float64s(ds)
	pos = make([]float64, len(ds))
	q = make([]float64, len(ds))
	mom = make([]float64, len(ds))
	prevN := 0.0
	for i, d := range ds {
		pos[i] = d
		n := math.Abs(p.NetAt(xj + dir*d))
		if i > 0 {
			h := d - ds[i-1]
			q[i] = q[i-1] + 0.5*h*(n+prevN)
			mom[i] = mom[i-1] + 0.5*h*(n*d+prevN*ds[i-1])
		}
		prevN = n
	}
	return pos, q, mom
}

// interpCum returns the distance and moment at which the cumulative charge
// reaches qv (clamped at the end).
func interpCum(pos, q, mom []float64, qv float64) (d, m float64) {
	n := len(q)
	if qv >= q[n-1] {
		return pos[n-1], mom[n-1]
	}
	k := sort.SearchFloat64s(q, qv)
	if k == 0 {
		return 0, 0
	}
	s := (qv - q[k-1]) / (q[k] - q[k-1])
	return pos[k-1] + s*(pos[k]-pos[k-1]), mom[k-1] + s*(mom[k]-mom[k-1])
}

// estimateDepletion returns the depletion-approximation edges (distances
// from xj into the left and right sides, m) at reverse bias vr >= 0 for the
// actual profile between the limits lo < xj < hi: charge balance
// int |N| = Q on both sides and (q/eps) (M_left + M_right) = Vbi + vr,
// solved by bisection on Q (Sze & Ng 2007, section 2.2, generalised to an
// arbitrary profile). Vbi is estimated from the doping at the edges.
func (e *meshEnv) estimateDepletion(xj, lo, hi, vr float64) (dl, dr float64) {
	pl, ql, ml := sideIntegrals(e.prof, xj, lo)
	pr, qr, mr := sideIntegrals(e.prof, xj, hi)
	qmax := math.Min(ql[len(ql)-1], qr[len(qr)-1])
	solve := func(target float64) (float64, float64) {
		a, b := 0.0, qmax
		for it := 0; it < 100; it++ {
			mid := 0.5 * (a + b)
			_, m1 := interpCum(pl, ql, ml, mid)
			_, m2 := interpCum(pr, qr, mr, mid)
			if physics.Q/e.eps*(m1+m2) < target {
				a = mid
			} else {
				b = mid
			}
		}
		d1, _ := interpCum(pl, ql, ml, b)
		d2, _ := interpCum(pr, qr, mr, b)
		return d1, d2
	}
	// Vbi from the plateau maxima first, then from the doping at the edges.
	maxAbs := func(p []float64, dir float64) float64 {
		m := 0.0
		for _, d := range p {
			m = math.Max(m, math.Abs(e.prof.NetAt(xj+dir*d)))
		}
		return m
	}
	vbiOf := func(n1, n2 float64) float64 {
		return math.Max(physics.BuiltInPotential(n1, n2, e.ni, e.temp), e.vt)
	}
	vbi := vbiOf(maxAbs(pl, -1), maxAbs(pr, 1))
	for it := 0; it < 2; it++ {
		d1, d2 := solve(vbi)
		n1 := math.Abs(e.prof.NetAt(xj - d1))
		n2 := math.Abs(e.prof.NetAt(xj + d2))
		if n1 > 0 && n2 > 0 {
			vbi = vbiOf(n1, n2)
		}
	}
	return solve(vbi + vr)
}

// zones builds the refined zone of each junction.
func (e *meshEnv) zones() []zone {
	var out []zone
	for k, xj := range e.junctions {
		lo, hi := 0.0, e.length
		if k > 0 {
			lo = e.junctions[k-1]
		}
		if k+1 < len(e.junctions) {
			hi = e.junctions[k+1]
		}
		d1, d2 := e.estimateDepletion(xj, lo, hi, 0)
		w0 := d1 + d2
		r1, r2 := e.estimateDepletion(xj, lo, hi, e.vr)
		ldl := e.debye(math.Abs(e.prof.NetAt(xj - r1)))
		ldr := e.debye(math.Abs(e.prof.NetAt(xj + r2)))
		z := zone{
			lo: math.Max(0, xj-r1-meshMarginDebye*ldl),
			hi: math.Min(e.length, xj+r2+meshMarginDebye*ldr),
			h:  w0 / meshJunction,
		}
		if !(z.h > 0) {
			z.h = math.Min(ldl, ldr)
		}
		out = append(out, z)
	}
	return out
}

// target returns the wanted spacing at x.
func (e *meshEnv) target(x float64, zs []zone) float64 {
	h := e.length / meshCellsBase
	nd, na := e.prof.At(x)
	net := nd - na
	absN := math.Abs(net)
	if l := e.lDiff(x, net); l > 0 {
		h = math.Min(h, meshDiffusion*l)
	}
	ld := e.debye(absN)
	// Doping variation: d ln(|N| + ni)/dx by a central difference.
	dx := math.Min(1e-10, 1e-6*e.length)
	f := func(y float64) float64 { return math.Log(math.Abs(e.prof.NetAt(y)) + e.ni) }
	if g := math.Abs(f(x+dx)-f(x-dx)) / (2 * dx); g > 0 {
		h = math.Min(h, math.Max(meshDopingLog/g, meshDebye*ld))
	}
	for _, z := range zs {
		if x >= z.lo && x <= z.hi {
			h = math.Min(h, math.Min(z.h, meshDebye*ld))
		}
	}
	h = math.Min(h, e.stepSpacing(x))
	if e.absorb > 0 {
		// The minority carriers generated within a few absorption lengths
		// of an ohmic contact diffuse to it or to the junction: their
		// profile needs cells of a fraction of 1/alpha near the surface,
		// growing with the depth as the generation fades.
		h = math.Min(h, meshAbsorption*(1/e.absorb+math.Abs(x-e.surface)))
	}
	return math.Max(h, e.floor)
}

// autoMesh returns node positions for the device and the number of cells
// the target spacing asked for (before Nodes or MaxNodes applied).
func (e *meshEnv) autoMesh(opt MeshOptions, zs []zone) ([]float64, int) {
	// Seed points: ends, knots, junctions and zone limits.
	seed := []float64{0, e.length}
	for _, k := range e.prof.Knots() {
		if k > 0 && k < e.length {
			seed = append(seed, k)
		}
	}
	seed = append(seed, e.junctions...)
	for _, z := range zs {
		seed = append(seed, z.lo, z.hi)
	}
	sort.Float64s(seed)
	seed = dedupe(seed, 1e-14*e.length)

	// Adaptive auxiliary grid resolving the target spacing.
	type pt struct{ x, h float64 }
	var aux []pt
	budget := meshAuxBudget * max(opt.MaxNodes, opt.Nodes, meshDefaultMaxNodes)
	limit := budget // the coarsest floor is not limited: the grid fits
	var refine func(a, b, ha, hb float64, depth int)
	refine = func(a, b, ha, hb float64, depth int) {
		m := 0.5 * (a + b)
		hm := e.target(m, zs)
		if len(aux) <= limit && depth < 60 && b-a > 2*e.floor && b-a > 0.5*math.Min(hm, math.Min(ha, hb)) {
			refine(a, m, ha, hm, depth+1)
			refine(m, b, hm, hb, depth+1)
			return
		}
		aux = append(aux, pt{m, hm}, pt{b, hb})
	}
	// The finest spacing starts far below the mean spacing at the node
	// cap (a fraction of the heavy side's Debye length at an abrupt step
	// needs it) and is coarsened by meshFloorStep while the auxiliary
	// grid would exceed its budget, so that it stays O(MaxNodes) whatever
	// the profile asks for (at the coarsest floor, the former fixed one,
	// the grid holds at most about 8 points per node of the cap plus the
	// seeds, and is not cut).
	for e.floor = math.Min(e.minFloor, e.maxFloor); ; e.floor = math.Min(e.floor*meshFloorStep, e.maxFloor) {
		if e.floor >= e.maxFloor {
			limit = math.MaxInt
		}
		aux = aux[:0]
		over := false
		h0 := e.target(seed[0], zs)
		aux = append(aux, pt{seed[0], h0})
		for i := 0; i+1 < len(seed) && !over; i++ {
			ha := aux[len(aux)-1].h
			hb := e.target(seed[i+1], zs)
			refine(seed[i], seed[i+1], ha, hb, 0)
			over = len(aux) > limit
		}
		if !over {
			break
		}
	}
	// Grading: h Lipschitz with constant meshGrading, both directions.
	for i := 1; i < len(aux); i++ {
		aux[i].h = math.Min(aux[i].h, aux[i-1].h+meshGrading*(aux[i].x-aux[i-1].x))
	}
	for i := len(aux) - 2; i >= 0; i-- {
		aux[i].h = math.Min(aux[i].h, aux[i+1].h+meshGrading*(aux[i+1].x-aux[i].x))
	}
	// Cumulative cell count int dx/h with h linear between aux points.
	cum := make([]float64, len(aux))
	seg := func(i int) float64 { // integral over [aux[i-1], aux[i]]
		dx := aux[i].x - aux[i-1].x
		ha, hb := aux[i-1].h, aux[i].h
		if math.Abs(hb-ha) < 1e-9*ha {
			return dx / (0.5 * (ha + hb))
		}
		return dx * math.Log(hb/ha) / (hb - ha)
	}
	for i := 1; i < len(aux); i++ {
		cum[i] = cum[i-1] + seg(i)
	}
	total := cum[len(cum)-1]
	dens := opt.Density
	if dens <= 0 {
		dens = 1
	}
	cells := int(math.Min(math.Ceil(total*dens), 1e9))
	wanted := cells
	if opt.Nodes > 0 {
		cells = opt.Nodes - 1
	} else {
		maxN := opt.MaxNodes
		if maxN <= 0 {
			maxN = meshDefaultMaxNodes
		}
		cells = max(min(cells, maxN-1), 2)
	}
	x := make([]float64, cells+1)
	j := 1
	for k := 1; k < cells; k++ {
		t := total * float64(k) / float64(cells)
		for j < len(cum)-1 && cum[j] < t {
			j++
		}
		a, ha, hb := aux[j-1].x, aux[j-1].h, aux[j].h
		dx := aux[j].x - a
		tau := t - cum[j-1]
		s := (hb - ha) / dx
		var xv float64
		if math.Abs(s) < 1e-12 {
			xv = a + tau*ha
		} else {
			xv = a + ha*math.Expm1(s*tau)/s
		}
		x[k] = math.Min(math.Max(xv, a), aux[j].x)
	}
	x[0], x[cells] = 0, e.length
	// Guard against rounding ties.
	for k := 1; k <= cells; k++ {
		if !(x[k] > x[k-1]) {
			x[k] = math.Nextafter(x[k-1], math.Inf(1))
		}
	}
	centreSteps(x, e.steps)
	return x, wanted
}

// meshFloors returns the range of the smallest spacing the automatic mesh
// resolves (m): from a quarter of the mean spacing at the node cap
// (coarsest) down by meshFloorRange (finest); autoMesh takes the finest
// that keeps the auxiliary grid within its budget.
func meshFloors(length float64, opt MeshOptions) (finest, coarsest float64) {
	n := opt.MaxNodes
	if n <= 0 {
		n = meshDefaultMaxNodes
	}
	n = max(n, opt.Nodes)
	coarsest = length / (4 * float64(n))
	return coarsest / meshFloorRange, coarsest
}

func dedupe(s []float64, tol float64) []float64 {
	out := s[:0]
	for _, v := range s {
		if len(out) == 0 || v-out[len(out)-1] > tol {
			out = append(out, v)
		}
	}
	return out
}
