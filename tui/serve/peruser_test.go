package serve

import (
	"bytes"
	"strings"
	"testing"

	gossh "golang.org/x/crypto/ssh"

	"junco/tui/serve/servetest"
)

// One user cannot take every session slot: with --max-conn 4 and a share
// of 2, ada's third session is refused with a message naming the option
// and a log record, while bob still gets in. Before, one user's sessions
// could fill the whole cap and lock every colleague out.
func TestOneUserCannotHoldEverySlot(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections, c.MaxPerUser = 4, 2 }, ada.Line, bob.Line)
	for i := 0; i < 2; i++ {
		s := openInteractive(t, f.addr, "ada", ada)
		waitFor(t, s.out, "WORKBENCH user=ada")
	}
	s := openSession(t, login(t, f.addr, "ada", ada))
	var errb bytes.Buffer
	s.Stderr = &errb
	if err := s.Run("sessions list"); err == nil {
		t.Error("ada's third session ran with a share of 2")
	}
	if !strings.Contains(errb.String(), "--max-conn-per-user") {
		t.Errorf("refusal message %q does not name the option", errb.String())
	}
	if !strings.Contains(f.logs.String(), "share of the connection cap") {
		t.Errorf("refusal not logged:\n%s", f.logs.String())
	}
	b := openInteractive(t, f.addr, "bob", bob)
	waitFor(t, b.out, "WORKBENCH user=bob")
}

// Connections count against the user's share from the verified key on,
// with or without a session: with a share of 1 (2 connections), ada's
// third sessionless connection (`ssh -N`) is refused with a banner that
// says why, while bob still logs in. (The count runs after the signature
// check, VerifiedPublicKeyCallback in golang.org/x/crypto/ssh, so a client
// that only knows ada's public key counts for nothing.) Before, one user could
// hold every connection of the cap (twice --max-conn) without a session.
func TestUserConnectionShare(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections, c.MaxPerUser = 8, 1 }, ada.Line, bob.Line)
	login(t, f.addr, "ada", ada)
	login(t, f.addr, "ada", ada)
	var banner string
	cfg := servetest.ClientConfig("ada", gossh.PublicKeys(ada.Signer))
	cfg.BannerCallback = func(msg string) error { banner += msg; return nil }
	if c, err := dial(f.addr, cfg); err == nil {
		c.Close()
		t.Fatal("ada's third connection logged in with a share of 1 (2 connections)")
	}
	if !strings.Contains(banner, "--max-conn-per-user") {
		t.Errorf("banner %q does not say why", banner)
	}
	if !strings.Contains(f.logs.String(), "user's share of open connections") {
		t.Errorf("refusal not logged:\n%s", f.logs.String())
	}
	login(t, f.addr, "bob", bob)
}

// The default share: a quarter of the cap, at least 2, never above it.
func TestPerUserShareDefault(t *testing.T) {
	for _, c := range []struct{ n, max, want int }{
		{0, 32, 8}, {0, 4, 2}, {0, 1, 1}, {0, 3, 2}, {5, 32, 5}, {40, 32, 8}, {-1, 32, 8},
	} {
		if got := perUserShare(c.n, c.max); got != c.want {
			t.Errorf("perUserShare(%d, %d) = %d, want %d", c.n, c.max, got, c.want)
		}
	}
}
