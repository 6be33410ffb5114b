package cli

import (
	"context"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"strings"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"junco/sessions"
	"junco/tui"
	"junco/tui/serve"
)

// serveOptions holds the inputs of `junco serve`.
type serveOptions struct {
	listen, hostKey, authKeys, data string
	idle                            time.Duration
	maxConn                         int
	maxConnPerUser                  int
	uploadMiB, inboxMiB, storeMiB   int64
}

// serveHelp is the page of `junco serve --help`.
const serveHelp = `Serve the workbench over SSH to a lab group. Logins are by public key only;
each line of the authorized-keys file (OpenSSH format) names its user in the
comment field, and the SSH login name must equal it. Each user's sessions
live under DIR/users/USER. Files reach the server only through each
user's inbox, DIR/users/USER/inbox (mode 0700): "scp FILE USER@HOST:"
(also with -O) and "sftp USER@HOST" land there, and the workbench's
import and batch screens read nothing else. The keys file is re-read
when it changes and on SIGHUP; SIGINT or SIGTERM stop the server after
writing recovery drafts.`

// runServe runs `junco serve ARGS...` through the command tree.
func runServe(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	return execute(ctx, append([]string{"serve"}, args...), nil, stdout, stderr)
}

// newServeCmd is `junco serve`.
func newServeCmd(e *env) *cobra.Command {
	var o serveOptions
	cmd := &cobra.Command{
		Use:   "serve [flags]",
		Short: "serve the workbench over SSH to a lab group",
		Long:  serveHelp,
		Args:  noArgs,
		RunE: func(*cobra.Command, []string) error {
			return exited(runServeOptions(e.ctx, o, e.stdout, e.stderr))
		},
	}
	e.lazyFlags(cmd, func() { addServeFlags(cmd.Flags(), &o) })
	return cmd
}

// addServeFlags defines the flags of junco serve.
func addServeFlags(fs *pflag.FlagSet, o *serveOptions) {
	fs.StringVar(&o.listen, "listen", serve.DefaultListen, "`ADDR`ess to listen on (binding beyond loopback is an explicit choice)")
	fs.StringVar(&o.data, "data", "", "server data directory `DIR` (default $XDG_DATA_HOME/junco-server, else ~/.local/share/junco-server)")
	fs.StringVar(&o.hostKey, "host-key", "", "ed25519 host key `FILE`, created with mode 0600 on first start (default DATA/host/ed25519)")
	fs.StringVar(&o.authKeys, "authorized-keys", "", "OpenSSH authorized-keys `FILE`; each key's comment is its user (default DATA/authorized_keys)")
	fs.DurationVar(&o.idle, "idle", 30*time.Minute, "close connections idle this long (0: never)")
	fs.IntVar(&o.maxConn, "max-conn", 32, "most concurrent sessions (workbench, command or file transfer); open SSH connections are capped at twice this")
	fs.IntVar(&o.maxConnPerUser, "max-conn-per-user", 0, "most concurrent sessions one user may hold (1 to --max-conn; default a quarter of --max-conn, at least 2)")
	fs.Int64Var(&o.uploadMiB, "upload-max-mib", sessions.DefaultInboxFileBytes>>20, "largest file a user may upload to the inbox, in MiB (1 to 65536)")
	fs.Int64Var(&o.storeMiB, "store-max-mib", defaultStoreMiB, "most a user's sessions may hold in all on the server (revisions, drafts, review notes), in MiB (1 to 1048576)")
	fs.Int64Var(&o.inboxMiB, "inbox-max-mib", sessions.DefaultInboxUserBytes>>20, "most a user's inbox may hold in all, in MiB (1 to 1048576, at least --upload-max-mib)")
}

// runServeOptions runs `junco serve` on parsed options until ctx ends.
func runServeOptions(ctx context.Context, o serveOptions, stdout, stderr io.Writer) int {
	if o.maxConn < 1 || o.maxConn > 10000 {
		fmt.Fprintf(stderr, "junco serve: --max-conn %d: allowed 1 to 10000\n", o.maxConn)
		return exitUsage
	}
	if o.maxConnPerUser < 0 || o.maxConnPerUser > o.maxConn {
		fmt.Fprintf(stderr, "junco serve: --max-conn-per-user %d: allowed 1 to --max-conn (%d); below --max-conn, one user cannot hold every slot\n", o.maxConnPerUser, o.maxConn)
		return exitUsage
	}
	if o.uploadMiB < 1 || o.uploadMiB > 1<<16 || o.inboxMiB < 1 || o.inboxMiB > 1<<20 || o.inboxMiB < o.uploadMiB {
		fmt.Fprintf(stderr, "junco serve: --upload-max-mib %d, --inbox-max-mib %d: allowed 1 to 65536 and 1 to 1048576 MiB, the inbox at least one upload\n", o.uploadMiB, o.inboxMiB)
		return exitUsage
	}
	if o.storeMiB < 1 || o.storeMiB > 1<<20 {
		fmt.Fprintf(stderr, "junco serve: --store-max-mib %d: allowed 1 to 1048576 MiB, so that one user's sessions cannot fill the server's disk\n", o.storeMiB)
		return exitUsage
	}
	if o.idle < 0 {
		fmt.Fprintf(stderr, "junco serve: --idle %v: must not be negative\n", o.idle)
		return exitUsage
	}
	if o.data == "" {
		d, err := sessions.DefaultRoot(os.Getenv)
		if err != nil {
			fmt.Fprintf(stderr, "junco serve: %v\n", err)
			return exitUsage
		}
		o.data = d + "-server"
	}
	if o.hostKey == "" {
		o.hostKey = filepath.Join(o.data, "host", "ed25519")
	}
	if o.authKeys == "" {
		o.authKeys = filepath.Join(o.data, "authorized_keys")
	}
	logger := slog.New(slog.NewTextHandler(stderr, nil))
	app, err := newServeApp(o.data, logger)
	if err != nil {
		fmt.Fprintf(stderr, "junco serve: %v\n", err)
		return exitFailure
	}
	app.storeBytes = o.storeMiB << 20
	app.inboxLimits = sessions.InboxLimits{FileBytes: o.uploadMiB << 20, UserBytes: o.inboxMiB << 20,
		FileFlag: "--upload-max-mib", UserFlag: "--inbox-max-mib"}
	srv, err := serve.New(serve.Config{
		Listen: o.listen, HostKeyPath: o.hostKey, AuthorizedKeysPath: o.authKeys,
		IdleTimeout: o.idle, MaxConnections: o.maxConn, MaxPerUser: o.maxConnPerUser, Logger: logger, App: app,
		ShutdownMsg: shutdownMsg(), Inbox: app.inbox,
	})
	if err != nil {
		fmt.Fprintf(stderr, "junco serve: %v\n", err)
		return exitFailure
	}
	if srv.CreatedHostKey() {
		fmt.Fprintf(stdout, "created host key %s\n", o.hostKey)
	}
	fmt.Fprintf(stdout, "junco serve on %s\nhost key fingerprint %s\nusers: %s\n", o.listen, srv.Fingerprint(), strings.Join(srv.Users(), ", "))
	if !strings.HasPrefix(o.listen, "127.") && !strings.HasPrefix(o.listen, "localhost:") && !strings.HasPrefix(o.listen, "[::1]") {
		fmt.Fprintln(stdout, "note: listening beyond loopback; only keys in the authorized-keys file can log in")
	}
	hup, stopHup := hangups()
	defer stopHup()
	errc := make(chan error, 1)
	go func() { errc <- srv.ListenAndServe() }()
	for {
		select {
		case <-hup:
			if err := srv.Reload(); err != nil {
				logger.Error("reload", "error", err)
			}
		case err := <-errc:
			if err != nil {
				fmt.Fprintf(stderr, "junco serve: %v\n", err)
				return exitFailure
			}
			return exitOK
		case <-ctx.Done():
			fmt.Fprintln(stdout, "shutting down: writing recovery drafts")
			sctx, cancel := context.WithTimeout(context.Background(), 10*time.Second)
			err := srv.Shutdown(sctx)
			cancel()
			if err != nil {
				fmt.Fprintf(stderr, "junco serve: shutdown: %v\n", err)
				return exitFailure
			}
			return exitOK
		}
	}
}

// serveApp is what the SSH front serves: each user's own store under
// DATA/users/USER, sessions shared read-only through DATA/shares.
type serveApp struct {
	data   string
	shares *sessions.Shares
	log    *slog.Logger
	now    func() time.Time
	// storeBytes caps each user's store (0: none).
	storeBytes int64
	// inboxLimits caps each user's uploads (zero: the defaults).
	inboxLimits sessions.InboxLimits
	// quotas counts each user's uploads on all their connections
	// against one per-user cap.
	quotas *sessions.InboxQuotas
}

func newServeApp(data string, log *slog.Logger) (*serveApp, error) {
	// The data folder is private to the server's account; one left
	// readable by an older junco is tightened, and the log says so.
	notices, err := sessions.PrepareDataRoot(data)
	if err != nil {
		return nil, err
	}
	for _, n := range notices {
		log.Warn("data folder permissions", "change", n)
	}
	sh, err := sessions.NewShares(data, nil)
	if err != nil {
		return nil, err
	}
	return &serveApp{data: data, shares: sh, log: log, now: time.Now, quotas: sessions.NewInboxQuotas()}, nil
}

// userStore opens user's own store.
func (a *serveApp) userStore(user string) (*sessions.Store, string, error) {
	root, err := sessions.UserStoreRoot(a.data, user)
	if err != nil {
		return nil, "", err
	}
	st, err := sessions.New(root, a.storeOptions(user))
	return st, root, err
}

// defaultStoreMiB is the default of --store-max-mib: four of the largest
// documents a session may have.
const defaultStoreMiB = 4 * sessions.MaxDocumentBytes >> 20

// storeOptions are the options of user's store on the server: saves
// signed by user, within the per-user cap.
func (a *serveApp) storeOptions(user string) sessions.Options {
	return sessions.Options{ToolVersion: Version, User: user, Now: a.now, MaxBytes: a.storeBytes, MaxBytesFlag: "--store-max-mib"}
}

// sharedTarget resolves OWNER/NAME for user, refusing anything not shared
// with them. A plain NAME is the user's own session.
func (a *serveApp) sharedTarget(user, ref string) (owner, name, root string, err error) {
	owner, name = user, ref
	if o, n, ok := strings.Cut(ref, "/"); ok {
		owner, name = o, n
	}
	if err := sessions.ValidateName(name); err != nil {
		return "", "", "", err
	}
	root, err = sessions.UserStoreRoot(a.data, owner)
	if err != nil {
		return "", "", "", err
	}
	if !a.shares.CanRead(user, owner, name) {
		// The same message whether or not it exists: nothing leaks.
		return "", "", "", fmt.Errorf("no session %q is shared with you", ref)
	}
	return owner, name, root, nil
}

// Command runs the read-only session commands for user over SSH.
func (a *serveApp) Command(ctx context.Context, user string, args []string, stdout, stderr io.Writer) int {
	if !serve.AllowedCommand(args) {
		fmt.Fprintln(stderr, "junco: command not available over SSH")
		return exitUsage
	}
	_, ownRoot, err := a.userStore(user)
	if err != nil {
		fmt.Fprintf(stderr, "junco: %v\n", err)
		return exitFailure
	}
	switch args[1] {
	case "list":
		if len(args) > 2 {
			fmt.Fprintln(stderr, "junco: sessions list takes no arguments over SSH")
			return exitUsage
		}
		code := runSessions(ctx, []string{"list", "--data", ownRoot}, stdout, stderr)
		shared, err := a.shares.SharedWith(user)
		if err != nil {
			fmt.Fprintf(stderr, "junco: shared sessions: %v\n", err)
			return exitFailure
		}
		if len(shared) > 0 {
			fmt.Fprintln(stdout, "\nshared with you (read-only; open with `ssh -t ... review OWNER/NAME`):")
			for _, s := range shared {
				fmt.Fprintf(stdout, "  %s/%s\n", s.Owner, s.Session)
			}
		}
		return code
	case "show", "export":
		_, name, root, err := a.sharedTarget(user, args[2])
		if err != nil {
			fmt.Fprintf(stderr, "junco: %v\n", err)
			return exitUsage
		}
		rest, err := sshSessionFlags(args[1], args[3:])
		if err != nil {
			fmt.Fprintf(stderr, "junco: %v\n", err)
			return exitUsage
		}
		return runSessions(ctx, append([]string{args[1], name, "--data", root}, rest...), stdout, stderr)
	}
	fmt.Fprintln(stderr, "junco: command not available over SSH")
	return exitUsage
}

// sshSessionFlags keeps only the flags a remote user may give: --rev N,
// --ascii, and for export --format md|json (printed to the channel). No
// flag that names a directory is ever passed on.
func sshSessionFlags(cmd string, args []string) ([]string, error) {
	var out []string
	for i := 0; i < len(args); i++ {
		a := args[i]
		name, val, hasVal := strings.Cut(strings.TrimLeft(a, "-"), "=")
		if !strings.HasPrefix(a, "-") {
			return nil, fmt.Errorf("unexpected argument %q", a)
		}
		switch name {
		case "ascii":
			on, err := boolFlag(name, val, hasVal)
			if err != nil {
				return nil, err
			}
			if on {
				out = append(out, "--ascii")
			}
			continue
		case "rev", "format":
		default:
			return nil, fmt.Errorf("flag %q is not available over SSH (allowed: --rev N, --ascii%s)", a, map[bool]string{true: ", --format md|json"}[cmd == "export"])
		}
		if name == "format" && cmd != "export" {
			return nil, fmt.Errorf("--format belongs to export")
		}
		if !hasVal {
			if i+1 >= len(args) {
				return nil, fmt.Errorf("flag %q needs a value", a)
			}
			i++
			val = args[i]
		}
		if name == "format" && val != "md" && val != "json" {
			return nil, fmt.Errorf("--format %q: over SSH allowed md or json (CSV needs files)", val)
		}
		out = append(out, "--"+name, val)
	}
	if cmd == "export" && !containsFlag(out, "--format") {
		out = append(out, "--format", "md")
	}
	return out, nil
}

func containsFlag(args []string, f string) bool {
	for _, a := range args {
		if a == f {
			return true
		}
	}
	return false
}

// Model builds the workbench for one connection: the user's own store, or
// a session opened by `open NAME`, or a shared one in review mode.
func (a *serveApp) Model(ctx context.Context, c serve.Conn) (tea.Model, error) {
	getenv := envLookup(c.Environ, c.Term)
	opts := tui.Options{Renderer: c.Renderer, ASCII: tui.DetectASCII(getenv), NoColor: tui.DetectNoColor(getenv),
		Width: c.Width, Height: c.Height}
	if err := a.sessionOptions(c, &opts); err != nil {
		return nil, err
	}
	if err := a.inboxOptions(ctx, c.User, &opts); err != nil {
		return nil, err
	}
	return tui.New(opts), nil
}

// envLookup answers getenv from the client's environment and TERM.
func envLookup(environ []string, term string) func(string) string {
	return func(k string) string {
		if k == "TERM" && term != "" {
			return term
		}
		for i := len(environ) - 1; i >= 0; i-- {
			if v, ok := strings.CutPrefix(environ[i], k+"="); ok {
				return v
			}
		}
		return ""
	}
}
