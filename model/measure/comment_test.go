package measure

import (
	"math"
	"strings"
	"testing"
)

// The stated temperature comment in its common spellings, with and
// without a colon; remarks that merely mention a temperature are not
// taken; Fahrenheit is not read. Conversion: K = C + 273.15 (SI
// Brochure, 9th ed. (2019), sec. 2.3.1 for the Celsius offset).
func TestStatedTemperatureComment(t *testing.T) {
	cases := []struct {
		line string
		want float64 // K; 0: none
	}{
		{"# temperature: 250 K", 250},
		{"# temperature 250 K", 250},
		{"# Temperature 250K", 250},
		{"# T = 250K", 250},
		{"# T 250 K", 250},
		{"# temp=300", 300},
		{"# Tchuck: 27 C (set point)", 300.15},
		{"# device temperature -40 C", 233.15},
		{"# sample temperature: 25 degC", 298.15},
		{"# temperature: 77 F", 0},
		{"# temperature sweep at 300 K", 0},
		{"# temperature250 K", 0},
		{"# time 5 s", 0},
		{"# T = 5 s", 0},
		{"# note: 300 K", 0},
	}
	for _, c := range cases {
		ds, err := Import(strings.NewReader(c.line+"\nV,I (A)\n0.1,1e-9\n0.2,1e-8\n"), "c.csv", Options{})
		if err != nil {
			t.Fatalf("%q: %v", c.line, err)
		}
		if math.Abs(ds.StatedTemperatureK-c.want) > 1e-9 {
			t.Errorf("%q: stated %g K, want %g K", c.line, ds.StatedTemperatureK, c.want)
		}
	}
}
