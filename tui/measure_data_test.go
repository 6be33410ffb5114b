package tui

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"junco/model"
	"junco/model/fit/fittest"
	"junco/physics"
	"junco/physics/extract"
)

// The invented data of the measurement screens' tests (test data, not
// measurements): sweeps made by the model or the single-diode law with
// noise from fixed seeds (fittest.Sweep), written to temporary files.

// writeText writes text to path and returns the path.
func writeText(t testing.TB, path, text string) string {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

// writeIV writes an invented forward I-V sweep of a diode (Is = 1e-12 A,
// n = 1.5 at 300 K) with 1 % scatter, in volts and milliamperes, with one
// compliance row and one NaN row.
func writeIV(t *testing.T, name string) string {
	t.Helper()
	vt := 0.025852
	sw := fittest.Sweep{Head: "# temperature: 300 K\nV (V),I (mA),status\n", From: 0.05, To: 0.05 + 0.012*59, Points: 60,
		Model: func(v float64) float64 { return 1e-12 * math.Expm1(v/(1.5*vt)) }, Rel: 0.01, Seed: [2]uint64{3, 9}, Scale: 1e3, Row: "%.4f,%.6e,0\n"}
	return writeText(t, filepath.Join(t.TempDir(), name), sw.Text()+"0.8,NaN,0\n0.81,100,1\n")
}

// cvTestSpec is an invented one-sided junction: p+ (1e19 cm^-3) on n
// (1e16 cm^-3) silicon, 1 mm^2, at 300 K.
func cvTestSpec() model.Spec {
	s := model.DemoJunction().Spec
	s.Material, s.Profile = "si", "abrupt"
	s.AcceptorDensity, s.DonorDensity = 1e19*1e6, 1e16*1e6
	s.Area, s.Temperature = 1e-6, 300
	return s
}

// writeCV writes a reverse C-V sweep of cvTestSpec computed by the model
// (depletion capacitance, every 0.1 V from -5 V to 0) with 0.2 % scatter
// from a fixed seed, in volts and picofarads.
func writeCV(t *testing.T, name string) string {
	t.Helper()
	cv, _, err := model.CVCurve(cvTestSpec(), model.Range{From: -5, To: 0, Step: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	at := func(v float64) float64 { return cv.Series[0].Y[int(math.Round((v+5)/0.1))] } // the sweep's own points
	sw := fittest.Sweep{Head: "# temperature: 300 K\nV (V),C (pF)\n", From: -5, To: 0, Points: len(cv.Xs),
		Model: at, Rel: 0.002, Seed: [2]uint64{11, 5}, Scale: 1e12, Row: "%.4f,%.6e\n"}
	return sw.Write(t, filepath.Join(t.TempDir(), name))
}

// batchIs is the saturation current of the invented diodes.
const batchIs = 2e-12

// writeBatchDir writes good invented I-V sweeps (single diode at 300 K,
// Is spread by a few percent around batchIs, 1 % multiplicative noise)
// and one file that is not a measurement into a temporary directory.
func writeBatchDir(t *testing.T, good int) string {
	t.Helper()
	dir := t.TempDir()
	vt := physics.ThermalVoltage(300)
	for k := 0; k < good; k++ {
		// Invented device, not a measurement.
		d := extract.SingleDiode{SaturationCurrentA: batchIs * (1 + 0.04*float64(k-good/2)/float64(good)),
			IdealityFactor: 1.3 + 0.02*float64(k%3), SeriesResistanceOhm: 3, ShuntResistanceOhm: math.Inf(1)}
		sw := fittest.Sweep{Head: "# invented single-diode sweep for a test\n# temperature: 300 K\nV,I (A)\n", From: 0.1, To: 0.7, Points: 61,
			Model: func(v float64) float64 { return d.Current(v, vt) }, Rel: 0.01, Seed: [2]uint64{7, 11 + uint64(k)}, Row: "%.4f,%.6e\n"}
		sw.Write(t, filepath.Join(dir, fmt.Sprintf("die%02d.csv", k)))
	}
	writeText(t, filepath.Join(dir, "broken.csv"), "no numbers here\nat all;;\n")
	writeText(t, filepath.Join(dir, "notes.md"), "not listed")
	return dir
}

// writeIVAt writes an invented sweep of a diode (Is 1e-14 A, n 1.05,
// Rs 1 ohm) at tk with 0.5 % noise, under the first line head ("" for
// none).
func writeIVAt(t *testing.T, name, head string, tk float64) string {
	t.Helper()
	d := extract.SingleDiode{SaturationCurrentA: 1e-14, IdealityFactor: 1.05, SeriesResistanceOhm: 1, ShuntResistanceOhm: math.Inf(1)}
	vt := physics.ThermalVoltage(tk)
	if head != "" {
		head += "\n"
	}
	sw := fittest.Sweep{Head: head + "V (V),I (A)\n", From: 0.2, To: 0.2 + 0.006*79, Points: 80,
		Model: func(v float64) float64 { return d.Current(v, vt) }, Rel: 0.005, Seed: [2]uint64{5, 5}, Row: "%.4f,%.6e\n"}
	return sw.Write(t, filepath.Join(t.TempDir(), name))
}

// writeLitIV writes an invented lit I-V sweep (test data, not a
// measurement) of a cell-like lit diode, with 0.02 mA scatter, in the
// generator sign (delivered current positive) or the load sign.
func writeLitIV(t *testing.T, name string, generator bool) string {
	t.Helper()
	d := extract.LitDiode{PhotocurrentA: 0.2, SaturationCurrentA: 2e-9, IdealityFactor: 1.3, SeriesResistanceOhm: 0.2, ShuntResistanceOhm: 150}
	vt := physics.ThermalVoltage(300)
	sw := fittest.Sweep{Head: "# invented lit sweep\n# temperature: 300 K\nV (V),I (mA)\n", From: -0.05, To: 0.67, Points: 61,
		Model: func(v float64) float64 { return d.Current(v, vt) }, Abs: 2e-5, Negate: generator, Seed: [2]uint64{4, 9}, Scale: 1e3, Row: "%.4f,%.6f\n"}
	return sw.Write(t, filepath.Join(t.TempDir(), name))
}
