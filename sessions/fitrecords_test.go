package sessions

import (
	"math"
	"strings"
	"testing"
	"time"

	"junco/model"
	"junco/model/fit"
)

// New fit records never take an ID the session holds, whichever front end
// wrote the older ones (the workbench once counted fit-N without looking;
// the validator refuses duplicates at save).
func TestAppendFitRecordsAvoidsCollisions(t *testing.T) {
	now := time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)
	old := []Extraction{
		{ID: "fit-1", Method: fit.MethodIVSingle, Measurement: "iv-1", Performed: now},
		{ID: "iv-1-fit-1", Method: fit.MethodIVSingle, Measurement: "iv-1", Performed: now},
		{ID: "iv-1-fit-3", Method: fit.MethodIVSingle, Measurement: "iv-1", Performed: now},
	}
	rec := fit.Record{Method: fit.MethodIVSingle, Params: []fit.Param{{Name: "n", Value: 1.2, StdErr: math.NaN()}}}
	got, ids := AppendFitRecords(old, "iv-1", now, rec, rec, rec)
	if strings.Join(ids, " ") != "iv-1-fit-2 iv-1-fit-4 iv-1-fit-5" {
		t.Errorf("ids %v", ids)
	}
	seen := map[string]bool{}
	for _, x := range got {
		if seen[x.ID] {
			t.Errorf("duplicate ID %s", x.ID)
		}
		seen[x.ID] = true
	}
	if got[3].Parameters[0].StdError != nil {
		t.Error("a NaN standard error must be stored as null")
	}
}

// An older session holding a C-V fit in the workbench's old shape (one
// "mott-schottky" extraction with Vbi, N, Cj0, Vj, m, Cpar) reads as the
// two records fits store now: the line (Vbi, N) under its old ID and the
// junction fit (Cj0, Vbi, m, Cpar) under a new free ID, values unchanged.
func TestDecodeMigratesOldCVRecord(t *testing.T) {
	now := time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)
	doc := NewDocument("old cv", "test", model.DefaultSpec(), now)
	se := 0.01
	p := func(name, unit string, v float64) Parameter {
		return Parameter{Name: name, Unit: unit, Value: v, StdError: &se}
	}
	doc.Extractions = []Extraction{
		{ID: "fit-1", Method: fit.MethodIVSingle, Performed: now, Parameters: []Parameter{p("n", "", 1.1)}},
		{ID: "fit-2", Method: fit.MethodMottSchottky, Performed: now, Notes: []string{"old note"}, Parameters: []Parameter{
			p("Vbi", "V", 0.78), p("N", "m^-3", 2e22), p("Cj0", "F", 4.5e-10), p("Vj", "V", 0.8), p("m", "", 0.52), p("Cpar", "F", 9e-12)}},
	}
	data, err := Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	got, err := Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	if len(got.Extractions) != 3 {
		t.Fatalf("%d extractions, want 3: %+v", len(got.Extractions), got.Extractions)
	}
	line, j := got.Extractions[1], got.Extractions[2]
	if line.ID != "fit-2" || line.Method != fit.MethodMottSchottky || len(line.Parameters) != 2 || line.Parameters[1].Name != "N" {
		t.Errorf("line %+v", line)
	}
	if j.Method != fit.MethodCVJunction || j.ID == "fit-1" || j.ID == "fit-2" || j.ID == "" || len(j.Parameters) != 4 {
		t.Fatalf("junction record %+v", j)
	}
	if j.Parameters[1].Name != "Vbi" || j.Parameters[1].Value != 0.8 || j.Parameters[0].Value != 4.5e-10 || j.Parameters[3].Value != 9e-12 {
		t.Errorf("junction parameters %+v", j.Parameters)
	}
	// A document already in the new shape reads unchanged.
	again, err := Encode(got)
	if err != nil {
		t.Fatal(err)
	}
	back, err := Decode(again)
	if err != nil || len(back.Extractions) != 3 || back.Extractions[2].ID != j.ID {
		t.Errorf("second read changed the records: %v %+v", err, back)
	}
}
