package extract

import (
	"fmt"
	"math"
	"sort"

	"junco/physics"
)

// ArrheniusPoint is one saturation current at one temperature.
type ArrheniusPoint struct {
	TemperatureK       float64 // T, K (> 0)
	SaturationCurrentA float64 // Is(T), A (> 0)
	// StdErrA is the standard error of Is (A); when all points give one,
	// the fit weights ln Is by (Is/se)^2, otherwise all weights are equal.
	StdErrA float64
}

// ArrheniusOptions configures FitArrhenius.
type ArrheniusOptions struct {
	// Gamma is the exponent of the temperature dependence of D/tau (D/tau
	// proportional to T^gamma); the prefactor exponent is 3 + Gamma/2.
	// The zero value gives the plain T^3 prefactor.
	Gamma float64
}

// ArrheniusFit is the straight line ln(Is/T^x) = ln C - Ea/(k T) with x =
// 3 + gamma/2.
type ArrheniusFit struct {
	ActivationEnergyEV, StdErrEV float64 // Ea in eV and its standard error
	// LnPrefactor is ln C with C in A K^-x; StdErrLn its standard error.
	LnPrefactor, StdErrLn float64
	Exponent              float64 // x = 3 + gamma/2
	Points                int     // temperatures used
	RMSResidual           float64 // rms of the ln residuals
	// ReducedChiSquare is sum((r_k/sigma_k)^2)/(N - 2) with sigma_k =
	// se(Is_k)/Is_k, the scatter of the points about the line in units of
	// their own standard errors (about 1 when the errors explain it); NaN
	// when the points carry no standard errors (unit weights).
	ReducedChiSquare float64
}

// FitArrhenius fits the temperature dependence of the saturation current,
//
//	Is(T) = C T^(3 + gamma/2) exp(-Ea/(k T)),
//
// as a straight line of y = ln(Is/T^(3+gamma/2)) against 1/T: the slope is
// -Ea/k, so Ea = -slope k/q in eV, with its standard error from the
// regression. When every point carries the standard error of its Is, ln Is
// is weighted by (Is/se)^2 and the standard errors of the line are those
// the point errors propagate, multiplied by sqrt(max(1, chi2/(N - 2)))
// (the Birge ratio: when the points scatter more than their errors allow,
// the errors are widened to match; they are never narrowed below the
// propagated ones). Source: R. T. Birge, Phys. Rev. 40, 207 (1932); the
// same scale factor as the Particle Data Group's (from memory). Without
// point errors the regression's residual variance gives them.
// For an ideal diffusion-limited diode Ea is the band gap Eg
// (extrapolated to 0 K); a recombination-limited current gives about Eg/2.
// Units: T in K, Is in A. Valid over the range where one mechanism
// dominates (a bend in the plot means two).
// Source: Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007),
// sec. 2.3 (temperature dependence of the ideal saturation current density,
// Js proportional to T^(3+gamma/2) exp(-Eg/kT)).
func FitArrhenius(pts []ArrheniusPoint, opt ArrheniusOptions) (*ArrheniusFit, error) {
	if math.IsNaN(opt.Gamma) || math.Abs(opt.Gamma) > 20 {
		return nil, inputErr("Gamma", opt.Gamma, "-20..20", "exponent of D/tau versus T")
	}
	if len(pts) < 3 {
		return nil, tooFew("points", len(pts), 3, "an Arrhenius line with an error estimate needs three temperatures")
	}
	x := 3 + opt.Gamma/2
	xs := make([]float64, len(pts))
	ys := make([]float64, len(pts))
	ws := make([]float64, len(pts))
	weighted := true
	for k, p := range pts {
		if !(p.TemperatureK > 0) || math.IsInf(p.TemperatureK, 0) {
			return nil, inputErr(fmt.Sprintf("points[%d].TemperatureK", k), p.TemperatureK, "> 0 K", "absolute temperature")
		}
		if !(p.SaturationCurrentA > 0) || math.IsInf(p.SaturationCurrentA, 0) {
			return nil, inputErr(fmt.Sprintf("points[%d].SaturationCurrentA", k), p.SaturationCurrentA, "> 0 A", "ln Is needs a positive current")
		}
		xs[k] = 1 / p.TemperatureK
		ys[k] = math.Log(p.SaturationCurrentA) - x*math.Log(p.TemperatureK)
		if p.StdErrA > 0 && !math.IsInf(p.StdErrA, 0) {
			r := p.SaturationCurrentA / p.StdErrA
			ws[k] = r * r
		} else {
			weighted = false
		}
	}
	if !weighted {
		ws = nil
	}
	f, ok := fitLine(xs, ys, ws)
	if !ok {
		return nil, inputErr("points", "one temperature", "at least two distinct temperatures", "the slope needs a temperature range")
	}
	vb, va, chi2 := f.vb, f.va, math.NaN()
	if weighted && f.s2 > 0 {
		// fitLine scales its covariance by s2 = chi2/(N-2); the propagated
		// one is that divided by s2, and the Birge ratio restores s2 only
		// when above 1.
		chi2 = f.s2
		sc := math.Max(1, chi2) / chi2
		vb, va = vb*sc, va*sc
	}
	res := &ArrheniusFit{ActivationEnergyEV: -f.b * physics.KB / physics.Q, StdErrEV: math.Sqrt(vb) * physics.KB / physics.Q,
		LnPrefactor: f.a, StdErrLn: math.Sqrt(va), Exponent: x, Points: len(pts), ReducedChiSquare: chi2}
	ss := 0.0
	for k := range xs {
		r := ys[k] - f.a - f.b*xs[k]
		ss += r * r
	}
	res.RMSResidual = math.Sqrt(ss / float64(len(xs)))
	return res, nil
}

// IVCurve is one I-V curve at one temperature.
type IVCurve struct {
	TemperatureK float64   // K
	VoltageV     []float64 // V
	CurrentA     []float64 // A
}

// VFTemperatureFit is the forward-voltage temperature coefficient at a
// stated current.
type VFTemperatureFit struct {
	CurrentA                float64   // the stated current, A
	SlopeVPerK, StdErrVPerK float64   // dVF/dT, V/K, and its standard error
	InterceptV              float64   // VF extrapolated to T = 0 K on the line, V
	TemperatureK, ForwardVV []float64 // per curve, sorted by temperature
	Points                  int       // curves used
	RMSResidualV            float64   // rms of VF about the line, V
}

// FitVFTemperature returns the sensitivity dVF/dT of the forward voltage at
// a fixed current from several I-V curves: VF is interpolated on each curve
// linearly in ln I between the two bracketing forward points (sorted by V),
// and a straight line VF(T) is fitted by least squares; its slope is
// dVF/dT. Units: current in A, T in K, result in V/K (negative for diodes,
// about -2 mV/K for Si near 1 mA; common practice). Valid where the
// current is inside every curve's measured forward range (no
// extrapolation) and VF(T) is close to linear over the range.
// Source: Sze & Ng (2007), sec. 2.3 (dVF/dT from the temperature
// dependence of Is); the use of the diode as a thermometer at constant
// current is common practice.
func FitVFTemperature(curves []IVCurve, currentA float64) (*VFTemperatureFit, error) {
	if !(currentA > 0) || math.IsInf(currentA, 0) {
		return nil, inputErr("currentA", currentA, "> 0 A", "VF is read at a forward current")
	}
	if len(curves) < 2 {
		return nil, tooFew("curves", len(curves), 2, "a temperature coefficient needs two or more temperatures")
	}
	type tv struct{ t, v float64 }
	rows := make([]tv, 0, len(curves))
	target := math.Log(currentA)
	for k, c := range curves {
		if !(c.TemperatureK > 0) || math.IsInf(c.TemperatureK, 0) {
			return nil, inputErr(fmt.Sprintf("curves[%d].TemperatureK", k), c.TemperatureK, "> 0 K", "each curve needs its temperature")
		}
		if len(c.VoltageV) != len(c.CurrentA) {
			return nil, inputErr(fmt.Sprintf("curves[%d].CurrentA", k), len(c.CurrentA), fmt.Sprintf("%d values", len(c.VoltageV)), "one current per voltage")
		}
		p, _ := forwardPoints(c.VoltageV, c.CurrentA, Window{})
		vf := math.NaN()
		for j := 1; j < len(p.v); j++ {
			a, b := math.Log(p.i[j-1]), math.Log(p.i[j])
			if (a <= target && target <= b) || (b <= target && target <= a) {
				if a == b {
					vf = p.v[j]
				} else {
					vf = p.v[j-1] + (target-a)/(b-a)*(p.v[j]-p.v[j-1])
				}
				break
			}
		}
		if math.IsNaN(vf) {
			lo, hi := math.NaN(), math.NaN()
			if len(p.i) > 0 {
				lo, hi = p.i[0], p.i[len(p.i)-1]
			}
			return nil, inputErr("currentA", currentA, fmt.Sprintf("%g..%g A (forward range of curve %d at %g K)", lo, hi, k, c.TemperatureK), "VF is interpolated, not extrapolated")
		}
		rows = append(rows, tv{c.TemperatureK, vf})
	}
	sort.Slice(rows, func(a, b int) bool { return rows[a].t < rows[b].t })
	res := &VFTemperatureFit{CurrentA: currentA, Points: len(rows)}
	for _, r := range rows {
		res.TemperatureK = append(res.TemperatureK, r.t)
		res.ForwardVV = append(res.ForwardVV, r.v)
	}
	f, ok := fitLine(res.TemperatureK, res.ForwardVV, nil)
	if !ok {
		return nil, inputErr("curves", "one temperature", "at least two distinct temperatures", "the slope needs a temperature range")
	}
	res.SlopeVPerK, res.InterceptV = f.b, f.a
	res.StdErrVPerK = math.Sqrt(f.vb)
	ss := 0.0
	for k := range rows {
		r := rows[k].v - f.a - f.b*rows[k].t
		ss += r * r
	}
	res.RMSResidualV = math.Sqrt(ss / float64(len(rows)))
	return res, nil
}
