package serve

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"path"
	"strings"
	"time"

	"github.com/charmbracelet/ssh"
	"github.com/charmbracelet/wish"
	"github.com/charmbracelet/wish/scp"

	"junco/sessions"
)

// The legacy scp protocol (`scp -O`) is served by wish's scp middleware
// with the handler below: every name goes through the inbox's one
// confinement policy; folders (-r) are refused, a glob (`host:'*.csv'`)
// matches the inbox's files.

// scpMiddleware serves `scp -t` (upload) and `scp -f` (download) commands
// from the user's inbox; anything else goes on to next.
func (s *Server) scpMiddleware(next ssh.Handler) ssh.Handler {
	return func(sess ssh.Session) {
		args := sess.Command()
		if len(args) == 0 || args[0] != "scp" {
			next(sess)
			return
		}
		if len(args) < 2 || args[len(args)-1] == "-t" || args[len(args)-1] == "-f" {
			wish.Fatalln(sess, "junco: scp needs -t or -f with a file name")
			return
		}
		in, err := s.openInbox(sess.User())
		if err != nil {
			wish.Fatalln(sess, "junco: "+err.Error())
			return
		}
		defer in.Close()
		s.log.Info("scp", "user", sess.User(), "command", sess.RawCommand())
		// A handler of this session's own: the inbox is not shared through
		// the connection's context, which other sessions of the same
		// connection could read at the same time.
		h := inboxSCP{in: in}
		scp.Middleware(h, h)(next)(sess)
	}
}

// inboxSCP is the scp handler on one session's inbox.
type inboxSCP struct{ in *sessions.Inbox }

func (h inboxSCP) inbox(ssh.Session) (*sessions.Inbox, error) {
	if h.in == nil {
		return nil, errors.New("file transfer is not served here")
	}
	return h.in, nil
}

// scpTarget is the name an upload is stored under: the file's own name
// when the client named the inbox (".", "", "~" or "/"), else the name
// the client gave as the target.
func scpTarget(sess ssh.Session, e *scp.FileEntry) string {
	switch t := scp.GetInfo(sess.Command()).Path; t {
	case ".", "", "./", "~", "~/", "/":
		return e.Name
	default:
		return t
	}
}

// Write stores one uploaded file.
func (h inboxSCP) Write(sess ssh.Session, e *scp.FileEntry) (int64, error) {
	in, err := h.inbox(sess)
	if err != nil {
		return 0, lineErr(err)
	}
	// The file's own name must be a plain one too, whatever the target.
	if _, err := sessions.InboxName("upload", e.Name); err != nil {
		return 0, lineErr(err)
	}
	w, err := in.Create(scpTarget(sess, e), e.Size)
	if err != nil {
		return 0, lineErr(err)
	}
	n, err := io.Copy(w, e.Reader)
	if err != nil {
		w.Fail(err)
	}
	if cerr := w.Close(); cerr != nil {
		return n, lineErr(cerr)
	}
	return n, nil
}

// Mkdir refuses folders: the inbox is flat.
func (inboxSCP) Mkdir(ssh.Session, *scp.DirEntry) error {
	return lineErr(&sessions.InboxError{Op: "upload", Why: "the inbox has no folders; copy files, not folders (-r)", Err: fs.ErrPermission})
}

// Glob returns the inbox names a download asks for: one checked name, or
// the files matching a pattern.
func (h inboxSCP) Glob(sess ssh.Session, pattern string) ([]string, error) {
	in, err := h.inbox(sess)
	if err != nil {
		return nil, lineErr(err)
	}
	if !strings.ContainsAny(pattern, "*?[") {
		name, err := sessions.InboxName("download", pattern)
		if err != nil {
			return nil, lineErr(err)
		}
		return []string{name}, nil
	}
	if _, err := sessions.InboxName("download", pattern); err != nil {
		return nil, lineErr(err)
	}
	if _, err := path.Match(pattern, ""); err != nil {
		return nil, lineErr(&sessions.InboxError{Op: "download", Why: "the pattern is malformed", Err: fs.ErrInvalid})
	}
	fis, err := in.List()
	if err != nil {
		return nil, lineErr(err)
	}
	var out []string
	for _, fi := range fis {
		if ok, _ := path.Match(pattern, fi.Name()); ok {
			out = append(out, fi.Name())
		}
	}
	if len(out) == 0 {
		return nil, lineErr(&sessions.InboxError{Op: "download", Why: "no file of your inbox matches the pattern", Err: fs.ErrNotExist})
	}
	return out, nil
}

// WalkDir refuses folders (-r).
func (inboxSCP) WalkDir(ssh.Session, string, fs.WalkDirFunc) error {
	return lineErr(&sessions.InboxError{Op: "download", Why: "the inbox has no folders; copy files, not folders (-r)", Err: fs.ErrPermission})
}

// NewDirEntry refuses folders.
func (h inboxSCP) NewDirEntry(sess ssh.Session, _ string) (*scp.DirEntry, error) {
	return nil, h.WalkDir(sess, "", nil)
}

// NewFileEntry opens one inbox file for download.
func (h inboxSCP) NewFileEntry(sess ssh.Session, name string) (*scp.FileEntry, func() error, error) {
	in, err := h.inbox(sess)
	if err != nil {
		return nil, nil, lineErr(err)
	}
	f, err := in.Open(name)
	if err != nil {
		return nil, nil, lineErr(err)
	}
	fi, err := f.Stat()
	if err != nil {
		f.Close()
		return nil, nil, lineErr(fmt.Errorf("download: %s cannot be read", name))
	}
	var r io.Reader = f
	if st, _ := sess.Context().Value(connStateKey{}).(*connState); st != nil {
		r = downloadReader{r: f, st: st}
	}
	return &scp.FileEntry{Name: fi.Name(), Filepath: fi.Name(), Mode: 0o600, Size: fi.Size(),
		Reader: r, Mtime: fi.ModTime().Unix(), Atime: fi.ModTime().Unix()}, f.Close, nil
}

// downloadReader counts a legacy scp download as the client's input for
// the idle check: in that protocol the client sends nothing while it
// takes a file's bytes, so a download longer than --idle was cut. The
// next read of the file happens only once the client has taken (window
// space for) the bytes before it, so a client that stops taking them is
// still closed after --idle.
type downloadReader struct {
	r  io.Reader
	st *connState
}

func (d downloadReader) Read(p []byte) (int, error) {
	n, err := d.r.Read(p)
	if n > 0 {
		d.st.lastInput.Store(time.Now().UnixNano())
	}
	return n, err
}

// lineErr ends an error's message with a newline: wish prints the scp
// middleware's error to the client's stderr as it is, and OpenSSH's scp
// would run the next message into it.
func lineErr(err error) error {
	if err == nil {
		return nil
	}
	return scpLineError{err}
}

type scpLineError struct{ error }

func (e scpLineError) Error() string { return e.error.Error() + "\n" }
func (e scpLineError) Unwrap() error { return e.error }
