package cli

import (
	"bytes"
	"context"
	"strings"
	"testing"
)

// --max-conn-per-user above --max-conn, or negative, is refused before the
// server starts, naming the option, the value and the allowed range.
func TestServePerUserShareChecked(t *testing.T) {
	for _, n := range []int{-1, 33} {
		var out, errb bytes.Buffer
		o := serveOptions{maxConn: 32, maxConnPerUser: n, uploadMiB: 1, inboxMiB: 1}
		if code := runServeOptions(context.Background(), o, &out, &errb); code != exitUsage {
			t.Errorf("--max-conn-per-user %d: exit %d, want %d", n, code, exitUsage)
		}
		if msg := errb.String(); !strings.Contains(msg, "--max-conn-per-user") || !strings.Contains(msg, "allowed 1 to --max-conn (32)") {
			t.Errorf("--max-conn-per-user %d: message %q", n, msg)
		}
	}
}
