package extract

import (
	"math"
	"testing"

	"junco/physics"
)

// BenchmarkFitIV1000 fits the single-diode model (4 parameters) to a
// 1000-point forward curve with 1.5 % noise (invented data). Target: under
// 10 ms per fit.
func BenchmarkFitIV1000(b *testing.B) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e6}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.01, 1.0, 1000, 0.015, 1)
	b.ReportAllocs()
	for b.Loop() {
		f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
		if err != nil || math.Abs(f.Single.IdealityFactor/1.5-1) > 0.02 {
			b.Fatal(err, f.Single)
		}
	}
}

// BenchmarkFitIVDouble1000 is the same for the double-diode model.
func BenchmarkFitIVDouble1000(b *testing.B) {
	vt := physics.ThermalVoltage(300)
	d := DoubleDiode{1e-14, 1e-9, 5, 1e6}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.05, 0.9, 1000, 0.015, 1)
	for b.Loop() {
		if _, err := FitIV(v, i, IVOptions{TemperatureK: 300, Model: ModelDouble}); err != nil {
			b.Fatal(err)
		}
	}
}
