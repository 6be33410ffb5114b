package fit

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"junco/model/fit/fittest"
	"junco/physics"
	"junco/physics/extract"
)

// The invented mixed folder of these tests (test data, not measurements):
// three dark dies sampled from testDiode and four lit dies sampled from
// lit diodes near litTruth, the last ideal (Rs = 0, no shunt), so that a
// published relation gives its Voc.
var mixedLit = []extract.LitDiode{
	{PhotocurrentA: 0.50, SaturationCurrentA: 1e-8, IdealityFactor: 1.35, SeriesResistanceOhm: 0.05, ShuntResistanceOhm: 80},
	{PhotocurrentA: 0.52, SaturationCurrentA: 1.2e-8, IdealityFactor: 1.36, SeriesResistanceOhm: 0.05, ShuntResistanceOhm: 90},
	{PhotocurrentA: 0.48, SaturationCurrentA: 0.9e-8, IdealityFactor: 1.34, SeriesResistanceOhm: 0.06, ShuntResistanceOhm: 70},
	{PhotocurrentA: 0.50, SaturationCurrentA: 1e-8, IdealityFactor: 1.35, SeriesResistanceOhm: 0, ShuntResistanceOhm: math.Inf(1)},
}

// writeMixedBatch writes the invented mixed folder: dark dies
// die_x0K_y00.csv, lit dies die_x0K_y01.csv (generator sign for the odd
// ones, so both conventions are recognised), and returns the folder.
func writeMixedBatch(t testing.TB) string {
	t.Helper()
	dir := t.TempDir()
	for k := range 3 {
		d := testDiode
		d.SaturationCurrentA *= 1 + 0.1*float64(k)
		writeIV(t, filepath.Join(dir, fmt.Sprintf("die_x%02d_y00.csv", k)), "V,I (A)\n", d, 300, 0, uint64(10+k))
	}
	vt := physics.ThermalVoltage(300)
	for k, d := range mixedLit {
		fittest.Sweep{Head: "# invented lit sweep (test data, not a measurement)\n# temperature: 300 K\nV,I (mA)\n",
			From: -0.05, To: 0.65, Points: 71, Model: func(v float64) float64 { return d.Current(v, vt) },
			Abs: 1e-4, Negate: k%2 == 1, Seed: [2]uint64{uint64(20 + k), 5}, Scale: 1e3, Row: "%.4f,%.8e\n"}.Write(t, filepath.Join(dir, fmt.Sprintf("die_x%02d_y01.csv", k)))
	}
	return dir
}

// A batch routes each lit file to the lit fit, as fit iv recognises it:
// lit rows carry Iph, Is, n, Rs, Rsh and Voc, Isc, FF, Pmax in the lit
// columns and nothing in the dark ones, dark rows the reverse; the rows
// and statistics are the same with 1 or 4 workers. Iph comes back within
// 0.5 % and Voc within 2 mV of the truth's own curve (the lit model's
// round trip). For the ideal die (Rs = 0, no shunt) Voc is also checked
// against the published relation Voc = n Vt ln(Isc/Is + 1), Isc = Iph
// (Green, Solar Cells, 1982, ch. 5; Sze & Ng, Physics of Semiconductor
// Devices, 3rd ed., 2007, ch. 14; from memory), within 2 mV.
func TestBatchRoutesLitFiles(t *testing.T) {
	dir := writeMixedBatch(t)
	one, four := batchOneAndFour(t, dir)
	if fmt.Sprint(one.Rows) != fmt.Sprint(four.Rows) || fmt.Sprint(one.Stats) != fmt.Sprint(four.Stats) {
		t.Error("rows or statistics differ between 1 and 4 workers")
	}
	if one.Fitted != 7 {
		t.Fatalf("%d fitted of 7: %+v", one.Fitted, one.Rows)
	}
	vt := physics.ThermalVoltage(300)
	lits := 0
	for _, r := range one.Rows {
		lit := strings.Contains(r.File, "_y01")
		if r.Lit != lit || (lit && r.Model() != BatchModelLit) || (!lit && r.Model() != BatchModelDark) {
			t.Errorf("%s: lit %v, model %q", r.File, r.Lit, r.Model())
			continue
		}
		for j, p := range BatchParams() {
			if p.Lit != lit && !math.IsNaN(r.Values[j]) {
				t.Errorf("%s: column %s of the other population holds %g", r.File, p.Key, r.Values[j])
			}
		}
		if !lit {
			if math.Abs(r.Values[ColN]/testDiode.IdealityFactor-1) > 0.02 {
				t.Errorf("%s: dark n %g, truth %g", r.File, r.Values[ColN], testDiode.IdealityFactor)
			}
			continue
		}
		truth := mixedLit[lits]
		lits++
		want, err := truth.Figures(vt)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(r.Values[ColIph]/truth.PhotocurrentA-1) > 0.005 {
			t.Errorf("%s: Iph %g, truth %g", r.File, r.Values[ColIph], truth.PhotocurrentA)
		}
		if math.Abs(r.Values[ColVoc]-want.Voc) > 2e-3 || math.Abs(r.Values[ColIsc]/want.Isc-1) > 0.005 ||
			math.Abs(r.Values[ColFF]-want.FF) > 0.01 || math.Abs(r.Values[ColPmax]/want.Pmax-1) > 0.01 {
			t.Errorf("%s: Voc %g Isc %g FF %g Pmax %g; truth's curve %+v", r.File, r.Values[ColVoc], r.Values[ColIsc], r.Values[ColFF], r.Values[ColPmax], want)
		}
		if math.Abs(r.Values[ColLitN]/truth.IdealityFactor-1) > 0.02 || !(r.StdErr[ColIph] > 0) || !math.IsNaN(r.StdErr[ColVoc]) {
			t.Errorf("%s: n %g (truth %g), Iph stderr %g, Voc stderr %g (not estimated: NaN)", r.File, r.Values[ColLitN], truth.IdealityFactor, r.StdErr[ColIph], r.StdErr[ColVoc])
		}
		if truth.SeriesResistanceOhm == 0 && math.IsInf(truth.ShuntResistanceOhm, 1) {
			green := truth.IdealityFactor * vt * math.Log(truth.PhotocurrentA/truth.SaturationCurrentA+1)
			if math.Abs(r.Values[ColVoc]-green) > 2e-3 {
				t.Errorf("%s: Voc %g V, n Vt ln(Isc/Is + 1) = %g V", r.File, r.Values[ColVoc], green)
			}
		}
	}
	if lits != 4 {
		t.Fatalf("%d lit rows, want 4", lits)
	}
	s := one.Stats
	if s[ColIs].N != 3 || s[ColLitIs].N != 4 || s[ColVoc].N != 4 || s[ColIph].N != 4 {
		t.Errorf("statistics over the wrong populations: Is %d, Is_lit %d, Voc %d, Iph %d rows", s[ColIs].N, s[ColLitIs].N, s[ColVoc].N, s[ColIph].N)
	}
}

// Statistics policy: a column holds one population, so a lit row never
// moves a dark statistic nor becomes a dark outlier. A lit row whose Is is
// five decades off leaves the dark Is median, quartiles and outliers as
// they are without it.
func TestBatchStatisticsNeverMixPopulations(t *testing.T) {
	dark := func(is float64) BatchRow {
		return BatchRow{Status: StatusOK, Values: BatchColumns(is, 1.05, 2, math.Inf(1)), StdErr: BatchColumns()}
	}
	rows := []BatchRow{dark(1e-14), dark(1.1e-14), dark(1.2e-14), dark(0.9e-14)}
	alone := Statistics(rows)
	lit := BatchRow{Status: StatusOK, Lit: true, Values: BatchColumns(), StdErr: BatchColumns()}
	lit.Values[ColLitIs], lit.Values[ColVoc], lit.Values[ColIph] = 1e-9, 0.6, 0.5
	mixed := Statistics(append(rows, lit))
	if fmt.Sprint(alone[ColIs]) != fmt.Sprint(mixed[ColIs]) || fmt.Sprint(alone[ColN]) != fmt.Sprint(mixed[ColN]) {
		t.Errorf("a lit row changed the dark statistics: %+v, without it %+v", mixed[ColIs], alone[ColIs])
	}
	for j, js := range OutlierParams(mixed) {
		if j == 4 {
			t.Errorf("the lit row is an outlier of dark columns %v", js)
		}
	}
	if mixed[ColLitIs].N != 1 || mixed[ColVoc].Median != 0.6 {
		t.Errorf("lit statistics %+v %+v", mixed[ColLitIs], mixed[ColVoc])
	}
}

// The lit columns are batch parameters like the others: a limit on Voc
// (written any case, with units) passes a lit row inside it and no dark
// row (its Voc is not determined), and the shade scale of Voc spans the
// lit rows only.
func TestBatchLitLimitAndShade(t *testing.T) {
	l, err := ParseLimit("voc:550mV:0.7")
	if err != nil || l.Param != ColVoc || l.Min != 0.55 {
		t.Fatalf("limit %+v, %v", l, err)
	}
	mk := func(lit bool, voc float64) BatchRow {
		r := BatchRow{Status: StatusOK, Lit: lit, Values: BatchColumns(), StdErr: BatchColumns()}
		if lit {
			r.Values[ColVoc] = voc
		} else {
			r.Values[ColIs] = 1e-14
		}
		return r
	}
	rows := []BatchRow{mk(true, 0.60), mk(true, 0.62), mk(true, 0.50), mk(false, 0)}
	var pass []bool
	for _, r := range rows {
		pass = append(pass, l.Pass(r))
	}
	if fmt.Sprint(pass) != "[true true false false]" {
		t.Errorf("Voc limit passes %v, want [true true false false]", pass)
	}
	if y := BatchYield(rows, []Limit{l}); y.Passed != 2 || y.Tested != 4 {
		t.Errorf("yield %+v", y)
	}
	sc := NewShadeScale(rows, Statistics(rows), ColVoc)
	if !sc.OK || sc.Log || sc.Lo != 0.5 || sc.Hi != 0.62 {
		t.Errorf("Voc shade scale %+v, want 0.5 to 0.62 V, linear", sc)
	}
	if _, err := BatchParamIndex("Is_lit"); err != nil {
		t.Error(err)
	}
}
