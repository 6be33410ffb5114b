package extract

import (
	"fmt"
	"math"
	"sort"
)

// BreakdownFit is the breakdown knee of a reverse sweep (magnitudes).
type BreakdownFit struct {
	// Reached says whether the sweep reaches breakdown: the reverse current
	// at the largest reverse bias is at least 100 times the leakage level.
	Reached bool
	Reason  string // why not, when not reached
	// BV is the reverse voltage (V, > 0) at which |I| first reaches IBV,
	// interpolated linearly in ln|I| between the bracketing points;
	// StdErrBV is the bias step there over sqrt(12) (the spread of a
	// uniform quantisation error; common practice).
	BV, StdErrBV float64
	// IBV (A, > 0) is the current level taken as the breakdown current:
	// the geometric mean of the leakage level and the largest reverse
	// current, the middle of the knee on a log scale.
	IBV float64
	// LeakageA is the median |I| over the lower half of the reverse bias
	// range (the pre-breakdown leakage level), A.
	LeakageA float64
	// MaxReverseV and MaxReverseA are the largest reverse bias and current
	// measured (magnitudes), V and A.
	MaxReverseV, MaxReverseA float64
	Points                   int // reverse points used
}

// ExtractBreakdown finds the breakdown voltage of a reverse sweep for a
// model card: BV where |I| first reaches IBV = sqrt(I_leak I_max) going to
// larger reverse bias (the SPICE card's breakdown current rises
// exponentially beyond BV, so the card matches the measurement at IBV).
// Points with V < 0 are used (at least 5); the sign of the current is
// ignored. A sweep whose largest reverse current is below 100 I_leak has
// not reached breakdown: Reached is false with the reason, and BV is NaN.
// Units: V, A. Source: the definition of BV at a stated current is common
// practice in data sheets; the card form follows Nagel, SPICE2 (1975),
// from memory.
func ExtractBreakdown(v, i []float64) (*BreakdownFit, error) {
	if len(v) != len(i) {
		return nil, inputErr("current", fmt.Sprintf("%d values", len(i)), fmt.Sprintf("%d values", len(v)), "one current per voltage")
	}
	var p ivPoints
	for k := range v {
		if v[k] < 0 && !math.IsInf(v[k], 0) && !math.IsNaN(i[k]) && !math.IsInf(i[k], 0) && i[k] != 0 {
			p.v = append(p.v, -v[k])
			p.i = append(p.i, math.Abs(i[k]))
		}
	}
	if len(p.v) < 5 {
		return nil, tooFew("reverse", len(p.v), 5, "a breakdown knee needs reverse points (V < 0, I != 0)")
	}
	sort.Stable(p)
	n := len(p.v)
	res := &BreakdownFit{Points: n, BV: math.NaN(), StdErrBV: math.NaN(), IBV: math.NaN(),
		MaxReverseV: p.v[n-1]}
	for _, c := range p.i {
		res.MaxReverseA = math.Max(res.MaxReverseA, c)
	}
	half := p.v[n-1] / 2
	var low []float64
	for k := range p.v {
		if p.v[k] <= half {
			low = append(low, p.i[k])
		}
	}
	if len(low) == 0 {
		low = p.i[:1]
	}
	res.LeakageA = median(low)
	if !(res.MaxReverseA >= 100*res.LeakageA) {
		res.Reached = false
		res.Reason = fmt.Sprintf("the largest reverse current, %.3g A at %.4g V, is %.3g times the leakage level %.3g A; breakdown needs a rise of 100 times or more",
			res.MaxReverseA, -res.MaxReverseV, res.MaxReverseA/res.LeakageA, res.LeakageA)
		return res, nil
	}
	res.Reached = true
	res.IBV = math.Sqrt(res.LeakageA * res.MaxReverseA)
	target := math.Log(res.IBV)
	for k := 1; k < n; k++ {
		a, b := math.Log(p.i[k-1]), math.Log(p.i[k])
		if b >= target && a < target && p.v[k-1] >= half {
			res.BV = p.v[k-1] + (target-a)/(b-a)*(p.v[k]-p.v[k-1])
			res.StdErrBV = (p.v[k] - p.v[k-1]) / math.Sqrt(12)
			break
		}
	}
	if math.IsNaN(res.BV) {
		res.Reached = false
		res.Reason = "the reverse current does not cross the knee level in the upper half of the bias range"
	}
	return res, nil
}

// TransitTimeFromStorage returns the card's transit time TT (s) from a
// measured storage time ts (s) on switching from forward current iF to
// reverse current iR (A, both > 0), by inverting the charge-control
// relation ts = TT ln(1 + iF/iR) (physics.ChargeControlStorageTime): the
// SPICE diode stores Q = TT I, so this is the TT with which the card
// reproduces the measured ts (depletion charge neglected). The standard
// error scales with that of ts. Source: charge-control model, Sze & Ng
// (2007), sec. 2.3.5 (from memory).
func TransitTimeFromStorage(ts, seTs, iF, iR float64) (tt, se float64, err error) {
	if !(ts > 0) || math.IsInf(ts, 0) {
		return 0, 0, inputErr("storage time", ts, "> 0 s, finite", "the time the reverse current stays flat")
	}
	if !(iF > 0) || math.IsInf(iF, 0) {
		return 0, 0, inputErr("forward current", iF, "> 0 A, finite", "the forward current before switching")
	}
	if !(iR > 0) || math.IsInf(iR, 0) {
		return 0, 0, inputErr("reverse current", iR, "> 0 A, finite (magnitude)", "the reverse current during storage")
	}
	l := math.Log1p(iF / iR)
	se = math.NaN()
	if seTs >= 0 && !math.IsInf(seTs, 0) {
		se = seTs / l
	}
	return ts / l, se, nil
}

// DiffusionTransitFit is TT from the forward-bias excess capacitance.
type DiffusionTransitFit struct {
	TT, StdErrTT float64 // s
	Points       int     // forward points used
	// MaxExcess is the largest (C - C_dep)/C over the points used.
	MaxExcess float64
}

// FitDiffusionTransitTime fits the transit time TT of the diffusion
// capacitance C_d = TT dI/dV to the forward points (V > 0) of a C-V sweep:
// C(V) - C_dep(V) = TT g(V), with depletion(V) the depletion (plus
// fixture) capacitance in F and conductance(V) = dI/dV in S from the I-V
// card, by weighted least squares through the origin with weights
// 1/C^2 (constant relative capacitance error): TT = sum w g e / sum w g^2.
// Standard error from the residual variance. Points where depletion or
// conductance is not finite are left out; at least 3 are needed.
// Source: charge-control diffusion capacitance C_d = TT g_d, Sze & Ng
// (2007), sec. 2.3.4 (from memory); the same term is the SPICE card's TT.
func FitDiffusionTransitTime(v, c []float64, depletion, conductance func(float64) float64) (*DiffusionTransitFit, error) {
	if len(v) != len(c) {
		return nil, inputErr("capacitance", fmt.Sprintf("%d values", len(c)), fmt.Sprintf("%d values", len(v)), "one capacitance per voltage")
	}
	var sgg, sge float64
	var gs, es, ws []float64
	fit := &DiffusionTransitFit{}
	for k := range v {
		if !(v[k] > 0) || !(c[k] > 0) || math.IsInf(c[k], 0) {
			continue
		}
		d, g := depletion(v[k]), conductance(v[k])
		if !(d > 0) || math.IsInf(d, 0) || !(g > 0) || math.IsInf(g, 0) {
			continue
		}
		e := c[k] - d
		w := 1 / (c[k] * c[k])
		sgg += w * g * g
		sge += w * g * e
		gs, es, ws = append(gs, g), append(es, e), append(ws, w)
		fit.MaxExcess = math.Max(fit.MaxExcess, e/c[k])
	}
	fit.Points = len(gs)
	if fit.Points < 3 {
		return nil, tooFew("forward C-V", fit.Points, 3, "the diffusion capacitance shows only in forward bias (V > 0)")
	}
	fit.TT = sge / sgg
	ss := 0.0
	for k := range gs {
		r := es[k] - fit.TT*gs[k]
		ss += ws[k] * r * r
	}
	fit.StdErrTT = math.Sqrt(ss / float64(fit.Points-1) / sgg)
	return fit, nil
}
