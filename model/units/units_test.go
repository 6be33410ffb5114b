package units

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestParseValueTradeUnits(t *testing.T) {
	cases := []struct {
		k    Kind
		in   string
		want float64 // SI
	}{
		{Density, "1e17cm-3", 1e23},
		{Density, "1e23 m^-3", 1e23},
		{Density, "1e17", 1e23}, // bare: cm^-3
		{Density, "2.5e15 /cm3", 2.5e21},
		{Gradient, "1e20cm-4", 1e28},
		{Temperature, "300K", 300},
		{Temperature, "27C", 300.15},
		{Temperature, "27 °C", 300.15},
		{Temperature, "77", 77},
		{Area, "1mm2", 1e-6},
		{Area, "1e-4cm2", 1e-8},
		{Area, "100um2", 1e-10},
		{Area, "100µm^2", 1e-10},
		{Area, "0.01", 1e-6}, // bare: cm^2
		{Length, "200um", 200e-6},
		{Length, "2", 2e-6}, // bare: um
		{Length, "0.5 mm", 5e-4},
		{Time, "1us", 1e-6},
		{Time, "1µs", 1e-6},
		{Time, "5ns", 5e-9},
		{Time, "1e-6", 1e-6},
		{Voltage, "-5V", -5},
		{Voltage, "0.5 V", 0.5},
		{Voltage, "650mV", 0.65},
		{Voltage, "-1.2kV", -1200},
		{Velocity, "1e3cm/s", 10},
		{Velocity, "100", 1},
		{Resistance, "10kohm", 1e4},
		{Resistance, "2Mohm", 2e6},
		{Resistance, "5mohm", 5e-3},
		{Current, "1mA", 1e-3},
		{Current, "3uA", 3e-6},
		{Voltage, "5MV", 5e6}, // mega stays mega, never milli
		{Current, "1MA", 1e6},
		{Capacitance, "4.7pF", 4.7e-12},
		{Length, "35nm", 35e-9},
	}
	for _, c := range cases {
		got, err := ParseValue(c.k, c.in)
		if err != nil {
			t.Errorf("%q: %v", c.in, err)
			continue
		}
		if math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%q = %g, want %g", c.in, got, c.want)
		}
	}
}

func TestParseValueRejects(t *testing.T) {
	cases := []struct {
		k  Kind
		in string
	}{
		{Density, ""}, {Density, "abc"}, {Density, "NaN"}, {Density, "Inf"}, {Density, "1e17 furlongs"},
		{Voltage, "--5"}, {Area, "1e400"}, {Temperature, "300 F"}, {Current, "1 xA"}, {Length, "3 parsecs"},
	}
	for _, c := range cases {
		if v, err := ParseValue(c.k, c.in); err == nil {
			t.Errorf("%q accepted as %g", c.in, v)
		} else {
			var ue *UnitError
			if !errors.As(err, &ue) || !strings.Contains(err.Error(), "bare number") {
				t.Errorf("%q: error %v lacks the help text", c.in, err)
			}
		}
	}
}

func TestFormatTradeUnits(t *testing.T) {
	cases := []struct {
		k    Kind
		v    float64
		want string
	}{
		{Density, 1e23, "1.000e17 cm^-3"},
		{Length, 9.508e-7, "950.8 nm"},
		{Length, 2.83e-6, "2.830 um"},
		{Capacitance, 3.66e-13, "366.0 fF"},
		{Capacitance, 1.2e-11, "12.00 pF"},
		{Current, -7.2e-14, "-72.00 fA"},
		{Current, 0, "0 A"},
		{CurrentDensity, 4.155e-7, "4.155e-11 A/cm^2"},
		{Temperature, 300, "300.0 K"},
		{Voltage, 0.7123, "712.3 mV"},
		{Voltage, 999.96, "1.000 kV"},
		{Mobility, 0.1362, "1362 cm^2/Vs"},
		{Field, 1.34e6, "1.340e4 V/cm"},
		{Area, 1e-8, "1.000e-4 cm^2"},
		{Area, 1e-10, "100.0 um^2"},
	}
	for _, c := range cases {
		if got := Format(c.k, c.v, 4, true); got != c.want {
			t.Errorf("Format(%v, %g) = %q, want %q", c.k, c.v, got, c.want)
		}
	}
	if got := Format(Length, math.NaN(), 4, true); got != "n/a" {
		t.Errorf("NaN formats as %q", got)
	}
	if got := Format(Time, 1e-6, 3, false); got != "1.00 µs" {
		t.Errorf("unicode micro: %q", got)
	}
}

// Parse and format round-trip to the printed precision.
func TestFormatParseRoundTrip(t *testing.T) {
	for _, k := range []Kind{Density, Length, Time, Voltage, Capacitance, Current} {
		for _, v := range []float64{1.234e-12, 5.678e-7, 3.3e-3, 0.42, 7.7, 1.5e16, 2.2e24} {
			if k == Voltage && math.Abs(v) > 1e5 {
				continue
			}
			s := Format(k, v, 6, true)
			got, err := ParseValue(k, strings.ReplaceAll(s, "cm^-3", "cm-3"))
			if err != nil {
				t.Errorf("%v %g -> %q: %v", k, v, s, err)
				continue
			}
			if math.Abs(got-v) > 1e-5*math.Abs(v) {
				t.Errorf("%v %g -> %q -> %g", k, v, s, got)
			}
		}
	}
}

func FuzzParseValue(f *testing.F) {
	for _, s := range []string{"1e17cm-3", "27C", "-5V", "100um2", "", "1e", "+.5e-3 mV", "NaN", "1e999", "µs"} {
		f.Add(0, s)
	}
	f.Fuzz(func(t *testing.T, k int, s string) {
		kind := Kind(((k % 19) + 19) % 19)
		v, err := ParseValue(kind, s)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			t.Fatalf("%q parsed to non-finite %g", s, v)
		}
		if err != nil && err.Error() == "" {
			t.Fatal("empty error")
		}
	})
}

// Error messages list units as they are written (K and degC, not k and c).
func TestUnitErrorListsUnitsInProperCase(t *testing.T) {
	cases := []struct {
		k    Kind
		text string
		want string
	}{
		{Temperature, "80F", "units: K, degC;"},
		{Voltage, "5 furlongs", "units: V, mV, kV;"},
		{Current, "1 parsec", "units: A, mA, uA, nA, pA;"},
		{Field, "3 bananas", "units: V/cm, kV/cm, MV/cm, V/m;"},
	}
	for _, c := range cases {
		_, err := ParseValue(c.k, c.text)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ParseValue(%v, %q) error %v, want it to list %q", c.k, c.text, err, c.want)
		}
	}
	// Millivolt per centimetre is not megavolt per centimetre.
	if v, err := ParseValue(Field, "1MV/cm"); err != nil || v != 1e8 {
		t.Errorf("1MV/cm = %g, %v; want 1e8 V/m", v, err)
	}
	if v, err := ParseValue(Field, "1mV/cm"); err == nil {
		t.Errorf("1mV/cm accepted as %g V/m; no such unit is offered", v)
	}
}
