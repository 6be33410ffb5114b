package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"runtime/debug"
	"strings"
	"testing"

	"github.com/spf13/cobra"

	"junco/model"
)

// everyCommand lists the path of every command in the tree, found by
// walking it (so a command added later is checked too).
func everyCommand(t *testing.T) [][]string {
	t.Helper()
	var out [][]string
	var walk func(c *cobra.Command, path []string)
	walk = func(c *cobra.Command, path []string) {
		out = append(out, path)
		for _, s := range c.Commands() {
			if s.Name() == "help" {
				continue
			}
			walk(s, append(append([]string{}, path...), s.Name()))
		}
	}
	walk(newRootCmd(&env{ctx: context.Background(), stdout: io.Discard, stderr: io.Discard}), nil)
	return out
}

// Every command answers --help on stdout with exit 0 and nothing on
// stderr, with a page of its own: its usage line names it.
func TestEveryCommandHasHelp(t *testing.T) {
	cmds := everyCommand(t)
	if len(cmds) < 20 {
		t.Fatalf("only %d commands found", len(cmds))
	}
	for _, path := range cmds {
		code, out, errs := runCLI(t, append(append([]string{}, path...), "--help")...)
		if code != exitOK || errs != "" || !strings.Contains(out, "Usage:") {
			t.Errorf("%v --help: exit %d, stderr %q, stdout %d bytes", path, code, errs, len(out))
			continue
		}
		if want := strings.TrimSpace("junco " + strings.Join(path, " ")); !strings.Contains(out, want) {
			t.Errorf("%v --help does not name %q", path, want)
		}
	}
	// The subcommands of fit and sessions have pages of their own.
	_, iv, _ := runCLI(t, "fit", "iv", "--help")
	_, cv, _ := runCLI(t, "fit", "cv", "--help")
	if iv == cv || !strings.Contains(iv, "--leakage-at V") || strings.Contains(iv, "--area A") || !strings.Contains(cv, "--area A") {
		t.Errorf("fit iv and cv share a page or lack their own flags")
	}
}

// A usage error (unknown command or option, missing value, bad value,
// extra argument) is one or two lines on stderr pointing to --help, exit 2,
// nothing on stdout. It used to print the whole manual.
func TestUsageErrorsAreShort(t *testing.T) {
	for _, args := range [][]string{
		{"frobnicate"},
		{"--bogus"},
		{"calc", "--no-such-flag"},
		{"calc", "--na"},
		{"calc", "--area", "1 acre"},
		{"calc", "stray"},
		{"calc", "--no-srh=maybe"},
		{"solve", "--bogus"},
		{"fit"},
		{"fit", "xy"},
		{"fit", "iv", "--bogus"},
		{"fit", "batch", "--jobs"},
		{"sessions"},
		{"sessions", "frobnicate"},
		{"sessions", "show", "--bogus"},
		{"sessions", "diff", "a"},
		{"serve", "--max-conn", "many"},
		{"serve", "extra"},
		{"open", "a", "b"},
		{"version", "extra"},
		{"completion", "tcsh"},
	} {
		code, out, errs := runCLI(t, args...)
		lines := strings.Split(strings.TrimRight(errs, "\n"), "\n")
		if code != exitUsage || out != "" || len(lines) > 2 || !strings.Contains(errs, "--help") {
			t.Errorf("%v: exit %d, stdout %q, stderr (%d lines) %q; want 2, nothing, at most 2 lines naming --help", args, code, out, len(lines), errs)
		}
	}
}

// The one mapping from errors to exit codes.
func TestExitCodeMapping(t *testing.T) {
	cmd := &cobra.Command{Use: "x"}
	for _, c := range []struct {
		err  error
		want int
	}{
		{nil, exitOK},
		{usagef(cmd, "bad"), exitUsage},
		{fmt.Errorf("wrapped: %w", usagef(cmd, "bad")), exitUsage},
		{context.Canceled, exitInterrupted},
		{fmt.Errorf("sweep: %w", context.DeadlineExceeded), exitInterrupted},
		{exited(exitFailure), exitFailure},
		{exited(exitInterrupted), exitInterrupted},
		{errors.New("disk full"), exitFailure},
	} {
		if got := exitCode(c.err); got != c.want {
			t.Errorf("exitCode(%v) = %d, want %d", c.err, got, c.want)
		}
	}
	if exited(exitOK) != nil {
		t.Error("exited(0) is an error")
	}
}

// junco --version and junco version print the version from the build
// information; versionFrom reads module version and VCS revision.
func TestVersion(t *testing.T) {
	for _, args := range [][]string{{"--version"}, {"version"}} {
		code, out, errs := runCLI(t, args...)
		if code != exitOK || errs != "" || out != "junco "+buildVersion()+"\n" {
			t.Errorf("%v: exit %d, %q, %q", args, code, out, errs)
		}
	}
	bi := &debug.BuildInfo{Main: debug.Module{Version: "(devel)"}, Settings: []debug.BuildSetting{
		{Key: "vcs.revision", Value: "0123456789abcdef0123"}, {Key: "vcs.modified", Value: "true"}}}
	if got := versionFrom(bi, true); got != Version+" (work-tree build, revision 0123456789ab-modified)" {
		t.Errorf("work-tree build: %q", got)
	}
	if got := versionFrom(&debug.BuildInfo{Main: debug.Module{Version: "v1.2.3"}}, true); got != "v1.2.3" {
		t.Errorf("module build: %q", got)
	}
	if got := versionFrom(nil, false); got != Version+" (work-tree build)" {
		t.Errorf("no build information: %q", got)
	}
}

// junco completion bash|zsh|fish writes a completion script on stdout.
func TestCompletion(t *testing.T) {
	for _, sh := range []string{"bash", "zsh", "fish"} {
		code, out, errs := runCLI(t, "completion", sh)
		if code != exitOK || errs != "" || !strings.Contains(out, "junco") || len(out) < 1000 {
			t.Errorf("completion %s: exit %d, %d bytes, stderr %q", sh, code, len(out), errs)
		}
	}
	// The completion of flags is built from the same definitions: calc's
	// junction flags come from the catalogue.
	_, out, _ := runCLI(t, "__complete", "calc", "--no-b")
	if !strings.Contains(out, "--no-bgn") || !strings.Contains(out, "--no-breakdown") {
		t.Errorf("calc --no-b completes to %q", out)
	}
}

// failWriter fails every write, as a closed pipe or a full disk does.
type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("no space left on device") }

// A write to stdout that fails ends in exit 1 and a message, not a silent 0.
func TestCheckedStdout(t *testing.T) {
	var errb strings.Builder
	code := run(context.Background(), []string{"calc", "--json"}, strings.NewReader(""), failWriter{}, &errb)
	if code != exitFailure || !strings.Contains(errb.String(), "no space left") {
		t.Errorf("exit %d, stderr %q; want 1 naming the write error", code, errb.String())
	}
}

// The forms the earlier parsers took keep working: single-dash long
// options, --flag=value and --flag value, --x=false, negative values, units.
func TestFlagFormsKept(t *testing.T) {
	base := jsonOfArgs(t, "calc", "--na", "1e17cm-3", "--nd", "1e16", "--bias", "-0.5V", "--json")
	for _, args := range [][]string{
		{"calc", "-na", "1e17cm-3", "-nd=1e16", "-bias", "-0.5V", "-json"},
		{"calc", "--na=1e17cm-3", "--nd", "1e16", "--bias=-500mV", "--json=true", "--ascii=false"},
		{"calc", "--na", "1e17cm-3", "--nd", "1e16", "--bias", "-0.5V", "--no-srh=false", "--json"},
	} {
		if got := jsonOfArgs(t, args...); got != base {
			t.Errorf("%v gives other output than the long form", args)
		}
	}
}

func jsonOfArgs(t *testing.T, args ...string) string {
	t.Helper()
	code, out, errs := runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("%v: exit %d: %s", args, code, errs)
	}
	return out
}

// calc's junction flags are the catalogue's: every entry has its flag,
// with the entry's help.
func TestCalcFlagsFromCatalogue(t *testing.T) {
	fs := newCalcFlags(&calcOptions{}, io.Discard)
	for _, f := range model.Catalogue() {
		fl := fs.Lookup(f.Flag)
		if fl == nil || !strings.Contains(fl.Usage, f.Help) {
			t.Errorf("catalogue entry %s: calc flag --%s missing or without its help", f.Key, f.Flag)
		}
	}
}

// --session loads a junction and the flags typed override its values,
// whatever their order.
func TestSessionThenFlags(t *testing.T) {
	dir := seeded(t) // d7 newest: 350 K, -3 V
	get := func(args ...string) map[string]any {
		return jsonOf(t, append(args, "--data", dir, "--json")...)
	}
	same := func(a, b map[string]any) bool {
		return fmt.Sprint(a["thermal_voltage_V"], a["depletion_width_m"], a["current_A"]) == fmt.Sprint(b["thermal_voltage_V"], b["depletion_width_m"], b["current_A"])
	}
	if !same(get("calc", "--session", "d7"), jsonOf(t, "calc", "--temp", "350K", "--bias", "-3V", "--json")) {
		t.Error("--session d7 is not the junction at 350 K and -3 V")
	}
	if !same(get("calc", "--temp", "300K", "--session", "d7", "--no-srh"), jsonOf(t, "calc", "--temp", "300K", "--bias", "-3V", "--no-srh", "--json")) {
		t.Error("flags typed before --session did not override the session's values")
	}
}

// sessions diff compares two revisions of one session (NAME A B, as
// before) or two sessions (NAME1[@REV] NAME2[@REV]).
func TestSessionsDiffAcrossSessions(t *testing.T) {
	dir := seeded(t) // d7: rev 1 at 300 K, rev 2 at 350 K and -3 V
	s := model.DefaultSpec()
	s.Temperature = 320
	if _, err := saveSpecFromCalc(dir, "d9", s, "ana", false, io.Discard); err != nil {
		t.Fatal(err)
	}
	code, out, errs := sess(t, dir, "diff", "d7", "1", "2")
	if code != 0 || !strings.Contains(out, "d7: revision 1 -> 2") || !strings.Contains(out, "temperature T (temp)") {
		t.Errorf("one session: %d %q %q", code, out, errs)
	}
	code, out, errs = sess(t, dir, "diff", "d7@1", "d9")
	if code != 0 || !strings.Contains(out, "d7 revision 1 -> d9 revision 1") || !strings.Contains(out, "320") {
		t.Errorf("two sessions: %d %q %q", code, out, errs)
	}
	code, out, _ = sess(t, dir, "diff", "d7", "d9")
	if code != 0 || !strings.Contains(out, "d7 revision 2 -> d9 revision 1") || !strings.Contains(out, "bias") {
		t.Errorf("two sessions at their newest: %d %q", code, out)
	}
	code, out, _ = sess(t, dir, "diff", "d7@1", "d7@1")
	if code != 0 || !strings.Contains(out, "have the same") {
		t.Errorf("same revision twice: %d %q", code, out)
	}
	for _, bad := range [][]string{{"diff", "d7@0", "d9"}, {"diff", "d7@x", "d9"}, {"diff", "d7", "2"}} {
		if code, _, errs := sess(t, dir, bad...); code != exitUsage || !strings.Contains(errs, "--help") {
			t.Errorf("%v: exit %d, %q", bad, code, errs)
		}
	}
	if code, _, errs := sess(t, dir, "diff", "d7", "nope"); code != exitFailure || !strings.Contains(errs, "nope") {
		t.Errorf("missing session: %d %q", code, errs)
	}
}
