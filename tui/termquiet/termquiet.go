// Package termquiet keeps linked terminal libraries from questioning the
// terminal while the program starts.
//
// Two libraries junco links ask the terminal for its colours from their
// package initialisers, before main runs: bubbletea v1 (a background-colour
// and a cursor-position query) and charmbracelet/log (foreground and
// background, through wish). Each query waits up to five seconds for an
// answer, so in a pseudo-terminal that answers nothing (a script, an
// editor's shell buffer) every junco command stalled for fifteen seconds.
// The terminal library skips the queries when TERM is "dumb". This package
// sets TERM to "dumb" in its initialiser and Restore puts the original
// value back at the top of main; nothing junco draws depends on what those
// initialisers learnt (each front end builds its own renderer and asks the
// terminal at most once, when it needs to).
//
// It is a module of its own with a path that sorts before "github.com/...":
// Go initialises packages in import-path order among those whose imports
// are ready (The Go Programming Language Specification, "Package
// initialization", since Go 1.21), so this initialiser, which needs only
// package os, runs before those of the terminal libraries. The ".invalid"
// top-level domain (RFC 2606) marks a path that is never fetched: go.mod
// replaces it with this folder.
package termquiet

import "os"

// original holds TERM as the program was started; set once by the package
// initialiser and read only by Restore.
var original, hadTerm = os.LookupEnv("TERM")

func init() {
	_ = os.Setenv("TERM", "dumb")
}

// Restore puts back the TERM the program was started with (or removes it if
// there was none). Call it once, first thing in main.
func Restore() {
	if hadTerm {
		_ = os.Setenv("TERM", original)
		return
	}
	_ = os.Unsetenv("TERM")
}
