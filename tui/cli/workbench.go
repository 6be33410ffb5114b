package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/term"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"

	"junco/sessions"
	"junco/tui"
)

// workbenchOptions holds the inputs of `junco`, `junco workbench` and
// `junco open`.
type workbenchOptions struct {
	ascii bool
	// asciiSet records that --ascii or --ascii=BOOL was given: it then
	// overrides the detection from the locale (--ascii=false forces
	// Unicode drawing).
	asciiSet bool
	data     string // --data DIR ("" = the default location)
	rev      int    // --rev N (0 = the newest)
	// target is the session name or session file to open ("" = the demo).
	target string
	// notices receives what opening the store changed (nil: not told).
	notices io.Writer
}

// drawASCII is --ascii[=BOOL] when given, else what the locale calls for
// (tui.DetectASCII).
func (o workbenchOptions) drawASCII(getenv func(string) string) bool {
	if o.asciiSet {
		return o.ascii
	}
	return tui.DetectASCII(getenv)
}

// addWorkbenchFlags defines the workbench's flags on fs: --ascii[=BOOL],
// --data DIR, --rev N.
func addWorkbenchFlags(fs *pflag.FlagSet, o *workbenchOptions) {
	fs.BoolVar(&o.ascii, "ascii", false, "draw with plain ASCII characters (also chosen automatically when the locale has no UTF-8;\n--ascii=false draws Unicode whatever the locale; NO_COLOR turns colour off)")
	fs.StringVar(&o.data, "data", "", "the session store `DIR` (default $XDG_DATA_HOME/junco, else ~/.local/share/junco); saves are signed with $USER, else the account name")
	fs.IntVar(&o.rev, "rev", 0, "open revision `N` of session NAME instead of the newest")
}

// check completes and checks the options after parsing: fs tells whether
// --ascii was given; args are the positional arguments (at most one
// session NAME or FILE).
func (o *workbenchOptions) check(fs *pflag.FlagSet, args []string) error {
	o.asciiSet = fs.Changed("ascii")
	if len(args) > 1 {
		return fmt.Errorf("unexpected argument %q: the workbench opens one session NAME or FILE", args[1])
	}
	if len(args) == 1 {
		o.target = args[0]
	}
	if fs.Changed("data") && strings.TrimSpace(o.data) == "" {
		return errors.New("--data: the data directory is empty; give a directory")
	}
	if fs.Changed("rev") && o.rev < 1 {
		return fmt.Errorf("--rev %q: allowed a revision number, 1 or more (omit it for the newest)", fs.Lookup("rev").Value.String())
	}
	if o.rev > 0 && (o.target == "" || looksLikePath(o.target)) {
		return errors.New("--rev N needs a session NAME from the store")
	}
	return nil
}

// parseWorkbenchArgs reads the workbench's arguments with its flag
// definitions (addWorkbenchFlags): --ascii, --data DIR, --rev N, --help,
// and at most one session NAME or FILE.
func parseWorkbenchArgs(args []string) (o workbenchOptions, help bool, err error) {
	cmd := &cobra.Command{Use: "open"}
	addWorkbenchFlags(cmd.Flags(), &o)
	cmd.Flags().BoolVarP(&help, "help", "h", false, "help")
	fs := cmd.Flags()
	if err := fs.Parse(normalizeArgs(cmd, args)); err != nil {
		return o, false, flagError(cmd, err)
	}
	return o, help, o.check(fs, fs.Args())
}

const workbenchHelp = `Open the interactive workbench: on the built-in demo junction (invented demo
data) when no session is given, on a stored session NAME (its newest
revision, or revision N), or on a session FILE from elsewhere (a .json file
or a path). A file is stored as a new session only when you save it, under
the name you choose. Press ? inside for the guide and every key.`

// newWorkbenchCmd is the root of the command tree: junco alone opens the
// workbench on the demo session.
func newWorkbenchCmd(e *env) *cobra.Command {
	var o workbenchOptions
	var version bool
	cmd := &cobra.Command{
		Use:   "junco",
		Short: "a terminal workbench for pn junctions and diodes",
		Long:  rootHelp(),
		Args:  func(c *cobra.Command, args []string) error { return unknownCommand(c, args) },
		RunE: func(c *cobra.Command, args []string) error {
			if version {
				return printVersion(e.stdout)
			}
			if err := o.check(c.Flags(), nil); err != nil {
				return usagef(c, "%v", err)
			}
			return exited(runWorkbench(e.ctx, o, e.stdout, e.stderr))
		},
	}
	addWorkbenchFlags(cmd.Flags(), &o)
	cmd.Flags().BoolVar(&version, "version", false, "print the version of this build")
	return cmd
}

// unknownCommand refuses words after junco that name no command.
func unknownCommand(c *cobra.Command, args []string) error {
	if len(args) > 0 {
		return usagef(c, "unknown command %q", args[0])
	}
	return nil
}

// newOpenCmd is junco open (also junco workbench): the workbench on a
// stored session or a session file.
func newOpenCmd(e *env) *cobra.Command {
	var o workbenchOptions
	cmd := &cobra.Command{
		Use:     "open [NAME|FILE] [--rev N] [--ascii] [--data DIR]",
		Aliases: []string{"workbench"},
		Short:   "open the workbench on a stored session or a session file",
		Long:    workbenchHelp,
		Args:    cobra.ArbitraryArgs,
		RunE: func(c *cobra.Command, args []string) error {
			if err := o.check(c.Flags(), args); err != nil {
				return usagef(c, "%v", err)
			}
			return exited(runWorkbench(e.ctx, o, e.stdout, e.stderr))
		},
	}
	e.lazyFlags(cmd, func() { addWorkbenchFlags(cmd.Flags(), &o) })
	return cmd
}

// workbenchUser names who saves (currentUser), else "unknown".
func workbenchUser() string {
	if u := currentUser(); u != "" {
		return u
	}
	return "unknown"
}

// workbenchModel builds the workbench for the options, with the store at
// o.data (or the default location); errors name the session or file.
func workbenchModel(o workbenchOptions, base tui.Options) (tui.Model, error) {
	user := workbenchUser()
	base.User = user
	dir := o.data
	if dir == "" {
		d, err := sessions.DefaultRoot(os.Getenv)
		if err != nil {
			if o.target != "" && !looksLikePath(o.target) {
				return tui.Model{}, err
			}
			base.NoStoreReason = err.Error()
		}
		dir = d
	}
	if dir != "" {
		st, err := sessions.New(dir, sessions.Options{ToolVersion: Version, User: user})
		if err != nil {
			return tui.Model{}, err
		}
		if o.notices != nil {
			for _, n := range st.Notices() {
				fmt.Fprintf(o.notices, "junco: note: %s\n", storeText(st, n))
			}
		}
		base.Store = st
	}
	switch {
	case o.target == "":
	case looksLikePath(o.target):
		data, err := readLimited(o.target)
		if err != nil {
			return tui.Model{}, err
		}
		doc, err := sessions.Decode(data)
		if err != nil {
			return tui.Model{}, fmt.Errorf("%s: %w", o.target, err)
		}
		doc.Meta.Origin = "imported from " + filepath.Base(o.target)
		base.Document = doc
		base.Name = strings.TrimSuffix(filepath.Base(o.target), filepath.Ext(o.target))
	default:
		if err := sessions.ValidateName(o.target); err != nil {
			return tui.Model{}, fmt.Errorf("%w (a file needs a path or the .json extension)", err)
		}
		doc, rev, err := base.Store.Open(o.target, o.rev)
		if err != nil {
			var nf *sessions.NotFoundError
			if errors.As(err, &nf) && nf.Revision == 0 {
				return tui.Model{}, fmt.Errorf("%w in %s; `junco sessions list --data DIR` lists the sessions", err, base.Store.Root())
			}
			return tui.Model{}, err
		}
		base.Session, base.Document, base.Revision = o.target, doc, rev.Number
	}
	return tui.New(base), nil
}

// runWorkbench opens the interactive workbench on the terminal.
func runWorkbench(ctx context.Context, o workbenchOptions, stdout, stderr io.Writer) int {
	if !term.IsTerminal(os.Stdin.Fd()) || !term.IsTerminal(os.Stdout.Fd()) {
		fmt.Fprintln(stderr, "junco: the workbench needs an interactive terminal; for scripts use `junco calc` and `junco sessions`")
		return exitUsage
	}
	r := lipgloss.NewRenderer(os.Stdout)
	noColor := tui.DetectNoColor(os.Getenv)
	// Ask the terminal for its background once, before the program owns
	// the input; without colour there is nothing to ask.
	if noColor {
		r.SetHasDarkBackground(true)
	} else {
		r.SetHasDarkBackground(r.HasDarkBackground())
	}
	w, h, _ := term.GetSize(os.Stdout.Fd())
	o.notices = stderr // shown before the workbench takes the screen, and after it
	m, err := workbenchModel(o, tui.Options{
		Renderer: r,
		ASCII:    o.drawASCII(os.Getenv),
		NoColor:  noColor,
		Width:    w,
		Height:   h,
	})
	if err != nil {
		fmt.Fprintf(stderr, "junco: %v\n", err)
		return exitFailure
	}
	// On an interrupt, a termination or a hang-up the workbench writes its
	// recovery draft and quits; if it does not within a few seconds, it is
	// stopped. (Bubble Tea's own handler would quit at once.)
	p := tea.NewProgram(m, tea.WithAltScreen(), tea.WithOutput(stdout), tea.WithoutSignalHandler())
	hup, stopHup := hangups()
	defer stopHup()
	done := make(chan struct{})
	defer close(done)
	go func() {
		select {
		case <-done:
			return
		case <-ctx.Done():
		case <-hup:
		}
		p.Send(tui.ShutdownMsg{})
		select {
		case <-done:
		case <-time.After(5 * time.Second):
			p.Kill()
		}
	}()
	if _, err := p.Run(); err != nil {
		if errors.Is(err, tea.ErrProgramKilled) || errors.Is(err, context.Canceled) {
			return exitOK
		}
		fmt.Fprintf(stderr, "junco: %v\n", err)
		return exitFailure
	}
	return exitOK
}
