package cli

import (
	"encoding/json"
	"path/filepath"
	"testing"
	"time"

	"junco/model"
	"junco/sessions"
)

// `fit card --session FILE` takes the sweeps from the session's data sets
// by the rule the workbench follows (fit.CardInputsFrom): here the
// invented demo measurements (made by junco's own model with noise,
// labelled invented), three forward I-V temperatures and a C-V sweep, give
// a card with IS, N, CJO, EG, the reference being the sweep at the
// junction's temperature (TNOM 23 degC for 296.15 K).
func TestFitCardFromSession(t *testing.T) {
	demo := model.DemoJunction()
	doc := sessions.NewDocument("demo diode", "test", demo.Spec, time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC))
	sets, err := model.DemoMeasurements(1)
	if err != nil {
		t.Fatal(err)
	}
	for _, ds := range sets {
		if ds.ImportedAt.IsZero() {
			ds.ImportedAt = time.Date(2026, 1, 2, 3, 4, 5, 0, time.UTC)
		}
		doc.Measurements = append(doc.Measurements, sessions.Measurement{ID: ds.ID, DataSet: ds.DataSet})
	}
	b, err := sessions.Encode(doc)
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "demo.junco.json")
	writeTestFile(t, p, b)
	code, out, errs := runCLI(t, "fit", "card", "--session", p, "--name", "DDEMO", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Parameters map[string]struct {
			Value *float64 `json:"value"`
		} `json:"parameters"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"IS", "N", "CJO", "EG", "TNOM"} {
		if q, ok := rep.Parameters[k]; !ok || q.Value == nil {
			t.Errorf("no %s in the card from the session", k)
		}
	}
	if tn := rep.Parameters["TNOM"].Value; tn != nil && (*tn < 22.9 || *tn > 23.1) {
		t.Errorf("TNOM %g degC, want the junction's 23 degC", *tn)
	}
	if code, _, _ := runCLI(t, "fit", "card", "--session", p, "--iv", p, "--name", "X"); code != exitUsage {
		t.Errorf("--session with --iv: exit %d, want 2", code)
	}
}
