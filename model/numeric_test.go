package model

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"junco/physics"
)

// Trade units used to write the test devices (exact unit definitions).
const (
	perCm3 = 1e6  // cm^-3 -> m^-3
	perCm2 = 1e4  // cm^-2 -> m^-2
	um     = 1e-6 // um -> m
)

// idealStep is a silicon step junction at bias v with every analytic
// effect off, so that the analytic model is the textbook one.
func idealStep(na, nd, v float64) Spec {
	s := DefaultSpec()
	s.AcceptorDensity, s.DonorDensity, s.Bias = na*perCm3, nd*perCm3, v
	s.Effects = IdealEffects()
	return s
}

func solveOK(t *testing.T, s Spec, n NumericSpec) *NumericResult {
	t.Helper()
	r, err := Solve(context.Background(), s, n, nil)
	if err != nil {
		t.Fatalf("Solve: %v", err)
	}
	return r
}

func evaluateOK(t *testing.T, s Spec) *Result {
	t.Helper()
	a, err := Evaluate(s)
	if err != nil {
		t.Fatalf("Evaluate: %v", err)
	}
	return a
}

// rel returns |a/b - 1|.
func rel(a, b float64) float64 { return math.Abs(a/b - 1) }

// The equilibrium built-in potential of non-degenerate steps is within 1 mV
// of Vbi = (kT/q) ln(Na Nd / ni^2) (Sze & Ng 2007, eq. 2.8), and Compare
// reads it out against the analytic value with the relative difference
// (numeric - analytic)/|analytic|.
func TestNumericBuiltInPotentialStep(t *testing.T) {
	for _, c := range []struct {
		mat          string
		temp, na, nd float64
	}{
		{"si", 300, 1e16, 1e15},
		{"si", 400, 1e17, 1e16},
		{"gaas", 300, 1e17, 1e16},
	} {
		s := idealStep(c.na, c.nd, 0)
		s.Material, s.Temperature = c.mat, c.temp
		r := solveOK(t, s, NumericSpec{})
		m, _ := physics.MaterialByName(c.mat)
		ni := m.Ni(c.temp)
		want := physics.ThermalVoltage(c.temp) * math.Log(c.na*c.nd*perCm3*perCm3/(ni*ni)) // Sze & Ng 2007, eq. 2.8
		if d := math.Abs(r.BuiltInPotential - want); d > 1e-3 {
			t.Errorf("%s %g K: numeric Vbi %.6f V, Vt ln(NaNd/ni^2) %.6f V (diff %.2g V)", c.mat, c.temp, r.BuiltInPotential, want, d)
		}
		a := evaluateOK(t, s)
		diffs := Compare(a, r)
		if len(diffs) == 0 || diffs[0].Key != "built_in_potential_V" {
			t.Fatalf("Compare: %+v", diffs)
		}
		d := diffs[0]
		av, _ := a.Get("built_in_potential_V")
		if d.Analytic != av || d.Numeric != r.BuiltInPotential || math.Abs(d.Relative-(d.Numeric-av)/av) > 1e-15 {
			t.Errorf("%s: Compare line %+v, analytic %g numeric %g", c.mat, d, av, r.BuiltInPotential)
		}
		t.Logf("%s %g K %g/%g: Vbi numeric %.6f V, eq. 2.8 %.6f V", c.mat, c.temp, c.na, c.nd, r.BuiltInPotential, want)
	}
}

// The numeric depletion width of a step junction is within 4 % of the
// depletion approximation with the majority-tail correction, W = sqrt(2 eps
// (Vbi - V - 2kT/q)(Na + Nd)/(q Na Nd)) (Sze & Ng 2007, eq. 2.10 and the
// 2kT/q correction of section 2.2), below the uncorrected value, and its
// parts balance the charge, Na xp = Nd xn (Sze & Ng 2007, eq. 2.11), within
// 5 % in reverse bias.
func TestNumericDepletionWidthCorrected(t *testing.T) {
	na, nd := 1e16*perCm3, 1e15*perCm3
	for _, v := range []float64{0, -1, -5} {
		s := idealStep(1e16, 1e15, v)
		r := solveOK(t, s, NumericSpec{})
		m, _ := physics.MaterialByName("si")
		eps, vt := m.Permittivity(), physics.ThermalVoltage(300)
		corr := math.Sqrt(2 * eps * (r.BuiltInPotential - v - 2*vt) * (na + nd) / (physics.Q * na * nd))
		plain := math.Sqrt(2 * eps * (r.BuiltInPotential - v) * (na + nd) / (physics.Q * na * nd))
		var w, xn, xp float64
		for _, q := range NumericQuantities(r) {
			switch q.Key {
			case "depletion_width_m":
				w = q.Value
			case "depletion_width_n_m":
				xn = q.Value
			case "depletion_width_p_m":
				xp = q.Value
			}
		}
		if e := rel(w, corr); e > 0.04 {
			t.Errorf("V = %g: W numeric %.4g um, corrected approximation %.4g um (%.2f %%)", v, w/um, corr/um, 100*e)
		}
		if !(w < plain) {
			t.Errorf("V = %g: W numeric %.4g um not below the uncorrected %.4g um", v, w/um, plain/um)
		}
		if v < 0 {
			if e := rel(na*xp, nd*xn); e > 0.05 {
				t.Errorf("V = %g: Na xp = %.4g, Nd xn = %.4g m^-2 (%.1f %%)", v, na*xp, nd*xn, 100*e)
			}
		}
		t.Logf("V = %g: W numeric %.4f um, corrected %.4f um, uncorrected %.4f um", v, w/um, corr/um, plain/um)
	}
}

// Reverse capacitance: within 5 % of the depletion capacitance eps A/W of
// the analytic model (Sze & Ng 2007, eq. 2.30), and the slope of 1/C^2
// against V gives back the doping, d(1/C^2)/dV = -2 (Na + Nd)/(q eps Na Nd
// A^2) (Sze & Ng 2007, eq. 2.31), within 3 %.
func TestNumericReverseCapacitance(t *testing.T) {
	s := idealStep(1e16, 1e15, 0)
	res, err := NumericCV(context.Background(), s, NumericSpec{}, Range{From: -5, To: -1, Step: 2}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Points) != 3 {
		t.Fatalf("%d points", len(res.Points))
	}
	for _, p := range res.Points {
		if e := rel(p.Capacitance, p.AnalyticCapacitance); e > 0.05 {
			t.Errorf("V = %g: C numeric %.5g F, analytic %.5g F (%.2f %%)", p.Bias, p.Capacitance, p.AnalyticCapacitance, 100*e)
		}
		t.Logf("V = %g: C numeric %.5g F, eps A/W %.5g F", p.Bias, p.Capacitance, p.AnalyticCapacitance)
	}
	m, _ := physics.MaterialByName("si")
	na, nd, a := s.AcceptorDensity, s.DonorDensity, s.Area
	want := -2 * (na + nd) / (physics.Q * m.Permittivity() * na * nd * a * a)
	p0, p1 := res.Points[0], res.Points[2]
	slope := (1/(p1.Capacitance*p1.Capacitance) - 1/(p0.Capacitance*p0.Capacitance)) / (p1.Bias - p0.Bias)
	if e := rel(slope, want); e > 0.03 {
		t.Errorf("Mott-Schottky slope %.5g F^-2/V, eq. 2.31 %.5g (%.2f %%)", slope, want, 100*e)
	}
}

// Low-injection forward current of a long-base p+n step against the
// Shockley diffusion current of the analytic model (W. Shockley, Bell Syst.
// Tech. J. 28, 435 (1949); Sze & Ng 2007, eq. 2.56) within 5 %: the automatic
// long-region lengths (5 diffusion lengths) reproduce the long-base formula.
func TestNumericForwardCurrentShockley(t *testing.T) {
	s := idealStep(1e18, 1e16, 0)
	res, err := NumericIV(context.Background(), s, NumericSpec{}, Range{From: 0.5, To: 0.55, Step: 0.05}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range res.Points {
		if e := rel(p.Current, p.AnalyticCurrent); e > 0.05 {
			t.Errorf("V = %g: I numeric %.5g A, Shockley %.5g A (%.2f %%)", p.Bias, p.Current, p.AnalyticCurrent, 100*e)
		}
		if p.CurrentSpread > 1e-6 {
			t.Errorf("V = %g: current not conserved (%.2g)", p.Bias, p.CurrentSpread)
		}
		t.Logf("V = %g: I numeric %.5g A, analytic %.5g A", p.Bias, p.Current, p.AnalyticCurrent)
	}
	c := NumericIVCurve(res)
	if c.ID != CurveNumericIV || len(c.Series) != 2 || len(c.Series[0].Y) != len(res.Points) || c.Series[1].Y[0] != res.Points[0].AnalyticCurrent {
		t.Errorf("I-V curve %+v", c)
	}
}

// integrate returns the trapezoidal integral of v over the nodes x.
func integrate(x, v []float64) float64 {
	s := 0.0
	for i := 0; i+1 < len(x); i++ {
		s += 0.5 * (v[i] + v[i+1]) * (x[i+1] - x[i])
	}
	return s
}

// A Gaussian implant into an n-type base: the acceptors on the solver's
// mesh integrate back to the dose within 1 %, and the junction lies at
// xj = Rp + dRp sqrt(2 ln(Np/NB)), Np = Q/(sqrt(2 pi) dRp) (Plummer, Deal,
// Griffin, Silicon VLSI Technology (2000), ch. 8) within 1 %. A shallow
// implant (Rp < 2.3 dRp) keeps only the share 1 - 1/2 erfc(Rp/(sqrt(2) dRp))
// in the device (the Gaussian's tail above the surface), within 1 %, and
// is flagged. An erfc diffusion into a p-type base: dose 2 Cs sqrt(Dt)/sqrt(pi)
// and junction xj = 2 sqrt(Dt) erfcinv(NB/Cs) (Plummer, Deal, Griffin 2000,
// ch. 7), each within 1 %.
func TestNumericImplantAndDiffusion(t *testing.T) {
	s := idealStep(1e15, 1e15, 0)
	dose, rp, straggle := 1e13*perCm2, 0.1*um, 0.03*um
	implant := func(rp float64) NumericSpec {
		return NumericSpec{Base: BaseDonor, Length: 5 * um, Shapes: []DopingShape{{Kind: ShapeGaussian, Species: SpeciesAcceptor, Dose: dose, Range: rp, Straggle: straggle}}}
	}
	r := solveOK(t, s, implant(rp))
	if got := integrate(r.Solution.X, r.Acceptors); rel(got, dose) > 0.01 {
		t.Errorf("implanted dose %.5g m^-2 integrates to %.5g", dose, got)
	}
	np := dose / (math.Sqrt(2*math.Pi) * straggle)
	xj := rp + straggle*math.Sqrt(2*math.Log(np/s.DonorDensity))
	if len(r.Junctions) != 1 || rel(r.Junctions[0], xj) > 0.01 {
		t.Errorf("implant junctions %v, want %.5g m", r.Junctions, xj)
	}
	if !hasFlag(r.Flags, FlagNumericReference) || hasFlag(r.Flags, FlagNumericDoseOutside) {
		t.Errorf("flags %v", r.Flags)
	}
	t.Logf("implant: xj %.5g m (formula %.5g), W %.4g m", r.Junctions[0], xj, r.Solution.Depletion.W)
	shallow := 0.05 * um
	r = solveOK(t, s, implant(shallow))
	kept := dose * (1 - 0.5*math.Erfc(shallow/(math.Sqrt2*straggle)))
	if got := integrate(r.Solution.X, r.Acceptors); rel(got, kept) > 0.01 || !hasFlag(r.Flags, FlagNumericDoseOutside) {
		t.Errorf("shallow implant keeps %.5g m^-2, want %.5g; flags %v", got, kept, r.Flags)
	}

	s = idealStep(1e16, 1e16, 0)
	cs, ldiff := 1e19*perCm3, 0.5*um
	num := NumericSpec{Base: BaseAcceptor, Length: 6 * um, Shapes: []DopingShape{{Kind: ShapeErfc, Species: SpeciesDonor, Concentration: cs, DiffusionLength: ldiff}}}
	r = solveOK(t, s, num)
	want := 2 * cs * ldiff / math.Sqrt(math.Pi)
	if got := integrate(r.Solution.X, r.Donors); rel(got, want) > 0.01 {
		t.Errorf("erfc dose %.5g m^-2, 2 Cs sqrt(Dt)/sqrt(pi) = %.5g", got, want)
	}
	xj = 2 * ldiff * math.Erfcinv(s.AcceptorDensity/cs)
	if len(r.Junctions) != 1 || rel(r.Junctions[0], xj) > 0.01 {
		t.Errorf("erfc junctions %v, want %.5g m", r.Junctions, xj)
	}
	t.Logf("erfc: xj %.5g m (formula %.5g), cathode on the left: orientation handled, Vbi %.4f V", r.Junctions[0], xj, r.BuiltInPotential)
	// The cathode is the left contact here: the curves still put the p
	// side at negative positions and the potential rises toward n.
	pc := NumericPotentialCurve(r)
	if pc.Xs[0] >= 0 || pc.Xs[len(pc.Xs)-1] <= 0 || math.Abs(pc.Series[0].Y[len(pc.Xs)-1]-r.Solution.Barrier) > 1e-9 {
		t.Errorf("flipped frame: x %g..%g, psi end %g, barrier %g", pc.Xs[0], pc.Xs[len(pc.Xs)-1], pc.Series[0].Y[len(pc.Xs)-1], r.Solution.Barrier)
	}
}

func hasFlag(fl []physics.Flag, code string) bool {
	for _, f := range fl {
		if f.Code == code {
			return true
		}
	}
	return false
}

// An imported step profile (net doping, nm and cm^-3 in the header, ';'
// separated) gives the built-in potential of its plateaus within 1 mV of
// (kT/q) ln(Na Nd/ni^2) (Sze & Ng 2007, eq. 2.8) and its junction where the
// interpolated net doping vanishes; the same step written per species and
// measured from the right contact gives the same Vbi, its junction at L
// minus the depth where Nd = Na.
func TestNumericDepthProfileFile(t *testing.T) {
	csv := "# invented step profile for the test\ndepth (nm);net (cm^-3)\n0;-1e17\n1990;-1e17\n2010;1e16\n30000;1e16\n"
	p, err := ParseDepthProfile("step.csv", strings.NewReader(csv), "")
	if err != nil {
		t.Fatal(err)
	}
	s := idealStep(1e17, 1e16, 0)
	r := solveOK(t, s, NumericSpec{File: p})
	m, _ := physics.MaterialByName("si")
	ni := m.Ni(300)
	want := physics.ThermalVoltage(300) * math.Log(1e17*1e16*perCm3*perCm3/(ni*ni)) // Sze & Ng 2007, eq. 2.8
	if d := math.Abs(r.BuiltInPotential - want); d > 1e-3 {
		t.Errorf("file profile: Vbi %.6f V, eq. 2.8 %.6f V", r.BuiltInPotential, want)
	}
	// Across the sign change the net doping is interpolated linearly: zero
	// at 1990 nm + 20 nm x 1e17/(1e17 + 1e16).
	xj := 1990e-9 + 20e-9*1e17/(1e17+1e16)
	if rel(r.Device.Length, 30*um) > 1e-12 || len(r.Junctions) != 1 || math.Abs(r.Junctions[0]-xj) > 1e-12 {
		t.Errorf("length %g, junctions %v, want %g", r.Device.Length, r.Junctions, xj)
	}
	species := "depth_um,acceptors_cm-3,donors_cm-3\n0,0,1e16\n27.99,0,1e16\n28.01,1e17,0\n30,1e17,0\n"
	p2, err := ParseDepthProfile("species.csv", strings.NewReader(species), "")
	if err != nil {
		t.Fatal(err)
	}
	p2.Face = FaceRight
	r2 := solveOK(t, s, NumericSpec{File: p2})
	if d := math.Abs(r2.BuiltInPotential - r.BuiltInPotential); d > 1e-6 {
		t.Errorf("mirrored file: Vbi %.6f vs %.6f V", r2.BuiltInPotential, r.BuiltInPotential)
	}
	// Per species both ramps are linear (one end is 0): Nd = Na at depth
	// 27.99 um + 20 nm/11, i.e. x = L - that depth.
	if xm := r2.Device.Length - (27.99*um + 20e-9/11); len(r2.Junctions) != 1 || math.Abs(r2.Junctions[0]-xm) > 1e-12 {
		t.Errorf("mirrored junctions %v, want %g", r2.Junctions, xm)
	}
}

// ParseDepthProfile: units and separators, and strict errors naming the
// file, line and column.
func TestParseDepthProfile(t *testing.T) {
	p, err := ParseDepthProfile("a.csv", strings.NewReader("\ufeff# comment\r\n\r\ndepth [um]\tconc [m^-3]\r\n0\t1e20\r\n1.5\t2e20\r\n"), SpeciesAcceptor)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Depth) != 2 || rel(p.Depth[1], 1.5e-6) > 1e-15 || p.Acceptors[1] != 2e20 || p.Donors != nil || p.Net != nil || p.Source != "a.csv" {
		t.Errorf("parsed %+v", p)
	}
	p, err = ParseDepthProfile("b.csv", strings.NewReader("x_nm,nd_cm-3,na_cm-3\n10,1e15,0\n20,1e15,1e18\n"), "")
	if err != nil || rel(p.Depth[0], 10e-9) > 1e-15 || p.Donors[0] != 1e21 || p.Acceptors[1] != 1e24 {
		t.Errorf("parsed %+v, %v", p, err)
	}
	for _, c := range []struct {
		name, in, species string
		line, col         int
		want              string
	}{
		{"no unit", "depth,net_cm-3\n0,1\n1,2\n", "", 1, 1, "no unit"},
		{"bad unit", "depth_furlong,net_cm-3\n0,1\n1,2\n", "", 1, 1, "not a length unit"},
		{"unknown column", "depth_um,temperature_K\n0,1\n", "", 1, 2, "unknown column"},
		{"conc without species", "depth_um,conc_cm-3\n0,1\n1,2\n", "", 1, 2, "does not say of what"},
		{"no depth", "net_cm-3;donors_cm-3\n1;1\n", "", 1, 0, "no depth column"},
		{"net and species", "depth_um;net_cm-3;donors_cm-3\n0;1;1\n", "", 1, 0, "net together with donors"},
		{"duplicate", "depth_um,net_cm-3,net_m-3\n0,1,1\n", "", 1, 3, "second"},
		{"field count", "depth_um,net_cm-3\n0,1\n1,2,3\n", "", 3, 0, "3 fields"},
		{"not a number", "depth_um,net_cm-3\n0,1\n1,abc\n", "", 3, 2, "not a plain decimal"},
		{"decimal comma", "depth_um;net_cm-3\n0;1\n1;2,5\n", "", 3, 2, "decimal point"},
		{"nan", "depth_um,net_cm-3\n0,NaN\n1,2\n", "", 2, 2, "not a plain decimal"},
		{"decreasing", "depth_um,net_cm-3\n0,1\n2,1\n1,1\n", "", 4, 1, "does not increase"},
		{"negative depth", "depth_um,net_cm-3\n-1,1\n2,1\n", "", 2, 1, "outside 0 to 1 cm"},
		{"negative species", "depth_um,donors_cm-3\n0,1\n2,-1\n", "", 3, 2, "outside 0"},
		{"huge", "depth_um,net_cm-3\n0,1\n2,1e30\n", "", 3, 2, "exceeds"},
		{"one row", "# c\ndepth_um,net_cm-3\n0,1\n", "", 4, 0, "at least 2"},
		{"empty", "", "", 1, 0, "no header"},
		{"empty field", "depth_um,net_cm-3\n0,\n1,2\n", "", 2, 2, "empty field"},
	} {
		_, err := ParseDepthProfile("p.csv", strings.NewReader(c.in), c.species)
		var pe *DepthProfileError
		if !errors.As(err, &pe) {
			t.Errorf("%s: error %v, want a *DepthProfileError", c.name, err)
			continue
		}
		if pe.File != "p.csv" || pe.Line != c.line || pe.Column != c.col || !strings.Contains(pe.Error(), c.want) {
			t.Errorf("%s: %q (line %d col %d), want line %d col %d containing %q", c.name, pe.Error(), pe.Line, pe.Column, c.line, c.col, c.want)
		}
		if !strings.HasPrefix(pe.Error(), "p.csv: line ") {
			t.Errorf("%s: message does not start with file and line: %q", c.name, pe.Error())
		}
	}
}

// FuzzParseDepthProfile: no input panics; an accepted profile has strictly
// increasing non-negative depths, consistent columns and finite values, and
// survives a round trip through WriteCSV unchanged.
func FuzzParseDepthProfile(f *testing.F) {
	for _, s := range []string{
		"depth_um,conc_cm-3\n0,1e16\n1,1e17\n",
		"depth (nm);net (cm^-3)\n0;-1e17\n100;1e16\n",
		"x [um]\tdonors [cm-3]\tacceptors [cm-3]\n0\t1e15\t0\n2\t1e15\t1e18\n",
		"# c\n\ndepth_m,net_m-3\n0,1\n1e-6,-1\n",
	} {
		f.Add(s, "donor")
	}
	f.Fuzz(func(t *testing.T, in, species string) {
		p, err := ParseDepthProfile("fuzz.csv", strings.NewReader(in), species)
		if err != nil {
			var pe *DepthProfileError
			if !errors.As(err, &pe) {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		n := len(p.Depth)
		if n < 2 {
			t.Fatalf("%d rows accepted", n)
		}
		cols := 0
		for _, c := range [][]float64{p.Net, p.Donors, p.Acceptors} {
			if c == nil {
				continue
			}
			cols++
			if len(c) != n {
				t.Fatalf("column of %d values for %d depths", len(c), n)
			}
			for _, v := range c {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("non-finite value %g", v)
				}
			}
		}
		if cols == 0 {
			t.Fatal("no concentration column")
		}
		for i, d := range p.Depth {
			if d < 0 || (i > 0 && !(d > p.Depth[i-1])) {
				t.Fatalf("depths %v", p.Depth)
			}
		}
		if errs := p.validate(); len(errs) > 0 {
			t.Fatalf("accepted profile fails validation: %v", errs)
		}
		var b bytes.Buffer
		if err := p.WriteCSV(&b); err != nil {
			t.Fatal(err)
		}
		q, err := ParseDepthProfile("again.csv", &b, "")
		if err != nil {
			t.Fatalf("round trip: %v\n%s", err, b.String())
		}
		for _, pair := range [][2][]float64{{p.Depth, q.Depth}, {p.Net, q.Net}, {p.Donors, q.Donors}, {p.Acceptors, q.Acceptors}} {
			if len(pair[0]) != len(pair[1]) {
				t.Fatalf("round trip changed a column length")
			}
			for i := range pair[0] {
				if pair[0][i] != pair[1][i] {
					t.Fatalf("round trip changed %g to %g", pair[0][i], pair[1][i])
				}
			}
		}
	})
}

// Bad numeric inputs give one FieldError per bad field, naming it.
func TestNumericSpecValidate(t *testing.T) {
	n := NumericSpec{Nodes: 5, PLength: -1, Base: "oxide", CVMode: "medium-frequency", Shapes: []DopingShape{
		{Kind: ShapeGaussian, Species: SpeciesAcceptor, Dose: 1e30, Range: 0.1 * um, Straggle: 0},
		{Kind: "wedge", Species: "boron"},
		{Kind: ShapeUniform, Species: SpeciesDonor, Concentration: 1e16 * perCm3, From: 2 * um, To: 1 * um, Face: "top"},
		{Kind: ShapeLinear, Species: SpeciesDonor, Concentration: 1e17 * perCm3, Gradient: 0},
		{Kind: ShapeErfc, Species: SpeciesDonor, Concentration: 1e19 * perCm3, DiffusionLength: math.NaN()},
	}, File: &DepthProfile{Depth: []float64{0, 1}, Net: []float64{1}}}
	err := n.Validate()
	var ve *ValidationError
	if !errors.As(err, &ve) {
		t.Fatalf("Validate: %v", err)
	}
	for _, f := range []string{FieldNumericNodes, FieldNumericPLength, FieldNumericBase, FieldNumericCVMode, "shape[0].dose", "shape[0].straggle",
		"shape[1].kind", "shape[1].species", "shape[2].to", "shape[2].face", "shape[3].gradient", "shape[4].diffusion-length", "profile-file.net"} {
		fe, ok := ve.For(f)
		if !ok {
			t.Errorf("no error for %s in %v", f, err)
			continue
		}
		if fe.Value == "" || fe.Allowed == "" || fe.Why == "" {
			t.Errorf("%s: incomplete error %+v", f, fe)
		}
	}
	if (NumericSpec{}).Validate() != nil {
		t.Error("the zero NumericSpec must be valid")
	}
	// Same doping type at both contacts.
	_, err = BuildNumericDevice(idealStep(1e16, 1e16, 0), NumericSpec{Base: BaseDonor, Length: 5 * um,
		Shapes: []DopingShape{{Kind: ShapeGaussian, Species: SpeciesAcceptor, Dose: 1e12 * perCm2, Range: 2 * um, Straggle: 0.1 * um}}}, 0)
	if !errors.As(err, &ve) {
		t.Fatalf("n-p-n profile: %v", err)
	}
	if fe, ok := ve.For(FieldNumericProfile); !ok || !strings.Contains(fe.Value, "n-type at x = 0") {
		t.Errorf("n-p-n profile error %v", err)
	}
	// A sweep outside the Spec's bias range.
	if _, err := NumericIV(context.Background(), idealStep(1e16, 1e15, 0), NumericSpec{}, Range{From: 0, To: 30, Step: 10}, nil); !errors.As(err, &ve) {
		t.Errorf("sweep to 30 V: %v", err)
	} else if _, ok := ve.For(FieldNumericSweep); !ok {
		t.Errorf("sweep error %v", err)
	}
}

// NumericSpec is JSON-friendly: snake_case keys carrying the unit, and a
// round trip keeps every field.
func TestNumericSpecJSON(t *testing.T) {
	n := NumericSpec{PLength: 1 * um, NLength: 2 * um, Nodes: 400, Base: BaseJunction,
		Shapes: []DopingShape{{Kind: ShapeGaussian, Species: SpeciesAcceptor, Face: FaceRight, Dose: 1e18, Range: 1e-7, Straggle: 3e-8}},
		File:   &DepthProfile{Source: "f.csv", Depth: []float64{0, 1e-6}, Net: []float64{-1e22, 1e21}}}
	b, err := json.Marshal(n)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{`"p_length_m"`, `"n_length_m"`, `"nodes"`, `"dose_per_m2"`, `"projected_range_m"`, `"straggle_m"`, `"depth_m"`, `"net_per_m3"`} {
		if !bytes.Contains(b, []byte(k)) {
			t.Errorf("JSON lacks %s: %s", k, b)
		}
	}
	var back NumericSpec
	if err := json.Unmarshal(b, &back); err != nil {
		t.Fatal(err)
	}
	b2, _ := json.Marshal(back)
	if !bytes.Equal(b, b2) {
		t.Errorf("round trip:\n%s\n%s", b, b2)
	}
}

// Progress and cancellation: cancelling in the first progress call stops
// the sweep after that point; the finished points come back with
// context.Canceled.
func TestNumericIVCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	calls := 0
	res, err := NumericIV(ctx, idealStep(1e16, 1e15, 0), NumericSpec{}, Range{From: 0, To: 0.5, Step: 0.05}, func(p NumericProgress) {
		calls++
		if p.Stage != "iv" || p.Total != 11 || p.Done != calls {
			t.Errorf("progress %+v after %d calls", p, calls)
		}
		cancel()
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	if res == nil || len(res.Points) != 1 || res.Requested != 11 || calls != 1 {
		t.Fatalf("result %+v, %d calls", res, calls)
	}
	var m map[string]any
	if err := json.Unmarshal(res.JSON(), &m); err != nil || m["complete"] != false {
		t.Errorf("partial JSON %v: %s", err, res.JSON())
	}
}

// Curves: identities of the discrete solution in the analytic frame. The
// potential rises by the barrier Vbi - V from the p contact to the n
// contact; the field, integrated over the cells, is minus the potential
// rise (E = -dpsi/dx); the p-side hole quasi-Fermi level is 0 and the
// n-side electron quasi-Fermi level qV (the bias splits the Fermi levels,
// Sze & Ng 2007, section 2.3); at equilibrium n p = n_i^2 at every node
// (mass action, Sze & Ng 2007, eq. 1.29 form, no narrowing); the total
// current density is constant along the device.
func TestNumericCurves(t *testing.T) {
	v := 0.4
	r := solveOK(t, idealStep(1e17, 1e16, v), NumericSpec{})
	curves := NumericCurves(r)
	ids := map[string]bool{}
	for _, c := range curves {
		if ids[c.ID] {
			t.Errorf("duplicate curve ID %s", c.ID)
		}
		ids[c.ID] = true
		for i := 1; i < len(c.Xs); i++ {
			if !(c.Xs[i] > c.Xs[i-1]) {
				t.Fatalf("%s: positions not increasing at %d", c.ID, i)
			}
		}
		for _, s := range c.Series {
			if len(s.Y) != len(c.Xs) {
				t.Errorf("%s/%s: %d values for %d positions", c.ID, s.Label, len(s.Y), len(c.Xs))
			}
		}
	}
	pot, field, bands, cur := curves[0], curves[1], curves[2], curves[4]
	psi := pot.Series[0].Y
	if math.Abs(psi[0]) > 1e-15 || math.Abs(psi[len(psi)-1]-r.Solution.Barrier) > 1e-9 {
		t.Errorf("potential %g .. %g, barrier %g", psi[0], psi[len(psi)-1], r.Solution.Barrier)
	}
	x := r.Solution.X
	integral := 0.0
	for k, e := range field.Series[0].Y {
		integral += e * (x[k+1] - x[k])
	}
	if math.Abs(integral+r.Solution.Barrier) > 1e-9 {
		t.Errorf("field integral %g, want -%g", integral, r.Solution.Barrier)
	}
	efn, efp := bands.Series[2].Y, bands.Series[3].Y
	if math.Abs(efp[0]) > 1e-12 || math.Abs(efn[len(efn)-1]-v) > 1e-9 {
		t.Errorf("Efp(p contact) %g, Efn(n contact) %g, want 0 and %g", efp[0], efn[len(efn)-1], v)
	}
	tot := cur.Series[2].Y
	for _, j := range tot {
		if rel(j, r.CurrentDensity) > 1e-6 {
			t.Fatalf("total current density %g, terminal %g", j, r.CurrentDensity)
		}
	}
	eq := solveOK(t, idealStep(1e17, 1e16, 0), NumericSpec{})
	m, _ := physics.MaterialByName("si")
	ni2 := m.Ni(300) * m.Ni(300)
	for i := range eq.Solution.N {
		if rel(eq.Solution.N[i]*eq.Solution.P[i], ni2) > 1e-9 {
			t.Fatalf("n p at node %d: %g, want ni^2 = %g", i, eq.Solution.N[i]*eq.Solution.P[i], ni2)
		}
	}
	var b bytes.Buffer
	if err := WriteNumericProfileCSV(&b, r); err != nil {
		t.Fatal(err)
	}
	if lines := strings.Count(b.String(), "\n"); lines != r.Nodes()+1 || !strings.HasPrefix(b.String(), NumericProfileCSVHeader+"\n") {
		t.Errorf("profile CSV: %d lines for %d nodes", lines, r.Nodes())
	}
}

// The physics hooks. Incomplete ionisation: the numeric Vbi equals the
// analytic one with Fermi-Dirac occupation of the dopant levels (Sze & Ng
// 2007, section 1.4.2 and eq. 2.8 with the ionised densities) within 1 mV,
// where ionisation moves Vbi by more than 2 mV. Band-gap narrowing: the
// electrostatic barrier is (kT/q) ln(Na Nd/(ni,eff,p ni,eff,n)) with
// ni,eff^2 = ni^2 exp(dEg/kT) (Slotboom & de Graaff 1976) within 1 mV, and
// the forward current rises by the analytic IsDiff/Is within 3 %.
func TestNumericHooks(t *testing.T) {
	s := idealStep(1e18, 1e17, 0)
	s.Effects.NoIonisation = false
	a := evaluateOK(t, s)
	r := solveOK(t, s, NumericSpec{})
	if d := a.Static.VbiFullIonisation - a.Static.Vbi; d < 2e-3 {
		t.Fatalf("ionisation moves Vbi by only %g V: the check would not see a missing hook", d)
	}
	if d := math.Abs(r.BuiltInPotential - a.Static.Vbi); d > 1e-3 {
		t.Errorf("ionisation: numeric Vbi %.5f V, analytic %.5f V (full ionisation %.5f V)", r.BuiltInPotential, a.Static.Vbi, a.Static.VbiFullIonisation)
	}

	s = idealStep(1e19, 1e17, 0.6)
	s.Effects.NoBGN = false
	a = evaluateOK(t, s)
	st := a.Static
	r = solveOK(t, s, NumericSpec{})
	want := st.Vt * math.Log(st.Device.Na*st.Device.Nd/(st.NiEffP*st.NiEffN))
	if d := math.Abs(r.BuiltInPotential - want); d > 1e-3 || st.DEgP < 0.03 {
		t.Errorf("BGN: numeric Vbi %.5f V, with ni,eff %.5f V (dEg,p %.4f eV)", r.BuiltInPotential, want, st.DEgP)
	}
	off := s
	off.Effects.NoBGN = true
	r0 := solveOK(t, off, NumericSpec{PLength: r.Device.PLength, NLength: r.Device.NLength})
	if got, w := r.Current/r0.Current, st.IsDiff/st.Is; rel(got, w) > 0.03 {
		t.Errorf("BGN current ratio %.4f, analytic IsDiff/Is %.4f", got, w)
	}
}

// Incomplete ionisation in 4H-SiC (deep Al acceptors): the dopant
// occupation follows the carriers, so the depletion region is fully
// ionised and the numeric reverse capacitance follows the depletion
// approximation with the chemical densities, C = eps A/W, W = sqrt(2 eps
// (Vbi - V - 2kT/q)(Na + Nd)/(q Na Nd)) (Sze & Ng 2007, eq. 2.10 with the
// 2kT/q correction of section 2.2; Vbi the solver's barrier, which keeps
// the neutral regions' freeze-out), within 1 %, not the one written with
// the neutral-region ionised densities. The second case is the one of the
// project's issue: Al 1e17 / N 1e19 at -20 V, 1 mm^2, where an independent
// low-frequency Poisson solution gives 1.751e-10 F (the solver gave
// 0.79e-10 F with the neutral-region ionised fraction in the depletion
// charge). The C-V output says it is low-frequency.
func TestNumericIonisationFullInDepletion(t *testing.T) {
	cases := []struct {
		na, nd, v, area, independent float64
	}{
		{1e18 * perCm3, 1e16 * perCm3, -10, 0, 0},
		{1e17 * perCm3, 1e19 * perCm3, -20, 1e-6, 1.751e-10},
	}
	for _, c := range cases {
		s := DefaultSpec()
		s.Material, s.AcceptorDensity, s.DonorDensity, s.Bias = "4h-sic", c.na, c.nd, c.v
		if c.area > 0 {
			s.Area = c.area
		}
		s.Effects = IdealEffects()
		s.Effects.NoIonisation = false
		a := evaluateOK(t, s)
		st := a.Static
		if fa := st.NaIonised / st.Device.Na; fa > 0.5 {
			t.Fatalf("acceptors %.2f ionised: not a test of incomplete ionisation", fa)
		}
		r := solveOK(t, s, NumericSpec{})
		if hasFlag(r.Flags, "mesh-zone") {
			t.Errorf("depletion edge outside the refined zone: %v", r.Flags)
		}
		m, _ := physics.MaterialByName("4h-sic")
		eps := m.Permittivity()
		na, nd := st.Device.Na, st.Device.Nd
		w := math.Sqrt(2 * eps * (r.BuiltInPotential - s.Bias - 2*st.Vt) * (na + nd) / (physics.Q * na * nd))
		if e := rel(r.Capacitance, eps*s.Area/w); e > 0.01 {
			t.Errorf("C numeric %.5g F, eps A/W with full ionisation in the depletion region %.5g F (%.2f %%)", r.Capacitance, eps*s.Area/w, 100*e)
		}
		if c.independent > 0 {
			if e := rel(r.Capacitance, c.independent); e > 0.01 {
				t.Errorf("C numeric %.5g F, independent Poisson solution %.5g F", r.Capacitance, c.independent)
			}
			cv, err := NumericCV(context.Background(), s, NumericSpec{}, Range{From: c.v, To: c.v, Step: 1}, nil)
			if err != nil {
				t.Fatal(err)
			}
			if cv.Mode != "low-frequency" || !strings.Contains(string(cv.JSON()), `"cv_mode": "low-frequency"`) {
				t.Errorf("C-V mode %q; JSON %s", cv.Mode, cv.JSON())
			}
			if e := rel(cv.Points[0].Capacitance, c.independent); e > 0.01 {
				t.Errorf("NumericCV C %.5g F, independent %.5g F", cv.Points[0].Capacitance, c.independent)
			}
		}
		t.Logf("4H-SiC %g/%g: fa %.3f fd %.3f, C numeric %.5g F, full-ionisation depletion approximation %.5g F, analytic %.5g F",
			na, nd, st.NaIonised/na, st.NdIonised/nd, r.Capacitance, eps*s.Area/w, a.Point.Cap)
	}
}

// Adapter flags: ignored contact velocities and external resistances, and
// a reverse bias beyond the analytic breakdown voltage (the solver has no
// impact ionisation) with the safety caution.
func TestNumericFlags(t *testing.T) {
	s := idealStep(1e17, 1e16, 0)
	sn := 100.0
	s.NContactVelocity, s.ContactResistance = &sn, 1
	r := solveOK(t, s, NumericSpec{})
	for _, c := range []string{FlagNumericContacts, FlagNumericExternal, FlagNumericLength} {
		if !hasFlag(r.Flags, c) {
			t.Errorf("no %s flag", c)
		}
	}
	s = DefaultSpec()
	s.AcceptorDensity, s.DonorDensity = 1e18*perCm3, 1e17*perCm3
	a := evaluateOK(t, s)
	vb := a.Static.Breakdown.Voltage
	if !(vb > 0) {
		t.Fatalf("no analytic breakdown voltage: %g", vb)
	}
	s.Bias = -1.1 * vb
	r = solveOK(t, s, NumericSpec{})
	if !hasFlag(r.Flags, FlagNumericBreakdown) || !hasFlag(r.Flags, FlagCaution) {
		t.Errorf("at %g V (breakdown %g V): flags %v", s.Bias, vb, r.Flags)
	}
}

// NumericJSON carries calc's keys; its "analytic" object holds exactly the
// analytic values and "difference" the relative differences.
func TestNumericJSON(t *testing.T) {
	s := idealStep(1e16, 1e15, -1)
	a := evaluateOK(t, s)
	r := solveOK(t, s, NumericSpec{Nodes: 300})
	var m map[string]any
	if err := json.Unmarshal(NumericJSON(r, a), &m); err != nil {
		t.Fatalf("%v\n%s", err, NumericJSON(r, a))
	}
	if m["nodes"].(float64) != 300 {
		t.Errorf("nodes %v", m["nodes"])
	}
	an, diff := m["analytic"].(map[string]any), m["difference"].(map[string]any)
	for _, k := range compareKeys(false) {
		want, _ := a.Get(k)
		if an[k].(float64) != want {
			t.Errorf("analytic %s = %v, calc value %v", k, an[k], want)
		}
		num := m[k].(float64)
		if d := diff[k].(float64); math.Abs(d-(num-want)/math.Abs(want)) > 1e-12 {
			t.Errorf("difference %s = %v, want %v", k, d, (num-want)/math.Abs(want))
		}
	}
}

// ParseDose reads cm^-2 (the bare-number unit) and m^-2.
func TestParseDose(t *testing.T) {
	for in, want := range map[string]float64{"1e14cm-2": 1e18, "1e14": 1e18, "5e12 /cm2": 5e16, "1e18 m^-2": 1e18} {
		if v, err := ParseDose(in); err != nil || v != want {
			t.Errorf("%q: %g, %v", in, v, err)
		}
	}
	for _, in := range []string{"", "cm-2", "1e14 cm-3", "inf", "1e400"} {
		if _, err := ParseDose(in); err == nil {
			t.Errorf("%q accepted", in)
		}
	}
}
