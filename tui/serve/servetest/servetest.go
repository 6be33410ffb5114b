// Package servetest holds the helpers that the SSH front's tests and the
// command line's served-workbench tests share: a user's key, a buffer safe
// for a session's concurrent output, a loopback server and a client login.
// It is imported by tests only; it does not import the serve package, so
// that serve's own tests can use it.
package servetest

import (
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"net"
	"strings"
	"sync"
	"testing"
	"time"

	gossh "golang.org/x/crypto/ssh"
)

// Key is a user's test key: its signer and its line for an
// authorized_keys file (the key, then the user's name as comment).
type Key struct {
	Signer gossh.Signer
	Line   string
}

// NewKey makes a fresh ed25519 key for user.
func NewKey(t testing.TB, user string) Key {
	t.Helper()
	pub, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		t.Fatal(err)
	}
	s, err := gossh.NewSignerFromKey(priv)
	if err != nil {
		t.Fatal(err)
	}
	sp, err := gossh.NewPublicKey(pub)
	if err != nil {
		t.Fatal(err)
	}
	return Key{Signer: s, Line: strings.TrimSpace(string(gossh.MarshalAuthorizedKey(sp))) + " " + user}
}

// Buffer is a bytes.Buffer that a session's output goroutine may write
// while the test reads it.
type Buffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (l *Buffer) Write(p []byte) (int, error) {
	l.mu.Lock()
	defer l.mu.Unlock()
	return l.b.Write(p)
}

// String returns what was written so far.
func (l *Buffer) String() string { l.mu.Lock(); defer l.mu.Unlock(); return l.b.String() }

// Len returns the number of bytes written so far.
func (l *Buffer) Len() int { l.mu.Lock(); defer l.mu.Unlock(); return l.b.Len() }

// WaitFor waits up to limit until b holds want, else fails the test.
func WaitFor(t testing.TB, b *Buffer, want string, limit time.Duration) {
	t.Helper()
	deadline := time.Now().Add(limit)
	for time.Now().Before(deadline) {
		if strings.Contains(b.String(), want) {
			return
		}
		time.Sleep(10 * time.Millisecond)
	}
	t.Fatalf("output never showed %q; got %q", want, b.String())
}

// Server is what Serve runs: the serve package's *Server.
type Server interface {
	Serve(net.Listener) error
	Close() error
}

// Serve runs srv on a loopback port until the end of the test and returns
// its address.
func Serve(t testing.TB, srv Server) string {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	go func() { _ = srv.Serve(l) }()
	t.Cleanup(func() { _ = srv.Close() })
	return l.Addr().String()
}

// ClientConfig is a client's configuration for user with the given
// authentication, any host key and a 5 s connection timeout.
func ClientConfig(user string, auth ...gossh.AuthMethod) *gossh.ClientConfig {
	return &gossh.ClientConfig{User: user, Auth: auth, HostKeyCallback: gossh.InsecureIgnoreHostKey(), Timeout: 5 * time.Second}
}

// Login connects to addr as user with key k; the connection is closed at
// the end of the test.
func Login(t testing.TB, addr, user string, k Key) *gossh.Client {
	t.Helper()
	c, err := gossh.Dial("tcp", addr, ClientConfig(user, gossh.PublicKeys(k.Signer)))
	if err != nil {
		t.Fatalf("dial as %s: %v", user, err)
	}
	t.Cleanup(func() { c.Close() })
	return c
}

// Session opens a session on c, closed at the end of the test.
func Session(t testing.TB, c *gossh.Client) *gossh.Session {
	t.Helper()
	s, err := c.NewSession()
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}
