package solver

import (
	"context"
	"flag"
	"math"
	"sync"
	"testing"

	"junco/physics"
)

var heavy = flag.Bool("solver.heavy", false, "run the heavy solver cases (material and temperature matrix, large meshes)")

// Heavily doped silicon (1e20 cm^-3, beyond a tenth of Nv: flagged as
// degenerate, solved with Boltzmann statistics) and 4H-SiC (ni ~ 1e-8
// cm^-3 at 300 K) must converge over forward and reverse bias without
// underflow: the minority hole density of the SiC n region, ni^2/Nd ~
// 2e-26 m^-3 (mass action, Sze & Ng 2007 eq. 1.26), must be represented to
// 1e-9 relative at equilibrium.
func TestHeavyDopingAndWideGap(t *testing.T) {
	si, sic := material(t, "si"), material(t, "4h-sic")
	cases := []struct {
		name   string
		dev    Device
		biases []float64
	}{
		{"Si p+ 1e20 / n 1e16", stepDiode(si, 300, 1e20*cm3, 1e16*cm3, 2*um, 30*um), []float64{-50, 0.5, 0.9, 1.2}},
		{"Si n+ 1e20 / p 1e15 (anode right)", Device{Material: si, Temperature: 300, Length: 30 * um, Profile: Profile{
			Donors: []Shape{Uniform{Concentration: 1e20 * cm3, From: math.Inf(-1), To: 1 * um}}, Acceptors: []Shape{Uniform{Concentration: 1e15 * cm3, From: math.Inf(-1), To: math.Inf(1)}}}},
			[]float64{-20, 0.5, 1.0}},
		{"4H-SiC 1e19 / 1e16", stepDiode(sic, 300, 1e19*cm3, 1e16*cm3, 1*um, 20*um), []float64{-200, 2.6, 3.0, 3.5}},
	}
	for _, c := range cases {
		s := newSolver(t, c.dev, Options{})
		eq, err := s.Equilibrium()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		degenerate := false
		for _, f := range eq.Flags {
			degenerate = degenerate || f.Code == physics.FlagDegenerate
		}
		if c.dev.Material == si && !degenerate {
			t.Errorf("%s: 1e20 cm^-3 not flagged degenerate", c.name)
		}
		res, err := s.Sweep(context.Background(), c.biases, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		for _, r := range res {
			if math.IsNaN(r.Current) || math.IsInf(r.Current, 0) || !(r.CurrentSpread <= 1e-6) {
				t.Errorf("%s V = %g: J = %g, spread %g", c.name, r.Bias, r.Current, r.CurrentSpread)
			}
			for i := range r.N {
				if !(r.N[i] > 0) || !(r.P[i] > 0) {
					t.Fatalf("%s V = %g: non-positive density at node %d: n %g p %g", c.name, r.Bias, i, r.N[i], r.P[i])
				}
			}
		}
	}
	// SiC minority holes at equilibrium, deep in the n region.
	s := newSolver(t, stepDiode(sic, 300, 1e18*cm3, 1e16*cm3, 2*um, 20*um), Options{})
	eq, err := s.Equilibrium()
	if err != nil {
		t.Fatal(err)
	}
	ni := sic.Ni(300)
	k := len(eq.X) * 3 / 4
	want := ni * ni / (eq.N[k])
	if e := relErr(eq.P[k], want); e > 1e-9 || eq.P[k] > 1e-20 {
		t.Errorf("SiC minority holes %g m^-3, mass action %g (rel %.2g)", eq.P[k], want, e)
	}
	// And the built-in potential of the non-degenerate SiC step (Sze & Ng
	// 2007, eq. 2.8) within 1 mV.
	_, err = s.BuiltInPotential()
	if err != nil {
		t.Fatal(err)
	}
	if vbi, want := eq.Barrier, physics.BuiltInPotential(1e18*cm3, 1e16*cm3, ni, 300); math.Abs(vbi-want) > 1e-3 {
		t.Errorf("SiC Vbi %.5f V, analytic %.5f V", vbi, want)
	}
}

// Mirror symmetry: the same diode built with the anode on the right and the
// mirrored mesh must give the same terminal current (forward positive) and
// the mirrored profiles to rounding, since the discrete equations are the
// same up to ordering (a check of the orientation handling).
func TestMirroredDeviceAgrees(t *testing.T) {
	si := material(t, "si")
	a := stepDiode(si, 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	sa := newSolver(t, a, Options{})
	xa := sa.Nodes()
	L := a.Length
	xb := make([]float64, len(xa))
	for i, v := range xa {
		xb[len(xa)-1-i] = L - v
	}
	b := Device{Material: si, Temperature: 300, Length: L, Profile: Profile{
		Donors:    []Shape{Uniform{Concentration: 1e16 * cm3, From: math.Inf(-1), To: L - 5*um}},
		Acceptors: []Shape{Uniform{Concentration: 1e17 * cm3, From: L - 5*um, To: math.Inf(1)}},
	}}
	sb := newSolver(t, b, Options{Mesh: MeshOptions{Positions: xb}})
	biases := []float64{-2, 0.3, 0.6}
	ra, err := sa.Sweep(context.Background(), biases, nil)
	if err != nil {
		t.Fatal(err)
	}
	rb, err := sb.Sweep(context.Background(), biases, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range ra {
		if e := relErr(rb[i].Current, ra[i].Current); e > 1e-8 {
			t.Errorf("V = %g: J anode-left %.10g, anode-right %.10g", biases[i], ra[i].Current, rb[i].Current)
		}
		n := len(ra[i].N)
		for k := 0; k < n; k += 7 {
			if e := relErr(rb[i].N[n-1-k], ra[i].N[k]); e > 1e-7 {
				t.Fatalf("V = %g node %d: n differs by %.3g", biases[i], k, e)
			}
		}
		if e := relErr(rb[i].Depletion.W, ra[i].Depletion.W); e > 1e-9 {
			t.Errorf("V = %g: W %.6g vs %.6g", biases[i], ra[i].Depletion.W, rb[i].Depletion.W)
		}
	}
}

// The Gummel start only supplies the Newton iteration's starting point: with
// it disabled the converged answer must be the same.
func TestGummelStartDoesNotChangeAnswer(t *testing.T) {
	d := stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	s1 := newSolver(t, d, Options{})
	s2 := newSolver(t, d, Options{GummelIterations: -1})
	for _, v := range []float64{-3, 0.4, 0.7} {
		r1, err := s1.Solve(v)
		if err != nil {
			t.Fatal(err)
		}
		r2, err := s2.Solve(v)
		if err != nil {
			t.Fatal(err)
		}
		if e := relErr(r2.Current, r1.Current); e > 1e-9 {
			t.Errorf("V = %g: J with Gummel start %.12g, without %.12g", v, r1.Current, r2.Current)
		}
	}
}

// Heavy matrix of materials and temperatures (run with -solver.heavy).
func TestMaterialTemperatureMatrix(t *testing.T) {
	if !*heavy {
		t.Skip("heavy case: run with -solver.heavy")
	}
	for _, c := range []struct {
		mat    string
		temps  []float64
		na, nd float64
		fwd    []float64
	}{
		{"si", []float64{77, 200, 300, 450, 600}, 1e17 * cm3, 1e16 * cm3, []float64{0.4, 0.7, 1.0}},
		{"ge", []float64{77, 300, 400}, 1e17 * cm3, 1e16 * cm3, []float64{0.2, 0.4}},
		{"gaas", []float64{77, 300, 500}, 1e17 * cm3, 1e16 * cm3, []float64{1.0, 1.3}},
		{"4h-sic", []float64{150, 300, 700}, 1e18 * cm3, 1e16 * cm3, []float64{2.4, 2.9, 3.3}},
	} {
		m := material(t, c.mat)
		for _, temp := range c.temps {
			s := newSolver(t, stepDiode(m, temp, c.na, c.nd, 5*um, 20*um), Options{})
			biases := append([]float64{-20, -1}, c.fwd...)
			res, err := s.Sweep(context.Background(), biases, nil)
			if err != nil {
				t.Errorf("%s %g K: %v", c.mat, temp, err)
				continue
			}
			for _, r := range res {
				if !(r.CurrentSpread <= 1e-6) {
					t.Errorf("%s %g K V = %g: spread %g (J %g)", c.mat, temp, r.Bias, r.CurrentSpread, r.Current)
				}
			}
		}
	}
	// A large mesh.
	s := newSolver(t, stepDiode(material(t, "si"), 300, 1e18*cm3, 1e16*cm3, 20*um, 100*um), Options{Mesh: MeshOptions{Nodes: 20000}})
	if _, err := s.Solve(0.7); err != nil {
		t.Error(err)
	}
}

// A Solver may be shared between goroutines (the equilibrium is computed
// once; every solve has its own buffers): concurrent sweeps give identical
// results (run under -race in CI).
func TestConcurrentUse(t *testing.T) {
	s := newSolver(t, stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um), Options{})
	var wg sync.WaitGroup
	out := make([][]*Result, 3)
	errs := make([]error, 3)
	for g := range out {
		wg.Add(1)
		go func() {
			defer wg.Done()
			out[g], errs[g] = s.Sweep(context.Background(), []float64{-1, 0.3, 0.5}, nil)
		}()
	}
	wg.Wait()
	for g := range out {
		if errs[g] != nil {
			t.Fatal(errs[g])
		}
		for i := range out[g] {
			if out[g][i].Current != out[0][i].Current {
				t.Errorf("goroutine %d point %d: %g vs %g", g, i, out[g][i].Current, out[0][i].Current)
			}
		}
	}
}
