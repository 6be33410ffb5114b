package tui

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/model"
	"junco/physics"
	"junco/physics/extract"
)

// The invented data of the measurement screens' tests (test data, not
// measurements): sweeps made by the model or the single-diode law with
// noise from fixed seeds, written to temporary files.

// writeText writes text to path and returns the path.
func writeText(t testing.TB, path, text string) string {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o600); err != nil {
		t.Fatal(err)
	}
	return path
}

// writeIV writes an invented forward I-V sweep of a diode (Is = 1e-12 A,
// n = 1.5 at 300 K, a little series resistance) with 1 % scatter, in
// volts and milliamperes, with one compliance row and one NaN row.
func writeIV(t *testing.T, name string) string {
	t.Helper()
	rng := rand.New(rand.NewPCG(3, 9))
	var b strings.Builder
	b.WriteString("# temperature: 300 K\nV (V),I (mA),status\n")
	vt := 0.025852
	for k := 0; k < 60; k++ {
		v := 0.05 + 0.012*float64(k)
		i := 1e-12 * math.Expm1(v/(1.5*vt)) * (1 + 0.01*rng.NormFloat64())
		fmt.Fprintf(&b, "%.4f,%.6e,0\n", v, i*1e3)
	}
	b.WriteString("0.8,NaN,0\n0.81,100,1\n")
	return writeText(t, filepath.Join(t.TempDir(), name), b.String())
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
// (depletion capacitance) with 0.2 % scatter from a fixed seed, in volts
// and picofarads.
func writeCV(t *testing.T, name string) string {
	t.Helper()
	cv, _, err := model.CVCurve(cvTestSpec(), model.Range{From: -5, To: 0, Step: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(11, 5))
	var b strings.Builder
	b.WriteString("# temperature: 300 K\nV (V),C (pF)\n")
	for k, v := range cv.Xs {
		c := cv.Series[0].Y[k] * (1 + 0.002*rng.NormFloat64())
		fmt.Fprintf(&b, "%.4f,%.6e\n", v, c*1e12)
	}
	return writeText(t, filepath.Join(t.TempDir(), name), b.String())
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
	rng := rand.New(rand.NewPCG(7, 11))
	for k := 0; k < good; k++ {
		// Invented device, not a measurement.
		d := extract.SingleDiode{SaturationCurrentA: batchIs * (1 + 0.04*float64(k-good/2)/float64(good)),
			IdealityFactor: 1.3 + 0.02*float64(k%3), SeriesResistanceOhm: 3, ShuntResistanceOhm: math.Inf(1)}
		var b strings.Builder
		b.WriteString("# invented single-diode sweep for a test\n# temperature: 300 K\nV,I (A)\n")
		for i := 0; i <= 60; i++ {
			v := 0.1 + 0.6*float64(i)/60
			cur := d.Current(v, vt) * (1 + 0.01*rng.NormFloat64())
			fmt.Fprintf(&b, "%.4f,%.6e\n", v, cur)
		}
		writeText(t, filepath.Join(dir, fmt.Sprintf("die%02d.csv", k)), b.String())
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
	rng := rand.New(rand.NewPCG(5, 5))
	d := extract.SingleDiode{SaturationCurrentA: 1e-14, IdealityFactor: 1.05, SeriesResistanceOhm: 1, ShuntResistanceOhm: math.Inf(1)}
	vt := physics.ThermalVoltage(tk)
	var b strings.Builder
	if head != "" {
		b.WriteString(head + "\n")
	}
	b.WriteString("V (V),I (A)\n")
	for k := 0; k < 80; k++ {
		v := 0.2 + 0.006*float64(k)
		fmt.Fprintf(&b, "%.4f,%.6e\n", v, d.Current(v, vt)*(1+0.005*rng.NormFloat64()))
	}
	return writeText(t, filepath.Join(t.TempDir(), name), b.String())
}

// writeLitIV writes an invented lit I-V sweep (test data, not a
// measurement) of a cell-like lit diode, with 0.02 mA scatter, in the
// generator sign (delivered current positive) or the load sign.
func writeLitIV(t *testing.T, name string, generator bool) string {
	t.Helper()
	d := extract.LitDiode{PhotocurrentA: 0.2, SaturationCurrentA: 2e-9, IdealityFactor: 1.3, SeriesResistanceOhm: 0.2, ShuntResistanceOhm: 150}
	rng := rand.New(rand.NewPCG(4, 9))
	vt := physics.ThermalVoltage(300)
	var b strings.Builder
	b.WriteString("# invented lit sweep\n# temperature: 300 K\nV (V),I (mA)\n")
	for k := 0; k <= 60; k++ {
		v := -0.05 + 0.012*float64(k)
		i := d.Current(v, vt) + 2e-5*rng.NormFloat64()
		if generator {
			i = -i
		}
		fmt.Fprintf(&b, "%.4f,%.6f\n", v, i*1e3)
	}
	return writeText(t, filepath.Join(t.TempDir(), name), b.String())
}
