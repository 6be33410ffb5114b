package cli

import (
	"bytes"
	"context"
	"flag"
	"io"
	"strings"
	"testing"

	"junco/physics/extract"
)

// Absurd sweeps exit 2 with the cap named; they used to panic
// (makeslice: len out of range).
func TestSweepsRefuseHugeCounts(t *testing.T) {
	cases := []struct {
		args  []string
		limit string
	}{
		{[]string{"calc", "--sweep", "0:1e30:1"}, "MaxSweepPoints = 100001"},
		{[]string{"calc", "--tsweep", "0:1e30:1"}, "MaxSweepPoints = 100001"},
		{[]string{"calc", "--sweep", "0:1:1e-320"}, "MaxSweepPoints = 100001"},
		{[]string{"solve", "--ideal", "--sweep", "0:1e30:1"}, "MaxNumericSweepPoints = 5001"},
		{[]string{"solve", "--ideal", "--cv", "0:1e30:1"}, "MaxNumericSweepPoints = 5001"},
		{[]string{"solve", "--ideal", "--cv", "-5V:0V:0.5mV"}, "MaxNumericSweepPoints = 5001"},
	}
	for _, c := range cases {
		code, out, errs := runCLI(t, c.args...)
		if code != exitUsage || out != "" || !strings.Contains(errs, c.limit) {
			t.Errorf("%v: exit %d, stderr %q; want 2 naming %s", c.args, code, errs, c.limit)
		}
	}
}

// A Celsius step is a difference: 0C:100C:10C is 11 temperatures, 10 K
// apart (273.15 K to 373.15 K).
func TestTSweepCelsiusStep(t *testing.T) {
	code, out, errs := runCLI(t, "calc", "--tsweep", "0C:100C:10C", "--csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 12 || !strings.HasPrefix(lines[1], "273.15,") || !strings.HasPrefix(lines[11], "373.15,") {
		t.Fatalf("%d lines, want a header and 11 rows from 273.15 K to 373.15 K:\n%s", len(lines), out)
	}
}

// A cancelled context (SIGINT or SIGTERM reach the commands as one) stops
// calc sweeps and fit iv with exit 130 and a clear message, nothing on
// stdout.
func TestLongLoopsStopOnCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	dir := t.TempDir()
	p := fitWriteIV(t, dir, "d.csv", extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.5, SeriesResistanceOhm: 10, ShuntResistanceOhm: 1e6}, 300, 0.05, 1.0, 2000, 1)
	for _, args := range [][]string{
		{"calc", "--sweep", "-1V:1V:20uV", "--csv"},
		{"calc", "--tsweep", "250K:400K:0.0015K", "--csv"},
		{"fit", "iv", p},
		{"fit", "iv", "--json", p},
		{"fit", "arrhenius", "--temp", "300K,320K,340K", p, p, p},
	} {
		var out, errb bytes.Buffer
		code := run(ctx, args, strings.NewReader(""), &out, &errb)
		if code != exitInterrupted || out.Len() != 0 || !strings.Contains(errb.String(), "interrupted") && !strings.Contains(errb.String(), "context canceled") {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr %q; want 130, nothing, \"interrupted\"", args, code, out.Len(), errb.String())
		}
	}
}

// Every boolean flag of every command reads --name=false as false,
// --name=true and --name alone as true, and refuses any other value
// (--ascii=false used to be taken as true over SSH and refused by the
// workbench).
func TestBoolFlagsReadTheirValue(t *testing.T) {
	// Commands on the flag package: every bool flag they define.
	sets := map[string]func() *flag.FlagSet{
		"calc":  func() *flag.FlagSet { return newCalcFlags(&calcOptions{}, io.Discard) },
		"solve": func() *flag.FlagSet { return newSolveFlags(&solveOptions{}, io.Discard) },
		"sessions show": func() *flag.FlagSet {
			return newSessionFlagSet("show", &sessionFlags{}, io.Discard, "rev", "ascii")
		},
		"sessions export": func() *flag.FlagSet {
			return newSessionFlagSet("export", &sessionFlags{}, io.Discard, "rev", "format", "out", "ascii")
		},
	}
	for cmd, mk := range sets {
		n := 0
		mk().VisitAll(func(f *flag.Flag) {
			if bf, ok := f.Value.(interface{ IsBoolFlag() bool }); !ok || !bf.IsBoolFlag() {
				return
			}
			n++
			for arg, want := range map[string]string{"--" + f.Name + "=false": "false", "--" + f.Name + "=true": "true", "--" + f.Name: "true"} {
				fs := mk()
				if err := fs.Parse([]string{arg}); err != nil || fs.Lookup(f.Name).Value.String() != want {
					t.Errorf("%s %s: %v, value %s; want %s", cmd, arg, err, fs.Lookup(f.Name).Value, want)
				}
			}
			if err := mk().Parse([]string{"--" + f.Name + "=maybe"}); err == nil {
				t.Errorf("%s --%s=maybe accepted", cmd, f.Name)
			}
		})
		if n == 0 {
			t.Errorf("%s: no boolean flag found", cmd)
		}
	}
	// The workbench's own parser.
	for arg, want := range map[string]bool{"--ascii=false": false, "--ascii=true": true, "--ascii": true, "-ascii=0": false} {
		o, _, err := parseWorkbenchArgs([]string{arg})
		if err != nil || o.ascii != want || !o.asciiSet {
			t.Errorf("workbench %s: ascii %v, %v; want %v", arg, o.ascii, err, want)
		}
	}
	// An explicit --ascii=false wins over the locale (no UTF-8 locale set).
	o, _, _ := parseWorkbenchArgs([]string{"--ascii=false"})
	if o.drawASCII(func(string) string { return "" }) {
		t.Error("--ascii=false drew ASCII because the locale is unset")
	}
	if _, _, err := parseWorkbenchArgs([]string{"--ascii=maybe"}); err == nil {
		t.Error("workbench --ascii=maybe accepted")
	}
	// The SSH command filter passes --ascii on only when true.
	for arg, want := range map[string]bool{"--ascii=false": false, "--ascii=true": true, "--ascii": true} {
		out, err := sshSessionFlags("show", []string{arg})
		if err != nil || containsFlag(out, "--ascii") != want {
			t.Errorf("ssh show %s: %v, %v; want --ascii passed %v", arg, out, err, want)
		}
	}
	if _, err := sshSessionFlags("show", []string{"--ascii=maybe"}); err == nil {
		t.Error("ssh show --ascii=maybe accepted")
	}
	// fit's parser: every boolean option of iv, cv, arrhenius and batch.
	for _, name := range []string{"json", "ascii", "profile"} {
		for arg, want := range map[string]bool{"--" + name + "=false": false, "--" + name + "=true": true, "--" + name: true} {
			a, err := fitParseArgs("iv", []string{arg}, nil, []string{"json", "ascii", "profile"})
			if err != nil || a.bools[name] != want {
				t.Errorf("fit %s: %v, %v; want %v", arg, a, err, want)
			}
		}
	}
}
