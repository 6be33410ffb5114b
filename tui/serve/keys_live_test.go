package serve

import (
	"bytes"
	"fmt"
	"os"
	"strings"
	"testing"
	"time"

	gossh "golang.org/x/crypto/ssh"

	"junco/tui/serve/servetest"
)

func canLogin(t *testing.T, f *fixture, user string, k servetest.Key) bool {
	t.Helper()
	c, err := dial(f.addr, servetest.ClientConfig(user, gossh.PublicKeys(k.Signer)))
	if err != nil {
		return false
	}
	c.Close()
	return true
}

// The case of the issue: from="10.9.9.9",command="/bin/false",no-pty let
// carol in from 127.0.0.1 with a full workbench.
func TestFromOption(t *testing.T) {
	ada, bob, carol, dan := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob"), servetest.NewKey(t, "carol"), servetest.NewKey(t, "dan")
	f := startServer(t, t.TempDir(),
		`from="10.9.9.9",no-pty `+carol.Line,
		`from="127.0.0.0/8" `+ada.Line,
		`from="!127.0.0.1,*" `+bob.Line,
		`from="10.9.9.9",command="/bin/false",no-pty `+dan.Line,
	)
	if canLogin(t, f, "carol", carol) {
		t.Error(`from="10.9.9.9" admitted 127.0.0.1`)
	}
	if !canLogin(t, f, "ada", ada) {
		t.Error(`from="127.0.0.0/8" refused 127.0.0.1`)
	}
	if canLogin(t, f, "bob", bob) {
		t.Error(`from="!127.0.0.1,*" admitted 127.0.0.1`)
	}
	if canLogin(t, f, "dan", dan) {
		t.Error("a line with command=/bin/false admitted its key")
	}
	logs := f.logs.String()
	for _, want := range []string{"from= on line 1 does not admit 127.0.0.1", `line 4 (dan) refused: option command=\"/bin/false\"`} {
		if !strings.Contains(logs, want) {
			t.Errorf("log does not say %q:\n%s", want, logs)
		}
	}
}

func TestExpiryOption(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	past := time.Now().UTC().Add(-time.Hour).Format("200601021504") + "Z"
	future := time.Now().UTC().Add(24*time.Hour).Format("20060102") + "Z"
	f := startServer(t, t.TempDir(), `expiry-time="`+past+`" `+ada.Line, `expiry-time="`+future+`" `+bob.Line)
	if canLogin(t, f, "ada", ada) {
		t.Error("an expired key logged in")
	}
	if !canLogin(t, f, "bob", bob) {
		t.Error("a key expiring tomorrow was refused")
	}
	if !strings.Contains(f.logs.String(), "expired at") {
		t.Errorf("expiry not logged:\n%s", f.logs.String())
	}
}

func TestNoPTYOption(t *testing.T) {
	ada, bob, carol := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob"), servetest.NewKey(t, "carol")
	f := startServer(t, t.TempDir(), "no-pty "+ada.Line, "restrict "+bob.Line, "restrict,pty "+carol.Line)
	for _, c := range []struct {
		user  string
		k     servetest.Key
		allow bool
	}{{"ada", ada, false}, {"bob", bob, false}, {"carol", carol, true}} {
		cl, err := dial(f.addr, servetest.ClientConfig(c.user, gossh.PublicKeys(c.k.Signer)))
		if err != nil {
			t.Fatal(err)
		}
		s, err := cl.NewSession()
		if err != nil {
			t.Fatal(err)
		}
		err = s.RequestPty("xterm", 30, 100, gossh.TerminalModes{})
		if (err == nil) != c.allow {
			t.Errorf("%s: terminal request error %v, want allowed=%v", c.user, err, c.allow)
		}
		if !c.allow {
			// The commands still run without a terminal.
			var out bytes.Buffer
			s.Stdout = &out
			if err := s.Run("sessions list"); err != nil || out.String() != "ran sessions list for "+c.user+"\n" {
				t.Errorf("%s: sessions list %q %v", c.user, out.String(), err)
			}
		}
		s.Close()
		cl.Close()
	}
}

func TestForcedCommand(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServer(t, t.TempDir(), `command="sessions show d7" `+ada.Line)
	cl, err := dial(f.addr, servetest.ClientConfig("ada", gossh.PublicKeys(ada.Signer)))
	if err != nil {
		t.Fatal(err)
	}
	defer cl.Close()
	for _, asked := range []string{"sessions list", "sessions export other --format md", ""} {
		s, err := cl.NewSession()
		if err != nil {
			t.Fatal(err)
		}
		var out bytes.Buffer
		s.Stdout = &out
		if asked == "" {
			err = s.Shell()
			if err == nil {
				err = s.Wait()
			}
		} else {
			err = s.Run(asked)
		}
		if err != nil || out.String() != "ran sessions show d7 for ada\n" {
			t.Errorf("asked %q: got %q %v, want the forced command", asked, out.String(), err)
		}
	}
	s, err := cl.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	if err := s.RequestSubsystem("sftp"); err == nil {
		t.Error("a key with a forced command got a subsystem")
	}
	s, err = cl.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	var errb bytes.Buffer
	s.Stderr = &errb
	if err := s.Run("scp -t ."); err == nil || !strings.Contains(errb.String(), "no file transfer") {
		t.Errorf("legacy scp with a forced command: %v %q", err, errb.String())
	}
}

// A removed key ends its live connection, after its program got the
// shutdown message (the workbench writes its recovery draft on it); the
// other users stay connected.
func TestRemovedKeyClosesLiveConnection(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	app := &probeApp{shutdowns: make(chan string, 4)}
	f := startServerWith(t, t.TempDir(), func(c *Config) {
		c.App, c.ShutdownMsg, c.KeysPoll = app, probeShutdown{}, 100*time.Millisecond
	}, ada.Line, bob.Line)
	a := openInteractive(t, f.addr, "ada", ada)
	b := openInteractive(t, f.addr, "bob", bob)
	waitFor(t, a.out, "PROBE user=ada")
	waitFor(t, b.out, "PROBE user=bob")
	writeKeys(t, f.authKeys, ada.Line)
	done := make(chan error, 1)
	go func() { done <- b.sess.Wait() }()
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("bob's connection outlived the removal of his key by 10 s")
	}
	if got := collect(app.shutdowns, 1, time.Second); len(got) != 1 || got[0] != "bob" {
		t.Errorf("shutdown (drafts) message went to %v, want [bob]", got)
	}
	fmt.Fprint(a.in, "x")
	waitFor(t, a.out, "keys=1")
	if !strings.Contains(f.logs.String(), "closing connection: key no longer authorised") {
		t.Errorf("not logged:\n%s", f.logs.String())
	}
}

// Adding no-pty to the line of a user with a workbench open ends it too.
func TestChangedTermsCloseLiveConnection(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.KeysPoll = -1 }, ada.Line)
	a := openInteractive(t, f.addr, "ada", ada)
	waitFor(t, a.out, "WORKBENCH user=ada")
	writeKeys(t, f.authKeys, "no-pty "+ada.Line)
	if err := f.srv.Reload(); err != nil {
		t.Fatal(err)
	}
	done := make(chan error, 1)
	go func() { done <- a.sess.Wait() }()
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("the workbench stayed open after no-pty was added to its key")
	}
}

// A key file replaced by one of the same size and modification time is
// still noticed: changes are found by content.
func TestKeyChangeDetectedByContent(t *testing.T) {
	bob, eve := servetest.NewKey(t, "bob"), servetest.NewKey(t, "bob")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.KeysPoll = -1 }, bob.Line)
	st, err := os.Stat(f.authKeys)
	if err != nil {
		t.Fatal(err)
	}
	if !canLogin(t, f, "bob", bob) {
		t.Fatal("bob refused")
	}
	if len(eve.Line) != len(bob.Line) {
		t.Fatal("test keys differ in length")
	}
	if err := os.WriteFile(f.authKeys, []byte(eve.Line+"\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := os.Chtimes(f.authKeys, st.ModTime(), st.ModTime()); err != nil {
		t.Fatal(err)
	}
	if canLogin(t, f, "bob", bob) {
		t.Error("the replaced key still logs in (change of content not noticed)")
	}
	if !canLogin(t, f, "bob", eve) {
		t.Error("the new key is refused")
	}
}
