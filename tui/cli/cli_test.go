package cli

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"
)

// writeTestFile writes a test's input file (mode 0600) or fails the test.
func writeTestFile(t testing.TB, path string, data []byte) {
	t.Helper()
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}
}

func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

// `junco calc --json` on Neamen's Example 7.2/7.3 junction (Na = 1e16,
// Nd = 1e15 cm^-3, 5 V reverse). With CODATA constants and the Misiakos ni
// the depletion width differs from the book's 2.83 um (ni = 1.5e10) only by
// the log of the ni ratio: within 2% (computed).
func TestCalcJSON(t *testing.T) {
	code, out, errs := runCLI(t, "calc", "--material", "si", "--na", "1e16cm-3", "--nd", "1e15cm-3",
		"--temp", "300K", "--area", "1e-4cm2", "--bias", "-5V", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	w := m["depletion_width_m"].(float64)
	if math.Abs(w-2.83e-6) > 0.02*2.83e-6 {
		t.Errorf("W = %g m, want about 2.83 um (Neamen 4th ed., Ex. 7.3)", w)
	}
	if vt := m["thermal_voltage_V"].(float64); math.Abs(vt-0.02585) > 1e-5 {
		t.Errorf("kT/q = %g", vt)
	}
}

func TestCalcText(t *testing.T) {
	code, out, _ := runCLI(t, "calc", "--na", "1e17", "--nd", "1e16", "--bias", "0.5V", "--ascii")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	for _, want := range []string{"built-in potential", "depletion width", "saturation current", "cm^-3", "Transport"} {
		if !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
}

// Bad input exits 2 with a message naming the field, the value and the
// allowed range on stderr; nothing on stdout.
func TestCalcBadInput(t *testing.T) {
	cases := [][]string{
		{"calc", "--na", "-1e16"},
		{"calc", "--temp", "NaN"},
		{"calc", "--area", "1 acre"},
		{"calc", "--material", "wood"},
		{"calc", "--bias", "200V"},
		{"calc", "--nd", "1e30cm-3"},
		{"calc", "stray"},
		{"calc", "--no-such-flag"},
	}
	for _, c := range cases {
		code, out, errs := runCLI(t, c...)
		if code != 2 {
			t.Errorf("%v: exit %d, want 2", c, code)
		}
		if out != "" || errs == "" {
			t.Errorf("%v: stdout %q stderr %q", c, out, errs)
		}
	}
	_, _, errs := runCLI(t, "calc", "--na", "-1e16")
	if !strings.Contains(errs, "na") || !strings.Contains(errs, "allowed") {
		t.Errorf("message does not name field and range: %s", errs)
	}
}

func TestUnknownCommand(t *testing.T) {
	if code, _, _ := runCLI(t, "frobnicate"); code != 2 {
		t.Errorf("unknown command exit %d", code)
	}
	if code, out, _ := runCLI(t, "help"); code != 0 || !strings.Contains(out, "calc") {
		t.Errorf("help: %d %q", code, out)
	}
}

// Every JSON key of `junco calc --json` is documented in the README: the
// keys are a public interface.
func TestReadmeDocumentsEveryKey(t *testing.T) {
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, "calc", "--json", "--bias", "0.5V")
	if code != 0 {
		t.Fatalf("calc: %s", errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatal(err)
	}
	for k := range m {
		if !strings.Contains(string(readme), "`"+k+"`") {
			t.Errorf("README does not document the JSON key %q", k)
		}
	}
}
