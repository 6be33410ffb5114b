package cli

import (
	"bytes"
	"context"
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
	} {
		var out, errb bytes.Buffer
		code := run(ctx, args, strings.NewReader(""), &out, &errb)
		if code != exitInterrupted || out.Len() != 0 || !strings.Contains(errb.String(), "interrupted") {
			t.Errorf("%v: exit %d, stdout %d bytes, stderr %q; want 130, nothing, \"interrupted\"", args, code, out.Len(), errb.String())
		}
	}
}
