package physics

import (
	"fmt"
	"math"
	"sort"
)

// ProfileKind names the doping profile across the metallurgical junction.
type ProfileKind int

const (
	// Abrupt is the step junction: -Na for x < 0, +Nd for x > 0.
	Abrupt ProfileKind = iota
	// LinearGraded has net doping a x near the junction, limited by the
	// neutral-region dopings: N(x) = clamp(a x, -Na, +Nd).
	LinearGraded
)

// String returns "abrupt" or "linear".
func (p ProfileKind) String() string {
	if p == LinearGraded {
		return "linear"
	}
	return "abrupt"
}

// Junction describes the electrostatics of a pn junction: permittivity and
// net doping. x = 0 is the metallurgical junction; the p side is x < 0.
type Junction struct {
	Eps      float64     // permittivity, F/m
	Na, Nd   float64     // neutral-region acceptor and donor densities, m^-3
	Profile  ProfileKind // doping profile near x = 0
	Gradient float64     // net-doping gradient a of a LinearGraded profile, m^-4
}

// NetDoping returns the net doping N(x) = Nd+ - Na- in m^-3 at position x
// (m) in the depletion approximation's profile.
func (j Junction) NetDoping(x float64) float64 {
	if j.Profile == Abrupt {
		if x < 0 {
			return -j.Na
		}
		return j.Nd
	}
	return math.Max(-j.Na, math.Min(j.Nd, j.Gradient*x))
}

// chargeN returns the depleted charge per area / q on the n side, m^-2, for
// an edge at xn >= 0.
func (j Junction) chargeN(xn float64) float64 {
	if j.Profile == Abrupt {
		return j.Nd * xn
	}
	xd := j.Nd / j.Gradient
	if xn <= xd {
		return j.Gradient * xn * xn / 2
	}
	return j.Nd * (xn - xd/2)
}

// edgeP inverts the p-side charge: the p-side edge xp whose depleted charge
// per area / q equals qs (m^-2).
func (j Junction) edgeP(qs float64) float64 {
	if j.Profile == Abrupt {
		return qs / j.Na
	}
	xa := j.Na / j.Gradient
	if qs <= j.Gradient*xa*xa/2 {
		return math.Sqrt(2 * qs / j.Gradient)
	}
	return qs/j.Na + xa/2
}

// moment returns the first moment int_0^x s |N(s)| ds on one side (m^-1)
// for plateau density nPlat.
func (j Junction) moment(x, nPlat float64) float64 {
	if j.Profile == Abrupt {
		return nPlat * x * x / 2
	}
	xb := nPlat / j.Gradient
	if x <= xb {
		return j.Gradient * x * x * x / 3
	}
	return j.Gradient*xb*xb*xb/3 + nPlat*(x*x-xb*xb)/2
}

// Depletion is the depletion-approximation solution at one bias.
type Depletion struct {
	Vbi, V float64 // built-in potential and applied bias (forward positive), V
	// Tail is the part of Vbi - V carried by the majority-carrier tails at
	// the depletion edges, V (0 in the plain depletion approximation; see
	// SolveWithTails): the depleted region holds Drop() = Vbi - Tail - V.
	Tail      float64
	Xn, Xp, W float64 // depletion edges into the n and p sides and total width, m
	// PeakField is the magnitude of the field at x = 0, V/m (the field
	// points from n to p).
	PeakField float64
	// CapPerArea is the depletion capacitance per area eps/W, F/m^2.
	CapPerArea float64
	// Valid is false when the depletion approximation does not apply
	// (V >= Vbi); then all lengths, fields and capacitances are NaN and
	// Problem says why.
	Valid   bool
	Problem string
	j       Junction
}

// BuiltInPotential returns the equilibrium built-in potential of a junction
// between neutral regions of acceptor density na and donor density nd
// (m^-3), intrinsic density ni (m^-3) at temperature t (K).
//
// Formula: Vbi = (kT/q) ln(p0 n0 / ni^2) with the majority densities
// p0, n0 of MajorityDensity, i.e. (kT/q) ln(Na Nd / ni^2) when ni << Na, Nd.
// Units: V. Valid for non-degenerate, fully ionised dopings with
// Na Nd > ni^2. Source: Sze & Ng 2007, eq. 2.8 (section 2.2); Neamen 4th
// ed., eq. 7.10.
func BuiltInPotential(na, nd, ni, t float64) float64 {
	return ThermalVoltage(t) * math.Log(MajorityDensity(na, ni)*MajorityDensity(nd, ni)/(ni*ni))
}

// AbruptDepletion solves the step junction in the depletion approximation.
//
// Formulas (eps in F/m, N in m^-3, V forward positive, Vbi in V):
//
//	W  = sqrt(2 eps (Vbi - V) (Na + Nd) / (q Na Nd))
//	xn = W Na/(Na + Nd),  xp = W Nd/(Na + Nd)
//	Emax = q Nd xn / eps,  C' = eps / W
//
// Valid for V < Vbi (a warning is due within a few kT/q of Vbi, where the
// free-carrier tails matter). Source: Sze & Ng 2007, section 2.2.1,
// eqs. 2.10-2.14; Neamen 4th ed., eqs. 7.28-7.42.
func AbruptDepletion(eps, na, nd, vbi, v float64) Depletion {
	j := Junction{Eps: eps, Na: na, Nd: nd, Profile: Abrupt}
	d := Depletion{Vbi: vbi, V: v, j: j}
	if !(v < vbi) {
		return d.invalid()
	}
	d.W = math.Sqrt(2 * eps * (vbi - v) * (na + nd) / (Q * na * nd))
	d.Xn = d.W * na / (na + nd)
	d.Xp = d.W * nd / (na + nd)
	d.PeakField = Q * nd * d.Xn / eps
	d.CapPerArea = eps / d.W
	d.Valid = true
	return d
}

func (d Depletion) invalid() Depletion {
	nan := math.NaN()
	d.Xn, d.Xp, d.W, d.PeakField, d.CapPerArea = nan, nan, nan, nan, nan
	d.Valid = false
	d.Problem = fmt.Sprintf("bias %.4g V is at or above the built-in potential %.4g V: the depletion approximation does not apply", d.V, d.Vbi)
	if d.Tail > 0 {
		d.Problem = fmt.Sprintf("bias %.4g V is at or above the built-in potential %.4g V less the majority-carrier tails' %.3g V: the depletion approximation does not apply", d.V, d.Vbi, d.Tail)
	}
	return d
}

// Drop returns the potential across the depleted region, Vbi - Tail - V,
// V.
func (d Depletion) Drop() float64 { return d.Vbi - d.Tail - d.V }

// SolveWithTails is Solve with the majority-carrier tails at the
// depletion edges taken into account: the depleted region carries
// Vbi - V - tail (V) of the potential, the tails the rest.
//
// For the step junction tail = 2kT/q, one kT/q per side: W, Emax and the
// capacitance follow from (Vbi - V - 2kT/q) (Sze & Ng 2007, section 2.2.1,
// the correction below eq. 2.14, attributed there to the majority-carrier
// distribution tails; from memory, wording not verified). For the linearly
// graded junction the corresponding potential is the gradient voltage Vg of
// Chawla & Gummel (GradientVoltage; Sze & Ng 2007, eq. 2.38), i.e.
// tail = Vbi - Vg. Valid for V < Vbi - tail, and meaningful only while the
// depleted drop exceeds a few kT/q.
func (j Junction) SolveWithTails(vbi, tail, v float64) Depletion {
	d := Depletion{Vbi: vbi, V: v, Tail: tail, j: j}
	if !(v < vbi-tail) {
		return d.invalid()
	}
	d = j.Solve(vbi-tail, v)
	d.Vbi, d.Tail = vbi, tail
	return d
}

// GradientVoltage returns the gradient voltage of a linearly graded
// junction of gradient a (m^-4), permittivity eps (F/m), intrinsic density
// ni (m^-3) at temperature t (K), V:
//
//	Vg = (2kT/3q) ln(a^2 eps kT / (8 q^2 ni^3))
//
// the potential that, put in W = (12 eps (Vg - V)/(q a))^(1/3), gives the
// capacitance of the full solution with the majority-carrier tails
// (B. R. Chawla, H. K. Gummel, IEEE Trans. Electron Devices ED-18, 178
// (1971); Sze & Ng 2007, eq. 2.38, written there with kT in eV; the
// dimensionless form here is checked by its units). It lies below the
// eq.-2.37 built-in potential (2kT/q) ln(aW/2ni): Si, a = 1e20 cm^-4,
// 300 K: 0.570 V against 0.669 V. Valid while the depletion region lies
// inside the graded region.
func GradientVoltage(a, eps, ni, t float64) float64 {
	vt := ThermalVoltage(t)
	return 2 * vt / 3 * math.Log(a*a*eps*vt/(8*Q*ni*ni*ni))
}

// MajorityDensity returns the majority-carrier density of a neutral region
// with net ionised doping n (m^-3) and intrinsic density ni (m^-3), m^-3:
//
//	n0 = N/2 + sqrt(N^2/4 + ni^2)
//
// from charge neutrality n0 = N + ni^2/n0 with Boltzmann statistics
// (Sze & Ng 2007, section 1.4.3; Neamen 4th ed., eq. 4.60). It is N when
// ni << N and tends to ni in the intrinsic regime.
func MajorityDensity(n, ni float64) float64 {
	if ni < 1e-8*n {
		return n + ni*ni/n
	}
	return n/2 + math.Sqrt(n*n/4+ni*ni)
}

// Solve returns the depletion-approximation solution of junction j at bias
// v (V) for built-in potential vbi (V). For Abrupt it is AbruptDepletion;
// for LinearGraded it solves, by bisection on xn,
//
//	int_{-xp}^{xn} N(x) dx = 0   and   (q/eps) int x N(x) dx = Vbi - V
//
// with N(x) = clamp(a x, -Na, Nd). When the depletion region lies inside
// the graded region this gives W = (12 eps (Vbi - V)/(q a))^(1/3),
// Emax = q a W^2 / (8 eps) (Sze & Ng 2007, section 2.2.2, eqs. 2.33-2.36;
// Neamen 4th ed., section 7.5.1). Valid for V < Vbi.
func (j Junction) Solve(vbi, v float64) Depletion {
	if j.Profile == Abrupt {
		return AbruptDepletion(j.Eps, j.Na, j.Nd, vbi, v)
	}
	d := Depletion{Vbi: vbi, V: v, j: j}
	if !(v < vbi) {
		return d.invalid()
	}
	target := (vbi - v) * j.Eps / Q
	f := func(xn float64) (float64, float64) {
		xp := j.edgeP(j.chargeN(xn))
		return j.moment(xn, j.Nd) + j.moment(xp, j.Na) - target, xp
	}
	lo, hi := 0.0, 1e-9
	for {
		if g, _ := f(hi); g > 0 || hi > 10 {
			break
		}
		lo, hi = hi, hi*2
	}
	for i := 0; i < 200 && hi-lo > 1e-15*hi; i++ {
		mid := 0.5 * (lo + hi)
		if g, _ := f(mid); g > 0 {
			hi = mid
		} else {
			lo = mid
		}
	}
	d.Xn = 0.5 * (lo + hi)
	_, d.Xp = f(d.Xn)
	d.W = d.Xn + d.Xp
	d.PeakField = Q * j.chargeN(d.Xn) / j.Eps
	d.CapPerArea = j.Eps / d.W
	d.Valid = true
	return d
}

// GradedBuiltInPotential returns the equilibrium built-in potential of the
// LinearGraded junction j at temperature t (K) with intrinsic density ni
// (m^-3), solved self-consistently with its own depletion width.
//
// Formula: Vbi = (kT/q) ln(N(xn) |N(-xp)| / ni^2) with xn, xp the depletion
// edges at zero bias; inside the graded region this is the classic
// Vbi = (2kT/q) ln(a W / (2 ni)) (Sze & Ng 2007, eq. 2.37), and when the
// depletion edges reach the plateaus it tends to the abrupt value. Solved by
// fixed-point iteration (a contraction: the logarithm is flat). Valid for
// non-degenerate doping.
func (j Junction) GradedBuiltInPotential(ni, t float64) float64 {
	vt := ThermalVoltage(t)
	vbi := BuiltInPotential(j.Na, j.Nd, ni, t)
	if j.Profile == Abrupt {
		return vbi
	}
	for i := 0; i < 200; i++ {
		d := j.Solve(vbi, 0)
		nn := math.Abs(j.NetDoping(d.Xn))
		np := math.Abs(j.NetDoping(-d.Xp))
		next := vt * math.Log(MajorityDensity(nn, ni)*MajorityDensity(np, ni)/(ni*ni))
		if next <= 0 {
			return math.NaN()
		}
		if math.Abs(next-vbi) < 1e-13 {
			return next
		}
		vbi = next
	}
	return vbi
}

// ProfilePoint is one sample of the electrostatic profile across the
// junction.
type ProfilePoint struct {
	X         float64 // position, m (p side negative)
	Charge    float64 // space-charge density rho, C/m^3
	Field     float64 // electric field, V/m (negative: points from n to p)
	Potential float64 // electrostatic potential relative to the p-side edge, V
}

// Profile samples the depletion solution at about n points (n >= 8) from
// 1.25 xp into the p side to 1.25 xn into the n side; the edges and x = 0
// are always samples. Field: E(x) = (q/eps) int_{-xp}^{x} N dx; potential
// psi(x) = -int_{-xp}^{x} E dx, so that psi(xn) = Drop() (Vbi - V without
// tails). Returns nil
// when the solution is not Valid.
func (d Depletion) Profile(n int) []ProfilePoint {
	if !d.Valid {
		return nil
	}
	if n < 8 {
		n = 8
	}
	j := d.j
	// Points per segment: margins get an eighth each, the depleted sides
	// share the rest in proportion to their widths, but each side gets at
	// least a quarter of it, so that a side hundreds of times thinner than
	// the other is still resolved where a chart magnifies it.
	margin := n / 8
	inner := n - 2*margin - 1
	least := max(inner/4, 2)
	np := min(max(int(math.Round(float64(inner)*d.Xp/d.W)), least), inner-least)
	nn := inner - np
	xs := make([]float64, 0, n+4)
	seg := func(a, b float64, k int) {
		for i := 0; i < k; i++ {
			xs = append(xs, a+(b-a)*float64(i)/float64(k))
		}
	}
	seg(-1.25*d.Xp, -d.Xp, margin)
	seg(-d.Xp, 0, np)
	seg(0, d.Xn, nn)
	seg(d.Xn, 1.25*d.Xn, margin)
	xs = append(xs, 1.25*d.Xn)
	if j.Profile == LinearGraded {
		// The plateau corners are kinks of the field: make them samples so
		// that the quadrature below stays exact.
		xs = insertSorted(xs, j.Nd/j.Gradient, d.Xn)
		xs = insertSorted(xs, -j.Na/j.Gradient, -d.Xp)
	}

	field := func(x float64) float64 {
		switch {
		case x <= -d.Xp || x >= d.Xn:
			return 0
		case x <= 0:
			// charge from -xp to x is -(Qp(xp) - Qp(-x))
			return -Q / j.Eps * (j.chargeP(d.Xp) - j.chargeP(-x))
		default:
			return -Q / j.Eps * (j.chargeN(d.Xn) - j.chargeN(x))
		}
	}
	out := make([]ProfilePoint, len(xs))
	psi := 0.0
	for i, x := range xs {
		if i > 0 {
			// Simpson's rule on each interval: exact for the abrupt (linear)
			// and graded (quadratic) fields inside one doping piece.
			a, b := xs[i-1], x
			psi -= (b - a) / 6 * (field(a) + 4*field(0.5*(a+b)) + field(b))
		}
		rho := 0.0
		if x > -d.Xp && x < d.Xn {
			rho = Q * j.NetDoping(x)
		}
		out[i] = ProfilePoint{X: x, Charge: rho, Field: field(x), Potential: psi}
	}
	return out
}

// chargeP is the depleted p-side charge per area / q for an edge at xp >= 0.
func (j Junction) chargeP(xp float64) float64 {
	if j.Profile == Abrupt {
		return j.Na * xp
	}
	xa := j.Na / j.Gradient
	if xp <= xa {
		return j.Gradient * xp * xp / 2
	}
	return j.Na * (xp - xa/2)
}

// insertSorted inserts x into the ascending slice xs when x lies strictly
// inside the depletion region bounded by edge (positive or negative).
func insertSorted(xs []float64, x, edge float64) []float64 {
	if math.Abs(x) >= math.Abs(edge) {
		return xs
	}
	i := sort.SearchFloat64s(xs, x)
	if i < len(xs) && xs[i] == x {
		return xs
	}
	xs = append(xs, 0)
	copy(xs[i+1:], xs[i:])
	xs[i] = x
	return xs
}
