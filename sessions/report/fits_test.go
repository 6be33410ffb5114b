package report

import (
	"bytes"
	"encoding/csv"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"

	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
	"junco/sessions"
)

// benchDocument is a session holding an invented bench sweep of a known
// diode (Is 1e-12 A, n 1.4, Rs 8 ohm, Rsh 1e6 ohm at 300 K, from -1 V to
// 0.9 V with 1 % relative noise, a 1e-11 A floor and a 5 mA compliance
// plateau) and its single-diode fit, as the workbench keeps it.
func benchDocument(t *testing.T) (*sessions.Document, extract.SingleDiode) {
	t.Helper()
	truth := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.4, SeriesResistanceOhm: 8, ShuntResistanceOhm: 1e6}
	vt := physics.ThermalVoltage(300)
	rng := rand.New(rand.NewPCG(8, 1))
	ds := measure.DataSet{Kind: measure.KindIV, SourceFile: "bench.csv", ImportedAt: time.Unix(1.7e9, 0), StatedTemperatureK: 300, Delimiter: ","}
	for k := 0; k <= 190; k++ {
		v := -1 + 0.01*float64(k)
		i := truth.Current(v, vt)*(1+0.01*rng.NormFloat64()) + 1e-11*rng.NormFloat64()
		ds.VoltageV = append(ds.VoltageV, v)
		ds.CurrentA = append(ds.CurrentA, math.Min(i, 5e-3))
	}
	ds.DataRows = len(ds.VoltageV)
	res, err := fit.IV(&ds, fit.IVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	doc := exampleDocument()
	doc.Measurements = []sessions.Measurement{{ID: "iv-bench", DataSet: ds}}
	doc.Extractions, _ = sessions.AppendFitRecords(nil, "iv-bench", time.Unix(1.7e9, 0), fit.IVRecord(res))
	return doc, truth
}

// The CSV export carries each kept fit: its curve (bias, measured, fitted
// current at the measured biases) and its parameters. On the simulated
// bench sweep the stored parameters recover the truth (ln Is within 0.10,
// n 2 %, Rs 10 %, Rsh 30 %) and the exported fitted current follows the
// true diode within 5 % over the forward points below the compliance.
func TestExportCSVCarriesFits(t *testing.T) {
	doc, truth := benchDocument(t)
	files, err := Export(doc, FormatCSV, ExportOptions{Session: "bench", Revision: 1})
	if err != nil {
		t.Fatal(err)
	}
	byName := map[string][]byte{}
	for _, f := range files {
		byName[f.Name] = f.Data
	}
	id := doc.Extractions[0].ID
	curve, ok := byName["bench-r1-fit-"+id+".csv"]
	if !ok {
		t.Fatalf("no fit curve among %d files", len(files))
	}
	recs, err := csv.NewReader(bytes.NewReader(curve)).ReadAll()
	if err != nil || strings.Join(recs[0], ",") != "bias_V,current_measured_A,current_fit_A" || len(recs) != 192 {
		t.Fatalf("fit curve: %v, header %v, %d rows", err, recs[0], len(recs))
	}
	vt := physics.ThermalVoltage(300)
	worst := 0.0
	for _, r := range recs[1:] {
		v, _ := strconv.ParseFloat(r[0], 64)
		y, _ := strconv.ParseFloat(r[2], 64)
		if want := truth.Current(v, vt); v > 0.1 && want < 4e-3 {
			worst = math.Max(worst, math.Abs(math.Log(y/want)))
		}
	}
	if worst > 0.05 {
		t.Errorf("exported fit off the true diode by ln %.3f", worst)
	}
	params, err := csv.NewReader(bytes.NewReader(byName["bench-r1-fits.csv"])).ReadAll()
	if err != nil || strings.Join(params[0], ",") != "fit_id,method,measurement_id,parameter,unit,value,std_error" {
		t.Fatalf("parameters: %v %v", err, params)
	}
	got := map[string]float64{}
	for _, r := range params[1:] {
		if r[0] == id {
			got[r[3]], _ = strconv.ParseFloat(r[5], 64)
		}
	}
	if d := math.Abs(math.Log(got["Is"] / truth.SaturationCurrentA)); d > 0.10 {
		t.Errorf("Is %g, ln off by %.3f", got["Is"], d)
	}
	for _, c := range []struct {
		name      string
		want, tol float64
	}{{"n", truth.IdealityFactor, 0.02}, {"Rs", truth.SeriesResistanceOhm, 0.10}, {"Rsh", truth.ShuntResistanceOhm, 0.30}} {
		if math.Abs(got[c.name]/c.want-1) > c.tol {
			t.Errorf("%s = %g, want %g within %g", c.name, got[c.name], c.want, c.tol)
		}
	}
}

// The Markdown report draws each kept fit against its data: an SVG with
// the measured points (circles), the fit and the prediction, and a text
// chart with the three marks. JUNCO_FIT_SVG names a file to write the SVG
// to, for looking at it.
func TestReportDrawsFits(t *testing.T) {
	doc, _ := benchDocument(t)
	files, err := Report(doc, ExportOptions{Session: "bench", Revision: 1, Figures: true})
	if err != nil {
		t.Fatal(err)
	}
	rep := string(files[0].Data)
	id := doc.Extractions[0].ID
	name := "bench-r1-fit-" + id + ".svg"
	if !strings.Contains(rep, "## Fits against their data") || !strings.Contains(rep, "]("+name+")") ||
		!strings.Contains(rep, "* measured   o fit   + prediction at 300.0 K") {
		t.Errorf("report section:\n%s", rep[strings.Index(rep, "## Figures"):])
	}
	var svg []byte
	for _, f := range files {
		if f.Name == name {
			svg = f.Data
		}
	}
	if len(svg) == 0 || !bytes.Contains(svg, []byte("measured")) || !bytes.Contains(svg, []byte(">fit<")) || !bytes.Contains(svg, []byte("prediction")) {
		t.Fatalf("SVG %s missing or without its legend (%d bytes)", name, len(svg))
	}
	if p := os.Getenv("JUNCO_FIT_SVG"); p != "" {
		if err := os.WriteFile(p, svg, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// RecordModel evaluates what the records store: a single diode at the
// record's temperature equals extract.SingleDiode.Current (identity), a
// junction-capacitance record equals extract.JunctionCV.Capacitance, and
// the Mott-Schottky line has no C(V) curve.
func TestRecordModel(t *testing.T) {
	d := extract.SingleDiode{SaturationCurrentA: 1e-13, IdealityFactor: 1.2, SeriesResistanceOhm: 3, ShuntResistanceOhm: math.Inf(1)}
	f, err := fit.RecordModel(fit.MethodIVSingle, map[string]float64{"Is": 1e-13, "n": 1.2, "Rs": 3}, []string{"temperature 250 K (comment)"}, 300)
	if err != nil || f(0.6) != d.Current(0.6, physics.ThermalVoltage(250)) {
		t.Errorf("single diode: %v", err)
	}
	j := extract.JunctionCV{ZeroBiasCapacitanceF: 1e-11, BuiltInPotentialV: 0.8, GradingCoefficient: 0.5, ParasiticCapacitanceF: 2e-12}
	g, err := fit.RecordModel(fit.MethodCVJunction, map[string]float64{"Cj0": 1e-11, "Vbi": 0.8, "m": 0.5, "Cpar": 2e-12}, nil, 300)
	if err != nil || g(-2) != j.Capacitance(-2) {
		t.Errorf("junction capacitance: %v", err)
	}
	if _, err := fit.RecordModel(fit.MethodMottSchottky, nil, nil, 300); err == nil {
		t.Error("the Mott-Schottky line has no C(V) curve here")
	}
}
