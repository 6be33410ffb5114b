package physics

import (
	"math"
	"testing"
)

// Tests of the analytic model's physics choices (one per defect of the
// analytic-against-numeric review): each names its outside reference.

// siDevice returns a silicon step junction (densities in cm^-3) with the
// given effects, long regions and ohmic contacts.
func siDevice(na, nd, temp float64, e Effects) Device {
	m, _ := MaterialByName("si")
	inf := math.Inf(1)
	return Device{Material: m, Na: na * perCm3, Nd: nd * perCm3, Temperature: temp, Area: 1e-6,
		Wp: inf, Wn: inf, Sp: inf, Sn: inf, Effects: e}
}

// snsIntegral integrates the Sah-Noyce-Shockley net recombination rate
// U = (n p - ni^2)/(tau_p (n + ni) + tau_n (p + ni)) (midgap trap) over the
// step junction's depletion region by the trapezoidal rule on n uniform
// intervals, with the depletion-approximation parabolas written out here
// (Sze & Ng 2007, eq. 2.12) and lifetimes tau(x); A/m^2.
func snsIntegral(s *Static, v float64, n int, tau func(x float64) (float64, float64)) float64 {
	eps := s.Junction.Eps
	na, nd := s.Device.Na, s.Device.Nd
	drop := s.Vbi - v
	w := math.Sqrt(2 * eps * drop * (na + nd) / (Q * na * nd))
	xn, xp := w*na/(na+nd), w*nd/(na+nd)
	vt, ni := s.Vt, s.Ni
	p0 := s.P0
	sum := 0.0
	for i := 0; i <= n; i++ {
		x := -xp + w*float64(i)/float64(n)
		var psi float64
		if x < 0 {
			psi = Q * na / (2 * eps) * (x + xp) * (x + xp)
		} else {
			psi = drop - Q*nd/(2*eps)*(xn-x)*(xn-x)
		}
		p := p0 * math.Exp(-psi/vt)
		nn := ni * ni * math.Exp(v/vt) / p
		tn, tp := tau(x)
		u := (nn*p - ni*ni) / (tp*(nn+ni) + tn*(p+ni))
		wt := 1.0
		if i == 0 || i == n {
			wt = 0.5
		}
		sum += wt * u
	}
	return Q * sum * w / float64(n)
}

// The depletion-region generation of a one-sided junction uses the
// lifetimes of the lightly doped side, where the depletion region lies.
// Reference: the Sah-Noyce-Shockley integral (C. T. Sah, R. N. Noyce,
// W. Shockley, Proc. IRE 45, 1228 (1957)) evaluated here independently on
// 400,000 intervals with the SRH lifetimes at the local doping, tau(N(x))
// (the project's numerical solver takes them so at each node). p+n Si
// 1e19/1e15 cm^-3 at -10 V: with the p side's tau_n across the whole
// region the current was 4.3x too large (-1.73e-9 A against the solver's
// -4.1e-10 A). Its deep-reverse form q ni W_gen/(tau_n + tau_p) (Neamen 4th
// ed., eq. 8.74) holds over the generating width W_gen, about 0.8 W here
// because the majority tails fill the last few tenths of a volt.
func TestSCRGenerationUsesLocalLifetime(t *testing.T) {
	s := prep(t, siDevice(1e19, 1e15, 300, Effects{SRH: true}))
	p := s.At(-10)
	m := s.Device.Material
	local := func(x float64) (float64, float64) {
		n := s.Device.Nd
		if x < 0 {
			n = s.Device.Na
		}
		return m.MinorityLifetime(Electron, n).SRH, m.MinorityLifetime(Hole, n).SRH
	}
	want := snsIntegral(s, -10, 400000, local) * s.Device.Area
	if r := p.Generation / want; math.Abs(r-1) > 0.01 {
		t.Errorf("generation %.4g A, SNS integral with local lifetimes %.4g A (ratio %.4f)", p.Generation, want, r)
	}
	// Equal, user-given lifetimes: the same integral with one pair.
	d := siDevice(1e19, 1e15, 300, Effects{SRH: true})
	d.TauN, d.TauP = 1e-6, 1e-6
	s2 := prep(t, d)
	want2 := snsIntegral(s2, -10, 400000, func(float64) (float64, float64) { return 1e-6, 1e-6 }) * d.Area
	if r := s2.At(-10).Generation / want2; math.Abs(r-1) > 0.01 {
		t.Errorf("equal lifetimes: generation ratio to the SNS integral %.4f", r)
	}
	// Forward bias (0.3 V), where the peak of U sits in the n side.
	want3 := snsIntegral(s, 0.3, 400000, local) * s.Device.Area
	if r := s.At(0.3).Recombination / want3; math.Abs(r-1) > 0.01 {
		t.Errorf("forward 0.3 V: recombination ratio to the SNS integral %.4f", r)
	}
}

// The universal breakdown law of S. M. Sze, G. Gibbons, Appl. Phys. Lett.
// 8, 111 (1966) was fitted to Ge, Si, GaAs and GaP only (Sze & Ng 2007,
// section 2.4.1): outside them no value is reported (4H-SiC at 1e16 cm^-3
// gave 302 V against 2,006 V from the ionisation integral).
func TestSzeGibbonsOnlyForItsMaterials(t *testing.T) {
	for _, c := range []struct {
		mat    string
		fitted bool
	}{{"si", true}, {"ge", true}, {"gaas", true}, {"4h-sic", false}} {
		s := oneSided(t, c.mat, 1e16)
		if got := !math.IsNaN(s.Breakdown.SzeGibbons); got != c.fitted {
			t.Errorf("%s: Sze-Gibbons estimate %.4g V reported = %v, want %v", c.mat, s.Breakdown.SzeGibbons, got, c.fitted)
		}
		if !s.Breakdown.Converged || !(s.Breakdown.Voltage > 0) {
			t.Errorf("%s: the ionisation-integral breakdown must still be found", c.mat)
		}
	}
}
