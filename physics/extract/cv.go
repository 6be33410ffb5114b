package extract

import (
	"fmt"
	"math"
	"sort"

	"junco/physics"
)

// CVGeometry gives the device area and permittivity for C-V analysis, and
// optionally the elementary charge (0 = physics.Q). Any coherent unit system
// works: SI (m^2, F/m, C; doping in m^-3) is the default; a textbook's
// cm-based numbers (cm^2, F/cm) give doping in cm^-3.
type CVGeometry struct {
	AreaM2         float64 // junction area A, > 0
	PermittivityFm float64 // eps = eps_r eps_0 of the lightly doped side, > 0
	ChargeC        float64 // q; 0 selects physics.Q
}

func (g CVGeometry) check() (float64, error) {
	if !(g.AreaM2 > 0) || math.IsInf(g.AreaM2, 0) {
		return 0, inputErr("AreaM2", g.AreaM2, "> 0", "the junction area scales the capacitance")
	}
	if !(g.PermittivityFm > 0) || math.IsInf(g.PermittivityFm, 0) {
		return 0, inputErr("PermittivityFm", g.PermittivityFm, "> 0 (e.g. 11.7 eps0 for Si)", "the permittivity links capacitance to depletion width")
	}
	q := g.ChargeC
	if q == 0 {
		q = physics.Q
	}
	if !(q > 0) {
		return 0, inputErr("ChargeC", q, "> 0", "elementary charge")
	}
	return q, nil
}

// DopingFromSlope returns the doping of the lightly doped side of a
// one-sided abrupt junction from the Mott-Schottky slope,
//
//	N = 2 / (q eps A^2 |d(1/C^2)/dV|).
//
// Units: slope in F^-2 V^-1, area in m^2, eps in F/m, q in C -> N in m^-3
// (or any coherent system; with slope per unit area pass area 1).
// Valid for a one-sided abrupt junction under the depletion approximation.
// Source: Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007),
// sec. 2.2; Neamen, Semiconductor Physics and Devices, 4th ed. (2012),
// sec. 7.3.
func DopingFromSlope(slope float64, g CVGeometry) (float64, error) {
	q, err := g.check()
	if err != nil {
		return 0, err
	}
	if slope == 0 || math.IsNaN(slope) || math.IsInf(slope, 0) {
		return 0, inputErr("slope", slope, "finite, non-zero", "a flat 1/C^2 line has no doping")
	}
	return 2 / (q * g.PermittivityFm * g.AreaM2 * g.AreaM2 * math.Abs(slope)), nil
}

// MottSchottkyResult is the straight line 1/C^2 = Intercept + Slope V and
// the junction quantities derived from it, with standard errors.
type MottSchottkyResult struct {
	Slope, Intercept   float64 // F^-2 V^-1, F^-2
	StdErrSlope        float64 // standard error of Slope
	StdErrIntercept    float64 // standard error of Intercept
	BuiltInV, StdErrV  float64 // Vbi = -Intercept/Slope, V
	DopingM3, StdErrM3 float64 // N, m^-3 (in the units of CVGeometry)
	Points             int     // points used
	UsedWindow         Window  // bias span of the points used
	RMSRelResidual     float64 // rms of (y_fit - y)/y, y = 1/C^2
	CovInterceptSlope  float64 // cov(Intercept, Slope), for propagation
}

// MottSchottky fits 1/C^2 against V with a straight line for a one-sided
// abrupt junction (m = 1/2) without parasitic capacitance; with fixture
// capacitance or a graded junction its intercept is far from Vbi, so
// AnalyzeCV, which fits Cpar and m first, is the analysis to report. The
// line is
//
//	1/C^2 = 2 (Vbi - V) / (q eps N A^2),
//
// so the voltage-axis intercept is Vbi and N = DopingFromSlope(slope).
// The fit is weighted least squares with weights 1/y^2 (y = 1/C^2), the
// right weights for a constant relative capacitance error (common practice),
// over the points inside w (zero = all); non-finite or non-positive C is
// skipped. Standard errors come from the regression covariance by the delta
// method: se(Vbi)^2 = g^T Cov g with g = (-1/b, a/b^2), se(N) = N se(b)/|b|.
// Units: v in V (forward positive), c in F. Valid in reverse and small
// forward bias where the depletion approximation holds; the intercept
// includes the small 2kT/q majority-carrier correction (Sze & Ng 2007,
// sec. 2.2, from memory), which is not removed here.
// Source: Sze & Ng (2007), sec. 2.2; Neamen (2012), sec. 7.3 and
// Example 7.6.
func MottSchottky(v, c []float64, g CVGeometry, w Window) (*MottSchottkyResult, error) {
	if len(v) != len(c) {
		return nil, inputErr("capacitance", fmt.Sprintf("%d values", len(c)), fmt.Sprintf("%d values", len(v)), "one capacitance per voltage")
	}
	if _, err := g.check(); err != nil {
		return nil, err
	}
	if err := w.check("Window"); err != nil {
		return nil, err
	}
	var xs, ys, ws []float64
	for k := range v {
		if !w.Contains(v[k]) || !(c[k] > 0) || math.IsInf(c[k], 0) || math.IsNaN(v[k]) || math.IsInf(v[k], 0) {
			continue
		}
		y := 1 / (c[k] * c[k])
		xs = append(xs, v[k])
		ys = append(ys, y)
		ws = append(ws, 1/(y*y))
	}
	if len(xs) < 3 {
		return nil, tooFew("window", len(xs), 3, "a Mott-Schottky line needs positive capacitances at three or more biases")
	}
	// Scale y to order 1 so the weights stay in range.
	sc := median(ys)
	for k := range ys {
		ys[k] /= sc
		ws[k] = 1 / (ys[k] * ys[k])
	}
	f, ok := fitLine(xs, ys, ws)
	if !ok {
		return nil, inputErr("voltage", "a single value", "at least two distinct biases", "a line needs a voltage sweep")
	}
	if !(f.b < 0) {
		return nil, inputErr("capacitance", fmt.Sprintf("1/C^2 slope %g F^-2/V", f.b*sc), "< 0 (C rising toward forward bias)", "a depletion capacitance grows as the bias goes forward; check the voltage sign")
	}
	r := &MottSchottkyResult{Slope: f.b * sc, Intercept: f.a * sc, StdErrSlope: math.Sqrt(f.vb) * sc,
		StdErrIntercept: math.Sqrt(f.va) * sc, Points: len(xs), CovInterceptSlope: f.ab * sc * sc}
	r.BuiltInV = -f.a / f.b
	ga, gb := -1/f.b, f.a/(f.b*f.b)
	r.StdErrV = math.Sqrt(math.Max(0, ga*ga*f.va+gb*gb*f.vb+2*ga*gb*f.ab))
	r.DopingM3, _ = DopingFromSlope(r.Slope, g)
	r.StdErrM3 = r.DopingM3 * math.Sqrt(f.vb) / math.Abs(f.b)
	lo, hi := math.Inf(1), math.Inf(-1)
	ss := 0.0
	for k := range xs {
		lo, hi = math.Min(lo, xs[k]), math.Max(hi, xs[k])
		e := (f.a + f.b*xs[k] - ys[k]) / ys[k]
		ss += e * e
	}
	r.UsedWindow = Window{lo, hi}
	r.RMSRelResidual = math.Sqrt(ss / float64(len(xs)))
	return r, nil
}

// ProfilePoint is one point of a C-V doping profile.
type ProfilePoint struct {
	VoltageV float64 // bias at the centre of the derivative window, V
	DepthM   float64 // depletion depth W = eps A / C, m
	DopingM3 float64 // N(W), m^-3
	StdErrM3 float64 // standard error of N from the local line fit
}

// DopingProfile returns the doping profile N(W) of the lightly doped side
// of a one-sided junction by the differential C-V formula
//
//	N(W) = -2 / (q eps A^2 d(1/C^2)/dV),  W = eps A / C,
//
// with the derivative taken as the slope of a local least-squares line of
// 1/C^2 against V over 2 halfWindow + 1 consecutive points (sorted by V;
// halfWindow >= 1, default 2 when 0). This smooths noise at the cost of
// depth resolution; points without a full window at the ends are left out.
// Units: v in V, c in F; depth in m and doping in m^-3 with SI geometry.
// Valid under the depletion approximation, with resolution limited to a few
// Debye lengths.
// Source: Schroder, Semiconductor Material and Device Characterization, 3rd
// ed. (2006), sec. 2.2 (differential capacitance profiling); Sze & Ng
// (2007), sec. 2.2.
func DopingProfile(v, c []float64, g CVGeometry, halfWindow int) ([]ProfilePoint, error) {
	if len(v) != len(c) {
		return nil, inputErr("capacitance", fmt.Sprintf("%d values", len(c)), fmt.Sprintf("%d values", len(v)), "one capacitance per voltage")
	}
	q, err := g.check()
	if err != nil {
		return nil, err
	}
	if halfWindow == 0 {
		halfWindow = 2
	}
	if halfWindow < 1 || halfWindow > 1000 {
		return nil, inputErr("halfWindow", halfWindow, "1..1000 points", "the derivative needs neighbours on both sides")
	}
	p := ivPoints{}
	for k := range v {
		if c[k] > 0 && !math.IsInf(c[k], 0) && !math.IsNaN(v[k]) && !math.IsInf(v[k], 0) {
			p.v = append(p.v, v[k])
			p.i = append(p.i, c[k])
		}
	}
	sort.Stable(p)
	n := len(p.v)
	if n < 2*halfWindow+1 {
		return nil, tooFew("points", n, 2*halfWindow+1, "the local derivative window is wider than the data")
	}
	y := make([]float64, n)
	for k := range y {
		y[k] = 1 / (p.i[k] * p.i[k])
	}
	k2 := 2 / (q * g.PermittivityFm * g.AreaM2 * g.AreaM2)
	out := make([]ProfilePoint, 0, n-2*halfWindow)
	for k := halfWindow; k < n-halfWindow; k++ {
		f, ok := fitLine(p.v[k-halfWindow:k+halfWindow+1], y[k-halfWindow:k+halfWindow+1], nil)
		if !ok || f.b == 0 {
			continue
		}
		pt := ProfilePoint{VoltageV: p.v[k], DepthM: g.PermittivityFm * g.AreaM2 / p.i[k], DopingM3: -k2 / f.b}
		pt.StdErrM3 = math.Abs(pt.DopingM3) * math.Sqrt(math.Abs(f.vb)) / math.Abs(f.b)
		out = append(out, pt)
	}
	return out, nil
}

// JunctionCV is the junction-capacitance model
//
//	C(V) = Cj0 / (1 - V/Vbi)^m + Cpar,
//
// with Cj0 the zero-bias junction capacitance (F), Vbi the built-in
// potential (V), m the grading coefficient (1/2 abrupt, 1/3 linearly
// graded) and Cpar a bias-independent parasitic capacitance (F). Valid for
// V < Vbi (depletion; forward bias beyond about Vbi/2 adds diffusion
// capacitance not modelled here).
// Source: Sze & Ng (2007), sec. 2.2 (abrupt and linearly graded
// junctions); the same form is the SPICE junction-capacitance model
// (CJO, VJ, M).
type JunctionCV struct {
	ZeroBiasCapacitanceF  float64 // Cj0, F
	BuiltInPotentialV     float64 // Vbi, V
	GradingCoefficient    float64 // m
	ParasiticCapacitanceF float64 // Cpar, F
}

// Capacitance returns C(V) in F, or NaN for V >= Vbi or invalid parameters.
func (j JunctionCV) Capacitance(v float64) float64 {
	u := 1 - v/j.BuiltInPotentialV
	if !(u > 0) || !(j.BuiltInPotentialV > 0) {
		return math.NaN()
	}
	return j.ZeroBiasCapacitanceF*math.Pow(u, -j.GradingCoefficient) + j.ParasiticCapacitanceF
}
