package extract

import (
	"context"
	"fmt"
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

// BenchmarkFitIVRows fits the single-diode model to forward curves of 1k,
// 100k and 1M points (1 % noise, invented data). The start-value search
// (LinearRegion, CheungCheung) is one pass with running sums and each
// Levenberg-Marquardt evaluation is linear in the points, so the time per
// row (ns/row) stays about flat from 1k to 1M. Target: the 1M case under
// 2000 times the 1k case (linear scaling within 2x).
func BenchmarkFitIVRows(b *testing.B) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e6}
	for _, n := range []int{1000, 100000, 1000000} {
		v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.01, 1.0, n, 0.01, 1)
		b.Run(fmt.Sprintf("rows=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
				if err != nil || math.Abs(f.Single.IdealityFactor/1.5-1) > 0.02 {
					b.Fatal(err, f.Single)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/row")
		})
	}
}

// BenchmarkStartValues times the direct start-value search alone
// (LinearRegion, CheungCheung, the shunt estimate) on the same curves.
func BenchmarkStartValues(b *testing.B) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e6}
	for _, n := range []int{1000, 100000, 1000000} {
		v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.01, 1.0, n, 0.01, 1)
		b.Run(fmt.Sprintf("rows=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := directEstimates(context.Background(), v, i, vt); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/row")
		})
	}
}
