package cli

import (
	"context"
	"fmt"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"junco/sessions"
	"junco/tui"
	"junco/tui/serve"
)

// shutdownMsg is the message the server sends every program at shutdown:
// the workbench writes its recovery draft and quits.
func shutdownMsg() tea.Msg { return tui.ShutdownMsg{} }

// sessionOptions fills the workbench options of one SSH connection: the
// user's own store always; for `open NAME` that session; for
// `review OWNER/NAME` the shared session, read-only, with review notes
// stored in the owner's space and a copy into the reviewer's own.
func (a *serveApp) sessionOptions(c serve.Conn, o *tui.Options) error {
	own, _, err := a.userStore(c.User)
	if err != nil {
		return err
	}
	o.Store, o.User, o.Now = own, c.User, a.now
	owner := c.User
	o.Share = func(name string, readers []string) error {
		if _, err := own.Latest(name); err != nil {
			return err
		}
		return a.shares.Set(owner, name, readers)
	}
	o.Readers = func(name string) []string {
		sh, ok, err := a.shares.Get(owner, name)
		if err != nil || !ok {
			return nil
		}
		return sh.Readers
	}
	if len(c.Args) == 0 {
		return nil
	}
	switch c.Args[0] {
	case "open":
		name := c.Args[1]
		if err := sessions.ValidateName(name); err != nil {
			return err
		}
		doc, rev, err := own.Open(name, 0)
		if err != nil {
			return fmt.Errorf("open %s: %w", name, err)
		}
		o.Session, o.Document, o.Revision = name, doc, rev.Number
		return nil
	case "review":
		owner, name, root, err := a.sharedTarget(c.User, c.Args[1])
		if err != nil {
			return err
		}
		if owner == c.User {
			return fmt.Errorf("review %s: this is your own session; open it with `open %s`", c.Args[1], name)
		}
		ownerStore, err := sessions.New(root, a.storeOptions(owner))
		if err != nil {
			return err
		}
		doc, rev, err := ownerStore.Open(name, 0)
		if err != nil {
			return fmt.Errorf("review %s: %w", c.Args[1], err)
		}
		o.Document, o.Revision, o.ReadOnly = doc, rev.Number, true
		o.Share, o.Readers = nil, nil
		o.Name = owner + "/" + name
		reviewer := c.User
		o.AddReview = func(text string) error {
			// Unsharing takes effect at once, also for an open review.
			if !a.shares.CanRead(reviewer, owner, name) {
				return fmt.Errorf("%s/%s is no longer shared with you", owner, name)
			}
			return ownerStore.AddReviewNote(name, sessions.ReviewNote{Author: reviewer, Time: a.now(), Text: text})
		}
		o.CopyToOwn = func(d *sessions.Document, as string) (int, error) {
			if err := sessions.ValidateName(as); err != nil {
				return 0, err
			}
			cp := d.Clone()
			cp.Meta.Origin = fmt.Sprintf("copied from %s/%s revision %d by %s on %s", owner, name, rev.Number, reviewer, a.now().UTC().Format(time.RFC3339))
			r, err := own.Save(as, cp, 0)
			return r.Number, err
		}
		return nil
	}
	return fmt.Errorf("unknown command %q", c.Args[0])
}

// inbox opens user's inbox: the only folder served users reach with
// scp, sftp and the workbench's import and batch screens. Every inbox of
// one user shares the server's accounting, so that uploads on several
// connections at once stay within the per-user cap.
func (a *serveApp) inbox(user string) (*sessions.Inbox, error) {
	lim := a.inboxLimits
	lim.Quotas = a.quotas
	return sessions.OpenInbox(a.data, user, lim)
}

// inboxOptions makes the workbench read measurement files from user's
// inbox only, until ctx ends.
func (a *serveApp) inboxOptions(ctx context.Context, user string, o *tui.Options) error {
	in, err := a.inbox(user)
	if err != nil {
		return err
	}
	context.AfterFunc(ctx, func() { in.Close() })
	o.Files = in
	o.FilesNote = "Files come from your inbox on this server: upload with `scp FILE " + user + "@HOST:` or `sftp " + user + "@HOST`, then type the file name only (the batch screen fits the CSV and TSV files of the inbox: leave the directory empty)."
	return nil
}
