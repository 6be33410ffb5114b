package sessions

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"junco/model/fit"
)

// litBatch is a hand-made batch of a dark die and two lit dies (invented
// numbers of the order of a silicon cell's), judged against a Voc limit.
func litBatch() (*fit.BatchResult, []fit.Limit) {
	nan := math.NaN()
	dark := fit.BatchRow{File: "w/die_x00_y00.csv", Status: fit.StatusOK, Die: fit.Die{Source: fit.DieFromName},
		Temperature: fit.Temperature{K: 300, Source: fit.SourceComment},
		Values:      fit.BatchColumns(1e-12, 1.3, 4, math.Inf(1), nan), StdErr: fit.BatchColumns(1e-14, 0.01, 0.05), RMS: 0.01, Points: 61}
	lit := func(file string, x int, iph, voc float64) fit.BatchRow {
		r := fit.BatchRow{File: file, Status: fit.StatusOK, Lit: true, Die: fit.Die{X: x, Y: 1, Source: fit.DieFromName},
			Temperature: fit.Temperature{K: 300, Source: fit.SourceComment}, Values: fit.BatchColumns(), StdErr: fit.BatchColumns(), RMS: 1e-4, Points: 71}
		for j, v := range map[int][2]float64{fit.ColIph: {iph, 1e-4}, fit.ColLitIs: {1e-8, 1e-10}, fit.ColLitN: {1.35, 0.01},
			fit.ColLitRs: {0.05, 0.001}, fit.ColLitRsh: {80, 2}, fit.ColVoc: {voc, nan}, fit.ColIsc: {iph, nan}, fit.ColFF: {0.78, nan}, fit.ColPmax: {0.78 * iph * voc, nan}} {
			r.Values[j], r.StdErr[j] = v[0], v[1]
		}
		return r
	}
	res := &fit.BatchResult{Rows: []fit.BatchRow{dark, lit("w/die_x00_y01.csv", 0, 0.5, 0.60), lit("w/die_x01_y01.csv", 1, 0.52, 0.52)}, Fitted: 3}
	res.Stats = fit.Statistics(res.Rows)
	l, _ := fit.ParseLimit("Voc:0.55:0.7")
	return res, []fit.Limit{l}
}

// A kept batch keeps its lit rows within schema 2: the lit flag, the lit
// columns and the lit residual come back from the encoded document, so the
// statistics (per population), the Voc limit and its yield computed again
// from the kept rows are those of the run.
func TestBatchKeepsLitRows(t *testing.T) {
	res, limits := litBatch()
	doc := exampleDocument()
	var err error
	doc.Batches, _, err = AppendBatch(doc.Batches, NewBatch("w", res, limits, fit.IVOptions{}, fixedTime))
	if err != nil {
		t.Fatal(err)
	}
	data, err := Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{`"lit": true`, `"open_circuit_voltage_V"`, `"rms_residual_A"`, `"schema": 2`} {
		if !strings.Contains(string(data), k) {
			t.Errorf("kept batch has no %s", k)
		}
	}
	got, err := Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	back, bl := got.Batches[0].Result()
	want, _ := litBatch()
	for k := range want.Rows {
		want.Rows[k].File = strings.TrimPrefix(want.Rows[k].File, "w/")
	}
	sameRows(t, back.Rows, want.Rows)
	if fmt.Sprint(back.Stats) != fmt.Sprint(res.Stats) || back.Stats[fit.ColVoc].N != 2 || back.Stats[fit.ColIs].N != 1 {
		t.Errorf("statistics from the kept rows %+v, want %+v", back.Stats, res.Stats)
	}
	if y := fit.BatchYield(back.Rows, bl); len(bl) != 1 || bl[0].Param != fit.ColVoc || y.Passed != 1 || y.Tested != 3 {
		t.Errorf("limits %+v, yield %+v: want the Voc limit, 1 of 3 (the dark die's Voc is not determined)", bl, y)
	}
}

// A kept row may hold values only in the columns of its model: a lit row
// with a dark column, or a dark row with a lit one, is refused naming the
// field and the rule.
func TestBatchRowColumnsOfItsModel(t *testing.T) {
	res, limits := litBatch()
	for _, c := range []struct {
		row int
		key string
	}{{1, "saturation_current_A"}, {0, "open_circuit_voltage_V"}} {
		b := NewBatch("w", res, limits, fit.IVOptions{}, fixedTime)
		b.ID = "batch-1"
		b.Rows[c.row].Values[c.key] = 1
		ps := batchProblems([]Batch{b})
		if len(ps) != 1 || !strings.Contains(ps[0].Path, "values") || !strings.Contains(ps[0].Why, "model that fitted it") {
			t.Errorf("row %d with %s: problems %+v", c.row, c.key, ps)
		}
	}
}
