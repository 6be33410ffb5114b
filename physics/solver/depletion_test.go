package solver

import (
	"context"
	"math"
	"testing"

	"junco/physics"
)

// Forward bias: the depletion width from the space charge (Gauss's law)
// follows the depletion approximation with Vbi - V - 2kT/q (Sze & Ng 2007,
// section 2.2; physics.AbruptDepletion) where the carriers in the
// depletion region exceed half the doping, which broke the former
// half-density test (Si 1e17/1e16 at 0.65 V: 9 nm against about 137 nm).
// The injection ratio at the quasi-neutral edge follows the law of the
// junction, p(xn)/Nd = ni^2 exp(qV/kT)/Nd^2 (Shockley 1949; Sze & Ng 2007,
// eq. 2.52 from memory), within 5 % while it is below 0.01 and 15 % up to
// 0.1 (the remaining difference is the ohmic and high-injection
// correction).
func TestDepletionForwardBias(t *testing.T) {
	m := material(t, "si")
	na, nd := 1e17*cm3, 1e16*cm3
	s := newSolver(t, stepDiode(m, 300, na, nd, 5*um, 10*um), Options{})
	vt := s.ThermalVoltage()
	vbi, err := s.BuiltInPotential()
	if err != nil {
		t.Fatal(err)
	}
	ni := m.Ni(300)
	biases := []float64{0.3, 0.5, 0.6, 0.65}
	res, err := s.Sweep(context.Background(), biases, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res {
		d := r.Depletion
		corr := physics.AbruptDepletion(m.Permittivity(), na, nd, vbi-2*vt, r.Bias)
		// Mobile carriers n = p ~ ni exp(qV/2kT) in the depletion region
		// (2.7e15 cm^-3 at 0.65 V, a quarter of Nd) lower its charge: the
		// approximation itself is then off by up to that share.
		tol := 0.01
		switch {
		case r.Bias >= 0.65:
			tol = 0.2
		case r.Bias >= 0.6:
			tol = 0.05
		}
		if e := relErr(d.W, corr.W); !d.Valid || e > tol {
			t.Errorf("%.2f V: W %.4g nm (valid %t), corrected depletion approximation %.4g nm (%.1f %%)", r.Bias, d.W*1e9, d.Valid, corr.W*1e9, 100*e)
		}
		law := ni * ni / (nd * nd) * math.Exp(r.Bias/vt)
		if e := relErr(d.MinorityRatio, law); e > 0.05 && law < 0.01 || e > 0.15 {
			t.Errorf("%.2f V: injection ratio %.4g, law of the junction %.4g", r.Bias, d.MinorityRatio, law)
		}
		for _, f := range r.Flags {
			if f.Code == FlagHighInjection && law < 0.05 {
				t.Errorf("%.2f V: high-injection flag at an injection of %.3g", r.Bias, law)
			}
		}
		t.Logf("%.2f V: W %.2f nm, corrected %.2f nm; injection %.4g, law %.4g", r.Bias, d.W*1e9, corr.W*1e9, d.MinorityRatio, law)
	}
}

// High injection is reported where the law of the junction puts the
// minority density above a tenth of the doping (Si 1e17/1e16 at 0.8 V:
// ni^2 exp(qV/kT)/Nd^2 > 0.1; Shockley 1949), also when the depletion
// region has vanished, and not at 0.5 V (2e-4).
func TestHighInjectionFlag(t *testing.T) {
	m := material(t, "si")
	s := newSolver(t, stepDiode(m, 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um), Options{})
	res, err := s.Sweep(context.Background(), []float64{0.5, 0.8, 0.95}, nil)
	if err != nil {
		t.Fatal(err)
	}
	has := func(r *Result) bool {
		for _, f := range r.Flags {
			if f.Code == FlagHighInjection {
				return true
			}
		}
		return false
	}
	for _, r := range res {
		law := math.Pow(m.Ni(300)/(1e16*cm3), 2) * math.Exp(r.Bias/s.vt)
		want := law > 0.1
		if has(r) != want || (want && !(r.Depletion.MinorityRatio > 0.1)) {
			t.Errorf("%.2f V: high-injection flag %t (ratio %.3g, valid %t), law of the junction %.3g", r.Bias, has(r), r.Depletion.MinorityRatio, r.Depletion.Valid, law)
		}
		t.Logf("%.2f V: ratio %.3g (law %.3g), depletion valid %t", r.Bias, r.Depletion.MinorityRatio, law, r.Depletion.Valid)
	}
}
