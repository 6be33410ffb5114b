package physics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Geometry factor of a finite region with contact recombination, checked
// against values computed from the general cosh/sinh formula (Green, Solar
// Cells, 1982; Sze & Ng 2007) for Dp = 12 cm^2/s and Lp = 100 um.
func TestGeometryFactorTable(t *testing.T) {
	d, l := 12e-4, 100e-6
	inf := math.Inf(1)
	cases := []struct{ w, s, want float64 }{
		{1e-6, 0, 0.0100}, {1e-6, 10, 0.8364}, {1e-6, inf, 100.003},
		{10e-6, 0, 0.09967}, {10e-6, 10, 0.8615}, {10e-6, inf, 10.0333},
		{100e-6, 0, 0.76159}, {100e-6, 10, 0.9757}, {100e-6, inf, 1.31304},
		{1000e-6, 0, 1.0000}, {1000e-6, 10, 1.0000}, {1000e-6, inf, 1.0000},
	}
	for _, c := range cases {
		got := GeometryFactor(c.w, l, c.s, d)
		if r := rel(got, c.want); r > 5e-4 {
			t.Errorf("G(W=%g um, S=%g m/s) = %.5g, want %.5g", c.w*1e6, c.s, got, c.want)
		}
	}
	// S L/D = 1 gives exactly 1 for any width.
	for _, w := range []float64{1e-7, 1e-5, 1e-3} {
		if g := GeometryFactor(w, l, d/l, d); math.Abs(g-1) > 1e-12 {
			t.Errorf("sigma = 1, W = %g: G = %g", w, g)
		}
	}
}

// Limits: the finite-width form tends to the long base for W >> L and to the
// short base (L/W for an ohmic contact) for W << L.
func TestFiniteWidthLimits(t *testing.T) {
	ni := 9.65e15
	long := QuasiNeutral{Doping: 1e22, Diffusivity: 12e-4, Lifetime: 1e-6, Width: math.Inf(1), Recombination: math.Inf(1)}
	j0 := long.SaturationCurrentDensity(ni)
	wide := long
	wide.Width = 40 * long.DiffusionLength()
	if r := rel(wide.SaturationCurrentDensity(ni), j0); r > 1e-9 {
		t.Errorf("W = 40 L: J0 differs from long base by %g", r)
	}
	short := long
	short.Width = 1e-3 * long.DiffusionLength()
	want := Q * ni * ni * long.Diffusivity / (short.Width * long.Doping) // Neamen eq. 8.34, short diode
	if r := rel(short.SaturationCurrentDensity(ni), want); r > 1e-6 {
		t.Errorf("W = L/1000: J0 = %g, short-base %g", short.SaturationCurrentDensity(ni), want)
	}
}

// Neamen 4th ed., Example 8.2: Na = Nd = 1e16 cm^-3, Dn = 25, Dp = 10 cm^2/s,
// tau = 5e-7 s, ni = 1.5e10 cm^-3 -> Js = 4.155e-11 A/cm^2 (book q = 1.6e-19;
// CODATA q moves it by 0.14%).
func TestNeamenSaturationCurrent(t *testing.T) {
	inf := math.Inf(1)
	p := QuasiNeutral{Doping: 1e22, Diffusivity: 25e-4, Lifetime: 5e-7, Width: inf, Recombination: inf}
	n := QuasiNeutral{Doping: 1e22, Diffusivity: 10e-4, Lifetime: 5e-7, Width: inf, Recombination: inf}
	js := (p.SaturationCurrentDensity(1.5e16) + n.SaturationCurrentDensity(1.5e16)) * 1e-4
	if r := rel(js, 4.155e-11); r > 3e-3 {
		t.Errorf("Js = %.4g A/cm^2, want 4.155e-11 (Neamen Ex. 8.2)", js)
	}
	// Example 8.4: the same diode at 0.65 V carries 3.295 A/cm^2.
	j := ShockleyCurrent(js, 0.65, tBook)
	if r := rel(j, 3.295); r > 3e-3 {
		t.Errorf("J(0.65 V) = %.4g A/cm^2, want 3.295 (Neamen Ex. 8.4)", j)
	}
}

// The excess-carrier profile solves its boundary-value problem: value 1 at
// the depletion edge, D d2n/dx2 = n/tau inside, -D dn/dx = S n at the
// contact, and the current ratio equals -L d(density)/dx normalised.
func TestExcessProfileBoundaryProblem(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	for i := 0; i < 200; i++ {
		r := QuasiNeutral{Doping: 1e22, Diffusivity: (1 + 30*rng.Float64()) * 1e-4, Lifetime: math.Pow(10, -8+3*rng.Float64())}
		l := r.DiffusionLength()
		r.Width = l * math.Pow(10, -2+4*rng.Float64())
		switch i % 3 {
		case 0:
			r.Recombination = math.Inf(1)
		case 1:
			r.Recombination = 0
		default:
			r.Recombination = math.Pow(10, -1+6*rng.Float64())
		}
		d0, j0 := r.ExcessProfile(0)
		if math.Abs(d0-1) > 1e-12 || math.Abs(j0-1) > 1e-12 {
			t.Fatalf("edge values %g %g", d0, j0)
		}
		w := r.Width
		h := w * 1e-5
		// Interior: second derivative equals n/L^2.
		x := w * (0.2 + 0.6*rng.Float64())
		dm, _ := r.ExcessProfile(x - h)
		dc, jc := r.ExcessProfile(x)
		dp, _ := r.ExcessProfile(x + h)
		if sec := (dp - 2*dc + dm) / (h * h); math.Abs(sec-dc/(l*l)) > 1e-4*(dc/(l*l))+1e-3*math.Abs(dp-dm)/(h*h) {
			t.Fatalf("case %d: d2n/dx2 = %g, n/L^2 = %g", i, sec, dc/(l*l))
		}
		// Current = -dn/dx scaled so that it is 1 at the edge.
		jEdge := -GeometryFactor(w, l, r.Recombination, r.Diffusivity) / l
		if got := -(dp - dm) / (2 * h) / (-jEdge); math.Abs(got-jc) > 1e-4*math.Abs(jc)+1e-9 {
			t.Fatalf("case %d: current ratio %g vs derivative %g", i, jc, got)
		}
		// Contact condition.
		dw, _ := r.ExcessProfile(w)
		dwm, _ := r.ExcessProfile(w - h)
		dwm2, _ := r.ExcessProfile(w - 2*h)
		flux := -r.Diffusivity * (3*dw - 4*dwm + dwm2) / (2 * h)
		switch {
		case math.IsInf(r.Recombination, 1):
			if math.Abs(dw) > 1e-12 {
				t.Fatalf("ohmic contact: n(W) = %g", dw)
			}
		default:
			scale := r.Diffusivity / l * math.Max(dw, dwm2)
			if want := r.Recombination * dw; math.Abs(flux-want) > 1e-3*math.Abs(want)+1e-6*scale {
				t.Fatalf("case %d: contact flux %g, S n = %g", i, flux, want)
			}
		}
	}
}

// Property: Is grows with temperature for random silicon junctions.
func TestSaturationCurrentGrowsWithTemperature(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 4))
	si := mustMaterial(t, "si")
	inf := math.Inf(1)
	for i := 0; i < 200; i++ {
		d := Device{Material: si, Na: math.Pow(10, 21+rng.Float64()*4), Nd: math.Pow(10, 21+rng.Float64()*4),
			Area: 1e-6, Wp: inf, Wn: inf, Sp: inf, Sn: inf}
		d.Temperature = 250 + rng.Float64()*300
		s1, err := d.Prepare()
		if err != nil {
			t.Fatal(err)
		}
		d.Temperature += 1 + rng.Float64()*20
		s2, err := d.Prepare()
		if err != nil {
			t.Fatal(err)
		}
		if !(s2.Is > s1.Is) {
			t.Fatalf("Is(%g K) = %g not above Is(%g K) = %g", d.Temperature, s2.Is, s1.Device.Temperature, s1.Is)
		}
	}
}
