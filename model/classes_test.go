package model

import (
	"slices"
	"testing"

	"junco/physics"
)

// Every result key Evaluate produces (dark and lit) is in the class table,
// so that no result silently misses the flags that concern it.
func TestEveryResultKeyHasClasses(t *testing.T) {
	s := DemoJunction().Spec
	lit := s
	lit.Light = Light{Generation: 1e24}
	for _, spec := range []Spec{s, lit} {
		r, err := Evaluate(spec)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range r.Quantities {
			if QuantityClasses(q.Key) == nil {
				t.Errorf("result %q is not in the class table (model/classes.go)", q.Key)
			}
		}
	}
}

// Flags attach by class, not by label text: the assumed-thickness flag
// marks the series resistance, the forward voltage and its temperature
// coefficient but not the contact resistance (which the thickness does not
// touch), and the degenerate-doping flag reaches every saturation current
// and every form of the built-in potential.
func TestFlagsAttachByClass(t *testing.T) {
	s := DemoJunction().Spec
	s.Material, s.Profile = "si", "abrupt"
	s.AcceptorDensity, s.DonorDensity = 1e26, 1e21 // 1e20 and 1e15 cm^-3: degenerate p side
	s.PWidth, s.NWidth, s.NThickness, s.PThickness = 0, 0, 0, 0
	s.ContactResistance = 1
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	flagsOf := func(key string) []string {
		for _, q := range r.Quantities {
			if q.Key == key {
				return q.Flags
			}
		}
		t.Fatalf("no result %s", key)
		return nil
	}
	has := func(key, code string) bool { return slices.Contains(flagsOf(key), code) }
	for _, k := range []string{"series_resistance_ohm", "n_region_resistance_ohm", "forward_voltage_V", "forward_voltage_temperature_coefficient_V_per_K"} {
		if !has(k, physics.FlagAssumedThickness) {
			t.Errorf("%s lacks the assumed-thickness flag: %v", k, flagsOf(k))
		}
	}
	if has("contact_resistance_ohm", physics.FlagAssumedThickness) {
		t.Error("the contact resistance carries the assumed-thickness flag")
	}
	for _, k := range []string{"diffusion_saturation_current_A", "saturation_current_A", "built_in_potential_V", "built_in_potential_electrostatic_V"} {
		if !has(k, physics.FlagDegenerate) {
			t.Errorf("%s lacks the degenerate flag: %v", k, flagsOf(k))
		}
	}
	if has("thermal_voltage_V", physics.FlagDegenerate) {
		t.Error("kT/q carries the degenerate flag")
	}
}

// A value is marked by a code once, however many flags share it: at
// Na = Nd = 1e20 cm^-3 boron and phosphorus both pass their Mott density
// and give two mott-transition flags, and the ionised densities used to
// read [degenerate, mott-transition, mott-transition].
func TestFlagCodeOncePerValue(t *testing.T) {
	s := DemoJunction().Spec
	s.AcceptorDensity, s.DonorDensity = 1e26, 1e26 // 1e20 cm^-3
	r, err := Evaluate(s)
	if err != nil {
		t.Fatal(err)
	}
	mott := 0
	for _, f := range r.Flags {
		if f.Code == "mott-transition" {
			mott++
		}
	}
	if mott < 2 {
		t.Fatalf("want two mott-transition flags (boron and phosphorus), got %d", mott)
	}
	for _, q := range r.Quantities {
		for i, c := range q.Flags {
			if slices.Contains(q.Flags[i+1:], c) {
				t.Errorf("%s carries %q twice: %v", q.Key, c, q.Flags)
			}
		}
	}
}
