package sessions

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"junco/model"
	"junco/model/measure"
)

// fixedTime is the clock of tests: a fixed instant, so outputs are
// reproducible.
var fixedTime = time.Date(2025, 3, 14, 9, 26, 53, 589793000, time.UTC)

// fixedClock returns a clock that starts at fixedTime and advances one
// second per call.
func fixedClock() func() time.Time {
	var n atomic.Int64
	return func() time.Time {
		return fixedTime.Add(time.Duration(n.Add(1)) * time.Second)
	}
}

func newTestStore(t testing.TB) *Store {
	t.Helper()
	s, err := New(t.TempDir(), Options{ToolVersion: "test", Now: fixedClock()})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func ptr[T any](v T) *T { return &v }

// exampleSpec is a fixed junction written out field by field, so that the
// golden files do not move when model defaults change.
func exampleSpec() model.Spec {
	return model.Spec{
		Material: "si", Profile: "abrupt",
		AcceptorDensity: 1e25, DonorDensity: 1e22, Gradient: 1e28,
		Temperature: 310, Area: 1e-6, Bias: -2,
		ElectronLifetime: 2e-6, PContactVelocity: ptr(10.0),
	}
}

// exampleDocument is a small hand-made document with every part present.
// Its reference results are fixed numbers (a record keeps what was
// computed when pinning, whatever the model computes today).
func exampleDocument() *Document {
	doc := NewDocument("p+n test diode D7", "A. Ferreira", exampleSpec(), fixedTime)
	doc.Meta.ToolVersion = "0.1.0"
	doc.Meta.SavedBy = "aferreira"
	doc.Measurements = []Measurement{{ID: "iv-25C", DataSet: measure.DataSet{
		Kind: measure.KindIV, SourceFile: "d7_iv_25C.csv", ImportedAt: fixedTime.Add(time.Minute),
		Units:              measure.Units{Voltage: "V", Current: "mA"},
		Columns:            measure.ColumnsUsed{Voltage: 1, Current: 2, Compliance: 3, Header: []string{"V (V)", "I (mA)", "status"}},
		Delimiter:          ",",
		VoltageV:           []float64{0.1, 0.2, 0.3},
		CurrentA:           []float64{2.5e-12, 1.1e-10, 5.2e-9},
		StatedTemperatureK: 298.15,
		DataRows:           4,
		Problems:           []measure.RowProblem{{Line: 6, Column: 3, ColumnName: "status", Value: "C", Kind: measure.ProblemCompliance}},
		ProblemRows:        1,
	}}}
	doc.Extractions = []Extraction{{
		ID: "fit-1", Method: "iv-single-diode", Measurement: "iv-25C", Performed: fixedTime.Add(2 * time.Minute),
		Parameters: []Parameter{{"Is", "A", 1.2e-14, ptr(3e-16)}, {"n", "", 1.03, ptr(0.004)}, {"Rs", "ohm", 0, nil}},
		Notes:      []string{"Rs not observable in the window; removed"},
	}}
	ref := Reference{Name: "baseline", Pinned: fixedTime.Add(3 * time.Minute), Spec: exampleSpec(),
		Results: []ResultValue{{"built_in_potential_V", ptr(0.8335)}, {"saturation_current_A", ptr(1.9e-15)}, {"ideal_current_A", nil}}}
	ref.Spec.Bias = 0
	doc.References = []Reference{ref}
	doc.SetNotes("Wafer 12, die 7.\nProbe station B, dark box closed.")
	doc.Reviews = []ReviewNote{{Author: "M. Osei", Time: fixedTime.Add(time.Hour), Text: "Check the series resistance at 0.7 V."}}
	return doc
}

// randomDocument builds a random valid document from r.
func randomDocument(r *rand.Rand) *Document {
	spec := model.DefaultSpec()
	spec.AcceptorDensity = math.Pow(10, 20+4*r.Float64())
	spec.DonorDensity = math.Pow(10, 20+4*r.Float64())
	spec.Temperature = 250 + 150*r.Float64()
	spec.Area = math.Pow(10, -8+3*r.Float64())
	spec.Bias = -5 + 5.5*r.Float64()
	if r.IntN(2) == 0 {
		spec.Profile = "linear"
		spec.Gradient = math.Pow(10, 26+3*r.Float64())
	}
	if r.IntN(2) == 0 {
		spec.NWidth = 1e-6 * (1 + 100*r.Float64())
	}
	if r.IntN(3) == 0 {
		spec.NContactVelocity = ptr(1e4 * r.Float64())
	}
	at := func() time.Time {
		return time.Unix(1.6e9+r.Int64N(2e8), r.Int64N(1e9)).UTC()
	}
	text := func() string {
		words := []string{"diode", "Vbi", "µm", "wafer", "\"quoted\"", "tab\there", "back\\slash", "ünïcode", "1e-9 A", "<&>"}
		n := r.IntN(6)
		s := ""
		for i := range n {
			if i > 0 {
				s += " "
			}
			s += words[r.IntN(len(words))]
		}
		return s
	}
	doc := NewDocument(text(), text(), spec, at())
	doc.Meta.ToolVersion = "v" + fmt.Sprint(r.IntN(9))
	doc.Meta.BasedOn = r.IntN(5)
	doc.Sweeps.Bias = Sweep{From: -r.Float64() * 10, To: r.Float64(), Step: 0.01 + r.Float64()/10}
	doc.Sweeps.Chart = ChartIDs()[r.IntN(len(ChartIDs()))]
	value := func() float64 {
		switch r.IntN(4) {
		case 0:
			return r.NormFloat64()
		case 1:
			return r.ExpFloat64() * 1e-12
		case 2:
			return -r.ExpFloat64() * 1e25
		}
		return float64(r.IntN(100))
	}
	column := func(n int) []float64 {
		c := make([]float64, n)
		for k := range c {
			c[k] = value()
		}
		return c
	}
	for i := range r.IntN(4) {
		n := 1 + r.IntN(50)
		ds := measure.DataSet{Kind: []measure.Kind{measure.KindIV, measure.KindCV}[r.IntN(2)],
			SourceFile: strings.ReplaceAll(text(), "\t", " ") + ".csv", ImportedAt: at(),
			Delimiter: []string{",", ";", "\t", " "}[r.IntN(4)], VoltageV: column(n), DataRows: n + r.IntN(3)}
		if ds.Kind == measure.KindIV {
			ds.CurrentA = column(n)
			ds.Units.Current = "uA"
		} else {
			ds.CapacitanceF = column(n)
			ds.FrequencyHz = column(n)
			ds.Units.Assumed = []string{"frequency"}
		}
		if r.IntN(2) == 0 {
			ds.TemperatureK = column(n)
		} else {
			ds.StatedTemperatureK = 200 + 200*r.Float64()
		}
		if r.IntN(2) == 0 {
			ds.Columns = measure.ColumnsUsed{Voltage: 1, Current: 2, Header: []string{"V", "I"}}
		}
		if r.IntN(3) == 0 {
			ds.Problems = []measure.RowProblem{{Line: 3, Column: 2, Value: "nan", Kind: measure.ProblemNonFinite}}
			ds.ProblemRows = 1 + r.IntN(5)
		}
		doc.Measurements = append(doc.Measurements, Measurement{ID: fmt.Sprintf("ds-%d", i), DataSet: ds})
	}
	for i := range r.IntN(3) {
		x := Extraction{ID: fmt.Sprintf("x%d", i), Method: "iv-single-diode", Performed: at()}
		if len(doc.Measurements) > 0 {
			x.Measurement = doc.Measurements[r.IntN(len(doc.Measurements))].ID
		}
		for p := range r.IntN(4) {
			par := Parameter{Name: fmt.Sprintf("p%d", p), Unit: "A", Value: r.NormFloat64() * 1e-9}
			if r.IntN(2) == 0 {
				par.StdError = ptr(r.ExpFloat64() * 1e-11)
			}
			x.Parameters = append(x.Parameters, par)
		}
		if r.IntN(2) == 0 {
			x.Notes = []string{text()}
		}
		doc.Extractions = append(doc.Extractions, x)
	}
	if r.IntN(2) == 0 {
		ref, err := Pin("ref", spec, at())
		if err == nil {
			doc.References = append(doc.References, ref)
		}
	}
	for range r.IntN(4) {
		doc.Notes = append(doc.Notes, text())
	}
	for range r.IntN(3) {
		doc.Reviews = append(doc.Reviews, ReviewNote{Author: "rev" + fmt.Sprint(r.IntN(9)), Time: at(), Text: "ok " + text()})
	}
	return doc
}

// bigDocument is a session with n data sets of m points (bias, current).
// digits > 0 rounds the values to that many significant digits, as an
// instrument writes them (6 is typical of source-measure units); 0 keeps
// full float64 precision, the worst case for size and speed.
func bigDocument(n, m, digits int) *Document {
	round := func(v float64) float64 {
		if digits <= 0 {
			return v
		}
		r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', digits, 64), 64)
		return r
	}
	r := rand.New(rand.NewPCG(7, 11))
	doc := exampleDocument()
	doc.Measurements = nil
	doc.Extractions = nil
	for i := range n {
		ds := measure.DataSet{Kind: measure.KindIV, SourceFile: fmt.Sprintf("run%d.csv", i), ImportedAt: fixedTime,
			Delimiter: ",", VoltageV: make([]float64, m), CurrentA: make([]float64, m), DataRows: m}
		for k := range ds.VoltageV {
			v := -1 + 1.8*float64(k)/float64(m)
			ds.VoltageV[k] = round(v)
			ds.CurrentA[k] = round(1e-14 * math.Expm1(v/0.02585) * (1 + 0.01*r.NormFloat64()))
		}
		doc.Measurements = append(doc.Measurements, Measurement{ID: fmt.Sprintf("iv-%d", i), DataSet: ds})
	}
	return doc
}
