// Package cli is junco's command line: one file per command (calc, solve,
// fit, sessions, open, serve), each with an options struct and a run
// function that tests call directly with in-memory streams, all parsed by
// one command tree (command.go). main.go only hands it the process's
// arguments, streams and signal context.
package cli

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/cobra"
)

// Exit codes: the one mapping from errors to them is exitCode.
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
	// exitInterrupted is the exit status of a command stopped by SIGINT
	// or SIGTERM (128 + SIGINT, the shell convention).
	exitInterrupted = 130
)

// Run runs the command line and returns the process exit code.
func Run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return execute(ctx, args, stdin, stdout, stderr)
}

// run runs the command line and returns the process exit code.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return execute(ctx, args, stdin, stdout, stderr)
}

// boolFlag reads a boolean flag given as --name (true) or --name=VALUE,
// VALUE one of those strconv.ParseBool accepts (true, false, 1, 0, t, f):
// the reading of a boolean flag for the SSH command filter, which checks
// a remote user's words before they reach the command tree.
func boolFlag(name, val string, hasVal bool) (bool, error) {
	if !hasVal {
		return true, nil
	}
	b, err := strconv.ParseBool(val)
	if err != nil {
		return false, fmt.Errorf("--%s=%q: allowed true or false (the flag alone means true)", name, val)
	}
	return b, nil
}

// Version is the tool version written into sessions and reports.
const Version = "0.1.0"

// rootHelp is the page of `junco --help`; the fit and sessions lines name
// the subcommands of fitSubs and sessionsSubs.
func rootHelp() string {
	return `junco: a terminal workbench for pn junctions and diodes

  junco                      open the workbench on the built-in demo session
  junco calc [flags]         evaluate one junction (junco calc --help)
  junco solve [flags]        solve it numerically (drift-diffusion) beside calc
  junco open NAME|FILE       open the workbench on a stored session or a file
  junco fit ` + fitNames() + ` ...
                             extract diode parameters from measured data
  junco sessions ` + sessionNames() + ` ...
                             the session store
  junco serve [flags]        serve the workbench over SSH to a lab group
  junco completion bash|zsh|fish
                             a shell completion script
  junco version              the version of this build

Every command has its own page: junco COMMAND --help. Exit status: 0 done,
1 failed, 2 bad usage or input (one line on stderr), 130 interrupted.`
}

// printVersion writes the version line of junco version and --version.
// (Cobra's own --version would format it with text/template, whose use
// keeps every method of the program in the binary: 4 MB and a slower
// start.)
func printVersion(w io.Writer) error {
	_, err := fmt.Fprintln(w, "junco", buildVersion())
	return err
}

// newRootCmd builds the whole command tree. Run with no command, junco
// opens the workbench (workbench.go).
func newRootCmd(e *env) *cobra.Command { return newTree(e, nil, true) }

// topCommand is a command under junco: its name and aliases, its
// constructor, and whether it reads the whole tree (the manual's pages).
type topCommand struct {
	names []string
	build func(*env) *cobra.Command
	whole bool
}

// topCommands lists the commands under junco in the order of the help
// page (TestTopCommandNames checks the names against the commands).
func topCommands() []topCommand {
	return []topCommand{
		{[]string{"calc"}, newCalcCmd, false},
		{[]string{"solve"}, newSolveCmd, false},
		{[]string{"open", "workbench"}, newOpenCmd, false},
		{[]string{"fit"}, newFitCmd, false},
		{[]string{"sessions"}, newSessionsCmd, false},
		{[]string{"serve"}, newServeCmd, false},
		{[]string{"manual"}, newManualCmd, true},
		{[]string{"version"}, newVersionCmd, false},
	}
}

// treeFor builds the part of the command tree args need: the root alone
// when they name no command and ask for no help (junco, junco
// --version), the root and the command named when the first word names
// one, else every command (help pages, completion, the manual, an unknown
// word and its suggestions). Each command built costs start-up time: its
// constructor, its help texts, the memory they take.
func treeFor(e *env, args []string) *cobra.Command {
	word := -1
	for i, a := range args {
		if a == "-h" || a == "--help" || a == "-help" || a == "--" {
			return newTree(e, nil, true)
		}
		if word < 0 && !strings.HasPrefix(a, "-") {
			word = i
		}
	}
	switch {
	case word < 0:
		return newTree(e, nil, false)
	case word == 0:
		for _, c := range topCommands() {
			if slices.Contains(c.names, args[0]) && !c.whole {
				return newTree(e, []topCommand{c}, false)
			}
		}
	}
	return newTree(e, nil, true)
}

// newTree builds the root with the commands given, or with every
// command and the completion command when all is set.
func newTree(e *env, cmds []topCommand, all bool) *cobra.Command {
	root := newWorkbenchCmd(e)
	if all {
		cmds = topCommands()
	}
	for _, c := range cmds {
		root.AddCommand(c.build(e))
	}
	root.SetOut(e.stdout) // the completion scripts are written where it says now
	if all {
		root.InitDefaultCompletionCmd()
		for _, c := range root.Commands() {
			if c.Name() == "completion" {
				commandGroup(c, "shell")
			}
		}
	}
	return root
}

// newVersionCmd is junco version.
func newVersionCmd(e *env) *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "print the version of this build",
		Args:  noArgs,
		RunE:  func(*cobra.Command, []string) error { return printVersion(e.stdout) },
	}
}
