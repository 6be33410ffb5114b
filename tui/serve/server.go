// Package serve puts the junco workbench on an SSH server for a lab group:
// public-key logins only, each key's comment names its user, one program
// per connection with its own renderer, idle timeout, a connection cap,
// panic isolation and a graceful shutdown. What a user sees and may run is
// supplied by an App; this package handles the connection.
package serve

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"runtime/debug"
	"strings"
	"sync"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/ssh"
	"github.com/charmbracelet/wish"
	"github.com/muesli/termenv"
	gossh "golang.org/x/crypto/ssh"

	"junco/sessions"
)

// Conn describes one interactive connection to the App.
type Conn struct {
	User     string             // the authenticated user (the key's comment)
	Renderer *lipgloss.Renderer // renderer for this client's terminal; build every style from it
	Width    int                // PTY size at connect
	Height   int
	Term     string   // the client's TERM
	Environ  []string // environment the client sent
	// Args is the interactive command the client asked for (see
	// InteractiveCommand), empty for the plain workbench.
	Args []string
}

// App is what the server serves.
type App interface {
	// Model returns the Bubble Tea model for one interactive connection.
	Model(ctx context.Context, c Conn) (tea.Model, error)
	// Command runs one non-interactive command (already checked against
	// the allow-list) for user and returns its exit status.
	Command(ctx context.Context, user string, args []string, stdout, stderr io.Writer) int
}

// Config configures a Server.
type Config struct {
	// Listen is the TCP address; "" means 127.0.0.1:2222 (loopback only:
	// binding beyond it is an explicit choice).
	Listen string
	// HostKeyPath is the ed25519 host key file, created (0600) if missing.
	HostKeyPath string
	// AuthorizedKeysPath is the OpenSSH authorized-keys file whose
	// comments name the users.
	AuthorizedKeysPath string
	// IdleTimeout closes a connection with no traffic for this long (0 = none),
	// a connection stuck on its own flow control included.
	IdleTimeout time.Duration
	// WriteTimeout closes a connection whose client does not take the
	// workbench's output for this long (0 = 30 s).
	WriteTimeout time.Duration
	// KeysPoll is how often the authorized-keys file is checked for changes
	// besides each login and Reload (0 = 5 s, negative = never).
	KeysPoll time.Duration
	// MaxConnections caps concurrent sessions (0 = 32); connections open
	// at all, with or without a session, are capped at twice as many, and
	// one without a session is closed after the idle timeout (at most a
	// minute; see connlimit.go).
	MaxConnections int
	// MaxPerUser caps the sessions one user holds at once, so that one
	// user cannot take every MaxConnections slot (0 = a quarter of
	// MaxConnections, at least 2, at most MaxConnections).
	MaxPerUser int
	// ShutdownMsg, if set, is sent to every running program at shutdown
	// so that it can write its recovery draft before it is stopped.
	ShutdownMsg tea.Msg
	// Grace bounds how long Shutdown waits for programs (0 = 5 s).
	Grace time.Duration
	// Logger receives connection, authentication and panic records.
	Logger *slog.Logger
	App    App
	// Inbox opens a user's inbox for file transfer (SFTP and scp, see
	// inbox_sftp.go and inbox_scp.go); nil serves no file transfer.
	Inbox func(user string) (*sessions.Inbox, error)
}

// DefaultListen is the default listen address.
const DefaultListen = "127.0.0.1:2222"

// Server is a running (or ready) SSH front.
type Server struct {
	cfg         Config
	log         *slog.Logger
	keys        *keyring
	ssh         *ssh.Server
	fingerprint string
	createdKey  bool

	mu     sync.Mutex
	active int
	// perUser counts the sessions open by each user (limitMiddleware).
	perUser map[string]int
	// userConns counts the connections each user has open, from the
	// verified key on (connlimit.go).
	userConns map[string]int
	// openConns counts the connections open (connlimit.go).
	openConns int
	// userChans counts the session channels each user has open, with
	// or without a request (conn.go).
	userChans map[string]int
	// preAuth counts, by remote address, the connections not yet logged
	// in (connlimit.go).
	preAuth  map[string]int
	programs map[*tea.Program]program
	conns    map[ssh.Context]*liveConn
	failures map[string]int // by remote host
	closing  bool

	revalMu  sync.Mutex // one revalidation at a time
	stop     chan struct{}
	stopOnce sync.Once
}

// New builds a server: loads or creates the host key, reads the authorized
// keys and sets up the middlewares. It does not listen yet.
func New(cfg Config) (*Server, error) {
	if cfg.App == nil {
		return nil, errors.New("serve: no App")
	}
	if cfg.HostKeyPath == "" || cfg.AuthorizedKeysPath == "" {
		return nil, errors.New("serve: host key and authorized keys paths are required")
	}
	if cfg.Listen == "" {
		cfg.Listen = DefaultListen
	}
	if cfg.MaxConnections <= 0 {
		cfg.MaxConnections = 32
	}
	cfg.MaxPerUser = perUserShare(cfg.MaxPerUser, cfg.MaxConnections)
	if cfg.Grace <= 0 {
		cfg.Grace = 5 * time.Second
	}
	if cfg.WriteTimeout <= 0 {
		cfg.WriteTimeout = 30 * time.Second
	}
	if cfg.KeysPoll == 0 {
		cfg.KeysPoll = 5 * time.Second
	}
	lg := cfg.Logger
	if lg == nil {
		lg = slog.New(slog.NewTextHandler(io.Discard, nil))
	}
	s := &Server{cfg: cfg, log: lg, programs: map[*tea.Program]program{}, conns: map[ssh.Context]*liveConn{},
		perUser: map[string]int{}, userConns: map[string]int{}, preAuth: map[string]int{}, userChans: map[string]int{}, failures: map[string]int{}, stop: make(chan struct{})}
	signer, created, err := loadOrCreateHostKey(cfg.HostKeyPath)
	if err != nil {
		return nil, err
	}
	s.createdKey = created
	s.fingerprint = gossh.FingerprintSHA256(signer.PublicKey())
	s.keys, err = newKeyring(cfg.AuthorizedKeysPath, func(f string, a ...any) { lg.Info(fmt.Sprintf(f, a...)) })
	if err != nil {
		return nil, err
	}
	s.keys.changed = func() { go s.revalidate() }
	srv, err := wish.NewServer(
		// The host key goes in first: without one, wish would write a new
		// key into the working directory.
		func(srv *ssh.Server) error { srv.AddHostKey(signer); return nil },
		wish.WithAddress(cfg.Listen),
		wish.WithVersion("junco"),
		wish.WithPublicKeyAuth(s.publicKeyHandler),
		wish.WithIdleTimeout(cfg.IdleTimeout),
		s.connectionPolicy,
		// Middlewares: the last listed runs first.
		wish.WithMiddleware(
			s.appMiddleware,     // 4. the workbench or an allowed command
			s.scpMiddleware,     // 3b. legacy scp (-O) into the user's inbox
			s.limitMiddleware,   // 3. connection cap
			s.authMiddleware,    // 2. the session's key must still map to its login name
			s.recoverMiddleware, // 1. a panic ends this connection only
		),
	)
	if err != nil {
		return nil, err
	}
	// SFTP (and so OpenSSH 9 scp) into the user's inbox, behind the same
	// checks as a session.
	srv.SubsystemHandlers = map[string]ssh.SubsystemHandler{
		"sftp": ssh.SubsystemHandler(s.recoverMiddleware(s.authMiddleware(s.limitMiddleware(s.sftpSubsystem)))),
	}
	if idle := cfg.IdleTimeout; idle <= 0 {
		srv.IdleTimeout = 0
	}
	s.ssh = srv
	return s, nil
}

// Fingerprint returns the SHA256 fingerprint of the host key, to print at
// start so that users can check it on first connection.
func (s *Server) Fingerprint() string { return s.fingerprint }

// CreatedHostKey reports whether New generated a new host key.
func (s *Server) CreatedHostKey() bool { return s.createdKey }

// Users returns the users currently authorised by the keys file.
func (s *Server) Users() []string { return s.keys.users() }

// Reload re-reads the authorized-keys file now (for SIGHUP).
func (s *Server) Reload() error { return s.keys.reload(true) }

// connectionPolicy sets the callbacks every connection passes through:
// key options at terminal and session requests, forwarding requests
// refused, and the idle watchdog.
func (s *Server) connectionPolicy(srv *ssh.Server) error {
	srv.ServerConfigCallback = s.serverConfig
	srv.PtyCallback = s.ptyRequest
	srv.SessionRequestCallback = s.sessionRequest
	srv.ChannelHandlers = map[string]ssh.ChannelHandler{"session": s.sessionChannel}
	srv.ConnCallback = func(ctx ssh.Context, c net.Conn) net.Conn {
		counted := s.admitConn(ctx, c) // the connection cap (connlimit.go)
		if counted == nil {
			return nil
		}
		idle := s.cfg.IdleTimeout
		if idle <= 0 {
			return counted
		}
		return watchIdle(counted, idle, func() {
			s.log.Info("connection closed: idle", "remote", remoteHost(c.RemoteAddr()), "idle", idle.String())
			s.cancelPrograms(ctx)
		})
	}
	return nil
}

// Serve accepts connections on l until Shutdown or Close.
func (s *Server) Serve(l net.Listener) error {
	if s.cfg.KeysPoll > 0 {
		go s.pollKeys(s.cfg.KeysPoll, s.stop)
	}
	err := s.ssh.Serve(l)
	if errors.Is(err, ssh.ErrServerClosed) {
		return nil
	}
	return err
}

// ListenAndServe listens on the configured address and serves.
func (s *Server) ListenAndServe() error {
	l, err := net.Listen("tcp", s.cfg.Listen)
	if err != nil {
		return err
	}
	return s.Serve(l)
}

// Shutdown asks every program to write its recovery draft and stop, waits
// up to the grace period, then closes the listener and connections.
func (s *Server) Shutdown(ctx context.Context) error {
	s.mu.Lock()
	s.closing = true
	s.mu.Unlock()
	s.stopOnce.Do(func() { close(s.stop) })
	s.stopPrograms(ctx, func(ssh.Context) bool { return true })
	sctx, cancel := context.WithTimeout(ctx, time.Second)
	defer cancel()
	if err := s.ssh.Shutdown(sctx); err != nil && !errors.Is(err, ssh.ErrServerClosed) {
		return s.ssh.Close()
	}
	return nil
}

// Close stops the server at once.
func (s *Server) Close() error {
	s.stopOnce.Do(func() { close(s.stop) })
	return s.ssh.Close()
}

// publicKeyHandler admits a key only when the authorized-keys file lists
// it and the login name equals the user its comment names. Failures are
// logged with the key's fingerprint and slowed down per remote host.
func (s *Server) publicKeyHandler(ctx ssh.Context, key ssh.PublicKey) bool {
	host := remoteHost(ctx.RemoteAddr())
	_ = s.keys.reload(false)
	if _, err := s.authorise(ctx, key); err != nil {
		s.fail(host, strings.TrimPrefix(err.Error(), errNotAuthorised.Error()+": "), "login", ctx.User(), "key", gossh.FingerprintSHA256(key))
		return false
	}
	s.mu.Lock()
	delete(s.failures, host)
	s.mu.Unlock()
	return true
}

// fail logs a refused attempt and sleeps: 250 ms doubling per failure from
// the same host, at most 4 s.
func (s *Server) fail(host, why string, attrs ...any) {
	s.mu.Lock()
	if len(s.failures) > 10000 {
		s.failures = map[string]int{}
	}
	s.failures[host]++
	n := s.failures[host]
	s.mu.Unlock()
	s.log.Warn("login refused: "+why, append([]any{"remote", host, "failures", n}, attrs...)...)
	d := 250 * time.Millisecond << min(n-1, 4)
	time.Sleep(d)
}

func remoteHost(a net.Addr) string {
	if a == nil {
		return ""
	}
	h, _, err := net.SplitHostPort(a.String())
	if err != nil {
		return a.String()
	}
	return h
}

func (s *Server) recoverMiddleware(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		defer func() {
			if r := recover(); r != nil {
				s.log.Error("connection ended by a panic", "user", sess.User(), "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
				fmt.Fprintln(sess.Stderr(), "junco: internal error; the connection is closed (the server keeps running)")
				_ = sess.Exit(1)
			}
		}()
		next(sess)
	}
}

func (s *Server) authMiddleware(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		key := sess.PublicKey()
		if key == nil {
			wish.Fatalln(sess, "junco: public-key authentication is required")
			return
		}
		a, err := s.authorise(sess.Context(), key)
		if err != nil {
			s.log.Warn("session refused: "+err.Error(), "login", sess.User(), "key", gossh.FingerprintSHA256(key))
			wish.Fatalln(sess, "junco: this key is not authorised for "+sess.User())
			return
		}
		if args := sess.Command(); a.opts.command != nil && len(args) > 0 && args[0] == "scp" {
			// The scp middleware would answer before the forced command.
			s.log.Warn("scp refused: the key has a forced command", "user", a.user, "line", a.line)
			wish.Fatalln(sess, "junco: this key runs one fixed command (command= in the authorized-keys file); no file transfer")
			return
		}
		next(sess)
	}
}

func (s *Server) limitMiddleware(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		user := sess.User()
		s.mu.Lock()
		closing, full, mine := s.closing, s.active >= s.cfg.MaxConnections, s.perUser[user] >= s.cfg.MaxPerUser
		if closing || full || mine {
			s.mu.Unlock()
			switch {
			case closing:
				wish.Fatalln(sess, "junco: the server is shutting down")
			case full:
				s.log.Warn("connection refused: at the connection cap", "user", user, "remote", remoteHost(sess.RemoteAddr()), "max_conn", s.cfg.MaxConnections)
				wish.Fatalln(sess, fmt.Sprintf("junco: the server is at its limit of %d connections; try again later", s.cfg.MaxConnections))
			default:
				s.log.Warn("connection refused: at the user's share of the connection cap", "user", user, "remote", remoteHost(sess.RemoteAddr()), "max_conn_per_user", s.cfg.MaxPerUser)
				wish.Fatalln(sess, fmt.Sprintf("junco: you have %d sessions open, the most one user may hold on this server (--max-conn-per-user); close one and try again", s.cfg.MaxPerUser))
			}
			return
		}
		s.active++
		s.perUser[user]++
		s.mu.Unlock()
		defer func() {
			s.mu.Lock()
			s.active--
			if s.perUser[user]--; s.perUser[user] <= 0 {
				delete(s.perUser, user)
			}
			s.mu.Unlock()
		}()
		s.log.Info("connection", "user", user, "remote", remoteHost(sess.RemoteAddr()), "command", sess.RawCommand())
		next(sess)
	}
}

// perUserShare is the number of sessions one user may hold: n when it is
// between 1 and maxConn, else a quarter of maxConn, at least 2 and at most
// maxConn.
func perUserShare(n, maxConn int) int {
	if n >= 1 && n <= maxConn {
		return n
	}
	return min(max(maxConn/4, 2), maxConn)
}

// AllowedCommand reports whether args is one of the read-only session
// commands served without the UI: `sessions list`, `sessions show NAME`,
// `sessions export NAME ...`.
func AllowedCommand(args []string) bool {
	if len(args) < 2 || args[0] != "sessions" {
		return false
	}
	switch args[1] {
	case "list":
		return true
	case "show", "export":
		return len(args) >= 3
	}
	return false
}

// InteractiveCommand reports whether args asks for the workbench on a
// given session: `open NAME` (one's own) or `review OWNER/NAME` (a session
// shared with one, read-only). These need a PTY.
func InteractiveCommand(args []string) bool {
	return len(args) == 2 && (args[0] == "open" || args[0] == "review")
}

const commandHelp = "junco: over SSH you can open the workbench (ssh -t; `ssh -t ... open NAME`, `ssh -t ... review OWNER/NAME`) or run `sessions list`, `sessions show NAME` or `sessions export NAME --format md`; there is no shell"

func (s *Server) appMiddleware(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		defer next(sess)
		a, err := s.authorise(sess.Context(), sess.PublicKey())
		if err != nil {
			wish.Fatalln(sess, "junco: this key is not authorised for "+sess.User())
			return
		}
		args := sess.Command()
		if a.opts.command != nil {
			// A forced command (command= on the key's line) replaces what
			// the client asked for, as in sshd.
			args = a.opts.command
		}
		if (len(args) > 0 && !InteractiveCommand(args)) || sess.Subsystem() != "" {
			if !AllowedCommand(args) {
				fmt.Fprintln(sess.Stderr(), commandHelp)
				_ = sess.Exit(1)
				return
			}
			code := s.cfg.App.Command(sess.Context(), sess.User(), args, sess, sess.Stderr())
			_ = sess.Exit(code)
			return
		}
		pty, winCh, ok := sess.Pty()
		if !ok && a.opts.noPTY {
			fmt.Fprintln(sess, "junco: this key is for commands only (no-pty in the authorized-keys file): run e.g. `sessions list`")
			_ = sess.Exit(1)
			return
		}
		if !ok {
			fmt.Fprintln(sess, "junco: the workbench needs a terminal: connect with `ssh -t`, or run `sessions list` as a command")
			_ = sess.Exit(1)
			return
		}
		code := s.runProgram(sess, pty, winCh, args)
		_ = sess.Exit(code)
	}
}

// runProgram runs one program for the connection with its own renderer and
// the PTY's size, forwarding resizes, until it quits or the client leaves.
func (s *Server) runProgram(sess ssh.Session, pty ssh.Pty, winCh <-chan ssh.Window, args []string) int {
	env := sessionEnv{environ: append(sess.Environ(), "TERM="+pty.Term)}
	r := lipgloss.NewRenderer(sess, termenv.WithUnsafe(), termenv.WithEnvironment(env), termenv.WithColorCache(true))
	r.SetHasDarkBackground(true)
	ctx, cancel := context.WithCancel(sess.Context())
	defer cancel()
	w, h := clampWindow(pty.Window.Width, pty.Window.Height)
	model, err := s.cfg.App.Model(ctx, Conn{User: sess.User(), Renderer: r, Width: w, Height: h, Term: pty.Term, Environ: sess.Environ(), Args: args})
	if err != nil {
		fmt.Fprintf(sess.Stderr(), "junco: %v\n", err)
		return 1
	}
	out := &outWriter{w: sess, ctx: ctx, timeout: s.cfg.WriteTimeout, stuck: func() {
		s.log.Warn("connection closed: the client took no output", "user", sess.User(), "remote", remoteHost(sess.RemoteAddr()), "write_timeout", s.cfg.WriteTimeout.String())
		cancel()
		closeConnection(sess.Context())
	}}
	guarded := &guard{inner: model, user: sess.User(), log: s.log, ctx: ctx}
	p := tea.NewProgram(guarded, tea.WithInput(sess), tea.WithOutput(out), tea.WithoutSignalHandler(),
		tea.WithContext(ctx), tea.WithAltScreen())
	s.mu.Lock()
	s.programs[p] = program{conn: sess.Context(), cancel: cancel}
	s.mu.Unlock()
	defer func() {
		s.mu.Lock()
		delete(s.programs, p)
		s.mu.Unlock()
	}()
	forwardResizes(ctx, winCh, p, pty.Window)
	_, err = p.Run()
	p.Kill()
	if s.revoked(sess.Context()) {
		fmt.Fprintln(sess.Stderr(), "\r\njunco: this key is no longer authorised on the server; the connection is closed")
	}
	switch {
	case guarded.panicked:
		return 1
	case err != nil && !errors.Is(err, tea.ErrProgramKilled) && !errors.Is(err, context.Canceled):
		s.log.Error("program ended with an error", "user", sess.User(), "error", err)
		return 1
	}
	return 0
}

// sessionEnv answers termenv's environment questions from the client's
// environment and PTY, never from the server's own.
type sessionEnv struct{ environ []string }

func (e sessionEnv) Environ() []string { return e.environ }
func (e sessionEnv) Getenv(k string) string {
	for i := len(e.environ) - 1; i >= 0; i-- {
		if v, ok := strings.CutPrefix(e.environ[i], k+"="); ok {
			return v
		}
	}
	return ""
}

// guard wraps a connection's model: a panic in Init, Update, View or a
// command it returns is logged with its stack and ends that program only.
type guard struct {
	inner    tea.Model
	user     string
	log      *slog.Logger
	ctx      context.Context // the connection's: once it ends, nothing is drawn
	panicked bool
}

func (g *guard) recovered(r any) tea.Cmd {
	g.panicked = true
	g.log.Error("program panic: connection closed", "user", g.user, "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
	return tea.Quit
}

func (g *guard) wrap(c tea.Cmd) tea.Cmd {
	if c == nil {
		return nil
	}
	return func() (msg tea.Msg) {
		defer func() {
			if r := recover(); r != nil {
				g.log.Error("command panic: connection closed", "user", g.user, "panic", fmt.Sprint(r), "stack", string(debug.Stack()))
				msg = panicMsg{}
			}
		}()
		return c()
	}
}

type panicMsg struct{}

func (g *guard) Init() (cmd tea.Cmd) {
	defer func() {
		if r := recover(); r != nil {
			cmd = g.recovered(r)
		}
	}()
	return g.wrap(g.inner.Init())
}

func (g *guard) Update(msg tea.Msg) (m tea.Model, cmd tea.Cmd) {
	if _, ok := msg.(panicMsg); ok {
		g.panicked = true
		return g, tea.Quit
	}
	if g.panicked || g.ctx.Err() != nil {
		return g, tea.Quit
	}
	defer func() {
		if r := recover(); r != nil {
			m, cmd = g, g.recovered(r)
		}
	}()
	next, c := g.inner.Update(msg)
	g.inner = next
	return g, g.wrap(c)
}

func (g *guard) View() (v string) {
	if g.panicked {
		return "junco: internal error; this connection is closing.\n"
	}
	if g.ctx.Err() != nil {
		return ""
	}
	defer func() {
		if r := recover(); r != nil {
			g.recovered(r)
			v = "junco: internal error; this connection is closing.\n"
		}
	}()
	return g.inner.View()
}
