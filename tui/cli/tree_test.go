package cli

import (
	"bytes"
	"context"
	"io"
	"slices"
	"strings"
	"testing"

	"github.com/spf13/cobra"
)

// The list treeFor picks commands from names each command as the
// command itself does (name, then aliases), and holds every command of
// the whole tree but completion (which only the whole tree builds).
func TestTopCommandNames(t *testing.T) {
	e := &env{ctx: context.Background(), stdout: io.Discard, stderr: io.Discard}
	var listed []string
	for _, c := range topCommands() {
		cmd := c.build(e)
		if want := append([]string{cmd.Name()}, cmd.Aliases...); !slices.Equal(c.names, want) {
			t.Errorf("listed as %q, the command says %q", c.names, want)
		}
		listed = append(listed, cmd.Name())
	}
	for _, c := range newRootCmd(e).Commands() {
		if c.Name() != "completion" && c.Name() != "help" && !slices.Contains(listed, c.Name()) {
			t.Errorf("command %q is not in topCommands: treeFor would never build it alone", c.Name())
		}
	}
}

// The part of the tree treeFor builds answers as the whole tree does:
// same exit code, stdout and stderr, for the version, a command's run,
// usage errors of the root and of each command, and unknown words.
func TestTreeForSameAsWhole(t *testing.T) {
	whole := func(e *env, _ []string) *cobra.Command { return newRootCmd(e) }
	dir := t.TempDir()
	// The store's first use tightens its modes and says so: done once
	// before the comparison.
	executeTree(context.Background(), []string{"sessions", "list", "--data", dir}, strings.NewReader(""), io.Discard, io.Discard, whole)
	cases := [][]string{
		{"--version"}, {"-version"}, {"version"}, {"version", "x"},
		{"--bogus"}, {"bogus"}, {"--ascii", "bogus"}, {"--version", "--bogus"},
		{"calc"}, {"calc", "--na", "1e16", "--nd", "1e15"}, {"calc", "--bogus"}, {"calc", "-na", "1e16"},
		{"solve", "--bogus"}, {"fit"}, {"fit", "iv"}, {"fit", "bogus"}, {"fit", "iv", "--bogus"},
		{"sessions"}, {"sessions", "list", "--data", dir}, {"sessions", "bogus"},
		{"serve", "--bogus"}, {"open", "--bogus"}, {"workbench", "--bogus"}, {"open", "--rev", "x", "a"},
		{"manual"}, {"manual", "--dir", t.TempDir()},
	}
	for _, args := range cases {
		var o1, e1, o2, e2 bytes.Buffer
		c1 := executeTree(context.Background(), args, strings.NewReader(""), &o1, &e1, treeFor)
		c2 := executeTree(context.Background(), args, strings.NewReader(""), &o2, &e2, whole)
		if c1 != c2 || o1.String() != o2.String() || e1.String() != e2.String() {
			t.Errorf("%q: part of the tree gives exit %d, stdout %q, stderr %q; the whole tree exit %d, stdout %q, stderr %q",
				args, c1, trim(o1.String()), e1.String(), c2, trim(o2.String()), e2.String())
		}
	}
}

func trim(s string) string {
	if len(s) > 200 {
		return s[:200] + "..."
	}
	return s
}
