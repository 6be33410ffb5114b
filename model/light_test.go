package model

import (
	"errors"
	"math"
	"strings"
	"testing"

	"junco/physics"
)

// A lit ideal junction with long regions under uniform generation: the
// photocurrent is q G (Ln + W + Lp) A (Sze & Ng 2007, ch. 13) with W the
// zero-bias depletion width, and the open-circuit voltage Vt ln(1 + IL/Is)
// (the same chapter).
func TestEvaluateLitUniform(t *testing.T) {
	s := DemoJunction().Spec
	s.Material, s.Profile = "si", "abrupt"
	s.AcceptorDensity, s.DonorDensity = 1e24, 1e22
	s.PWidth, s.NWidth = 0, 0
	s.Effects = IdealEffects()
	s.Light = Light{Generation: 1e25}
	s.Bias = 0
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	get := func(k string) float64 {
		t.Helper()
		v, ok := r.Get(k)
		if !ok {
			t.Fatalf("no %s", k)
		}
		return v
	}
	st := r.Static
	want := physics.Q * 1e25 * (st.LN + st.DepletionAt(0).W + st.LP) * s.Area
	if il := get("photocurrent_A"); math.Abs(il/want-1) > 1e-9 {
		t.Errorf("photocurrent %g A, want q G (Ln + W + Lp) A = %g A", il, want)
	}
	if voc, want := get("open_circuit_voltage_V"), st.Vt*math.Log1p(st.IL/st.Is); math.Abs(voc-want) > 1e-7 {
		t.Errorf("Voc %.8g V, want %.8g V", voc, want)
	}
	if i := get("current_A"); math.Abs(i+st.IL) > 1e-9*st.IL {
		t.Errorf("current at 0 V %g A, want -IL = %g A", i, -st.IL)
	}
	if eff := get("efficiency"); !math.IsNaN(eff) {
		t.Errorf("efficiency %g without an irradiance", eff)
	}
	if ff := get("fill_factor"); !(ff > 0.5 && ff < 0.9) {
		t.Errorf("fill factor %g", ff)
	}
	s.Light.Irradiance = 1000 // W/m^2
	r, _ = Evaluate(s)
	pmax, _ := r.Get("max_power_W")
	if eff, _ := r.Get("efficiency"); math.Abs(eff-pmax/(1000*s.Area)) > 1e-12 {
		t.Errorf("efficiency %g, want Pmax/(E A) = %g", eff, pmax/(1000*s.Area))
	}
	dark := s
	dark.Light = Light{}
	r, _ = Evaluate(dark)
	if _, ok := r.Get("photocurrent_A"); ok {
		t.Error("a dark junction reports a photocurrent")
	}
}

// Bad light settings are field errors naming the field, the value and the
// allowed range; monochromatic light needs its wavelength and absorption.
func TestLightValidation(t *testing.T) {
	base := DemoJunction().Spec
	cases := []struct {
		l     Light
		field string
	}{
		{Light{Generation: -1}, FieldGeneration},
		{Light{Generation: 1e40}, FieldGeneration},
		{Light{PowerDensity: 10, Absorption: 1e5}, FieldWavelength},
		{Light{PowerDensity: 10, Wavelength: 600e-9}, FieldAbsorption},
		{Light{PowerDensity: 10, Wavelength: 1e-3, Absorption: 1e5}, FieldWavelength},
		{Light{Generation: 1e20, Side: "top"}, FieldIlluminatedSide},
		{Light{Generation: math.NaN()}, FieldGeneration},
	}
	for _, c := range cases {
		s := base
		s.Light = c.l
		err := s.Validate()
		var ve *ValidationError
		if !errors.As(err, &ve) || !strings.Contains(err.Error(), c.field) || !strings.Contains(err.Error(), "allowed") {
			t.Errorf("%+v: %v, want a field error naming %s", c.l, err, c.field)
		}
	}
	s := base
	s.Light = Light{PowerDensity: 10, Wavelength: 600e-9, Absorption: 4e5}
	if err := s.Validate(); err != nil {
		t.Errorf("valid monochromatic light refused: %v", err)
	}
}

// The light's units parse in trade units (SI definitions of the prefixes
// and the centimetre; common practice for the trade defaults).
func TestLightUnits(t *testing.T) {
	for _, c := range []struct {
		k    Kind
		text string
		want float64
	}{
		{GenerationRate, "1e21cm-3s-1", 1e27},
		{GenerationRate, "1e21", 1e27},
		{GenerationRate, "5e26m-3/s", 5e26},
		{PowerDensity, "100mW/cm2", 1000},
		{PowerDensity, "1000W/m2", 1000},
		{PowerDensity, "100", 1000},
		{Absorption, "1e4/cm", 1e6},
		{Absorption, "2um-1", 2e6},
		{Length, "633nm", 633e-9},
	} {
		got, err := ParseValue(c.k, c.text)
		if err != nil || math.Abs(got/c.want-1) > 1e-12 {
			t.Errorf("%s: %g (%v), want %g", c.text, got, err, c.want)
		}
	}
}

// The power curve of a lit ideal junction peaks at the maximum-power point
// the figures of merit give (the same lit I-V; the sweep's resolution, 5
// mV, bounds the agreement of the voltage), and is -V I by definition.
func TestPowerCurvePeaksAtMaxPower(t *testing.T) {
	s := DemoJunction().Spec
	s.Effects = IdealEffects()
	s.Light = Light{Generation: 1e26}
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	vmp, _ := r.Get("max_power_voltage_V")
	pmax, _ := r.Get("max_power_W")
	c, err := PowerCurve(s, Range{From: 0, To: 0.8, Step: 0.005})
	if err != nil {
		t.Fatal(err)
	}
	best, at := math.Inf(-1), 0.0
	for i, p := range c.Series[0].Y {
		if p > best {
			best, at = p, c.Xs[i]
		}
	}
	if math.Abs(at-vmp) > 0.005 || best > pmax*(1+1e-9) || best < pmax*0.99 {
		t.Errorf("power curve peaks at %g V with %g W; figures: %g V, %g W", at, best, vmp, pmax)
	}
}
