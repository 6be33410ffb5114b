package physics

import (
	"math"
	"testing"
)

// The ionised density follows the Fermi-Dirac occupation of the dopant
// level, Nd+ = Nd/(1 + g exp((EF - Ed)/kT)) with EF from the Boltzmann
// band n = Nc exp((EF - Ec)/kT), and charge neutrality n = Nd+ + ni^2/n
// (Sze & Ng 2007, section 1.4.2).
func TestIonisedDensityFermiDirac(t *testing.T) {
	for _, c := range []struct{ n, e, g, nc, ni, t float64 }{
		{1e22, 0.045, 2, 2.86e25, 9.7e15, 300}, {1e23, 0.045, 2, 2.86e25, 1e10, 77},
		{1e24, 0.2, 4, 2.49e25, 1e-10, 300}, {1e21, 0.045, 2, 8e25, 1e21, 600},
	} {
		lv := DopantLevel{Energy: c.e, Degeneracy: c.g, Localised: 1}
		n, ion := IonisedDensity(c.n, lv, c.nc, c.ni, c.t)
		kt := ThermalVoltage(c.t)
		efMinusEd := kt*math.Log(n/c.nc) + c.e // (EF - Ec) + (Ec - Ed)
		want := c.n / (1 + c.g*math.Exp(efMinusEd/kt))
		if math.Abs(ion-want) > 1e-10*want {
			t.Errorf("%+v: ionised %g, Fermi-Dirac %g", c, ion, want)
		}
		if r := n - ion - c.ni*c.ni/n; math.Abs(r) > 1e-10*n {
			t.Errorf("%+v: neutrality residual %g", c, r)
		}
	}
}

// Neamen, Semiconductor Physics and Devices, 4th ed., section 4.5 (the
// worked example on electrons still in donor states; example number and
// printed value of about 0.4% from memory): phosphorus, Nd = 1e16 cm^-3,
// T = 300 K with Nc = 2.8e19 cm^-3, kT = 0.0259 eV, Ec - Ed = 0.045 eV. The
// book's Boltzmann-approximation formula n_d/(n_d + n_0) = 1/(1 + Nc/(2Nd)
// exp(-(Ec - Ed)/kT)) gives 0.404% (computed); the self-consistent
// Fermi-Dirac solution agrees within 1%.
func TestNeamenDonorFreezeOut(t *testing.T) {
	tBook := 0.0259 * Q / KB // the book's kT/q
	lv := DopantLevel{Energy: 0.045, Degeneracy: 2, Localised: 1}
	_, ion := IonisedDensity(1e22, lv, 2.8e25, 1e16, tBook)
	frac := 1 - ion/1e22
	book := 1 / (1 + 2.8e19/(2*1e16)*math.Exp(-0.045/0.0259))
	if math.Abs(book-0.00404) > 0.000005 || math.Abs(frac/book-1) > 0.01 {
		t.Errorf("fraction in donor states %.5f, book formula %.5f (0.404%%)", frac, book)
	}
}

// Temperature: phosphorus in Si freezes out at 77 K but is ionised at
// 300 K; the aluminium acceptor in 4H-SiC (about 200 meV) is far from fully
// ionised at room temperature (e.g. Matsuura et al. 2003; qualitative).
// Heavy doping above the Mott density is ionised (impurity band).
func TestIonisationTemperatureAndDoping(t *testing.T) {
	si, _ := MaterialByName("si")
	p, _ := si.Dopant("phosphorus")
	frac := func(m *Material, d Dopant, n, t float64) float64 {
		_, ion := IonisedDensity(n, m.LoweredDopantLevel(d, n), m.Nc(t), m.Ni(t), t)
		return ion / n
	}
	if f := frac(si, p, 1e22, 77); f > 0.8 {
		t.Errorf("Si:P 1e16 at 77 K: ionised %g, want freeze-out", f)
	}
	if f := frac(si, p, 1e22, 300); f < 0.99 {
		t.Errorf("Si:P 1e16 at 300 K: ionised %g", f)
	}
	if f := frac(si, p, 1e26, 300); f < 0.99 {
		t.Errorf("Si:P 1e20 at 300 K: ionised %g, want full (Mott)", f)
	}
	sic, _ := MaterialByName("4h-sic")
	al, _ := sic.Dopant("aluminium")
	_, ion := IonisedDensity(1e23, sic.LoweredDopantLevel(al, 1e23), sic.Nv(300), sic.Ni(300), 300)
	if f := ion / 1e23; f > 0.5 || f < 0.05 {
		t.Errorf("4H-SiC:Al 1e17 at 300 K: ionised %g", f)
	}
	// The built-in potential uses the majority densities: lower for SiC:Al.
	inf := math.Inf(1)
	d := Device{Material: sic, Na: 1e25, Nd: 1e22, Temperature: 300, Area: 1e-6, Wp: inf, Wn: inf, Sp: inf, Sn: inf,
		Effects: Effects{Ionisation: true}}
	s := prep(t, d)
	want := s.VbiFullIonisation + s.Vt*math.Log(s.P0*s.N0/(d.Na*d.Nd))
	if !(s.Vbi < s.VbiFullIonisation) || math.Abs(s.Vbi-want) > 1e-12 || !hasFlag(s.Flags, FlagIncompleteIon) {
		t.Errorf("SiC Vbi %g (full %g), flags %v", s.Vbi, s.VbiFullIonisation, s.Flags)
	}
}
