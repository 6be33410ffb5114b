package cli

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"junco/model"
	"junco/model/fit"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
	"junco/sessions"
)

// The I-V and C-V files of these tests are invented: sampled from the
// single-diode and abrupt-junction models with known parameters and
// fixed-seed noise (fitWriteIV, fitWriteCV), so the stored values have a
// known truth.

func fitSaveStore(t *testing.T, dir string) *sessions.Store {
	t.Helper()
	st, err := sessions.New(dir, sessions.Options{ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	return st
}

func fitSaveParamByName(x sessions.Extraction, name string) (sessions.Parameter, bool) {
	for _, p := range x.Parameters {
		if p.Name == name {
			return p, true
		}
	}
	return sessions.Parameter{}, false
}

func TestFitIVSaveTo(t *testing.T) {
	files, store := t.TempDir(), t.TempDir()
	truth := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.5, SeriesResistanceOhm: 10, ShuntResistanceOhm: 1e6}
	p := fitWriteIV(t, files, "invented-die1.csv", truth, 300, 0.02, 1.0, 150, 1)

	code, _, errs := fitCall("iv", p, "--save-to", "d7", "--data", store)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(errs, "saved as revision 1 of session d7") || !strings.Contains(errs, "did not exist; created it with the default junction") {
		t.Errorf("stderr: %s", errs)
	}
	st := fitSaveStore(t, store)
	doc, rev, err := st.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	if rev.Number != 1 || len(doc.Measurements) != 1 || len(doc.Extractions) != 1 {
		t.Fatalf("revision %d, %d measurements, %d extractions", rev.Number, len(doc.Measurements), len(doc.Extractions))
	}
	if doc.Spec.Material != model.DefaultSpec().Material || doc.Spec.DonorDensity != model.DefaultSpec().DonorDensity {
		t.Errorf("new session spec %+v, want the default junction", doc.Spec)
	}
	m, x := doc.Measurements[0], doc.Extractions[0]
	if m.ID != "iv-1" || m.Kind != measure.KindIV || len(m.VoltageV) != 150 {
		t.Errorf("measurement %q kind %q, %d points", m.ID, m.Kind, len(m.VoltageV))
	}
	if x.Method != "iv-single-diode" || x.Measurement != "iv-1" || x.Performed.IsZero() {
		t.Errorf("extraction %+v", x)
	}
	is, ok := fitSaveParamByName(x, "Is")
	if !ok || is.Unit != "A" || math.Abs(is.Value/1e-12-1) > 0.10 {
		t.Errorf("Is = %+v, want 1e-12 A within 10 %%", is)
	}
	if is.StdError == nil || !(*is.StdError > 0) {
		t.Errorf("Is standard error %v, want a positive value", is.StdError)
	}
	if n, ok := fitSaveParamByName(x, "n"); !ok || math.Abs(n.Value-1.5) > 0.03 || n.StdError == nil {
		t.Errorf("n = %+v", n)
	}
	notes := strings.Join(x.Notes, "\n")
	if !strings.Contains(notes, "window ") || !strings.Contains(notes, "rms log residual") {
		t.Errorf("notes %q", notes)
	}

	// A second run appends revision 2 with the next free ID.
	p2 := fitWriteIV(t, files, "invented-die2.csv", truth, 300, 0.02, 1.0, 150, 2)
	code, _, errs = fitCall("iv", p2, "--save-to=d7", "--data", store)
	if code != 0 || !strings.Contains(errs, "saved as revision 2 of session d7") || strings.Contains(errs, "did not exist") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, rev, err = st.Open("d7", 0)
	if err != nil {
		t.Fatal(err)
	}
	if rev.Number != 2 || len(doc.Measurements) != 2 || doc.Measurements[0].ID != "iv-1" || doc.Measurements[1].ID != "iv-2" {
		t.Fatalf("revision %d, measurements %+v", rev.Number, len(doc.Measurements))
	}
	if len(doc.Extractions) != 2 || doc.Extractions[1].Measurement != "iv-2" || doc.Extractions[0].ID == doc.Extractions[1].ID {
		t.Errorf("extractions %+v", doc.Extractions)
	}

	// A bad file fits nothing and stores nothing.
	bad := filepath.Join(files, "bad.csv")
	writeTestFile(t, bad, []byte("Voltage (V),Current (mA)\nx,y\n"))
	code, _, errs = fitCall("iv", bad, "--save-to", "d7", "--data", store)
	if code == 0 || !strings.Contains(errs, "nothing saved") {
		t.Errorf("bad file: exit %d: %s", code, errs)
	}
	if n, err := st.Latest("d7"); err != nil || n != 2 {
		t.Errorf("after a bad file: latest revision %d (%v), want 2", n, err)
	}
	// A bad session name is refused before fitting.
	code, _, errs = fitCall("iv", p, "--save-to", "../x", "--data", store)
	if code != exitUsage || !strings.Contains(errs, "--save-to") {
		t.Errorf("bad name: exit %d: %s", code, errs)
	}
}

func TestFitIVSaveToKeepsGoodFitsOnly(t *testing.T) {
	files, store := t.TempDir(), t.TempDir()
	d := extract.SingleDiode{SaturationCurrentA: 1e-13, IdealityFactor: 1.1, SeriesResistanceOhm: 2, ShuntResistanceOhm: math.Inf(1)}
	good := fitWriteIV(t, files, "invented-good.csv", d, 300, 0.1, 0.7, 40, 3)
	missing := filepath.Join(files, "missing.csv")
	code, _, errs := fitCall("iv", good, missing, "--save-to", "lot", "--data", store)
	if code == 0 || !strings.Contains(errs, "saved as revision 1 of session lot") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, _, err := fitSaveStore(t, store).Open("lot", 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Measurements) != 1 || len(doc.Extractions) != 1 {
		t.Fatalf("%d measurements, %d extractions; want the good file only", len(doc.Measurements), len(doc.Extractions))
	}
	// No shunt path: Rsh is infinite, left out with a note.
	if _, ok := fitSaveParamByName(doc.Extractions[0], "Rsh"); ok {
		t.Errorf("infinite Rsh stored: %+v", doc.Extractions[0].Parameters)
	}
}

func TestFitSaveToSessionAppends(t *testing.T) {
	files, store := t.TempDir(), t.TempDir()
	d := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.2, ShuntResistanceOhm: math.Inf(1)}
	p := fitWriteIV(t, files, "invented.csv", d, 300, 0.1, 0.7, 40, 1)
	r, err := fitIVFile(context.Background(), p, fitCommon{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	now := time.Now()
	items := []fitSaveItem{{prefix: "iv", ds: r.res.DataSet, records: []fit.Record{fit.IVRecord(r.res)}}}
	for want := 1; want <= 2; want++ {
		res, err := fitSaveToSession(store, "s", items, now, io.Discard)
		if err != nil || res.Revision != want || res.Created != (want == 1) {
			t.Fatalf("save %d: %+v, %v", want, res, err)
		}
	}
	doc, _, err := fitSaveStore(t, store).Open("s", 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Measurements) != 2 || doc.Measurements[1].ID != "iv-2" || doc.Extractions[1].ID != "iv-2-fit-1" {
		t.Errorf("ids: %v / %v", doc.Measurements[1].ID, doc.Extractions[1].ID)
	}
}

func TestFitCVSaveTo(t *testing.T) {
	files, store := t.TempDir(), t.TempDir()
	si, err := physics.MaterialByName("si")
	if err != nil {
		t.Fatal(err)
	}
	p := fitWriteCV(t, files, 2e22, 0.78, 1e-6, si.Permittivity())
	code, _, errs := fitCall("cv", p, "--area", "1mm2", "--save-to", "c1", "--data", store)
	if code != 0 || !strings.Contains(errs, "saved as revision 1 of session c1") {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, _, err := fitSaveStore(t, store).Open("c1", 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Measurements) != 1 || doc.Measurements[0].ID != "cv-1" || len(doc.Extractions) < 1 {
		t.Fatalf("%d measurements, %d extractions", len(doc.Measurements), len(doc.Extractions))
	}
	if len(doc.Extractions) != 2 || doc.Extractions[0].Method != "cv-junction-capacitance" {
		t.Fatalf("extractions %+v: want the junction fit first, then the line", doc.Extractions)
	}
	x := doc.Extractions[1]
	nd, ok := fitSaveParamByName(x, "N")
	if x.Method != "mott-schottky" || !ok || nd.Unit != "m^-3" || math.Abs(nd.Value/2e22-1) > 0.05 || nd.StdError == nil {
		t.Errorf("extraction %s: N = %+v", x.Method, nd)
	}
}

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
