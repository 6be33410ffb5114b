package physics

import (
	"math"
	"testing"
)

// bruteSCR integrates the SRH rate over the depletion region with a
// 100000-interval trapezoid rule (the reference for the quadrature).
func bruteSCR(dep Depletion, v float64, sp SCRParams) float64 {
	const n = 100000
	h := dep.W / n
	sum := 0.0
	for i := 0; i <= n; i++ {
		x := -dep.Xp + float64(i)*h
		psi, _ := dep.depletionPotential(x)
		c := math.Exp((v - dep.V) / (2 * sp.Vt))
		p := sp.P0 * math.Exp(-psi/sp.Vt) * c
		nn := sp.N0 * math.Exp((psi-(dep.Vbi-dep.V))/sp.Vt) * c
		u := sp.Ni * sp.Ni * math.Expm1(v/sp.Vt) / (sp.TauP*(nn+sp.Ni) + sp.TauN*(p+sp.Ni))
		w := 1.0
		if i == 0 || i == n {
			w = 0.5
		}
		sum += w * u * h
	}
	return Q * sum
}

// The Gauss-Legendre quadrature of the Sah-Noyce-Shockley integral agrees
// with a brute-force integral of the same SRH rate over the depletion-
// approximation profile (abrupt and graded, forward and reverse) to 1e-5.
func TestSCRQuadrature(t *testing.T) {
	for _, prof := range []ProfileKind{Abrupt, LinearGraded} {
		for _, na := range []float64{1e25, 1e22} {
			d := siDiode()
			d.Na = na
			d.Profile = prof
			d.Gradient = 1e20 * 1e8
			d.TauN, d.TauP = 1e-8, 1e-6
			s := prep(t, d)
			for _, v := range []float64{-30, -5, -0.5, 0.1, 0.3, 0.5, 0.7} {
				dep := s.Junction.Solve(s.VbiNoBGN, math.Min(v, s.Vbi-2*s.Vt))
				j, _ := SCRCurrentDensity(dep, v, s.SCR)
				b := bruteSCR(dep, v, s.SCR)
				if math.Abs(j/b-1) > 1e-5 {
					t.Errorf("%s Na %g V %g: quadrature %g, reference %g", prof, na, v, j, b)
				}
			}
		}
	}
}

// Generation in reverse bias: below the textbook estimate q ni W/(2 tau0),
// tau0 = (tau_n + tau_p)/2 (Neamen 4th ed., eq. 8.74 and Example 8.6),
// because the regions within a few kT of the depletion edges do not
// generate, and tending to it as the depletion region widens.
func TestSCRGenerationLimit(t *testing.T) {
	d := siDiode()
	d.Nd = 1e15 * perCm3
	d.TauN, d.TauP = 1e-6, 1e-6
	s := prep(t, d)
	ratio := func(v float64) float64 {
		dep := s.Junction.Solve(s.VbiNoBGN, v)
		j, _ := SCRCurrentDensity(dep, v, s.SCR)
		return -j / (Q * s.Ni * dep.W / (s.SCR.TauN + s.SCR.TauP))
	}
	r5, r200 := ratio(-5), ratio(-200)
	if !(r5 < 1 && r5 > 0.6 && r200 > r5 && r200 > 0.95 && r200 <= 1) {
		t.Errorf("J_gen / (q ni W/2 tau0) = %g at -5 V, %g at -200 V", r5, r200)
	}
}

// Forward bias: the depletion-region current alone has a local ideality
// near 2 (Sah, Noyce, Shockley 1957), a little below because the
// recombination region narrows as the bias rises and, at low bias, the
// trap-level densities n1 = p1 = ni enter the SRH denominator (computed:
// 1.79 at 0.2 V, about 1.9 above 0.3 V).
func TestSCRIdealityNearTwo(t *testing.T) {
	s := prep(t, siDiode())
	j := func(v float64) float64 {
		jj, _ := SCRCurrentDensity(s.Junction.Solve(s.VbiNoBGN, v), v, s.SCR)
		return jj
	}
	for _, v := range []float64{0.2, 0.3, 0.4} {
		h := 1e-4
		n := 2 * h / (s.Vt * (math.Log(j(v+h)) - math.Log(j(v-h))))
		if n < 1.75 || n > 2.0 {
			t.Errorf("n_SCR(%g V) = %g", v, n)
		}
	}
}
