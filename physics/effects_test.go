package physics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// siDiode returns a silicon p+n diode (1e19 / 1e16 cm^-3, 1 mm^2, long
// regions, ohmic contacts, 300 K) with the realistic effects.
func siDiode() Device {
	m, _ := MaterialByName("si")
	inf := math.Inf(1)
	return Device{Material: m, Na: 1e19 * perCm3, Nd: 1e16 * perCm3, Temperature: 300, Area: 1e-6,
		Wp: inf, Wn: inf, Sp: inf, Sn: inf, Effects: RealisticEffects()}
}

func prep(t testing.TB, d Device) *Static {
	t.Helper()
	s, err := d.Prepare()
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func hasFlag(fs []Flag, code string) bool {
	for _, f := range fs {
		if f.Code == code {
			return true
		}
	}
	return false
}

// With every effect off the model is the ideal Shockley diode.
func TestEffectsOffIsIdeal(t *testing.T) {
	d := siDiode()
	d.Effects = Effects{}
	s := prep(t, d)
	for _, v := range []float64{-5, -0.3, 0, 0.3, 0.6, 0.8} {
		p := s.At(v)
		if p.Current != p.IdealCurrent || p.Vj != v {
			t.Errorf("V = %g: current %g, ideal %g, Vj %g", v, p.Current, p.IdealCurrent, p.Vj)
		}
	}
}

// The current components add up to the total, forward and reverse.
func TestComponentsSum(t *testing.T) {
	d := siDiode()
	d.ShuntResistance = 1e6
	s := prep(t, d)
	for _, v := range []float64{-40, -5, -0.2, 0.1, 0.4, 0.7, 1.2} {
		p := s.At(v)
		sum := p.Diffusion + p.Recombination + p.Generation + p.Shunt
		if math.Abs(sum-p.Current) > 1e-9*math.Abs(p.Current) {
			t.Errorf("V = %g: components %g, total %g", v, sum, p.Current)
		}
		if math.Abs(p.V-p.Vj-p.Current*s.Rs) > 1e-9*math.Max(1, math.Abs(v)) {
			t.Errorf("V = %g: V - Vj - I Rs = %g", v, p.V-p.Vj-p.Current*s.Rs)
		}
	}
}

// Local ideality: 1 where diffusion dominates (Shockley 1949), near 2 where
// depletion-region recombination dominates (Sah, Noyce, Shockley 1957;
// Neamen 4th ed., section 8.2), e.g. Si with nanosecond lifetimes at low
// forward bias.
func TestLocalIdeality(t *testing.T) {
	d := siDiode()
	d.TauN, d.TauP = 1e-4, 1e-4 // long lifetimes: diffusion dominates at 0.5 V
	s := prep(t, d)
	if n := s.At(0.5).Ideality; math.Abs(n-1) > 0.02 {
		t.Errorf("diffusion regime: n = %g, want 1", n)
	}
	d.TauN, d.TauP = 1e-9, 1e-9
	s = prep(t, d)
	p := s.At(0.25)
	if !(p.Recombination > 10*p.Diffusion) {
		t.Fatalf("recombination %g does not dominate diffusion %g", p.Recombination, p.Diffusion)
	}
	if n := p.Ideality; !(n > 1.8 && n < 2.05) {
		t.Errorf("recombination regime: n = %g, want near 2", n)
	}
}

// dVF/dT of a silicon diode at moderate current is about -2 mV/K (common
// practice: -1.7 to -2.5 mV/K; e.g. Sedra & Smith, attribution from memory).
func TestForwardVoltageTemperatureCoefficient(t *testing.T) {
	s := prep(t, siDiode())
	vf, dv, err := s.ForwardVoltageTemperature(1e-3, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	if dv > -1.7e-3 || dv < -2.5e-3 {
		t.Errorf("dVF/dT = %g V/K, want about -2 mV/K", dv)
	}
	if vf < 0.5 || vf > 0.75 {
		t.Errorf("VF(1 mA) = %g V", vf)
	}
	// The terminal current at VF is the reference current.
	if p := s.Solve(vf); math.Abs(p.Current-1e-3) > 1e-6*1e-3 {
		t.Errorf("I(VF) = %g A", p.Current)
	}
}

// Series-resistance limit: at high current dV/dI tends to Rs (plus the
// vanishing junction resistance n Vt/I).
func TestSeriesResistanceLimit(t *testing.T) {
	d := siDiode()
	d.ContactResistance = 2
	s := prep(t, d)
	p1, p2 := s.Solve(4.0), s.Solve(4.1)
	r := (p2.V - p1.V) / (p2.Current - p1.Current)
	if math.Abs(r-s.Rs)/s.Rs > 0.02 {
		t.Errorf("dV/dI = %g ohm at %g A, Rs = %g ohm", r, p1.Current, s.Rs)
	}
	if !hasFlag(p1.Flags, FlagSeriesDominates) || !hasFlag(p1.Flags, FlagHighInjection) {
		t.Errorf("high-current flags missing: %v", p1.Flags)
	}
}

// With only the series resistance, the solution equals the explicit
// Lambert-W form of Banwell & Jayakumar, Electron. Lett. 36, 291 (2000).
func TestSolverMatchesLambertW(t *testing.T) {
	d := siDiode()
	d.Effects = Effects{SeriesResistance: true}
	d.ContactResistance = 10
	s := prep(t, d)
	for _, v := range []float64{0.3, 0.5, 0.7, 1.0, 3.0} {
		p := s.Solve(v)
		vj := lambertGuess(s.IsDiff, s.Rs, s.Vt, v)
		want := (v - vj) / s.Rs
		if math.Abs(p.Current-want) > 1e-8*want {
			t.Errorf("V = %g: I = %.12g, Lambert W %.12g", v, p.Current, want)
		}
	}
}

// Property test: over random valid junctions (fixed seed) the
// self-consistent solution converges at every bias from beyond breakdown to
// high forward current, including Rs = 0 and huge Rs, satisfies
// V = Vj + I Rs, and I(V) is monotone.
func TestSolverProperty(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	mats := []string{"si", "ge", "gaas", "4h-sic"}
	logU := func(lo, hi float64) float64 { return math.Pow(10, lo+(hi-lo)*rng.Float64()) }
	for k := 0; k < 40; k++ {
		m, _ := MaterialByName(mats[k%len(mats)])
		inf := math.Inf(1)
		d := Device{Material: m, Na: logU(15, 19) * perCm3, Nd: logU(15, 19) * perCm3, Temperature: 250 + 150*rng.Float64(),
			Area: logU(-10, -5), Wp: inf, Wn: inf, Sp: inf, Sn: inf, Effects: RealisticEffects()}
		if rng.IntN(3) == 0 {
			d.Wn = logU(-6, -4)
		}
		switch k % 3 {
		case 0:
			d.Effects.SeriesResistance = false
		case 1:
			d.ContactResistance = logU(-3, 9)
		}
		if rng.IntN(4) == 0 {
			d.ShuntResistance = logU(3, 12)
		}
		s, err := d.Prepare()
		if err != nil {
			t.Fatalf("case %d: %v", k, err)
		}
		vb := s.Breakdown.Voltage
		if math.IsNaN(vb) {
			vb = 50
		}
		prev := math.Inf(-1)
		for i := 0; i <= 40; i++ {
			v := -1.5*vb + (1.5*vb+3)*float64(i)/40
			p := s.Solve(v)
			if !p.Converged {
				t.Fatalf("case %d (%s, Rs %g): not converged at %g V", k, m.Key, s.Rs, v)
			}
			if s.Rs == 0 && v <= -vb {
				if !hasFlag(p.Flags, FlagBeyondBreakdown) {
					t.Fatalf("case %d: beyond breakdown at %g V not flagged", k, v)
				}
				continue
			}
			if math.IsNaN(p.Current) {
				t.Fatalf("case %d: NaN current at %g V", k, v)
			}
			if s.Rs > 0 && !math.IsInf(p.Current, 0) {
				if r := p.V - p.Vj - p.Current*s.Rs; math.Abs(r) > 1e-6*math.Max(1, math.Abs(v)) {
					t.Fatalf("case %d: residual %g at %g V", k, r, v)
				}
			}
			if p.Current < prev*(1+1e-9) && p.Current < prev-1e-30 {
				t.Fatalf("case %d: current falls from %g to %g at %g V", k, prev, p.Current, v)
			}
			prev = p.Current
		}
	}
}

// Huge series resistance: the current is V/Rs to first order and the
// solver still converges (Rs = 1e12 ohm).
func TestSolverHugeResistance(t *testing.T) {
	d := siDiode()
	d.ContactResistance = 1e12
	s := prep(t, d)
	for _, v := range []float64{-10, 0.7, 5, 20} {
		p := s.Solve(v)
		if !p.Converged || math.IsNaN(p.Current) {
			t.Fatalf("V = %g: %+v", v, p)
		}
		if v > 1 && math.Abs(p.Current-(v-p.Vj)/s.Rs) > 1e-9*math.Abs(p.Current) {
			t.Errorf("V = %g: I = %g, (V - Vj)/Rs = %g", v, p.Current, (v-p.Vj)/s.Rs)
		}
	}
}

// High injection: the onset flag appears once the injected density passes
// 10% of the doping.
func TestHighInjectionFlag(t *testing.T) {
	s := prep(t, siDiode())
	if p := s.At(0.55); hasFlag(p.Flags, FlagHighInjection) {
		t.Errorf("flagged at 0.55 V: injection %g", p.InjectionN)
	}
	p := s.At(0.9)
	if !hasFlag(p.Flags, FlagHighInjection) || p.InjectionN < 0.1 {
		t.Errorf("not flagged at 0.9 V: injection %g", p.InjectionN)
	}
}

// The total capacitance is the depletion capacitance in reverse bias and is
// dominated by the diffusion capacitance at forward current; for the long
// base Cd = tau I/(2 Vt) (Neamen 4th ed., section 8.3).
func TestCapacitances(t *testing.T) {
	d := siDiode()
	d.Effects = Effects{}
	s := prep(t, d)
	p := s.At(-2)
	if math.Abs(p.TotalCap-p.Cap) > 1e-6*p.Cap {
		t.Errorf("reverse: total %g, depletion %g", p.TotalCap, p.Cap)
	}
	p = s.At(0.65)
	want := (s.TauP*p.IdealP + s.TauN*p.IdealN) / (2 * s.Vt)
	if math.Abs(p.DiffusionCap-want) > 1e-4*want {
		t.Errorf("Cd = %g, tau I/(2Vt) = %g", p.DiffusionCap, want)
	}
}

// Temperatures outside the models' ranges are flagged.
func TestTemperatureFlags(t *testing.T) {
	d := siDiode()
	d.Temperature = 600
	s := prep(t, d)
	for _, c := range []string{FlagImpactRange, FlagLifetimeTemp, FlagBGNModel} {
		if !hasFlag(s.Flags, c) {
			t.Errorf("600 K: flag %s missing", c)
		}
	}
	d.Temperature = 300
	s = prep(t, d)
	for _, c := range []string{FlagImpactRange, FlagLifetimeTemp, FlagBGNModel} {
		if hasFlag(s.Flags, c) {
			t.Errorf("300 K: flag %s present", c)
		}
	}
}

// Storage time: Kingston, Proc. IRE 42, 829 (1954), erf(sqrt(ts/tau)) =
// IF/(IF+IR); for IF = IR, ts = 0.2275 tau (computed: erfinv(0.5)^2).
func TestStorageTime(t *testing.T) {
	if r := KingstonStorageTime(1, 1, 1); math.Abs(r-0.22747) > 1e-4 {
		t.Errorf("ts/tau = %g, want 0.2275", r)
	}
	for _, ratio := range []float64{0.1, 1, 10} {
		ts := KingstonStorageTime(2e-6, 1e-3, ratio*1e-3)
		if got := math.Erf(math.Sqrt(ts / 2e-6)); math.Abs(got-1/(1+ratio)) > 1e-12 {
			t.Errorf("round trip %g", got)
		}
	}
	// Charge control weights each region by its stored charge: a long
	// region stores tau I (Kingston 1954), so tau_eff = (tau_p Ip +
	// tau_n In)/(Ip + In); the p+ side's electrons (tau_n short, their
	// current raised by band-gap narrowing) take a share.
	s := prep(t, siDiode())
	sw, ok := s.StorageTime(1e-3, 1e-3)
	_, vj, _ := s.ForwardVoltage(1e-3)
	st := s.junction(vj)
	tau := (s.TauP*st.dp + s.TauN*st.dn) / (st.dp + st.dn)
	if !ok || sw.Method != "kingston" || sw.Side != "n" || math.Abs(sw.StorageTime-0.22747*tau) > 1e-3*tau {
		t.Errorf("p+n long base: %+v (tau_eff %g)", sw, tau)
	}
	// Short base with an ohmic contact: charge control; the n side stores
	// its current times the transit time w^2/(2D).
	d := siDiode()
	d.Wn = 2e-6
	s = prep(t, d)
	sw, _ = s.StorageTime(1e-3, 1e-3)
	_, vj, _ = s.ForwardVoltage(1e-3)
	st = s.junction(vj)
	tt := d.Wn * d.Wn / (2 * s.DP)
	tau = (tt*st.dp + s.TauN*st.dn) / (st.dp + st.dn)
	if sw.Method != "charge-control" || math.Abs(sw.Lifetime-tau) > 0.01*tau {
		t.Errorf("short base: %+v, charge-weighted time %g (transit time %g)", sw, tau, tt)
	}
}

// The Gauss-Legendre rules integrate polynomials up to degree 2n-1 exactly
// (Abramowitz & Stegun 1964, 25.4.29).
func TestGaussLegendreRules(t *testing.T) {
	check := func(name string, rule [][2]float64) {
		n := 2 * len(rule)
		for k := 0; k <= 2*n-1; k += 2 { // odd powers vanish by symmetry
			sum := 0.0
			for _, nw := range rule {
				sum += 2 * nw[1] * math.Pow(nw[0], float64(k))
			}
			if want := 2 / float64(k+1); math.Abs(sum-want) > 1e-14 {
				t.Errorf("%s: int x^%d = %.16g, want %.16g", name, k, sum, want)
			}
		}
	}
	g8, g10 := gl8(), gl10()
	check("GL8", g8[:])
	check("GL10", g10[:])
}
