package physics

import (
	"fmt"
	"math"
)

// MaxMultiplication caps every avalanche multiplication factor the
// analytic model applies (to the dark reverse current and to the
// photocurrent alike). The ionisation integrals give M -> Inf at the
// breakdown voltage; a real junction's gain is limited near there by its
// series resistance, the space charge of the multiplied carriers and
// self-heating, none of which the analytic model contains. Linear-mode
// avalanche photodiodes are run at gains of tens to a few hundred (Sze &
// Ng 2007, ch. 13; from memory); 1000 lies above that, so the cap only
// acts within about 0.1 % of the breakdown voltage, where the result is
// flagged (FlagMultiplicationCapped) and is not to be trusted. Common
// practice, not a published limit.
const MaxMultiplication = 1000.0

// FlagMultiplicationCapped marks a bias so close to breakdown that a
// multiplication factor reached MaxMultiplication.
const FlagMultiplicationCapped = "multiplication-capped"

// Multiplication holds the avalanche multiplication factors at one reverse
// bias, each from the ionisation integrals and capped at
// MaxMultiplication.
type Multiplication struct {
	// Mn multiplies electrons entering the depletion region at its p-side
	// edge (the electron diffusion current of the p region and the
	// photocurrent collected from it), Mp holes entering at the n-side
	// edge (the n region's hole diffusion current and photocurrent).
	Mn, Mp float64
	// Mgen multiplies pairs generated uniformly in the depletion region
	// (its SRH generation current and a uniform optical generation there),
	// Mbeam the pairs of the Device's monochromatic light absorbed in the
	// depletion region (Beer-Lambert weight from the illuminated side; 1
	// without such light).
	Mgen, Mbeam float64
	// PeakField is the peak field at the bias, V/m.
	PeakField float64
	// Capped is true when a factor reached MaxMultiplication.
	Capped bool
}

// unity is the multiplication of a junction far from breakdown.
func unity(e0 float64) Multiplication {
	return Multiplication{Mn: 1, Mp: 1, Mgen: 1, Mbeam: 1, PeakField: e0}
}

// MultiplicationAt returns the avalanche multiplication factors at reverse
// bias vr (V, positive in reverse) across the depletion region. ok is false
// at or beyond breakdown (the factors are then +Inf); with the breakdown
// effect off, no impact-ionisation model known or vr <= 0 the factors are
// 1.
//
// Formulas (the general solution of the two-carrier continuity equations
// with impact ionisation; Sze & Ng 2007, section 2.4.1, eqs. 2.96-2.98,
// equation numbers from memory), x from the p-side edge of the depletion
// region of width W, phi(x) = int_0^x (alpha_n - alpha_p) dx',
// An = int_0^W alpha_n exp(-phi) dx:
//
//	Mn = 1/(1 - An)                       electrons injected at x = 0
//	Mp = exp(-phi(W))/(1 - An)            holes injected at x = W
//	M(x) = exp(-phi(x))/(1 - An)          a pair generated at x
//	Mgen = <exp(-phi)>/(1 - An)           uniform generation
//	Mbeam = <exp(-phi)>_g/(1 - An)        generation g(x) = exp(-alpha d(x))
//
// with <.> the mean over the depletion region and <.>_g the mean weighted by
// the Beer-Lambert generation, d(x) the depth from the edge facing the
// light. Each factor is capped at MaxMultiplication (Capped). Dimensionless.
// Valid in the depletion approximation with local (field-driven) ionisation
// coefficients, for one-dimensional junctions; the coefficients' own
// validity range is flagged by the breakdown search (FlagImpactRange).
// Miller's empirical M = 1/(1 - (V/VB)^n) (S. L. Miller, Phys. Rev. 99,
// 1234, 1955) is a fit to the same behaviour; the tests compare the two.
func (s *Static) MultiplicationAt(vr float64) (Multiplication, bool) {
	return s.multiplicationFrom(vr, math.NaN())
}

// multiplicationFrom is MultiplicationAt with a first estimate of the peak
// field (NaN: from the depletion approximation at the bias).
func (s *Static) multiplicationFrom(vr, guess float64) (Multiplication, bool) {
	if !s.Effects.Breakdown || s.aval == nil || !(vr > 0) {
		return unity(math.NaN()), true
	}
	if vr >= s.Breakdown.Voltage {
		return Multiplication{Mn: math.Inf(1), Mp: math.Inf(1), Mgen: math.Inf(1), Mbeam: math.Inf(1), PeakField: math.NaN()}, false
	}
	if !(guess > 0) {
		guess = s.Junction.Solve(s.Vbi, -vr).PeakField
	}
	a := s.aval
	e0 := a.peakField(vr, guess)
	// Cheap bound: An <= alpha_n(E0) W exp(alpha_p(E0) W), the coefficients
	// being largest at the peak field; below 1e-10 the multiplication is 1
	// to that accuracy.
	an, ap := a.c.alpha(e0)
	_, w, _, _ := a.reverse(e0)
	if an*w*math.Exp(ap*w) < 1e-10 && ap*w < 1e-10 {
		return unity(e0), true
	}
	// A coarse grid far from breakdown (An < 0.05, where its error of
	// about 1% in An changes M by < 5e-4), the full grid nearer.
	in := a.integralsN(e0, ionisationGrid/2)
	if in.An > 0.05 {
		in = a.integrals(e0)
	}
	den := 1 - in.An
	if !(den > 0) {
		return Multiplication{Mn: math.Inf(1), Mp: math.Inf(1), Mgen: math.Inf(1), Mbeam: math.Inf(1), PeakField: e0}, false
	}
	m := Multiplication{Mn: 1 / den, Mp: in.ExpPhiW / den, Mgen: in.MeanExp / den, Mbeam: 1, PeakField: e0}
	if l := s.Device.Light; l.PhotonFlux > 0 && l.Absorption > 0 {
		m.Mbeam = a.beamMeanExp(e0, l.Absorption, l.FromN) / den
	}
	for _, f := range []*float64{&m.Mn, &m.Mp, &m.Mgen, &m.Mbeam} {
		if *f > MaxMultiplication {
			*f = MaxMultiplication
			m.Capped = true
		}
	}
	return m, true
}

// beamMeanExp returns the mean of exp(-phi(x)) over the depletion region
// at peak field e0 weighted by the Beer-Lambert generation exp(-alpha d),
// d the depth from the p-side edge (fromN false) or the n-side edge. On
// the grid of integrals, phi by the trapezoid rule and, on each interval,
// the exponent phi + alpha d taken linear, so that exp of it is integrated
// exactly (a strongly absorbed beam needs no finer grid). Limits: alpha ->
// 0 gives the uniform mean; alpha -> Inf gives exp(-phi) at the lit edge (1
// from the p side, exp(-phi(W)) from the n side).
func (a *avalanche) beamMeanExp(e0, alpha float64, fromN bool) float64 {
	const n = ionisationGrid
	var xs, phi [2*n + 1]float64
	up, _ := a.j.sideField(e0, a.j.Na, a.thickP)
	un, _ := a.j.sideField(e0, a.j.Nd, a.thickN)
	var prevD float64
	for i := 0; i <= 2*n; i++ {
		var e float64
		xs[i], e = a.gridPoint(i, n, e0, up, un)
		an, ap := a.c.alpha(e)
		d := an - ap
		if i > 0 {
			phi[i] = phi[i-1] + 0.5*(xs[i]-xs[i-1])*(d+prevD)
		}
		prevD = d
	}
	depth := func(i int) float64 {
		if fromN {
			return un - xs[i]
		}
		return xs[i] + up
	}
	// int exp(-E) over [x0, x1] with E linear: h exp(-E0) (1 - exp(-dE))/dE.
	seg := func(h, e0, e1 float64) float64 {
		de := e1 - e0
		f := 1.0
		if math.Abs(de) > 1e-12 {
			f = -math.Expm1(-de) / de
		}
		return h * math.Exp(-e0) * f
	}
	// Shift both exponents by their smallest value so that neither sum
	// underflows entirely (alpha d reaches thousands for a strongly
	// absorbed beam over a wide depletion region).
	minN, minD := math.Inf(1), math.Inf(1)
	for i := 0; i <= 2*n; i++ {
		minN = math.Min(minN, phi[i]+alpha*depth(i))
		minD = math.Min(minD, alpha*depth(i))
	}
	num, dnm := 0.0, 0.0
	for i := 1; i <= 2*n; i++ {
		h := xs[i] - xs[i-1]
		num += seg(h, phi[i-1]+alpha*depth(i-1)-minN, phi[i]+alpha*depth(i)-minN)
		dnm += seg(h, alpha*depth(i-1)-minD, alpha*depth(i)-minD)
	}
	return num / dnm * math.Exp(minD-minN)
}

// multipliedPhoto returns the photocurrent (A) collected at a reverse bias
// with multiplication m: the p region's part times Mn, the n region's
// times Mp, the depletion region's uniform part times Mgen and its
// monochromatic part times Mbeam (MultiplicationAt).
func (s *Static) multipliedPhoto(m Multiplication) float64 {
	return m.Mn*s.Photo.P + m.Mp*s.Photo.N + m.Mgen*s.photoDepUniform + m.Mbeam*s.photoDepBeam
}

// multiplicationFlags returns the flags of the multiplication at a point:
// near breakdown (a factor above 1.1) and capped.
func (s *Static) multiplicationFlags(p Point) []Flag {
	var f []Flag
	if m := math.Max(math.Max(p.Mn, p.Mp), math.Max(p.Mgen, p.Mbeam)); m > 1.1 {
		what := ""
		if s.IL > 0 {
			what = fmt.Sprintf("; the photocurrent at the bias is multiplied %.3g times", p.PhotoGain)
		}
		f = append(f, Flag{FlagNearBreakdown, []Class{ClassCurrent, ClassMultiplication, ClassLightAtBias},
			fmt.Sprintf("near breakdown: the largest avalanche multiplication factor (Mn, Mp or the depletion region's) is %.3g%s (ionisation integrals; high voltage: see the caution)", m, what)})
	}
	if p.MultiplicationCapped {
		f = append(f, Flag{FlagMultiplicationCapped, []Class{ClassCurrent, ClassMultiplication, ClassLightAtBias},
			fmt.Sprintf("within a hair of breakdown: the multiplication reached the model's cap of %g (series resistance, space charge and heating limit a real junction's gain; none is modelled)", MaxMultiplication)})
	}
	return f
}
