package cli

import (
	"encoding/json"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"junco/model"
	"junco/model/measure"
	"junco/sessions"
)

// `junco fit iv FILE --compare SESSIONFILE --json` goes round the circle:
// invented demo data made by the model with the demo's 5 us hole lifetime,
// compared with a session whose hole lifetime is 10x too long, recovers a
// lifetime near 5 us (round trip; tolerance a factor 1.3).
func TestFitCompareRoundTrip(t *testing.T) {
	dir := t.TempDir()
	sets, err := model.DemoMeasurements(7)
	if err != nil {
		t.Fatal(err)
	}
	var ds *model.DemoDataSet
	for i := range sets {
		tk, ok := sets[i].Temperature()
		if sets[i].Kind == measure.KindIV && ok && math.Abs(tk-model.DemoJunction().Spec.Temperature) < 0.01 {
			ds = &sets[i]
		}
	}
	if ds == nil {
		t.Fatal("no demo I-V data at the demo temperature")
	}
	var b strings.Builder
	fmt.Fprintf(&b, "# temperature: %g K\nV,I\n", model.DemoJunction().Spec.Temperature)
	for k := range ds.VoltageV {
		fmt.Fprintf(&b, "%.6g,%.6g\n", ds.VoltageV[k], ds.CurrentA[k])
	}
	data := filepath.Join(dir, "d7.csv")
	writeTestFile(t, data, []byte(b.String()))
	spec := model.DemoJunction().Spec
	truth := spec.HoleLifetime
	spec.HoleLifetime = 10 * truth
	enc, err := sessions.Encode(sessions.NewDocument("wrong lifetime", "test", spec, time.Now()))
	if err != nil {
		t.Fatal(err)
	}
	sess := filepath.Join(dir, "wrong.json")
	writeTestFile(t, sess, enc)
	// From 0.3 V: the double-diode fit that separates the n = 1 part needs
	// the depletion-region current in its window.
	code, out, errs := runCLI(t, "fit", "iv", data, "--window", "0.3V:0.6V", "--compare", sess, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	tau, ok := m["reconciling_lifetime_s"].(float64)
	if !ok || tau < truth/1.3 || tau > truth*1.3 {
		t.Fatalf("reconciling lifetime %v, want about %g s:\n%s", m["reconciling_lifetime_s"], truth, out)
	}
	if _, ok := m["assumptions"].([]any); !ok {
		t.Errorf("no assumptions listed")
	}
}
