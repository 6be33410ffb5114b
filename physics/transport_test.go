package physics

import (
	"math"
	"testing"
)

// Spot values of the Masetti model computed from Masetti, Severi & Solmi,
// IEEE Trans. Electron Devices ED-30, 764 (1983), Table I (computed from the
// table's parameters, cm^2/(V s), 300 K).
func TestMasettiSpotValues(t *testing.T) {
	si := mustMaterial(t, "si")
	cases := []struct {
		c      Carrier
		donor  string
		n      float64 // cm^-3
		wantCm float64
	}{
		{Electron, "phosphorus", 1e15, 1362.06},
		{Electron, "phosphorus", 1e17, 721.31},
		{Electron, "phosphorus", 1e19, 114.78},
		{Electron, "arsenic", 1e15, 1358.69},
		{Electron, "arsenic", 1e17, 727.05},
		{Electron, "arsenic", 1e19, 108.05},
		{Hole, "phosphorus", 1e15, 461.05},
		{Hole, "phosphorus", 1e17, 319.10},
		{Hole, "phosphorus", 1e19, 73.17},
	}
	for _, c := range cases {
		got := si.Mobility(c.c, c.n*1e6, 300, c.donor) * 1e4
		if math.Abs(got-c.wantCm) > 0.01 {
			t.Errorf("%v mobility (%s set) at %g cm^-3 = %.2f, want %.2f", c.c, c.donor, c.n, got, c.wantCm)
		}
	}
}

// Lightly doped Si at 300 K: Dn about 35 and Dp about 12.4 cm^2/s (Neamen
// 4th ed. Table 5.2; the 34-36 and ~12 bands are common practice).
func TestDiffusivityLightlyDopedSilicon(t *testing.T) {
	si := mustMaterial(t, "si")
	dn := Diffusivity(si.Mobility(Electron, 1e15*1e6, 300, ""), 300) * 1e4
	dp := Diffusivity(si.Mobility(Hole, 1e15*1e6, 300, ""), 300) * 1e4
	if dn < 34 || dn > 36.5 {
		t.Errorf("Dn(1e15 cm^-3, 300 K) = %.2f cm^2/s, want about 34-36", dn)
	}
	if dp < 11.5 || dp > 12.8 {
		t.Errorf("Dp(1e15 cm^-3, 300 K) = %.2f cm^2/s, want about 12", dp)
	}
}

// The Einstein relation uses the device temperature: D/mu = kT/q at 400 K
// is 34.4693 mV (computed, CODATA), not the 300 K value.
func TestEinsteinRelationAtTemperature(t *testing.T) {
	if d := Diffusivity(0.1, 400); math.Abs(d-0.1*0.0344693) > 1e-8 {
		t.Errorf("D(mu=0.1, 400 K) = %g", d)
	}
}

// Lattice mobility falls with temperature (Arora, Hauser, Roulston 1982
// exponents): mu_max(400)/mu_max(300) = (4/3)^-2.33 = 0.5115 (computed).
func TestMobilityTemperatureLaw(t *testing.T) {
	si := mustMaterial(t, "si")
	r := si.Mobility(Electron, 1e12*1e6, 400, "") / si.Mobility(Electron, 1e12*1e6, 300, "")
	if math.Abs(r-math.Pow(4.0/3, -2.33)) > 2e-3 {
		t.Errorf("mu(400)/mu(300) at low doping = %.4f, want 0.5115", r)
	}
}

// SRH (Scharfetter form) halves at N = Nref; Auger lifetimes for n-type Si
// with Dziewior & Schmid's Cn = 2.8e-31 cm^6/s: 3.571e-8 s at 1e19 cm^-3
// (computed); the total combines the parts as rates.
func TestLifetimes(t *testing.T) {
	if v := SRHLifetime(1e-5, 1e22, 1e22); v != 5e-6 {
		t.Errorf("tau_SRH(N = Nref) = %g, want 5e-6", v)
	}
	si := mustMaterial(t, "si")
	p := si.MinorityLifetime(Hole, 1e19*1e6)
	if r := rel(p.Auger, 3.571e-8); r > 1e-3 {
		t.Errorf("Auger lifetime of holes in 1e19 n-Si = %g s, want 3.571e-8", p.Auger)
	}
	if r := rel(1/p.Total, 1/p.SRH+1/p.Auger+1/p.Radiative); r > 1e-12 {
		t.Errorf("total lifetime does not combine rates")
	}
	n := si.MinorityLifetime(Electron, 1e19*1e6)
	if r := rel(n.Auger, 1.010e-7); r > 1e-3 { // 1/(0.99e-31 * 1e38), computed
		t.Errorf("Auger lifetime of electrons in 1e19 p-Si = %g s, want 1.010e-7", n.Auger)
	}
}

func TestDiffusionLength(t *testing.T) {
	// L = sqrt(D tau): D = 10 cm^2/s, tau = 1 us -> 31.62 um (computed).
	if l := DiffusionLength(10e-4, 1e-6); math.Abs(l-31.6228e-6) > 1e-10 {
		t.Errorf("L = %g", l)
	}
}
