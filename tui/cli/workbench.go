package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/term"

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

// parseWorkbenchArgs reads the workbench's arguments: --ascii, --data
// DIR, --rev N, --help, and at most one session NAME or FILE.
func parseWorkbenchArgs(args []string) (o workbenchOptions, help bool, err error) {
	for i := 0; i < len(args); i++ {
		a := args[i]
		name, val, hasVal := strings.Cut(strings.TrimLeft(a, "-"), "=")
		isFlag := strings.HasPrefix(a, "-") && a != "-" && len(a)-len(strings.TrimLeft(a, "-")) <= 2
		value := func() (string, error) {
			if hasVal {
				return val, nil
			}
			if i+1 >= len(args) {
				return "", fmt.Errorf("--%s needs a value", name)
			}
			i++
			return args[i], nil
		}
		switch {
		case a == "--":
			for _, p := range args[i+1:] {
				if o.target != "" {
					return o, false, fmt.Errorf("unexpected argument %q: the workbench opens one session NAME or FILE", p)
				}
				o.target = p
			}
			return o, help, nil
		case isFlag && name == "ascii":
			if o.ascii, err = boolFlag(name, val, hasVal); err != nil {
				return o, false, err
			}
			o.asciiSet = true
		case isFlag && (name == "h" || name == "help"):
			help = true
		case isFlag && name == "data":
			v, err := value()
			if err != nil {
				return o, false, err
			}
			if strings.TrimSpace(v) == "" {
				return o, false, errors.New("--data: the data directory is empty; give a directory")
			}
			o.data = v
		case isFlag && name == "rev":
			v, err := value()
			if err != nil {
				return o, false, err
			}
			n, err := strconv.Atoi(v)
			if err != nil || n < 1 {
				return o, false, fmt.Errorf("--rev %q: allowed a revision number, 1 or more (omit it for the newest)", v)
			}
			o.rev = n
		case isFlag:
			return o, false, fmt.Errorf("unknown flag %q (the workbench takes --ascii, --data DIR and --rev N)", a)
		case o.target != "":
			return o, false, fmt.Errorf("unexpected argument %q: the workbench opens one session NAME or FILE", a)
		default:
			o.target = a
		}
	}
	if o.rev > 0 && (o.target == "" || looksLikePath(o.target)) {
		return o, false, errors.New("--rev N needs a session NAME from the store")
	}
	return o, help, nil
}

const workbenchUsage = `Usage: junco [workbench] [--ascii] [--data DIR]
       junco open NAME [--rev N] [--ascii] [--data DIR]
       junco open FILE [--ascii] [--data DIR]

Open the interactive workbench: on the built-in demo junction (invented demo
data) when no session is given, on a stored session NAME (its newest
revision, or revision N), or on a session FILE from elsewhere (a .json file
or a path). A file is stored as a new session only when you save it, under
the name you choose. Press ? inside for the guide and every key.

  --ascii      draw with plain ASCII characters (also chosen automatically
               when the locale has no UTF-8; --ascii=false draws Unicode
               whatever the locale; NO_COLOR turns colour off)
  --data DIR   the session store (default $XDG_DATA_HOME/junco, else
               ~/.local/share/junco); saves are signed with $USER, else the account name
  --rev N      open revision N of session NAME instead of the newest
`

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
func runWorkbench(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	o, help, err := parseWorkbenchArgs(args)
	if err != nil {
		fmt.Fprintf(stderr, "junco: %v\n\n%s", err, workbenchUsage)
		return exitUsage
	}
	if help {
		fmt.Fprint(stdout, workbenchUsage)
		return exitOK
	}
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
	hup := make(chan os.Signal, 1)
	signal.Notify(hup, syscall.SIGHUP)
	defer signal.Stop(hup)
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
