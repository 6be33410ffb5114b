package model

import (
	"math"
	"strings"
	"testing"
)

// A table with units in the header, unsorted rows and comments; values in
// SI; log-linear interpolation between rows (exact at the rows and at the
// geometric mean between two rows at the midpoint, by construction).
func TestParseAbsorption(t *testing.T) {
	src := "# invented example table\nwavelength (nm), alpha (1/cm)\n700, 1e3\n500, 1e4\n600, 4e3\n"
	tab, err := ParseAbsorption(strings.NewReader(src), "a.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(tab.WavelengthM) != 3 || math.Abs(tab.WavelengthM[0]/500e-9-1) > 1e-12 || tab.AlphaPerM[0] != 1e6 {
		t.Fatalf("table %+v", tab)
	}
	if a, err := tab.At(tab.WavelengthM[1]); err != nil || a != 4e5 {
		t.Errorf("at a row: %g (%v)", a, err)
	}
	if a, _ := tab.At(650e-9); math.Abs(a/math.Sqrt(4e5*1e5)-1) > 1e-12 {
		t.Errorf("midpoint %g, want the geometric mean %g", a, math.Sqrt(4e5*1e5))
	}
	if _, err := tab.At(800e-9); err == nil || !strings.Contains(err.Error(), "outside the table") {
		t.Errorf("beyond the table: %v", err)
	}
}

// Bad tables name the line and the rule, and never echo the file's data.
func TestParseAbsorptionErrors(t *testing.T) {
	for _, c := range []struct{ src, want string }{
		{"wavelength, alpha\n500, 1\n", "unit"},
		{"wavelength (nm), alpha (1/cm)\n", "no data rows"},
		{"wavelength (nm), alpha (1/cm)\n500, -1\n", "line 2"},
		{"wavelength (nm), alpha (1/cm)\n500, 1, 3\n", "two columns"},
		{"wavelength (nm), alpha (1/cm)\n500, 1\n500, 2\n", "twice"},
		{"wavelength (nm), alpha (V)\n500, 1\n", "absorption coefficient"},
		{"wavelength (nm), alpha (1/cm)\nsecretvalue, 1\n", "line 2"},
	} {
		_, err := ParseAbsorption(strings.NewReader(c.src), "a.csv")
		if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "secretvalue") {
			t.Errorf("%q: %v, want an error with %q", c.src, err, c.want)
		}
	}
	big := "wavelength (nm), alpha (1/cm)\n" + strings.Repeat("500, 1\n", MaxAbsorptionRows+1)
	if _, err := ParseAbsorption(strings.NewReader(big), "big.csv"); err == nil || !strings.Contains(err.Error(), "limit") {
		t.Errorf("too many rows: %v", err)
	}
}

// FuzzParseAbsorption: no input panics, and an accepted table is sorted,
// finite and positive in wavelength.
func FuzzParseAbsorption(f *testing.F) {
	for _, s := range []string{
		"wavelength (nm), alpha (1/cm)\n500, 1e4\n600, 4e3\n",
		"lambda [um];alpha [1/m]\n0.5;1e6\n",
		"# c\n\ufeffwavelength (nm)\talpha (cm-1)\n400\t1e5\n",
		"wavelength (nm), alpha (1/cm)\nNaN, 1\n",
		"",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		tab, err := ParseAbsorption(strings.NewReader(s), "f.csv")
		if err != nil {
			return
		}
		for i, w := range tab.WavelengthM {
			if !(w > 0) || math.IsInf(w, 0) || (i > 0 && !(w > tab.WavelengthM[i-1])) {
				t.Fatalf("bad wavelengths %v", tab.WavelengthM)
			}
		}
	})
}
