package extract

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"junco/physics"
)

// synthIV samples a model on n evenly spaced biases in [v0, v1] with
// multiplicative Gaussian noise of relative size rel (fixed seed). The data
// are invented for the test; the truth is the model the data came from.
func synthIV(model func(v float64) float64, v0, v1 float64, n int, rel float64, seed uint64) ([]float64, []float64) {
	rng := rand.New(rand.NewPCG(seed, 7))
	v := make([]float64, n)
	i := make([]float64, n)
	for k := range v {
		v[k] = v0 + (v1-v0)*float64(k)/float64(n-1)
		i[k] = model(v[k]) * (1 + rel*rng.NormFloat64())
	}
	return v, i
}

func relErr(got, want float64) float64 { return math.Abs(got/want - 1) }

// Synthetic-truth recovery: targets Is within 10 %, n within 2 %, Rs within
// 10 % where Rs is observable (acceptance criteria of the task; the noise
// level 1-2 % multiplicative is common practice for bench SMU data).
func TestFitIVSingleRecovers(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	cases := []struct {
		name    string
		d       SingleDiode
		v0, v1  float64
		rel     float64
		checkRs bool
		checkSh bool
	}{
		{"si-like", SingleDiode{1e-14, 1.05, 2, 1e7}, 0.05, 0.85, 0.015, true, false},
		{"reference set", SingleDiode{1e-12, 1.5, 10, 1e4}, 0.02, 1.0, 0.01, true, true},
		{"leaky", SingleDiode{1e-11, 1.8, 20, 1e5}, 0.02, 1.1, 0.02, true, true},
		{"no Rs visible", SingleDiode{1e-13, 1.2, 0.01, math.Inf(1)}, 0.2, 0.6, 0.015, false, false},
	}
	for ci, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v, i := synthIV(func(x float64) float64 { return c.d.Current(x, vt) }, c.v0, c.v1, 200, c.rel, uint64(ci+1))
			f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
			if err != nil {
				t.Fatal(err)
			}
			g := f.Single
			if e := relErr(g.SaturationCurrentA, c.d.SaturationCurrentA); e > 0.10 {
				t.Errorf("Is = %g, want %g (%.1f %%)", g.SaturationCurrentA, c.d.SaturationCurrentA, 100*e)
			}
			if e := relErr(g.IdealityFactor, c.d.IdealityFactor); e > 0.02 {
				t.Errorf("n = %g, want %g", g.IdealityFactor, c.d.IdealityFactor)
			}
			if c.checkRs {
				if e := relErr(g.SeriesResistanceOhm, c.d.SeriesResistanceOhm); e > 0.10 {
					t.Errorf("Rs = %g, want %g", g.SeriesResistanceOhm, c.d.SeriesResistanceOhm)
				}
			}
			if c.checkSh {
				if e := relErr(g.ShuntResistanceOhm, c.d.ShuntResistanceOhm); e > 0.10 {
					t.Errorf("Rsh = %g, want %g", g.ShuntResistanceOhm, c.d.ShuntResistanceOhm)
				}
			}
			// The scatter of ln I matches the injected noise.
			if f.RMSLogResidual > 1.5*c.rel || f.RMSLogResidual < 0.5*c.rel {
				t.Errorf("rms log residual %g, injected noise %g", f.RMSLogResidual, c.rel)
			}
			if f.Points != 200-f.Skipped || !(f.SingleStdErr.IdealityFactor > 0) {
				t.Errorf("points %d skipped %d, se(n) %g", f.Points, f.Skipped, f.SingleStdErr.IdealityFactor)
			}
			// The true value lies within 4 standard errors of the estimate.
			if d := math.Abs(g.IdealityFactor - c.d.IdealityFactor); d > 4*f.SingleStdErr.IdealityFactor {
				t.Errorf("n off by %g, %g standard errors", d, d/f.SingleStdErr.IdealityFactor)
			}
			t.Logf("fit %+v se %+v notes %v corr %v iter %d", g, f.SingleStdErr, f.Notes, f.Correlations, f.Iterations)
		})
	}
}

func TestFitIVNotObservable(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-13, 1.2, 0.01, math.Inf(1)}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.2, 0.6, 100, 0.01, 11)
	f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
	if err != nil {
		t.Fatal(err)
	}
	if f.Single.SeriesResistanceOhm != 0 || !math.IsInf(f.Single.ShuntResistanceOhm, 1) || len(f.Notes) < 2 {
		t.Errorf("expected Rs, Rsh dropped: %+v notes %v", f.Single, f.Notes)
	}
	if !math.IsNaN(f.SingleStdErr.SeriesResistanceOhm) {
		t.Errorf("dropped Rs must have NaN standard error")
	}
}

func TestFitIVWindowAndFixed(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e6}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, -0.5, 1.0, 301, 0.01, 3)
	f, err := FitIV(v, i, IVOptions{TemperatureK: 300, Window: Window{0.2, 0.6}, FixRs: true, RsOhm: 10, FixRsh: true, RshOhm: 1e6})
	if err != nil {
		t.Fatal(err)
	}
	inWin := 0
	for _, x := range v {
		if x >= 0.2 && x <= 0.6 {
			inWin++
		}
	}
	if f.UsedWindow.MinV < 0.2 || f.UsedWindow.MaxV > 0.6 || f.Points != inWin {
		t.Errorf("window %+v points %d", f.UsedWindow, f.Points)
	}
	if f.Single.SeriesResistanceOhm != 10 || !math.IsNaN(f.SingleStdErr.SeriesResistanceOhm) {
		t.Errorf("fixed Rs changed: %+v", f.Single)
	}
	if relErr(f.Single.IdealityFactor, 1.5) > 0.02 {
		t.Errorf("n=%g", f.Single.IdealityFactor)
	}
	// Whole range: reverse points are skipped and counted.
	f, err = FitIV(v, i, IVOptions{TemperatureK: 300})
	if err != nil {
		t.Fatal(err)
	}
	if f.Skipped != 101 {
		t.Errorf("skipped %d, want 101 (V <= 0)", f.Skipped)
	}
}

func TestFitIVDouble(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	d := DoubleDiode{1e-14, 1e-9, 5, 1e6}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.05, 0.9, 200, 0.015, 5)
	f, err := FitIV(v, i, IVOptions{TemperatureK: 300, Model: ModelDouble})
	if err != nil {
		t.Fatal(err)
	}
	g := f.Double
	if relErr(g.DiffusionCurrentA, d.DiffusionCurrentA) > 0.10 || relErr(g.RecombinationCurrentA, d.RecombinationCurrentA) > 0.10 ||
		relErr(g.SeriesResistanceOhm, d.SeriesResistanceOhm) > 0.10 || relErr(g.ShuntResistanceOhm, d.ShuntResistanceOhm) > 0.2 {
		t.Errorf("double fit %+v, want %+v (se %+v, notes %v)", g, d, f.DoubleStdErr, f.Notes)
	}
}

func TestFitIVErrors(t *testing.T) {
	v := []float64{0.1, 0.2, 0.3, 0.4, 0.5, 0.6}
	i := []float64{1e-9, 1e-8, 1e-7, 1e-6, 1e-5, 1e-4}
	cases := []struct {
		name string
		v, i []float64
		opt  IVOptions
		is   error
	}{
		{"length", v, i[:3], IVOptions{TemperatureK: 300}, ErrInput},
		{"no temperature", v, i, IVOptions{}, ErrInput},
		{"nan temperature", v, i, IVOptions{TemperatureK: math.NaN()}, ErrInput},
		{"empty window", v, i, IVOptions{TemperatureK: 300, Window: Window{0.5, 0.2}}, ErrInput},
		{"too few in window", v, i, IVOptions{TemperatureK: 300, Window: Window{0.05, 0.25}}, ErrTooFewPoints},
		{"negative fixed Rs", v, i, IVOptions{TemperatureK: 300, FixRs: true, RsOhm: -1}, ErrInput},
		{"reverse only", []float64{-1, -0.8, -0.6, -0.4, -0.2, -0.1}, []float64{-1e-9, -1e-9, -1e-9, -1e-9, -1e-9, -1e-9}, IVOptions{TemperatureK: 300}, ErrTooFewPoints},
		{"flat", v, []float64{1e-6, 1e-6, 1e-6, 1e-6, 1e-6, 1e-6}, IVOptions{TemperatureK: 300}, ErrInput},
	}
	for _, c := range cases {
		_, err := FitIV(c.v, c.i, c.opt)
		var ie *InputError
		if !errors.Is(err, c.is) || !errors.As(err, &ie) || ie.Field == "" {
			t.Errorf("%s: err = %v, want %v with a field", c.name, err, c.is)
		}
	}
}

func TestCheungCheungAndLinearRegion(t *testing.T) {
	// Noise-free ideal diode with Rs: Cheung-Cheung returns Rs and n of the
	// model exactly up to the finite-difference derivative (Cheung & Cheung,
	// Appl. Phys. Lett. 49, 85 (1986), eq. 4).
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-13, 1.3, 5, math.Inf(1)}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.5, 0.95, 100, 0, 1)
	c, err := CheungCheung(v, i, vt)
	if err != nil {
		t.Fatal(err)
	}
	if relErr(c.SeriesResistanceOhm, 5) > 0.01 || relErr(c.IdealityFactor, 1.3) > 0.01 {
		t.Errorf("Cheung-Cheung %+v", c)
	}
	v, i = synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.1, 0.5, 100, 0, 1)
	is, n, _, err := LinearRegion(v, i, vt)
	if err != nil || relErr(is, 1e-13) > 0.01 || relErr(n, 1.3) > 0.005 {
		t.Errorf("linear region Is=%g n=%g err=%v", is, n, err)
	}
}
