package serve

import (
	"strings"
	"testing"
	"time"

	gossh "golang.org/x/crypto/ssh"

	"junco/tui/serve/servetest"
)

// A connection that opens no session (`ssh -N`) is closed after --idle
// even while it sends keepalives. Before, keepalives counted as traffic:
// one user held 300 such connections past a 8 s idle timeout with a cap
// of 4, each an open file and goroutines on the server, none counted by
// --max-conn.
func TestSessionlessConnectionClosed(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.IdleTimeout = 400 * time.Millisecond }, ada.Line)
	c := login(t, f.addr, "ada", ada)
	deadline := time.Now().Add(5 * time.Second)
	for time.Now().Before(deadline) {
		if _, _, err := c.SendRequest("keepalive@openssh.com", true, nil); err != nil {
			if !strings.Contains(f.logs.String(), "no session") {
				t.Errorf("the closing is not logged:\n%s", f.logs.String())
			}
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatal("a connection without a session, sending keepalives, stayed open 5 s with a 400 ms idle timeout")
}

// Connections count against the cap whether or not they open a session:
// beyond twice --max-conn open connections, a new one is closed at once
// and the log says so. Before, only sessions were counted and connections
// without one had no limit.
func TestConnectionsWithoutSessionCapped(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections = 1 }, ada.Line)
	var held []*gossh.Client
	defer func() {
		for _, c := range held {
			c.Close()
		}
	}()
	for i := 0; i < 3; i++ {
		c, err := dial(f.addr, servetest.ClientConfig("ada", gossh.PublicKeys(ada.Signer)))
		if err != nil {
			if i < 2 {
				t.Fatalf("connection %d within the cap refused: %v", i+1, err)
			}
			if !strings.Contains(f.logs.String(), "connections open") {
				t.Errorf("the refusal is not logged:\n%s", f.logs.String())
			}
			return
		}
		held = append(held, c)
	}
	t.Fatal("3 connections open at once with --max-conn 1")
}

// --idle means no input from the client: a workbench left open by a
// client that sends keepalives (ServerAliveInterval, common in OpenSSH
// configurations) is closed after --idle like any other and frees its
// --max-conn slot. Before, keepalives counted as traffic and such a
// connection stayed open for good (20 s with --idle 8s, by hand).
func TestKeepalivesDoNotHoldAnIdleSession(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.IdleTimeout = 400 * time.Millisecond }, ada.Line)
	c := login(t, f.addr, "ada", ada)
	s := openSession(t, c)
	if err := s.RequestPty("xterm", 40, 100, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if _, err := s.StdinPipe(); err != nil {
		t.Fatal(err)
	}
	if err := s.Shell(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(5 * time.Second)
	for time.Now().Before(deadline) {
		if _, _, err := c.SendRequest("keepalive@openssh.com", true, nil); err != nil {
			return
		}
		time.Sleep(50 * time.Millisecond)
	}
	t.Fatalf("a session with no input, its client sending keepalives, stayed open 5 s with a 400 ms idle timeout:\n%s", f.logs.String())
}
