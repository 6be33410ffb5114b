package physics

import (
	"math"
	"testing"
)

// In low injection the diffusion model with the effects reduces to
// Shockley's q ni^2 D/(L N) G (exp(V/Vt) - 1).
func TestDiffusionLowInjection(t *testing.T) {
	d := siDiode()
	d.Effects = Effects{}
	s := prep(t, d)
	for _, v := range []float64{-1, 0.2, 0.5} {
		j, _ := s.NEff.CurrentDensity(v, s.Vt, false)
		want := s.JsP * math.Expm1(v/s.Vt)
		if math.Abs(j-want) > 1e-12*math.Abs(want) {
			t.Errorf("V = %g: J = %g, Shockley %g", v, j, want)
		}
	}
}

// High injection: the edge density tends to ni exp(V/2Vt) when it far
// exceeds the doping (Sze & Ng 2007, section 2.3.2), so the diffusion
// current's local ideality goes from 1 to 2; the onset is where p' ~ N.
func TestHighInjectionLimit(t *testing.T) {
	d := siDiode()
	d.Effects = Effects{HighInjection: true}
	s := prep(t, d)
	r := s.NEff
	for _, v := range []float64{1.2, 1.5} {
		pe := r.Injection(v, s.Vt, true)
		want := r.NiEff * math.Exp(v/(2*s.Vt))
		if pe < 10*r.Doping || math.Abs(pe/want-1) > 0.06 {
			t.Errorf("V = %g: p' = %g, ni exp(V/2Vt) = %g", v, pe, want)
		}
	}
	ideality := func(v float64) float64 {
		h := 1e-4
		a, _ := r.CurrentDensity(v+h, s.Vt, true)
		b, _ := r.CurrentDensity(v-h, s.Vt, true)
		return 2 * h / (s.Vt * (math.Log(a) - math.Log(b)))
	}
	if n := ideality(0.5); math.Abs(n-1) > 0.01 {
		t.Errorf("low injection n = %g", n)
	}
	if n := ideality(1.4); n < 1.85 || n > 2.05 {
		t.Errorf("high injection n = %g, want near 2", n)
	}
}

// Diffusion capacitance factor K (Cd = K tau g): 1/2 for the long base,
// which is Neamen's Cd = tau I/(2 Vt) (4th ed., section 8.3, Example 8.7:
// tau_p0 = 1e-7 s, I = 1 mA, Vt = 0.0259 V gives 1.93 nF), and K tau =
// w^2/(3D) for a short base with an ohmic contact (small-signal transit
// form; computed from the continuity equation).
func TestDiffusionCapacitanceFactor(t *testing.T) {
	if k := DiffusionCapacitanceFactor(math.Inf(1), 1e-4, math.Inf(1), 1e-3); math.Abs(k-0.5) > 1e-6 {
		t.Errorf("long base K = %g", k)
	}
	cd := 0.5 * 1e-7 * 1e-3 / 0.0259
	if math.Abs(cd-1.93e-9) > 0.005e-9 {
		t.Errorf("Neamen Example 8.7: Cd = %g F", cd)
	}
	w, l, d := 1e-6, 1e-4, 1e-3
	tau := l * l / d
	if k := DiffusionCapacitanceFactor(w, l, math.Inf(1), d); math.Abs(k*tau/(w*w/(3*d))-1) > 1e-3 {
		t.Errorf("short base K tau = %g, w^2/3D = %g", k*tau, w*w/(3*d))
	}
	r := QuasiNeutral{Doping: 1e22, Diffusivity: d, Lifetime: tau, Width: w, Recombination: math.Inf(1)}
	if tc := r.ChargeControlTime(); math.Abs(tc/(w*w/(2*d))-1) > 1e-3 {
		t.Errorf("transit time %g, w^2/2D = %g", tc, w*w/(2*d))
	}
	r.Width = math.Inf(1)
	if tc := r.ChargeControlTime(); tc != tau {
		t.Errorf("long base charge-control time %g, tau %g", tc, tau)
	}
}
