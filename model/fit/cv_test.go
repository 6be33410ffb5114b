package fit

import (
	"math"
	"strings"
	"testing"

	"junco/model"
	"junco/model/fit/fittest"
	"junco/model/measure"
	"junco/physics/extract"
)

// cvDataSet is an invented C-V sweep of the junction-capacitance model
// C = Cj0/(1 - V/Vbi)^m + Cpar (Sze & Ng 2007, sec. 2.2) with 0.2 %
// noise, -10 V to 0.3 V.
func cvDataSet(j extract.JunctionCV, seed uint64) *measure.DataSet {
	ds := &measure.DataSet{Kind: measure.KindCV}
	ds.VoltageV, ds.CapacitanceF = fittest.Sweep{From: -10, To: 0.3, Points: 61, Model: j.Capacitance, Rel: 0.002, Seed: [2]uint64{seed, 1}}.Values()
	return ds
}

// The fit layer passes the holds and the optional area through, records
// the junction fit first (the headline) and leaves a withheld doping out
// of the line's record with its reason.
func TestCVHoldsAndRecords(t *testing.T) {
	graded := cvDataSet(extract.JunctionCV{ZeroBiasCapacitanceF: 20e-12, BuiltInPotentialV: 0.7, GradingCoefficient: 1.0 / 3, ParasiticCapacitanceF: 4e-12}, 2)
	r, err := CV(graded, CVOptions{Material: "si", AreaM2: 1e-7})
	if err != nil {
		t.Fatal(err)
	}
	if b := r.Analysis.BuiltInPotentialV; !b.Determined || math.Abs(b.Value-0.7) > 0.05 {
		t.Errorf("Vbi %+v, truth 0.7", b)
	}
	recs := CVRecords(r)
	if len(recs) != 2 || recs[0].Method != MethodCVJunction || recs[1].Method != MethodMottSchottky {
		t.Fatalf("records %+v", recs)
	}
	if len(recs[1].Params) != 1 || recs[1].Params[0].Name != "Vbi" || !strings.Contains(strings.Join(recs[1].Notes, " "), "not consistent with 1/2") {
		t.Errorf("line record %+v: N must be left out with the reason", recs[1])
	}
	// Held m and Cpar, no area: marked held, no doping, no area needed.
	m, c := 1.0/3, 4e-12
	r, err = CV(graded, CVOptions{Material: "si", Grading: &m, Parasitic: &c})
	if err != nil {
		t.Fatal(err)
	}
	a := r.Analysis
	if !a.GradingCoefficient.Fixed || a.GradingCoefficient.Value != m || !a.ParasiticCapacitanceF.Fixed || r.HasArea() || a.DopingM3.Determined {
		t.Errorf("held: m %+v, Cpar %+v, doping %+v", a.GradingCoefficient, a.ParasiticCapacitanceF, a.DopingM3)
	}
	notes := strings.Join(CVRecords(r)[0].Notes, " ")
	if !strings.Contains(notes, "m: held at 0.333") || !strings.Contains(notes, "Cpar: held at 4e-12 F") {
		t.Errorf("junction record notes %q", notes)
	}
	if _, err := CV(graded, CVOptions{Material: "si", AreaM2: 2}); err == nil || !strings.Contains(err.Error(), "below 1 m^2") {
		t.Errorf("area 2 m^2: %v", err)
	}
}

// A set that cannot pin Vbi down (deep reverse bias only) shows "not
// determined" rows in the workbench view and stores no value for it.
func TestCVViewNotDetermined(t *testing.T) {
	j := extract.JunctionCV{ZeroBiasCapacitanceF: 30e-12, BuiltInPotentialV: 0.8, GradingCoefficient: 0.5, ParasiticCapacitanceF: 5e-12}
	ds := &measure.DataSet{Kind: measure.KindCV}
	ds.VoltageV, ds.CapacitanceF = fittest.Sweep{From: -20, To: -18, Points: 41, Model: j.Capacitance, Rel: 0.001, Seed: [2]uint64{3, 3}}.Values()
	spec := model.DefaultSpec()
	spec.Material = "si"
	v, err := NewCVView(ds, spec, Window{})
	if err != nil {
		t.Fatal(err)
	}
	if v.Rows[0].Name != "Vbi" || v.Rows[0].Value != "" || !strings.HasPrefix(v.Rows[0].Remark, "not determined: ") {
		t.Errorf("Vbi row %+v", v.Rows[0])
	}
	for _, p := range CVRecords(v.Result)[0].Params {
		if p.Name == "Vbi" {
			t.Errorf("an undetermined Vbi was stored: %+v", p)
		}
	}
}
