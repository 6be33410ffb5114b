package physics

import (
	"fmt"
	"math"
	"testing"
)

// collectedByFiniteDifference solves the minority-carrier diffusion
// equation with generation, D p” - p/tau + gen(x) = 0, on [0, h] by
// second-order finite differences (an independent numerical solution of
// the equation the closed forms solve), with p = 0 at the depletion edge
// and D |p'| = S p at the other end, and returns the current density
// q D |p'| collected at the edge. edgeAt0 puts the depletion edge at x = 0
// (a region behind the depletion region); otherwise at x = h (the region
// under the illuminated surface, the surface at x = 0).
func collectedByFiniteDifference(r QuasiNeutral, gen func(x float64) float64, h float64, edgeAt0 bool) float64 {
	const n = 40000
	dx := h / n
	d, tau, s := r.Diffusivity, r.Lifetime, r.Recombination
	// Unknowns p_0..p_n; tridiagonal a_i p_{i-1} + b_i p_i + c_i p_{i+1} = rhs_i.
	a := make([]float64, n+1)
	b := make([]float64, n+1)
	c := make([]float64, n+1)
	rhs := make([]float64, n+1)
	for i := 1; i < n; i++ {
		a[i], b[i], c[i] = d/(dx*dx), -2*d/(dx*dx)-1/tau, d/(dx*dx)
		rhs[i] = -gen(float64(i) * dx)
	}
	edge, surf := 0, n
	if !edgeAt0 {
		edge, surf = n, 0
	}
	b[edge], rhs[edge] = 1, 0
	// Surface: flux into the surface D |p'| = S p, written with a
	// half-cell balance (second order): the control volume of width dx/2
	// at the surface gains D (p_in - p_s)/dx from inside, loses S p_s and
	// recombines p_s/tau dx/2, gains gen dx/2.
	xs := float64(surf) * dx
	if math.IsInf(s, 1) {
		b[surf], rhs[surf] = 1, 0
	} else {
		b[surf] = -d/dx - s - dx/(2*tau)
		rhs[surf] = -gen(xs) * dx / 2
		if surf == 0 {
			c[0] = d / dx
		} else {
			a[n] = d / dx
		}
	}
	// Thomas algorithm.
	for i := 1; i <= n; i++ {
		m := a[i] / b[i-1]
		b[i] -= m * c[i-1]
		rhs[i] -= m * rhs[i-1]
	}
	p := make([]float64, n+1)
	p[n] = rhs[n] / b[n]
	for i := n - 1; i >= 0; i-- {
		p[i] = (rhs[i] - c[i]*p[i+1]) / b[i]
	}
	// Collected flux at the edge from the half-cell balance there.
	if edgeAt0 {
		return Q * (d*(p[1]-p[0])/dx + (gen(0)-p[0]/tau)*dx/2)
	}
	return Q * (d*(p[n-1]-p[n])/dx + (gen(h)-p[n]/tau)*dx/2)
}

func photoRegion(hOverL, sigma float64) QuasiNeutral {
	const d, tau = 1e-3, 1e-6 // 10 cm^2/s, 1 us: L = 31.6 um
	l := math.Sqrt(d * tau)
	return QuasiNeutral{Doping: 1e22, Diffusivity: d, Lifetime: tau, Width: hOverL * l, Recombination: sigma * d / l}
}

// The closed forms against an independent finite-difference solution of
// the same diffusion equation with generation, over widths, surface
// velocities and absorption lengths (including alpha L = 1).
func TestPhotocurrentClosedFormsAgainstFiniteDifferences(t *testing.T) {
	const g = 1e26 // m^-3 s^-1
	for _, hl := range []float64{0.1, 1, 4} {
		for _, sigma := range []float64{0, 1, 30, math.Inf(1)} {
			r := photoRegion(hl, sigma)
			l := r.DiffusionLength()
			name := fmt.Sprintf("w/L=%g sigma=%g", hl, sigma)
			want := collectedByFiniteDifference(r, func(float64) float64 { return g }, r.Width, true)
			if got := r.UniformPhotocurrentDensity(g); math.Abs(got/want-1) > 2e-4 {
				t.Errorf("uniform %s: %g A/m^2, finite differences %g", name, got, want)
			}
			for _, al := range []float64{0.1, 1, 3, 30} {
				alpha := al / l
				const phi = 1e21 // m^-2 s^-1
				gen := func(x float64) float64 { return alpha * phi * math.Exp(-alpha*x) }
				want := collectedByFiniteDifference(r, gen, r.Width, false)
				if got := r.FrontPhotocurrentDensity(phi, alpha); math.Abs(got-want) > 2e-4*math.Abs(want)+1e-12*Q*phi {
					t.Errorf("front %s alpha L=%g: %g A/m^2, finite differences %g", name, al, got, want)
				}
				want = collectedByFiniteDifference(r, gen, r.Width, true)
				if got := r.BackPhotocurrentDensity(phi, alpha); math.Abs(got-want) > 2e-4*math.Abs(want)+1e-12*Q*phi {
					t.Errorf("back %s alpha L=%g: %g A/m^2, finite differences %g", name, al, got, want)
				}
			}
		}
	}
}

// Limits named in the doc comments: a long region collects q g L
// (uniform) and q phi alpha L/(alpha L + 1) (behind the junction); weakly
// absorbed light (alpha -> 0 at fixed alpha phi) is uniform generation.
func TestPhotocurrentLimits(t *testing.T) {
	r := photoRegion(1, 1)
	l := r.DiffusionLength()
	long := r
	long.Width = math.Inf(1)
	if got, want := long.UniformPhotocurrentDensity(1e26), Q*1e26*l; math.Abs(got/want-1) > 1e-12 {
		t.Errorf("long uniform %g, want q g L = %g", got, want)
	}
	alpha := 2 / l
	if got, want := long.BackPhotocurrentDensity(1e21, alpha), Q*1e21*2.0/3; math.Abs(got/want-1) > 1e-12 {
		t.Errorf("long back %g, want q phi aL/(aL+1) = %g", got, want)
	}
	for _, sigma := range []float64{0, 2, math.Inf(1)} {
		r := photoRegion(0.7, sigma)
		const g = 1e26
		alpha := 1e-6 / r.DiffusionLength()
		front := r.FrontPhotocurrentDensity(g/alpha, alpha)
		back := r.BackPhotocurrentDensity(g/alpha, alpha)
		u := r.UniformPhotocurrentDensity(g)
		if math.Abs(front/u-1) > 1e-5 || math.Abs(back/u-1) > 1e-5 {
			t.Errorf("sigma %g: weak absorption front %g, back %g, uniform %g", sigma, front, back, u)
		}
	}
}

// Long regions under uniform generation: J_L = q G (Ln + W + Lp) (Sze & Ng
// 2007, ch. 13, the photocurrent of a uniformly illuminated junction).
func TestJunctionPhotocurrentUniformLongBase(t *testing.T) {
	pr := QuasiNeutral{Doping: 1e23, Diffusivity: 2.5e-3, Lifetime: 1e-6, Width: math.Inf(1), Recombination: math.Inf(1)}
	nr := QuasiNeutral{Doping: 1e22, Diffusivity: 1.2e-3, Lifetime: 4e-6, Width: math.Inf(1), Recombination: math.Inf(1)}
	const g, w, a = 1e25, 0.4e-6, 1e-4
	pc, err := JunctionPhotocurrent(pr, nr, w, a, Light{Generation: g})
	if err != nil {
		t.Fatal(err)
	}
	want := Q * g * (pr.DiffusionLength() + w + nr.DiffusionLength()) * a
	if math.Abs(pc.Total()/want-1) > 1e-12 {
		t.Errorf("J_L A = %g A, want q G (Ln + W + Lp) A = %g", pc.Total(), want)
	}
	if _, err := JunctionPhotocurrent(pr, nr, w, a, Light{PhotonFlux: 1e20, Absorption: 1e5}); err == nil {
		t.Error("light through a long (unbounded) front region accepted")
	}
	if _, err := JunctionPhotocurrent(pr, nr, w, a, Light{Generation: -1}); err == nil {
		t.Error("negative generation accepted")
	}
}

// Monochromatic light: no more pairs are collected than photons enter, and
// a thin front region with a passivated surface on a thick base (110 um
// diffusion length) collects about alpha L/(alpha L + 1) of them when the
// light is absorbed in the base within a diffusion length (0.917 for
// alpha = 1e5 1/m; the long-base limit of BackPhotocurrentDensity).
func TestJunctionPhotocurrentMonochromatic(t *testing.T) {
	pr := QuasiNeutral{Doping: 1e25, Diffusivity: 5e-4, Lifetime: 1e-7, Width: 0.3e-6, Recombination: 10}
	nr := QuasiNeutral{Doping: 1e22, Diffusivity: 1.2e-3, Lifetime: 1e-5, Width: 200e-6, Recombination: 10}
	const phi, a = 1e21, 1e-4
	for _, alpha := range []float64{1e3, 1e5, 1e7} { // 1/m
		pc, err := JunctionPhotocurrent(pr, nr, 0.5e-6, a, Light{PhotonFlux: phi, Absorption: alpha})
		if err != nil {
			t.Fatal(err)
		}
		iqe := pc.Total() / (Q * phi * a)
		if !(iqe > 0 && iqe <= 1) {
			t.Errorf("alpha %g: internal quantum efficiency %g outside (0, 1]", alpha, iqe)
		}
		if alpha == 1e5 && math.Abs(iqe-0.917) > 0.02 {
			t.Errorf("alpha %g 1/m (absorbed in 10 um): IQE %g, want about 0.917", alpha, iqe)
		}
	}
}

// The ideal lit diode against its closed forms: Voc = Vt ln(1 + IL/Is)
// (Sze & Ng 2007, ch. 13), the maximum-power voltage from
// exp(Vm/Vt) (1 + Vm/Vt) = 1 + IL/Is, solved by the Lambert W function
// as Vm = Vt (W(e (1 + IL/Is)) - 1) (the condition dP/dV = 0 of the ideal
// diode; Green, Solar Cells, 1982, ch. 5, from memory), and the fill
// factor against Green's empirical FF = (voc - ln(voc + 0.72))/(voc + 1),
// voc = Voc/Vt, accurate to about 1e-4 for voc > 10 (M. A. Green,
// Solid-State Electronics 24, 788 (1981)).
func TestLitFiguresIdealDiode(t *testing.T) {
	d := siDevice(1e19, 1e16, 300, Effects{}) // cm^-3
	d.Wp, d.Wn = 0.3e-6, 200e-6
	d.Sp, d.Sn = 100, math.Inf(1)
	d.Light = Light{Generation: 1e25}
	s, err := d.Prepare()
	if err != nil {
		t.Fatal(err)
	}
	if !(s.IL > 0) {
		t.Fatal("no photocurrent")
	}
	f, err := s.LitFigures()
	if err != nil {
		t.Fatal(err)
	}
	vt, ratio := s.Vt, s.IL/s.Is
	if math.Abs(f.Isc/s.IL-1) > 1e-9 {
		t.Errorf("Isc %g, want IL %g (ideal diode, no series resistance)", f.Isc, s.IL)
	}
	if want := vt * math.Log1p(ratio); math.Abs(f.Voc-want) > 1e-8 {
		t.Errorf("Voc %.9g V, want Vt ln(1 + IL/Is) = %.9g V", f.Voc, want)
	}
	vm := vt * (LambertW0(math.E*(1+ratio)) - 1)
	if math.Abs(f.Vmp-vm) > 1e-6 {
		t.Errorf("Vmp %.9g V, want %.9g V", f.Vmp, vm)
	}
	voc := f.Voc / vt
	if ff := (voc - math.Log(voc+0.72)) / (voc + 1); voc < 10 || math.Abs(f.FF-ff) > 5e-4 {
		t.Errorf("FF %.5f against Green's %.5f (voc = %.1f)", f.FF, ff, voc)
	}
	// A series resistance lowers the fill factor and leaves Voc (I = 0).
	d.Effects = Effects{SeriesResistance: true}
	d.ContactResistance = 200 // ohm: I Rs of about 0.1 Vt at Isc
	s2, err := d.Prepare()
	if err != nil {
		t.Fatal(err)
	}
	f2, err := s2.LitFigures()
	if err != nil {
		t.Fatal(err)
	}
	if !(f2.FF < f.FF) || math.Abs(f2.Voc-f.Voc) > 2e-3 {
		t.Errorf("with Rs: FF %.4f (dark-Rs-free %.4f), Voc %.5f (%.5f)", f2.FF, f.FF, f2.Voc, f.Voc)
	}
	dark := d
	dark.Light = Light{}
	sd, _ := dark.Prepare()
	if _, err := sd.LitFigures(); err == nil {
		t.Error("figures of a dark junction")
	}
}
