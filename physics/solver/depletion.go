package solver

import (
	"math"

	"junco/physics"
)

// sideCharge integrates the space charge of one side of the junction node
// m (dir = -1: the nodes left of xj, +1: right), sigma the sign of that
// side's net doping: q^-1 int max(0, sigma N - majority) dx, box by box
// (the junction node's box is split at xj with the profile's doping),
// from the junction to the first quasi-neutral node or stop (m). It
// returns the charge (m^-2) and, for the edge search, the chemical dopant
// count of each box in the walking order with its span (the edge is that
// of a fully ionised layer holding the charge, so that eps/W is the
// depletion capacitance also with incomplete ionisation).
func (s *Solver) sideCharge(st *state, n, p []float64, m, dir int, sigma float64, stop float64) (q float64, boxes []depBox) {
	maj := func(i int) float64 {
		if sigma > 0 {
			return n[i]
		}
		return p[i]
	}
	nn := len(s.x)
	// The junction node's part on this side.
	leftDop, rightDop := s.junctionSplit(st, n[m], p[m])
	part, dop := s.jPart, leftDop // [xm[m-1], xj]
	if dir > 0 {
		part, dop = s.d[m]-s.jPart, rightDop
	}
	if part > 0 {
		sd := sigma * dop
		q += math.Max(0, sd-maj(m)*part)
		chem := s.jPartNd - s.jPartNa
		if dir > 0 {
			chem = (s.nd[m]-s.na[m])*s.d[m] - chem
		}
		a, b := s.xj, s.xj+float64(dir)*part
		boxes = append(boxes, depBox{from: a, to: b, dopant: math.Max(sigma*chem, 0), node: m})
	}
	for i := m + dir; i >= 0 && i < nn; i += dir {
		if (dir > 0 && s.x[i] > stop) || (dir < 0 && s.x[i] < stop) {
			break
		}
		ci, _, _ := s.ionised(i, st, n[i], p[i])
		if math.Abs(p[i]-n[i]+ci) <= neutralStop*math.Abs(ci) {
			// Quasi-neutral: the depletion layer of this junction ends
			// here (beyond, a high-low junction has its own dipole).
			break
		}
		sd := sigma * ci * s.d[i]
		q += math.Max(0, sd-maj(i)*s.d[i])
		a, b := s.x[i], s.x[i]
		if i > 0 {
			a = s.xm[i-1]
		}
		if i < nn-1 {
			b = s.xm[i]
		}
		if dir < 0 {
			a, b = b, a
		}
		boxes = append(boxes, depBox{from: a, to: b, dopant: math.Max(sigma*(s.nd[i]-s.na[i])*s.d[i], 0), node: i})
	}
	return q, boxes
}

// neutralStop is the relative space charge |p - n + N|/|N| below which a
// node counts as quasi-neutral and ends the integration of a side: the
// Debye tail left out beyond it holds about neutralStop L_D |N| (common
// practice, chosen so that it is below 1e-3 of the charge of any
// resolved depletion layer).
const neutralStop = 1e-3

// depBox is one control volume on the walk away from the junction.
type depBox struct {
	from, to float64 // entry and exit positions, m
	dopant   float64 // sigma (Nd - Na) (chemical) integrated over the box, m^-2 (>= 0)
	node     int
}

// edgeFrom places the charge q (m^-2) as a depleted layer against the
// junction: the position where the dopant count of the boxes reaches q,
// interpolated linearly inside the box, the node there, and whether the
// count ran out (reach-through).
func edgeFrom(q float64, boxes []depBox) (x float64, node int, reach bool) {
	acc := 0.0
	for _, b := range boxes {
		if b.dopant > 0 && acc+b.dopant >= q {
			t := (q - acc) / b.dopant
			return b.from + t*(b.to-b.from), b.node, false
		}
		acc += b.dopant
	}
	last := boxes[len(boxes)-1]
	return last.to, last.node, true
}

// depletion finds the depletion edges (see Depletion).
func (s *Solver) depletion(st *state, n, p []float64) Depletion {
	dep := Depletion{W: math.NaN(), XAnode: math.NaN(), XCathode: math.NaN()}
	if s.jEdge < 0 {
		return dep
	}
	zi := 0
	if !s.anodeLeft {
		zi = len(s.junctions) - 1
	}
	z := s.zones[zi]
	dep.Junction = s.junctions[zi]
	// The neighbouring junctions (or the contacts) bound each side.
	lo, hi := 0.0, s.dev.Length
	if zi > 0 {
		lo = s.junctions[zi-1]
	}
	if zi+1 < len(s.junctions) {
		hi = s.junctions[zi+1]
	}
	sigL := -1.0
	if !s.anodeLeft {
		sigL = 1
	}
	m := s.jNode
	qL, boxL := s.sideCharge(st, n, p, m, -1, sigL, lo)
	qR, boxR := s.sideCharge(st, n, p, m, +1, -sigL, hi)
	if len(boxL) == 0 || len(boxR) == 0 {
		return dep
	}
	xl, nl, reachL := edgeFrom(qL, boxL)
	xh, nh, reachH := edgeFrom(qR, boxR)
	w := xh - xl
	// Debye length of the lighter side at its edge doping.
	nLight := math.Min(math.Abs(s.c[nl]), math.Abs(s.c[nh]))
	ld := math.Sqrt(s.eps * s.vt / (physics.Q * math.Max(nLight, s.ni)))
	if !(qL > 0 && qR > 0 && w > ld) {
		// No depleted region (flat band, high injection): the injection
		// is still read at the quasi-neutral edges, walking out from the
		// junction.
		dep.MinorityRatio = math.Max(s.injection(st, n, p, m, -1), s.injection(st, n, p, m, +1))
		return dep
	}
	dep.Valid = true
	dep.Field = physics.Q * math.Min(qL, qR) / s.eps
	if s.anodeLeft {
		dep.XAnode, dep.XCathode = xl, xh
	} else {
		dep.XAnode, dep.XCathode = xh, xl
	}
	dep.W = w
	dep.ReachThrough = reachL || reachH
	dep.OutsideZone = !dep.ReachThrough && (xl < z.lo || xh > z.hi)
	dep.MinorityRatio = math.Max(s.injection(st, n, p, nl, -1), s.injection(st, n, p, nh, +1))
	return dep
}

// injection returns the minority/majority ratio at the quasi-neutral edge
// beyond node i (walking in direction dir): the first node whose space
// charge |p - n + N| is below 1 % of |N| (the contact node if none); there
// the potential is within about 0.01 kT/q of the neutral value, so the
// ratio (which goes as e^(-2 psi/V_t)) is within about 2 %.
func (s *Solver) injection(st *state, n, p []float64, i, dir int) float64 {
	nn := len(s.x)
	for ; i >= 0 && i < nn; i += dir {
		c, _, _ := s.ionised(i, st, n[i], p[i])
		if math.Abs(p[i]-n[i]+c) <= 0.01*math.Abs(c) || i == 0 || i == nn-1 {
			if c > 0 {
				return p[i] / n[i]
			}
			return n[i] / p[i]
		}
	}
	return math.NaN()
}
