package cli

import (
	"bytes"
	"context"
	"errors"
	"io"
	"log/slog"
	"strings"
	"testing"
	"time"

	"junco/model"
	"junco/sessions"
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

// --store-max-mib outside 1 to 1048576 is refused before the server
// starts, naming the option, the value and the range; a served user's
// store is opened with the cap (sessions.TestStoreQuota checks the
// refusal itself).
func TestServeStoreCapChecked(t *testing.T) {
	for _, n := range []int64{0, -3, 1<<20 + 1} {
		var out, errb bytes.Buffer
		o := serveOptions{maxConn: 32, uploadMiB: 1, inboxMiB: 1, storeMiB: n, data: t.TempDir()}
		if code := runServeOptions(context.Background(), o, &out, &errb); code != exitUsage {
			t.Errorf("--store-max-mib %d: exit %d, want %d", n, code, exitUsage)
		}
		if msg := errb.String(); !strings.Contains(msg, "--store-max-mib") || !strings.Contains(msg, "allowed 1 to 1048576") {
			t.Errorf("--store-max-mib %d: message %q", n, msg)
		}
	}
	app, err := newServeApp(t.TempDir(), slog.New(slog.NewTextHandler(io.Discard, nil)))
	if err != nil {
		t.Fatal(err)
	}
	app.storeBytes = 200 // less than any session (the default junction alone encodes to about 800 bytes)
	st, _, err := app.userStore("ada")
	if err != nil {
		t.Fatal(err)
	}
	doc := sessions.NewDocument("big", "ada", model.DefaultSpec(), time.Now())
	var qerr *sessions.StoreQuotaError
	if _, err := st.Save("big", doc, 0); !errors.As(err, &qerr) || qerr.Flag != "--store-max-mib" {
		t.Errorf("a save into a 200-byte store: %v", err)
	}
}
