package sessions

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"junco/model"
)

func TestDiffIdentical(t *testing.T) {
	a := exampleDocument()
	if ch := Diff(a, a.Clone(), true); len(ch) != 0 {
		t.Errorf("identical documents differ: %+v", ch)
	}
}

func findChange(ch []Change, section, quantity string) (Change, bool) {
	for _, c := range ch {
		if c.Section == section && c.Quantity == quantity {
			return c, true
		}
	}
	return Change{}, false
}

func TestDiffInputsAndResults(t *testing.T) {
	a := exampleDocument()
	b := a.Clone()
	b.Spec.Temperature = 350
	b.Spec.DonorDensity = 4e22
	b.Spec.HoleLifetime = 1e-6
	b.Sweeps.Bias.To = 0.7
	ch := Diff(a, b, true)

	temp, ok := findChange(ch, SectionInputs, "temperature T (temp)")
	if !ok || temp.Old != model.Format(model.Temperature, 310, 4, true) || temp.New != model.Format(model.Temperature, 350, 4, true) || !strings.HasPrefix(temp.Delta, "+40") {
		t.Errorf("temperature row: %+v", temp)
	}
	nd, ok := findChange(ch, SectionInputs, "donor doping Nd (nd)")
	if !ok || nd.Delta != "+300 %" {
		t.Errorf("doping row: %+v", nd)
	}
	taup, ok := findChange(ch, SectionInputs, "hole lifetime tau_p (taup)")
	if !ok || taup.Old != "from doping" || taup.Delta != "changed" || taup.New != model.Format(model.Time, 1e-6, 4, true) {
		t.Errorf("lifetime row: %+v", taup)
	}
	if _, ok := findChange(ch, SectionSweeps, "bias sweep to"); !ok {
		t.Error("sweep change missing")
	}
	// Every result row matches model.Evaluate of both specs, and every
	// result that changed is listed.
	ra, err := model.Evaluate(a.Spec)
	if err != nil {
		t.Fatal(err)
	}
	rb, err := model.Evaluate(b.Spec)
	if err != nil {
		t.Fatal(err)
	}
	changed := 0
	for _, q := range ra.Quantities {
		vb, _ := rb.Get(q.Key)
		c, ok := findChange(ch, SectionResults, ResultLabel(q))
		if vb == q.Value || (math.IsNaN(vb) && math.IsNaN(q.Value)) {
			if ok {
				t.Errorf("%s listed although unchanged", q.Key)
			}
			continue
		}
		changed++
		if !ok {
			t.Errorf("%s changed (%g -> %g) but is not listed", q.Key, q.Value, vb)
			continue
		}
		if c.Old != q.Text(4, true) || c.New != model.Format(q.Kind, vb, 4, true) {
			t.Errorf("%s: row %+v, want %s -> %s", q.Key, c, q.Text(4, true), model.Format(q.Kind, vb, 4, true))
		}
	}
	if changed < 5 {
		t.Errorf("only %d results changed with the temperature; the comparison is not exercised", changed)
	}
	var buf bytes.Buffer
	WriteChanges(&buf, ch)
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	if len(lines) != len(ch)+1 || !strings.HasPrefix(lines[0], "section") || !strings.Contains(buf.String(), "built-in potential Vbi") {
		t.Errorf("table:\n%s", buf.String())
	}
}

func TestDiffRecords(t *testing.T) {
	a := exampleDocument()
	b := a.Clone()
	b.Meta.Title = "D7 after anneal"
	m := b.Measurements[0]
	m.ID = "iv-85C"
	b.Measurements = append(b.Measurements, m)
	b.Extractions[0].Parameters[1].Value = 1.10
	b.Extractions[0].Parameters = b.Extractions[0].Parameters[:2]
	b.References = nil
	b.SetNotes("Wafer 12, die 7.\nAnnealed 30 min at 400 C.\nThird line.")
	b.Reviews = append(b.Reviews, ReviewNote{Author: "K. Lund", Time: fixedTime, Text: "Agreed."})
	ch := Diff(a, b, false)
	want := []struct{ sec, q, delta string }{
		{SectionMeta, "title", "changed"},
		{SectionMeasurements, "iv-85C", "added"},
		{SectionExtractions, "fit-1: n", "+6.8 %"},
		{SectionExtractions, "fit-1: Rs", "removed"},
		{SectionReferences, "baseline", "removed"},
		{SectionNotes, "notes", "2 added, 1 removed"},
		{SectionReviews, "K. Lund, " + fixedTime.Format("2006-01-02 15:04"), "added"},
	}
	for _, w := range want {
		c, ok := findChange(ch, w.sec, w.q)
		if !ok || c.Delta != w.delta {
			t.Errorf("%s / %s: got %+v (found %v), want change %q", w.sec, w.q, c, ok, w.delta)
		}
	}
	if c, _ := findChange(ch, SectionExtractions, "fit-1: n"); !strings.Contains(c.New, "1.1 ± 0.004") {
		t.Errorf("parameter with uncertainty: %q", c.New)
	}
}

func TestDiffUnevaluable(t *testing.T) {
	a := exampleDocument()
	b := a.Clone()
	b.Spec.Bias = 5 // beyond the built-in potential: results may still evaluate
	ch := Diff(a, b, true)
	if _, ok := findChange(ch, SectionInputs, "bias V (bias)"); !ok {
		t.Errorf("bias change missing: %+v", ch)
	}
}
