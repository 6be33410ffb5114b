package serve

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"sync"
	"sync/atomic"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/ssh"
	gossh "golang.org/x/crypto/ssh"
)

// Terminal size limits: a client may announce any size, the workbench is
// drawn at most this large (the client shows the top-left part). The
// workbench holds about 0.7 kB per cell while it draws (measured: a
// connection at 1000x500 raised the server's resident memory by 350 MB,
// at 500x250 by 80 MB), so the limits keep one connection under 100 MB
// while leaving more than any real screen shows.
const (
	MaxColumns = 500
	MaxRows    = 250
)

// clampWindow bounds a terminal size to MaxColumns x MaxRows.
func clampWindow(w, h int) (int, int) {
	return min(max(w, 0), MaxColumns), min(max(h, 0), MaxRows)
}

// forwardResizes sends the client's size and each later resize to p,
// clamped. It drains winCh at once whatever p is doing, so the SSH request
// loop of the connection never waits on the program (a full request loop
// stops the whole connection, flow-control messages included); while p is
// busy only the newest size is kept. It returns when winCh is closed (the
// channel ended) or, for the sending side, when ctx ends.
func forwardResizes(ctx context.Context, winCh <-chan ssh.Window, p *tea.Program, first ssh.Window) {
	var mu sync.Mutex
	latest := first
	kick := make(chan struct{}, 1)
	kick <- struct{}{}
	go func() {
		for win := range winCh {
			if win.Width <= 0 || win.Height <= 0 {
				continue // {0,0} arrives at disconnect
			}
			mu.Lock()
			latest = win
			mu.Unlock()
			select {
			case kick <- struct{}{}:
			default:
			}
		}
	}()
	go func() {
		var sent ssh.Window
		for {
			select {
			case <-ctx.Done():
				return
			case <-kick:
			}
			mu.Lock()
			win := latest
			mu.Unlock()
			if win == sent || win.Width <= 0 || win.Height <= 0 {
				continue
			}
			sent = win
			w, h := clampWindow(win.Width, win.Height)
			p.Send(tea.WindowSizeMsg{Width: w, Height: h})
		}
	}()
}

// errWriteTimeout is returned by an outWriter whose write did not finish
// in time.
var errWriteTimeout = errors.New("write to the client timed out")

// outWriter is a program's output: writes stop once ctx ends, and a write
// the client does not take within timeout fails, calls stuck and breaks the
// writer for good (the program then ends). The write itself runs apart, so
// a channel that never drains cannot hold the program.
type outWriter struct {
	w       io.Writer
	ctx     context.Context
	timeout time.Duration
	stuck   func()

	mu     sync.Mutex
	broken error
}

type writeResult struct {
	n   int
	err error
}

func (o *outWriter) Write(p []byte) (int, error) {
	o.mu.Lock()
	defer o.mu.Unlock()
	if o.broken != nil {
		return 0, o.broken
	}
	if err := o.ctx.Err(); err != nil {
		o.broken = err
		return 0, err
	}
	buf := append([]byte(nil), p...) // the write may outlive this call
	done := make(chan writeResult, 1)
	go func() {
		n, err := o.w.Write(buf)
		done <- writeResult{n, err}
	}()
	t := time.NewTimer(o.timeout)
	defer t.Stop()
	select {
	case r := <-done:
		return r.n, r.err
	case <-t.C:
		o.broken = errWriteTimeout
		o.stuck()
		return 0, o.broken
	case <-o.ctx.Done():
		o.broken = o.ctx.Err()
		return 0, o.broken
	}
}

// idleConn closes its connection when no byte has moved either way for
// idle. The SSH library's own idle timeout works through socket deadlines,
// which never fire while nothing reads or writes the socket: a connection
// stuck on its own flow control kept its slot for good that way.
type idleConn struct {
	net.Conn
	idle   time.Duration
	onIdle func()
	last   atomic.Int64 // UnixNano of the last byte moved
	closed atomic.Bool
}

func watchIdle(c net.Conn, idle time.Duration, onIdle func()) net.Conn {
	ic := &idleConn{Conn: c, idle: idle, onIdle: onIdle}
	ic.last.Store(time.Now().UnixNano())
	time.AfterFunc(idle, ic.check)
	return ic
}

func (c *idleConn) check() {
	if c.closed.Load() {
		return
	}
	since := time.Since(time.Unix(0, c.last.Load()))
	if since < c.idle {
		time.AfterFunc(c.idle-since, c.check)
		return
	}
	_ = c.Close()
	c.onIdle()
}

func (c *idleConn) Read(b []byte) (int, error) {
	n, err := c.Conn.Read(b)
	if n > 0 {
		c.last.Store(time.Now().UnixNano())
	}
	return n, err
}

func (c *idleConn) Write(b []byte) (int, error) {
	n, err := c.Conn.Write(b)
	if n > 0 {
		c.last.Store(time.Now().UnixNano())
	}
	return n, err
}

func (c *idleConn) Close() error {
	c.closed.Store(true)
	return c.Conn.Close()
}

// refusedSessionRequest names a session request the server refuses, for
// the log (ok false for any other): the SSH library would accept agent
// forwarding.
func refusedSessionRequest(kind string) (what string, ok bool) {
	switch kind {
	case "auth-agent-req@openssh.com":
		return "agent forwarding", true
	case "x11-req":
		return "X11 forwarding", true
	}
	return "", false
}

// sessionChannel is the handler of "session" channels: the library's own,
// behind a filter that refuses the forwarding requests above.
func (s *Server) sessionChannel(srv *ssh.Server, conn *gossh.ServerConn, nc gossh.NewChannel, ctx ssh.Context) {
	user := conn.User()
	if !s.channelOpened(user) {
		s.log.Warn("session channel refused: at the user's share of open session channels", "user", user,
			"remote", remoteHost(conn.RemoteAddr()), "open", connCapFactor*s.cfg.MaxPerUser, "max_conn_per_user", s.cfg.MaxPerUser)
		_ = nc.Reject(gossh.ResourceShortage, fmt.Sprintf("junco: %s has %d session channels open, the most one user may hold (twice --max-conn-per-user); close one and try again",
			user, connCapFactor*s.cfg.MaxPerUser))
		return
	}
	defer s.channelClosed(user)
	defer sessionOpened(ctx)()
	st, _ := ctx.Value(connStateKey{}).(*connState)
	ssh.DefaultSessionHandler(srv, conn, filteredChannel{NewChannel: nc, input: st, refuse: func(what string) {
		s.log.Warn("request refused: "+what, "user", conn.User(), "remote", remoteHost(conn.RemoteAddr()))
	}}, ctx)
}

// channelOpened counts a session channel of user from its opening to its
// close, whatever requests it carries (none at all included), and
// reports false beyond connCapFactor x MaxPerUser open at once: a channel
// costs the server about 9 kB before any request, and the session cap
// (limitMiddleware) counts only channels that ask for a command, a
// terminal or a subsystem.
func (s *Server) channelOpened(user string) bool {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.userChans[user] >= connCapFactor*s.cfg.MaxPerUser {
		return false
	}
	s.userChans[user]++
	return true
}

// channelClosed gives back the count of a session channel of user.
func (s *Server) channelClosed(user string) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.userChans[user]--; s.userChans[user] <= 0 {
		delete(s.userChans, user)
	}
}

// A session keeps at most maxEnvVars environment variables of at most
// maxEnvBytes (name and value) each; further "env" requests are refused
// (as sshd refuses those AcceptEnv does not name). The SSH library keeps
// every one it is sent: 5000 of 30 kB on one channel raised the server's
// resident memory by 80 MB, without bound. The workbench reads a few
// (TERM, COLORTERM, NO_COLOR, LANG and the like).
const (
	maxEnvVars  = 64
	maxEnvBytes = 1024
)

type filteredChannel struct {
	gossh.NewChannel
	refuse func(what string)
	input  *connState // records the client's input for the idle check
}

func (f filteredChannel) Accept() (gossh.Channel, <-chan *gossh.Request, error) {
	ch, reqs, err := f.NewChannel.Accept()
	if err != nil {
		return ch, reqs, err
	}
	out := make(chan *gossh.Request)
	go func() {
		defer close(out)
		envs, envRefused := 0, false
		for r := range reqs {
			if what, ok := refusedSessionRequest(r.Type); ok {
				f.refuse(what)
				_ = r.Reply(false, nil)
				continue
			}
			if r.Type == "env" {
				// The SSH library keeps every variable a client sends.
				if envs >= maxEnvVars || len(r.Payload) > maxEnvBytes {
					if !envRefused {
						envRefused = true
						f.refuse(fmt.Sprintf("environment beyond %d variables of at most %d bytes", maxEnvVars, maxEnvBytes))
					}
					_ = r.Reply(false, nil)
					continue
				}
				envs++
			}
			out <- r
		}
	}()
	if f.input != nil {
		ch = inputChannel{Channel: ch, st: f.input}
	}
	return ch, out, nil
}

// inputChannel records when the client last sent data on a session (a
// keystroke, an upload, an SFTP request): the idle timeout counts from
// there, not from keepalives or the server's own output.
type inputChannel struct {
	gossh.Channel
	st *connState
}

func (c inputChannel) Read(p []byte) (int, error) {
	n, err := c.Channel.Read(p)
	if n > 0 {
		c.st.lastInput.Store(time.Now().UnixNano())
	}
	return n, err
}

// closeConnection closes the SSH connection of ctx.
func closeConnection(ctx ssh.Context) {
	if c, ok := ctx.Value(ssh.ContextKeyConn).(*gossh.ServerConn); ok {
		_ = c.Close()
	}
}
