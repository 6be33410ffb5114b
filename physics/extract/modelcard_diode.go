package extract

import (
	"fmt"
	"math"

	"junco/physics"
)

// CardDiode is the static I-V part of a SPICE-style diode model card with
// its temperature scaling:
//
//	I = IS(T) (exp(Vj/(N Vt)) - 1) + ISR(T) (exp(Vj/(NR Vt)) - 1) Kgen + Vj/RSH,  V = Vj + I RS,
//	Kgen = ((1 - Vj/VJ)^2 + 0.005)^(M/2),
//	IS(T)  = IS  (T/TNOM)^(XTI/N)  exp(EG/(N k)  (1/TNOM - 1/T)),
//	ISR(T) = ISR (T/TNOM)^(XTI/NR) exp(EG/(NR k) (1/TNOM - 1/T)),
//
// with Vt = kT/q, k in eV/K, T and TNOM in K. ISR = 0 drops the
// recombination term; RS does not vary with temperature (TRS = 0). RSH is
// a shunt across the junction, which a .model cannot hold (the card's
// subcircuit does); 0 or +Inf means none. Kgen, the depletion-width
// factor of the recombination current, uses the card's M and its VJ moved
// to T (JunctionPotential; the simulator's defaults 1 V and 0.5 when the
// card has none).
// Units: IS, ISR in A; RS in ohm; EG in eV; temperatures in K. Valid for
// forward and small reverse bias, above breakdown (BV is not modelled
// here).
// Source: Nagel, SPICE2, UC Berkeley ERL-M520 (1975), diode model
// temperature dependence; the ISR/NR term with Kgen as in the ngspice
// manual (diode model, recombination current); both from memory, checked
// against the simulator itself in the card tests of model/fit.
type CardDiode struct {
	IS, N, RS float64 // A, -, ohm
	ISR, NR   float64 // A, -; ISR = 0: no recombination term
	EG, XTI   float64 // eV, -
	TNOMK     float64 // K
	RSH       float64 // ohm; 0 or +Inf: no shunt
	VJ, M     float64 // V, - (Kgen only); 0: the defaults 1 V and 0.5
}

// JunctionPotential returns the card's VJ at temperature t (K) by the
// SPICE3 law
//
//	VJ(T) = (T/Tr) (VJ - pb(TNOM))/(TNOM/Tr) + pb(T),
//	pb(T) = -2 Vt(T) (1.5 ln(T/Tr) - Eg(T)/(2 k T) + Eg(Tr)/(2 k Tr)),
//	Eg(T) = 1.16 - 7.02e-4 T^2/(T + 1108) eV,  Tr = 300.15 K,
//
// (silicon's band gap fixed in the simulator whatever EG; Eg(Tr) written
// there as 1.1150877 eV). VJ = 0 selects the default 1 V. Source: the
// SPICE3 diode temperature code (diotemp), from memory; checked against
// the simulator in the card tests of model/fit.
func (d CardDiode) JunctionPotential(t float64) float64 {
	vj := d.VJ
	if !(vj > 0) {
		vj = 1
	}
	const tr = 300.15
	kq := physics.KB / physics.Q
	pb := func(tk float64) float64 {
		eg := 1.16 - 7.02e-4*tk*tk/(tk+1108)
		return -2 * kq * tk * (1.5*math.Log(tk/tr) - eg/(2*kq*tk) + 1.1150877/(2*kq*tr))
	}
	pbo := (vj - pb(d.TNOMK)) / (d.TNOMK / tr)
	return t/tr*pbo + pb(t)
}

// Saturation returns IS(T) and ISR(T) in A at temperature t (K).
func (d CardDiode) Saturation(t float64) (is, isr float64) {
	x := (1/d.TNOMK - 1/t) / (physics.KB / physics.Q)
	l := math.Log(t / d.TNOMK)
	is = d.IS * math.Exp((d.XTI*l+d.EG*x)/d.N)
	if d.ISR > 0 {
		isr = d.ISR * math.Exp((d.XTI*l+d.EG*x)/d.NR)
	}
	return is, isr
}

// junction returns the junction current (with the shunt) and its
// derivative at vj; vjp is VJ at the temperature.
func (d CardDiode) junction(vj, vt, is, isr, vjp float64) (i, di float64) {
	e := math.Exp(vj / (d.N * vt))
	i, di = is*(e-1), is*e/(d.N*vt)
	if d.RSH > 0 && !math.IsInf(d.RSH, 1) {
		i += vj / d.RSH
		di += 1 / d.RSH
	}
	if isr > 0 {
		m := d.M
		if !(m > 0) {
			m = 0.5
		}
		u := 1 - vj/vjp
		b := u*u + 0.005
		k := math.Pow(b, m/2)
		dk := k * m / 2 / b * (-2 * u / vjp)
		e2 := math.Exp(vj / (d.NR * vt))
		i += isr * (e2 - 1) * k
		di += isr * (e2*k/(d.NR*vt) + (e2-1)*dk)
	}
	return i, di
}

// Current returns the terminal current (A) at bias v (V) and temperature t
// (K), solving V = Vj + I RS for the junction voltage by safeguarded
// Newton iteration (the residual is monotone in Vj, so bisection on
// [min(0,V), max(0,V)] brackets the root). NaN for invalid parameters.
func (d CardDiode) Current(v, t float64) float64 {
	if !(d.IS > 0 && d.N > 0 && d.RS >= 0 && t > 0 && d.TNOMK > 0) || (d.ISR > 0 && !(d.NR > 0)) {
		return math.NaN()
	}
	vt := physics.ThermalVoltage(t)
	is, isr := d.Saturation(t)
	vjp := d.JunctionPotential(t)
	vj := v
	if d.RS > 0 {
		lo, hi := math.Min(0, v), math.Max(0, v)
		vj = 0.5 * (lo + hi)
		for k := 0; k < 200; k++ {
			j, dj := d.junction(vj, vt, is, isr, vjp)
			f := vj + j*d.RS - v
			if f > 0 {
				hi = vj
			} else {
				lo = vj
			}
			next := vj - f/(1+dj*d.RS)
			if !(next > lo && next < hi) {
				next = 0.5 * (lo + hi)
			}
			if math.Abs(next-vj) < 1e-15+1e-13*math.Abs(vj) {
				vj = next
				break
			}
			vj = next
		}
	}
	i, _ := d.junction(vj, vt, is, isr, vjp)
	return i
}

// CardCurve is one forward I-V curve at one temperature for FitCardIV, with the bias window of the points to use (zero:
// every forward point).
type CardCurve struct {
	TemperatureK float64
	VoltageV     []float64
	CurrentA     []float64
	Window       Window
}

// CardWindow returns the bias window of the forward points of an I-V
// sweep that a model card is fitted to: from the lowest forward bias above
// which every current exceeds factor times the additive noise (the
// bench-data rule's estimate, EstimateNoiseFloor, whether or not it counts
// as a floor there: a fit on ln I with equal weights needs the currents
// far above it; when too few points lie within kT/q of 0 V for it, the
// same fourth-difference estimate over V <= 4 kT/q; factor >= 1, 100
// keeps its share of each current near 1 %) to the highest forward bias below a
// compliance plateau (DetectCompliance). With neither, the window is every
// forward point (zero Window). Units: V, A, K. Common practice: a fit on
// the log-current scale leaves out the points the instrument's floor or
// its current limit dominates.
func CardWindow(v, i []float64, temperatureK, factor float64) (Window, error) {
	if len(v) != len(i) {
		return Window{}, inputErr("current", fmt.Sprintf("%d values", len(i)), fmt.Sprintf("%d values", len(v)), "one current per voltage")
	}
	if !(temperatureK >= 1 && temperatureK <= 2000) {
		return Window{}, inputErr("TemperatureK", temperatureK, "1..2000 K", "kT/q sets the near-zero-bias band of the noise estimate")
	}
	if !(factor >= 1) || math.IsInf(factor, 0) {
		return Window{}, inputErr("factor", factor, ">= 1, finite", "multiple of the noise floor")
	}
	p, _ := forwardPoints(v, i, Window{})
	if len(p.v) == 0 {
		return Window{}, nil
	}
	hi := len(p.v) - 1
	clipped := false
	if c, ok := DetectCompliance(v, i, 1, 0); ok {
		for hi >= 0 && p.v[hi] >= c.MinV {
			hi--
		}
		clipped = true
	}
	lo := 0
	floor := 0.0
	vt := physics.ThermalVoltage(temperatureK)
	nf, ok := EstimateNoiseFloor(v, i, vt)
	if !ok {
		nf, ok = noiseFloorBelow(v, i, 4*vt)
	}
	if ok && nf.SigmaA > 0 {
		floor = nf.SigmaA
		lo = hi + 1
		for k := hi; k >= 0 && p.i[k] > factor*floor; k-- {
			lo = k
		}
	}
	if hi-lo+1 < 5 {
		return Window{}, tooFew("window", max(0, hi-lo+1), 5, fmt.Sprintf("forward currents above %g times the noise floor %.3g A and below the compliance are needed", factor, floor))
	}
	if lo == 0 && !clipped {
		return Window{}, nil
	}
	return Window{MinV: p.v[lo], MaxV: p.v[hi]}, nil
}
