package solver

import (
	"math"
	"testing"

	"junco/physics"
)

// The automatic mesh spans the device, increases strictly, grows by at most
// ~15 % per cell plus rounding (the grading limit, common practice), and
// resolves the zero-bias depletion region: cells there are below a
// quarter of the local Debye length sqrt(eps kT/(q^2 N)) (Sze & Ng 2007,
// eq. 2.27) and below a fiftieth of the depletion width (the refinement
// rules of New).
func TestAutoMeshProperties(t *testing.T) {
	si := material(t, "si")
	na, nd, lp, ln := 1e16*cm3, 1e15*cm3, 10*um, 20*um
	s := newSolver(t, stepDiode(si, 300, na, nd, lp, ln), Options{})
	x := s.Nodes()
	if x[0] != 0 || x[len(x)-1] != lp+ln {
		t.Fatalf("mesh spans [%g, %g], want [0, %g]", x[0], x[len(x)-1], lp+ln)
	}
	worst := 0.0
	for i := 1; i < len(x); i++ {
		if !(x[i] > x[i-1]) {
			t.Fatalf("node %d not increasing", i)
		}
		if i > 1 {
			r := (x[i] - x[i-1]) / (x[i-1] - x[i-2])
			worst = math.Max(worst, math.Max(r, 1/r))
		}
	}
	if worst > 1.2 {
		t.Errorf("neighbouring cells differ by a factor %.3f, limit ~1.15", worst)
	}
	vbi, _ := s.BuiltInPotential()
	dep := physics.AbruptDepletion(si.Permittivity(), na, nd, vbi, 0)
	for _, side := range []struct{ lo, hi, n float64 }{{lp - dep.Xp, lp, na}, {lp, lp + dep.Xn, nd}} {
		ld := math.Sqrt(si.Permittivity() * physics.ThermalVoltage(300) / (physics.Q * side.n))
		limit := 1.05 * math.Min(0.25*ld, dep.W/50)
		for i := 1; i < len(x); i++ {
			if x[i-1] >= side.lo && x[i] <= side.hi && x[i]-x[i-1] > limit {
				t.Errorf("cell at %.4g um is %.3g nm, over %.3g nm: depletion region not refined", x[i]/um, (x[i]-x[i-1])*1e9, limit*1e9)
				break
			}
		}
	}
	if j := s.Junctions(); len(j) != 1 || math.Abs(j[0]-lp) > 1e-12 {
		t.Errorf("junctions %v, want [%g]", j, lp)
	}
}

// Nodes fixes the count, Density scales it, Bisect doubles it exactly.
func TestMeshOverrides(t *testing.T) {
	d := stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	s := newSolver(t, d, Options{Mesh: MeshOptions{Nodes: 777}})
	if n := len(s.Nodes()); n != 777 {
		t.Errorf("Nodes: 777 gave %d nodes", n)
	}
	n1 := len(newSolver(t, d, Options{}).Nodes())
	n2 := len(newSolver(t, d, Options{Mesh: MeshOptions{Density: 2}}).Nodes())
	if math.Abs(float64(n2)/float64(n1)-2) > 0.05 {
		t.Errorf("Density 2: %d -> %d nodes", n1, n2)
	}
	x := []float64{0, 1, 3}
	b := Bisect(x)
	if len(b) != 5 || b[1] != 0.5 || b[3] != 2 || b[4] != 3 {
		t.Errorf("Bisect(%v) = %v", x, b)
	}
	capped := newSolver(t, d, Options{Mesh: MeshOptions{MaxNodes: 40}})
	found := false
	for _, f := range capped.Flags() {
		found = found || f.Code == FlagMeshCapped
	}
	if len(capped.Nodes()) != 40 || !found {
		t.Errorf("MaxNodes 40: %d nodes, capped flag %v", len(capped.Nodes()), found)
	}
}

// The depletion estimate used for the refined zone reproduces the abrupt
// depletion approximation (Sze & Ng 2007, section 2.2.1) for a step profile.
func TestDepletionEstimate(t *testing.T) {
	si := material(t, "si")
	na, nd := 1e17*cm3, 1e15*cm3
	p := StepProfile(na, nd, 5*um)
	vt := physics.ThermalVoltage(300)
	e := &meshEnv{length: 50 * um, prof: p, eps: si.Permittivity(), vt: vt, ni: si.Ni(300), temp: 300}
	dl, dr := e.estimateDepletion(5*um, 0, 50*um, 10)
	vbi := physics.BuiltInPotential(na, nd, si.Ni(300), 300)
	want := physics.AbruptDepletion(si.Permittivity(), na, nd, vbi, -10)
	if relErr(dl, want.Xp) > 1e-3 || relErr(dr, want.Xn) > 1e-3 {
		t.Errorf("estimate xp %.5g xn %.5g, depletion approximation %.5g %.5g", dl, dr, want.Xp, want.Xn)
	}
}
