package cli

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// calc under light: --light and --absorption (a value or a table file)
// give the lit keys; the table's value is taken at the light's wavelength
// (log-linear between rows, model.AbsorptionTable), so a table row at
// 650 nm gives the same result as that value typed.
func TestCalcLightFlags(t *testing.T) {
	dir := t.TempDir()
	table := filepath.Join(dir, "alpha.csv")
	// Invented table for the test, not data of a material.
	writeTestFile(t, table, []byte("wavelength (nm), alpha (1/cm)\n500, 1e4\n650, 3e3\n800, 8e2\n"))
	base := []string{"calc", "--na", "1e19", "--nd", "1e16", "--wp", "0.3um", "--wn", "200um", "--bias", "0", "--json", "--light", "650nm:100mW/cm2"}
	get := func(args ...string) map[string]any {
		t.Helper()
		code, out, errs := runCLI(t, append(append([]string{}, base...), args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(out), &m); err != nil {
			t.Fatal(err)
		}
		return m
	}
	byValue := get("--absorption", "3e3")
	byTable := get("--absorption", table)
	for _, k := range []string{"photocurrent_A", "short_circuit_current_A", "open_circuit_voltage_V", "max_power_W", "fill_factor", "efficiency"} {
		a, ok1 := byValue[k].(float64)
		b, ok2 := byTable[k].(float64)
		if !ok1 || !ok2 || !(a > 0) || math.Abs(a/b-1) > 1e-9 {
			t.Errorf("%s: %v by value, %v by table", k, byValue[k], byTable[k])
		}
	}
	for _, c := range [][]string{
		{"calc", "--light", "650nm"},
		{"calc", "--light", "650nm:100mW/cm2"}, // no absorption
		{"calc", "--light", "650nm:100mW/cm2", "--absorption", filepath.Join(dir, "missing.csv")},
		{"calc", "--light", "2000nm:100mW/cm2", "--absorption", table}, // outside the table
	} {
		if code, _, errs := runCLI(t, c...); code != 2 || errs == "" {
			t.Errorf("%v: exit %d, %q; want 2 with a message", c, code, errs)
		}
	}
}

// solve --qe: analytic and numeric internal quantum efficiency agree in low
// injection (the closed forms of Hovel 1975 against the drift-diffusion
// solution, within 2 %), one row per wavelength.
func TestSolveQE(t *testing.T) {
	dir := t.TempDir()
	table := filepath.Join(dir, "alpha.csv")
	// Invented table for the test, not data of a material.
	writeTestFile(t, table, []byte("wavelength (nm), alpha (1/cm)\n400, 9e4\n700, 2e3\n1000, 60\n"))
	code, out, errs := runCLI(t, "solve", "--na", "1e19", "--nd", "1e16", "--wp", "0.3um", "--wn", "200um",
		"--light", "600nm:10", "--absorption", table, "--qe", "400nm:1000nm:300nm", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m struct {
		QE []struct {
			Analytic, Numeric float64
		} `json:"quantum_efficiency"`
	}
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	if len(m.QE) != 3 {
		t.Fatalf("%d points, want 3", len(m.QE))
	}
	for i, p := range m.QE {
		if !(p.Analytic > 0 && p.Analytic <= 1) || math.Abs(p.Numeric/p.Analytic-1) > 0.02 {
			t.Errorf("point %d: analytic %g numeric %g", i, p.Analytic, p.Numeric)
		}
	}
	if code, _, errs := runCLI(t, "solve", "--qe", "400nm:1000nm:300nm"); code != 2 || !strings.Contains(errs, "absorption") {
		t.Errorf("--qe without absorption: exit %d, %q", code, errs)
	}
}
