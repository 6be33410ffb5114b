package cli

import (
	"encoding/json"
	"strings"
	"testing"

	"junco/model"
)

// --sweep with --csv writes one CSV row per bias with unit-labelled
// headers, and the caution on stderr.
func TestCalcSweepCSV(t *testing.T) {
	code, out, errs := runCLI(t, "calc", "--sweep", "-2V:0.9V:10mV", "--csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 292 || !strings.HasPrefix(lines[0], "bias_V,") || !strings.Contains(lines[0], "recombination_current_A") ||
		!strings.Contains(lines[0], "capacitance_F") || !strings.Contains(lines[0], "ideality_factor") {
		t.Errorf("header %q, %d lines", lines[0], len(lines))
	}
	if !strings.Contains(errs, "[caution]") {
		t.Errorf("no caution on stderr: %s", errs)
	}
	code, out, _ = runCLI(t, "calc", "--sweep", "0V:1V:0.5V", "--ascii")
	if code != 0 || !strings.Contains(out, "I_rec/gen") {
		t.Errorf("table: %d\n%s", code, out)
	}
}

// --tsweep with --csv: Is(T), VF(T) at --if and dVF/dT per temperature.
func TestCalcTemperatureSweepCSV(t *testing.T) {
	code, out, errs := runCLI(t, "calc", "--tsweep", "250K:400K:10K", "--csv", "--if", "10mA")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 17 || !strings.HasPrefix(lines[0], "temperature_K,") || !strings.Contains(lines[0], "0.01A") {
		t.Errorf("header %q, %d lines", lines[0], len(lines))
	}
}

// A sweep above --power-limit warns on stderr; bad sweeps exit 2.
func TestCalcPowerLimitAndBadSweep(t *testing.T) {
	_, _, errs := runCLI(t, "calc", "--sweep", "0V:1.5V:0.5V", "--csv", "--power-limit", "10mW")
	if !strings.Contains(errs, "[power-limit]") {
		t.Errorf("no power warning: %s", errs)
	}
	for _, c := range [][]string{
		{"calc", "--sweep", "0V:1V"}, {"calc", "--sweep", "1V:0V:0.1V"}, {"calc", "--csv"},
		{"calc", "--sweep", "0:1:0.1", "--tsweep", "300K:310K:5K"}, {"calc", "--rc", "-3ohm"}, {"calc", "--bgn-model", "x"},
	} {
		if code, out, errs := runCLI(t, c...); code != 2 || out != "" || errs == "" {
			t.Errorf("%v: exit %d, stdout %q", c, code, out)
		}
	}
}

// --ideal and the --no-* switches: with every effect off current_A is the
// Shockley current; with the realistic default it is not.
func TestCalcEffectSwitches(t *testing.T) {
	get := func(args ...string) map[string]any {
		code, out, errs := runCLI(t, append([]string{"calc", "--bias", "0.7V", "--json"}, args...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d %s", args, code, errs)
		}
		var m map[string]any
		if err := json.Unmarshal([]byte(out), &m); err != nil {
			t.Fatal(err)
		}
		return m
	}
	m := get("--ideal")
	if m["current_A"] != m["ideal_current_A"] {
		t.Errorf("--ideal: %v vs %v", m["current_A"], m["ideal_current_A"])
	}
	m = get()
	if m["current_A"] == m["ideal_current_A"] || m["series_resistance_ohm"].(float64) <= 0 {
		t.Errorf("default effects not applied")
	}
	m = get("--no-rs", "--rsh", "100ohm")
	if m["series_resistance_ohm"].(float64) != 0 || m["shunt_current_A"].(float64) <= 0.006 {
		t.Errorf("--no-rs --rsh: Rs %v, shunt %v", m["series_resistance_ohm"], m["shunt_current_A"])
	}
	_, help, _ := runCLI(t, "calc", "--help")
	for _, w := range []string{"--no-srh", "--sweep", "--tsweep", "power-limit", "rated limits"} {
		if !strings.Contains(help, w) {
			t.Errorf("help lacks %q", w)
		}
	}
}

// calc --help lists the catalogue's effects: every effect switch with its
// description, and under it the flags that refine it; each line fits 80
// columns.
func TestCalcHelpListsCatalogueEffects(t *testing.T) {
	_, help, _ := runCLI(t, "calc", "--help")
	desc, _, _ := strings.Cut(help, "Usage:")
	flat := strings.Join(strings.Fields(desc), " ")
	for _, f := range model.Catalogue() {
		switch {
		case f.Class == model.ClassEffect:
			want := "--" + f.Flag + " " + strings.TrimPrefix(f.Help, "effect off: ")
			if !strings.Contains(flat, want) {
				t.Errorf("calc --help lacks %q", want)
			}
		case f.Parent != "":
			_, choices, _ := strings.Cut(f.Help, ": ")
			if !strings.Contains(flat, "--"+f.Flag+" "+choices) {
				t.Errorf("calc --help lacks --%s %s", f.Flag, choices)
			}
		}
	}
	for _, l := range strings.Split(desc, "\n") {
		if len(l) > 80 && !strings.HasPrefix(l, "Caution:") {
			t.Errorf("line over 80 columns: %q", l)
		}
	}
}

// The words for an empty value are the catalogue's, as in the workbench:
// --wp long, --sp ohmic, --rsh none and --taun auto give the junction with
// those flags omitted, while --sp 0 (a passivated contact) is a value and
// a word of another field (--sp long) is refused.
func TestCalcEmptyValueWords(t *testing.T) {
	base := jsonOf(t, "calc", "--wp", "2um", "--json")
	words := jsonOf(t, "calc", "--wp", "2um", "--wn", "long", "--sp", "ohmic", "--rsh", "none", "--taun", "auto", "--json")
	for _, k := range []string{"saturation_current_A", "current_A", "electron_lifetime_s"} {
		if base[k] != words[k] {
			t.Errorf("%s: %v with the words, %v without the flags", k, words[k], base[k])
		}
	}
	if passivated := jsonOf(t, "calc", "--wp", "2um", "--sp", "0", "--json"); passivated["saturation_current_A"] == base["saturation_current_A"] {
		t.Error("--sp 0 read as an ohmic contact")
	}
	if code, _, _ := runCLI(t, "calc", "--sp", "long"); code != exitUsage {
		t.Errorf("--sp long: exit %d, want %d", code, exitUsage)
	}
}
