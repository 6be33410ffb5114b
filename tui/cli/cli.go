// Package cli is junco's command line: one file per command (calc, solve,
// fit, sessions, open, serve), each with an options struct and a run
// function that tests call directly with in-memory streams. main.go only
// hands it the process's arguments, streams and signal context.
package cli

import (
	"context"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// Exit codes.
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
)

// Run dispatches a subcommand and returns the process exit code.
func Run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	return run(ctx, args, stdin, stdout, stderr)
}

// run dispatches a subcommand and returns the process exit code.
func run(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) int {
	if len(args) == 0 || (strings.HasPrefix(args[0], "-") && args[0] != "-h" && args[0] != "--help" && args[0] != "--version") {
		return runWorkbench(ctx, args, stdout, stderr)
	}
	switch args[0] {
	case "calc":
		return runCalc(ctx, args[1:], stdout, stderr)
	case "fit":
		return runFit(ctx, args[1:], stdout, stderr)
	case "solve":
		return runSolve(ctx, args[1:], stdout, stderr)
	case "sessions":
		return runSessions(ctx, args[1:], stdout, stderr)
	case "serve":
		return runServe(ctx, args[1:], stdout, stderr)
	case "workbench", "open":
		return runWorkbench(ctx, args[1:], stdout, stderr)
	case "help", "-h", "--help":
		usage(stdout)
		return exitOK
	case "version", "--version":
		fmt.Fprintln(stdout, "junco", Version)
		return exitOK
	}
	fmt.Fprintf(stderr, "junco: unknown command %q\n\n", args[0])
	usage(stderr)
	return exitUsage
}

// boolFlag reads a boolean flag given as --name (true) or --name=VALUE,
// VALUE one of those strconv.ParseBool accepts (true, false, 1, 0, t, f):
// the one reading of a boolean flag for the parsers that do not use the
// flag package (the workbench's, the SSH command filter).
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

func usage(w io.Writer) {
	fmt.Fprint(w, `junco: a terminal workbench for pn junctions and diodes

Usage:
  junco                      open the workbench on the built-in demo session
  junco calc [flags]         evaluate one junction (junco calc --help)
  junco solve [flags]        solve it numerically (drift-diffusion) beside calc (junco solve --help)
  junco open NAME|FILE       open the workbench on a stored session or a file
  junco fit iv|cv|arrhenius|batch ...
                             extract diode parameters from measured data
  junco sessions list|show|history|diff|export|import|trash|restore ...
                             the session store (junco sessions help)
  junco serve [flags]        serve the workbench over SSH to a lab group
  junco help                 this text
`)
}
