package cli

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"junco/physics/solver"
)

// jsonOf runs a command that must succeed and decodes its JSON output.
func jsonOf(t *testing.T, args ...string) map[string]any {
	t.Helper()
	code, out, errs := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("%v: not JSON: %v\n%s", args, err, out)
	}
	return m
}

func num(t *testing.T, m map[string]any, key string) float64 {
	t.Helper()
	v, ok := m[key].(float64)
	if !ok {
		t.Fatalf("key %q missing or not a number: %v", key, m[key])
	}
	return v
}

// `junco solve --json` carries calc's keys; in the analytic model's regime
// (non-degenerate step, reverse bias, every analytic effect off) the
// numeric values agree with calc's within the solver's cross-check
// tolerances: the built-in potential within 1 mV (Sze & Ng 2007, eq. 2.8,
// as calc computes it), the depletion width within 4 % of calc's width
// with the 2kT/q majority-tail correction, W sqrt((Vbi - V - 2kT/q)/(Vbi -
// V)) (Sze & Ng 2007, section 2.2; W grows as sqrt(Vbi - V), eq. 2.10),
// the capacitance within 5 % of calc's eps A/W (Sze & Ng 2007, eq. 2.30).
// The "analytic" object repeats calc's values exactly and "difference"
// holds (numeric - analytic)/|analytic|. In low-injection forward bias of
// a long-base p+n diode the current is within 5 % of calc's Shockley
// current (Shockley 1949).
func TestSolveJSONMatchesCalc(t *testing.T) {
	junction := []string{"--ideal", "--na", "1e16cm-3", "--nd", "1e15cm-3", "--area", "1e-4cm2", "--bias", "-2V", "--json"}
	calc := jsonOf(t, append([]string{"calc"}, junction...)...)
	sol := jsonOf(t, append([]string{"solve"}, junction...)...)
	for _, k := range []string{"built_in_potential_V", "depletion_width_m", "junction_capacitance_F", "current_A", "peak_field_V_per_m",
		"nodes", "newton_iterations", "current_conservation_error"} {
		num(t, sol, k)
	}
	an, ok1 := sol["analytic"].(map[string]any)
	diff, ok2 := sol["difference"].(map[string]any)
	if !ok1 || !ok2 {
		t.Fatalf("no analytic/difference objects: %v", sol)
	}
	for _, k := range []string{"built_in_potential_V", "depletion_width_m", "junction_capacitance_F", "current_A", "peak_field_V_per_m"} {
		if num(t, an, k) != num(t, calc, k) {
			t.Errorf("analytic.%s = %v, calc %v", k, an[k], calc[k])
		}
		want := (num(t, sol, k) - num(t, calc, k)) / math.Abs(num(t, calc, k))
		if math.Abs(num(t, diff, k)-want) > 1e-12 {
			t.Errorf("difference.%s = %v, want %v", k, diff[k], want)
		}
	}
	vbi, vt := num(t, calc, "built_in_potential_V"), num(t, calc, "thermal_voltage_V")
	if d := math.Abs(num(t, sol, "built_in_potential_V") - vbi); d > 1e-3 {
		t.Errorf("Vbi numeric %v, calc %v", sol["built_in_potential_V"], vbi)
	}
	wCorr := num(t, calc, "depletion_width_m") * math.Sqrt((vbi+2-2*vt)/(vbi+2))
	if e := math.Abs(num(t, sol, "depletion_width_m")/wCorr - 1); e > 0.04 {
		t.Errorf("W numeric %v, corrected calc W %v (%.2f %%)", sol["depletion_width_m"], wCorr, 100*e)
	}
	if e := math.Abs(num(t, sol, "junction_capacitance_F")/num(t, calc, "junction_capacitance_F") - 1); e > 0.05 {
		t.Errorf("C numeric %v, calc %v (%.2f %%)", sol["junction_capacitance_F"], calc["junction_capacitance_F"], 100*e)
	}
	t.Logf("-2 V: Vbi %.6f/%.6f V, W %.4g/%.4g (corrected %.4g) m, C %.4g/%.4g F", num(t, sol, "built_in_potential_V"), vbi,
		num(t, sol, "depletion_width_m"), num(t, calc, "depletion_width_m"), wCorr, num(t, sol, "junction_capacitance_F"), num(t, calc, "junction_capacitance_F"))

	forward := []string{"--ideal", "--na", "1e18cm-3", "--nd", "1e16cm-3", "--bias", "0.55V", "--json"}
	calc = jsonOf(t, append([]string{"calc"}, forward...)...)
	sol = jsonOf(t, append([]string{"solve"}, forward...)...)
	if e := math.Abs(num(t, sol, "current_A")/num(t, calc, "current_A") - 1); e > 0.05 {
		t.Errorf("forward I numeric %v, calc %v (%.2f %%)", sol["current_A"], calc["current_A"], 100*e)
	}
	t.Logf("0.55 V: I numeric %.5g A, calc %.5g A", num(t, sol, "current_A"), num(t, calc, "current_A"))
}

// unitSuffixes are the unit endings of junco's SI CSV headers (the
// DEVELOPERS.md units policy); a few dimensionless columns are listed by
// name.
var unitSuffixes = []string{"_m", "_V", "_V_per_m", "_eV", "_per_m3", "_C_per_m3", "_per_m3_s", "_A_per_m2", "_A", "_F", "_F_per_m2", "_C_per_m2"}

func checkHeader(t *testing.T, header string, dimensionless ...string) []string {
	t.Helper()
	cols := strings.Split(header, ",")
	for _, c := range cols {
		ok := false
		for _, s := range unitSuffixes {
			ok = ok || strings.HasSuffix(c, s)
		}
		for _, d := range dimensionless {
			ok = ok || c == d
		}
		if !ok {
			t.Errorf("column %q carries no unit", c)
		}
	}
	return cols
}

// --csv profile|iv|cv: unit-labelled headers and one row per node or bias.
func TestSolveCSV(t *testing.T) {
	code, out, errs := runCLI(t, "solve", "--ideal", "--na", "1e17cm-3", "--nd", "1e16cm-3", "--bias", "0.3V", "--nodes", "150", "--csv", "profile")
	if code != 0 {
		t.Fatalf("profile: exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	cols := checkHeader(t, lines[0])
	if len(lines) != 151 {
		t.Errorf("profile: %d lines for 150 nodes", len(lines))
	}
	if n := len(strings.Split(lines[1], ",")); n != len(cols) {
		t.Errorf("profile row has %d fields, header %d", n, len(cols))
	}
	if !strings.Contains(errs, "[numeric-length]") {
		t.Errorf("flags not on stderr: %s", errs)
	}
	code, out, errs = runCLI(t, "solve", "--ideal", "--sweep", "0V:0.4V:0.1V", "--csv", "iv")
	if code != 0 {
		t.Fatalf("iv: exit %d: %s", code, errs)
	}
	lines = strings.Split(strings.TrimSpace(out), "\n")
	checkHeader(t, lines[0], "relative_difference", "newton_iterations", "current_conservation_error")
	if len(lines) != 6 || !strings.HasPrefix(lines[0], "bias_V,current_A,") {
		t.Errorf("iv: %d lines, header %q", len(lines), lines[0])
	}
	code, out, errs = runCLI(t, "solve", "--ideal", "--na", "1e16cm-3", "--nd", "1e15cm-3", "--cv", "-2V:0V:1V", "--csv", "cv")
	if code != 0 {
		t.Fatalf("cv: exit %d: %s", code, errs)
	}
	lines = strings.Split(strings.TrimSpace(out), "\n")
	checkHeader(t, lines[0], "relative_difference")
	if len(lines) != 4 || !strings.HasPrefix(lines[0], "bias_V,capacitance_F,") {
		t.Errorf("cv: %d lines, header %q", len(lines), lines[0])
	}
	// The table forms.
	code, out, _ = runCLI(t, "solve", "--ideal", "--cv", "-1V:0V:0.5V", "--ascii")
	if code != 0 || !strings.Contains(out, "C numeric") || !strings.Contains(out, "C analytic") {
		t.Errorf("cv table: exit %d\n%s", code, out)
	}
	code, out, _ = runCLI(t, "solve", "--ideal", "--bias", "-1V", "--ascii")
	for _, w := range []string{"built-in potential", "depletion width", "depletion capacitance", "current conservation error", "analytic", "numeric"} {
		if code != 0 || !strings.Contains(out, w) {
			t.Errorf("comparison table lacks %q (exit %d)\n%s", w, code, out)
		}
	}
}

// Profile flags: a Gaussian implant (junction at xj = Rp + dRp sqrt(2
// ln(Np/NB)), Plummer, Deal, Griffin 2000, ch. 8, within 1 %), an erfc
// diffusion measured from the right contact (xj = L - 2 sqrt(Dt)
// erfcinv(NB/Cs), Plummer, Deal, Griffin 2000, ch. 7, within 1 %), a
// uniform layer and an imported file.
func TestSolveProfiles(t *testing.T) {
	m := jsonOf(t, "solve", "--base", "donor", "--nd", "1e15cm-3", "--implant", "acceptor:1e13cm-2:0.1um:0.03um", "--length", "5um", "--json")
	np := 1e13 * 1e4 / (math.Sqrt(2*math.Pi) * 0.03e-6)
	xj := 0.1e-6 + 0.03e-6*math.Sqrt(2*math.Log(np/1e21))
	js, _ := m["junctions_m"].([]any)
	if len(js) != 1 || math.Abs(js[0].(float64)/xj-1) > 0.01 {
		t.Errorf("implant junctions %v, want %g m", m["junctions_m"], xj)
	}
	if math.Abs(num(t, m, "device_length_m")/5e-6-1) > 1e-12 || m["p_length_m"] != nil {
		t.Errorf("lengths %v %v", m["device_length_m"], m["p_length_m"])
	}
	m = jsonOf(t, "solve", "--base", "acceptor", "--na", "1e16cm-3", "--diffusion", "donor:1e19cm-3:0.5um:right", "--length", "10um", "--json")
	xj = 10e-6 - 2*0.5e-6*math.Erfcinv(1e-3)
	js, _ = m["junctions_m"].([]any)
	if len(js) != 1 || math.Abs(js[0].(float64)/xj-1) > 0.01 {
		t.Errorf("diffusion junctions %v, want %g m", m["junctions_m"], xj)
	}
	// A buried n+ layer under a p layer: two uniform shapes, base none.
	m = jsonOf(t, "solve", "--uniform", "acceptor:1e16cm-3:0um:2um", "--uniform", "donor:1e18cm-3:2um:end", "--length", "6um", "--ideal", "--json")
	if js, _ = m["junctions_m"].([]any); len(js) != 1 || math.Abs(js[0].(float64)-2e-6) > 1e-12 {
		t.Errorf("uniform layers: junctions %v", m["junctions_m"])
	}
	// Imported net profile with a nm/cm^-3 header.
	dir := t.TempDir()
	file := filepath.Join(dir, "step.csv")
	writeTestFile(t, file, []byte("depth (nm);net (cm^-3)\n0;-1e17\n990;-1e17\n1010;1e16\n20000;1e16\n"))
	m = jsonOf(t, "solve", "--profile-file", file, "--ideal", "--json")
	calc := jsonOf(t, "calc", "--ideal", "--na", "1e17cm-3", "--nd", "1e16cm-3", "--json")
	if d := math.Abs(num(t, m, "built_in_potential_V") - num(t, calc, "built_in_potential_V")); d > 1e-3 {
		t.Errorf("file profile Vbi %v, calc (eq. 2.8) %v", m["built_in_potential_V"], calc["built_in_potential_V"])
	}
	// A conc column needs --profile-species.
	conc := filepath.Join(dir, "conc.csv")
	writeTestFile(t, conc, []byte("depth_um,conc_cm-3\n0,1e19\n0.3,1e19\n0.5,1e13\n10,1e13\n"))
	if code, _, errs := runCLI(t, "solve", "--profile-file", conc, "--base", "donor", "--nd", "1e15cm-3"); code != 2 || !strings.Contains(errs, "conc.csv: line 1, column 2") {
		t.Errorf("conc without species: exit %d: %s", code, errs)
	}
	jsonOf(t, "solve", "--profile-file", conc, "--profile-species", "acceptor", "--base", "donor", "--nd", "1e15cm-3", "--json")
}

// cancelWriter cancels a context at the first progress line written to it.
type cancelWriter struct {
	mu     sync.Mutex
	buf    bytes.Buffer
	cancel context.CancelFunc
}

func (w *cancelWriter) Write(p []byte) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if strings.Contains(string(p), "points") {
		w.cancel()
	}
	return w.buf.Write(p)
}

// An interrupted sweep (the context is cancelled at the first progress
// line, as SIGINT does) still writes the points finished, says so, and
// exits with 130; a complete sweep reports progress and exits 0.
func TestSolveInterrupted(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	w := &cancelWriter{cancel: cancel}
	var out bytes.Buffer
	code := run(ctx, []string{"solve", "--ideal", "--sweep", "0V:0.5V:0.05V", "--csv", "iv"}, strings.NewReader(""), &out, w)
	if code != exitInterrupted {
		t.Fatalf("exit %d, want %d; stderr %s", code, exitInterrupted, w.buf.String())
	}
	lines := strings.Split(strings.TrimSpace(out.String()), "\n")
	if len(lines) != 2 || !strings.HasPrefix(lines[0], "bias_V,") || !strings.HasPrefix(lines[1], "0,") {
		t.Errorf("partial output:\n%s", out.String())
	}
	if !strings.Contains(w.buf.String(), "interrupted after 1 of 11 points") {
		t.Errorf("stderr: %s", w.buf.String())
	}
	// Uninterrupted, with progress lines and the JSON form.
	code, stdout, errs := runCLI(t, "solve", "--ideal", "--cv", "-1V:0V:0.25V", "--json")
	if code != 0 || strings.Count(errs, "C-V ") != 5 || !strings.Contains(errs, "5/5 points") {
		t.Errorf("exit %d, progress %q", code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(stdout), &m); err != nil || m["complete"] != true || len(m["points"].([]any)) != 5 {
		t.Errorf("cv JSON %v: %s", err, stdout)
	}
}

// Bad input: exit 2, nothing on stdout, a message naming the field, the
// value and the allowed range.
func TestSolveBadInput(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	writeTestFile(t, bad, []byte("depth_um,net_cm-3\n0,-1e16\n1,zz\n"))
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"--nodes", "5"}, []string{"--nodes = 5", "allowed 0 (automatic) or 20 to 200000"}},
		{[]string{"--lengths", "5um"}, []string{"--lengths", "P:N"}},
		{[]string{"--lengths", "-1um:5um"}, []string{"lengths (p region)", "allowed 10.0 nm to 10.0 mm"}},
		{[]string{"--lengths", "0:5um"}, []string{"zero length"}},
		{[]string{"--implant", "acceptor:1e14cm-2:0.1um"}, []string{"SPECIES:DOSE:RANGE:STRAGGLE"}},
		{[]string{"--implant", "boron:1e14cm-2:0.1um:0.03um"}, []string{"species \"boron\"", "donor or acceptor"}},
		{[]string{"--base", "donor", "--implant", "acceptor:1e30cm-2:0.1um:0.03um"}, []string{"--implant acceptor:1e30cm-2:0.1um:0.03um: dose = 1.00e30 cm^-2", "allowed 1.00e8 cm^-2 to 1.00e17 cm^-2"}},
		{[]string{"--diffusion", "donor:1e19cm-3:-1um"}, []string{"diffusion-length = -1.00 um", "allowed"}},
		{[]string{"--base", "donor", "--uniform", "donor:1e17cm-3"}, []string{"profile doping at the contacts", "n-type at x = 0", "p-type at one contact and n-type at the other"}},
		{[]string{"--base", "glass"}, []string{"--base = \"glass\"", "allowed junction, donor, acceptor, none"}},
		{[]string{"--length", "5um"}, []string{"--length = 5.00 um", "junction base"}},
		{[]string{"--csv", "iv"}, []string{"--csv iv needs --sweep"}},
		{[]string{"--csv", "table"}, []string{"--csv \"table\"", "allowed profile, iv"}},
		{[]string{"--sweep", "0:1:0.1", "--cv", "-1:0:1"}, []string{"not both"}},
		{[]string{"--sweep", "0V:1V"}, []string{"FROM:TO:STEP"}},
		{[]string{"--sweep", "0V:30V:10V"}, []string{"--sweep = 30.00 V", "allowed -100 kV to 20 V"}},
		{[]string{"--profile-file", filepath.Join(dir, "missing.csv")}, []string{"--profile-file", "missing.csv"}},
		{[]string{"--profile-file", bad}, []string{"bad.csv: line 3, column 2 (net_cm-3)", "\"zz\" is not a plain decimal number"}},
		{[]string{"--profile-species", "donor"}, []string{"need --profile-file"}},
		{[]string{"--na", "-1e16"}, []string{"--na = ", "allowed"}},
		{[]string{"--tsweep", "300K:310K:5K"}, []string{"tsweep"}},
		{[]string{"--save", "x"}, []string{"--save is not available"}},
		{[]string{"stray"}, []string{"unexpected argument"}},
	} {
		code, out, errs := runCLI(t, append([]string{"solve"}, c.args...)...)
		if code != 2 || out != "" {
			t.Errorf("%v: exit %d, stdout %q, stderr %s", c.args, code, out, errs)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: stderr lacks %q:\n%s", c.args, w, errs)
			}
		}
	}
}

// Non-convergence exits 1 with a message naming the bias and what
// happened; a sweep that stops on it says how many points were written.
func TestSolveConvergenceFailure(t *testing.T) {
	var o solveOptions
	var errb bytes.Buffer
	ce := &solver.ConvergenceError{Stage: "bias", Bias: 0.85, Reached: 0.8125, Step: 1e-4, Iterations: 12, Update: 0.3, Residual: 2, Reason: "iteration limit reached"}
	if code := o.sweepEnd(&errb, ce, 3, 10); code != exitFailure {
		t.Errorf("exit %d, want %d", code, exitFailure)
	}
	for _, w := range []string{"failed at 850.0 mV", "no convergence at 0.85 V", "iteration limit reached", "last converged bias 0.8125 V", "3 of 10 points were finished and written"} {
		if !strings.Contains(errb.String(), w) {
			t.Errorf("message lacks %q: %s", w, errb.String())
		}
	}
	errb.Reset()
	if code := o.fail(&errb, context.Canceled); code != exitInterrupted || !strings.Contains(errb.String(), "interrupted") {
		t.Errorf("cancelled single solve: exit %d, %s", code, errb.String())
	}
}

// Help and dispatch.
func TestSolveHelp(t *testing.T) {
	code, errs, _ := runCLI(t, "solve", "--help")
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	for _, w := range []string{"--implant", "--diffusion", "--uniform", "--graded", "--profile-file", "--lengths", "--nodes", "--sweep", "--cv", "--csv", "--na", "130"} {
		if !strings.Contains(errs, w) {
			t.Errorf("help lacks %q", w)
		}
	}
	if _, out, _ := runCLI(t, "help"); !strings.Contains(out, "junco solve") {
		t.Errorf("usage lacks solve:\n%s", out)
	}
	// A graded shape on an acceptor base makes a graded junction.
	m := jsonOf(t, "solve", "--base", "acceptor", "--na", "1e16cm-3", "--graded", "donor:1e20cm-4:1um:1e18cm-3", "--length", "4um", "--ideal", "--json")
	// Zero crossing where a (x - 1 um) = Na: x = 1 um + 1e16 cm^-3 / 1e20 cm^-4 (Sze & Ng 2007, section 2.2.2 profile).
	if js, _ := m["junctions_m"].([]any); len(js) != 1 || math.Abs(js[0].(float64)-(1e-6+1e-6)) > 1e-12 {
		t.Errorf("graded junctions %v", m["junctions_m"])
	}
}
