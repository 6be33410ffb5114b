package physics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Neamen, Semiconductor Physics and Devices, 4th ed. (2012), uses
// kT/q = 0.0259 V, eps0 = 8.85e-14 F/cm, eps_r = 11.7 and ni = 1.5e10 cm^-3.
// The book's kT/q is reproduced by the temperature tBook below; its q of
// 1.6e-19 C differs from CODATA by 0.14%, inside the tolerances used.
var (
	tBook   = 0.0259 * Q / KB
	epsBook = 11.7 * 8.85e-12 // F/m
	niBook  = 1.5e10 * 1e6    // m^-3
)

func TestNeamenBuiltInPotential(t *testing.T) {
	// Example 7.1: Nd = 2e17, Na = 1e15 cm^-3 -> Vbi = 0.713 V; second case
	// Na = 1e16, Nd = 1e15 -> 0.635 V.
	for _, c := range []struct{ na, nd, want float64 }{{1e15, 2e17, 0.713}, {1e16, 1e15, 0.635}} {
		v := BuiltInPotential(c.na*1e6, c.nd*1e6, niBook, tBook)
		if math.Abs(v-c.want) > 0.001 {
			t.Errorf("Vbi(Na=%g, Nd=%g) = %.4f V, want %.3f (Neamen Ex. 7.1)", c.na, c.nd, v, c.want)
		}
	}
}

func TestNeamenDepletionExamples(t *testing.T) {
	na, nd := 1e16*1e6, 1e15*1e6
	vbi := BuiltInPotential(na, nd, niBook, tBook)
	// Example 7.2 (V = 0): W = 0.951 um, xn = 0.8644 um, xp = 0.0864 um,
	// |Emax| = 1.34e4 V/cm.
	d := AbruptDepletion(epsBook, na, nd, vbi, 0)
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"W", d.W * 1e6, 0.951, 5e-3},
		{"xn", d.Xn * 1e6, 0.8644, 5e-3},
		{"xp", d.Xp * 1e6, 0.0864, 5e-3},
		{"Emax", d.PeakField / 100, 1.34e4, 5e-3},
	} {
		if r := rel(c.got, c.want); r > c.tol {
			t.Errorf("Neamen Ex. 7.2 %s = %.4g, want %.4g", c.name, c.got, c.want)
		}
	}
	// Example 7.3 (VR = 5 V): W = 2.83 um; Example 7.5: C' = 3.66e-9 F/cm^2.
	d5 := AbruptDepletion(epsBook, na, nd, vbi, -5)
	if r := rel(d5.W*1e6, 2.83); r > 5e-3 {
		t.Errorf("Neamen Ex. 7.3 W(5 V) = %.4f um, want 2.83", d5.W*1e6)
	}
	if r := rel(d5.CapPerArea*1e-4, 3.66e-9); r > 5e-3 {
		t.Errorf("Neamen Ex. 7.5 C'(5 V) = %.4g F/cm^2, want 3.66e-9", d5.CapPerArea*1e-4)
	}
}

// Internal identities of the depletion approximation for random junctions:
// Na xp = Nd xn, psi(xn) = Vbi - V, the sampled field integrates to Vbi - V,
// the peak of |E| is PeakField, and C' = eps/W.
func TestDepletionIdentities(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	eps := 11.7 * Eps0
	for i := 0; i < 300; i++ {
		na := math.Pow(10, 20+rng.Float64()*6)
		nd := math.Pow(10, 20+rng.Float64()*6)
		j := Junction{Eps: eps, Na: na, Nd: nd}
		if i%2 == 1 {
			j.Profile = LinearGraded
			j.Gradient = math.Pow(10, 23+rng.Float64()*10)
		}
		vbi := 0.3 + rng.Float64()*0.8
		v := vbi - 0.05 - rng.Float64()*50
		d := j.Solve(vbi, v)
		if !d.Valid {
			t.Fatalf("case %d invalid: %s", i, d.Problem)
		}
		if r := rel(j.chargeN(d.Xn), j.chargeP(d.Xp)); r > 1e-9 {
			t.Fatalf("case %d (%v): charge imbalance %g", i, j.Profile, r)
		}
		if j.Profile == Abrupt {
			if r := rel(na*d.Xp, nd*d.Xn); r > 1e-12 {
				t.Fatalf("Na xp != Nd xn: %g", r)
			}
		}
		pts := d.Profile(401)
		last := pts[len(pts)-1]
		if r := rel(last.Potential, vbi-v); r > 1e-6 {
			t.Fatalf("case %d (%v): psi(end) = %g, want Vbi - V = %g", i, j.Profile, last.Potential, vbi-v)
		}
		// Trapezoid integral of the sampled field.
		integral, peak := 0.0, 0.0
		for k := 1; k < len(pts); k++ {
			integral -= 0.5 * (pts[k].Field + pts[k-1].Field) * (pts[k].X - pts[k-1].X)
		}
		for _, p := range pts {
			peak = math.Max(peak, math.Abs(p.Field))
		}
		if r := rel(integral, vbi-v); r > 2e-3 {
			t.Fatalf("case %d (%v): integral of E = %g, want %g", i, j.Profile, integral, vbi-v)
		}
		if r := rel(peak, d.PeakField); r > 1e-9 {
			t.Fatalf("case %d: sampled peak %g vs PeakField %g", i, peak, d.PeakField)
		}
		if r := rel(d.CapPerArea, eps/d.W); r > 1e-12 {
			t.Fatalf("C' != eps/W")
		}
	}
}

// Linearly graded junction inside its graded region (plateaus far away):
// W = (12 eps (Vbi - V)/(q a))^(1/3), Emax = q a W^2/(8 eps), and
// C' = [q a eps^2 / (12 (Vbi + VR))]^(1/3) (Sze & Ng 2007, eqs. 2.33-2.36;
// Neamen 4th ed., section 7.5.1); built-in potential self-consistent with
// Vbi = (2kT/q) ln(a W/(2 ni)) (Sze & Ng 2007, eq. 2.37).
func TestLinearGradedClassicFormulas(t *testing.T) {
	eps := 11.7 * Eps0
	a := 1e20 * 1e8 // 1e20 cm^-4
	j := Junction{Eps: eps, Na: 1e27, Nd: 1e27, Profile: LinearGraded, Gradient: a}
	ni := 9.65e15
	vbi := j.GradedBuiltInPotential(ni, 300)
	d0 := j.Solve(vbi, 0)
	if r := math.Abs(vbi - 2*ThermalVoltage(300)*math.Log(a*d0.W/(2*ni))); r > 1e-9 {
		t.Errorf("Vbi = %.6f V not self-consistent with W: residual %g", vbi, r)
	}
	for _, vr := range []float64{0, 1, 10} {
		d := j.Solve(vbi, -vr)
		w := math.Cbrt(12 * eps * (vbi + vr) / (Q * a))
		if r := rel(d.W, w); r > 1e-9 {
			t.Errorf("VR=%g: W = %g, want %g", vr, d.W, w)
		}
		if r := rel(d.PeakField, Q*a*w*w/(8*eps)); r > 1e-9 {
			t.Errorf("VR=%g: Emax = %g", vr, d.PeakField)
		}
		if r := rel(d.CapPerArea, math.Cbrt(Q*a*eps*eps/(12*(vbi+vr)))); r > 1e-9 {
			t.Errorf("VR=%g: C' = %g", vr, d.CapPerArea)
		}
	}
}

// A very steep gradient makes the graded junction abrupt: its Vbi and W
// tend to the step junction's (limit of the clamped profile).
func TestSteepGradientTendsToAbrupt(t *testing.T) {
	eps := 11.7 * Eps0
	na, nd := 1e23, 1e22
	ni := 9.65e15
	g := Junction{Eps: eps, Na: na, Nd: nd, Profile: LinearGraded, Gradient: 1e36}
	vbiG := g.GradedBuiltInPotential(ni, 300)
	vbiA := BuiltInPotential(na, nd, ni, 300)
	if math.Abs(vbiG-vbiA) > 1e-6 {
		t.Errorf("steep graded Vbi %g vs abrupt %g", vbiG, vbiA)
	}
	if r := rel(g.Solve(vbiG, -2).W, AbruptDepletion(eps, na, nd, vbiA, -2).W); r > 1e-4 {
		t.Errorf("steep graded W differs from abrupt by %g", r)
	}
}

// At or beyond V >= Vbi the depletion approximation fails: the result says
// so and carries no numbers.
func TestDepletionFailsAtBuiltIn(t *testing.T) {
	for _, j := range []Junction{{Eps: 1e-10, Na: 1e22, Nd: 1e22}, {Eps: 1e-10, Na: 1e22, Nd: 1e22, Profile: LinearGraded, Gradient: 1e28}} {
		for _, v := range []float64{0.7, 0.9, 5} {
			d := j.Solve(0.7, v)
			if d.Valid || !math.IsNaN(d.W) || !math.IsNaN(d.CapPerArea) || d.Problem == "" {
				t.Errorf("%v V=%g: %+v", j.Profile, v, d)
			}
			if d.Profile(50) != nil {
				t.Errorf("profile sampled for an invalid solution")
			}
		}
	}
}

// Property: W grows with reverse bias.
func TestWidthGrowsWithReverseBias(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for i := 0; i < 300; i++ {
		j := Junction{Eps: 11.7 * Eps0, Na: math.Pow(10, 20+rng.Float64()*6), Nd: math.Pow(10, 20+rng.Float64()*6)}
		if i%2 == 0 {
			j.Profile, j.Gradient = LinearGraded, math.Pow(10, 23+rng.Float64()*10)
		}
		v1 := -rng.Float64() * 100
		v2 := v1 - 0.01 - rng.Float64()*100
		if w1, w2 := j.Solve(0.7, v1).W, j.Solve(0.7, v2).W; !(w2 > w1) {
			t.Fatalf("W(%g) = %g not above W(%g) = %g", v2, w2, v1, w1)
		}
	}
}
