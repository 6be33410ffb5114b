package fit

import (
	"errors"
	"fmt"

	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// ErrNotConverged marks a junction-capacitance fit that did not converge
// (its numbers are not reported).
var ErrNotConverged = errors.New("the junction-capacitance fit did not converge")

// CVOptions configures a C-V analysis: the bias window (zero: every
// point), the junction area in m^2 and the material (its permittivity
// turns the Mott-Schottky slope into a doping).
type CVOptions struct {
	Window   extract.Window
	AreaM2   float64
	Material string
}

// CVResult is the C-V analysis of one data set: the Mott-Schottky line
// (built-in potential and doping of the lightly doped side, for a
// one-sided abrupt junction) and the junction-capacitance fit
// C = Cj0/(1 - V/Vbi)^m + Cpar when it converged (Junction nil otherwise,
// JunctionErr and a note say why).
type CVResult struct {
	DataSet      *measure.DataSet
	Material     *physics.Material
	Geometry     extract.CVGeometry
	MottSchottky *extract.MottSchottkyResult
	Junction     *extract.CVFit
	JunctionErr  error
	Notes        []string
}

// CV analyses a C-V data set. An area that is not a positive finite number
// below 1 m^2, an unknown material and a failed Mott-Schottky line are
// errors; a failed junction fit is a note.
func CV(ds *measure.DataSet, opt CVOptions) (*CVResult, error) {
	if ds == nil || ds.Kind != measure.KindCV || len(ds.CapacitanceF) != len(ds.VoltageV) {
		return nil, errors.New("the data set is not a C-V sweep")
	}
	mat, err := physics.MaterialByName(opt.Material)
	if err != nil {
		return nil, fmt.Errorf("material: %w", err)
	}
	if !(opt.AreaM2 > 0 && opt.AreaM2 < 1) {
		return nil, fmt.Errorf("area %g m^2: allowed above 0 and below 1 m^2 (the doping follows from C per unit area)", opt.AreaM2)
	}
	g := extract.CVGeometry{AreaM2: opt.AreaM2, PermittivityFm: mat.Permittivity()}
	ms, err := extract.MottSchottky(ds.VoltageV, ds.CapacitanceF, g, opt.Window)
	if err != nil {
		return nil, fmt.Errorf("Mott-Schottky: %w", err)
	}
	r := &CVResult{DataSet: ds, Material: mat, Geometry: g, MottSchottky: ms}
	switch j, err := extract.FitJunctionCV(ds.VoltageV, ds.CapacitanceF, extract.CVOptions{Window: opt.Window}); {
	case err != nil:
		r.JunctionErr = err
		r.Notes = append(r.Notes, "junction-capacitance fit failed: "+err.Error())
	case !j.Converged:
		r.JunctionErr = ErrNotConverged
		r.Notes = append(r.Notes, "junction-capacitance fit did not converge: not reported")
	default:
		r.Junction = j
	}
	r.Notes = append(r.Notes, RowNotes(ds)...)
	return r, nil
}

// MottSchottkyParams are the line's Vbi (V) and N (m^-3).
func (r *CVResult) MottSchottkyParams() []Param {
	ms := r.MottSchottky
	return []Param{
		{"Vbi", "V", ms.BuiltInV, ms.StdErrV},
		{"N", "m^-3", ms.DopingM3, ms.StdErrM3},
	}
}

// JunctionParams are the junction fit's Cj0 (F), Vbi (V), m and Cpar (F);
// none when the fit failed.
func (r *CVResult) JunctionParams() []Param {
	if r.Junction == nil {
		return nil
	}
	p, s := r.Junction.Params, r.Junction.StdErr
	return []Param{
		{"Cj0", "F", p.ZeroBiasCapacitanceF, s.ZeroBiasCapacitanceF},
		{"Vbi", "V", p.BuiltInPotentialV, s.BuiltInPotentialV},
		{"m", "", p.GradingCoefficient, s.GradingCoefficient},
		{"Cpar", "F", p.ParasiticCapacitanceF, s.ParasiticCapacitanceF},
	}
}

// Windowed keeps the points of v, y inside w (all for the zero window).
func Windowed(v, y []float64, w extract.Window) ([]float64, []float64) {
	if w.IsZero() {
		return v, y
	}
	var a, b []float64
	for k := range v {
		if w.Contains(v[k]) {
			a = append(a, v[k])
			b = append(b, y[k])
		}
	}
	return a, b
}
