package main

import (
	"context"
	"fmt"
	"io"
)

// runWorkbench opens the interactive workbench.
func runWorkbench(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fmt.Fprintln(stderr, "junco: the workbench is not built yet; try `junco calc --help`")
	return exitFailure
}
