package fit

import (
	"context"
	"errors"
	"fmt"

	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// MethodIVLit is the method name of the record of a lit I-V fit (Iph, Is,
// n, Rs, Rsh).
const MethodIVLit = "iv-lit-single-diode"

// LitOptions configures a lit I-V fit: the bias window (zero: every
// point), the sign convention of the current (extract.SignAuto: recognised)
// and the temperature rule.
type LitOptions struct {
	Window      extract.Window
	Sign        extract.LitSign
	Temperature TemperatureRule
}

// LitResult is a lit I-V fit of one data set: the fit, its temperature
// with the source, and the notes (which sign convention was assumed and
// why, the fitter's notes, how the temperature was chosen when not from
// the file, rows left out at import).
type LitResult struct {
	DataSet     *measure.DataSet
	Fit         *extract.LitFit
	Temperature Temperature
	Notes       []string
}

// RecogniseLit says whether an I-V data set is a lit curve (current of one
// sign at zero bias that changes sign at open circuit) and in which sign
// convention (extract.RecogniseLit). A data set that is not an I-V sweep is
// not lit.
func RecogniseLit(ds *measure.DataSet) extract.LitRecognition {
	if ds == nil || ds.Kind != measure.KindIV || len(ds.CurrentA) != len(ds.VoltageV) {
		return extract.LitRecognition{Why: "not an I-V sweep"}
	}
	return extract.RecogniseLit(ds.VoltageV, ds.CurrentA)
}

// IsLit reports whether an I-V data set is a lit curve (RecogniseLit):
// both front ends route such a data set to LitIV instead of IV.
func IsLit(ds *measure.DataSet) bool { return RecogniseLit(ds).Lit }

// LitIV fits the lit single-diode model (extract.FitLit) to an I-V data
// set at the temperature the rule chooses.
func LitIV(ds *measure.DataSet, opt LitOptions) (*LitResult, error) {
	return LitIVContext(context.Background(), ds, opt)
}

// LitIVContext is LitIV that stops, with ctx's error, when ctx is done.
func LitIVContext(ctx context.Context, ds *measure.DataSet, opt LitOptions) (*LitResult, error) {
	if ds == nil || ds.Kind != measure.KindIV || len(ds.CurrentA) != len(ds.VoltageV) {
		return nil, errors.New("the data set is not an I-V sweep")
	}
	t, tnote := opt.Temperature.Choose(ds)
	f, err := extract.FitLitContext(ctx, ds.VoltageV, ds.CurrentA, extract.LitOptions{TemperatureK: t.K, Window: opt.Window, Sign: opt.Sign})
	if err != nil {
		return nil, err
	}
	r := &LitResult{DataSet: ds, Fit: f, Temperature: t}
	r.Notes = append(r.Notes, "current sign: "+f.Sign.String()+" ("+f.SignWhy+")")
	r.Notes = append(r.Notes, f.Notes...)
	if tnote != "" {
		r.Notes = append(r.Notes, tnote)
	}
	r.Notes = append(r.Notes, RowNotes(ds)...)
	return r, nil
}

// Params lists the fitted parameters in SI units with standard errors:
// Iph and Is (A), n, Rs and Rsh (ohm).
func (r *LitResult) Params() []Param {
	if r == nil || r.Fit == nil {
		return nil
	}
	d, s := r.Fit.Diode, r.Fit.StdErr
	return []Param{
		{"Iph", "A", d.PhotocurrentA, s.PhotocurrentA},
		{"Is", "A", d.SaturationCurrentA, s.SaturationCurrentA},
		{"n", "", d.IdealityFactor, s.IdealityFactor},
		{"Rs", "ohm", d.SeriesResistanceOhm, s.SeriesResistanceOhm},
		{"Rsh", "ohm", d.ShuntResistanceOhm, s.ShuntResistanceOhm},
	}
}

// LitRecord is the record of a lit I-V fit: the five parameters, and in
// the notes the window, the residual, the sign convention, the figures of
// merit of the data and of the fit, and the temperature.
func LitRecord(r *LitResult) Record {
	f := r.Fit
	fig := func(what string, x physics.LitFigures) string {
		return fmt.Sprintf("%s: Isc %.6g A, Voc %.6g V, Pmax %.6g W, FF %.4g", what, x.Isc, x.Voc, x.Pmax, x.FF)
	}
	notes := []string{
		"I = Is (exp((V - I Rs)/(n Vt)) - 1) + (V - I Rs)/Rsh - Iph (load sign)",
		fmt.Sprintf("window %g V to %g V, %d points used (%d skipped)", f.UsedWindow.MinV, f.UsedWindow.MaxV, f.Points, f.Skipped),
		fmt.Sprintf("rms residual %.4g A", f.RMSResidualA),
		fig("from the data", f.Data),
		fig("from the fit", f.Model),
		fmt.Sprintf("temperature %g K (%s)", r.Temperature.K, r.Temperature.Source),
	}
	return newRecord(MethodIVLit, r.Params(), notes, r.Notes)
}
