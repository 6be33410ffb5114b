package tui

import (
	"strings"
	"testing"

	"junco/model"
)

// goToField moves down the current step until the field with id has the
// focus.
func goToField(t *testing.T, m Model, id string) Model {
	t.Helper()
	for range 40 {
		if m.form.defs[m.form.cur].id == id {
			return m
		}
		m = press(m, "down")
	}
	t.Fatalf("no field %s on this step", id)
	return m
}

// Light is defined under Conditions: a uniform generation puts the lit
// results (photocurrent, open-circuit voltage) in the results, and
// monochromatic light refuses its power until its wavelength and
// absorption coefficient are given, keeping the value from before in force.
func TestLightInTheDefineForm(t *testing.T) {
	m := newTest(t, 200, 60)
	m = press(m, "5")
	m = goToField(t, m, model.FieldGeneration)
	m = press(m, "enter", "ctrl+u")
	m = typeText(m, "1e20")
	m = press(m, "enter")
	if g := m.Spec().Light.Generation; g != 1e26 {
		t.Fatalf("generation in force %g m^-3 s^-1, want 1e26", g)
	}
	for _, key := range []string{"photocurrent_A", "short_circuit_current_A", "open_circuit_voltage_V", "fill_factor"} {
		if v, ok := m.form.res.Get(key); !ok || !(v > 0) {
			t.Errorf("lit results: %s = %g (%v)", key, v, ok)
		}
	}
	m = goToField(t, m, model.FieldLightPower)
	m = press(m, "enter", "ctrl+u")
	m = typeText(m, "10")
	m = press(m, "enter")
	if p := m.Spec().Light.PowerDensity; p != 0 {
		t.Errorf("light power %g W/m^2 put in force without wavelength and absorption", p)
	}
	if !strings.Contains(plain(m), "wavelength") {
		t.Errorf("no message naming the missing wavelength:\n%s", plain(m))
	}
}

// The charts offer the power a lit junction delivers, drawn from the lit
// I-V (model.PowerCurve).
func TestPowerChart(t *testing.T) {
	var kind chartKind
	for _, k := range chartKinds(false) {
		if k.id == "power" {
			kind = k
		}
	}
	if kind.id == "" {
		t.Fatal("no power chart")
	}
	s := model.DemoJunction().Spec
	s.Light = model.Light{Generation: 1e26}
	c, err := chartCurve(chartRequest{kind: kind, iv: model.Range{From: 0, To: 0.7, Step: 0.01}}, s)
	if err != nil || c.ID != "power" {
		t.Fatalf("power curve: %v %v", c.ID, err)
	}
	positive := false
	for _, p := range c.Series[0].Y {
		positive = positive || p > 0
	}
	if !positive {
		t.Error("a lit junction delivers no power anywhere on 0-0.7 V")
	}
}
