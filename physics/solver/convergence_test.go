package solver

import (
	"context"
	"math"
	"testing"
)

// meshObservables returns the quantities the mesh-convergence check
// compares: built-in potential, reverse-bias depletion width and
// capacitance, and forward currents at a low and a moderate bias.
func meshObservables(t *testing.T, d Device, o Options, vr, vf1, vf2 float64) map[string]float64 {
	t.Helper()
	s := newSolver(t, d, o)
	out := map[string]float64{}
	vbi, err := s.BuiltInPotential()
	if err != nil {
		t.Fatal(err)
	}
	out["Vbi"] = vbi
	cv, err := s.CV(context.Background(), []float64{vr}, nil)
	if err != nil {
		t.Fatal(err)
	}
	out["C(reverse)"] = cv[0].Capacitance
	out["W(reverse)"] = cv[0].Width
	res, err := s.Sweep(context.Background(), []float64{vf1, vf2}, nil)
	if err != nil {
		t.Fatal(err)
	}
	out["J(low forward)"] = res[0].Current
	out["J(forward)"] = res[1].Current
	out["nodes"] = float64(len(s.Nodes()))
	return out
}

// Mesh convergence (common practice): bisecting every interval of the
// automatic mesh changes the built-in potential, the reverse-bias
// depletion width and capacitance and the forward currents by less than
// 0.1 %.
func TestMeshConvergence(t *testing.T) {
	si := material(t, "si")
	cases := []struct {
		name         string
		dev          Device
		vr, vf1, vf2 float64
	}{
		{"Si step 1e16/1e15", stepDiode(si, 300, 1e16*cm3, 1e15*cm3, 10*um, 20*um), -2, 0.3, 0.6},
		{"Si p+n long base", stepDiode(si, 300, 1e18*cm3, 1e16*cm3, 100*um, 500*um), -2, 0.3, 0.55},
		{"Si implant", Device{Material: si, Temperature: 300, Length: 20 * um, Profile: Profile{
			Acceptors: []Shape{Gaussian{Dose: 1e15 / 1e-4, Range: 0.1 * um, Straggle: 0.04 * um}},
			Donors:    []Shape{Uniform{Concentration: 1e15 * cm3, From: 0, To: math.Inf(1)}, Mirrored{Shape: Erfc{Surface: 1e20 * cm3, Length: 0.3 * um}, Surface: 20 * um}},
		}}, -2, 0.3, 0.6},
	}
	for _, c := range cases {
		base := meshObservables(t, c.dev, Options{}, c.vr, c.vf1, c.vf2)
		s := newSolver(t, c.dev, Options{})
		fine := meshObservables(t, c.dev, Options{Mesh: MeshOptions{Positions: Bisect(s.Nodes())}}, c.vr, c.vf1, c.vf2)
		for k, v := range base {
			if k == "nodes" {
				continue
			}
			e := relErr(v, fine[k])
			if e > 1e-3 {
				t.Errorf("%s: %s changes by %.3g %% when the mesh is doubled (%d -> %d nodes): %.6g -> %.6g",
					c.name, k, 100*e, int(base["nodes"]), int(fine["nodes"]), v, fine[k])
			}
			t.Logf("%s: %-15s %.6g -> %.6g (%.2e)", c.name, k, v, fine[k], e)
		}
	}
}
