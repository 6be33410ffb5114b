package serve

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"log/slog"
	"net"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	gossh "golang.org/x/crypto/ssh"

	"junco/tui/serve/servetest"
)

// testApp is a minimal App: a screen naming the user, which panics on the
// key "!" (to test isolation), and a command that echoes its arguments.
type testApp struct{}

type screen struct {
	user string
	w, h int
	keys int
}

func (m *screen) Init() tea.Cmd { return nil }
func (m *screen) Update(msg tea.Msg) (tea.Model, tea.Cmd) {
	switch msg := msg.(type) {
	case tea.WindowSizeMsg:
		m.w, m.h = msg.Width, msg.Height
	case tea.KeyMsg:
		switch msg.String() {
		case "!":
			panic("injected test panic")
		case "q":
			return m, tea.Quit
		}
		m.keys++
	}
	return m, nil
}
func (m *screen) View() string {
	return fmt.Sprintf("WORKBENCH user=%s size=%dx%d keys=%d\n", m.user, m.w, m.h, m.keys)
}

func (testApp) Model(ctx context.Context, c Conn) (tea.Model, error) {
	return &screen{user: c.User, w: c.Width, h: c.Height}, nil
}
func (testApp) Command(ctx context.Context, user string, args []string, stdout, stderr io.Writer) int {
	fmt.Fprintf(stdout, "ran %s for %s\n", strings.Join(args, " "), user)
	return 0
}

// login opens an SSH connection as user with key k, closed at the end of
// the test.
func login(t *testing.T, addr, user string, k servetest.Key) *gossh.Client {
	t.Helper()
	return servetest.Login(t, addr, user, k)
}

// openSession opens a session on c, closed at the end of the test.
func openSession(t *testing.T, c *gossh.Client) *gossh.Session {
	t.Helper()
	return servetest.Session(t, c)
}

type fixture struct {
	dir, hostKey, authKeys string
	srv                    *Server
	addr                   string
	logs                   *servetest.Buffer
}

func startServer(t *testing.T, dir string, lines ...string) *fixture {
	t.Helper()
	return startServerWith(t, dir, nil, lines...)
}

// startServerWith is startServer with a hook to change the configuration.
func startServerWith(t *testing.T, dir string, configure func(*Config), lines ...string) *fixture {
	t.Helper()
	f := &fixture{dir: dir, hostKey: filepath.Join(dir, "host", "ed25519"), authKeys: filepath.Join(dir, "authorized_keys"), logs: &servetest.Buffer{}}
	if _, err := os.Stat(f.authKeys); os.IsNotExist(err) {
		writeKeys(t, f.authKeys, lines...)
	}
	cfg := Config{Listen: "127.0.0.1:0", HostKeyPath: f.hostKey, AuthorizedKeysPath: f.authKeys,
		App: testApp{}, Logger: slog.New(slog.NewTextHandler(f.logs, nil)), Grace: time.Second}
	if configure != nil {
		configure(&cfg)
	}
	srv, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	f.srv, f.addr = srv, servetest.Serve(t, srv)
	return f
}

func writeKeys(t *testing.T, path string, lines ...string) {
	t.Helper()
	tmp := path + ".tmp"
	if err := os.WriteFile(tmp, []byte(strings.Join(lines, "\n")+"\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	// A later modification time than the previous file, even on coarse clocks.
	later := time.Now().Add(2 * time.Second)
	_ = os.Chtimes(tmp, later, later)
	if err := os.Rename(tmp, path); err != nil {
		t.Fatal(err)
	}
}

func dial(addr string, cfg *gossh.ClientConfig) (*gossh.Client, error) {
	return gossh.Dial("tcp", addr, cfg)
}

// interactive opens a PTY session and returns its stdin and a reader that
// waits for text on its output.
type interactiveSession struct {
	sess  *gossh.Session
	in    io.WriteCloser
	out   *servetest.Buffer
	close func()
}

func openInteractive(t *testing.T, addr, user string, k servetest.Key) *interactiveSession {
	t.Helper()
	c, err := dial(addr, servetest.ClientConfig(user, gossh.PublicKeys(k.Signer)))
	if err != nil {
		t.Fatalf("dial as %s: %v", user, err)
	}
	s, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	out := &servetest.Buffer{}
	s.Stdout = out
	in, err := s.StdinPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := s.RequestPty("xterm-256color", 30, 100, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if err := s.Shell(); err != nil {
		t.Fatal(err)
	}
	is := &interactiveSession{sess: s, in: in, out: out, close: func() { s.Close(); c.Close() }}
	t.Cleanup(is.close)
	return is
}

func waitFor(t *testing.T, b *servetest.Buffer, want string) {
	t.Helper()
	servetest.WaitFor(t, b, want, 5*time.Second)
}

func TestAuthorisedUserGetsWorkbench(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServer(t, t.TempDir(), ada.Line)
	is := openInteractive(t, f.addr, "ada", ada)
	waitFor(t, is.out, "WORKBENCH user=ada size=100x30")
	fmt.Fprint(is.in, "x")
	waitFor(t, is.out, "keys=1")
}

func TestRefusedLogins(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	stranger := servetest.NewKey(t, "eve")
	f := startServer(t, t.TempDir(), ada.Line, bob.Line)
	cases := []struct {
		name string
		cfg  *gossh.ClientConfig
	}{
		{"unknown key", servetest.ClientConfig("eve", gossh.PublicKeys(stranger.Signer))},
		{"password", servetest.ClientConfig("ada", gossh.Password("secret"))},
		{"keyboard-interactive", servetest.ClientConfig("ada", gossh.KeyboardInteractive(func(string, string, []string, []bool) ([]string, error) {
			return []string{"secret"}, nil
		}))},
		{"another user's login name", servetest.ClientConfig("bob", gossh.PublicKeys(ada.Signer))},
	}
	for _, c := range cases {
		if cl, err := dial(f.addr, c.cfg); err == nil {
			cl.Close()
			t.Errorf("%s: login accepted", c.name)
		}
	}
	logs := f.logs.String()
	if !strings.Contains(logs, "login refused") || !strings.Contains(logs, gossh.FingerprintSHA256(stranger.Signer.PublicKey())) {
		t.Errorf("refusals not logged with fingerprints:\n%s", logs)
	}
}

func TestNoPTYGetsExplanation(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServer(t, t.TempDir(), ada.Line)
	c := login(t, f.addr, "ada", ada)
	s, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	s.Stdout = &out
	if err := s.Shell(); err != nil {
		t.Fatal(err)
	}
	_ = s.Wait()
	if !strings.Contains(out.String(), "needs a terminal") || strings.Count(out.String(), "\n") != 1 {
		t.Errorf("no-PTY output %q", out.String())
	}
}

func TestCommands(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServer(t, t.TempDir(), ada.Line)
	run := func(cmd string) (string, string, error) {
		c := login(t, f.addr, "ada", ada)
		s, err := c.NewSession()
		if err != nil {
			t.Fatal(err)
		}
		var out, errb bytes.Buffer
		s.Stdout, s.Stderr = &out, &errb
		err = s.Run(cmd)
		return out.String(), errb.String(), err
	}
	if out, _, err := run("sessions list"); err != nil || out != "ran sessions list for ada\n" {
		t.Errorf("sessions list: %q %v", out, err)
	}
	for _, bad := range []string{"sh", "bash -c id", "sessions trash foo", "sessions", "cat /etc/passwd"} {
		if _, errs, err := run(bad); err == nil || !strings.Contains(errs, "no shell") {
			t.Errorf("%q was not refused: %q %v", bad, errs, err)
		}
	}
}

func TestHostKeyStableAcrossRestarts(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	dir := t.TempDir()
	f1 := startServer(t, dir, ada.Line)
	fp := f1.srv.Fingerprint()
	if !f1.srv.CreatedHostKey() {
		t.Error("first start did not create the host key")
	}
	st, err := os.Stat(f1.hostKey)
	if err != nil || st.Mode().Perm() != 0o600 {
		t.Fatalf("host key mode %v %v", st.Mode().Perm(), err)
	}
	_ = f1.srv.Close()
	f2 := startServer(t, dir, ada.Line)
	if f2.srv.CreatedHostKey() || f2.srv.Fingerprint() != fp {
		t.Errorf("host key changed across restarts: %s -> %s", fp, f2.srv.Fingerprint())
	}
	// The client sees the same key.
	var seen string
	cfg := servetest.ClientConfig("ada", gossh.PublicKeys(ada.Signer))
	cfg.HostKeyCallback = func(_ string, _ net.Addr, k gossh.PublicKey) error { seen = gossh.FingerprintSHA256(k); return nil }
	c, err := dial(f2.addr, cfg)
	if err != nil {
		t.Fatal(err)
	}
	c.Close()
	if seen != fp {
		t.Errorf("client saw %s, server printed %s", seen, fp)
	}
}

func TestRemovedKeyLocksOut(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	f := startServer(t, t.TempDir(), ada.Line, bob.Line)
	c, err := dial(f.addr, servetest.ClientConfig("bob", gossh.PublicKeys(bob.Signer)))
	if err != nil {
		t.Fatal(err)
	}
	c.Close()
	writeKeys(t, f.authKeys, ada.Line, "this line is not a key", "ssh-ed25519 AAAA bad/comment")
	if c, err := dial(f.addr, servetest.ClientConfig("bob", gossh.PublicKeys(bob.Signer))); err == nil {
		c.Close()
		t.Fatal("bob still gets in after his key was removed")
	}
	// A bad line does not lock out the others.
	c, err = dial(f.addr, servetest.ClientConfig("ada", gossh.PublicKeys(ada.Signer)))
	if err != nil {
		t.Fatalf("ada locked out by a bad line: %v", err)
	}
	c.Close()
	if err := f.srv.Reload(); err != nil {
		t.Fatal(err)
	}
}

func TestPanicIsolated(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	f := startServer(t, t.TempDir(), ada.Line, bob.Line)
	a := openInteractive(t, f.addr, "ada", ada)
	b := openInteractive(t, f.addr, "bob", bob)
	waitFor(t, a.out, "user=ada")
	waitFor(t, b.out, "user=bob")
	fmt.Fprint(a.in, "!")
	done := make(chan error, 1)
	go func() { done <- a.sess.Wait() }()
	select {
	case <-done:
	case <-time.After(5 * time.Second):
		t.Fatal("panicking connection did not end")
	}
	fmt.Fprint(b.in, "y")
	waitFor(t, b.out, "keys=1")
	if !strings.Contains(f.logs.String(), "injected test panic") {
		t.Errorf("panic not logged:\n%s", f.logs.String())
	}
	// A new connection still works.
	c := openInteractive(t, f.addr, "ada", ada)
	waitFor(t, c.out, "user=ada")
}

func TestUserNames(t *testing.T) {
	for _, ok := range []string{"ada", "a.b", "x_y-z", "A1"} {
		if !ValidUserName(ok) {
			t.Errorf("%q rejected", ok)
		}
	}
	for _, bad := range []string{"", ".", "..", "-x", ".hidden", "a/b", "a b", "é", strings.Repeat("a", 65)} {
		if ValidUserName(bad) {
			t.Errorf("%q accepted", bad)
		}
	}
}

// The server never writes a key outside the configured host-key path (the
// SSH library would otherwise create one in the working directory).
func TestNoStrayHostKey(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	startServer(t, t.TempDir(), ada.Line)
	for _, f := range []string{"id_ed25519", "id_ed25519.pub"} {
		if _, err := os.Stat(f); err == nil {
			os.Remove(f)
			t.Errorf("a stray %s was written into the working directory", f)
		}
	}
}
