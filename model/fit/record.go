package fit

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"junco/physics"
	"junco/physics/extract"
)

// Method names of the records fits leave in a session: one per model,
// each with one parameter set.
const (
	MethodIVSingle     = "iv-single-diode"         // Is, n, Rs, Rsh
	MethodIVDouble     = "iv-double-diode"         // Is1, Is2, Rs, Rsh
	MethodMottSchottky = "mott-schottky"           // Vbi, N of the line of C - Cpar
	MethodCVJunction   = "cv-junction-capacitance" // Cj0, Vbi, m, Cpar
)

// Record is what a fit stores with a session: the method, the finite
// parameters (standard error NaN when not determined) and one-line notes.
type Record struct {
	Method string
	Params []Param
	Notes  []string
}

// newRecord keeps the finite parameters and notes each one left out
// (policy: a value that is not finite is never stored, and a note says
// why: "infinite (no measurable path)" or "not determined").
func newRecord(method string, ps []Param, notes []string, extra []string) Record {
	r := Record{Method: method}
	var skipped []string
	for _, p := range ps {
		if !physics.Finite(p.Value) {
			why := "not determined"
			if math.IsInf(p.Value, 1) {
				why = "infinite (no measurable path)"
			}
			skipped = append(skipped, fmt.Sprintf("%s not stored: %s", p.Name, why))
			continue
		}
		r.Params = append(r.Params, p)
	}
	r.Notes = append(r.Notes, notes...)
	r.Notes = append(r.Notes, skipped...)
	r.Notes = append(r.Notes, OneLine(extra)...)
	return r
}

// IVRecord is the record of an I-V fit.
func IVRecord(r *IVResult) Record {
	f := r.Fit
	method := MethodIVSingle
	if f.Model == extract.ModelDouble {
		method = MethodIVDouble
	}
	notes := []string{
		fmt.Sprintf("window %g V to %g V, %d points used (%d skipped)", f.UsedWindow.MinV, f.UsedWindow.MaxV, f.Points, f.Skipped),
		fmt.Sprintf("rms log residual %.4g", f.RMSLogResidual),
		fmt.Sprintf("temperature %g K (%s)", r.Temperature.K, r.Temperature.Source),
	}
	if f.Model == extract.ModelDouble {
		notes = append(notes, "ideality factors fixed: 1 for Is1, 2 for Is2")
	}
	return newRecord(method, r.Params(), notes, r.Notes)
}

// CVRecords are the records of a C-V analysis: the junction fit (the
// headline) and the Mott-Schottky line of C - Cpar when it was fitted.
// Values the data do not determine are left out with a note.
func CVRecords(r *CVResult) []Record {
	common := fmt.Sprintf("material %s (permittivity %.4g F/m)", r.Material.Key, r.Geometry.PermittivityFm)
	if r.HasArea() {
		common = fmt.Sprintf("area %g m^2, ", r.Geometry.AreaM2) + common
	}
	a := r.Analysis
	j := a.Junction
	notes := []string{
		"C = Cj0/(1 - V/Vbi)^m + Cpar",
		fmt.Sprintf("window %g V to %g V, %d points used", j.UsedWindow.MinV, j.UsedWindow.MaxV, j.Points),
		fmt.Sprintf("rms relative residual %.4g", j.RMSRelResidual),
		common,
	}
	for _, q := range []struct {
		name string
		q    extract.CVQuantity
	}{{"Cj0", a.ZeroBiasCapacitanceF}, {"Vbi", a.BuiltInPotentialV}, {"m", a.GradingCoefficient}, {"Cpar", a.ParasiticCapacitanceF}} {
		if q.q.Fixed || !q.q.Determined {
			notes = append(notes, q.name+": "+q.q.Reason)
		}
	}
	out := []Record{newRecord(MethodCVJunction, r.JunctionParams(), notes, r.Notes)}
	if l := a.Line; l != nil {
		ln := []string{
			"1/(C - Cpar)^2 against V with m = 1/2, Cpar fitted jointly",
			fmt.Sprintf("misfit %.3g times the junction fit's", l.MisfitRatio),
			common,
		}
		if !a.DopingM3.Determined {
			ln = append(ln, "N: "+a.DopingM3.Reason)
		}
		out = append(out, newRecord(MethodMottSchottky, r.MottSchottkyParams(), ln, nil))
	}
	return out
}

// OneLine keeps notes on one line each (a session note is one line) and
// drops empty ones.
func OneLine(in []string) []string {
	var out []string
	for _, n := range in {
		if n = strings.Join(strings.Fields(n), " "); n != "" {
			out = append(out, n)
		}
	}
	return out
}

// FreeID returns prefix-K for the smallest K >= 1 for which taken is
// false.
func FreeID(prefix string, taken func(string) bool) string {
	for k := 1; ; k++ {
		id := prefix + "-" + strconv.Itoa(k)
		if !taken(id) {
			return id
		}
	}
}

// BatchRecordID is the ID of a new kept batch table: batch-K with the
// smallest free K (taken reports the IDs in use).
func BatchRecordID(taken func(string) bool) string { return FreeID("batch", taken) }

// RecordID is the ID of a new record of measurement: MEASUREMENT-fit-K
// with the smallest free K (taken reports the IDs in use), so that a new
// record never collides with one the session holds.
// An empty measurement gives fit-K.
func RecordID(measurement string, taken func(string) bool) string {
	if measurement == "" {
		return FreeID("fit", taken)
	}
	return FreeID(measurement+"-fit", taken)
}
