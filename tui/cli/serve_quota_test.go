package cli

import (
	"io"
	"log/slog"
	"testing"

	"junco/sessions"
)

// TestServeInboxCapAcrossConnections: two connections of one user (two
// inboxes opened by the served App) upload at once; together they stay
// within the per-user cap. Before, each connection checked the cap
// against the files present when its upload began, and four scp runs at
// once stored 3.6 MB in a 3 MiB inbox.
func TestServeInboxCapAcrossConnections(t *testing.T) {
	app, err := newServeApp(t.TempDir(), slog.New(slog.NewTextHandler(io.Discard, nil)))
	if err != nil {
		t.Fatal(err)
	}
	app.inboxLimits = sessions.InboxLimits{FileBytes: 1000, UserBytes: 1500}
	var ws []*sessions.InboxWriter
	for _, name := range []string{"a.csv", "b.csv"} {
		in, err := app.inbox("ada")
		if err != nil {
			t.Fatal(err)
		}
		defer in.Close()
		w, err := in.Create(name, -1)
		if err != nil {
			t.Fatal(err)
		}
		ws = append(ws, w)
	}
	stored := 0
	for _, w := range ws {
		if _, err := w.Write(make([]byte, 1000)); err == nil {
			stored++
		}
		w.Close()
	}
	if stored != 1 {
		t.Errorf("%d uploads of 1000 bytes stored at once into an inbox capped at 1500 bytes; want 1", stored)
	}
}
