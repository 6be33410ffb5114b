package cli

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// --report writes the Markdown report and its SVG map beside it, and
// refuses to replace them on a second run (nothing written then).
func TestFitBatchReport(t *testing.T) {
	dir := t.TempDir()
	rep := filepath.Join(dir, "lot.md")
	code, _, errs := fitCall("batch", "testdata/fit/wafermap", "--map", "Is", "--limit", "n:1.3:1.42", "--report", rep)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	md, err := os.ReadFile(rep)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(md), "![wafer map of saturation current Is](lot-map-is.svg)") || !strings.Contains(string(md), "11 of 13") {
		t.Errorf("report:\n%s", md)
	}
	svg, err := os.ReadFile(filepath.Join(dir, "lot-map-is.svg"))
	if err != nil || !strings.Contains(string(svg), "<svg") {
		t.Fatalf("svg: %v", err)
	}
	code, _, errs = fitCall("batch", "testdata/fit/wafermap", "--map", "Is", "--report", rep)
	if code != exitFailure || !strings.Contains(errs, "exists; nothing was written") {
		t.Errorf("second run: exit %d: %s", code, errs)
	}
}

// Bad wafer options are refused before any fit, naming the option, the
// value and what is allowed.
func TestFitBatchWaferOptionErrors(t *testing.T) {
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"--map", "Vf"}, `--map: parameter "Vf": expected one of Is, n, Rs, Rsh, Is2`},
		{[]string{"--limit", "n:1.2"}, "--limit: limit \"n:1.2\": expected PARAM:MIN:MAX"},
		{[]string{"--limit", "n:2:1"}, "MIN <= MAX"},
		{[]string{"--report", "out.txt"}, "ending .md"},
	}
	for _, c := range cases {
		code, _, errs := fitCall(append([]string{"batch", "testdata/fit/wafermap"}, c.args...)...)
		if code != exitUsage || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d: %s (want %q)", c.args, code, errs, c.want)
		}
	}
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, "dies.csv"), []byte("file,x\n"), 0o644)
	os.WriteFile(filepath.Join(dir, "a.csv"), []byte("V,I\n"), 0o644)
	code, _, errs := fitCall("batch", dir)
	if code != exitUsage || !strings.Contains(errs, `dies.csv:1: no column "y"`) {
		t.Errorf("bad manifest: exit %d: %s", code, errs)
	}
}
