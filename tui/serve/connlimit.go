package serve

import (
	"errors"
	"fmt"
	"net"
	"slices"
	"sync"
	"sync/atomic"
	"time"

	"github.com/charmbracelet/ssh"
	gossh "golang.org/x/crypto/ssh"
)

// Connections are limited apart from their sessions: a client may hold an
// SSH connection open without any session (`ssh -N`, a multiplexing
// master), and keepalives keep its bytes moving, so neither the session
// cap (MaxConnections) nor the idle watchdog would ever free it.
//
//   - At most connCapFactor x MaxConnections connections are open at once,
//     counted from the TCP accept whether or not they log in or open a
//     session; a connection beyond is closed at once and logged.
//   - Until its key is verified, a connection also counts against its
//     remote address: at most preAuthShare(MaxConnections) connections of
//     one address wait for a login at once, so that a client with no key
//     at all, holding connections open without logging in, cannot fill
//     the cap and lock every user out; one beyond is closed at once and
//     logged.
//   - Once a key is verified, the connection counts against its user's
//     share: at most connCapFactor x MaxPerUser connections per user, so
//     that one user with a valid key cannot fill the cap and lock the
//     others out; a login beyond is refused with a banner and logged.
//   - A connection with no session open for the idle timeout (at most
//     maxSessionless, also when the idle timeout is off) is closed,
//     whatever it sends.
//   - A connection whose client sent no data on any session (keystrokes,
//     uploads, SFTP requests) for the idle timeout is closed: keepalives
//     and window changes are not input. (idleConn in conn.go closes one
//     on which no byte moves at all.)
const (
	connCapFactor  = 2
	maxSessionless = time.Minute
)

// connStateKey keys a connection's *connState in its context.
type connStateKey struct{}

// connState counts the sessions open on one connection.
type connState struct {
	sessions  atomic.Int32
	lastEnd   atomic.Int64 // UnixNano when no session was last open
	lastInput atomic.Int64 // UnixNano of the client's last data on a session
	// Under Server.mu: the users the connection counts against
	// (userConns); host, the remote address it counts against in
	// preAuth until a key is verified (pending); released once its count
	// was given back, after which nothing is counted for it any more.
	users    []string
	host     string
	pending  bool
	released bool
}

// countedConn is an accepted connection counted against the cap; Close
// gives its place back once.
type countedConn struct {
	net.Conn
	closed  atomic.Bool
	once    sync.Once
	release func()
}

func (c *countedConn) Close() error {
	c.closed.Store(true)
	err := c.Conn.Close()
	c.once.Do(c.release)
	return err
}

// sessionlessLimit is how long a connection may stay without a session.
func (s *Server) sessionlessLimit() time.Duration {
	if idle := s.cfg.IdleTimeout; idle > 0 && idle < maxSessionless {
		return idle
	}
	return maxSessionless
}

// admitConn counts c against the connection cap and watches it for want
// of a session; it returns nil (the library then closes c) beyond the cap.
func (s *Server) admitConn(ctx ssh.Context, c net.Conn) net.Conn {
	limit := connCapFactor * s.cfg.MaxConnections
	host, hostLimit := remoteHost(c.RemoteAddr()), preAuthShare(s.cfg.MaxConnections)
	s.mu.Lock()
	if s.openConns >= limit {
		s.mu.Unlock()
		s.log.Warn("connection refused: at the connection cap (connections open, with or without a session)",
			"remote", host, "open", limit, "max_conn", s.cfg.MaxConnections)
		return nil
	}
	if s.preAuth[host] >= hostLimit {
		s.mu.Unlock()
		s.log.Warn("connection refused: at the address's share of connections not yet logged in",
			"remote", host, "waiting", hostLimit, "max_conn", s.cfg.MaxConnections)
		return nil
	}
	s.openConns++
	s.preAuth[host]++
	st := &connState{host: host, pending: true}
	s.mu.Unlock()
	st.lastEnd.Store(time.Now().UnixNano())
	st.lastInput.Store(time.Now().UnixNano())
	ctx.SetValue(connStateKey{}, st)
	cc := &countedConn{Conn: c, release: func() {
		s.mu.Lock()
		s.openConns--
		s.loggedIn(st)
		st.released = true
		for _, u := range st.users {
			if s.userConns[u]--; s.userConns[u] <= 0 {
				delete(s.userConns, u)
			}
		}
		st.users = nil
		s.mu.Unlock()
	}}
	limitFor, idle := s.sessionlessLimit(), s.cfg.IdleTimeout
	var check func()
	check = func() {
		if cc.closed.Load() {
			return
		}
		next := limitFor
		if st.sessions.Load() == 0 {
			since := time.Since(time.Unix(0, st.lastEnd.Load()))
			if since >= limitFor {
				s.log.Info("connection closed: no session", "remote", remoteHost(c.RemoteAddr()), "after", limitFor.String())
				_ = cc.Close()
				return
			}
			next = min(next, limitFor-since)
		}
		if idle > 0 {
			since := time.Since(time.Unix(0, st.lastInput.Load()))
			if since >= idle {
				s.log.Info("connection closed: idle (no input)", "remote", remoteHost(c.RemoteAddr()), "idle", idle.String())
				s.cancelPrograms(ctx)
				_ = cc.Close()
				return
			}
			next = min(next, idle-since)
		}
		time.AfterFunc(next, check)
	}
	first := limitFor
	if idle > 0 {
		first = min(first, idle)
	}
	time.AfterFunc(first, check)
	return cc
}

// preAuthShare is how many connections of one remote address may wait
// for a login at once: half of maxConn, at least 1. With an address's
// users holding at most half of the connection cap between them by
// default (twice a quarter), one address never holds more than the cap's
// half.
func preAuthShare(maxConn int) int { return max(maxConn/2, 1) }

// loggedIn stops counting st against its address's share of connections
// waiting for a login. The caller holds s.mu.
func (s *Server) loggedIn(st *connState) {
	if !st.pending {
		return
	}
	st.pending = false
	if s.preAuth[st.host]--; s.preAuth[st.host] <= 0 {
		delete(s.preAuth, st.host)
	}
}

// sessionOpened counts a session on ctx's connection; the function it
// returns counts its end.
func sessionOpened(ctx ssh.Context) func() {
	st, _ := ctx.Value(connStateKey{}).(*connState)
	if st == nil {
		return func() {}
	}
	st.sessions.Add(1)
	return func() {
		if st.sessions.Add(-1) == 0 {
			st.lastEnd.Store(time.Now().UnixNano())
		}
	}
}

// errUserConnShare refuses a login beyond the user's share of open
// connections; its banner tells the client why.
var errUserConnShare = errors.New("at the user's share of open connections")

// errConnClosed refuses a login on a connection closed meanwhile.
var errConnClosed = errors.New("the connection is closed")

// countUserConn counts the connection of ctx against user once its key is
// verified (the server configuration's VerifiedPublicKeyCallback, which
// runs after the signature check, so knowing a user's public key is not
// enough to use up the user's share). It refuses the login when the user
// already holds connCapFactor x MaxPerUser connections.
func (s *Server) countUserConn(ctx ssh.Context, user string) error {
	st, _ := ctx.Value(connStateKey{}).(*connState)
	if st == nil {
		return nil
	}
	limit := connCapFactor * s.cfg.MaxPerUser
	s.mu.Lock()
	defer s.mu.Unlock()
	if st.released {
		// Closed (by the watchdog, say) while the key was being checked:
		// its count was given back already and must not be taken again.
		return errConnClosed
	}
	if slices.Contains(st.users, user) {
		return nil
	}
	if s.userConns[user] >= limit {
		s.log.Warn("login refused: at the user's share of open connections", "user", user,
			"remote", remoteHost(ctx.RemoteAddr()), "open", s.userConns[user], "max_conn_per_user", s.cfg.MaxPerUser)
		return &gossh.BannerError{Err: errUserConnShare, Message: fmt.Sprintf(
			"junco: %s has %d connections open, the most one user may hold on this server (twice --max-conn-per-user); close one and try again\r\n", user, limit)}
	}
	s.userConns[user]++
	st.users = append(st.users, user)
	s.loggedIn(st)
	return nil
}

// serverConfig is the base SSH configuration of a connection: the
// per-user connection count runs after each verified key.
func (s *Server) serverConfig(ctx ssh.Context) *gossh.ServerConfig {
	return &gossh.ServerConfig{
		VerifiedPublicKeyCallback: func(conn gossh.ConnMetadata, _ gossh.PublicKey, perms *gossh.Permissions, _ string) (*gossh.Permissions, error) {
			return perms, s.countUserConn(ctx, conn.User())
		},
	}
}
