package cli

import (
	"context"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// junco manual writes one page per command of the tree, each with the
// command's synopsis and every one of its flags (defined lazily
// elsewhere, so the page is checked against a fully defined tree), and
// nothing for hidden commands.
func TestManualPageForEveryCommand(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "man1")
	code, out, errs := runCLI(t, "manual", "--dir", dir)
	if code != exitOK || errs != "" || !strings.Contains(out, "manual pages") {
		t.Fatalf("junco manual: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	e := &env{ctx: context.Background(), stdout: io.Discard, stderr: io.Discard}
	root := newRootCmd(e)
	cmds := manualCommands(root)
	if len(cmds) < 20 {
		t.Fatalf("only %d commands have pages", len(cmds))
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	if len(entries) != len(cmds) {
		t.Errorf("%d pages for %d commands", len(entries), len(cmds))
	}
	for _, c := range cmds {
		e.defineFlags(c)
		page, err := os.ReadFile(filepath.Join(dir, manualName(c)+".1"))
		if err != nil {
			t.Errorf("%s: no page: %v", c.CommandPath(), err)
			continue
		}
		p := string(page)
		for _, want := range []string{".TH ", ".SH NAME\n" + roffEscape(manualName(c)) + " \\- ", ".SH SYNOPSIS", ".SH DESCRIPTION", roffEscape(c.CommandPath())} {
			if !strings.Contains(p, want) {
				t.Errorf("%s: page lacks %q", c.CommandPath(), want)
			}
		}
		c.LocalFlags().VisitAll(func(f *pflag.Flag) {
			if !f.Hidden && !strings.Contains(p, "\\fB\\-\\-"+roffEscape(f.Name)+"\\fR") {
				t.Errorf("%s: page lacks --%s", c.CommandPath(), f.Name)
			}
		})
	}
	// Flags every user looks for, on the pages they belong to.
	for page, flag := range map[string]string{"junco-calc.1": "na", "junco-fit-iv.1": "leakage-at", "junco-fit-cv.1": "area", "junco-serve.1": "authorized-keys"} {
		b, _ := os.ReadFile(filepath.Join(dir, page))
		if !strings.Contains(string(b), "\\-\\-"+roffEscape(flag)) {
			t.Errorf("%s lacks --%s", page, flag)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "junco-manual.1")); err == nil {
		t.Errorf("the hidden manual command got a page")
	}
}

// Text that roff would read as a request or an escape is escaped.
func TestManualRoffEscapes(t *testing.T) {
	got := roffLines(".start\n'quote\nback\\slash -x\n\nplain")
	want := "\\&.start\n\\&'quote\nback\\eslash \\-x\n\\&\nplain"
	if got != want {
		t.Errorf("roffLines = %q, want %q", got, want)
	}
	c := &cobra.Command{Use: "x", Short: "s"}
	c.Flags().String("dir", "a", "the `DIR`")
	if p := manualPage(c); !strings.Contains(p, "\\fB\\-\\-dir\\fR \\fIDIR\\fR\nthe DIR (default a)") {
		t.Errorf("flag entry wrong:\n%s", p)
	}
}

// junco manual without --dir is a usage error.
func TestManualNeedsDir(t *testing.T) {
	code, out, errs := runCLI(t, "manual")
	if code != exitUsage || out != "" || !strings.Contains(errs, "--dir") {
		t.Errorf("junco manual: exit %d, stdout %q, stderr %q", code, out, errs)
	}
}

// junco manual replaces only pages it wrote: run twice into one folder it
// succeeds; a file of the user's under a page's name (or a link there)
// stops it before any page is written, names the file and keeps it.
func TestManualKeepsUserFiles(t *testing.T) {
	dir := t.TempDir()
	for i := 0; i < 2; i++ {
		if code, _, errs := runCLI(t, "manual", "--dir", dir); code != exitOK {
			t.Fatalf("run %d into the same folder: exit %d, %s", i+1, code, errs)
		}
	}
	other := t.TempDir()
	mine := filepath.Join(other, "junco-fit-iv.1")
	if err := os.WriteFile(mine, []byte("my own notes\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(mine, filepath.Join(other, "junco-calc.1")); err != nil {
		t.Fatal(err)
	}
	code, _, errs := runCLI(t, "manual", "--dir", other)
	if code != exitFailure || !strings.Contains(errs, "junco-") || !strings.Contains(errs, "not replaced") {
		t.Errorf("over a user's file: exit %d, stderr %q", code, errs)
	}
	if b, _ := os.ReadFile(mine); string(b) != "my own notes\n" {
		t.Errorf("the user's file became %q", b)
	}
	if _, err := os.Stat(filepath.Join(other, "junco.1")); err == nil {
		t.Error("pages were written although one path was refused")
	}
}
