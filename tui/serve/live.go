package serve

import (
	"context"
	"errors"
	"net"
	"net/netip"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/ssh"
	gossh "golang.org/x/crypto/ssh"
)

// liveConn is an authenticated SSH connection that has opened a session,
// kept so that a change of the authorized-keys file can end it.
type liveConn struct {
	user    string
	key     gossh.PublicKey
	addr    netip.Addr
	terms   string // authorizedKey.terms of the line that admitted it
	conn    *gossh.ServerConn
	revoked bool
}

// program is a running workbench and the connection it belongs to.
type program struct {
	conn   ssh.Context
	cancel context.CancelFunc
}

// addrOf returns the IP address of a remote address (invalid if none).
func addrOf(a net.Addr) netip.Addr {
	if t, ok := a.(*net.TCPAddr); ok {
		return t.AddrPort().Addr().Unmap()
	}
	if a == nil {
		return netip.Addr{}
	}
	ap, err := netip.ParseAddrPort(a.String())
	if err != nil {
		return netip.Addr{}
	}
	return ap.Addr().Unmap()
}

// authorise checks the key a connection authenticated with against the
// current keys file (listed, naming the login, from= and expiry-time=).
func (s *Server) authorise(ctx ssh.Context, key ssh.PublicKey) (authorizedKey, error) {
	if key == nil {
		return authorizedKey{}, errors.New("public-key authentication is required")
	}
	return s.keys.authorise(key, ctx.User(), addrOf(ctx.RemoteAddr()), time.Now())
}

// sessionRequest runs before every shell, exec and subsystem request, the
// subsystems included (they bypass the middlewares): the key must still be
// authorised, a key with a forced command gets no subsystem, and the
// connection is tracked for key-file reloads.
func (s *Server) sessionRequest(sess ssh.Session, kind string) bool {
	ctx := sess.Context()
	a, err := s.authorise(ctx, sess.PublicKey())
	if err != nil {
		s.log.Warn("session refused: "+err.Error(), "user", sess.User(), "remote", remoteHost(sess.RemoteAddr()), "request", kind)
		return false
	}
	if kind == "subsystem" && a.opts.command != nil {
		s.log.Warn("subsystem refused: the key has a forced command", "user", a.user, "line", a.line, "subsystem", sess.Subsystem())
		return false
	}
	s.mu.Lock()
	if _, ok := s.conns[ctx]; !ok {
		conn, _ := ctx.Value(ssh.ContextKeyConn).(*gossh.ServerConn)
		s.conns[ctx] = &liveConn{user: a.user, key: sess.PublicKey(), addr: addrOf(ctx.RemoteAddr()), terms: a.terms(), conn: conn}
		// Done is taken here, in the request loop: a handler may replace
		// the context's value chain (SetValue) while it runs.
		done := ctx.Done()
		go func() {
			<-done
			s.mu.Lock()
			delete(s.conns, ctx)
			s.mu.Unlock()
		}()
	}
	s.mu.Unlock()
	return true
}

// ptyRequest refuses a terminal to a key whose line says no-pty (or
// restrict without pty).
func (s *Server) ptyRequest(ctx ssh.Context, _ ssh.Pty) bool {
	key, _ := ctx.Value(ssh.ContextKeyPublicKey).(ssh.PublicKey)
	a, err := s.authorise(ctx, key)
	switch {
	case err != nil:
		s.log.Warn("terminal refused: "+err.Error(), "user", ctx.User())
		return false
	case a.opts.noPTY:
		s.log.Info("terminal refused: no-pty on the key's line", "user", a.user, "line", a.line)
		return false
	}
	return true
}

// revalidate checks every tracked connection against the keys file just
// re-read and ends those whose key no longer admits them, or whose line's
// terms (no-pty, command=) changed: their programs first get ShutdownMsg
// to write their recovery drafts, then the connection is closed.
func (s *Server) revalidate() {
	s.revalMu.Lock()
	defer s.revalMu.Unlock()
	now := time.Now()
	s.mu.Lock()
	gone := map[ssh.Context]bool{}
	var conns []*gossh.ServerConn
	for ctx, c := range s.conns {
		reason := ""
		a, err := s.keys.authorise(c.key, c.user, c.addr, now)
		switch {
		case err != nil:
			reason = err.Error()
		case a.terms() != c.terms:
			reason = "the options of its key line changed"
		default:
			continue
		}
		c.revoked = true
		gone[ctx] = true
		conns = append(conns, c.conn)
		s.log.Warn("closing connection: key no longer authorised as it was", "user", c.user, "remote", c.addr.String(), "key", gossh.FingerprintSHA256(c.key), "reason", reason)
	}
	s.mu.Unlock()
	if len(gone) == 0 {
		return
	}
	s.stopPrograms(context.Background(), func(c ssh.Context) bool { return gone[c] })
	for _, c := range conns {
		if c != nil {
			_ = c.Close()
		}
	}
}

// revoked reports whether ctx's connection is being closed by revalidate.
func (s *Server) revoked(ctx ssh.Context) bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	c, ok := s.conns[ctx]
	return ok && c.revoked
}

// stopPrograms asks the programs whose connection matches to write their
// recovery drafts and stop (ShutdownMsg, else Quit), waits for them up to
// the grace period or ctx, then ends those left.
func (s *Server) stopPrograms(ctx context.Context, match func(ssh.Context) bool) {
	pick := func() map[*tea.Program]program {
		s.mu.Lock()
		defer s.mu.Unlock()
		out := map[*tea.Program]program{}
		for p, pr := range s.programs {
			if match(pr.conn) {
				out[p] = pr
			}
		}
		return out
	}
	progs := pick()
	for p := range progs {
		if s.cfg.ShutdownMsg != nil {
			go p.Send(s.cfg.ShutdownMsg)
		} else {
			go p.Quit()
		}
	}
	deadline := time.Now().Add(s.cfg.Grace)
	for len(pick()) > 0 && time.Now().Before(deadline) {
		select {
		case <-ctx.Done():
			deadline = time.Now()
		case <-time.After(20 * time.Millisecond):
		}
	}
	for p, pr := range pick() {
		pr.cancel()
		p.Kill()
	}
}

// cancelPrograms ends the programs of one connection at once.
func (s *Server) cancelPrograms(conn ssh.Context) {
	s.mu.Lock()
	defer s.mu.Unlock()
	for _, pr := range s.programs {
		if pr.conn == conn {
			pr.cancel()
		}
	}
}

// pollKeys re-reads the keys file every interval until stop is closed, so
// that a removed key ends its connections without waiting for a login.
func (s *Server) pollKeys(interval time.Duration, stop <-chan struct{}) {
	t := time.NewTicker(interval)
	defer t.Stop()
	for {
		select {
		case <-stop:
			return
		case <-t.C:
			_ = s.keys.reload(false)
		}
	}
}
