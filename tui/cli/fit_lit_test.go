package cli

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"junco/physics"
	"junco/physics/extract"
)

// fitLitTruth is an invented lit diode (of the order of a silicon cell).
var fitLitTruth = extract.LitDiode{PhotocurrentA: 0.3, SaturationCurrentA: 5e-9, IdealityFactor: 1.4, SeriesResistanceOhm: 0.1, ShuntResistanceOhm: 120}

// fitWriteLit writes an invented lit sweep (the model's curve plus 0.03 mA
// noise; test data, not a measurement) in mA, in the generator sign
// (delivered current positive) or the load sign.
func fitWriteLit(t testing.TB, dir string, generator bool) string {
	t.Helper()
	rng := rand.New(rand.NewPCG(11, 5))
	vt := physics.ThermalVoltage(300)
	var b strings.Builder
	b.WriteString("# invented lit sweep (test data)\n# temperature: 300 K\nV,I (mA)\n")
	for k := 0; k <= 60; k++ {
		v := -0.05 + 0.72*float64(k)/60
		i := fitLitTruth.Current(v, vt) + 3e-5*rng.NormFloat64()
		if generator {
			i = -i
		}
		fmt.Fprintf(&b, "%.4f,%.6f\n", v, i*1e3)
	}
	p := filepath.Join(dir, fmt.Sprintf("lit-%v.csv", generator))
	writeTestFile(t, p, []byte(b.String()))
	return p
}

// fit iv recognises a lit file in either sign, says which it assumed, and
// reports the lit parameters (near the invented truth) and the figures of
// merit in text and JSON; --light forces the lit fit, which a dark curve
// then refuses with a clear error.
func TestFitIVLitCurve(t *testing.T) {
	dir := t.TempDir()
	for _, gen := range []bool{false, true} {
		p := fitWriteLit(t, dir, gen)
		code, out, errs := fitCall("iv", p, "--json")
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, errs)
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(out), &m); err != nil {
			t.Fatal(err)
		}
		want := "load"
		if gen {
			want = "generator"
		}
		if m["model"] != "lit" || m["current_sign"] != want {
			t.Errorf("generator %v: model %v, sign %v", gen, m["model"], m["current_sign"])
		}
		iph, _ := m["photocurrent_A"].(float64)
		n, _ := m["ideality_factor"].(float64)
		if math.Abs(iph/fitLitTruth.PhotocurrentA-1) > 0.005 || math.Abs(n/fitLitTruth.IdealityFactor-1) > 0.02 {
			t.Errorf("generator %v: Iph %g, n %g; truth %g, %g", gen, iph, n, fitLitTruth.PhotocurrentA, fitLitTruth.IdealityFactor)
		}
		for _, k := range []string{"rms_residual_A", "figures_from_data", "figures_from_fit", "photocurrent_stderr_A"} {
			if m[k] == nil {
				t.Errorf("generator %v: no %s in %s", gen, k, out)
			}
		}
		fd := m["figures_from_data"].(map[string]any)
		ff := m["figures_from_fit"].(map[string]any)
		if a, b := fd["fill_factor"].(float64), ff["fill_factor"].(float64); math.Abs(a-b) > 0.01 || !(a > 0.5 && a < 0.9) {
			t.Errorf("fill factor: data %g, fit %g", a, b)
		}
		code, out, _ = fitCall("iv", p, "--ascii")
		for _, s := range []string{"lit single diode", "current sign", want, "Iph", "fill factor FF", "(data)", "(fit)"} {
			if code != exitOK || !strings.Contains(out, s) {
				t.Errorf("text (exit %d) lacks %q:\n%s", code, s, out)
			}
		}
	}
	d := extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.2, SeriesResistanceOhm: 2, ShuntResistanceOhm: math.Inf(1)}
	dark := fitWriteIV(t, dir, "dark.csv", d, 300, 0.1, 0.7, 40, 1)
	if code, out, errs := fitCall("iv", dark, "--json"); code != exitOK || strings.Contains(out, "photocurrent_A") {
		t.Errorf("dark file: exit %d, %s%s", code, out, errs)
	}
	code, _, errs := fitCall("iv", dark, "--light")
	if code != exitUsage || !strings.Contains(errs, "current =") || !strings.Contains(errs, "lit fit") {
		t.Errorf("--light on a dark forward sweep: exit %d, %s", code, errs)
	}
}

// --save-to stores a lit fit as iv-lit-single-diode with Iph first, and
// the data set; the document is valid.
func TestFitIVLitSaveTo(t *testing.T) {
	files, store := t.TempDir(), t.TempDir()
	p := fitWriteLit(t, files, true)
	if code, _, errs := fitCall("iv", p, "--save-to", "cells", "--data", store); code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	doc, _, err := fitSaveStore(t, store).Open("cells", 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(doc.Extractions) != 1 || len(doc.Measurements) != 1 {
		t.Fatalf("%d extractions, %d measurements", len(doc.Extractions), len(doc.Measurements))
	}
	x := doc.Extractions[0]
	iph, ok := fitSaveParamByName(x, "Iph")
	if x.Method != "iv-lit-single-diode" || !ok || math.Abs(iph.Value/fitLitTruth.PhotocurrentA-1) > 0.005 || len(x.Parameters) != 5 {
		t.Errorf("extraction %+v", x)
	}
	if err := doc.Validate(); err != nil {
		t.Errorf("invalid document: %v", err)
	}
}
