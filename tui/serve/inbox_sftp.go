package serve

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"github.com/charmbracelet/ssh"
	"github.com/pkg/sftp"

	"junco/sessions"
)

// The SFTP subsystem serves each user's inbox and nothing else: the
// client sees the inbox as "/", and every name it sends goes through the
// inbox's one confinement policy (sessions.InboxName and os.Root). Put,
// get, list, stat, remove and rename are served; mkdir, rmdir, links and
// symbolic links are refused (the inbox is flat); setstat is accepted and
// changes nothing (uploaded files stay mode 0600). OpenSSH's scp uses this
// subsystem by default since version 9.

// sftpSubsystem serves one SFTP session for the session's user.
func (s *Server) sftpSubsystem(sess ssh.Session) {
	in, err := s.openInbox(sess.User())
	if err != nil {
		fmt.Fprintf(sess.Stderr(), "junco: %v\n", err)
		_ = sess.Exit(1)
		return
	}
	defer in.Close()
	h := &inboxSFTP{in: in, stderr: sess.Stderr()}
	rs := sftp.NewRequestServer(sess, sftp.Handlers{FileGet: h, FilePut: h, FileCmd: h, FileList: h})
	// Serve closes every open file when the client leaves; the exit
	// status goes out before the channel closes (rs.Close would close it
	// first, and OpenSSH's scp would report a failure).
	err = rs.Serve()
	if err != nil && !errors.Is(err, io.EOF) {
		s.log.Info("sftp session ended", "user", sess.User(), "error", err)
		_ = sess.Exit(1)
		return
	}
	_ = sess.Exit(0)
}

// openInbox opens user's inbox, or says that uploads are not served.
func (s *Server) openInbox(user string) (*sessions.Inbox, error) {
	if s.cfg.Inbox == nil {
		return nil, errors.New("file transfer is not served here")
	}
	return s.cfg.Inbox(user)
}

// inboxSFTP answers SFTP requests from one inbox. Refusals also go to
// the session's stderr: OpenSSH's sftp and scp show only the status code
// ("Permission denied", "Failure"), not the message that names the rule
// or the cap.
type inboxSFTP struct {
	in     *sessions.Inbox
	stderr io.Writer
	// handles counts the files and listings open (maxSFTPHandles).
	handles atomic.Int32
}

// maxSFTPHandles bounds the files and folder listings one SFTP session
// holds open at once: each open file is a descriptor of the server's
// process and each listing holds the whole inbox's entries until the
// client closes it. Before the bound, one session held 3000 descriptors
// of one file (and could go on to the process's limit, after which no
// user could connect or save).
const maxSFTPHandles = 64

// openHandle counts a file or listing being opened; release gives the
// count back (once, however often it is called).
func (h *inboxSFTP) openHandle(op string) (release func(), err error) {
	if h.handles.Add(1) > maxSFTPHandles {
		h.handles.Add(-1)
		return nil, h.fail(&sessions.InboxError{Op: op, Why: fmt.Sprintf("at most %d files and listings may be open at once in one sftp session; close some first", maxSFTPHandles), Err: fs.ErrPermission})
	}
	var once sync.Once
	return func() { once.Do(func() { h.handles.Add(-1) }) }, nil
}

// sftpRead is a download: closing it closes the file and gives back its
// handle's count.
type sftpRead struct {
	io.ReaderAt
	close func() error
}

func (r sftpRead) Close() error { return r.close() }

// sftpListing is a folder listing: closing it gives back its handle's
// count.
type sftpListing struct {
	listerAt
	release func()
}

func (l sftpListing) Close() error { l.release(); return nil }

// fail says why on stderr (unless the file is merely missing, which
// scp asks about on every upload) and returns the SFTP status.
func (h *inboxSFTP) fail(err error) error {
	if err != nil && !errors.Is(err, fs.ErrNotExist) {
		fmt.Fprintf(h.stderr, "junco: %v\n", err)
	}
	return sftpErr(err)
}

// sftpName maps the client's path (cleaned and absolute: the inbox is
// "/") to an inbox name; root reports the inbox itself.
func sftpName(p string) (name string, root bool) {
	name = strings.TrimPrefix(p, "/")
	return name, name == "" || name == "."
}

// sftpErr gives an inbox error the SFTP status the client expects (no
// such file, permission denied), keeping its message.
func sftpErr(err error) error {
	switch {
	case err == nil:
		return nil
	case errors.Is(err, fs.ErrNotExist):
		return fmt.Errorf("%w: %v", sftp.ErrSSHFxNoSuchFile, err)
	case errors.Is(err, fs.ErrPermission), errors.Is(err, fs.ErrExist):
		return fmt.Errorf("%w: %v", sftp.ErrSSHFxPermissionDenied, err)
	}
	return fmt.Errorf("%w: %v", sftp.ErrSSHFxFailure, err)
}

// Fileread opens a file for download.
func (h *inboxSFTP) Fileread(r *sftp.Request) (io.ReaderAt, error) {
	name, _ := sftpName(r.Filepath)
	release, err := h.openHandle("open")
	if err != nil {
		return nil, err
	}
	f, err := h.in.Open(name)
	if err != nil {
		release()
		return nil, h.fail(err)
	}
	ra, ok := f.(io.ReaderAt)
	if !ok {
		f.Close()
		release()
		return nil, sftp.ErrSSHFxFailure
	}
	return sftpRead{ReaderAt: ra, close: func() error {
		defer release()
		return f.Close()
	}}, nil
}

// Filewrite opens a file for upload, within the inbox's caps.
func (h *inboxSFTP) Filewrite(r *sftp.Request) (io.WriterAt, error) {
	name, root := sftpName(r.Filepath)
	if root {
		return nil, h.fail(&sessions.InboxError{Op: "upload", Why: "name a file, not the inbox", Err: fs.ErrPermission})
	}
	release, err := h.openHandle("upload")
	if err != nil {
		return nil, err
	}
	w, err := h.in.Create(name, -1)
	if err != nil {
		release()
		return nil, h.fail(err)
	}
	return &sftpUpload{InboxWriter: w, h: h, release: release}, nil
}

// sftpUpload reports the first failure of an upload (a cap crossed) on
// stderr too; the status is a failure carrying the message, which
// clients that show messages print.
type sftpUpload struct {
	*sessions.InboxWriter
	h       *inboxSFTP
	once    sync.Once
	release func()
}

// Close ends the upload and gives back its handle's count.
func (u *sftpUpload) Close() error {
	defer u.release()
	return u.InboxWriter.Close()
}

func (u *sftpUpload) WriteAt(p []byte, off int64) (int, error) {
	n, err := u.InboxWriter.WriteAt(p, off)
	if err != nil {
		u.once.Do(func() { fmt.Fprintf(u.h.stderr, "junco: %v\n", err) })
	}
	return n, err
}

// Filecmd runs remove, rename and setstat; everything else is refused.
func (h *inboxSFTP) Filecmd(r *sftp.Request) error {
	name, root := sftpName(r.Filepath)
	switch r.Method {
	case "Remove":
		return h.fail(h.in.Remove(name))
	case "Rename", "PosixRename":
		to, _ := sftpName(r.Target)
		return h.fail(h.in.Rename(name, to, r.Method == "PosixRename"))
	case "Setstat":
		if root {
			return nil
		}
		_, err := h.in.Stat(name)
		return h.fail(err)
	case "Mkdir", "Rmdir":
		return h.fail(&sessions.InboxError{Op: strings.ToLower(r.Method), Why: "the inbox has no folders", Err: fs.ErrPermission})
	}
	return h.fail(&sessions.InboxError{Op: strings.ToLower(r.Method), Why: "links are not allowed in the inbox", Err: fs.ErrPermission})
}

// PosixRename replaces an existing target, as the OpenSSH extension says.
func (h *inboxSFTP) PosixRename(r *sftp.Request) error { return h.Filecmd(r) }

// Filelist lists the inbox or stats one file.
func (h *inboxSFTP) Filelist(r *sftp.Request) (sftp.ListerAt, error) {
	name, root := sftpName(r.Filepath)
	switch r.Method {
	case "List":
		if !root {
			if _, err := h.in.Stat(name); err != nil {
				return nil, h.fail(err)
			}
			return nil, h.fail(&sessions.InboxError{Op: "list", Why: "the inbox has no folders", Err: fs.ErrPermission})
		}
		release, err := h.openHandle("list")
		if err != nil {
			return nil, err
		}
		fis, err := h.in.List()
		if err != nil {
			release()
			return nil, h.fail(err)
		}
		return sftpListing{listerAt: listerAt(fis), release: release}, nil
	case "Stat", "Lstat":
		if root {
			return listerAt{inboxRootInfo{}}, nil
		}
		fi, err := h.in.Stat(name)
		if err != nil {
			// Clients stat freely (scp on every upload): a name the
			// inbox cannot hold simply does not exist there.
			return nil, fmt.Errorf("%w: %v", sftp.ErrSSHFxNoSuchFile, err)
		}
		return listerAt{fi}, nil
	}
	return nil, h.fail(&sessions.InboxError{Op: "readlink", Why: "links are not allowed in the inbox", Err: fs.ErrPermission})
}

// listerAt hands out a fixed list.
type listerAt []fs.FileInfo

func (l listerAt) ListAt(dst []os.FileInfo, off int64) (int, error) {
	if off >= int64(len(l)) {
		return 0, io.EOF
	}
	n := copy(dst, l[off:])
	if off+int64(n) >= int64(len(l)) {
		return n, io.EOF
	}
	return n, nil
}

// inboxRootInfo describes the inbox as the client's "/" (a folder of mode
// 0700; no server path or owner is given away).
type inboxRootInfo struct{}

func (inboxRootInfo) Name() string       { return "/" }
func (inboxRootInfo) Size() int64        { return 0 }
func (inboxRootInfo) Mode() fs.FileMode  { return fs.ModeDir | 0o700 }
func (inboxRootInfo) ModTime() time.Time { return time.Time{} }
func (inboxRootInfo) IsDir() bool        { return true }
func (inboxRootInfo) Sys() any           { return nil }
