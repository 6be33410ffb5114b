package solver

import (
	"context"
	"math"
	"testing"

	"junco/physics"
)

// litCase is a silicon step diode with user SRH lifetimes and no Auger or
// radiative recombination, so that the analytic diffusion lengths sqrt(D
// tau) are the solver's.
type litCase struct {
	name       string
	na, nd     float64 // m^-3
	lp, ln     float64 // region lengths, m
	long       bool    // the analytic regions are long (the solver's are 10 L)
	tau        float64 // s
	light      physics.Light
	anodeRight bool // mirror the device (anode at x = L)
}

var lightOptions = Options{Recombination: Recombination{DisableAuger: true, DisableRadiative: true}}

func (c litCase) device(t testing.TB) Device {
	m := material(t, "si")
	d := stepDiode(m, 300, c.na, c.nd, c.lp, c.ln)
	if c.anodeRight {
		d.Profile = Profile{
			Donors:    []Shape{Uniform{Concentration: c.nd, From: math.Inf(-1), To: c.ln}},
			Acceptors: []Shape{Uniform{Concentration: c.na, From: c.ln, To: math.Inf(1)}},
		}
	}
	d.TauN, d.TauP = c.tau, c.tau
	d.Light = c.light
	return d
}

// analytic returns the analytic photocurrent density (A/m^2,
// physics.JunctionPhotocurrent through physics.Device.Prepare) of the
// case: quasi-neutral widths the region lengths minus the zero-bias
// depletion edges, ohmic contacts, or long regions.
func (c litCase) analytic(t testing.TB) (*physics.Static, float64) {
	t.Helper()
	d := physics.Device{Material: material(t, "si"), Na: c.na, Nd: c.nd, Temperature: 300, Area: 1,
		Wp: math.Inf(1), Wn: math.Inf(1), Sp: math.Inf(1), Sn: math.Inf(1), TauN: c.tau, TauP: c.tau}
	st, err := d.Prepare()
	if err != nil {
		t.Fatal(err)
	}
	if !c.long {
		dep := st.At(0).Depletion
		d.Wp, d.Wn = c.lp-dep.Xp, c.ln-dep.Xn
	}
	d.Light = c.light
	if st, err = d.Prepare(); err != nil {
		t.Fatal(err)
	}
	return st, st.IL
}

// shortCircuit returns the solver's short-circuit result (lit, zero bias).
func shortCircuit(t testing.TB, s *Solver) *Result {
	t.Helper()
	r, err := s.Solve(0)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// diffLengths returns the minority diffusion lengths (electrons in p,
// holes in n) of the analytic model, m.
func diffLengths(t testing.TB, c litCase) (ln, lp float64) {
	st, _ := c.analytic(t)
	return st.LN, st.LP
}

// The solver's short-circuit photocurrent against the analytic closed
// forms in low injection (the task's acceptance: within 5 %):
//   - uniform generation, long regions: J_L = q G (Ln + W + Lp) (Sze & Ng,
//     Physics of Semiconductor Devices, 3rd ed. 2007, ch. 13, the
//     photocurrent of a uniformly illuminated junction);
//   - uniform generation, finite regions with ohmic contacts: q G L
//     tanh(w/2L) per region plus q G W (physics.UniformPhotocurrentDensity,
//     the S -> Inf limit of the finite-region solution, Hovel 1975);
//   - monochromatic light entering the p side at absorption lengths 0.1,
//     2 and 100 um: Hovel's front- and back-region forms (H. J. Hovel,
//     Solar Cells, Semiconductors and Semimetals vol. 11, 1975, ch. 2, as
//     given in Sze & Ng 2007, ch. 13) plus the depletion region's q Phi
//     e^(-alpha Hf)(1 - e^(-alpha W)).
//
// Low injection: the excess minority density (G tau for the long regions,
// 1e-4 of the doping; G w^2/2D for the finite ones; about Phi/alpha or
// Phi L/D for the light) stays at or below 1e-3 of the doping. (Measured:
// at G = 1e26 m^-3 s^-1, an excess of 1 % of the doping, the long-region
// difference grows to 1.8 %: the SRH rate is no longer linear in the
// excess.)
func TestLitShortCircuitAgainstClosedForms(t *testing.T) {
	na, nd := 1e16*cm3, 1e16*cm3
	base := litCase{na: na, nd: nd, tau: 1e-6, long: true}
	lnL, lpL := diffLengths(t, base)
	phi := 1e20 // m^-2 s^-1
	cases := []litCase{
		{name: "uniform, long regions", na: na, nd: nd, lp: 10 * lnL, ln: 10 * lpL, long: true, tau: 1e-6,
			light: physics.Light{Generation: 1e24}},
		{name: "uniform, finite regions", na: na, nd: nd, lp: 20 * um, ln: 30 * um, tau: 1e-6,
			light: physics.Light{Generation: 1e26}},
		{name: "monochromatic 1/alpha = 0.1 um", na: na, nd: nd, lp: 3 * um, ln: 200 * um, tau: 1e-6,
			light: physics.Light{PhotonFlux: phi, Absorption: 1e7}},
		{name: "monochromatic 1/alpha = 2 um", na: na, nd: nd, lp: 3 * um, ln: 200 * um, tau: 1e-6,
			light: physics.Light{PhotonFlux: phi, Absorption: 5e5}},
		{name: "monochromatic 1/alpha = 100 um", na: na, nd: nd, lp: 3 * um, ln: 200 * um, tau: 1e-6,
			light: physics.Light{PhotonFlux: phi, Absorption: 1e4}},
	}
	for _, c := range cases {
		s := newSolver(t, c.device(t), lightOptions)
		r := shortCircuit(t, s)
		_, jl := c.analytic(t)
		got := -r.Current
		if e := relErr(got, jl); !(e <= 0.05) {
			t.Errorf("%s: solver Isc %.5g A/m^2, analytic %.5g A/m^2 (%.2f %%; limit 5 %%)", c.name, got, jl, 100*e)
		}
		if r.Depletion.MinorityRatio > 1e-3 {
			t.Errorf("%s: not low injection (minority ratio %.3g)", c.name, r.Depletion.MinorityRatio)
		}
		t.Logf("%s: solver %.6g A/m^2, analytic %.6g A/m^2, difference %+.3f %% (%d nodes)", c.name, got, jl, 100*(got/jl-1), len(r.X))
	}
}

// Orientation: the same device mirrored (anode at x = L) and light
// entering the same physical surface must give the same photocurrent
// (an identity of the geometry; checks which end is illuminated), and
// light entering the n side must give the analytic value with the
// regions' roles exchanged (Hovel's forms as above).
func TestLitOrientation(t *testing.T) {
	l := physics.Light{PhotonFlux: 1e20, Absorption: 5e5}
	left := litCase{name: "anode left", na: 1e16 * cm3, nd: 1e16 * cm3, lp: 3 * um, ln: 200 * um, tau: 1e-6, light: l}
	right := left
	right.name, right.anodeRight = "anode right", true
	jl := -shortCircuit(t, newSolver(t, left.device(t), lightOptions)).Current
	jr := -shortCircuit(t, newSolver(t, right.device(t), lightOptions)).Current
	if e := relErr(jr, jl); !(e <= 1e-3) {
		t.Errorf("mirrored device: %.6g A/m^2, original %.6g A/m^2 (%.2g relative; limit 1e-3, the meshes differ)", jr, jl, e)
	}
	// From the n side: the short p region is now the back region.
	fromN := litCase{name: "from n", na: 1e16 * cm3, nd: 1e16 * cm3, lp: 200 * um, ln: 3 * um, tau: 1e-6,
		light: physics.Light{PhotonFlux: 1e20, Absorption: 5e5, FromN: true}}
	got := -shortCircuit(t, newSolver(t, fromN.device(t), lightOptions)).Current
	_, want := fromN.analytic(t)
	if e := relErr(got, want); !(e <= 0.05) {
		t.Errorf("light from the n side: solver %.5g A/m^2, analytic %.5g A/m^2 (%.2f %%; limit 5 %%)", got, want, 100*e)
	}
	t.Logf("anode left %.6g, anode right %.6g, from n %.6g (analytic %.6g) A/m^2", jl, jr, got, want)
}

// Mesh refinement of the numeric photocurrent: the default mesh, and
// that mesh bisected once and twice (exactly 2x and 4x the cells,
// Bisect). The change from 2x to 4x must be below 0.2 % and below the
// change from 1x to 2x (convergence; a mesh-refined solution is the
// reference). The short absorption length (0.1 um, a few cells of the
// default mesh near the contact) checks the exact box integration of
// the Beer-Lambert generation.
func TestLitMeshRefinement(t *testing.T) {
	for _, l := range []physics.Light{{PhotonFlux: 1e20, Absorption: 1e7}, {Generation: 1e26}} {
		c := litCase{na: 1e16 * cm3, nd: 1e16 * cm3, lp: 3 * um, ln: 200 * um, tau: 1e-6, light: l}
		dev := c.device(t)
		s1 := newSolver(t, dev, lightOptions)
		x := s1.Nodes()
		var j [3]float64
		for k := range j {
			o := lightOptions
			if k > 0 {
				x = Bisect(x)
				o.Mesh.Positions = x
			}
			s := s1
			if k > 0 {
				s = newSolver(t, dev, o)
			}
			j[k] = -shortCircuit(t, s).Current
		}
		d12, d24 := math.Abs(j[1]/j[0]-1), math.Abs(j[2]/j[1]-1)
		if !(d24 <= 2e-3) || !(d24 <= d12 || d24 < 1e-6) {
			t.Errorf("%+v: Isc %.7g, %.7g, %.7g A/m^2 on 1x, 2x, 4x: changes %.2g, %.2g (want the second below 2e-3 and below the first)", l, j[0], j[1], j[2], d12, d24)
		}
		t.Logf("%+v: Isc 1x %.7g, 2x %.7g, 4x %.7g A/m^2 (changes %.2g, %.2g; %d nodes at 1x)", l, j[0], j[1], j[2], d12, d24, len(s1.Nodes()))
	}
}

// Open-circuit voltage of an ideal diode: Voc = (kT/q) ln(1 + IL/Is)
// (Sze & Ng 2007, ch. 13, the solar-cell I-V I = Is (e^(qV/kT) - 1) -
// IL). Short regions with 1e17 cm^-3 and tau = 100 us make the diffusion
// current dominate (depletion-region recombination is ~0.3 % of it at
// Voc, estimated from q ni W/(2 tau) e^(qV/2kT)); IL is the solver's
// short-circuit current and Is the analytic Shockley saturation current
// (narrow-base form, physics.Static.Is), so the check is the
// superposition of the dark diode and the photocurrent. Limit: 3 mV.
func TestLitOpenCircuitVoltage(t *testing.T) {
	c := litCase{na: 1e17 * cm3, nd: 1e17 * cm3, lp: 30 * um, ln: 30 * um, tau: 1e-4, light: physics.Light{Generation: 1e24}}
	s := newSolver(t, c.device(t), lightOptions)
	path, err := s.NewPath()
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	r0, err := path.Solve(ctx, 0)
	if err != nil {
		t.Fatal(err)
	}
	il := -r0.Current
	// Voc by bisection on the path (the current rises with bias).
	lo, hi := 0.0, 0.8
	for hi-lo > 1e-6 {
		mid := (lo + hi) / 2
		r, err := path.Solve(ctx, mid)
		if err != nil {
			t.Fatal(err)
		}
		if r.Current < 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	voc := (lo + hi) / 2
	dark := c
	dark.light = physics.Light{}
	st, _ := dark.analytic(t)
	want := s.ThermalVoltage() * math.Log1p(il/st.Js)
	if d := math.Abs(voc - want); !(d <= 3e-3) {
		t.Errorf("Voc %.5f V, (kT/q) ln(1 + IL/Is) = %.5f V (IL %.5g A/m^2, Js %.5g A/m^2): %.2f mV apart, limit 3 mV", voc, want, il, st.Js, 1e3*d)
	}
	t.Logf("Voc solver %.5f V, ideal diode %.5f V (IL %.5g A/m^2, Js %.5g A/m^2)", voc, want, il, st.Js)
}

// Charge conservation at short circuit (the divergence theorem on the
// discrete continuity equations, an identity): summing the electron rows
// over the interior boxes gives Jn(L) - Jn(0) = q sum (d_i R_i - G_i), and
// with J = Jn + Jp constant,
//
//	J = Jn(anode edge) + Jp(cathode edge) - q sum (G_i - d_i R_i)
//
// (anode at x = 0): the terminal current is q times the integral of
// (G - R) over the device when the ohmic contacts' own recombination, the
// minority currents into them, is counted in R. The identity must hold
// to 1e-8 relative. With light absorbed far from the back contact (2 um
// absorption length, n region 10 diffusion lengths long) the back
// contact's share is below 1e-4 of J; the front contact, under the light,
// takes a large share of the pairs (that is the physics of an ohmic
// illuminated surface, as in Hovel's S -> Inf form).
func TestLitChargeConservation(t *testing.T) {
	base := litCase{na: 1e16 * cm3, nd: 1e16 * cm3, tau: 1e-6, long: true}
	lnL, lpL := diffLengths(t, base)
	for _, c := range []litCase{
		{name: "uniform, long", na: 1e16 * cm3, nd: 1e16 * cm3, lp: 10 * lnL, ln: 10 * lpL, tau: 1e-6, light: physics.Light{Generation: 1e24}},
		{name: "monochromatic 2 um, long n", na: 1e16 * cm3, nd: 1e16 * cm3, lp: 3 * um, ln: 10 * lpL, tau: 1e-6, light: physics.Light{PhotonFlux: 1e20, Absorption: 5e5}},
	} {
		s := newSolver(t, c.device(t), lightOptions)
		r := shortCircuit(t, s)
		net := 0.0 // sum of (G - R) over interior boxes, m^-2 s^-1
		for i := 1; i < len(r.X)-1; i++ {
			net += s.d[i] * (r.Generation[i] - r.Recombination[i])
		}
		last := len(r.Jn) - 1
		ident := r.Jn[0] + r.Jp[last] - physics.Q*net
		if e := relErr(r.Current, ident); !(e <= 1e-8) {
			t.Errorf("%s: J = %.10g A/m^2, Jn(0) + Jp(L) - q int(G - R) = %.10g A/m^2 (%.2g relative)", c.name, r.Current, ident, e)
		}
		if c.light.PhotonFlux > 0 && !(math.Abs(r.Jp[last]) <= 1e-4*math.Abs(r.Current)) {
			t.Errorf("%s: the back contact takes %.3g A/m^2 of %.3g A/m^2", c.name, r.Jp[last], r.Current)
		}
		t.Logf("%s: J %.8g, identity %.8g, q int(G-R) %.8g A/m^2; minority currents into the contacts %.3g, %.3g A/m^2", c.name, r.Current, ident, physics.Q*net, r.Jn[0], r.Jp[last])
	}
}

// The generation integrated by the solver is the exact Beer-Lambert count
// Phi (1 - e^(-alpha L)) plus G L (definition of the absorption
// coefficient), on any mesh.
func TestLitGenerationIntegral(t *testing.T) {
	c := litCase{na: 1e16 * cm3, nd: 1e16 * cm3, lp: 3 * um, ln: 20 * um, tau: 1e-6,
		light: physics.Light{PhotonFlux: 1e20, Absorption: 2e5, Generation: 1e25}}
	s := newSolver(t, c.device(t), lightOptions)
	want := 1e20*-math.Expm1(-2e5*23*um) + 1e25*23*um
	if e := relErr(s.Generation(), want); !(e <= 1e-12) {
		t.Errorf("generation %.15g m^-2 s^-1, exact %.15g (%.2g relative)", s.Generation(), want, e)
	}
	r := shortCircuit(t, s)
	sum := 0.0
	for i := range r.X {
		sum += s.d[i] * r.Generation[i]
	}
	if e := relErr(sum, want); !(e <= 1e-12) {
		t.Errorf("Result.Generation integrates to %.15g, exact %.15g", sum, want)
	}
	if eq, _ := s.Equilibrium(); eq.Generation[1] != 0 {
		t.Errorf("the equilibrium must stay dark, generation %g", eq.Generation[1])
	}
}

// Bad light: a clear error naming the field.
func TestLitBadInput(t *testing.T) {
	c := litCase{na: 1e16 * cm3, nd: 1e16 * cm3, lp: 3 * um, ln: 20 * um, tau: 1e-6}
	for _, l := range []physics.Light{{Generation: -1}, {PhotonFlux: math.NaN()}, {Absorption: 1e12, PhotonFlux: 1}} {
		c.light = l
		_, err := New(c.device(t), lightOptions)
		pe, ok := err.(*ParamError)
		if !ok || pe.Field[:13] != "Device.Light." {
			t.Errorf("%+v: error %v, want a ParamError on Device.Light.*", l, err)
		}
	}
}

// Strong light (high injection: the excess reaches the doping) still
// converges, by continuation in the light level, at short circuit and in
// forward bias; the charge identity of TestLitChargeConservation holds
// there too, and the high-injection flag is raised (low-injection
// formulas do not apply).
func TestLitStrongLight(t *testing.T) {
	for _, l := range []physics.Light{{Generation: 1e31}, {PhotonFlux: 1e27, Absorption: 1e5}} {
		c := litCase{na: 1e16 * cm3, nd: 1e16 * cm3, lp: 3 * um, ln: 200 * um, tau: 1e-6, light: l}
		s := newSolver(t, c.device(t), Options{})
		p, err := s.NewPath()
		if err != nil {
			t.Fatal(err)
		}
		for _, v := range []float64{0, 0.6} {
			r, err := p.Solve(context.Background(), v)
			if err != nil {
				t.Fatalf("%+v at %g V: %v", l, v, err)
			}
			net := 0.0
			for i := 1; i < len(r.X)-1; i++ {
				net += s.d[i] * (r.Generation[i] - r.Recombination[i])
			}
			ident := r.Jn[0] + r.Jp[len(r.Jp)-1] - physics.Q*net
			if e := relErr(r.Current, ident); !(e <= 1e-8) {
				t.Errorf("%+v at %g V: J %.10g, identity %.10g A/m^2", l, v, r.Current, ident)
			}
			if v == 0 && !hasCode(r.Flags, FlagHighInjection) {
				t.Errorf("%+v: no high-injection flag at short circuit (minority ratio %.3g)", l, r.Depletion.MinorityRatio)
			}
			t.Logf("%+v at %g V: J %.5g A/m^2, minority ratio %.3g", l, v, r.Current, r.Depletion.MinorityRatio)
		}
	}
}

func hasCode(fl []physics.Flag, code string) bool {
	for _, f := range fl {
		if f.Code == code {
			return true
		}
	}
	return false
}
