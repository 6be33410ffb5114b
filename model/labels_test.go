package model

import (
	"regexp"
	"strings"
	"testing"
)

// Values print with their unit beside them, in units of the trade, never
// with a bare exponent of zero or a mega prefix that reads like milli.
func TestFormatUnitsBesideValues(t *testing.T) {
	cases := []struct {
		k    Kind
		v    float64
		want string
	}{
		{Density, -5e6, "-5.00 cm^-3"},
		{Density, 1e23, "1.00e17 cm^-3"},
		{Current, 2.669e7, "2.669e7 A"},
		{Current, 26.69e-3, "26.69 mA"},
		{Current, 999.96e3, "1.000e6 A"},
		{Voltage, 2.585e3, "2.585 kV"},
		{Resistance, 685.8e6, "685.8 Mohm"},
		{Conductance, 1.003e-3, "1.003 mS"},
		{TemperatureCoefficient, -2.235e-3, "-2.235 mV/K"},
	}
	for _, c := range cases {
		sig := 4
		if c.k == Density {
			sig = 3
		}
		got := Format(c.k, c.v, sig, true)
		if got != c.want {
			t.Errorf("Format(%s, %g) = %q, want %q", KindName(c.k), c.v, got, c.want)
			continue
		}
		// Everything printed can be typed back.
		back, err := ParseValue(c.k, got)
		if err != nil || !near(back, c.v, 1e-3) {
			t.Errorf("ParseValue(%q) = %g, %v; want %g", got, back, err, c.v)
		}
	}
}

func near(a, b, rel float64) bool {
	d := a - b
	if d < 0 {
		d = -d
	}
	m := b
	if m < 0 {
		m = -m
	}
	return d <= rel*m
}

// No result label carries its unit: the unit is printed with the value.
func TestLabelsCarryNoUnits(t *testing.T) {
	r, err := Evaluate(DemoJunction().Spec)
	if err != nil {
		t.Fatal(err)
	}
	unitInLabel := regexp.MustCompile(`\((V/K|S|A|V|F|ohm|K|m|s|W)\)\s*$`)
	for _, q := range r.Quantities {
		if unitInLabel.MatchString(q.Label) {
			t.Errorf("%s: label %q names a unit; the value carries it (%s)", q.Key, q.Label, q.Text(4, true))
		}
	}
}

// The text table keeps its columns: every symbol starts in one column and
// every value ends in one, however long a label is.
func TestResultTextColumnsAlign(t *testing.T) {
	r, err := Evaluate(DemoJunction().Spec)
	if err != nil {
		t.Fatal(err)
	}
	starts, ends := map[int]bool{}, map[int]bool{}
	lines := strings.Split(r.Text(true), "\n")
	for _, q := range r.Quantities {
		re := regexp.MustCompile(`^  ` + regexp.QuoteMeta(q.Label) + ` +()` + regexp.QuoteMeta(q.Symbol) + ` +` + regexp.QuoteMeta(q.Text(4, true)) + `()(  \[|$)`)
		found := false
		for _, l := range lines {
			if m := re.FindStringSubmatchIndex(l); m != nil {
				starts[len([]rune(l[:m[2]]))] = true
				ends[len([]rune(l[:m[4]]))] = true
				found = true
				break
			}
		}
		if !found {
			t.Errorf("no line for %s (%q %q %q)", q.Key, q.Label, q.Symbol, q.Text(4, true))
		}
	}
	if len(starts) != 1 || len(ends) != 1 {
		t.Errorf("symbols start in columns %v and values end in columns %v; want one each:\n%s", starts, ends, r.Text(true))
	}
}
