package fit

import (
	"context"
	"errors"
	"fmt"

	"junco/model/measure"
	"junco/physics/extract"
)

// IVOptions configures an I-V fit: the bias window (zero: every forward
// point), the diode model (single or double), the temperature rule, and
// the instrument's compliance and noise floor in A (0: detected or
// estimated from the data, extract.IVOptions).
type IVOptions struct {
	Window      extract.Window
	Model       extract.DiodeModel
	Temperature TemperatureRule
	ComplianceA float64
	FloorA      float64
}

// IVResult is an I-V fit of one data set: the fit, its temperature with
// the source, and the notes (the fitter's, then how the temperature was
// chosen when not from the file, then rows left out at import).
type IVResult struct {
	DataSet     *measure.DataSet
	Fit         *extract.IVFit
	Temperature Temperature
	Notes       []string
}

// IV fits an I-V data set (extract.FitIV) at the temperature the rule
// chooses.
func IV(ds *measure.DataSet, opt IVOptions) (*IVResult, error) {
	return IVContext(context.Background(), ds, opt)
}

// IVContext is IV that stops, with ctx's error, when ctx is done.
func IVContext(ctx context.Context, ds *measure.DataSet, opt IVOptions) (*IVResult, error) {
	if ds == nil || ds.Kind != measure.KindIV || len(ds.CurrentA) != len(ds.VoltageV) {
		return nil, errors.New("the data set is not an I-V sweep")
	}
	t, tnote := opt.Temperature.Choose(ds)
	f, err := extract.FitIVContext(ctx, ds.VoltageV, ds.CurrentA, extract.IVOptions{TemperatureK: t.K, Window: opt.Window, Model: opt.Model,
		ComplianceA: opt.ComplianceA, CurrentFloorA: opt.FloorA})
	if err != nil {
		return nil, err
	}
	r := &IVResult{DataSet: ds, Fit: f, Temperature: t}
	r.Notes = append(r.Notes, f.Notes...)
	if tnote != "" {
		r.Notes = append(r.Notes, tnote)
	}
	r.Notes = append(r.Notes, RowNotes(ds)...)
	return r, nil
}

// RowNotes says how many rows the import left out and the first of them
// (none when all rows were read).
func RowNotes(ds *measure.DataSet) []string {
	if ds == nil || ds.ProblemRows == 0 || len(ds.Problems) == 0 {
		return nil
	}
	p := ds.Problems[0]
	return []string{fmt.Sprintf("%d rows left out (first: line %d, %s)", ds.ProblemRows, p.Line, p.Kind)}
}

// Param is one fitted parameter: SI value and unit, standard error (NaN
// when held fixed or not determined).
type Param struct {
	Name, Unit    string
	Value, StdErr float64
}

// Params lists the fitted parameters in SI units with standard errors:
// single diode Is (A), n, Rs and Rsh (ohm); double diode Is1, Is2 (A),
// Rs and Rsh (ohm), the ideality factors being fixed at 1 and 2.
func (r *IVResult) Params() []Param {
	if r == nil || r.Fit == nil {
		return nil
	}
	f := r.Fit
	if f.Model == extract.ModelDouble {
		d, s := f.Double, f.DoubleStdErr
		return []Param{
			{"Is1", "A", d.DiffusionCurrentA, s.DiffusionCurrentA},
			{"Is2", "A", d.RecombinationCurrentA, s.RecombinationCurrentA},
			{"Rs", "ohm", d.SeriesResistanceOhm, s.SeriesResistanceOhm},
			{"Rsh", "ohm", d.ShuntResistanceOhm, s.ShuntResistanceOhm},
		}
	}
	d, s := f.Single, f.SingleStdErr
	return []Param{
		{"Is", "A", d.SaturationCurrentA, s.SaturationCurrentA},
		{"n", "", d.IdealityFactor, s.IdealityFactor},
		{"Rs", "ohm", d.SeriesResistanceOhm, s.SeriesResistanceOhm},
		{"Rsh", "ohm", d.ShuntResistanceOhm, s.ShuntResistanceOhm},
	}
}
