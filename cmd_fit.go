package main

import (
	"context"
	"fmt"
	"io"
)

// runFit is a placeholder until the fit command lands (its owner replaces this file).
func runFit(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fmt.Fprintln(stderr, "junco fit: not available yet")
	return exitFailure
}
