package fit

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"junco/physics/extract"
)

// Method names of the records fits leave in a session: one per model,
// each with one parameter set.
const (
	MethodIVSingle     = "iv-single-diode"         // Is, n, Rs, Rsh
	MethodIVDouble     = "iv-double-diode"         // Is1, Is2, Rs, Rsh
	MethodMottSchottky = "mott-schottky"           // Vbi, N
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
		if !Finite(p.Value) {
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

// CVRecords are the records of a C-V analysis: the Mott-Schottky line,
// and the junction-capacitance fit when it converged.
func CVRecords(r *CVResult) []Record {
	common := fmt.Sprintf("area %g m^2, material %s (permittivity %.4g F/m)", r.Geometry.AreaM2, r.Material.Key, r.Geometry.PermittivityFm)
	ms := r.MottSchottky
	out := []Record{newRecord(MethodMottSchottky, r.MottSchottkyParams(), []string{
		fmt.Sprintf("window %g V to %g V, %d points used", ms.UsedWindow.MinV, ms.UsedWindow.MaxV, ms.Points),
		fmt.Sprintf("rms relative residual %.4g (of 1/C^2)", ms.RMSRelResidual),
		common,
	}, r.Notes)}
	if j := r.Junction; j != nil {
		out = append(out, newRecord(MethodCVJunction, r.JunctionParams(), []string{
			"C = Cj0/(1 - V/Vbi)^m + Cpar",
			fmt.Sprintf("window %g V to %g V, %d points used", j.UsedWindow.MinV, j.UsedWindow.MaxV, j.Points),
			fmt.Sprintf("rms relative residual %.4g", j.RMSRelResidual),
			common,
		}, nil))
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
