// Command junco is a terminal workbench for pn junctions and diodes: define a
// junction, predict its electrostatics, transport and currents, compare with
// measurements and keep it all in sessions.
//
// With no arguments it opens the workbench on the built-in demo session.
// Subcommands: calc, solve, fit, sessions, open, serve, help (see `junco help`).
// The command line itself lives in junco/tui/cli.
package main

import (
	"os"

	"early.invalid/termquiet"

	"junco/tui/cli"
)

func main() {
	// Undo the start-up guard against terminal queries (see termquiet).
	termquiet.Restore()
	// SIGINT and SIGTERM cancel ctx once a command consults it.
	ctx, stop := cli.SignalContext()
	code := cli.Run(ctx, os.Args[1:], os.Stdin, os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}
