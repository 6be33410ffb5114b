package cli

import (
	"context"
	"fmt"
	"io"
	"strings"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// fitLitFields are the JSON fields only a lit I-V fit has (fit iv on a lit
// curve, or with --light); Is, n, Rs and Rsh (and their standard errors)
// go in fitIVValues like the dark fit's.
type fitLitFields struct {
	PhotocurrentA       *float64       `json:"photocurrent_A"`
	PhotocurrentStdErrA *float64       `json:"photocurrent_stderr_A"`
	CurrentSign         string         `json:"current_sign"`
	CurrentSignReason   string         `json:"current_sign_reason"`
	RMSResidualA        *float64       `json:"rms_residual_A"`
	FromData            *fitLitFigures `json:"figures_from_data"`
	FromFit             *fitLitFigures `json:"figures_from_fit"`
	StartPoints         int            `json:"start_points"`
	StartPointsAtBest   int            `json:"start_points_at_best"`

	lit *fit.LitResult
}

// fitLitFigures are the figures of merit of a lit curve (generator sign:
// the delivered current and power are positive); null when not found.
type fitLitFigures struct {
	ShortCircuitCurrentA *float64 `json:"short_circuit_current_A"`
	OpenCircuitVoltageV  *float64 `json:"open_circuit_voltage_V"`
	MaxPowerW            *float64 `json:"max_power_W"`
	MaxPowerVoltageV     *float64 `json:"max_power_voltage_V"`
	MaxPowerCurrentA     *float64 `json:"max_power_current_A"`
	FillFactor           *float64 `json:"fill_factor"`
}

func fitLitFiguresOf(f physics.LitFigures) *fitLitFigures {
	return &fitLitFigures{fitNum(f.Isc), fitNum(f.Voc), fitNum(f.Pmax), fitNum(f.Vmp), fitNum(f.Imp), fitNum(f.FF)}
}

// fitLitFile fits a lit I-V data set (model/fit's LitIV) and makes its
// report; options that only the dark fit honours are noted.
func fitLitFile(ctx context.Context, path string, ds *measure.DataSet, c fitCommon, leakAt *float64) (*fitIVReport, error) {
	o := c.ivOptions()
	res, err := fit.LitIVContext(ctx, ds, fit.LitOptions{Window: o.Window, Temperature: o.Temperature})
	if err != nil {
		return nil, fmt.Errorf("%s: lit fit: %w", path, err)
	}
	f, t := res.Fit, res.Temperature
	d, s := f.Diode, f.StdErr
	r := &fitIVReport{File: path, Model: "lit", TemperatureK: fitNum(t.K), TemperatureSource: t.Source,
		WindowV: []float64{f.UsedWindow.MinV, f.UsedWindow.MaxV}, Points: &f.Points, SkippedPoints: f.Skipped,
		RowProblems: ds.ProblemRows, Correlations: fitCorrelations(f.Correlations), Notes: res.Notes,
		fitIVValues: &fitIVValues{SaturationCurrentA: fitNum(d.SaturationCurrentA),
			IdealityFactor: fitNum(d.IdealityFactor), SeriesResistanceOhm: fitNum(d.SeriesResistanceOhm), ShuntResistanceOhm: fitNum(d.ShuntResistanceOhm)},
		StdErr: &fitIVValues{SaturationCurrentA: fitNum(s.SaturationCurrentA),
			IdealityFactor: fitNum(s.IdealityFactor), SeriesResistanceOhm: fitNum(s.SeriesResistanceOhm), ShuntResistanceOhm: fitNum(s.ShuntResistanceOhm)},
		fitLitFields: &fitLitFields{PhotocurrentA: fitNum(d.PhotocurrentA), PhotocurrentStdErrA: fitNum(s.PhotocurrentA), CurrentSign: f.Sign.String(), CurrentSignReason: f.SignWhy, RMSResidualA: fitNum(f.RMSResidualA),
			FromData: fitLitFiguresOf(f.Data), FromFit: fitLitFiguresOf(f.Model), StartPoints: f.StartsTried, StartPointsAtBest: f.StartsAtBest, lit: res}}
	if c.model == extract.ModelDouble {
		r.Notes = append(r.Notes, "--model double does not apply to a lit curve: the lit fit has one diode")
	}
	if leakAt != nil {
		r.Notes = append(r.Notes, "--leakage-at does not apply to a lit curve: the reverse current holds the photocurrent")
	}
	return r, nil
}

// fitLitText writes the text report of a lit fit.
func fitLitText(w io.Writer, r *fitIVReport, ascii bool) {
	tw := fitTable(w)
	f := r.lit.Fit
	d, s := f.Diode, f.StdErr
	fmt.Fprintf(tw, "file\t%s\n", r.File)
	fmt.Fprintf(tw, "model\tlit single diode, T = %s (%s)\n", model.Format(model.Temperature, f.TemperatureK, 4, ascii), r.TemperatureSource)
	fmt.Fprintf(tw, "current sign\t%s (%s)\n", f.Sign, f.SignWhy)
	fmt.Fprintf(tw, "window\t%s .. %s, %d points (%d skipped)\n", model.Format(model.Voltage, f.UsedWindow.MinV, 3, ascii),
		model.Format(model.Voltage, f.UsedWindow.MaxV, 3, ascii), f.Points, f.Skipped)
	fmt.Fprintf(tw, "photocurrent\tIph\t%s\n", fitLitPM(model.Current, d.PhotocurrentA, s.PhotocurrentA, ascii))
	fmt.Fprintf(tw, "saturation current\tIs\t%s\n", fitLitPM(model.Current, d.SaturationCurrentA, s.SaturationCurrentA, ascii))
	fmt.Fprintf(tw, "ideality factor\tn\t%s\n", fitLitPM(model.Dimensionless, d.IdealityFactor, s.IdealityFactor, ascii))
	fmt.Fprintf(tw, "series resistance\tRs\t%s\n", fitLitPM(model.Resistance, d.SeriesResistanceOhm, s.SeriesResistanceOhm, ascii))
	fmt.Fprintf(tw, "shunt resistance\tRsh\t%s\n", fitLitPM(model.Resistance, d.ShuntResistanceOhm, s.ShuntResistanceOhm, ascii))
	fmt.Fprintf(tw, "rms residual\t\t%s\n", model.Format(model.Current, f.RMSResidualA, 4, ascii))
	fmt.Fprintf(tw, "start points\t\t%d of %d reached the best fit\n", f.StartsAtBest, f.StartsTried)
	fig := func(name string, k model.Kind, a, b float64) {
		fmt.Fprintf(tw, "%s\t\t%s (data)  %s (fit)\n", name, fitLitNum(k, a, ascii), fitLitNum(k, b, ascii))
	}
	fig("short-circuit current Isc", model.Current, f.Data.Isc, f.Model.Isc)
	fig("open-circuit voltage Voc", model.Voltage, f.Data.Voc, f.Model.Voc)
	fig("maximum power Pmax", model.Power, f.Data.Pmax, f.Model.Pmax)
	fig("at Vmp", model.Voltage, f.Data.Vmp, f.Model.Vmp)
	fig("at Imp", model.Current, f.Data.Imp, f.Model.Imp)
	fig("fill factor FF", model.Dimensionless, f.Data.FF, f.Model.FF)
	var notes []string
	for _, n := range r.Notes {
		if !strings.HasPrefix(n, "current sign: ") { // shown above
			notes = append(notes, n)
		}
	}
	fitTextTail(tw, r.Correlations, notes, "")
	tw.Flush()
}

// fitLitNum formats a figure, "n/a" when it was not found.
func fitLitNum(k model.Kind, x float64, ascii bool) string {
	if fitNum(x) == nil {
		return "n/a"
	}
	return model.Format(k, x, 4, ascii)
}

// fitLitPM formats "value ± se", or the value "(not determined)" when the
// standard error could not be estimated (every lit parameter is fitted,
// none is held fixed).
func fitLitPM(k model.Kind, v, se float64, ascii bool) string {
	if fitNum(se) == nil {
		return model.Format(k, v, 4, ascii) + "  (not determined)"
	}
	return fitPM(k, v, se, ascii)
}
