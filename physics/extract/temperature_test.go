package extract

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"junco/physics"
)

// Synthetic Is(T) = C T^3 exp(-Eg/kT) with Eg = 1.12 eV (Si band gap near
// 300 K, Sze & Ng 2007, appendix; from memory) and 2 % noise: the
// Arrhenius fit must return Eg (Sze & Ng 2007, sec. 2.3 form).
func TestFitArrhenius(t *testing.T) {
	const eg = 1.12
	rng := rand.New(rand.NewPCG(3, 3))
	var pts []ArrheniusPoint
	for tk := 250.0; tk <= 400; tk += 15 {
		is := 1e2 * math.Pow(tk, 3) * math.Exp(-eg*physics.Q/(physics.KB*tk)) * (1 + 0.02*rng.NormFloat64())
		pts = append(pts, ArrheniusPoint{TemperatureK: tk, SaturationCurrentA: is})
	}
	f, err := FitArrhenius(pts, ArrheniusOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.ActivationEnergyEV-eg) > 0.01 || math.Abs(f.ActivationEnergyEV-eg) > 4*f.StdErrEV || f.Exponent != 3 {
		t.Errorf("Ea = %g +- %g eV, want %g", f.ActivationEnergyEV, f.StdErrEV, eg)
	}
	// With gamma = 2 the prefactor is T^4: fitting T^3 data with T^4 shifts
	// Ea by about k T_mean (d ln T / d(1/T) = -T); check the direction.
	g, err := FitArrhenius(pts, ArrheniusOptions{Gamma: 2})
	if err != nil {
		t.Fatal(err)
	}
	if g.Exponent != 4 || !(g.ActivationEnergyEV < f.ActivationEnergyEV) {
		t.Errorf("gamma=2: exponent %g Ea %g (T^3: %g)", g.Exponent, g.ActivationEnergyEV, f.ActivationEnergyEV)
	}
	if _, err := FitArrhenius(pts[:2], ArrheniusOptions{}); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("two points: %v", err)
	}
	bad := append([]ArrheniusPoint(nil), pts...)
	bad[1].SaturationCurrentA = -1
	if _, err := FitArrhenius(bad, ArrheniusOptions{}); !errors.Is(err, ErrInput) {
		t.Errorf("negative Is: %v", err)
	}
}

// dVF/dT at constant current for an ideal diode (n = 1) with
// Is = C T^3 exp(-Eg/kT): differentiating VF = Vt ln(I/Is) gives
// dVF/dT = (VF - Eg/q - 3 kT/q)/T (Sze & Ng 2007, sec. 2.3; derivation
// computed here). The regression over 280-320 K must match it at 300 K.
func TestFitVFTemperature(t *testing.T) {
	const eg, c, cur = 1.12, 1e2, 1e-3
	var curves []IVCurve
	for tk := 280.0; tk <= 320; tk += 10 {
		vt := physics.ThermalVoltage(tk)
		d := SingleDiode{c * math.Pow(tk, 3) * math.Exp(-eg/vt), 1, 0, math.Inf(1)}
		var v, i []float64
		for x := 0.3; x <= 0.9; x += 0.005 {
			v = append(v, x)
			i = append(i, d.Current(x, vt))
		}
		curves = append(curves, IVCurve{tk, v, i})
	}
	f, err := FitVFTemperature(curves, cur)
	if err != nil {
		t.Fatal(err)
	}
	vt := physics.ThermalVoltage(300)
	vf := vt * math.Log(cur/(c*math.Pow(300, 3)*math.Exp(-eg/vt)))
	want := (vf - eg - 3*vt) / 300
	if math.Abs(f.SlopeVPerK-want) > 0.02*math.Abs(want) {
		t.Errorf("dVF/dT = %g V/K, want %g", f.SlopeVPerK, want)
	}
	if _, err := FitVFTemperature(curves, 1e-9); !errors.Is(err, ErrInput) {
		t.Errorf("current outside range: %v", err)
	}
}

func TestModelCard(t *testing.T) {
	s, err := ModelCard("D1N_x", CardParams{IS: Given(2.52e-9), N: Given(1.752), RS: Given(0.568), CJO: Given(4e-12), M: Given(0.4), BV: Given(100)})
	if err != nil {
		t.Fatal(err)
	}
	// Only the given parameters appear, in the fixed order (format of the
	// SPICE2 .model line, Nagel 1975).
	if want := ".model D1N_x D(IS=2.52e-09 N=1.752 RS=0.568 CJO=4e-12 M=0.4 BV=100)"; s != want {
		t.Errorf("card\n got %s\nwant %s", s, want)
	}
	for _, c := range []struct {
		name string
		p    CardParams
	}{
		{"", CardParams{IS: Given(1e-14)}}, {"1abc", CardParams{IS: Given(1e-14)}}, {"a b", CardParams{IS: Given(1e-14)}},
		{"ok", CardParams{IS: Given(-1)}}, {"ok", CardParams{RS: Given(math.Inf(1))}}, {"ok", CardParams{TNOM: Given(-300)}},
	} {
		if _, err := ModelCard(c.name, c.p); !errors.Is(err, ErrInput) {
			t.Errorf("ModelCard(%q, %+v): %v", c.name, c.p, err)
		}
	}
}
