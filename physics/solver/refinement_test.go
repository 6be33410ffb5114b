package solver

import (
	"context"
	"math"
	"testing"
)

// meshRun is one solver's built-in potential, C-V points and bias sweep
// on one mesh, for the mesh-refinement checks.
type meshRun struct {
	vbi   float64
	cv    []CVPoint
	res   []*Result
	nodes int
}

// solveOnMesh solves d with options o: the C-V points at cvBiases and a
// sweep through biases (V).
func solveOnMesh(t *testing.T, d Device, o Options, cvBiases, biases []float64) meshRun {
	t.Helper()
	s := newSolver(t, d, o)
	vbi, err := s.BuiltInPotential()
	if err != nil {
		t.Fatal(err)
	}
	cv, err := s.CV(context.Background(), cvBiases, nil)
	if err != nil {
		t.Fatal(err)
	}
	res, err := s.Sweep(context.Background(), biases, nil)
	if err != nil {
		t.Fatal(err)
	}
	return meshRun{vbi: vbi, cv: cv, res: res, nodes: len(s.Nodes())}
}

// refinementOutputs returns every solver output the model reports:
// built-in potential; at a reverse bias the depletion width, both peak
// fields, the capacitance and the (generation) current; at zero bias the
// width and the capacitance; at a low forward bias the width, the
// injection ratio and the current.
func refinementOutputs(t *testing.T, d Device, o Options, vr, vf float64) map[string]float64 {
	t.Helper()
	m := solveOnMesh(t, d, o, []float64{vr, 0}, []float64{vr, 0, vf})
	cv, res := m.cv, m.res
	out := map[string]float64{"Vbi": m.vbi}
	out["C(reverse)"], out["C(0)"] = cv[0].Capacitance, cv[1].Capacitance
	out["W(reverse)"], out["W(0)"], out["W(forward)"] = res[0].Depletion.W, res[1].Depletion.W, res[2].Depletion.W
	out["Emax depletion(reverse)"], out["Emax total(reverse)"] = res[0].Depletion.Field, res[0].PeakField
	out["J(reverse)"], out["J(forward)"] = res[0].Current, res[2].Current
	out["injection(forward)"] = res[2].Depletion.MinorityRatio
	return out
}

// Mesh refinement of every solver output (a mesh-refined solution is the
// reference; common practice): on the automatic mesh and its exact
// doublings (2x and 4x cells, Bisect), the 2x and 4x values agree within
// 0.2 % (the generation current within 1 %, the injection ratio within 1
// %), and the automatic mesh is within 0.5 % of the 4x value (2 % for the
// generation current and the injection ratio), for a symmetric and a
// one-sided silicon junction and a 4H-SiC junction with carrier-dependent
// occupation.
func TestMeshRefinementEveryOutput(t *testing.T) {
	si := material(t, "si")
	cases := []struct {
		name   string
		dev    Device
		vr, vf float64
	}{
		{"Si 1e16/1e16", stepDiode(si, 300, 1e16*cm3, 1e16*cm3, 5*um, 5*um), -3, 0.5},
		{"Si p+n 1e19/1e15", stepDiode(si, 300, 1e19*cm3, 1e15*cm3, 3*um, 20*um), -3, 0.45},
		{"4H-SiC Al 1e17 / N 1e19 (occupation)", occupationDiode(t, "4h-sic", 300, 1e17*cm3, 1e19*cm3, 3*um, 2*um), -10, 2.4},
	}
	for _, c := range cases {
		x := newSolver(t, c.dev, Options{Mesh: MeshOptions{MaxReverseBias: -c.vr}}).Nodes()
		var runs []map[string]float64
		var nodes []int
		for k := 0; k < 3; k++ {
			runs = append(runs, refinementOutputs(t, c.dev, Options{Mesh: MeshOptions{Positions: x, MaxReverseBias: -c.vr}}, c.vr, c.vf))
			nodes = append(nodes, len(x))
			x = Bisect(x)
		}
		for key, fine := range runs[2] {
			tolFine, tolBase := 2e-3, 5e-3
			if key == "J(reverse)" || key == "injection(forward)" {
				tolFine, tolBase = 1e-2, 2e-2
			}
			mid, base := runs[1][key], runs[0][key]
			if math.IsNaN(fine) || math.IsNaN(mid) || math.IsNaN(base) {
				t.Errorf("%s: %s is NaN (%g, %g, %g)", c.name, key, base, mid, fine)
				continue
			}
			if e := relErr(mid, fine); e > tolFine {
				t.Errorf("%s: %s changes by %.3g %% from 2x to 4x cells (%d -> %d nodes): %.6g -> %.6g", c.name, key, 100*e, nodes[1], nodes[2], mid, fine)
			}
			if e := relErr(base, fine); e > tolBase {
				t.Errorf("%s: %s on the automatic mesh (%d nodes) differs by %.3g %% from 4x cells: %.6g vs %.6g", c.name, key, nodes[0], 100*e, base, fine)
			}
			t.Logf("%s: %-24s %.6g  %.6g  %.6g", c.name, key, base, mid, fine)
		}
	}
}

// meshObservables returns the quantities the mesh-convergence check
// compares: built-in potential, reverse-bias depletion width and
// capacitance, and forward currents at a low and a moderate bias.
func meshObservables(t *testing.T, d Device, o Options, vr, vf1, vf2 float64) map[string]float64 {
	t.Helper()
	m := solveOnMesh(t, d, o, []float64{vr}, []float64{vf1, vf2})
	return map[string]float64{"Vbi": m.vbi, "C(reverse)": m.cv[0].Capacitance, "W(reverse)": m.cv[0].Width,
		"J(low forward)": m.res[0].Current, "J(forward)": m.res[1].Current, "nodes": float64(m.nodes)}
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
