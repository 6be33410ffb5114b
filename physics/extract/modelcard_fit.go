package extract

import (
	"context"
	"fmt"
	"math"
)

// CardFitOptions selects the free parameters of FitCardIV. IS and N are
// always fitted; RS when Series, ISR (with NR held at the start's NR, 2 by
// default) when Recombination, the shunt RSH when Shunt, EG and XTI when
// Temperature (the curves must then span two temperatures or more; with
// HoldXTI only EG).
type CardFitOptions struct {
	Series, Recombination, Shunt bool
	Temperature, HoldXTI         bool
	MaxIterations                int // default 200
	// MaxPointsPerCurve bounds the points one curve contributes (evenly
	// thinned over its window, ends kept); default 2000. It bounds the
	// time of a fit whatever the sweep's length.
	MaxPointsPerCurve int
}

// CardFit is the result of FitCardIV: the card and the standard errors of
// its fitted parameters (NaN for those held).
type CardFit struct {
	Diode, StdErr CardDiode
	Correlations  []Correlation // pairs with |r| > 0.9
	// RMSLogResidual per curve (order given) and over all points.
	RMSLogResidual []float64
	RMSAll         float64
	Points         int
	Iterations     int
	Converged      bool
}

// FitCardIV fits the static part of a diode model card (CardDiode: IS, N,
// RS, ISR with NR held, the shunt RSH of the card's subcircuit, EG, XTI)
// jointly to forward I-V curves at one or several temperatures, by
// Levenberg-Marquardt on r = ln(I_card(V, T)/I_meas) over the forward
// points (V > 0, I > 0) of each curve's window (at most
// opt.MaxPointsPerCurve of them, evenly thinned). Positive parameters are
// fitted as logarithms, EG and XTI linearly; the Jacobian is taken by
// forward differences (step 1e-6 in each fitted coordinate). Standard
// errors from s^2 (J^T J)^-1 with the delta method (Bates & Watts 1988,
// ch. 2). start gives the start values, TNOM and the held NR; its RS, ISR
// and RSH must be positive when fitted. Units: V, A, K, ohm, eV.
// Valid where one card describes every curve: one N, one RS and one
// temperature law for all of them.
func FitCardIV(ctx context.Context, curves []CardCurve, start CardDiode, opt CardFitOptions) (*CardFit, error) {
	if !(start.IS > 0 && start.N > 0 && start.RS >= 0 && start.TNOMK >= 1) {
		return nil, inputErr("start", fmt.Sprintf("IS=%g N=%g RS=%g TNOM=%g K", start.IS, start.N, start.RS, start.TNOMK), "IS > 0, N > 0, RS >= 0, TNOM >= 1 K", "the start card must be physical")
	}
	if opt.Series && !(start.RS > 0) {
		return nil, inputErr("start.RS", start.RS, "> 0 when fitted", "RS is fitted as its logarithm")
	}
	if opt.Recombination && !(start.ISR > 0) {
		return nil, inputErr("start.ISR", start.ISR, "> 0 when fitted", "ISR is fitted as its logarithm")
	}
	if opt.Shunt && !(start.RSH > 0 && !math.IsInf(start.RSH, 1)) {
		return nil, inputErr("start.RSH", start.RSH, "finite and > 0 when fitted", "RSH is fitted as its logarithm")
	}
	if opt.Recombination && start.NR == 0 {
		start.NR = 2
	}
	if !opt.Recombination {
		start.ISR = 0
	}
	if !opt.Shunt {
		start.RSH = 0
	}
	maxPer := opt.MaxPointsPerCurve
	if maxPer <= 0 {
		maxPer = 2000
	}
	if maxPer < 2 {
		maxPer = 2
	}
	type pt struct{ v, i, t float64 }
	var pts []pt
	temps := map[float64]bool{}
	for k, c := range curves {
		if !(c.TemperatureK >= 1 && c.TemperatureK <= 2000) {
			return nil, inputErr(fmt.Sprintf("curves[%d].TemperatureK", k), c.TemperatureK, "1..2000 K", "each curve needs its temperature")
		}
		if len(c.VoltageV) != len(c.CurrentA) {
			return nil, inputErr(fmt.Sprintf("curves[%d].CurrentA", k), len(c.CurrentA), fmt.Sprintf("%d values", len(c.VoltageV)), "one current per voltage")
		}
		p, _ := forwardPoints(c.VoltageV, c.CurrentA, c.Window)
		n := len(p.v)
		for k := 0; k < min(n, maxPer); k++ {
			j := k
			if n > maxPer {
				j = k * (n - 1) / (maxPer - 1)
			}
			pts = append(pts, pt{p.v[j], p.i[j], c.TemperatureK})
		}
		temps[math.Round(c.TemperatureK*2)/2] = true
	}
	if opt.Temperature && len(temps) < 2 {
		return nil, inputErr("curves", fmt.Sprintf("%d temperature(s)", len(temps)), "two or more temperatures", "EG and XTI follow from the change of the current with temperature")
	}
	// Coordinates: slot getters, log or linear.
	type coord struct {
		name string
		get  func(*CardDiode) *float64
		log  bool
	}
	cs := []coord{{"IS", func(d *CardDiode) *float64 { return &d.IS }, true}, {"N", func(d *CardDiode) *float64 { return &d.N }, true}}
	if opt.Series {
		cs = append(cs, coord{"RS", func(d *CardDiode) *float64 { return &d.RS }, true})
	}
	if opt.Recombination {
		cs = append(cs, coord{"ISR", func(d *CardDiode) *float64 { return &d.ISR }, true})
	}
	if opt.Shunt {
		cs = append(cs, coord{"RSH", func(d *CardDiode) *float64 { return &d.RSH }, true})
	}
	if opt.Temperature {
		if !(start.EG > 0) {
			start.EG = 1.12
		}
		cs = append(cs, coord{"EG", func(d *CardDiode) *float64 { return &d.EG }, false})
		if !opt.HoldXTI {
			cs = append(cs, coord{"XTI", func(d *CardDiode) *float64 { return &d.XTI }, false})
		}
	}
	p := len(cs)
	if len(pts) < p+1 {
		return nil, tooFew("curves", len(pts), p+1, "forward points (V > 0, I > 0) in the windows")
	}
	theta := make([]float64, p)
	for j, c := range cs {
		x := *c.get(&start)
		if c.log {
			x = math.Log(x)
		}
		theta[j] = x
	}
	unpack := func(th []float64) CardDiode {
		d := start
		for j, c := range cs {
			x := th[j]
			if c.log {
				x = math.Exp(x)
			}
			*c.get(&d) = x
		}
		return d
	}
	resid := func(d CardDiode, r []float64) bool {
		for n, q := range pts {
			if n&(cancelCheckEvery-1) == 0 && ctx.Err() != nil {
				return false
			}
			i := d.Current(q.v, q.t)
			if !(i > 0) || math.IsInf(i, 0) {
				return false
			}
			r[n] = math.Log(i / q.i)
		}
		return true
	}
	m := len(pts)
	rh := make([]float64, m)
	th2 := make([]float64, p)
	const h = 1e-6
	eval := func(th, r, jac []float64) bool {
		if !resid(unpack(th), r) {
			return false
		}
		if jac == nil {
			return true
		}
		for j := 0; j < p; j++ {
			copy(th2, th)
			th2[j] += h
			if !resid(unpack(th2), rh) {
				return false
			}
			for n := 0; n < m; n++ {
				jac[n*p+j] = (rh[n] - r[n]) / h
			}
		}
		return true
	}
	maxIter := opt.MaxIterations
	if maxIter <= 0 {
		maxIter = 200
	}
	lr, err := levenberg(ctx, lmProblem{m: m, p: p, eval: eval}, theta, maxIter)
	if err != nil {
		return nil, fmt.Errorf("card fit: %w", err)
	}
	out := &CardFit{Diode: unpack(lr.theta), Points: m, Iterations: lr.iter, Converged: lr.converged}
	nan := math.NaN()
	out.StdErr = CardDiode{IS: nan, N: nan, RS: nan, ISR: nan, NR: nan, EG: nan, XTI: nan, TNOMK: nan, RSH: nan}
	names := make([]string, p)
	for j, c := range cs {
		names[j] = c.name
		if lr.cov == nil {
			continue
		}
		s := math.Sqrt(lr.cov[j*p+j])
		if c.log {
			s *= *c.get(&out.Diode)
		}
		*c.get(&out.StdErr) = s
	}
	out.Correlations = strongCorrelations(lr.cov, names)
	out.RMSAll = math.Sqrt(lr.cost / float64(m))
	d := out.Diode
	for _, c := range curves {
		pc, _ := forwardPoints(c.VoltageV, c.CurrentA, c.Window)
		if len(pc.v) == 0 {
			out.RMSLogResidual = append(out.RMSLogResidual, nan)
			continue
		}
		t := c.TemperatureK
		out.RMSLogResidual = append(out.RMSLogResidual, rmsLog(pc, func(v float64) float64 { return d.Current(v, t) }))
	}
	return out, nil
}
