package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/lipgloss"
	"github.com/charmbracelet/x/term"

	"junco/tui"
)

// workbenchOptions holds the inputs of `junco` / `junco workbench`.
type workbenchOptions struct {
	ascii bool
}

// parseWorkbenchArgs reads the workbench's arguments: none, --ascii, or
// --help. A session name will be accepted here once sessions exist.
func parseWorkbenchArgs(args []string) (o workbenchOptions, help bool, err error) {
	for _, a := range args {
		switch a {
		case "--ascii", "-ascii":
			o.ascii = true
		case "-h", "--help", "-help":
			help = true
		default:
			return o, false, fmt.Errorf("unexpected argument %q (the workbench takes only --ascii)", a)
		}
	}
	return o, help, nil
}

const workbenchUsage = `Usage: junco [workbench] [--ascii]

Open the interactive workbench on the built-in demo junction (invented demo
data). Press ? inside for the guide and every key.

  --ascii   draw with plain ASCII characters (also chosen automatically when
            the locale has no UTF-8; NO_COLOR turns colour off)
`

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
		fmt.Fprintln(stderr, "junco: the workbench needs an interactive terminal; for scripts use `junco calc`")
		return exitUsage
	}
	r := lipgloss.NewRenderer(os.Stdout)
	// Ask the terminal for its background once, before the program owns
	// the input.
	r.SetHasDarkBackground(r.HasDarkBackground())
	w, h, _ := term.GetSize(os.Stdout.Fd())
	m := tui.New(tui.Options{
		Renderer: r,
		ASCII:    o.ascii || tui.DetectASCII(os.Getenv),
		NoColor:  tui.DetectNoColor(os.Getenv),
		Width:    w,
		Height:   h,
	})
	p := tea.NewProgram(m, tea.WithAltScreen(), tea.WithContext(ctx), tea.WithOutput(stdout))
	if _, err := p.Run(); err != nil {
		if errors.Is(err, tea.ErrProgramKilled) || errors.Is(err, context.Canceled) {
			return exitOK
		}
		fmt.Fprintf(stderr, "junco: %v\n", err)
		return exitFailure
	}
	return exitOK
}
