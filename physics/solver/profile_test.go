package solver

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// integrate returns int_a^b f by composite Simpson's rule with n (even)
// intervals.
func integrate(f func(float64) float64, a, b float64, n int) float64 {
	h := (b - a) / float64(n)
	s := f(a) + f(b)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		s += w * f(a+float64(i)*h)
	}
	return s * h / 3
}

// A Gaussian implant integrates to its dose and peaks at the projected range
// with Dose/(sqrt(2 pi) Straggle) (definition of the normal distribution;
// Plummer, Deal, Griffin, Silicon VLSI Technology (2000), eq. 8.1).
func TestGaussianDoseAndPeak(t *testing.T) {
	g := Gaussian{Dose: 1e19, Range: 80e-9, Straggle: 25e-9}
	got := integrate(g.At, g.Range-12*g.Straggle, g.Range+12*g.Straggle, 2000)
	if math.Abs(got-g.Dose) > 1e-9*g.Dose {
		t.Errorf("integral %g, dose %g", got, g.Dose)
	}
	peak := g.Dose / (math.Sqrt(2*math.Pi) * g.Straggle)
	if math.Abs(g.At(g.Range)-peak) > 1e-12*peak || g.At(g.Range+g.Straggle) >= g.At(g.Range) {
		t.Errorf("peak %g at Rp, want %g and a maximum", g.At(g.Range), peak)
	}
	// One straggle away the density is exp(-1/2) of the peak.
	if r := g.At(g.Range-g.Straggle) / peak; math.Abs(r-math.Exp(-0.5)) > 1e-12 {
		t.Errorf("N(Rp - dRp)/Npeak = %g, want e^-1/2", r)
	}
}

// erfc diffusion: Cs at the surface and erfc(1) = 0.157299207050285 of Cs at
// x = 2 sqrt(Dt) (Abramowitz & Stegun 1964, Table 7.1).
func TestErfcDiffusion(t *testing.T) {
	e := Erfc{Surface: 1e25, Length: 0.2e-6, Start: 1e-6}
	if e.At(e.Start) != e.Surface || e.At(0) != e.Surface {
		t.Errorf("surface value %g, want %g", e.At(e.Start), e.Surface)
	}
	if r := e.At(e.Start+2*e.Length) / e.Surface; math.Abs(r-0.157299207050285) > 1e-14 {
		t.Errorf("N(2L)/Cs = %.15g, want erfc(1) = 0.157299207050285", r)
	}
}

// Log-linear interpolation puts the geometric mean halfway between two
// positive points, a straight line across a sign change and holds the end
// values outside the table (definitions of the Tabulated types).
func TestTabulatedInterpolation(t *testing.T) {
	tb := Tabulated{Depth: []float64{0, 1e-6, 2e-6}, Concentration: []float64{1e22, 1e24, 0}}
	if v := tb.At(0.5e-6); math.Abs(v-1e23) > 1e-9*1e23 {
		t.Errorf("midpoint %g, want geometric mean 1e23", v)
	}
	if v := tb.At(1.5e-6); math.Abs(v-0.5e24) > 1e-9*1e24 {
		t.Errorf("next to a zero %g, want linear 5e23", v)
	}
	if tb.At(-1) != 1e22 || tb.At(3e-6) != 0 {
		t.Errorf("outside values %g, %g: want the end values", tb.At(-1), tb.At(3e-6))
	}
	net := TabulatedNet{Depth: []float64{0, 1e-6, 2e-6}, Net: []float64{-1e22, 1e22, 1e20}}
	if v := net.At(0.5e-6); math.Abs(v) > 1e-6 {
		t.Errorf("sign change midpoint %g, want 0 (linear)", v)
	}
	if v := net.At(1.5e-6); math.Abs(v-1e21) > 1e-9*1e21 {
		t.Errorf("same-sign midpoint %g, want 1e21", v)
	}
	p := Profile{Net: []Shape{net}, Donors: []Shape{Uniform{Concentration: 1e20, From: 0, To: 1}}}
	nd, na := p.At(0)
	if nd != 1e20 || na != 1e22 {
		t.Errorf("net split: nd %g na %g, want 1e20 and 1e22", nd, na)
	}
}

// Linear grading, mirroring and summing follow their defining formulas.
func TestProfileComposition(t *testing.T) {
	lg := LinearGraded{Position: 1e-6, Gradient: 1e28, Max: 1e22}
	if lg.At(0.5e-6) != 0 || math.Abs(lg.At(1.5e-6)-5e21) > 1e-12*5e21 || lg.At(5e-6) != 1e22 {
		t.Errorf("graded values %g %g %g", lg.At(0.5e-6), lg.At(1.5e-6), lg.At(5e-6))
	}
	m := Mirrored{Shape: Gaussian{Dose: 1e18, Range: 0.1e-6, Straggle: 0.02e-6}, Surface: 10e-6}
	if math.Abs(m.At(9.9e-6)-m.Shape.At(0.1e-6)) > 0 {
		t.Errorf("mirror: %g vs %g", m.At(9.9e-6), m.Shape.At(0.1e-6))
	}
	if k := m.Knots(); len(k) != 1 || math.Abs(k[0]-9.9e-6) > 1e-18 {
		t.Errorf("mirrored knots %v, want [9.9e-6]", k)
	}
	p := StepProfile(1e22, 1e21, 2e-6)
	if p.NetAt(1e-6) != -1e22 || p.NetAt(3e-6) != 1e21 || p.NetAt(2e-6) != 1e21 {
		t.Errorf("step: %g %g %g", p.NetAt(1e-6), p.NetAt(3e-6), p.NetAt(2e-6))
	}
	sum := Profile{Donors: []Shape{Uniform{1e21, 0, 1}, Gaussian{Dose: 1e18, Range: 0, Straggle: 1e-7}}}
	nd, _ := sum.At(0)
	if want := 1e21 + 1e18/(math.Sqrt(2*math.Pi)*1e-7); math.Abs(nd-want) > 1e-9*want {
		t.Errorf("sum %g, want %g", nd, want)
	}
}

// Every invalid field is reported as a *ParamError naming it.
func TestProfileValidation(t *testing.T) {
	cases := []struct {
		p     Profile
		field string
	}{
		{Profile{}, "Profile"},
		{Profile{Donors: []Shape{Gaussian{Dose: 1e18, Range: 0, Straggle: -1}}}, "Profile.Donors[0].Straggle"},
		{Profile{Donors: []Shape{Uniform{1e21, 0, 1}}, Acceptors: []Shape{Uniform{1e21, 0, 1}, Erfc{Surface: 1e25, Length: 0}}}, "Profile.Acceptors[1].Length"},
		{Profile{Acceptors: []Shape{Uniform{-1, 0, 1}}}, "Profile.Acceptors[0].Concentration"},
		{Profile{Acceptors: []Shape{Uniform{1, 2, 1}}}, "Profile.Acceptors[0].To"},
		{Profile{Donors: []Shape{LinearGraded{Gradient: 0, Max: 1}}}, "Profile.Donors[0].Gradient"},
		{Profile{Donors: []Shape{Tabulated{Depth: []float64{0, 1, 1}, Concentration: []float64{1, 2, 3}}}}, "Profile.Donors[0].Depth[2]"},
		{Profile{Donors: []Shape{Tabulated{Depth: []float64{0, 1}, Concentration: []float64{1}}}}, "Profile.Donors[0].Concentration"},
		{Profile{Donors: []Shape{Tabulated{Depth: []float64{0, 1}, Concentration: []float64{1, -2}}}}, "Profile.Donors[0].Concentration[1]"},
		{Profile{Net: []Shape{TabulatedNet{Depth: []float64{0, 1}, Net: []float64{1, math.NaN()}}}}, "Profile.Net[0].Net[1]"},
		{Profile{Donors: []Shape{Mirrored{Shape: Gaussian{Dose: -1, Straggle: 1}}}}, "Profile.Donors[0].Shape.Dose"},
		{Profile{Donors: []Shape{nil}}, "Profile.Donors[0]"},
	}
	for _, c := range cases {
		err := c.p.Validate()
		var pe *ParamError
		if !errors.As(err, &pe) {
			t.Errorf("%s: got %v, want a *ParamError", c.field, err)
			continue
		}
		if pe.Field != c.field || !strings.Contains(err.Error(), c.field) || pe.Allowed == "" {
			t.Errorf("got field %q (%v), want %q", pe.Field, err, c.field)
		}
	}
	if err := StepProfile(1e22, 1e21, 1e-6).Validate(); err != nil {
		t.Errorf("valid step profile rejected: %v", err)
	}
}

// A device defined by a tabulated net profile sampled from a Gaussian
// implant on a uniform background behaves like the analytic shapes: the
// reverse capacitance agrees within 0.5 % and the built-in potential within
// 1 mV (the log-linear table reproduces a Gaussian to O(h^2) between
// samples; the junction charge depends only on the integrated doping).
func TestTabulatedDeviceMatchesShapes(t *testing.T) {
	si := material(t, "si")
	g := Gaussian{Dose: 1e14 / 1e-4, Range: 0.15 * um, Straggle: 0.05 * um}
	bg := 1e15 * cm3
	length := 10 * um
	shapes := Device{Material: si, Temperature: 300, Length: length, Profile: Profile{
		Acceptors: []Shape{g}, Donors: []Shape{Uniform{Concentration: bg, From: math.Inf(-1), To: math.Inf(1)}}}}
	var depth, net []float64
	for i := 0; i <= 400; i++ {
		x := length * float64(i) / 400 * float64(i) / 400 // denser near the surface
		depth = append(depth, x)
		net = append(net, bg-g.At(x))
	}
	table := Device{Material: si, Temperature: 300, Length: length, Profile: Profile{Net: []Shape{TabulatedNet{Depth: depth, Net: net}}}}
	var c [2]float64
	var vbi [2]float64
	for k, d := range []Device{shapes, table} {
		s := newSolver(t, d, Options{})
		cv, err := s.CV(context.Background(), []float64{-3}, nil)
		if err != nil {
			t.Fatal(err)
		}
		c[k] = cv[0].Capacitance
		if vbi[k], err = s.BuiltInPotential(); err != nil {
			t.Fatal(err)
		}
	}
	if relErr(c[1], c[0]) > 5e-3 || math.Abs(vbi[1]-vbi[0]) > 1e-3 {
		t.Errorf("table: C %.5g vs %.5g F/m^2, Vbi %.5f vs %.5f V", c[1], c[0], vbi[1], vbi[0])
	}
	t.Logf("table vs shapes: C %.6g / %.6g F/m^2, Vbi %.6f / %.6f V", c[1], c[0], vbi[1], vbi[0])
}
