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

// CVOptions configures a C-V analysis (extract.AnalyzeCV).
type CVOptions struct {
	Window extract.Window // bias window; zero = every point
	// AreaM2 is the junction area in m^2; 0 = none given. Cj0, Vbi, m
	// and Cpar need no area; the doping and the profile do.
	AreaM2   float64
	Material string // its permittivity turns the slope into a doping
	// Grading and Parasitic, when not nil, hold m or Cpar (F) at the
	// value given instead of fitting it.
	Grading, Parasitic *float64
	// ProfileHalfWindow > 0 asks for the differential doping profile of
	// C - Cpar over 2 ProfileHalfWindow + 1 points; 0 = none.
	ProfileHalfWindow int
}

// CVResult is the C-V analysis of one data set. The headline is the
// junction fit C = Cj0/(1 - V/Vbi)^m + Cpar (Analysis.BuiltInPotentialV
// etc., each with whether the data determine it); the doping comes from
// the Mott-Schottky line of C - Cpar only when m is consistent with 1/2
// and an area is given.
type CVResult struct {
	DataSet  *measure.DataSet
	Material *physics.Material
	// Geometry has AreaM2 = 0 when no area was given.
	Geometry extract.CVGeometry
	Analysis *extract.CVAnalysis
	Notes    []string
}

// HasArea reports whether an area was given (so the doping could be
// derived).
func (r *CVResult) HasArea() bool { return r.Geometry.AreaM2 > 0 }

// CV analyses a C-V data set with extract.AnalyzeCV. An area that is
// given must be positive, finite and below 1 m^2; a held m must lie within
// the fit's bounds; an unknown material and a failed junction fit are
// errors.
func CV(ds *measure.DataSet, opt CVOptions) (*CVResult, error) {
	return CVContext(context.Background(), ds, opt)
}

// CVContext is CV that stops, with ctx's error, when ctx is done.
func CVContext(ctx context.Context, ds *measure.DataSet, opt CVOptions) (*CVResult, error) {
	if ds == nil || ds.Kind != measure.KindCV || len(ds.CapacitanceF) != len(ds.VoltageV) {
		return nil, errors.New("the data set is not a C-V sweep")
	}
	mat, err := physics.MaterialByName(opt.Material)
	if err != nil {
		return nil, fmt.Errorf("material: %w", err)
	}
	if opt.AreaM2 != 0 && !(opt.AreaM2 > 0 && opt.AreaM2 < 1) {
		return nil, fmt.Errorf("area %g m^2: allowed above 0 and below 1 m^2 (the doping follows from C per unit area), or none", opt.AreaM2)
	}
	g := extract.CVGeometry{PermittivityFm: mat.Permittivity()}
	ao := extract.CVAnalysisOptions{Fit: extract.CVOptions{Window: opt.Window}, ProfileHalfWindow: opt.ProfileHalfWindow}
	if opt.AreaM2 > 0 {
		g.AreaM2 = opt.AreaM2
		ao.Geometry = g
	}
	if opt.Grading != nil {
		ao.Fit.FixGrading, ao.Fit.Grading = true, *opt.Grading
	}
	if opt.Parasitic != nil {
		ao.Fit.FixParasitic, ao.Fit.ParasiticF = true, *opt.Parasitic
	}
	a, err := extract.AnalyzeCVContext(ctx, ds.VoltageV, ds.CapacitanceF, ao)
	if err != nil {
		return nil, fmt.Errorf("junction-capacitance fit: %w", err)
	}
	r := &CVResult{DataSet: ds, Material: mat, Geometry: g, Analysis: a}
	r.Notes = append(r.Notes, a.Notes...)
	if d := a.DopingM3; !d.Determined && r.HasArea() {
		r.Notes = append(r.Notes, "doping not determined: "+d.Reason)
	}
	r.Notes = append(r.Notes, RowNotes(ds)...)
	return r, nil
}

// shown is the value of q when the data determine it (or it is held),
// else NaN, so that a value the data do not pin down is never stored or
// printed as if it were known.
func shown(q extract.CVQuantity) Param {
	p := Param{Value: q.Value, StdErr: q.StdErr}
	if !q.Determined {
		p.Value, p.StdErr = math.NaN(), math.NaN()
	}
	return p
}

// JunctionParams are the headline junction fit's Cj0 (F), Vbi (V), m and
// Cpar (F); a value the data do not determine is NaN (see shown), a held
// one has standard error NaN.
func (r *CVResult) JunctionParams() []Param {
	a := r.Analysis
	out := []Param{shown(a.ZeroBiasCapacitanceF), shown(a.BuiltInPotentialV), shown(a.GradingCoefficient), shown(a.ParasiticCapacitanceF)}
	for k, n := range [][2]string{{"Cj0", "F"}, {"Vbi", "V"}, {"m", ""}, {"Cpar", "F"}} {
		out[k].Name, out[k].Unit = n[0], n[1]
	}
	return out
}

// MottSchottkyParams are the Mott-Schottky line of C - Cpar (m = 1/2):
// its Vbi (V) and the doping N (m^-3, NaN when not determined); nil when
// the line could not be fitted.
func (r *CVResult) MottSchottkyParams() []Param {
	l := r.Analysis.Line
	if l == nil {
		return nil
	}
	n := shown(r.Analysis.DopingM3)
	n.Name, n.Unit = "N", "m^-3"
	vbi := Param{"Vbi", "V", l.BuiltInV, l.StdErrV}
	if !l.Fit.Status.BuiltInPotential.Determined {
		vbi.Value, vbi.StdErr = math.NaN(), math.NaN()
	}
	return []Param{vbi, n}
}
