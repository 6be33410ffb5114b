package solver

import (
	"context"
	"math"
	"testing"

	"junco/physics"
)

// Current conservation: in steady state dJ/dx = 0, so Jn + Jp, computed
// here from the returned Scharfetter-Gummel edge currents, must be the same
// on every edge to 1e-6 relative at every converged bias, forward and
// reverse, from picoamperes to kiloamperes per cm^2 (the discrete
// equations conserve it exactly; the check measures the solver's
// convergence and the precision of the flux evaluation).
func TestCurrentConservation(t *testing.T) {
	cases := []struct {
		name   string
		dev    Device
		biases []float64
	}{
		{"Si 1e16/1e15", stepDiode(material(t, "si"), 300, 1e16*cm3, 1e15*cm3, 10*um, 20*um),
			[]float64{-5, -1, -0.2, 0.1, 0.3, 0.5, 0.7, 0.9}},
		{"Si 1e20/1e16", stepDiode(material(t, "si"), 300, 1e20*cm3, 1e16*cm3, 2*um, 30*um),
			[]float64{-10, 0.5, 0.9, 1.1}},
		{"4H-SiC 1e19/1e16", stepDiode(material(t, "4h-sic"), 300, 1e19*cm3, 1e16*cm3, 1*um, 20*um),
			[]float64{-100, -10, 2, 2.6, 3, 3.3}},
	}
	for _, c := range cases {
		s := newSolver(t, c.dev, Options{})
		res, err := s.Sweep(context.Background(), c.biases, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		for _, r := range res {
			mean := 0.0
			for k := range r.Jn {
				mean += r.Jn[k] + r.Jp[k]
			}
			mean /= float64(len(r.Jn))
			worst := 0.0
			for k := range r.Jn {
				worst = math.Max(worst, math.Abs(r.Jn[k]+r.Jp[k]-mean)/math.Abs(mean))
			}
			if !(worst <= 1e-6) || !(r.CurrentSpread <= 1e-6) {
				t.Errorf("%s V = %g: Jn + Jp varies by %.3g relative along the device (J = %.4g A/m^2)", c.name, r.Bias, worst, r.Current)
			}
			if (r.Bias > 0) != (r.Current > 0) {
				t.Errorf("%s V = %g: current %g has the wrong sign (forward positive)", c.name, r.Bias, r.Current)
			}
			t.Logf("%s V = %6.1f: J = %11.4e A/m^2, spread %.1e", c.name, r.Bias, r.Current, worst)
		}
	}
}

// Charge neutrality deep in the neutral regions (common practice: the
// space charge decays within a few Debye lengths of the depletion edges):
// |p - n + N| / |N| <= 1e-6 in the middle of each region, at equilibrium
// and in forward low injection.
func TestNeutralityDeepInRegions(t *testing.T) {
	m := material(t, "si")
	na, nd, lp, ln := 1e16*cm3, 1e15*cm3, 10*um, 20*um
	s := newSolver(t, stepDiode(m, 300, na, nd, lp, ln), Options{})
	res, err := s.Sweep(context.Background(), []float64{0, 0.4}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res {
		for _, x := range []float64{lp / 2, lp + ln/2} {
			k := 0
			for i, v := range r.X {
				if math.Abs(v-x) < math.Abs(r.X[k]-x) {
					k = i
				}
			}
			imb := math.Abs(r.Charge[k]/physics.Q) / math.Abs(r.NetDoping[k])
			if imb > 1e-6 {
				t.Errorf("V = %g, x = %.3g um: |rho/q| / |N| = %.3g", r.Bias, r.X[k]/um, imb)
			}
		}
	}
}

// The outputs must be mutually consistent with Boltzmann statistics at any
// bias: n = Nc exp((Efn - Ec)/kT), p = Nv exp((Ev - Efp)/kT) and
// Ec - Ev = kT ln(Nc Nv / ni^2) (Sze & Ng 2007, eqs. 1.16-1.22); at
// equilibrium both quasi-Fermi levels are the flat Fermi level 0 eV and no
// current flows.
func TestResultConsistency(t *testing.T) {
	m := material(t, "si")
	s := newSolver(t, stepDiode(m, 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um), Options{})
	res, err := s.Sweep(context.Background(), []float64{0, 0.6, -2}, nil)
	if err != nil {
		t.Fatal(err)
	}
	vt := s.ThermalVoltage()
	nc, nv, ni := m.Nc(300), m.Nv(300), m.Ni(300)
	for _, r := range res {
		for i := range r.X {
			if e := relErr(nc*math.Exp((r.Efn[i]-r.Ec[i])/vt), r.N[i]); e > 1e-9 {
				t.Fatalf("V = %g node %d: n from Ec, Efn off by %.3g", r.Bias, i, e)
			}
			if e := relErr(nv*math.Exp((r.Ev[i]-r.Efp[i])/vt), r.P[i]); e > 1e-9 {
				t.Fatalf("V = %g node %d: p from Ev, Efp off by %.3g", r.Bias, i, e)
			}
			if g := r.Ec[i] - r.Ev[i]; math.Abs(g-vt*math.Log(nc*nv/(ni*ni))) > 1e-12 {
				t.Fatalf("V = %g node %d: Ec - Ev = %g eV", r.Bias, i, g)
			}
		}
		if r.Bias == 0 {
			for i := range r.X {
				if r.Efn[i] != 0 || r.Efp[i] != 0 {
					t.Fatalf("equilibrium quasi-Fermi levels not flat at node %d: %g %g", i, r.Efn[i], r.Efp[i])
				}
			}
			if r.Current != 0 {
				t.Errorf("equilibrium current %g, want 0", r.Current)
			}
		}
		// Quasi-Fermi split at the contacts equals the bias.
		if d := r.Efn[len(r.X)-1] - r.Efp[0]; math.Abs(d-r.Bias) > 1e-12 {
			t.Errorf("V = %g: Fermi level difference between contacts %g eV", r.Bias, d)
		}
	}
}

// A C-V point's charge, width and current are those of the full solution
// at the same bias (they are the means of two solutions dV/2 away, so they
// agree to O(dV^2): 1e-4 relative for dV = 5 mV; the width to 2e-4
// because it is interpolated between nodes).
func TestCVPointMatchesSolve(t *testing.T) {
	s := newSolver(t, stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um), Options{})
	cv, err := s.CV(context.Background(), []float64{-2}, nil)
	if err != nil {
		t.Fatal(err)
	}
	r, err := s.Solve(-2)
	if err != nil {
		t.Fatal(err)
	}
	if relErr(cv[0].Charge, r.JunctionCharge) > 1e-4 || relErr(cv[0].Width, r.Depletion.W) > 2e-4 || relErr(cv[0].Current, r.Current) > 1e-4 {
		t.Errorf("CV point %+v, solve: charge %g width %g current %g", cv[0], r.JunctionCharge, r.Depletion.W, r.Current)
	}
}

// The carrier polishing stops at the rounding floor of the discrete
// current, which grows with the node count (measured: spread ~5e-16 per
// node once the quasi-Fermi differences are at rounding level): on a
// 16000-node mesh a forward sweep of a silicon p+n diode runs well under
// one polishing sweep per bias step on average (the former fixed 1e-11
// target ran 1.95 per step, with state copies), and the current stays
// conserved to the scaled target. Common practice (stopping an iteration
// at its rounding floor); figures measured.
func TestPolishingStopsAtRoundingFloor(t *testing.T) {
	const nodes = 16000
	s := newSolver(t, stepDiode(material(t, "si"), 300, 1e19*cm3, 1e16*cm3, 5*um, 100*um), Options{Mesh: MeshOptions{Nodes: nodes}})
	tr, err := s.newTracker()
	if err != nil {
		t.Fatal(err)
	}
	steps := 0
	for v := 0.02; v <= 0.8001; v += 0.02 {
		if err := tr.advance(context.Background(), v); err != nil {
			t.Fatal(err)
		}
		steps++
		if sp := s.currentSpread(tr.cur, tr.w); sp > 10*polishTarget(nodes) {
			t.Errorf("%.2f V: current spread %.3g above 10 x the target %.3g", v, sp, polishTarget(nodes))
		}
	}
	if per := float64(tr.w.polishSweeps) / float64(steps); per > 1 {
		t.Errorf("%.2f polishing sweeps per bias point on %d nodes", per, nodes)
	}
	t.Logf("%d polishing sweeps over %d points", tr.w.polishSweeps, steps)
}

// Only a result is polished, not the continuation steps that lead to it:
// at -5 V a silicon p+n step (1e19/1e16 cm^-3, the automatic mesh for
// 5 V) is reached in about fifteen reverse-bias steps, and after each the
// coupled Newton solve leaves a current spread of 1e-10 to 6e-9 relative
// in the sub-nanometre cells on the p+ side of the step (the hole flux
// there is Dp p/h times a quasi-Fermi difference, p = 1e25 m^-3, against
// a reverse current of 1.5e-4 A/m^2). Polishing every step ran fifteen
// sweeps for one solve; the result alone needs one, and its current is
// conserved to the target. Figures measured.
func TestPolishingOnlyTheResult(t *testing.T) {
	d := stepDiode(material(t, "si"), 300, 1e19*cm3, 1e16*cm3, 8.21*um, 204*um)
	s := newSolver(t, d, Options{Mesh: MeshOptions{MaxReverseBias: 5}})
	tr, err := s.newTracker()
	if err != nil {
		t.Fatal(err)
	}
	if err := tr.advance(context.Background(), -5); err != nil {
		t.Fatal(err)
	}
	nodes := len(s.Nodes())
	if sp := s.currentSpread(tr.cur, tr.w); sp > 10*polishTarget(nodes) {
		t.Errorf("current spread %.3g above 10 x the target %.3g", sp, polishTarget(nodes))
	}
	if tr.totalIters < 10 {
		t.Errorf("%d Newton iterations: the path to -5 V was meant to take several steps", tr.totalIters)
	}
	if tr.w.polishSweeps > 2 {
		t.Errorf("%d polishing sweeps for one solve on %d nodes, want at most 2", tr.w.polishSweeps, nodes)
	}
	t.Logf("%d nodes, %d Newton iterations, %d polishing sweeps", nodes, tr.totalIters, tr.w.polishSweeps)
}
