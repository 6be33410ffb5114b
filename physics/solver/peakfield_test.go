package solver

import (
	"math"
	"testing"

	"junco/physics"
)

// Peak field of asymmetric abrupt junctions under mesh refinement (the
// automatic mesh and its exact doublings, 2x and 4x cells).
//
//   - Depletion.Field, the field of the depletion charge, agrees with
//     Gauss's law for the depletion approximation with the majority-tail
//     correction, E = sqrt(2 q (Vbi - V - 2kT/q) Na Nd / (eps (Na + Nd)))
//     = q Nd xn / eps (Sze & Ng 2007, section 2.2), within 0.5 % on every
//     mesh.
//   - Result.PeakField, the largest field of the solution, is within 1 %
//     on the automatic mesh and converges (2x and 4x agree within 0.5 %)
//     to the Poisson-Boltzmann value of an
//     ideally abrupt step, whose heavy side's majority carriers spill over
//     the junction and form a dipole within its Debye length: first
//     integral on the heavy side E^2 = 2 q Na (kT/q)(e^-u - 1 + u)/eps at
//     the junction potential u = 1 + (Nd/Na)(w - 1) (kT/q units, w the
//     light side's share of the barrier); own derivation from the
//     Boltzmann densities and charge continuity at the junction. The
//     former report of a diverging peak field (1.77e7 to 2.02e7 V/m, Si
//     1e19/1e16 at -5 V) compared this converged value with the
//     depletion-charge field of 1.35e7 V/m.
func TestPeakFieldMeshRefinement(t *testing.T) {
	m := material(t, "si")
	const v = -5.0
	for _, na := range []float64{1e19 * cm3, 1e20 * cm3} {
		nd := 1e16 * cm3
		d := stepDiode(m, 300, na, nd, 2*um, 5*um)
		x := newSolver(t, d, Options{}).Nodes()
		var peaks []float64
		for k := 0; k < 3; k++ {
			s := newSolver(t, d, Options{Mesh: MeshOptions{Positions: x}})
			vbi, err := s.BuiltInPotential()
			if err != nil {
				t.Fatal(err)
			}
			r, err := s.Solve(v)
			if err != nil {
				t.Fatal(err)
			}
			vt := s.vt
			gauss := math.Sqrt(2 * physics.Q * (vbi - v - 2*vt) * na * nd / (s.eps * (na + nd)))
			if e := relErr(r.Depletion.Field, gauss); e > 0.005 {
				t.Errorf("Na %g, %d nodes: depletion field %.4g V/m, Gauss's law %.4g (%.2f %%)", na/cm3, len(x), r.Depletion.Field, gauss, 100*e)
			}
			// Poisson-Boltzmann junction field of the ideal step.
			utot := (vbi - v) / vt
			uj := 1.0
			for it := 0; it < 50; it++ {
				uj = 1 + nd/na*(utot-uj-1)
			}
			pb := math.Sqrt(2 * physics.Q * na * vt * (math.Exp(-uj) - 1 + uj) / s.eps)
			peaks = append(peaks, r.PeakField)
			t.Logf("Na %g cm^-3, %d nodes: peak %.4g V/m (Poisson-Boltzmann step %.4g), depletion field %.4g (Gauss %.4g)",
				na/cm3, len(x), r.PeakField, pb, r.Depletion.Field, gauss)
			if k == 0 {
				// The automatic mesh resolves the heavy side's Debye
				// length at the step and centres the step in a cell.
				if e := relErr(r.PeakField, pb); e > 0.01 {
					t.Errorf("Na %g: peak field %.4g on the automatic mesh (%d nodes), Poisson-Boltzmann step value %.4g (%.2f %%)", na/cm3, r.PeakField, len(x), pb, 100*e)
				}
			}
			if k == 2 {
				if e := relErr(peaks[2], peaks[1]); e > 0.005 {
					t.Errorf("Na %g: peak field changes by %.2f %% from 2x to 4x cells", na/cm3, 100*e)
				}
				if e := relErr(peaks[2], pb); e > 0.01 {
					t.Errorf("Na %g: peak field %.4g, Poisson-Boltzmann step value %.4g (%.2f %%)", na/cm3, peaks[2], pb, 100*e)
				}
			}
			x = Bisect(x)
		}
	}
}
