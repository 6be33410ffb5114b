package fit

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"

	"junco/model"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// cardJunction runs the C-V fit of the fit layer (CV) on ds and returns
// the junction fit C = Cj0/(1 - V/Vbi)^m + Cpar with standard errors, the
// notes and the bias span measured. Cj0, Vbi and m must be determined.
// With cardMinReverseCV points or more at V <= 0 and some in forward bias,
// only the points at V <= 0 enter the fit, so that the diffusion
// capacitance of forward bias does not bend the depletion law (the
// forward points then give TT).
func cardJunction(ctx context.Context, ds *measure.DataSet) (*extract.JunctionCV, extract.JunctionCV, []string, extract.Window, error) {
	var se extract.JunctionCV
	if err := ctx.Err(); err != nil {
		return nil, se, nil, extract.Window{}, err
	}
	// The junction fit needs no area (and no material beyond the default).
	opt := CVOptions{Material: "si"}
	nrev, nfwd := 0, 0
	lo := math.Inf(1)
	for _, v := range ds.VoltageV {
		if v <= 0 {
			nrev++
			lo = math.Min(lo, v)
		} else if v > 0 {
			nfwd++
		}
	}
	var notes []string
	if nrev >= cardMinReverseCV && nfwd > 0 && lo < 0 {
		opt.Window = extract.Window{MinV: lo, MaxV: 0}
		notes = append(notes, fmt.Sprintf("CJO, VJ, M fitted to the %d C-V points at V <= 0; the %d forward points are left to the diffusion capacitance (TT)", nrev, nfwd))
	}
	r, err := CVContext(ctx, ds, opt)
	if err != nil {
		return nil, se, nil, extract.Window{}, err
	}
	ps := r.JunctionParams()
	if len(ps) < 4 {
		return nil, se, nil, extract.Window{}, fmt.Errorf("the junction-capacitance fit failed: %v", r.Notes)
	}
	var j extract.JunctionCV
	vals := []*float64{&j.ZeroBiasCapacitanceF, &j.BuiltInPotentialV, &j.GradingCoefficient, &j.ParasiticCapacitanceF}
	errs := []*float64{&se.ZeroBiasCapacitanceF, &se.BuiltInPotentialV, &se.GradingCoefficient, &se.ParasiticCapacitanceF}
	for k, p := range ps[:4] {
		if k < 3 && !(p.Value > 0) {
			return nil, se, nil, extract.Window{}, fmt.Errorf("the C-V data do not determine %s: CJO, VJ and M cannot be written", p.Name)
		}
		*vals[k], *errs[k] = p.Value, p.StdErr
	}
	notes = append(notes, r.Notes...)
	if !physics.Finite(j.ParasiticCapacitanceF) {
		j.ParasiticCapacitanceF = 0
		notes = append(notes, "the C-V data do not determine the fixture capacitance Cpar: taken as 0")
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range ds.VoltageV {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return &j, se, notes, extract.Window{MinV: lo, MaxV: hi}, nil
}

// cardMinReverseCV is the number of C-V points at V <= 0 above which the
// junction fit leaves the forward points out.
const cardMinReverseCV = 8

// cardParams maps the parameters to the card's fields, every one of them
// given (written whatever its value: TNOM = 0 degC is a temperature);
// skip names the one to leave out (RS in the subcircuit's inner model).
func cardParams(ps []CardParam, skip string) extract.CardParams {
	var c extract.CardParams
	fields := map[string]*extract.CardValue{"IS": &c.IS, "N": &c.N, "RS": &c.RS, "ISR": &c.ISR, "NR": &c.NR,
		"CJO": &c.CJO, "VJ": &c.VJ, "M": &c.M, "FC": &c.FC, "TT": &c.TT, "EG": &c.EG, "XTI": &c.XTI,
		"BV": &c.BV, "IBV": &c.IBV, "TNOM": &c.TNOM}
	for _, p := range ps {
		if f, ok := fields[p.Name]; ok && p.Name != skip {
			*f = extract.Given(p.Value)
		}
	}
	return c
}

// render writes Card and, with a shunt, Subckt.
func (r *CardResult) render() error {
	c, err := extract.ModelCard(r.Name, cardParams(r.Params, ""))
	if err != nil {
		return err
	}
	r.Card = c
	if !(r.ShuntOhm > 0) {
		return nil
	}
	inner := r.Name + "_j"
	if len(inner) > 64 {
		inner = r.Name[:62] + "_j"
	}
	ic, err := extract.ModelCard(inner, cardParams(r.Params, "RS"))
	if err != nil {
		return err
	}
	var b strings.Builder
	fmt.Fprintf(&b, ".subckt %s A K\n", r.Name)
	fmt.Fprintf(&b, "* diode with the measured shunt across the junction and the series resistance outside it\n")
	if r.Diode.RS > 0 {
		fmt.Fprintf(&b, "RS A J %s\nD1 J K %s\nRSH J K %s\n", g4(r.Diode.RS), inner, g4(r.ShuntOhm))
	} else {
		fmt.Fprintf(&b, "D1 A K %s\nRSH A K %s\n", inner, g4(r.ShuntOhm))
	}
	fmt.Fprintf(&b, "%s\n.ends %s", ic, r.Name)
	r.Subckt = b.String()
	return nil
}

func g4(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

// rangeCautions are the warnings printed with the card: breakdown first,
// then the measured ranges, then model.Caution.
func (r *CardResult) rangeCautions() []string {
	var out []string
	rg := r.Ranges
	if math.IsNaN(rg.BreakdownV) {
		out = append(out, fmt.Sprintf("BREAKDOWN NOT MEASURED: the card has no breakdown and blocks any reverse voltage; do not use it below %s, the most negative bias measured", vfmt(rg.ReverseV)))
	} else {
		out = append(out, fmt.Sprintf("breakdown: the card breaks down at %s (BV); its current beyond BV rises with the simulator's exponential law, not as measured", vfmt(rg.BreakdownV)))
	}
	out = append(out, fmt.Sprintf("forward I-V fitted over %s .. %s and %s .. %s: currents and biases beyond are extrapolated",
		vfmt(rg.ForwardV[0]), vfmt(rg.ForwardV[1]), model.Format(model.Current, rg.ForwardA[0], 3, true), model.Format(model.Current, rg.ForwardA[1], 3, true)))
	if rg.TemperatureK[0] == rg.TemperatureK[1] {
		out = append(out, fmt.Sprintf("one temperature measured, %s: the card's temperature dependence is not this device's", model.Format(model.Temperature, rg.TemperatureK[0], 4, true)))
	} else {
		out = append(out, fmt.Sprintf("temperatures measured %s .. %s: beyond them EG and XTI extrapolate", model.Format(model.Temperature, rg.TemperatureK[0], 4, true), model.Format(model.Temperature, rg.TemperatureK[1], 4, true)))
	}
	if !math.IsNaN(rg.CVBiasV[0]) {
		out = append(out, fmt.Sprintf("capacitance measured over %s .. %s", vfmt(rg.CVBiasV[0]), vfmt(rg.CVBiasV[1])))
	}
	return append(out, model.Caution)
}

func vfmt(v float64) string { return model.Format(model.Voltage, v, 4, true) }

// Beyond lists the ways an operating point (bias v in V, current i in A,
// temperature t in K; NaN to skip one) lies outside the measured ranges,
// breakdown first; none when it lies inside.
func (r *CardResult) Beyond(v, i, t float64) []string {
	var out []string
	rg := r.Ranges
	if !math.IsNaN(v) {
		switch {
		case !math.IsNaN(rg.BreakdownV) && v <= rg.BreakdownV:
			out = append(out, fmt.Sprintf("bias %s is at or beyond breakdown (%s)", vfmt(v), vfmt(rg.BreakdownV)))
		case math.IsNaN(rg.BreakdownV) && v < rg.ReverseV:
			out = append(out, fmt.Sprintf("bias %s is below the most negative bias measured (%s) and breakdown was not measured", vfmt(v), vfmt(rg.ReverseV)))
		case v > rg.ForwardV[1]:
			out = append(out, fmt.Sprintf("bias %s is above the forward bias fitted (%s)", vfmt(v), vfmt(rg.ForwardV[1])))
		}
	}
	if !math.IsNaN(i) && i > rg.ForwardA[1] {
		out = append(out, fmt.Sprintf("current %s is above the largest fitted (%s)", model.Format(model.Current, i, 3, true), model.Format(model.Current, rg.ForwardA[1], 3, true)))
	}
	if !math.IsNaN(t) && (t < rg.TemperatureK[0]-0.5 || t > rg.TemperatureK[1]+0.5) {
		out = append(out, fmt.Sprintf("temperature %s is outside the measured %s .. %s", model.Format(model.Temperature, t, 4, true),
			model.Format(model.Temperature, rg.TemperatureK[0], 4, true), model.Format(model.Temperature, rg.TemperatureK[1], 4, true)))
	}
	return out
}

// cardDiodeOf is the static card of r's parameters (TNOM in degC; 27
// degC, the simulator's default, when the card has none).
func cardDiodeOf(r *CardResult) extract.CardDiode {
	c := cardParams(r.Params, "")
	tnom := 27.0
	if c.TNOM.Set {
		tnom = c.TNOM.Value
	}
	return extract.CardDiode{IS: c.IS.Value, N: c.N.Value, RS: c.RS.Value, ISR: c.ISR.Value, NR: c.NR.Value, EG: c.EG.Value,
		XTI: c.XTI.Value, TNOMK: extract.TNOMKelvin(tnom), VJ: c.VJ.Value, M: c.M.Value}
}
