// Command junco is a terminal workbench for pn junctions and diodes: define a
// junction, predict its electrostatics, transport and currents, compare with
// measurements and keep it all in sessions.
//
// With no arguments it opens the workbench on the built-in demo session.
// Subcommands: calc, fit, sessions, open, serve, help (see `junco help`).
package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// Exit codes.
const (
	exitOK      = 0
	exitFailure = 1
	exitUsage   = 2
)

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
