package fit

import (
	"context"
	"errors"
	"fmt"
	"math"

	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// CardInputs are the measurements a model card is built from. IV[0] is the
// reference sweep: IS, N, RS (and ISR, NR) come from it and TNOM is its
// temperature; the other I-V sweeps give EG and XTI. CV, Reverse and
// Recovery are optional.
type CardInputs struct {
	Name     string             // card name (extract.ModelCard's rule)
	IV       []*measure.DataSet // forward I-V sweeps, reference first
	IVFiles  []string           // their names for notes (optional)
	CV       *measure.DataSet   // C-V sweep (CJO, VJ, M; TT from forward points)
	Reverse  *measure.DataSet   // reverse I-V sweep reaching breakdown (BV, IBV)
	Recovery *Recovery          // storage-time measurement (TT)
	// Window restricts the forward fit of every I-V sweep; zero: the
	// forward points above the noise floor (extract.CardWindow).
	Window extract.Window
	// Temperature chooses each file's temperature (the file's own, else
	// the option, else the fallback, else 300 K assumed).
	Temperature TemperatureRule
}

// Where each card parameter came from (CardParam.Source).
const (
	FromForwardIV    = "forward I-V"
	FromHeldNR       = "held at 2 (recombination in the depletion region)"
	FromCV           = "C-V junction fit"
	FromTemperatures = "I-V at several temperatures"
	FromHeldXTI      = "held at 3 (diffusion value): two temperatures determine one combination of EG and XTI"
	FromReference    = "temperature of the reference I-V sweep"
	FromReverse      = "reverse sweep to breakdown"
	FromKnee         = "chosen: middle of the breakdown knee (log scale)"
	FromRecovery     = "reverse-recovery storage time (charge control)"
	FromDiffusionCap = "forward C-V: diffusion capacitance"
	FromDefaultFC    = "default 0.5 (SPICE's), not measured"
)

// CardParam is one parameter of the card: SI value (eV for EG, degC for
// TNOM), standard error (NaN when held or chosen) and its source.
type CardParam struct {
	Name, Unit    string
	Value, StdErr float64
	Source        string
}

// CardCurve is one I-V sweep used for the card: its temperature, the
// window fitted and how well the card reproduces it (rms of ln(I_card/
// I_meas) over that window, by the package's own evaluation of the card).
type CardCurve struct {
	File        string
	Temperature Temperature
	Window      extract.Window
	Points      int
	RMSLog      float64
	Reference   bool
	DataSet     *measure.DataSet
}

// CardRanges are the measured ranges the card stands on.
type CardRanges struct {
	ForwardV     [2]float64 // forward bias fitted, V
	ForwardA     [2]float64 // forward current fitted, A
	TemperatureK [2]float64 // temperatures of the I-V sweeps, K
	CVBiasV      [2]float64 // C-V bias range, V (NaN when none)
	ReverseV     float64    // most negative bias measured in any sweep, V (0 when none)
	BreakdownV   float64    // BV when measured, V (NaN otherwise)
}

// CardResult is an assembled model card.
type CardResult struct {
	Name   string
	Params []CardParam // in card order; only what was measured (and FC)
	Card   string      // the .model line
	// Subckt wraps the diode with its series and shunt resistance when a
	// shunt is observable in the reference sweep (a .model cannot hold
	// it); "" otherwise. Its inner model is NAME_j, the card without RS.
	Subckt   string
	ShuntOhm float64 // the shunt resistance in the subcircuit, ohm (NaN: none)
	// ShuntStdErrOhm is its standard error, ohm.
	ShuntStdErrOhm float64
	Diode          extract.CardDiode
	Junction       *extract.JunctionCV // C-V fit used (nil: none)
	CVData         *measure.DataSet    // the C-V sweep (nil: none)
	Recovery       *Recovery           // the recovery measurement (nil: none)
	Curves         []CardCurve
	Ranges         CardRanges
	// Cautions are the range warnings, breakdown first, then model.Caution.
	Cautions []string
	Notes    []string
}

// Param returns the named parameter and whether the card has it.
func (r *CardResult) Param(name string) (CardParam, bool) {
	for _, p := range r.Params {
		if p.Name == name {
			return p, true
		}
	}
	return CardParam{}, false
}

// Card assembles a diode model card from the measurements (see
// CardInputs): CJO, VJ, M from the C-V junction fit C = Cj0/(1 -
// V/Vbi)^m + Cpar with Cpar (the fixture) removed (cardJunction); IS, N,
// RS, the shunt, ISR (NR = 2) when significant, and EG, XTI when several
// temperatures were measured, from the card fitted jointly to every I-V
// sweep and started from the reference sweep's fits (cardForward); BV,
// IBV from the reverse sweep (extract.ExtractBreakdown); TT from the
// recovery measurement, else from the forward C-V points' diffusion
// capacitance; TNOM the reference sweep's temperature. Parameters nothing
// measured are left out, with a note; the measured ranges and their
// cautions come with the card.
func Card(ctx context.Context, in CardInputs) (*CardResult, error) {
	if len(in.IV) == 0 {
		return nil, errors.New("a model card needs at least one forward I-V sweep")
	}
	if _, err := extract.ModelCard(in.Name, extract.CardParams{}); err != nil {
		return nil, err
	}
	res := &CardResult{Name: in.Name, ShuntOhm: math.NaN(), ShuntStdErrOhm: math.NaN()}
	res.Ranges.CVBiasV = [2]float64{math.NaN(), math.NaN()}
	res.Ranges.BreakdownV = math.NaN()

	// Windows and temperatures of the I-V sweeps.
	type fitted struct {
		ds *measure.DataSet
		t  Temperature
		w  extract.Window
	}
	var sweeps []fitted
	for k, ds := range in.IV {
		if ds == nil || ds.Kind != measure.KindIV {
			return nil, fmt.Errorf("I-V %s: not an I-V sweep", cardFile(in, k))
		}
		if IsLit(ds) {
			return nil, fmt.Errorf("I-V %s: a lit sweep (it carries a photocurrent); the model card describes the dark diode: give dark sweeps", cardFile(in, k))
		}
		t, tnote := in.Temperature.Choose(ds)
		w := in.Window
		if w.IsZero() {
			var err error
			if w, err = extract.CardWindow(ds.VoltageV, ds.CurrentA, t.K, 100); err != nil {
				return nil, fmt.Errorf("I-V %s: %w", cardFile(in, k), err)
			}
		}
		if tnote != "" {
			res.Notes = append(res.Notes, cardFile(in, k)+": "+tnote)
		}
		sweeps = append(sweeps, fitted{ds: ds, t: t, w: w})
	}
	ref := &sweeps[0]
	tnomK := ref.t.K
	var curves []extract.CardCurve
	temps := map[float64]bool{}
	for _, sw := range sweeps {
		curves = append(curves, extract.CardCurve{TemperatureK: sw.t.K, VoltageV: sw.ds.VoltageV, CurrentA: sw.ds.CurrentA, Window: sw.w})
		temps[math.Round(sw.t.K*2)/2] = true
	}
	// C-V first: its VJ and M enter the recombination term (Kgen).
	var junction *extract.JunctionCV
	var jse extract.JunctionCV
	if in.CV != nil {
		j, se, jnotes, w, err := cardJunction(ctx, in.CV)
		if err != nil {
			return nil, fmt.Errorf("C-V: %w", err)
		}
		res.Notes = append(res.Notes, jnotes...)
		junction, jse = j, se
		res.Junction, res.CVData = j, in.CV
		res.Ranges.CVBiasV = [2]float64{w.MinV, w.MaxV}
	}
	d, params, err := cardForward(ctx, in, ref.ds, ref.w, tnomK, curves, len(temps), junction, res)
	if err != nil {
		return nil, err
	}
	if j := junction; j != nil {
		params = append(params,
			CardParam{"CJO", "F", j.ZeroBiasCapacitanceF, jse.ZeroBiasCapacitanceF, FromCV},
			CardParam{"VJ", "V", j.BuiltInPotentialV, jse.BuiltInPotentialV, FromCV},
			CardParam{"M", "", j.GradingCoefficient, jse.GradingCoefficient, FromCV},
			CardParam{"FC", "", 0.5, math.NaN(), FromDefaultFC})
		res.Notes = append(res.Notes, fmt.Sprintf("fixture capacitance Cpar = %.4g F removed: CJO is the junction's own", j.ParasiticCapacitanceF))
	} else {
		res.Notes = append(res.Notes, "CJO, VJ, M not in the card: no C-V sweep; the card has no junction capacitance")
	}

	// TT.
	switch {
	case in.Recovery != nil:
		rc := in.Recovery
		res.Recovery = rc
		tt, ttse, err := extract.TransitTimeFromStorage(rc.StorageS, rc.StdErrS, rc.ForwardA, rc.ReverseA)
		if err != nil {
			return nil, fmt.Errorf("recovery: %w", err)
		}
		params = append(params, CardParam{"TT", "s", tt, ttse, FromRecovery})
		res.Notes = append(res.Notes, fmt.Sprintf("TT from the storage time %.4g s at IF = %.4g A, IR = %.4g A: TT = ts/ln(1 + IF/IR)", rc.StorageS, rc.ForwardA, rc.ReverseA))
	case junction != nil:
		jj := *junction
		dep := func(v float64) float64 { return jj.Capacitance(v) }
		vt := physics.ThermalVoltage(tnomK)
		cond := func(v float64) float64 {
			h := 0.25 * vt
			return (d.Current(v+h, tnomK) - d.Current(v-h, tnomK)) / (2 * h)
		}
		tf, err := extract.FitDiffusionTransitTime(in.CV.VoltageV, in.CV.CapacitanceF, dep, cond)
		switch {
		case err != nil:
			res.Notes = append(res.Notes, "TT not in the card: no recovery (storage-time) measurement and no forward C-V points to show the diffusion capacitance")
		case !(tf.TT > 3*tf.StdErrTT) || tf.MaxExcess < 0.02:
			res.Notes = append(res.Notes, fmt.Sprintf("TT not in the card: the forward C-V points show no significant diffusion capacitance (TT = %.3g ± %.2g s, largest excess %.1f %%)", tf.TT, tf.StdErrTT, 100*tf.MaxExcess))
		default:
			params = append(params, CardParam{"TT", "s", tf.TT, tf.StdErrTT, FromDiffusionCap})
			res.Notes = append(res.Notes, fmt.Sprintf("TT from the diffusion capacitance C - Cj(V) = TT dI/dV at %d forward C-V points (no recovery measurement)", tf.Points))
		}
	default:
		res.Notes = append(res.Notes, "TT not in the card: no recovery (storage-time) measurement and no C-V sweep; the card stores no charge")
	}

	// BV, IBV.
	res.Ranges.ReverseV = 0
	for _, sw := range sweeps {
		res.Ranges.ReverseV = math.Min(res.Ranges.ReverseV, minOf(sw.ds.VoltageV))
	}
	if in.CV != nil {
		res.Ranges.ReverseV = math.Min(res.Ranges.ReverseV, minOf(in.CV.VoltageV))
	}
	if in.Reverse != nil {
		res.Ranges.ReverseV = math.Min(res.Ranges.ReverseV, minOf(in.Reverse.VoltageV))
		bf, err := extract.ExtractBreakdown(in.Reverse.VoltageV, in.Reverse.CurrentA)
		if err != nil {
			return nil, fmt.Errorf("reverse sweep: %w", err)
		}
		if bf.Reached {
			params = append(params, CardParam{"BV", "V", bf.BV, bf.StdErrBV, FromReverse},
				CardParam{"IBV", "A", bf.IBV, math.NaN(), FromKnee})
			res.Ranges.BreakdownV = -bf.BV
		} else {
			res.Notes = append(res.Notes, "BV, IBV not in the card: the reverse sweep does not reach breakdown ("+bf.Reason+")")
		}
	} else {
		res.Notes = append(res.Notes, "BV, IBV not in the card: no reverse sweep to breakdown")
	}
	params = append(params, CardParam{"TNOM", "degC", extract.TNOMCelsius(tnomK), math.NaN(), FromReference})
	res.Params = params
	res.Diode = d

	// Curves, ranges and how the card (own evaluation) reproduces them.
	res.Ranges.ForwardV = [2]float64{math.Inf(1), math.Inf(-1)}
	res.Ranges.ForwardA = [2]float64{math.Inf(1), math.Inf(-1)}
	res.Ranges.TemperatureK = [2]float64{math.Inf(1), math.Inf(-1)}
	for k, sw := range sweeps {
		c := CardCurve{File: cardFile(in, k), Temperature: sw.t, Window: sw.w, Reference: k == 0, DataSet: sw.ds}
		vs, is := forwardIn(sw.ds, sw.w)
		c.Points = len(vs)
		if len(vs) > 0 {
			c.Window = extract.Window{MinV: minOf(vs), MaxV: -minOf(negate(vs))}
		}
		ss := 0.0
		for j := range vs {
			r := math.Log(d.Current(vs[j], sw.t.K) / is[j])
			ss += r * r
			res.Ranges.ForwardV = [2]float64{math.Min(res.Ranges.ForwardV[0], vs[j]), math.Max(res.Ranges.ForwardV[1], vs[j])}
			res.Ranges.ForwardA = [2]float64{math.Min(res.Ranges.ForwardA[0], is[j]), math.Max(res.Ranges.ForwardA[1], is[j])}
		}
		c.RMSLog = math.Sqrt(ss / float64(max(1, len(vs))))
		res.Ranges.TemperatureK = [2]float64{math.Min(res.Ranges.TemperatureK[0], sw.t.K), math.Max(res.Ranges.TemperatureK[1], sw.t.K)}
		res.Curves = append(res.Curves, c)
	}
	if err := res.render(); err != nil {
		return nil, err
	}
	res.Cautions = res.rangeCautions()
	return res, nil
}

func cardFile(in CardInputs, k int) string {
	if k < len(in.IVFiles) && in.IVFiles[k] != "" {
		return in.IVFiles[k]
	}
	if k < len(in.IV) && in.IV[k] != nil && in.IV[k].SourceFile != "" {
		return in.IV[k].SourceFile
	}
	return fmt.Sprintf("I-V sweep %d", k+1)
}

// forwardIn returns the forward points (V > 0, I > 0) of ds inside w.
func forwardIn(ds *measure.DataSet, w extract.Window) (v, i []float64) {
	for k := range ds.VoltageV {
		if w.Contains(ds.VoltageV[k]) && ds.VoltageV[k] > 0 && ds.CurrentA[k] > 0 && physics.Finite(ds.CurrentA[k]) {
			v = append(v, ds.VoltageV[k])
			i = append(i, ds.CurrentA[k])
		}
	}
	return v, i
}

func minOf(x []float64) float64 {
	m := math.Inf(1)
	for _, v := range x {
		if physics.Finite(v) {
			m = math.Min(m, v)
		}
	}
	if math.IsInf(m, 1) {
		return 0
	}
	return m
}

func negate(x []float64) []float64 {
	out := make([]float64, len(x))
	for k, v := range x {
		out[k] = -v
	}
	return out
}
