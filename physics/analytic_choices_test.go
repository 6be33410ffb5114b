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

// The electrostatic built-in potential includes band-gap narrowing, split
// evenly between the band edges: Vbi = Vt ln(p0 n0/(ni,eff,p ni,eff,n)).
// Reference: equating the Fermi levels of the two neutral regions with
// Boltzmann statistics, p0 = Nv exp(-(EF - Ev)/kT), n0 = Nc exp(-(Ec - EF)/kT),
// gives q Vbi = kT ln(p0 n0/ni^2) - dEv,p - dEc,n (Sze & Ng 2007, eq. 2.8
// with the band edges moved); the even split dEv = dEc = dEg/2 (an
// assumption, common practice in device simulation; from memory) gives
// the formula above, which this project's numerical solver also uses. At
// 1e20/1e20 cm^-3 the potential without narrowing (1.192 V) exceeded the
// band gap; with it Vbi stays below Eg.
func TestBuiltInPotentialWithBGN(t *testing.T) {
	for _, n := range [][2]float64{{1e17, 1e16}, {1e19, 1e18}, {1e20, 1e20}} {
		s := prep(t, siDevice(n[0], n[1], 300, Effects{BGN: true, BGNModel: BGNKlaassen1992}))
		want := s.Vt * math.Log(s.P0*s.N0/(s.NiEffP*s.NiEffN))
		if math.Abs(s.Vbi-want) > 1e-9 {
			t.Errorf("%g/%g: Vbi = %.6f V, Vt ln(p0 n0/(ni,eff,p ni,eff,n)) = %.6f V", n[0], n[1], s.Vbi, want)
		}
		if d := s.VbiNoBGN - s.Vbi - (s.DEgP+s.DEgN)/2; math.Abs(d) > 1e-9 {
			t.Errorf("%g/%g: Vbi lowered by %.4g V, want (dEg,p + dEg,n)/2", n[0], n[1], s.VbiNoBGN-s.Vbi)
		}
		if n[0] == 1e20 && !(s.Vbi < s.Eg) {
			t.Errorf("1e20/1e20: Vbi = %.4f V is not below Eg = %.4f eV", s.Vbi, s.Eg)
		}
	}
}

// W and Cj include the majority-carrier tails: (Vbi - V - 2kT/q) replaces
// (Vbi - V) in the step junction (Sze & Ng 2007, section 2.2.1, the
// correction after eq. 2.14, from memory). Reference values (computed from
// that formula, with the plain form for comparison): Si, eps_r 11.7, one-
// sided N = 1e16 cm^-3, A = 1e-3 cm^2, Vbi = 0.8 V, 300 K: C(-1 V) =
// 2.1787e-11 F, W = 0.4755 um; C(-5 V) = 1.2015e-11 F. At 0 V in Si
// 1e17/1e16 the numerical solver's Cj lies 3.6 % above the plain form,
// sqrt(Vbi/(Vbi - 2 Vt)).
func TestDepletionWithMajorityTails(t *testing.T) {
	eps := 11.7 * Eps0
	j := Junction{Eps: eps, Na: 1e40, Nd: 1e22, Profile: Abrupt}
	for _, c := range []struct{ v, cap, w float64 }{{-1, 2.1787e-11, 0.4755e-6}, {-5, 1.2015e-11, math.NaN()}} {
		d := j.SolveWithTails(0.8, 2*ThermalVoltage(300), c.v)
		if got := d.CapPerArea * 1e-7; math.Abs(got/c.cap-1) > 5e-4 {
			t.Errorf("C(%g V) = %.5g F, want %.5g F", c.v, got, c.cap)
		}
		if !math.IsNaN(c.w) && math.Abs(d.W/c.w-1) > 5e-4 {
			t.Errorf("W(%g V) = %.5g m, want %.5g m", c.v, d.W, c.w)
		}
	}
	s := prep(t, siDevice(1e17, 1e16, 300, Effects{}))
	p := s.At(0)
	want := math.Sqrt(s.Vbi / (s.Vbi - 2*s.Vt))
	if r := p.Cap / p.CapTextbook; math.Abs(r/want-1) > 1e-9 {
		t.Errorf("Cj/Cj,textbook = %.6f, want sqrt(Vbi/(Vbi - 2Vt)) = %.6f", r, want)
	}
	if math.Abs(want-1.036) > 0.003 {
		t.Errorf("tail factor %.4f, the solver's +3.6 %%", want)
	}
	// The peak field obeys Gauss's law at the tail-corrected edge.
	if e := Q * s.Device.Nd * p.Depletion.Xn / s.Junction.Eps; math.Abs(p.Depletion.PeakField/e-1) > 1e-12 {
		t.Errorf("Emax %.6g, q Nd xn/eps %.6g", p.Depletion.PeakField, e)
	}
}

// The linearly graded junction's W and Cj use the gradient voltage
// Vg = (2kT/3q) ln(a^2 eps kT/(8 q^2 ni^3)) (B. R. Chawla, H. K. Gummel,
// IEEE Trans. Electron Devices ED-18, 178 (1971); Sze & Ng 2007, eq.
// 2.38), not the eq.-2.37 built-in potential: the 1/C^3 intercept is Vg.
// Si, a = 1e20 cm^-4, 300 K: Vg = 0.570 V; the numerical solver's 1/C^3
// intercept is 0.5726 V (eq. 2.37 gives 0.669 V).
func TestGradedJunctionUsesGradientVoltage(t *testing.T) {
	d := siDevice(1e19, 1e19, 300, Effects{})
	d.Profile, d.Gradient = LinearGraded, 1e20*1e8
	s := prep(t, d)
	if math.Abs(s.GradientVoltage-0.5726) > 0.005 {
		t.Errorf("Vg = %.4f V, the solver's intercept 0.5726 V", s.GradientVoltage)
	}
	c3 := func(v float64) float64 { c := s.At(v).CapPerArea; return 1 / (c * c * c) }
	v1, v2 := -0.5, -2.0
	y1, y2 := c3(v1), c3(v2)
	intercept := v1 - y1*(v2-v1)/(y2-y1) // 1/C^3 = k (Vg - V): zero at V = Vg
	if math.Abs(intercept-s.GradientVoltage) > 1e-6 {
		t.Errorf("1/C^3 intercept %.5f V, want Vg = %.5f V", intercept, s.GradientVoltage)
	}
	if math.Abs(intercept-0.5726) > 0.005 {
		t.Errorf("1/C^3 intercept %.4f V, the solver's 0.5726 V", intercept)
	}
}

// Intrinsic regime: Si at 600 K with Nd = 1e15 cm^-3 has ni = 4.2e15 cm^-3
// above the doping. The majority density follows neutrality,
// n0 = N/2 + sqrt(N^2/4 + ni^2) (Neamen 4th ed., eq. 4.60; Sze & Ng 2007,
// section 1.4.3), in the ideal model too, and a flag names the regime
// when ni exceeds a tenth of a side's doping.
func TestIntrinsicRegime(t *testing.T) {
	s := prep(t, siDevice(1e19, 1e15, 600, Effects{}))
	nd := s.Device.Nd
	n0 := nd/2 + math.Sqrt(nd*nd/4+s.Ni*s.Ni)
	if math.Abs(s.N.Doping/n0-1) > 1e-12 || math.Abs(s.N0/n0-1) > 1e-12 {
		t.Errorf("n0 = %.5g (transport) %.5g (majority), want %.5g m^-3", s.N.Doping, s.N0, n0)
	}
	if want := Q * s.Ni * s.Ni * s.DP / (s.LP * n0) * s.Device.Area; math.Abs(s.IsP/want-1) > 1e-9 {
		t.Errorf("Is,p = %.5g A, q ni^2 Dp/(Lp n0) A = %.5g A", s.IsP, want)
	}
	found := false
	for _, f := range s.Flags {
		found = found || f.Code == FlagIntrinsic
	}
	if !found {
		t.Errorf("ni = %.3g cm^-3 above Nd = 1e15 cm^-3 and no %q flag", s.Ni/perCm3, FlagIntrinsic)
	}
	// Not flagged at 300 K.
	for _, f := range prep(t, siDevice(1e19, 1e15, 300, Effects{})).Flags {
		if f.Code == FlagIntrinsic {
			t.Errorf("flagged at 300 K")
		}
	}
}

// Incomplete ionisation defaults to the textbook single level: Si:P
// 1e17 cm^-3 at 77 K. Reference: the single-level Fermi-Dirac occupation
// with charge neutrality, n^2 + n1 n - n1 Nd = 0, n1 = (Nc/g)
// exp(-(Ec - Ed)/kT) (Sze & Ng 2007, section 1.4.2; Neamen 4th ed.,
// section 4.5), solved here in closed form with the material's Nc and the
// 45 meV level (g = 2): an ionised fraction of 0.135. The density-lowered
// level with an impurity band (junco's own parameters, not a published
// set) stays available as a named option and gave 0.35.
func TestIonisationSingleLevelDefault(t *testing.T) {
	d := siDevice(1e19, 1e17, 77, Effects{Ionisation: true})
	s := prep(t, d)
	m := d.Material
	p, _ := m.Dopant("phosphorus")
	n1 := m.Nc(77) / p.Degeneracy * math.Exp(-p.Ionisation/ThermalVoltage(77))
	nd := d.Nd
	n := (-n1 + math.Sqrt(n1*n1+4*n1*nd)) / 2
	if f := s.NdIonised / nd; math.Abs(f/(n/nd)-1) > 1e-6 || math.Abs(f-0.135) > 0.005 {
		t.Errorf("default ionised fraction %.4f, single-level %.4f (0.135)", f, n/nd)
	}
	if s.Effects.IonisationModel != IonisationSingleLevel || s.Effects.IonisationModel.String() != "single-level" {
		t.Errorf("model used %q", s.Effects.IonisationModel)
	}
	d.Effects.IonisationModel = IonisationLowered
	sl := prep(t, d)
	if f := sl.NdIonised / nd; !(f > 0.2) {
		t.Errorf("lowered option: ionised %.3f, want the lowered level's larger fraction", f)
	}
	// Above the Mott density the single level gives way to a band: the
	// Mott criterion N^(1/3) a* = 0.26 (Edwards & Sienko, Phys. Rev. B 17,
	// 2575 (1978); from memory) with the hydrogenic radius
	// a* = q^2/(8 pi eps E0) puts it at 6.9e18 cm^-3 for a 45 meV level in
	// Si (computed); Si:B 1e19 cm^-3 at 300 K counts as fully ionised, and
	// is flagged.
	if nm := m.MottDensity(p) / perCm3; math.Abs(nm/6.87e18-1) > 0.01 {
		t.Errorf("Mott density %.4g cm^-3, want 6.87e18", nm)
	}
	sh := prep(t, siDevice(1e19, 1e16, 300, Effects{Ionisation: true}))
	if f := sh.NaIonised / sh.Device.Na; f != 1 || !hasFlag(sh.Flags, FlagMottTransition) {
		t.Errorf("Si:B 1e19 at 300 K: ionised %.4f, flags %v", f, sh.Flags)
	}
	if m, err := ParseIonisationModel("lowered"); err != nil || m != IonisationLowered {
		t.Errorf("parse lowered: %v %v", m, err)
	}
	if _, err := ParseIonisationModel("altermatt"); err == nil {
		t.Errorf("unknown model accepted")
	}
}

// storedCharge integrates the steady-state excess minority density of a
// region, q A pe int_0^w f(x) dx, by the trapezoidal rule on 20,000
// intervals (a long region over 30 diffusion lengths); C.
func storedCharge(r QuasiNeutral, pe, area float64) float64 {
	w := r.Width
	if math.IsInf(w, 1) {
		w = 30 * r.DiffusionLength()
	}
	const n = 20000
	sum := 0.0
	for i := 0; i <= n; i++ {
		f, _ := r.ExcessProfile(w * float64(i) / n)
		if i == 0 || i == n {
			f /= 2
		}
		sum += f
	}
	return Q * area * pe * sum * w / n
}

// Storage time by charge control with each region weighted by the charge
// it stores. Reference: the charge-control model, ts = tau_s ln(1 + IF/IR)
// with tau_s = Q/I the stored charge over the forward current (R. H.
// Kingston, Proc. IRE 42, 829 (1954); Sze & Ng 2007, section 2.3.5; from
// memory), the charge Q integrated here from the excess-carrier profiles
// of both regions. Example: Si, Na 1e17, Nd 2e15 cm^-3, 0.0025 cm^2,
// wp 0.4 um (ohmic), wn 40 um (S = 100 cm/s), tau_p 5 us, 296.15 K: the thin
// p side carries most of the current but stores almost no charge; taking
// its transit time gave 29 ps, while the diffusion capacitance implies a
// charge time of about 265 ns.
func TestStorageTimeWeightsStoredCharge(t *testing.T) {
	d := siDevice(1e17, 2e15, 296.15, Effects{})
	d.Area = 0.0025e-4
	d.Wp, d.Wn = 0.4e-6, 40e-6
	d.Sn = 1
	d.TauP = 5e-6
	s := prep(t, d)
	const iF, iR = 1e-3, 1e-3
	sw, ok := s.StorageTime(iF, iR)
	_, vj, _ := s.ForwardVoltage(iF)
	st := s.junction(vj)
	q := storedCharge(s.PEff.QuasiNeutral, st.pen, d.Area) + storedCharge(s.NEff.QuasiNeutral, st.pep, d.Area)
	tau := q / (st.dn + st.dp)
	want := tau * math.Log1p(iF/iR)
	if !ok || sw.Method != "charge-control" || math.Abs(sw.StorageTime/want-1) > 1e-3 {
		t.Errorf("storage time %+v, charge control with the integrated charge %.4g s (tau_s %.4g s)", sw, want, tau)
	}
	p := s.At(vj)
	cdTime := p.DiffusionCap * s.Vt / iF
	if r := tau / cdTime; r < 0.5 || r > 3 {
		t.Errorf("tau_s %.4g s against Cd Vt/I = %.4g s", tau, cdTime)
	}
	t.Logf("ts %.4g s, tau_s %.4g s, Cd Vt/I %.4g s, side %s", sw.StorageTime, tau, cdTime, sw.Side)
}

// Temperature coefficient of avalanche breakdown. 4H-SiC: (1/V) dV/dT =
// 2.6e-4 K^-1 over 300-573 K at V_br 270-290 V (Vasilevskii et al. 2000,
// as quoted by the Ioffe semiconductor archive; seen), against the phonon
// law of the impact coefficients (Crowell & Sze 1966 form) at a doping that
// breaks down near 280 V; within 15 %. Si: the same law gives +0.21 %/K at
// 1e16 cm^-3, while measured avalanche diodes are recalled near +0.1 %/K
// (from memory, low confidence): not checked, so flagged away from 300 K.
func TestBreakdownTemperatureCoefficient(t *testing.T) {
	vb := func(mat string, nb, temp float64) *Static {
		m, _ := MaterialByName(mat)
		inf := math.Inf(1)
		return prep(t, Device{Material: m, Na: 1e20 * perCm3, Nd: nb * perCm3, Temperature: temp, Area: 1e-6,
			Wp: inf, Wn: inf, Sp: inf, Sn: inf, Effects: Effects{Breakdown: true}, NThickness: 1e-3})
	}
	s300, s573 := vb("4h-sic", 1.1e17, 300), vb("4h-sic", 1.1e17, 573)
	v300, v573 := s300.Breakdown.Voltage, s573.Breakdown.Voltage
	if v300 < 250 || v300 > 320 {
		t.Errorf("4H-SiC 1.1e17: VB(300 K) = %.4g V, want near the measured 270-290 V", v300)
	}
	if tc := (v573/v300 - 1) / 273; math.Abs(tc/2.6e-4-1) > 0.15 {
		t.Errorf("4H-SiC: (1/V) dV/dT = %.3g per K, measured 2.6e-4", tc)
	}
	if hasFlag(s573.Flags, FlagBreakdownTemperature) {
		t.Errorf("4H-SiC law is checked: no %q flag", FlagBreakdownTemperature)
	}
	if !hasFlag(vb("si", 1e16, 400).Flags, FlagBreakdownTemperature) {
		t.Errorf("Si at 400 K: want the %q flag", FlagBreakdownTemperature)
	}
	if hasFlag(vb("si", 1e16, 300).Flags, FlagBreakdownTemperature) {
		t.Errorf("Si at 300 K flagged")
	}
}
