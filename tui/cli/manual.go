package cli

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// manualHelp is the page of junco manual.
const manualHelp = `junco manual: write the manual pages

  junco manual --dir DIR

Writes one roff manual page (section 1) per command of the command tree
into DIR, named after the command path: junco.1, junco-calc.1,
junco-fit-iv.1, ... Each page has the command's synopsis, its help text,
its options with their arguments and defaults, the options it inherits
and the related pages. The pages come from the same definitions as
--help, so they say what the build does. DIR is created (mode 0755) if
missing; existing pages of the same names are replaced.

Read one with: man -l DIR/junco-fit-iv.1`

// newManualCmd is `junco manual`, for packaging: hidden from the list of
// commands.
func newManualCmd(e *env) *cobra.Command {
	var dir string
	cmd := &cobra.Command{
		Use:    "manual --dir DIR",
		Short:  "write a roff manual page for every command",
		Long:   manualHelp,
		Args:   noArgs,
		Hidden: true,
		RunE: func(c *cobra.Command, _ []string) error {
			if dir == "" {
				return usagef(c, "--dir is required: the folder the pages are written to")
			}
			n, err := writeManual(c.Root(), e, dir)
			if err != nil {
				return err
			}
			_, err = fmt.Fprintf(e.stdout, "wrote %d manual pages to %s\n", n, dir)
			return err
		},
	}
	e.lazyFlags(cmd, func() {
		cmd.Flags().StringVar(&dir, "dir", "", "folder `DIR` to write the pages to (created if missing)")
	})
	return cmd
}

// manualCommands returns root and every command below it that has a page:
// not hidden, not cobra's help command.
func manualCommands(root *cobra.Command) []*cobra.Command {
	out := []*cobra.Command{root}
	for _, c := range root.Commands() {
		if c.Hidden || c.Name() == "help" {
			continue
		}
		out = append(out, manualCommands(c)...)
	}
	return out
}

// manualName is the page name of cmd: its path joined by hyphens.
func manualName(cmd *cobra.Command) string {
	return strings.ReplaceAll(cmd.CommandPath(), " ", "-")
}

// writeManual writes a page for every command of root into dir and returns
// how many it wrote.
func writeManual(root *cobra.Command, e *env, dir string) (int, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return 0, err
	}
	cmds := manualCommands(root)
	for _, c := range cmds {
		e.defineFlags(c) // flags are defined lazily, only for the command run
	}
	// Nothing a user wrote is replaced: every page's path is checked
	// before the first is written.
	for _, c := range cmds {
		if err := replaceableManualPage(filepath.Join(dir, manualName(c)+".1")); err != nil {
			return 0, err
		}
	}
	for _, c := range cmds {
		path := filepath.Join(dir, manualName(c)+".1")
		if err := os.WriteFile(path, []byte(manualPage(c)), 0o644); err != nil {
			return 0, err
		}
	}
	return len(cmds), nil
}

// manualMark begins every page junco writes (manualPage).
const manualMark = `.TH "JUNCO`

// replaceableManualPage returns nil when path is free or holds a page
// junco wrote before (a regular file beginning with manualMark), else an
// error naming the file: a file of the user's, a link or a folder there
// is never replaced.
func replaceableManualPage(path string) error {
	fi, err := os.Lstat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return err
	}
	if fi.Mode().IsRegular() {
		f, err := os.Open(path)
		if err != nil {
			return err
		}
		head := make([]byte, len(manualMark))
		_, err = io.ReadFull(f, head)
		f.Close()
		if err == nil && string(head) == manualMark {
			return nil
		}
	}
	return fmt.Errorf("%s exists and is not a manual page junco wrote; it is not replaced (move it, or choose another --dir)", path)
}

// manualPage renders one command's page in roff (man macros).
func manualPage(c *cobra.Command) string {
	c.InitDefaultHelpFlag()
	var b strings.Builder
	name := manualName(c)
	fmt.Fprintf(&b, ".TH %q 1 \"\" %q \"junco manual\"\n", strings.ToUpper(name), "junco "+Version)
	fmt.Fprintf(&b, ".SH NAME\n%s \\- %s\n", roffEscape(name), roffEscape(c.Short))
	fmt.Fprintf(&b, ".SH SYNOPSIS\n.nf\n\\fB%s\\fR\n.fi\n", roffEscape(c.UseLine()))
	long := c.Long
	if long == "" {
		long = c.Short
	}
	fmt.Fprintf(&b, ".SH DESCRIPTION\n.nf\n%s\n.fi\n", roffLines(long))
	if c.HasAvailableLocalFlags() {
		b.WriteString(".SH OPTIONS\n")
		roffFlags(&b, c.LocalFlags())
	}
	if c.HasAvailableInheritedFlags() {
		b.WriteString(".SH OPTIONS INHERITED FROM PARENT COMMANDS\n")
		roffFlags(&b, c.InheritedFlags())
	}
	var see []string
	if c.HasParent() {
		see = append(see, manualName(c.Parent()))
	}
	for _, s := range c.Commands() {
		if !s.Hidden && s.Name() != "help" {
			see = append(see, manualName(s))
		}
	}
	if len(see) > 0 {
		b.WriteString(".SH SEE ALSO\n")
		for i, s := range see {
			sep := ","
			if i == len(see)-1 {
				sep = ""
			}
			fmt.Fprintf(&b, ".BR %s (1)%s\n", roffEscape(s), sep)
		}
	}
	return b.String()
}

// roffFlags writes a tagged paragraph for each visible flag of fs: its
// names, its argument, its help and its default.
func roffFlags(b *strings.Builder, fs *pflag.FlagSet) {
	fs.VisitAll(func(f *pflag.Flag) {
		if f.Hidden {
			return
		}
		arg, usage := pflag.UnquoteUsage(f)
		names := "\\fB\\-\\-" + roffEscape(f.Name) + "\\fR"
		if f.Shorthand != "" {
			names = "\\fB\\-" + roffEscape(f.Shorthand) + "\\fR, " + names
		}
		if arg != "" && f.NoOptDefVal == "" {
			names += " \\fI" + roffEscape(arg) + "\\fR"
		}
		if d := f.DefValue; d != "" && d != "false" && d != "0" && d != "[]" && d != "0s" && f.Value.Type() != "bool" {
			usage += " (default " + d + ")"
		}
		fmt.Fprintf(b, ".TP\n%s\n%s\n", names, roffLines(usage))
	})
}

// roffEscape escapes text for one roff line: backslashes and hyphens.
func roffEscape(s string) string {
	return strings.ReplaceAll(strings.ReplaceAll(s, `\`, `\e`), "-", `\-`)
}

// roffLines escapes text of several lines, so that no line is taken for a
// request (a leading dot or quote) and an empty line stays a line.
func roffLines(s string) string {
	lines := strings.Split(strings.TrimRight(s, "\n"), "\n")
	for i, l := range lines {
		l = roffEscape(l)
		if strings.HasPrefix(l, ".") || strings.HasPrefix(l, "'") || l == "" {
			l = `\&` + l
		}
		lines[i] = l
	}
	return strings.Join(lines, "\n")
}
