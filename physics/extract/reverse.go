package extract

import (
	"fmt"
	"math"
	"sort"
)

// ReverseOptions configures AnalyzeReverse.
type ReverseOptions struct {
	// BiasV is the reverse bias (V < 0) at which the leakage current is
	// reported, e.g. -5. Zero skips the leakage value.
	BiasV float64
	// ZeroWindowV is the half-width in V of the interval around 0 V used
	// for the shunt slope (default 0.05 V, about 2 kT/q at 300 K).
	ZeroWindowV float64
}

// ReverseResult holds leakage and shunt estimates from reverse-bias data.
type ReverseResult struct {
	// LeakageCurrentA is the current at BiasV in A (negative for reverse
	// bias in the usual sign convention), by linear interpolation between
	// the two bracketing points; NaN when BiasV was 0.
	LeakageCurrentA float64
	BiasV           float64 // the stated reverse bias, V
	// ShuntResistanceOhm = 1/(dI/dV) at 0 V from a straight-line fit of I
	// vs V over |V| <= ZeroWindowV, with its standard error
	// se(R) = se(slope)/slope^2 (delta method).
	ShuntResistanceOhm, StdErrOhm float64
	ZeroWindowV                   float64 // half-width used, V
	Points                        int     // points in the zero-bias fit
}

// AnalyzeReverse extracts the leakage current at a stated reverse bias and
// the shunt resistance from the slope near 0 V.
//
// Formula: R = 1/(dI/dV at V = 0). Note that this is the zero-bias
// resistance R0: for the single-diode model dI/dV(0) = Is/(n Vt) + 1/Rsh, so
// R equals Rsh only when the shunt dominates (Rsh << n Vt/Is); the diode
// part bounds R from above. Units: v in V, i in A. Valid for data crossing
// or touching 0 V with at least 3 points inside the zero window.
// Source: Schroder, Semiconductor Material and Device Characterization, 3rd
// ed. (2006), ch. 4 (zero-bias resistance; leakage at a stated bias is
// common practice in data sheets).
func AnalyzeReverse(v, i []float64, opt ReverseOptions) (*ReverseResult, error) {
	if len(v) != len(i) {
		return nil, inputErr("current", fmt.Sprintf("%d values", len(i)), fmt.Sprintf("%d values", len(v)), "one current per voltage")
	}
	zw := opt.ZeroWindowV
	if zw == 0 {
		zw = 0.05
	}
	if !(zw > 0) || math.IsInf(zw, 0) {
		return nil, inputErr("ZeroWindowV", zw, "> 0 V", "the zero-bias window needs a width")
	}
	if opt.BiasV > 0 || math.IsNaN(opt.BiasV) || math.IsInf(opt.BiasV, 0) {
		return nil, inputErr("BiasV", opt.BiasV, "finite and < 0 V (0 = none)", "leakage is stated at a reverse bias")
	}
	p := ivPoints{}
	for k := range v {
		if !math.IsNaN(v[k]) && !math.IsNaN(i[k]) && !math.IsInf(v[k], 0) && !math.IsInf(i[k], 0) {
			p.v = append(p.v, v[k])
			p.i = append(p.i, i[k])
		}
	}
	sort.Stable(p)
	res := &ReverseResult{BiasV: opt.BiasV, ZeroWindowV: zw, LeakageCurrentA: math.NaN()}
	if len(p.v) == 0 {
		return nil, tooFew("points", 0, 3, "no finite points")
	}
	if opt.BiasV < 0 {
		k := sort.SearchFloat64s(p.v, opt.BiasV)
		switch {
		case k < len(p.v) && p.v[k] == opt.BiasV:
			res.LeakageCurrentA = p.i[k]
		case k == 0 || k == len(p.v):
			return nil, inputErr("BiasV", opt.BiasV, fmt.Sprintf("%g..%g V (the measured range)", p.v[0], p.v[len(p.v)-1]), "leakage is interpolated, not extrapolated")
		default:
			f := (opt.BiasV - p.v[k-1]) / (p.v[k] - p.v[k-1])
			res.LeakageCurrentA = p.i[k-1] + f*(p.i[k]-p.i[k-1])
		}
	}
	var xs, ys []float64
	for k := range p.v {
		if math.Abs(p.v[k]) <= zw {
			xs = append(xs, p.v[k])
			ys = append(ys, p.i[k])
		}
	}
	res.Points = len(xs)
	f, ok := fitLine(xs, ys, nil)
	if !ok || len(xs) < 3 {
		return nil, tooFew("ZeroWindowV", len(xs), 3, fmt.Sprintf("points with |V| <= %g V are needed for the slope at 0 V", zw))
	}
	if !(f.b > 0) {
		return nil, inputErr("current", fmt.Sprintf("slope %g A/V near 0 V", f.b), "> 0", "the current must rise with voltage through 0 V for a shunt resistance")
	}
	res.ShuntResistanceOhm = 1 / f.b
	res.StdErrOhm = math.Sqrt(f.vb) / (f.b * f.b)
	return res, nil
}
