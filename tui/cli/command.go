package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"syscall"

	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

// This file is the command tree: one argument parser (cobra over pflag)
// for every command, the typed errors a command returns and the one
// mapping from them to exit codes, the version from the build information
// and stdout writes that are checked.

// env is what every command reads and writes: the signal context and the
// process's streams (stdout checked, see checkedWriter).
type env struct {
	ctx    context.Context
	stdin  io.Reader
	stdout io.Writer
	stderr io.Writer
	// flags holds each command's flag definitions until it is the one to
	// run (lazyFlags): the tree itself is cheap, the flags of every
	// command are not (a quarter of a millisecond at each start).
	flags map[*cobra.Command]func()
}

// lazyFlags records how to define cmd's flags; they are defined only when
// cmd is the command run, completed or asked for help (defineFlags).
func (e *env) lazyFlags(cmd *cobra.Command, define func()) {
	if e.flags == nil {
		e.flags = map[*cobra.Command]func(){}
	}
	e.flags[cmd] = define
}

// defineFlags defines the flags of cmd, once.
func (e *env) defineFlags(cmd *cobra.Command) {
	if define := e.flags[cmd]; define != nil {
		delete(e.flags, cmd)
		define()
	}
}

// usageError is a bad invocation: an unknown command or option, a missing
// or extra argument. It is told in one line, with a pointer to the
// command's --help, and exits 2.
type usageError struct {
	cmd   string // the command path, e.g. "junco fit iv"
	msg   string
	usage string // a usage line told instead of the plain pointer ("" = none)
}

func (e *usageError) Error() string { return e.msg }

// usagef returns a usageError of cmd.
func usagef(cmd *cobra.Command, format string, a ...any) error {
	return &usageError{cmd: cmd.CommandPath(), msg: fmt.Sprintf(format, a...)}
}

// exitError carries the exit code of a command that has already told the
// user what happened on stderr.
type exitError struct{ code int }

func (e *exitError) Error() string { return fmt.Sprintf("exit status %d", e.code) }

// exited turns a command's exit code into its error (nil for 0).
func exited(code int) error {
	if code == exitOK {
		return nil
	}
	return &exitError{code: code}
}

// exitCode is the one mapping from a command's error to the process exit
// code: nil 0, a usage error 2, an interruption (SIGINT, SIGTERM) 130, a
// command that told its own code that code, anything else 1.
func exitCode(err error) int {
	var ee *exitError
	var ue *usageError
	switch {
	case err == nil:
		return exitOK
	case errors.As(err, &ee):
		return ee.code
	case errors.As(err, &ue):
		return exitUsage
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		return exitInterrupted
	}
	return exitFailure
}

// tell writes what the user needs to know about err on stderr: a usage
// error in one line and a pointer to --help, an interruption or a failure
// in one line; nothing for a command that has told its own.
func tell(stderr io.Writer, cmd *cobra.Command, err error) {
	var ee *exitError
	var ue *usageError
	path := "junco"
	if cmd != nil {
		path = cmd.CommandPath()
	}
	switch {
	case err == nil, errors.As(err, &ee):
	case errors.As(err, &ue):
		if ue.usage != "" {
			fmt.Fprintf(stderr, "%s: %s\nUsage: %s (see '%s --help')\n", ue.cmd, ue.msg, ue.usage, ue.cmd)
			break
		}
		fmt.Fprintf(stderr, "%s: %s\nRun '%s --help' for usage.\n", ue.cmd, ue.msg, ue.cmd)
	case errors.Is(err, context.Canceled), errors.Is(err, context.DeadlineExceeded):
		fmt.Fprintf(stderr, "%s: interrupted\n", path)
	default:
		fmt.Fprintf(stderr, "%s: %v\n", path, err)
	}
}

// flagError rewrites a pflag parse error as a usage error in junco's words.
func flagError(cmd *cobra.Command, err error) error {
	var ne *pflag.NotExistError
	var re *pflag.ValueRequiredError
	var ie *pflag.InvalidValueError
	switch {
	case errors.As(err, &ne):
		name := "--" + ne.GetSpecifiedName()
		if s := ne.GetSpecifiedShortnames(); s != "" {
			name = "-" + s
		}
		return usagef(cmd, "unknown option %q (flag provided but not defined)", name)
	case errors.As(err, &re):
		return usagef(cmd, "--%s needs a value", re.GetFlag().Name)
	case errors.As(err, &ie):
		return usagef(cmd, "--%s %q: %v", ie.GetFlag().Name, ie.GetValue(), ie.Unwrap())
	}
	return usagef(cmd, "%v", err)
}

// checkedWriter remembers the first failed write, so that output lost to
// a full disk or a closed pipe ends in exit 1 and a message, not silence.
type checkedWriter struct {
	w   io.Writer
	err error
}

func (c *checkedWriter) Write(p []byte) (int, error) {
	if c.err != nil {
		return 0, c.err
	}
	n, err := c.w.Write(p)
	if err != nil {
		c.err = err
	}
	return n, err
}

// buildVersion is the version from the build information (see
// versionFrom).
func buildVersion() string {
	bi, ok := debug.ReadBuildInfo()
	return versionFrom(bi, ok)
}

// versionFrom reads a version from build information: the module version
// of a tagged build, else Version (the number sessions and reports record)
// marked as a work-tree build, with the VCS revision when the build
// recorded one ("-modified" for uncommitted changes).
func versionFrom(bi *debug.BuildInfo, ok bool) string {
	tagged, rev, dirty := "", "", false
	if ok && bi != nil {
		if m := bi.Main.Version; m != "" && m != "(devel)" {
			tagged = m
		}
		for _, s := range bi.Settings {
			switch s.Key {
			case "vcs.revision":
				rev = s.Value
			case "vcs.modified":
				dirty = s.Value == "true"
			}
		}
	}
	if tagged != "" {
		return tagged
	}
	if len(rev) > 12 {
		rev = rev[:12]
	}
	if rev == "" {
		return Version + " (work-tree build)"
	}
	if dirty {
		rev += "-modified"
	}
	return Version + " (work-tree build, revision " + rev + ")"
}

// noArgs refuses positional arguments as a usage error.
func noArgs(cmd *cobra.Command, args []string) error {
	if len(args) > 0 {
		return usagef(cmd, "unexpected argument %q", args[0])
	}
	return nil
}

// commandGroup makes cmd a group of subcommands: run alone it is a usage
// error naming them; "help" shows its help page; an unknown word is a
// usage error with the choices.
func commandGroup(cmd *cobra.Command, what string) {
	cmd.Args = cobra.ArbitraryArgs
	cmd.RunE = func(c *cobra.Command, args []string) error {
		var names []string
		for _, s := range c.Commands() {
			if s.IsAvailableCommand() {
				names = append(names, s.Name())
			}
		}
		choices := strings.Join(names, ", ")
		switch {
		case len(args) == 0:
			return &usageError{cmd: c.CommandPath(), msg: fmt.Sprintf("a %s is needed (%s)", what, choices),
				usage: c.CommandPath() + " " + strings.ToUpper(what) + " [flags]"}
		case args[0] == "help":
			return c.Help()
		}
		return usagef(c, "unknown %s %q (choose %s)", what, args[0], choices)
	}
}

// normalizeArgs keeps the single-dash long options of the earlier parser
// (-na 1e16, -ascii=0): a single-dash word naming a long option of the
// command it is given to gets a second dash. "--" ends the options.
func normalizeArgs(root *cobra.Command, args []string) []string {
	cmd, _, err := root.Find(args)
	if err != nil || cmd == nil {
		cmd = root
	}
	known := func(name string) bool {
		return name == "help" || cmd.Flags().Lookup(name) != nil || cmd.InheritedFlags().Lookup(name) != nil ||
			(cmd == root && name == "version")
	}
	out := make([]string, len(args))
	copy(out, args)
	for i, a := range out {
		if a == "--" {
			break
		}
		if len(a) > 2 && a[0] == '-' && a[1] != '-' {
			name, _, _ := strings.Cut(a[1:], "=")
			if len(name) > 1 && known(name) {
				out[i] = "-" + a
			}
		}
	}
	return out
}

// setup applies the settings every command of the tree shares.
func setup(cmd *cobra.Command, e *env) {
	cmd.SilenceErrors, cmd.SilenceUsage = true, true
	cmd.SetOut(e.stdout)
	cmd.SetErr(e.stderr)
	cmd.SetFlagErrorFunc(flagError)
	for _, c := range cmd.Commands() {
		setup(c, e)
	}
}

// execute runs the command line args and returns the exit code.
func execute(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return executeTree(ctx, args, stdin, stdout, stderr, treeFor)
}

// executeTree runs args on the tree tree builds for them.
func executeTree(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer, tree func(*env, []string) *cobra.Command) int {
	out := &checkedWriter{w: stdout}
	e := &env{ctx: ctx, stdin: stdin, stdout: out, stderr: stderr}
	root := tree(e, args)
	find := args
	if len(args) > 0 && (args[0] == cobra.ShellCompRequestCmd || args[0] == cobra.ShellCompNoDescRequestCmd) {
		find = args[1:]
	}
	if target, _, err := root.Find(find); err == nil {
		e.defineFlags(target)
	}
	setup(root, e)
	root.SetArgs(normalizeArgs(root, args))
	cmd, err := root.ExecuteContextC(ctx)
	tell(stderr, cmd, err)
	code := exitCode(err)
	if out.err != nil && code == exitOK {
		fmt.Fprintf(stderr, "junco: writing the output: %v\n", out.err)
		code = exitFailure
	}
	return code
}

// hangups returns a channel that receives SIGHUP (the workbench writes its
// draft and quits, the server reloads its keys) and the function that
// stops the delivery.
func hangups() (<-chan os.Signal, func()) {
	c := make(chan os.Signal, 1)
	signal.Notify(c, syscall.SIGHUP)
	return c, func() { signal.Stop(c) }
}
