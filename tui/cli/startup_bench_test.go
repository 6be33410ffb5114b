package cli

import (
	"context"
	"io"
	"strings"
	"testing"
)

// BenchmarkVersion is the work of `junco --version` after the process has
// started: building the command tree, parsing, printing. The process's
// start-up as a whole is measured against a hello-world binary in issue 16
// (target at most 2x); this part should stay well under a millisecond.
func BenchmarkVersion(b *testing.B) {
	for b.Loop() {
		if code := run(context.Background(), []string{"--version"}, strings.NewReader(""), io.Discard, io.Discard); code != exitOK {
			b.Fatal(code)
		}
	}
}
