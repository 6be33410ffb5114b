package fit

import (
	"context"
	"fmt"
	"math"

	"junco/model/measure"
	"junco/physics/extract"
)

// cardForward fits the static part of the card: the reference sweep's
// single-diode fit (IV) gives the start values of IS, N, RS and the shunt,
// its double-diode fit the start of ISR; then the card (extract.FitCardIV)
// is fitted jointly to every sweep, with EG and XTI when two or more
// temperatures were measured (XTI held at 3 with two). The card with ISR
// (NR = 2) is kept when ISR is 3 standard errors from zero and the joint
// fit is better than without. It returns the diode, its parameters in card
// order (IS, N, RS, ISR, NR, EG, XTI as measured) and adds notes to res.
func cardForward(ctx context.Context, in CardInputs, ds *measure.DataSet, w extract.Window, tnomK float64,
	curves []extract.CardCurve, ntemps int, junction *extract.JunctionCV, res *CardResult) (extract.CardDiode, []CardParam, error) {
	var d extract.CardDiode
	single, err := IVContext(ctx, ds, IVOptions{Window: w, Model: extract.ModelSingle, Temperature: TemperatureRule{OptionK: tnomK}})
	if err != nil {
		return d, nil, fmt.Errorf("I-V %s: forward fit: %w", cardFile(in, 0), err)
	}
	for _, n := range single.Fit.Notes {
		res.Notes = append(res.Notes, "reference fit: "+n)
	}
	s := single.Fit.Single
	start := extract.CardDiode{IS: s.SaturationCurrentA, N: s.IdealityFactor, RS: s.SeriesResistanceOhm, TNOMK: tnomK, XTI: 3, RSH: s.ShuntResistanceOhm}
	if junction != nil {
		start.VJ, start.M = junction.BuiltInPotentialV, junction.GradingCoefficient
	}
	opt := extract.CardFitOptions{Series: start.RS > 0, Shunt: start.RSH > 0 && !math.IsInf(start.RSH, 1),
		Temperature: ntemps >= 2, HoldXTI: ntemps == 2}
	fitA, errA := cardFitSignificant(ctx, curves, start, opt)
	var fitB *extract.CardFit
	if dbl, derr := IVContext(ctx, ds, IVOptions{Window: w, Model: extract.ModelDouble, Temperature: TemperatureRule{OptionK: tnomK}}); derr != nil {
		res.Notes = append(res.Notes, "second diode (ISR, NR) not in the card: the double-diode fit failed ("+derr.Error()+")")
	} else if dd := dbl.Fit.Double; !(dd.RecombinationCurrentA > 0) {
		res.Notes = append(res.Notes, "second diode (ISR, NR) not in the card: the recombination current is not observable in the reference sweep")
	} else {
		// Start from the double-diode fit (n = 1 and 2).
		sb := start
		sb.IS, sb.N, sb.ISR, sb.NR, sb.RS, sb.RSH = dd.DiffusionCurrentA, 1, dd.RecombinationCurrentA, 2, dd.SeriesResistanceOhm, dd.ShuntResistanceOhm
		ob := opt
		ob.Recombination, ob.Series, ob.Shunt = true, sb.RS > 0, sb.RSH > 0 && !math.IsInf(sb.RSH, 1)
		var errB error
		fitB, errB = cardFitSignificant(ctx, curves, sb, ob)
		switch {
		case errB != nil:
			res.Notes = append(res.Notes, "second diode (ISR, NR) not in the card: the card fit with it failed ("+errB.Error()+")")
			fitB = nil
		case !(fitB.Diode.ISR > 3*fitB.StdErr.ISR):
			res.Notes = append(res.Notes, "second diode (ISR, NR) not in the card: ISR is not 3 standard errors from zero")
			fitB = nil
		case fitA != nil && !(fitB.RMSAll < fitA.RMSAll):
			res.Notes = append(res.Notes, fmt.Sprintf("second diode (ISR, NR) not in the card: with it the rms of ln I is %.4f, without %.4f", fitB.RMSAll, fitA.RMSAll))
			fitB = nil
		}
	}
	f := fitA
	if fitB != nil {
		f = fitB
		res.Notes = append(res.Notes, "second diode in the card: ISR with NR held at 2 (recombination in the depletion region)")
	}
	if f == nil {
		return d, nil, fmt.Errorf("card fit of the forward I-V: %w", errA)
	}
	if !f.Converged {
		res.Notes = append(res.Notes, "the card fit reached its iteration limit before converging")
	}
	d, e := f.Diode, f.StdErr
	src := FromForwardIV
	if ntemps >= 2 {
		src = FromForwardIV + " (joint card fit over every sweep)"
	}
	params := []CardParam{{"IS", "A", d.IS, e.IS, src}, {"N", "", d.N, e.N, src}}
	if d.RS > 0 {
		params = append(params, CardParam{"RS", "ohm", d.RS, e.RS, src})
	} else {
		res.Notes = append(res.Notes, "RS not in the card: the series resistance is not observable in the windows")
	}
	if d.ISR > 0 {
		params = append(params, CardParam{"ISR", "A", d.ISR, e.ISR, src}, CardParam{"NR", "", d.NR, math.NaN(), FromHeldNR})
	}
	if ntemps >= 2 {
		params = append(params, CardParam{"EG", "eV", d.EG, e.EG, FromTemperatures})
		if opt.HoldXTI {
			params = append(params, CardParam{"XTI", "", d.XTI, math.NaN(), FromHeldXTI})
		} else {
			params = append(params, CardParam{"XTI", "", d.XTI, e.XTI, FromTemperatures})
		}
	} else {
		res.Notes = append(res.Notes, "EG and XTI not in the card: one temperature measured; the card's temperature dependence is the simulator's default, not this device's")
	}
	for _, c := range f.Correlations {
		res.Notes = append(res.Notes, fmt.Sprintf("%s and %s are strongly correlated (r = %.3f): together they reproduce the data, each alone is less certain than its standard error suggests", c.A, c.B, c.R))
	}
	if d.RSH > 0 && !math.IsInf(d.RSH, 1) {
		res.ShuntOhm, res.ShuntStdErrOhm = d.RSH, e.RSH
		res.Notes = append(res.Notes, fmt.Sprintf("a shunt resistance of %.4g ohm (± %.2g) is observable: a .model cannot hold it, so a .subckt wrapping the diode and the shunt is offered", d.RSH, e.RSH))
	}
	return d, params, nil
}

// cardFitSignificant fits the card and, when RS or the shunt is not 3
// standard errors from zero, fits again without it (once).
func cardFitSignificant(ctx context.Context, curves []extract.CardCurve, start extract.CardDiode, opt extract.CardFitOptions) (*extract.CardFit, error) {
	f, err := extract.FitCardIV(ctx, curves, start, opt)
	if err != nil {
		return nil, err
	}
	again := false
	if opt.Series && !(f.Diode.RS > 3*f.StdErr.RS) {
		opt.Series, start.RS, again = false, 0, true
	}
	if opt.Shunt && !(f.Diode.RSH > 3*f.StdErr.RSH) {
		opt.Shunt, start.RSH, again = false, 0, true
	}
	if !again {
		return f, nil
	}
	return extract.FitCardIV(ctx, curves, start, opt)
}
