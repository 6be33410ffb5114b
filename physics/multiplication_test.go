package physics

import (
	"math"
	"testing"
)

// miller is Miller's empirical multiplication M = 1/(1 - (V/VB)^n) (S. L.
// Miller, "Avalanche breakdown in germanium", Phys. Rev. 99, 1234 (1955);
// Sze & Ng 2007, ch. 2), the reference the ionisation-integral factors are
// compared with below. junco itself multiplies with the integrals.
func miller(vr, vb, n float64) float64 { return 1 / (1 - math.Pow(vr/vb, n)) }

// Miller's formula at a few |V|/VB against values worked by hand:
// n = 3: 1/(1 - 0.125) = 8/7, 1/(1 - 0.729) = 1/0.271, 1/(1 - 0.970299) =
// 1/0.029701; n = 6 at 0.9: 1/(1 - 0.531441) = 1/0.468559.
func TestMillerHandValues(t *testing.T) {
	for _, c := range []struct{ x, n, want float64 }{
		{0.5, 3, 8.0 / 7}, {0.9, 3, 1 / 0.271}, {0.99, 3, 1 / 0.029701}, {0.9, 6, 1 / 0.468559}, {0.1, 4, 1 / 0.9999},
	} {
		if got := miller(c.x*100, 100, c.n); math.Abs(got/c.want-1) > 1e-12 {
			t.Errorf("Miller M(%g VB, n = %g) = %.15g, want %.15g", c.x, c.n, got, c.want)
		}
	}
}

// Far from breakdown every factor tends to 1 (the ionisation integral An
// -> 0): at 0.1 and 0.3 VB each factor of the one-sided Si junction lies
// between 1 and Miller's M with n = 2, the lowest exponent of the range
// quoted for Miller's fit (Sze & Ng 2007, ch. 2; from memory), i.e. 1.0101
// and 1.099; at zero bias and in forward bias the factors are 1 exactly.
func TestMultiplicationFarFromBreakdown(t *testing.T) {
	s := oneSided(t, "si", 1e16)
	vb := s.Breakdown.Voltage
	for _, x := range []float64{0.1, 0.3} {
		m, ok := s.MultiplicationAt(x * vb)
		if !ok {
			t.Fatalf("%g VB: beyond breakdown?", x)
		}
		bound := miller(x, 1, 2)
		for _, f := range []float64{m.Mn, m.Mp, m.Mgen, m.Mbeam} {
			if !(f >= 1 && f <= bound) {
				t.Errorf("%g VB: %+v, want each in [1, %.5g]", x, m, bound)
			}
		}
	}
	for _, vr := range []float64{0, -0.3} {
		if m, ok := s.MultiplicationAt(vr); !ok || m.Mn != 1 || m.Mp != 1 || m.Mgen != 1 || m.Mbeam != 1 {
			t.Errorf("Vr = %g: %+v", vr, m)
		}
	}
}

// The ionisation-integral multiplication against Miller's fit
// M = 1/(1 - (V/VB)^n) (Miller 1955; Sze & Ng 2007, ch. 2). The hole
// factor Mp of a p+n Si junction (holes injected from the lightly doped
// side: its dark diffusion current and the n region's photocurrent),
// with n fitted at 0.9 VB, reproduces Mp at 0.5 and 0.99 VB within 10 %
// (Miller's single-exponent shape holds), and the fitted exponent lies in
// the 2-6 quoted for Miller's n (Sze & Ng 2007, ch. 2; from memory) at
// 1e16 and 1e17 cm^-3 (5.3 and 2.7). Not asserted, found and reported: at
// 1e15 cm^-3 the fitted exponent is 8.9 (13.7 at 1e14), above that range;
// and the electron factor Mn (electrons entering at the p+ edge, where
// the field peaks) does not have Miller's shape (its fitted exponent falls
// from about 2.3 at 0.5 VB to 1.0 at 0.99 VB at 1e15 cm^-3), which is why
// junco multiplies with the integrals, not with one Miller exponent.
func TestIntegralMultiplicationAgainstMiller(t *testing.T) {
	for _, c := range []struct {
		nb      float64
		inRange bool
	}{{1e15, false}, {1e16, true}, {1e17, true}} {
		s := oneSided(t, "si", c.nb)
		vb := s.Breakdown.Voltage
		m9, _ := s.MultiplicationAt(0.9 * vb)
		n := math.Log(1-1/m9.Mp) / math.Log(0.9)
		if c.inRange && !(n >= 2 && n <= 6) {
			t.Errorf("NB %g: Miller exponent fitted at 0.9 VB = %.3g, outside 2-6", c.nb, n)
		}
		for _, x := range []float64{0.5, 0.99} {
			m, _ := s.MultiplicationAt(x * vb)
			if want := miller(x*vb, vb, n); math.Abs(m.Mp/want-1) > 0.1 {
				t.Errorf("NB %g, %g VB: Mp = %.4g, Miller (n = %.3g) %.4g", c.nb, x, m.Mp, n, want)
			}
		}
		t.Logf("NB %g cm^-3: VB %.4g V, Miller n fitted to Mp at 0.9 VB: %.3g", c.nb, vb, n)
	}
}

// The multiplication of a beam absorbed in the depletion region between
// its limits (identities of the weighted mean): a weakly absorbed beam
// (alpha W << 1) is multiplied like uniform generation (Mgen); a strongly
// absorbed one entering from the p side like electrons injected at the
// p-side edge (Mn), from the n side like holes at the n-side edge (Mp).
func TestBeamMultiplicationLimits(t *testing.T) {
	s := oneSided(t, "si", 1e16)
	vb := s.Breakdown.Voltage
	m, _ := s.MultiplicationAt(0.95 * vb)
	a := s.aval
	den := 1 / m.Mn // 1 - An
	for _, c := range []struct {
		alpha float64
		fromN bool
		want  float64
		tol   float64
	}{
		{1e-3, false, m.Mgen, 2e-3}, {1e-3, true, m.Mgen, 2e-3},
		{1e10, false, m.Mn, 1e-3}, {1e10, true, m.Mp, 1e-3},
	} {
		got := a.beamMeanExp(m.PeakField, c.alpha, c.fromN) / den
		if math.Abs(got/c.want-1) > c.tol {
			t.Errorf("alpha %g, from n %v: Mbeam = %.6g, want %.6g", c.alpha, c.fromN, got, c.want)
		}
	}
	if !(m.Mn > m.Mgen && m.Mgen > m.Mp) {
		t.Errorf("Si (alpha_n > alpha_p): want Mn > Mgen > Mp, got %+v", m)
	}
}

// photodiode is a Si p+n photodiode lit by a beam from the p side and a
// uniform generation, with the avalanche the only effect (so that the
// current is a sum of closed forms; no series resistance to rescale it).
func photodiode(t *testing.T) *Static {
	m, _ := MaterialByName("si")
	d := Device{Material: m, Na: 1e19 * perCm3, Nd: 2e15 * perCm3, Temperature: 300, Area: 1e-6,
		Wp: 0.4e-6, Wn: 40e-6, Sp: 1e4, Sn: 1, Effects: Effects{Breakdown: true},
		Light: Light{Generation: 1e24, PhotonFlux: PhotonFluxOf(10, 650e-9), Absorption: 3e5}}
	return prep(t, d)
}

// The photocurrent at a reverse bias is multiplied part by part with the
// same factors as the dark current (Mn for the p region's electrons, Mp
// for the n region's holes, Mgen and Mbeam for the depletion region's
// uniform and beam parts), the current stays the sum of its parts, and at
// zero and forward bias nothing is multiplied (Photo = IL exactly).
func TestPhotocurrentMultiplied(t *testing.T) {
	s := photodiode(t)
	vb := s.Breakdown.Voltage
	for _, v := range []float64{0, 0.3, 0.5} {
		p := s.Solve(v)
		if p.Photo != s.IL || p.PhotoGain != 1 {
			t.Errorf("%g V: Photo %g, IL %g, gain %g", v, p.Photo, s.IL, p.PhotoGain)
		}
	}
	prev := 1.0
	for _, x := range []float64{0.5, 0.9, 0.99} {
		p := s.Solve(-x * vb)
		m, _ := s.MultiplicationAt(x * vb)
		want := m.Mn*s.Photo.P + m.Mp*s.Photo.N + m.Mgen*s.photoDepUniform + m.Mbeam*s.photoDepBeam
		if math.Abs(p.Photo/want-1) > 1e-9 || p.Mn != m.Mn || p.Mp != m.Mp {
			t.Errorf("%g VB: Photo %g, want %g (%+v)", x, p.Photo, want, m)
		}
		if sum := p.Diffusion + p.Recombination + p.Generation + p.Shunt - p.Photo; math.Abs(sum-p.Current) > 1e-9*math.Abs(p.Current) {
			t.Errorf("%g VB: parts sum to %g, current %g", x, sum, p.Current)
		}
		if !(p.PhotoGain > prev) || !hasFlag(p.Flags, FlagNearBreakdown) && p.PhotoGain > 1.1 {
			t.Errorf("%g VB: gain %g after %g, flags %v", x, p.PhotoGain, prev, p.Flags)
		}
		prev = p.PhotoGain
		t.Logf("%.2f VB = %.4g V: Mn %.4g Mp %.4g Mgen %.4g Mbeam %.4g, photocurrent %.4g A (IL %.4g A, gain %.4g)",
			x, x*vb, m.Mn, m.Mp, m.Mgen, m.Mbeam, p.Photo, s.IL, p.PhotoGain)
	}
	if s.photoDepUniform <= 0 || s.photoDepBeam <= 0 || math.Abs(s.photoDepUniform+s.photoDepBeam-s.Photo.Depletion) > 1e-12*s.Photo.Depletion {
		t.Errorf("depletion photocurrent split %g + %g, total %g", s.photoDepUniform, s.photoDepBeam, s.Photo.Depletion)
	}
}

// Within a hair of breakdown the factors are capped at MaxMultiplication
// and flagged; the current stays finite there and the near-breakdown flag
// concerns the lit results.
func TestMultiplicationCapped(t *testing.T) {
	s := photodiode(t)
	vb := s.Breakdown.Voltage
	p := s.Solve(-(1 - 1e-7) * vb)
	if !p.MultiplicationCapped || p.Mn != MaxMultiplication || !hasFlag(p.Flags, FlagMultiplicationCapped) || math.IsInf(p.Current, 0) {
		t.Fatalf("at VB(1 - 1e-7): %+v", p)
	}
	for _, f := range p.Flags {
		if f.Code == FlagNearBreakdown && !f.Concerns([]Class{ClassLightAtBias}) {
			t.Errorf("near-breakdown flag does not concern the lit results: %+v", f)
		}
	}
	if q := s.Solve(-0.5 * vb); q.MultiplicationCapped || hasFlag(q.Flags, FlagMultiplicationCapped) {
		t.Errorf("capped at 0.5 VB: %+v", q)
	}
}

// Solve at 0.99 VB, lit (the photocurrent multiplied, with the beam's
// weighted mean) and dark, for the ratio of the two.
func BenchmarkSolveNearBreakdownLit(b *testing.B)  { benchNearBreakdown(b, true) }
func BenchmarkSolveNearBreakdownDark(b *testing.B) { benchNearBreakdown(b, false) }

func benchNearBreakdown(b *testing.B, lit bool) {
	m, _ := MaterialByName("si")
	d := Device{Material: m, Na: 1e19 * perCm3, Nd: 2e15 * perCm3, Temperature: 300, Area: 1e-6,
		Wp: 0.4e-6, Wn: 40e-6, Sp: 1e4, Sn: 1, Effects: RealisticEffects()}
	if lit {
		d.Light = Light{PhotonFlux: PhotonFluxOf(10, 650e-9), Absorption: 3e5}
	}
	s, err := d.Prepare()
	if err != nil {
		b.Fatal(err)
	}
	v := -0.99 * s.Breakdown.Voltage
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		s.Solve(v)
	}
}
