package fit

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"junco/model"
	"junco/model/measure"
)

// noisyIV generates forward I-V data of spec with junco's own model
// (IVCurve, total current) and the demo noise (1 % multiplicative, 10 pA
// floor) from a fixed seed: the synthetic measurement of a round trip.
func noisyIV(t *testing.T, spec model.Spec, seed uint64) *measure.DataSet {
	t.Helper()
	c, err := model.IVCurve(spec, model.DemoIVRange())
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(seed, 1))
	cur := make([]float64, len(c.Xs))
	for k, i := range c.Series[0].Y {
		cur[k] = i*(1+model.DemoCurrentNoise*rng.NormFloat64()) + model.DemoCurrentFloorA*rng.NormFloat64()
	}
	return &measure.DataSet{Kind: measure.KindIV, SourceFile: "round-trip synthetic data", VoltageV: c.Xs, CurrentA: cur,
		StatedTemperatureK: spec.Temperature}
}

// Round trip: data made by the model with a known hole lifetime, compared
// with a spec whose lifetime is 10x wrong either way; the reconciling
// lifetime must come back to the known one within 10 %.
func TestCompareIVRecoversLifetime(t *testing.T) {
	const trueTau = 2e-6 // s, the lifetime the data are generated with
	truth := model.DemoJunction().Spec
	truth.HoleLifetime = trueTau
	ds := noisyIV(t, truth, 7)
	for _, wrong := range []float64{trueTau * 10, trueTau / 10} {
		s := truth
		s.HoleLifetime = wrong
		// The window reaches down to 0.3 V so that the double-diode fit
		// sees the recombination part it separates from the n = 1 part
		// (from 0.4 V the depletion-region current, taken with the n side's
		// local lifetimes, is too small for that fit to converge).
		c, err := CompareIV(s, ds, 0.3, 0.6)
		if err != nil {
			t.Fatalf("tau = %g s: %v", wrong, err)
		}
		if got := c.ReconcilingLifetimeS / trueTau; math.Abs(got-1) > 0.10 {
			t.Errorf("spec tau %g s: reconciling lifetime %g s, want %g s within 10 %% (ratio %.3f)", wrong, c.ReconcilingLifetimeS, trueTau, got)
		}
		if c.LifetimeField != model.FieldHoleLifetime {
			t.Errorf("lifetime varied %q, want %q (n is the lightly doped side of the demo)", c.LifetimeField, model.FieldHoleLifetime)
		}
		// The diffusion length must be the model's own sqrt(D tau) at the
		// reconciling lifetime.
		back := truth
		back.HoleLifetime = c.ReconcilingLifetimeS
		r, err := model.Evaluate(back)
		if err != nil {
			t.Fatal(err)
		}
		if d := c.ReconcilingDiffusionLengthM / r.Static.LP; math.Abs(d-1) > 1e-9 {
			t.Errorf("diffusion length %g m, model's Lp at that lifetime %g m", c.ReconcilingDiffusionLengthM, r.Static.LP)
		}
		// A 10x wrong lifetime must show as a discrepancy well above the
		// 1 % noise; the right one would not.
		if c.RMSLogRatio < 0.1 {
			t.Errorf("spec tau %g s: RMS log ratio %.3f, want a clear discrepancy (> 0.1) for a 10x wrong lifetime", wrong, c.RMSLogRatio)
		}
		if len(c.Assumptions) < 5 {
			t.Errorf("assumptions %q: want geometry, diffusion, contacts, temperature, other side", c.Assumptions)
		}
		t.Logf("spec tau %g s: RMS ln ratio %.3f, Is %.4g A (model %.4g A), tau %.4g s, L %.4g m, %d evaluations",
			wrong, c.RMSLogRatio, c.MeasuredIsA, c.ModelIsA, c.ReconcilingLifetimeS, c.ReconcilingDiffusionLengthM, c.Evaluations)
	}
	c, err := CompareIV(truth, ds, 0.4, 0.6)
	if err != nil {
		t.Fatal(err)
	}
	// With the true spec the discrepancy is the noise: 1 % (plus the floor,
	// negligible above 0.4 V) gives an RMS ln ratio near 0.01.
	if c.RMSLogRatio > 0.02 {
		t.Errorf("true spec: RMS log ratio %.4f, want about the 1 %% noise (< 0.02)", c.RMSLogRatio)
	}
}

// Data dominated by depletion-region recombination (1 ns lifetimes of both
// carriers make the SRH current dominate at low bias, n near 2) must give
// an error, not a lifetime. Both: the depletion region lies in the n side,
// where it recombines with that side's electron and hole lifetimes.
func TestCompareIVRecombinationDominated(t *testing.T) {
	s := model.DemoJunction().Spec
	s.HoleLifetime = 1e-9
	s.ElectronLifetime = 1e-9
	ds := noisyIV(t, s, 3)
	c, err := CompareIV(s, ds, 0.15, 0.4)
	if err == nil {
		t.Fatalf("want an error for recombination-dominated data, got lifetime %g s", c.ReconcilingLifetimeS)
	}
	if !strings.Contains(err.Error(), "ideality") || !strings.Contains(err.Error(), "recombination") {
		t.Errorf("error %q should name the ideality factor and recombination", err)
	}
	if c == nil || !(c.Fit.Single.IdealityFactor > ReconcileMaxIdeality) {
		t.Errorf("the comparison should carry the fit with n > %.1f", ReconcileMaxIdeality)
	}
}

// A measured Is far above anything the junction can give by diffusion
// (the data scaled by 1e6: the 1 ps end of the lifetime range cannot reach
// it) must name the limit.
func TestCompareIVUnreachable(t *testing.T) {
	s := model.DemoJunction().Spec
	s.Effects = model.IdealEffects()
	ds := noisyIV(t, s, 5)
	big := *ds
	big.CurrentA = make([]float64, len(ds.CurrentA))
	for k, i := range ds.CurrentA {
		big.CurrentA[k] = i * 1e6
	}
	if _, err := CompareIV(s, &big, 0.3, 0.6); err == nil || !strings.Contains(err.Error(), "1 ps") {
		t.Errorf("got %v, want an error naming the 1 ps limit", err)
	}
	small := *ds
	small.CurrentA = make([]float64, len(ds.CurrentA))
	for k, i := range ds.CurrentA {
		small.CurrentA[k] = i * 1e-4
	}
	if _, err := CompareIV(s, &small, 0.3, 0.6); err == nil || !strings.Contains(err.Error(), "1 s") {
		t.Errorf("got %v, want an error naming the 1 s limit", err)
	}
}

func TestCompareIVInputErrors(t *testing.T) {
	s := model.DemoJunction().Spec
	if _, err := CompareIV(s, nil, 0, 0); err == nil {
		t.Error("nil data set: want an error")
	}
	cv := &measure.DataSet{Kind: measure.KindCV, VoltageV: []float64{-1, 0}, CapacitanceF: []float64{1e-12, 2e-12}}
	if _, err := CompareIV(s, cv, 0, 0); err == nil || !strings.Contains(err.Error(), "I-V") {
		t.Errorf("C-V data set: got %v, want an error asking for I-V data", err)
	}
	ds := noisyIV(t, s, 1)
	if _, err := CompareIV(s, ds, 0.6, 0.4); err == nil || !strings.Contains(err.Error(), "window") {
		t.Errorf("reversed window: got %v, want a window error", err)
	}
	bad := s
	bad.Area = -1
	if _, err := CompareIV(bad, ds, 0.4, 0.6); err == nil || !strings.Contains(err.Error(), model.FieldArea) {
		t.Errorf("bad spec: got %v, want the area field named", err)
	}
}
