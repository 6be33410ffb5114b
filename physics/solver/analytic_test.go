package solver

import (
	"context"
	"math"
	"testing"

	"junco/physics"
)

// Equilibrium built-in potential against Vbi = (kT/q) ln(Na Nd / ni^2)
// (Sze & Ng, Physics of Semiconductor Devices, 3rd ed. 2007, eq. 2.8, as
// physics.Static.Vbi) within 1 mV for non-degenerate steps. Besides the
// contact-to-contact value, the potential difference between the middles
// of the two neutral regions is checked, which depends on the solution of
// Poisson's equation rather than on the boundary values alone.
func TestBuiltInPotentialMatchesAnalytic(t *testing.T) {
	for _, c := range []struct {
		mat            string
		temp, na, nd   float64
		lp, ln         float64
		tolV, midTolsV float64
	}{
		{"si", 300, 1e16 * cm3, 1e15 * cm3, 10 * um, 20 * um, 1e-3, 1e-3},
		{"si", 400, 1e17 * cm3, 1e16 * cm3, 5 * um, 10 * um, 1e-3, 1e-3},
		{"ge", 300, 1e17 * cm3, 1e16 * cm3, 5 * um, 10 * um, 1e-3, 1e-3},
		{"gaas", 300, 1e17 * cm3, 1e16 * cm3, 5 * um, 10 * um, 1e-3, 1e-3},
	} {
		m := material(t, c.mat)
		s := newSolver(t, stepDiode(m, c.temp, c.na, c.nd, c.lp, c.ln), Options{})
		eq, err := s.Equilibrium()
		if err != nil {
			t.Fatal(err)
		}
		st, _ := analyticStatic(t, m, c.temp, c.na, c.nd, c.lp, c.ln, 0)
		if d := math.Abs(eq.Barrier - st.Vbi); d > c.tolV {
			t.Errorf("%s %g K: solver Vbi %.6f V, analytic %.6f V (diff %.3g V)", c.mat, c.temp, eq.Barrier, st.Vbi, d)
		}
		mid := func(x float64) float64 {
			k := 0
			for i, v := range eq.X {
				if math.Abs(v-x) < math.Abs(eq.X[k]-x) {
					k = i
				}
			}
			return eq.Potential[k]
		}
		inner := mid(c.lp+c.ln/2) - mid(c.lp/2)
		if d := math.Abs(inner - st.Vbi); d > c.midTolsV {
			t.Errorf("%s %g K: neutral-to-neutral potential %.6f V, analytic Vbi %.6f V", c.mat, c.temp, inner, st.Vbi)
		}
		t.Logf("%s %g K: Vbi solver %.6f V, analytic %.6f V", c.mat, c.temp, eq.Barrier, st.Vbi)
	}
}

// Depletion width of a step junction against the depletion approximation
// with the majority-carrier tail correction Vbi - V - 2kT/q (Sze & Ng 2007,
// section 2.2, after Kennedy and Murley et al.; from memory), computed with
// physics.AbruptDepletion. Two widths of the solver are checked:
//
//   - the charge width Q (1/Na + 1/Nd)/q, Q the depleted charge per area,
//     which is what the 2kT/q correction describes: within 1.5 % at zero
//     bias and 0.5 % in reverse bias, where the remaining mobile-carrier
//     terms (minority carriers near the junction) have died out;
//   - the width of Result.Depletion (each side's space charge without the
//     other side's carriers placed as a depleted layer, Gauss's law): it
//     is the corrected width itself (each side's Poisson-Boltzmann first
//     integral E^2 = (2qN/eps)(V - kT/q) for V >> kT/q; own derivation),
//     so |W_corr - W| must stay below 0.02 (L_Dn + L_Dp) in reverse bias
//     and 0.3 % at zero bias.
func TestDepletionWidthMatchesCorrectedApproximation(t *testing.T) {
	m := material(t, "si")
	na, nd := 1e16*cm3, 1e15*cm3
	s := newSolver(t, stepDiode(m, 300, na, nd, 10*um, 20*um), Options{})
	vt := s.ThermalVoltage()
	ld := func(n float64) float64 { return math.Sqrt(m.Permittivity() * vt / (physics.Q * n)) } // Debye length, Sze & Ng 2007 eq. 2.27
	res, err := s.Sweep(context.Background(), []float64{0, -1, -5}, nil)
	if err != nil {
		t.Fatal(err)
	}
	vbi, _ := s.BuiltInPotential()
	for _, r := range res {
		corr := physics.AbruptDepletion(m.Permittivity(), na, nd, vbi-2*vt, r.Bias)
		wq := r.JunctionCharge / physics.Q * (1/na + 1/nd)
		tol := 0.015
		if r.Bias <= -1 {
			tol = 0.005
		}
		if e := relErr(wq, corr.W); e > tol {
			t.Errorf("V = %g: charge width %.4g um, corrected depletion approximation %.4g um (%.2f %%)", r.Bias, wq/um, corr.W/um, 100*e)
		}
		w := r.Depletion.W
		if e := relErr(w, corr.W); !r.Depletion.Valid || e > 0.003 {
			t.Errorf("V = %g: width %.4g um, corrected %.4g um (%.2f %%)", r.Bias, w/um, corr.W/um, 100*e)
		}
		off := (corr.W - w) / (ld(na) + ld(nd))
		if r.Bias < 0 && math.Abs(off) > 0.02 {
			t.Errorf("V = %g: edge offset %.3f Debye lengths, expected 0", r.Bias, off)
		}
		plain := physics.AbruptDepletion(m.Permittivity(), na, nd, vbi, r.Bias)
		t.Logf("V = %5.1f: W %.4f um, charge %.4f um, corrected %.4f um, uncorrected %.4f um, offset %.3f L_D",
			r.Bias, w/um, wq/um, corr.W/um, plain.W/um, off)
	}
}

// checkForward compares the solver's forward current with the analytic
// low-injection diffusion current (physics.Static.At().IdealCurrent per unit
// area: Shockley, Bell Syst. Tech. J. 28, 435 (1949); geometry factor
// coth(W/L) for ohmic contacts, Sze & Ng 2007 section 2.3) within 5 %, after
// checking at each bias that the analytic assumptions hold in the solution
// (together they stay below the 5 % tolerance): injection Delta p/Nd <= 1 %
// (low injection), ohmic drop across the neutral regions <= 0.03 kT/q (a
// 3 % current change), and recombination inside the depletion region
// (Sah, Noyce, Shockley, Proc. IRE 45, 1228 (1957); absent from the
// analytic model) <= 2 % of the current.
func checkForward(t *testing.T, name string, m *physics.Material, na, nd, lp, ln float64, biases []float64) []float64 {
	t.Helper()
	s := newSolver(t, stepDiode(m, 300, na, nd, lp, ln), Options{})
	res, err := s.Sweep(context.Background(), biases, nil)
	if err != nil {
		t.Fatal(err)
	}
	var ratios []float64
	for _, r := range res {
		st, pt := analyticStatic(t, m, 300, na, nd, lp, ln, r.Bias)
		jan := pt.IdealCurrent / st.Device.Area
		// Regime checks.
		inj := st.Ni * st.Ni / (math.Min(na, nd) * math.Min(na, nd)) * math.Exp(r.Bias/st.Vt)
		drop := jan * ((lp-pt.Depletion.Xp)/(physics.Q*st.MuMajP*na) + (ln-pt.Depletion.Xn)/(physics.Q*st.MuMajN*nd))
		scr := 0.0
		d := r.Depletion
		for i := 0; i+1 < len(r.X); i++ {
			a, b := r.X[i], r.X[i+1]
			if b <= d.XAnode || a >= d.XCathode {
				continue
			}
			scr += physics.Q * 0.5 * (r.Recombination[i] + r.Recombination[i+1]) * (b - a)
		}
		if inj > 0.01 || drop > 0.03*st.Vt || scr > 0.02*r.Current {
			t.Fatalf("%s V = %g: analytic assumptions do not hold (injection %.3g, ohmic drop %.3g V, depletion-region recombination %.3g of J); choose another bias",
				name, r.Bias, inj, drop, scr/r.Current)
		}
		e := relErr(r.Current, jan)
		if e > 0.05 {
			t.Errorf("%s V = %g: solver J = %.5g A/m^2, analytic %.5g A/m^2 (%.2f %%)", name, r.Bias, r.Current, jan, 100*e)
		}
		ratios = append(ratios, r.Current/jan)
		t.Logf("%s V = %.2f: J solver %.5g, analytic %.5g A/m^2, ratio %.4f (injection %.1e, drop %.2g Vt, SCR rec %.2g)",
			name, r.Bias, r.Current, jan, r.Current/jan, inj, drop/st.Vt, scr/r.Current)
	}
	return ratios
}

// Long base: both neutral regions longer than ten diffusion lengths.
func TestForwardCurrentLongBase(t *testing.T) {
	m := material(t, "si")
	na, nd, lp, ln := 1e18*cm3, 1e16*cm3, 100*um, 500*um
	st, _ := analyticStatic(t, m, 300, na, nd, lp, ln, 0)
	if st.N.Width < 10*st.LP || st.P.Width < 10*st.LN {
		t.Fatalf("not a long-base device: Wn/Lp = %.3g, Wp/Ln = %.3g", st.N.Width/st.LP, st.P.Width/st.LN)
	}
	checkForward(t, "long base", m, na, nd, lp, ln, []float64{0.55, 0.58})
}

// Short base: the n region is a quarter of the hole diffusion length, so the
// hole current follows the coth (short) form; the test also requires that
// the long-base formula would be off by more than 50 % here, so that the
// geometry factor is really exercised.
func TestForwardCurrentShortBase(t *testing.T) {
	m := material(t, "si")
	na, nd, lp, ln := 1e18*cm3, 1e16*cm3, 100*um, 10*um
	st, pt := analyticStatic(t, m, 300, na, nd, lp, ln, 0.5)
	if st.N.Width > 0.3*st.LP {
		t.Fatalf("not a short-base device: Wn/Lp = %.3g", st.N.Width/st.LP)
	}
	long := physics.QuasiNeutral{Doping: nd, Diffusivity: st.DP, Lifetime: st.TauP, Width: math.Inf(1), Recombination: math.Inf(1)}
	jLong := (long.SaturationCurrentDensity(st.Ni) + st.JsN) * math.Expm1(0.5/st.Vt)
	if jLong > 0.5*pt.IdealCurrent {
		t.Fatalf("long-base current %.3g is not far from the short-base %.3g: the device does not separate the two", jLong, pt.IdealCurrent)
	}
	checkForward(t, "short base", m, na, nd, lp, ln, []float64{0.5, 0.55})
}

// Reverse-bias capacitance against the depletion capacitance eps/W of the
// analytic model (physics.Static.At().CapPerArea; Sze & Ng 2007, eq. 2.30)
// within 5 %, and against the 2kT/q-corrected eps/W (Sze & Ng 2007,
// section 2.2) within 1.5 %.
func TestReverseCapacitance(t *testing.T) {
	m := material(t, "si")
	na, nd := 1e16*cm3, 1e15*cm3
	s := newSolver(t, stepDiode(m, 300, na, nd, 10*um, 20*um), Options{})
	biases := []float64{-0.5, -1, -2, -5}
	cv, err := s.CV(context.Background(), biases, nil)
	if err != nil {
		t.Fatal(err)
	}
	vbi, _ := s.BuiltInPotential()
	for _, p := range cv {
		_, pt := analyticStatic(t, m, 300, na, nd, 10*um, 20*um, p.Bias)
		if e := relErr(p.Capacitance, pt.CapPerArea); e > 0.05 {
			t.Errorf("V = %g: C solver %.5g F/m^2, depletion approximation %.5g (%.2f %%)", p.Bias, p.Capacitance, pt.CapPerArea, 100*e)
		}
		corr := physics.AbruptDepletion(m.Permittivity(), na, nd, vbi-2*s.ThermalVoltage(), p.Bias)
		if e := relErr(p.Capacitance, corr.CapPerArea); e > 0.015 {
			t.Errorf("V = %g: C solver %.5g F/m^2, corrected %.5g (%.2f %%)", p.Bias, p.Capacitance, corr.CapPerArea, 100*e)
		}
		t.Logf("V = %4.1f: C solver %.5g, analytic %.5g, corrected %.5g F/m^2", p.Bias, p.Capacitance, pt.CapPerArea, corr.CapPerArea)
	}
	// A strongly one-sided p+n junction (1000:1), where the p+ majority
	// tail spills across the metallurgical junction: the capacitance must
	// still be the depletion capacitance of the light side.
	na, nd = 1e18*cm3, 1e15*cm3
	s = newSolver(t, stepDiode(m, 300, na, nd, 2*um, 20*um), Options{})
	cv, err = s.CV(context.Background(), []float64{-1, -5}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range cv {
		_, pt := analyticStatic(t, m, 300, na, nd, 2*um, 20*um, p.Bias)
		if e := relErr(p.Capacitance, pt.CapPerArea); e > 0.05 {
			t.Errorf("p+n V = %g: C solver %.5g F/m^2, depletion approximation %.5g (%.2f %%)", p.Bias, p.Capacitance, pt.CapPerArea, 100*e)
		}
		t.Logf("p+n 1e18/1e15 V = %4.1f: C solver %.5g, analytic %.5g F/m^2", p.Bias, p.Capacitance, pt.CapPerArea)
	}
}

// Linearly graded junction: reverse capacitance against the analytic graded
// depletion capacitance (physics.Junction.Solve for LinearGraded, W =
// (12 eps (Vbi - V)/(q a))^(1/3), Sze & Ng 2007 eqs. 2.33-2.36) within 5 %.
func TestGradedCapacitance(t *testing.T) {
	m := material(t, "si")
	a := 1e20 * cm3 / 1e-2 // 1e20 cm^-4 in m^-4
	plateau := 1e18 * cm3
	d := physics.Device{Material: m, Profile: physics.LinearGraded, Gradient: a, Na: plateau, Nd: plateau,
		Temperature: 300, Area: 1, Wp: math.Inf(1), Wn: math.Inf(1), Sp: math.Inf(1), Sn: math.Inf(1)}
	dev, err := FromPhysics(d, 10*um, 10*um)
	if err != nil {
		t.Fatal(err)
	}
	s := newSolver(t, dev, Options{})
	st, err := d.Prepare()
	if err != nil {
		t.Fatal(err)
	}
	cv, err := s.CV(context.Background(), []float64{-1, -5}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range cv {
		want := st.At(p.Bias).CapPerArea
		if e := relErr(p.Capacitance, want); e > 0.05 {
			t.Errorf("graded V = %g: C solver %.5g, analytic %.5g F/m^2 (%.2f %%)", p.Bias, p.Capacitance, want, 100*e)
		}
		t.Logf("graded V = %g: C solver %.5g, analytic %.5g F/m^2", p.Bias, p.Capacitance, want)
	}
}
