package serve

import (
	"bytes"
	"fmt"
	"io"
	"net"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/charmbracelet/ssh"
	gossh "golang.org/x/crypto/ssh"

	"junco/tui/serve/servetest"
)

// counts is what the server counts: connections open, sessions open,
// each user's connections and sessions, and each address's connections
// waiting for a login.
type counts struct {
	open, active                    int
	userConns, perUser, pend, chans map[string]int
}

func (c counts) zero() bool {
	return c.open == 0 && c.active == 0 && len(c.userConns) == 0 && len(c.perUser) == 0 && len(c.pend) == 0 && len(c.chans) == 0
}

func (s *Server) countsNow() counts {
	s.mu.Lock()
	defer s.mu.Unlock()
	cp := func(m map[string]int) map[string]int {
		out := map[string]int{}
		for k, v := range m {
			out[k] = v
		}
		return out
	}
	return counts{open: s.openConns, active: s.active, userConns: cp(s.userConns), perUser: cp(s.perUser), pend: cp(s.preAuth), chans: cp(s.userChans)}
}

// waitZero waits up to 10 s for every count of srv to be back at zero.
func waitZero(t *testing.T, srv *Server, what string) {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for {
		c := srv.countsNow()
		if c.zero() {
			return
		}
		if time.Now().After(deadline) {
			t.Fatalf("%s: the server's counts did not return to zero: %+v", what, c)
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// dialFrom opens an SSH connection to addr from the loopback address
// local (127.0.0.2 is another host to the server), or skips the test
// where the system cannot bind it.
func dialFrom(t *testing.T, local, addr string, cfg *gossh.ClientConfig) (*gossh.Client, error) {
	t.Helper()
	d := net.Dialer{LocalAddr: &net.TCPAddr{IP: net.ParseIP(local)}, Timeout: 5 * time.Second}
	nc, err := d.Dial("tcp", addr)
	if err != nil {
		if strings.Contains(err.Error(), "bind") || strings.Contains(err.Error(), "assign") {
			t.Skipf("cannot dial from %s here: %v", local, err)
		}
		return nil, err
	}
	c, chans, reqs, err := gossh.NewClientConn(nc, addr, cfg)
	if err != nil {
		nc.Close()
		return nil, err
	}
	return gossh.NewClient(c, chans, reqs), nil
}

// A client with no key at all cannot lock the users out by holding
// connections open without logging in: from one address, at most half of
// --max-conn connections wait for a login (a further one is closed at
// once and logged), so bob, from another address, still logs in. Before,
// 2 x --max-conn such connections (16 with --max-conn 8, by hand with
// OpenSSH's ssh against `junco serve`) refused every login for a minute,
// and again at will.
func TestConnectionsNotLoggedInCannotLockUsersOut(t *testing.T) {
	bob := servetest.NewKey(t, "bob")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections = 4 }, bob.Line)
	var held []net.Conn
	defer func() {
		for _, c := range held {
			c.Close()
		}
	}()
	open := 0
	for i := 0; i < 2*4; i++ { // the whole connection cap
		c, err := net.Dial("tcp", f.addr)
		if err != nil {
			t.Fatal(err)
		}
		held = append(held, c)
		// An admitted connection gets the server's version line; a
		// refused one is closed without it.
		_ = c.SetReadDeadline(time.Now().Add(2 * time.Second))
		line := make([]byte, 8)
		if _, err := io.ReadFull(c, line); err == nil && bytes.HasPrefix(line, []byte("SSH-2.0-")) {
			open++
		}
	}
	if open != preAuthShare(4) {
		t.Errorf("%d connections of one address wait for a login with --max-conn 4, want %d", open, preAuthShare(4))
	}
	if !strings.Contains(f.logs.String(), "not yet logged in") {
		t.Errorf("the refusal is not logged:\n%s", f.logs.String())
	}
	c, err := dialFrom(t, "127.0.0.2", f.addr, servetest.ClientConfig("bob", gossh.PublicKeys(bob.Signer)))
	if err != nil {
		t.Fatalf("bob cannot log in while another address holds connections without a login: %v", err)
	}
	c.Close()
	for _, c := range held {
		c.Close()
	}
	held = nil
	waitZero(t, f.srv, "after the connections without a login closed")
	login(t, f.addr, "bob", bob) // the address may log in again
}

// fakeCtx is the part of an ssh.Context that admitConn and countUserConn
// use.
type fakeCtx struct {
	ssh.Context
	mu   sync.Mutex
	vals map[any]any
}

func (c *fakeCtx) SetValue(k, v any) { c.mu.Lock(); c.vals[k] = v; c.mu.Unlock() }
func (c *fakeCtx) Value(k any) any   { c.mu.Lock(); defer c.mu.Unlock(); return c.vals[k] }
func (c *fakeCtx) RemoteAddr() net.Addr {
	return &net.TCPAddr{IP: net.IPv4(127, 0, 0, 1), Port: 1}
}

// A key verified after its connection was closed (the watchdog closing it
// while the client's signature was in flight: packets read before the
// close are still handled) counts for nothing. Before, the user's count
// was taken after the connection had given it back, and kept for good:
// each such login shrank the user's share until the server restarted.
func TestKeyVerifiedAfterCloseCountsNothing(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), nil, ada.Line)
	ctx := &fakeCtx{vals: map[any]any{}}
	server, client := net.Pipe()
	defer client.Close()
	cc := f.srv.admitConn(ctx, server)
	if cc == nil {
		t.Fatal("connection refused")
	}
	cc.Close()
	if err := f.srv.countUserConn(ctx, "ada"); err == nil {
		t.Error("a key verified on a closed connection was accepted")
	}
	if c := f.srv.countsNow(); !c.zero() {
		t.Errorf("counts after the closed connection: %+v", c)
	}
}

// Every count is given back on every path: sessions that end, logins
// refused beyond the share, SFTP and scp sessions, a program that panics,
// a connection that never logs in, one that logs in with the wrong name
// first, and connections closed by the server for want of a session; all
// at once from two users. Afterwards the counts are zero and a user holds
// a full share again.
func TestCountsReturnToZero(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	f := startServerWith(t, t.TempDir(), func(c *Config) {
		c.MaxConnections, c.MaxPerUser, c.IdleTimeout = 16, 2, 300*time.Millisecond
	}, ada.Line, bob.Line)
	keys := map[string]servetest.Key{"ada": ada, "bob": bob}
	run := func(user string, k int) {
		cfg := servetest.ClientConfig(user, gossh.PublicKeys(keys[user].Signer))
		switch k % 6 {
		case 0: // a command
			if c, err := dial(f.addr, cfg); err == nil {
				if s, err := c.NewSession(); err == nil {
					_ = s.Run("sessions list")
				}
				c.Close()
			}
		case 1: // an SFTP session (refused here: this server has no inbox)
			if c, err := dial(f.addr, cfg); err == nil {
				if s, err := c.NewSession(); err == nil {
					_ = s.RequestSubsystem("sftp")
					_ = s.Wait()
				}
				c.Close()
			}
		case 2: // a legacy scp upload
			if c, err := dial(f.addr, cfg); err == nil {
				if s, err := c.NewSession(); err == nil {
					_ = s.Run("scp -t x.csv")
				}
				c.Close()
			}
		case 3: // a workbench that panics
			if c, err := dial(f.addr, cfg); err == nil {
				if s, err := c.NewSession(); err == nil {
					in, _ := s.StdinPipe()
					if s.RequestPty("xterm", 24, 80, gossh.TerminalModes{}) == nil && s.Shell() == nil {
						fmt.Fprint(in, "!")
						_ = s.Wait()
					}
				}
				c.Close()
			}
		case 4: // the other user's name first, then the right one
			other := map[string]string{"ada": "bob", "bob": "ada"}[user]
			if c, err := dial(f.addr, servetest.ClientConfig(other, gossh.PublicKeys(keys[user].Signer))); err == nil {
				c.Close()
			}
			if c, err := dial(f.addr, cfg); err == nil {
				c.Close()
			}
		case 5: // no session: closed by the server
			if c, err := dial(f.addr, cfg); err == nil {
				_ = c.Wait()
			}
		}
	}
	var wg sync.WaitGroup
	for i := 0; i < 24; i++ {
		wg.Add(1)
		go func(i int) {
			defer wg.Done()
			run(map[bool]string{true: "ada", false: "bob"}[i%2 == 0], i/2)
		}(i)
	}
	// Connections that never log in, closed by the client or the server.
	for i := 0; i < 4; i++ {
		wg.Add(1)
		go func(i int) {
			defer wg.Done()
			if c, err := net.Dial("tcp", f.addr); err == nil {
				if i%2 == 0 {
					c.Close()
					return
				}
				_, _ = io.Copy(io.Discard, c)
				c.Close()
			}
		}(i)
	}
	done := make(chan struct{})
	go func() { wg.Wait(); close(done) }()
	select {
	case <-done:
	case <-time.After(30 * time.Second):
		t.Fatal("the connections did not end within 30 s")
	}
	waitZero(t, f.srv, "after every connection ended")
	for i := 0; i < 2*2; i++ { // a full share of connections again
		login(t, f.addr, "ada", ada)
	}
}

// One user cannot hold session channels without limit: channels that ask
// for nothing are refused beyond twice --max-conn-per-user, on one
// connection or several, with a message that says why, and given back
// when they close. Before, such channels were counted nowhere: 20000 of
// them on one connection raised the server's resident memory from 20 MB
// to 198 MB (about 9 kB each), without bound.
func TestIdleSessionChannelsCapped(t *testing.T) {
	ada, bob := servetest.NewKey(t, "ada"), servetest.NewKey(t, "bob")
	f := startServerWith(t, t.TempDir(), func(c *Config) { c.MaxConnections, c.MaxPerUser = 8, 2 }, ada.Line, bob.Line)
	c1, c2 := login(t, f.addr, "ada", ada), login(t, f.addr, "ada", ada)
	var held []gossh.Channel
	var refusal error
	for i := 0; i < 50 && refusal == nil; i++ {
		c := map[bool]*gossh.Client{true: c1, false: c2}[i%2 == 0]
		ch, reqs, err := c.OpenChannel("session", nil)
		if err != nil {
			refusal = err
			break
		}
		go gossh.DiscardRequests(reqs)
		held = append(held, ch)
	}
	if len(held) != connCapFactor*2 {
		t.Errorf("ada holds %d session channels with a share of 2, want %d", len(held), connCapFactor*2)
	}
	if refusal == nil || !strings.Contains(refusal.Error(), "--max-conn-per-user") {
		t.Errorf("refusal %v does not say why", refusal)
	}
	if !strings.Contains(f.logs.String(), "share of open session channels") {
		t.Errorf("refusal not logged:\n%s", f.logs.String())
	}
	s := openSession(t, login(t, f.addr, "bob", bob)) // bob is not held up
	if out, err := s.Output("sessions list"); err != nil || !strings.Contains(string(out), "ran sessions list for bob") {
		t.Errorf("bob's command: %q, %v", out, err)
	}
	held[0].Close()
	deadline := time.Now().Add(5 * time.Second)
	for {
		ch, reqs, err := c1.OpenChannel("session", nil)
		if err == nil {
			go gossh.DiscardRequests(reqs)
			ch.Close()
			break
		}
		if time.Now().After(deadline) {
			t.Fatalf("a closed channel was not given back: %v", err)
		}
		time.Sleep(20 * time.Millisecond)
	}
}

// A client cannot make a session keep environment variables without
// limit: up to 64 of at most 1 kB each are accepted, further ones and
// larger ones are refused, and the refusal is logged. Before, every one was
// kept (5000 of 30 kB took 80 MB of the server's memory).
func TestEnvironmentRequestsBounded(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServerWith(t, t.TempDir(), nil, ada.Line)
	ch, reqs, err := login(t, f.addr, "ada", ada).OpenChannel("session", nil)
	if err != nil {
		t.Fatal(err)
	}
	defer ch.Close()
	go gossh.DiscardRequests(reqs)
	env := func(k, v string) bool {
		ok, err := ch.SendRequest("env", true, gossh.Marshal(struct{ K, V string }{k, v}))
		if err != nil {
			t.Fatal(err)
		}
		return ok
	}
	if env("BIG", strings.Repeat("x", 2000)) {
		t.Error("a 2000-byte variable was accepted")
	}
	accepted := 0
	for i := 0; i < 100; i++ {
		if env(fmt.Sprintf("V%d", i), "1") {
			accepted++
		}
	}
	if accepted != maxEnvVars {
		t.Errorf("%d variables accepted, want %d", accepted, maxEnvVars)
	}
	if !strings.Contains(f.logs.String(), "environment beyond") {
		t.Errorf("refusal not logged:\n%s", f.logs.String())
	}
}
