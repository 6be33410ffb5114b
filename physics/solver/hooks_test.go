package solver

import (
	"context"
	"math"
	"testing"

	"junco/physics"
)

// The effective-ni hook: a uniform n_ie = 2 ni is the same device as a
// material with ni doubled, so Vbi drops by exactly 2 (kT/q) ln 2 (from
// Vbi = (kT/q) ln(Na Nd / n_ie^2), Sze & Ng 2007 eq. 2.8) and the
// low-injection diffusion current, proportional to n_ie^2 (Shockley 1949),
// grows fourfold (within 1 %, the depletion-region share changes as n_ie).
func TestIntrinsicDensityHook(t *testing.T) {
	m := material(t, "si")
	d := stepDiode(m, 300, 1e18*cm3, 1e16*cm3, 100*um, 10*um)
	plain := newSolver(t, d, Options{})
	d2 := d
	d2.IntrinsicDensity = func(x, nd, na float64) float64 { return 2 * m.Ni(300) }
	hooked := newSolver(t, d2, Options{Mesh: MeshOptions{Positions: plain.Nodes()}})
	v1, _ := plain.BuiltInPotential()
	v2, _ := hooked.BuiltInPotential()
	if want := 2 * plain.ThermalVoltage() * math.Ln2; math.Abs((v1-v2)-want) > 1e-9 {
		t.Errorf("Vbi drop %.9f V, want 2 kT/q ln 2 = %.9f V", v1-v2, want)
	}
	r1, err := plain.Solve(0.55)
	if err != nil {
		t.Fatal(err)
	}
	r2, err := hooked.Solve(0.55)
	if err != nil {
		t.Fatal(err)
	}
	ratio := r2.Current / r1.Current
	if math.Abs(ratio-4) > 0.04 {
		t.Errorf("current ratio %.4f, want 4 (J ~ n_ie^2)", ratio)
	}
	t.Logf("uniform n_ie = 2 ni: Vbi drop %.6f V, current ratio %.4f", v1-v2, ratio)
}

// A narrowing confined to the heavily doped side raises the electron
// injection into it: with n_ie multiplied by 3 in the p+ region only, the
// electron part of the saturation current grows ninefold (Jn0 ~ n_ie^2/Na,
// Sze & Ng 2007 eq. 2.64) while the hole part is unchanged; the solver's
// current must rise by the analytic amount (physics.Static parts) within
// 3 %. Equilibrium must stay current-free: the narrowing enters the
// fluxes as band potentials, not as a driving force.
func TestBandGapNarrowingHookOneSided(t *testing.T) {
	m := material(t, "si")
	na, nd, lp, ln := 1e18*cm3, 1e17*cm3, 100*um, 10*um
	d := stepDiode(m, 300, na, nd, lp, ln)
	plain := newSolver(t, d, Options{})
	d2 := d
	d2.IntrinsicDensity = func(x, nd, na float64) float64 {
		if na > nd {
			return 3 * m.Ni(300)
		}
		return m.Ni(300)
	}
	hooked := newSolver(t, d2, Options{Mesh: MeshOptions{Positions: plain.Nodes()}})
	eq, err := hooked.Equilibrium()
	if err != nil {
		t.Fatal(err)
	}
	for k := range eq.Jn {
		if eq.Jn[k] != 0 || eq.Jp[k] != 0 {
			t.Fatalf("equilibrium current on edge %d: %g %g", k, eq.Jn[k], eq.Jp[k])
		}
	}
	res1, err := plain.Sweep(context.Background(), []float64{0.6}, nil)
	if err != nil {
		t.Fatal(err)
	}
	res2, err := hooked.Sweep(context.Background(), []float64{0.6}, nil)
	if err != nil {
		t.Fatal(err)
	}
	st, _ := analyticStatic(t, m, 300, na, nd, lp, ln, 0.6)
	want := (9*st.JsN + st.JsP) / (st.JsN + st.JsP)
	got := res2[0].Current / res1[0].Current
	if relErr(got, want) > 0.03 {
		t.Errorf("current ratio with one-sided narrowing %.4f, analytic %.4f", got, want)
	}
	t.Logf("one-sided narrowing: current ratio %.4f, analytic %.4f", got, want)
}

// The ionisation hook: acceptors half ionised is the same junction as Na/2
// fully ionised, so Vbi = (kT/q) ln(Na Nd / (2 ni^2)) (Sze & Ng 2007 eq.
// 2.8) within 1 mV.
func TestIonisationHook(t *testing.T) {
	m := material(t, "si")
	na, nd := 1e17*cm3, 1e16*cm3
	d := stepDiode(m, 300, na, nd, 5*um, 10*um)
	d.Ionisation = func(x, nd, na float64) (float64, float64) { return nd, na / 2 }
	s := newSolver(t, d, Options{})
	vbi, err := s.BuiltInPotential()
	if err != nil {
		t.Fatal(err)
	}
	if want := physics.BuiltInPotential(na/2, nd, m.Ni(300), 300); math.Abs(vbi-want) > 1e-3 {
		t.Errorf("Vbi %.5f V, want %.5f V", vbi, want)
	}
}
