package extract

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"junco/physics"
)

// benchIV samples a single diode on n evenly spaced biases in [v0, v1] as
// a bench instrument writes it: multiplicative Gaussian noise rel, additive
// Gaussian noise floor (A), and readings clipped at the compliance comp (A,
// 0: none), the clipped points reading the compliance value times
// (1 + jitter g) with g standard normal. Invented data for the tests; the
// truth is the model the data came from.
func benchIV(d SingleDiode, vt, v0, v1 float64, n int, rel, floor, comp, jitter float64, seed uint64) ([]float64, []float64) {
	rng := rand.New(rand.NewPCG(seed, 11))
	v := make([]float64, n)
	i := make([]float64, n)
	for k := range v {
		v[k] = v0 + (v1-v0)*float64(k)/float64(n-1)
		i[k] = d.Current(v[k], vt)*(1+rel*rng.NormFloat64()) + floor*rng.NormFloat64()
		if comp > 0 && math.Abs(i[k]) >= comp {
			i[k] = math.Copysign(comp, i[k]) * (1 + jitter*rng.NormFloat64())
		}
	}
	return v, i
}

func hasNote(notes []string, sub string) bool {
	for _, n := range notes {
		if strings.Contains(n, sub) {
			return true
		}
	}
	return false
}

// checkRecovery applies the acceptance tolerances of the bench-data work:
// ln Is within 0.10, n within 2 %, Rs within 10 % (when checkRs).
func checkRecovery(t *testing.T, g, want SingleDiode, checkRs bool) {
	t.Helper()
	if d := math.Abs(math.Log(g.SaturationCurrentA / want.SaturationCurrentA)); d > 0.10 {
		t.Errorf("Is = %g, want %g (ln off by %.3f)", g.SaturationCurrentA, want.SaturationCurrentA, d)
	}
	if e := relErr(g.IdealityFactor, want.IdealityFactor); e > 0.02 {
		t.Errorf("n = %g, want %g", g.IdealityFactor, want.IdealityFactor)
	}
	if checkRs {
		if e := relErr(g.SeriesResistanceOhm, want.SeriesResistanceOhm); e > 0.10 {
			t.Errorf("Rs = %g, want %g (%.1f %%)", g.SeriesResistanceOhm, want.SeriesResistanceOhm, 100*e)
		}
	}
}

// Compliance: a sweep clipped at the instrument's current limit. The flat
// run at the top is found, named in a note and left out, and the truth is
// recovered; stating a compliance the data never reach fits the plateau as
// data, which must visibly bias Rs (the failure the detection prevents).
func TestFitIVComplianceRecovers(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	cases := []struct {
		name   string
		d      SingleDiode
		comp   float64
		jitter float64
	}{
		{"exact readings", SingleDiode{1e-13, 1.3, 5, math.Inf(1)}, 20e-3, 0},
		{"readings jitter at 1e-6", SingleDiode{1e-12, 1.5, 10, 1e5}, 10e-3, 1e-6},
		// comp 0: the compliance is the current at 1.15 V (the last ten
		// points of the sweep); a plateau this short biases Rs by only
		// about 2 %, so the check that the artefact bites is not made.
		{"short plateau", SingleDiode{1e-14, 1.1, 2, math.Inf(1)}, 0, 0},
	}
	for ci, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if c.comp == 0 {
				c.comp = c.d.Current(1.15, vt)
			}
			v, i := benchIV(c.d, vt, 0.05, 1.2, 231, 0.01, 0, c.comp, c.jitter, uint64(ci+3))
			clipped := 0
			for _, x := range i {
				if math.Abs(x) >= c.comp*(1-1e-4) {
					clipped++
				}
			}
			t.Logf("%d clipped points", clipped)
			if clipped < 2 {
				t.Fatalf("the simulated sweep has %d clipped points; the test needs a plateau", clipped)
			}
			f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
			if err != nil {
				t.Fatal(err)
			}
			if len(f.Clip.Indices) != clipped || math.Abs(f.Clip.CurrentA/c.comp-1) > 1e-4 {
				t.Errorf("clip %d points at %g A, want %d at %g A", len(f.Clip.Indices), f.Clip.CurrentA, clipped, c.comp)
			}
			if !hasNote(f.Notes, "clipped at the compliance") {
				t.Errorf("no compliance note: %q", f.Notes)
			}
			checkRecovery(t, f.Single, c.d, true)
			// The same file with the compliance stated.
			fs, err := FitIV(v, i, IVOptions{TemperatureK: 300, ComplianceA: c.comp})
			if err != nil {
				t.Fatal(err)
			}
			checkRecovery(t, fs.Single, c.d, true)
			// A compliance above every reading keeps the plateau as data.
			fb, err := FitIV(v, i, IVOptions{TemperatureK: 300, ComplianceA: 10})
			if err != nil {
				t.Fatal(err)
			}
			if !hasNote(fb.Notes, "no point reached") {
				t.Errorf("no note for an unreached compliance: %q", fb.Notes)
			}
			if e := relErr(fb.Single.SeriesResistanceOhm, c.d.SeriesResistanceOhm); e < 0.10 && clipped > 20 {
				t.Errorf("the plateau fitted as data gave Rs within %.1f %%: the test does not exercise the artefact", 100*e)
			}
		})
	}
}

// A clean sweep has no plateau: nothing is left out.
func TestDetectComplianceNone(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e4}
	v, i := benchIV(d, vt, -1, 1, 201, 0.01, 0, 0, 0, 5)
	for _, s := range []float64{1, -1} {
		if c, ok := DetectCompliance(v, i, s, 0); ok {
			t.Errorf("side %g: plateau found in clean data: %+v", s, c)
		}
	}
}

// Noise floor: a 1e-18 A diode measured with a 2e-11 A floor (the case of
// the bug report: Is -71 %, n = 0.987 and a confident 1.26e10 ohm shunt
// for a 1e12 ohm device). The floor is estimated from the reverse and
// near-zero-bias scatter, the points below 3 floors are left out, the rest
// weighted by relative plus floor noise, and the shunt, whose current
// (1e-12 A at 1 V) never exceeds the floor, is reported not measurable.
// Tolerances are the task's. Over 60 other seeds the same fit with the true
// noise model (the floor stated) misses Rs by more than 10 % in 4 (Rs*I is
// only 6.5 mV at the top of this sweep: that is the information in the
// data), and the estimated floor adds 2 more misses; the seeds here are
// fixed, not chosen among those.
func TestFitIVNoiseFloorRecovers(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	truth := SingleDiode{1e-18, 1.0, 5, 1e12}
	const floor = 2e-11
	for seed := uint64(1); seed <= 4; seed++ {
		v, i := benchIV(truth, vt, -1, 0.9, 191, 0.01, floor, 0, 0, seed)
		for _, opt := range []IVOptions{{TemperatureK: 300}, {TemperatureK: 300, CurrentFloorA: floor}} {
			f, err := FitIV(v, i, opt)
			if err != nil {
				t.Fatal(err)
			}
			if opt.CurrentFloorA == 0 {
				// The estimate is a median of about 100 residuals: a
				// standard error near 12 %; 30 % is 2.5 of them.
				if f.FloorSource != "estimated" || relErr(f.NoiseFloorA, floor) > 0.30 {
					t.Errorf("seed %d: floor %g A (%s), want %g", seed, f.NoiseFloorA, f.FloorSource, floor)
				}
			}
			checkRecovery(t, f.Single, truth, true)
			if !math.IsInf(f.Single.ShuntResistanceOhm, 1) || !hasNote(f.Notes, "shunt resistance not observable in the window (not measurable") {
				t.Errorf("seed %d: shunt %g ohm, notes %q; want not measurable", seed, f.Single.ShuntResistanceOhm, f.Notes)
			}
			if f.BelowFloor == 0 || !hasNote(f.Notes, "below 3 times the") {
				t.Errorf("seed %d: %d points below the floor, notes %q", seed, f.BelowFloor, f.Notes)
			}
		}
	}
}

// The floor estimate: pure Gaussian noise of known sigma around a linear
// leakage gives sigma back (MAD of second differences, Rousseeuw & Croux
// 1993); a clean leaky diode with 1 % relative noise has no floor.
func TestEstimateNoiseFloor(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	var v, i []float64
	for k := 0; k < 400; k++ {
		x := -2 + 2*float64(k)/399
		v = append(v, x)
		i = append(i, 1e-12*x+5e-12*rng.NormFloat64())
	}
	nf, ok := EstimateNoiseFloor(v, i, 0.0259)
	if !ok || !nf.Floor || relErr(nf.SigmaA, 5e-12) > 0.15 {
		t.Errorf("floor %+v, want sigma 5e-12 A", nf)
	}
	vt := physics.ThermalVoltage(300)
	v, i = benchIV(SingleDiode{1e-9, 1.5, 10, 1e5}, vt, -2, 0.6, 261, 0.01, 0, 0, 0, 4)
	if nf, ok := EstimateNoiseFloor(v, i, vt); !ok || nf.Floor {
		t.Errorf("clean leaky diode: %+v, %v; want no floor", nf, ok)
	}
	if _, ok := EstimateNoiseFloor(v[:5], i[:5], vt); ok {
		t.Error("5 points gave an estimate")
	}
}

// n < 1 is always flagged: a 250 K, n = 1.02 device fitted at 300 K gives
// n = 1.02 * 250/300 = 0.85 (the fit sees V/(n kT/q) only).
func TestFitIVWarnsIdealityBelowOne(t *testing.T) {
	d := SingleDiode{1e-14, 1.02, 1, math.Inf(1)}
	v, i := benchIV(d, physics.ThermalVoltage(250), 0.1, 0.7, 121, 0.01, 0, 0, 0, 2)
	f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
	if err != nil {
		t.Fatal(err)
	}
	if f.Single.IdealityFactor >= 1 || !hasNote(f.Notes, "below 1") {
		t.Errorf("n = %g, notes %q; want a caution", f.Single.IdealityFactor, f.Notes)
	}
}

// A forward-only sweep from 0 V (no reverse points) with a 1e-11 A floor:
// the noise-dominated low-bias points (some read negative) give the floor,
// and the diode (Is 1e-15 A, n 1.0, Rs 3 ohm, no shunt) is recovered with
// no shunt fitted to the noise. The estimate uses about 20 points here, so
// it is allowed 50 % (the MAD of ~15 fourth differences has a standard
// error near 25 %; a weighted fit only needs the floor to a factor of 2).
// Over 60 other seeds 1 fit kept a noise shunt (floor underestimated by
// half); with the floor stated, none.
func TestFitIVNoiseFloorForwardOnly(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	truth := SingleDiode{1e-15, 1.0, 3, math.Inf(1)}
	for seed := uint64(1); seed <= 4; seed++ {
		v, i := benchIV(truth, vt, 0, 0.8, 81, 0.01, 1e-11, 0, 0, seed+20)
		f, err := FitIV(v, i, IVOptions{TemperatureK: 300})
		if err != nil {
			t.Fatal(err)
		}
		if f.FloorSource != "estimated" || relErr(f.NoiseFloorA, 1e-11) > 0.5 {
			t.Errorf("seed %d: floor %g A (%q), want 1e-11", seed, f.NoiseFloorA, f.FloorSource)
		}
		checkRecovery(t, f.Single, truth, true)
		if !math.IsInf(f.Single.ShuntResistanceOhm, 1) {
			t.Errorf("seed %d: shunt %g ohm fitted to noise; notes %q", seed, f.Single.ShuntResistanceOhm, f.Notes)
		}
	}
}
