package model

import (
	"context"
	"math"
	"testing"
)

// meshCase is one junction of the default-mesh convergence check.
type meshCase struct {
	name string
	spec Spec
	num  NumericSpec
}

// meshConvergenceCases returns the junctions the default mesh must
// resolve: the one-sided Si 1e19/1e16 step at -5 V (whose total peak field
// holds the heavy side's majority-carrier dipole within its Debye
// length), a symmetric 1e17/1e17 step, a 1e20/1e15 step, a linearly
// graded junction and a Gaussian implant into an n-type base, with the
// Spec's default effects (incomplete ionisation, band-gap narrowing).
func meshConvergenceCases() []meshCase {
	step := func(na, nd, v float64) Spec {
		s := DefaultSpec()
		s.AcceptorDensity, s.DonorDensity, s.Bias = na*perCm3, nd*perCm3, v
		return s
	}
	graded := DefaultSpec()
	graded.Profile, graded.Gradient, graded.Bias = "linear", 1e20*1e8, -3
	implant := DefaultSpec()
	implant.DonorDensity, implant.Bias = 1e16*perCm3, -2
	return []meshCase{
		{"Si 1e19/1e16 step, -5 V", step(1e19, 1e16, -5), NumericSpec{}},
		{"Si 1e17/1e17 step, -2 V", step(1e17, 1e17, -2), NumericSpec{}},
		{"Si 1e20/1e15 step, -5 V", step(1e20, 1e15, -5), NumericSpec{}},
		{"Si linearly graded 1e20 cm^-4, -3 V", graded, NumericSpec{}},
		{"Si acceptor implant 1e14 cm^-2 at 0.1 um (0.03 um) into 1e16 donors, -2 V", implant,
			NumericSpec{Base: BaseDonor, Shapes: []DopingShape{{Kind: ShapeGaussian, Species: SpeciesAcceptor,
				Dose: 1e14 * 1e4, Range: 0.1e-6, Straggle: 0.03e-6}}}},
	}
}

// The default mesh is converged for every reported quantity (the
// mesh-refined solution is the reference; common practice): the largest
// field (which includes the heavy side's majority-carrier dipole at an
// abrupt step), the field of the depletion charge, the depletion width,
// the capacitance and the current at the default node count agree within
// 0.5 % with a 16,000-node solution of the same device (the depletion
// field against Gauss's law: physics/solver TestPeakFieldMeshRefinement).
// Measured: at most 0.1 % (logged with -v); 0.5 % leaves room for
// rounding on other platforms and is tighter than the 2 % asked for.
// Before the mesh resolved the heavy side's Debye length at the step and
// centred the step in a cell, the 1e19/1e16 step gave a largest field of
// 2.02e7 V/m on the default mesh (350 nodes) against 1.66e7 V/m on 16,000
// nodes (22 % apart).
func TestDefaultMeshConverged(t *testing.T) {
	if testing.Short() || raceDetector {
		// About 8 s alone, 40 s under the race detector: the numbers are
		// the same, and the solver's concurrency is exercised elsewhere.
		t.Skip("16,000-node reference solutions (-short or -race)")
	}
	const tol = 0.005
	for _, c := range meshConvergenceCases() {
		def, err := Solve(context.Background(), c.spec, c.num, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		fine := c.num
		fine.Nodes = 16000
		ref, err := Solve(context.Background(), c.spec, fine, nil)
		if err != nil {
			t.Fatalf("%s, 16,000 nodes: %v", c.name, err)
		}
		dq, rq := quantityMap(NumericQuantities(def)), quantityMap(NumericQuantities(ref))
		for _, k := range []string{"peak_field_total_V_per_m", "peak_field_V_per_m", "depletion_width_m", "junction_capacitance_F", "current_A"} {
			d, r := dq[k], rq[k]
			e := math.Abs(d/r - 1)
			t.Logf("%s: %s %.5g on %d nodes, %.5g on 16,000 (%.3f %%)", c.name, k, d, def.Nodes(), r, 100*e)
			if !(e <= tol) {
				t.Errorf("%s: %s %.5g on the default mesh (%d nodes), %.5g on 16,000 nodes: %.2f %% apart, over %.1f %%",
					c.name, k, d, def.Nodes(), r, 100*e, 100*tol)
			}
		}
	}
}

func quantityMap(qs []Quantity) map[string]float64 {
	m := make(map[string]float64, len(qs))
	for _, q := range qs {
		m[q.Key] = q.Value
	}
	return m
}
