package cli

import (
	"encoding/json"
	"strings"
	"testing"
)

// --dtau-exponent G sets the prefactor T^(3+G/2) (Sze & Ng 2007, sec. 2.3:
// Js ~ T^(3+gamma/2) exp(-Eg/kT)); --gamma is its deprecated alias and
// says so; the text names the prefactor exponent.
func TestFitArrheniusDTauExponent(t *testing.T) {
	files := []string{"testdata/fit/arrhenius/iv-250K.csv", "testdata/fit/arrhenius/iv-300K.csv", "testdata/fit/arrhenius/iv-350K.csv"}
	run := func(extra ...string) (map[string]any, string) {
		t.Helper()
		code, out, errs := fitCall(append(append([]string{"arrhenius", "--json"}, extra...), files...)...)
		var m map[string]any
		if code != 0 || json.Unmarshal([]byte(out), &m) != nil {
			t.Fatalf("%v: exit %d\n%s%s", extra, code, out, errs)
		}
		return m, errs
	}
	m, errs := run("--dtau-exponent", "3")
	if m["prefactor_exponent"] != 4.5 || m["gamma"] != 3.0 || strings.Contains(errs, "deprecated") {
		t.Errorf("--dtau-exponent 3: exponent %v gamma %v, stderr %q", m["prefactor_exponent"], m["gamma"], errs)
	}
	old, errs := run("--gamma", "3")
	if old["activation_energy_eV"] != m["activation_energy_eV"] || !strings.Contains(errs, "--gamma is deprecated, use --dtau-exponent") {
		t.Errorf("--gamma 3: Ea %v (want %v), stderr %q", old["activation_energy_eV"], m["activation_energy_eV"], errs)
	}
	plain, _ := run()
	// T^4.5 against T^3 on the same data: Ea lower by about 1.5 k T_mean
	// (d ln T^1.5 / d(1/T) = -1.5 T), 40 meV near 300 K.
	d := plain["activation_energy_eV"].(float64) - m["activation_energy_eV"].(float64)
	if d < 0.03 || d > 0.05 {
		t.Errorf("Ea shift T^3 -> T^4.5: %.4f eV, want about 0.04", d)
	}
	code, out, _ := fitCall(append([]string{"arrhenius", "--dtau-exponent", "3"}, files...)...)
	if code != 0 || !strings.Contains(out, "prefactor exponent") || !strings.Contains(out, "4.5 = 3 + g/2") {
		t.Errorf("text:\n%s", out)
	}
	if code, _, errs := fitCall(append([]string{"arrhenius", "--dtau-exponent", "x"}, files...)...); code != exitUsage || !strings.Contains(errs, "-20..20") {
		t.Errorf("bad value: exit %d, %q", code, errs)
	}
}
