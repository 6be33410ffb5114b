package main

import (
	"fmt"

	tea "github.com/charmbracelet/bubbletea"

	"junco/tui"
	"junco/tui/serve"
)

// shutdownMsg is the message the server sends every program at shutdown.
func shutdownMsg() tea.Msg { return nil }

// sessionOptions fills the workbench options for an `open NAME` or
// `review OWNER/NAME` connection.
func (a *serveApp) sessionOptions(c serve.Conn, o *tui.Options) error {
	if len(c.Args) == 0 {
		return nil
	}
	ref := c.Args[1]
	if c.Args[0] == "open" {
		ref = c.User + "/" + ref
	}
	_, name, root, err := a.sharedTarget(c.User, ref)
	if err != nil {
		return err
	}
	st, err := openStore(root, c.User)
	if err != nil {
		return err
	}
	doc, _, err := st.Open(name, 0)
	if err != nil {
		return fmt.Errorf("%s: %w", ref, err)
	}
	spec := doc.Spec
	o.Spec, o.Name = &spec, ref
	return nil
}
