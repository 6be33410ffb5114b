package sessions

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"unicode"
	"unicode/utf8"
)

// A served user's inbox is the one folder of the server that the user's
// files reach and that the served workbench reads measurements from:
//
//	DATA/users/USER/inbox/FILE   a file the user uploaded (mode 0600)
//
// The inbox is flat: a file is named by a plain file name, never a path.
// Every access goes through an os.Root opened on the folder, which refuses
// any name that leaves it, symbolic links included; on top of that a name
// is checked by InboxName, and a symbolic link inside the inbox is refused
// too. Errors name the file as the user gave it and never a server path.
const inboxDir = "inbox"

// Default inbox limits (see InboxLimits).
const (
	DefaultInboxFileBytes int64 = 64 << 20  // 64 MiB per file
	DefaultInboxUserBytes int64 = 512 << 20 // 512 MiB per user
)

// maxInboxName is the longest inbox file name in bytes (the common limit
// of file systems for one name).
const maxInboxName = 255

// InboxLimits caps what a user may upload: FileBytes for one file,
// UserBytes for all the files of the inbox together. Zero takes the
// default.
type InboxLimits struct {
	FileBytes, UserBytes int64
	// FileFlag and UserFlag name the server options that set the limits,
	// for the messages (e.g. "--upload-max-mib"); "" names none.
	FileFlag, UserFlag string
	// Quotas shares the per-user cap between every inbox of one user
	// opened with it (see InboxQuotas); nil accounts per Inbox.
	Quotas *InboxQuotas
}

func (l InboxLimits) withDefaults() InboxLimits {
	if l.FileBytes <= 0 {
		l.FileBytes = DefaultInboxFileBytes
	}
	if l.UserBytes <= 0 {
		l.UserBytes = DefaultInboxUserBytes
	}
	return l
}

// InboxError is a refused inbox operation. Its message names the file as
// the user gave it (when that is a plain name), the rule or limit, and no
// server path.
type InboxError struct {
	Op  string // "open", "upload", "list", "remove", "rename"
	Why string
	// Err is fs.ErrNotExist, fs.ErrPermission, fs.ErrExist or nil, for
	// errors.Is (the SFTP server maps them to its status codes).
	Err error
}

func (e *InboxError) Error() string { return e.Op + ": " + e.Why }

func (e *InboxError) Unwrap() error { return e.Err }

func refused(op, why string) error {
	return &InboxError{Op: op, Why: why, Err: fs.ErrPermission}
}

// inboxNameRule states the rule for messages.
const inboxNameRule = "name a file of your inbox by its plain file name (as `ls` over sftp shows it); paths, '..', absolute paths and hidden names are refused"

// InboxName is the one confinement policy for a user-given inbox name: it
// returns the plain file name, or an error for anything that is not one
// (empty, absolute, with a path separator or a drive letter, "." or "..",
// hidden, starting with '-', control or invisible format characters, not
// UTF-8, longer than 255 bytes). A leading "./" is dropped. The error never repeats a path
// the user gave.
func InboxName(op, given string) (string, error) {
	name := strings.TrimSpace(given)
	for strings.HasPrefix(name, "./") {
		name = strings.TrimLeft(name[2:], "/")
	}
	bad := func(why string) (string, error) { return "", refused(op, why+"; "+inboxNameRule) }
	switch {
	case name == "":
		return bad("no file named")
	case !utf8.ValidString(name) || strings.ContainsFunc(name, unicode.IsControl):
		return bad("the name holds control characters or is not UTF-8")
	case strings.ContainsFunc(name, func(r rune) bool { return unicode.Is(unicode.Cf, r) }):
		return bad("the name holds invisible format characters (bidirectional overrides, zero-width marks), which would show it as another name")
	case strings.HasPrefix(name, "/") || strings.HasPrefix(name, `\`) || filepath.IsAbs(name):
		return bad("absolute paths are refused")
	case name == "." || name == ".." || strings.HasPrefix(name, "../") || strings.HasSuffix(name, "/..") || strings.Contains(name, "/../"):
		return bad("'..' would leave your inbox")
	case strings.ContainsAny(name, `/\`):
		return bad("the inbox has no folders")
	case len(name) >= 2 && name[1] == ':':
		return bad("drive letters are refused")
	case len(name) > maxInboxName:
		return bad(fmt.Sprintf("the name has %d bytes, at most %d are allowed", len(name), maxInboxName))
	case name[0] == '.':
		return bad("hidden names (starting with '.') are refused")
	case name[0] == '-':
		return bad("names starting with '-' are refused")
	}
	return name, nil
}

// quoteName quotes a checked plain name for a message, cut to 60 bytes.
func quoteName(name string) string {
	if len(name) > 60 {
		n := 60
		for n > 0 && !utf8.RuneStart(name[n]) {
			n--
		}
		name = name[:n] + "..."
	}
	return fmt.Sprintf("%q", name)
}

// Inbox is one user's inbox, open for the length of a connection. Its
// methods are safe for concurrent use; Close releases the folder.
type Inbox struct {
	root *os.Root
	lim  InboxLimits
	q    *inboxQuota
}

// InboxRoot returns DATA/users/USER/inbox for user (a valid name).
func InboxRoot(dataRoot, user string) (string, error) {
	root, err := UserStoreRoot(dataRoot, user)
	if err != nil {
		return "", err
	}
	return filepath.Join(root, inboxDir), nil
}

// OpenInbox opens user's inbox under dataRoot, creating it (and the
// user's folder) with mode 0700 whatever the umask.
func OpenInbox(dataRoot, user string, lim InboxLimits) (*Inbox, error) {
	dir, err := InboxRoot(dataRoot, user)
	if err != nil {
		return nil, err
	}
	if err := mkdirPrivate(dir); err != nil {
		return nil, errors.New("the inbox folder cannot be created on the server; ask the administrator")
	}
	fi, err := os.Lstat(dir)
	if err != nil || !fi.IsDir() {
		return nil, errors.New("the inbox is not a folder on the server; ask the administrator")
	}
	if fi.Mode().Perm() != 0o700 {
		if err := os.Chmod(dir, 0o700); err != nil {
			return nil, errors.New("the inbox folder's mode cannot be set to 0700; ask the administrator")
		}
	}
	r, err := os.OpenRoot(dir)
	if err != nil {
		return nil, errors.New("the inbox folder cannot be opened on the server; ask the administrator")
	}
	quotas := lim.Quotas
	if quotas == nil {
		quotas = NewInboxQuotas()
	}
	return &Inbox{root: r, lim: lim.withDefaults(), q: quotas.forDir(dir)}, nil
}

// Close releases the inbox.
func (in *Inbox) Close() error { return in.root.Close() }

// ServedMaxRows caps the data rows of one import from an inbox (a fifth of
// the importer's own cap): a served user's data sets live in the server's
// memory beside every other user's, about 170 bytes a row once imported
// and fitted.
const ServedMaxRows = 200_000

// RowLimit is the data-row cap of an import from the inbox (ServedMaxRows;
// model/fit reads it).
func (in *Inbox) RowLimit() int { return ServedMaxRows }

// ServedMaxPoints caps the points of every data set of one served
// workbench together (five imports at the cap, about 170 MB): imports are
// held in the server's memory for as long as the connection lasts, and
// the same file may be imported again and again.
const ServedMaxPoints = 5 * ServedMaxRows

// PointLimit is the cap on a served workbench's points in all
// (ServedMaxPoints; the workbench reads it).
func (in *Inbox) PointLimit() int { return ServedMaxPoints }

// Limits returns the caps in force.
func (in *Inbox) Limits() InboxLimits { return in.lim }

// lstat checks name and returns its information, refusing symbolic links
// and anything but a regular file.
func (in *Inbox) lstat(op, given string) (string, fs.FileInfo, error) {
	name, err := InboxName(op, given)
	if err != nil {
		return "", nil, err
	}
	fi, err := in.root.Lstat(name)
	if errors.Is(err, fs.ErrNotExist) {
		return name, nil, &InboxError{Op: op, Why: "no file " + quoteName(name) + " in your inbox", Err: fs.ErrNotExist}
	}
	if err != nil {
		return name, nil, refused(op, quoteName(name)+" cannot be read")
	}
	switch {
	case fi.Mode()&fs.ModeSymlink != 0:
		return name, nil, refused(op, quoteName(name)+" is a symbolic link; links are refused in the inbox")
	case !fi.Mode().IsRegular():
		return name, nil, refused(op, quoteName(name)+" is not a regular file")
	}
	return name, fi, nil
}

// Stat returns the information of the regular file name.
func (in *Inbox) Stat(given string) (fs.FileInfo, error) {
	_, fi, err := in.lstat("stat", given)
	return fi, err
}

// Open opens the regular file name for reading (the workbench's import
// and batch, downloads).
func (in *Inbox) Open(given string) (fs.File, error) {
	name, fi, err := in.lstat("open", given)
	if err != nil {
		return nil, err
	}
	f, err := in.root.Open(name)
	if err != nil {
		return nil, refused("open", quoteName(name)+" cannot be opened")
	}
	// The name must still be the file checked (no swap for a link).
	if got, err := f.Stat(); err != nil || !os.SameFile(fi, got) {
		f.Close()
		return nil, refused("open", quoteName(name)+" changed while it was opened; try again")
	}
	return f, nil
}

// List returns the regular files of the inbox, sorted by name; symbolic
// links, folders and hidden names are left out. At most 10000 files are
// listed.
func (in *Inbox) List() ([]fs.FileInfo, error) {
	d, err := in.root.Open(".")
	if err != nil {
		return nil, refused("list", "the inbox cannot be read")
	}
	defer d.Close()
	var out []fs.FileInfo
	for len(out) < MaxInboxFiles {
		ents, err := d.ReadDir(256)
		for _, e := range ents {
			if !e.Type().IsRegular() || strings.HasPrefix(e.Name(), ".") {
				continue
			}
			if fi, err := e.Info(); err == nil {
				out = append(out, fi)
			}
		}
		if err == io.EOF || len(ents) == 0 {
			break
		}
		if err != nil {
			return nil, refused("list", "the inbox cannot be read")
		}
	}
	if len(out) > MaxInboxFiles {
		out = out[:MaxInboxFiles]
	}
	slices.SortFunc(out, func(a, b fs.FileInfo) int { return strings.Compare(a.Name(), b.Name()) })
	return out, nil
}

// ReadDir lists the inbox for the workbench's batch screen: dir must be
// "", "." or "inbox" (the inbox itself has no folders).
func (in *Inbox) ReadDir(dir string) ([]fs.DirEntry, error) {
	switch strings.TrimSpace(dir) {
	case "", ".", "./":
	default:
		return nil, refused("list", "the inbox has no folders; leave the folder empty (or type .) to use your inbox")
	}
	fis, err := in.List()
	if err != nil {
		return nil, err
	}
	out := make([]fs.DirEntry, len(fis))
	for i, fi := range fis {
		out[i] = fs.FileInfoToDirEntry(fi)
	}
	return out, nil
}

func mib(n int64) string {
	if n%(1<<20) == 0 {
		return fmt.Sprintf("%d MiB", n>>20)
	}
	return fmt.Sprintf("%d bytes", n)
}

func flagNote(flag string) string {
	if flag == "" {
		return ""
	}
	return " (the server's " + flag + ")"
}

// fileCapError and userCapError name the limit crossed.
func (in *Inbox) fileCapError(name string) error {
	return refused("upload", fmt.Sprintf("%s: a file may hold at most %s%s", quoteName(name), mib(in.lim.FileBytes), flagNote(in.lim.FileFlag)))
}

func (in *Inbox) userCapError(name string, used int64) error {
	return refused("upload", fmt.Sprintf("%s: your inbox may hold at most %s in all%s and already holds %d bytes; remove files first", quoteName(name), mib(in.lim.UserBytes), flagNote(in.lim.UserFlag), used))
}

// Create opens name for writing, empty (an existing regular file of that
// name is replaced; a link or folder is refused). size is the size the
// client announced, or -1: an announced size over a cap is refused at
// once. The writer refuses any write past the per-file cap or the
// per-user cap, which counts every file of the inbox and every upload in
// progress to it (see InboxQuotas); an inbox holds at most MaxInboxFiles
// files, and a name being uploaded is not uploaded again until that
// upload ends. A file whose upload failed or crossed a cap is removed at
// Close.
func (in *Inbox) Create(given string, size int64) (*InboxWriter, error) {
	return in.create(given, size, false)
}

// create is Create; with exclusive, a name that exists is refused under
// the inbox's lock and the file is created exclusively (O_EXCL), so that
// nothing, an upload finishing at that moment included, is replaced.
func (in *Inbox) create(given string, size int64, exclusive bool) (*InboxWriter, error) {
	name, err := InboxName("upload", given)
	if err != nil {
		return nil, err
	}
	q := in.q
	q.mu.Lock()
	defer q.mu.Unlock()
	if q.open[name] != nil {
		return nil, busyError("upload", name)
	}
	var old int64
	exists := false
	if fi, err := in.root.Lstat(name); err == nil {
		if fi.Mode()&fs.ModeSymlink != 0 {
			return nil, refused("upload", quoteName(name)+" is a symbolic link; links are refused in the inbox")
		}
		if !fi.Mode().IsRegular() {
			return nil, refused("upload", quoteName(name)+" is not a regular file")
		}
		old, exists = fi.Size(), true
	}
	if exists && exclusive {
		return nil, existsError(given)
	}
	files, used, err := in.scan()
	if err != nil {
		return nil, err
	}
	if !exists && files >= MaxInboxFiles {
		return nil, in.countCapError(name)
	}
	others := max(used-old, 0)
	if size > in.lim.FileBytes {
		return nil, in.fileCapError(name)
	}
	if size >= 0 && others+size > in.lim.UserBytes {
		return nil, in.userCapError(name, others)
	}
	flags := os.O_WRONLY | os.O_CREATE | os.O_TRUNC
	if exclusive {
		flags = os.O_WRONLY | os.O_CREATE | os.O_EXCL
	}
	f, err := in.root.OpenFile(name, flags, 0o600)
	if exclusive && errors.Is(err, fs.ErrExist) {
		return nil, existsError(given)
	}
	if err != nil {
		return nil, refused("upload", quoteName(name)+" cannot be written")
	}
	if fi, err := f.Stat(); err != nil || !fi.Mode().IsRegular() {
		f.Close()
		return nil, refused("upload", quoteName(name)+" is not a regular file")
	}
	q.used = others
	w := &InboxWriter{in: in, f: f, name: name}
	q.open[name] = w
	return w, nil
}

// InboxWriter is an upload in progress (io.Writer for the scp protocol,
// io.WriterAt for SFTP).
type InboxWriter struct {
	in   *Inbox
	f    *os.File
	name string

	mu     sync.Mutex
	off    int64 // next offset of Write
	size   int64 // the file's size so far (counted in the inbox's quota)
	err    error // first failure: the file is removed at Close
	closed bool
}

// WriteAt writes p at off, within the caps. The per-user cap counts the
// bytes of every file of the inbox and of every upload in progress.
func (w *InboxWriter) WriteAt(p []byte, off int64) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.err != nil {
		return 0, w.err
	}
	if w.closed {
		return 0, refused("upload", quoteName(w.name)+" is closed")
	}
	if off < 0 {
		return 0, refused("upload", "negative offset")
	}
	end := off + int64(len(p))
	q := w.in.q
	q.mu.Lock()
	defer q.mu.Unlock()
	if end > w.in.lim.FileBytes {
		w.err = w.in.fileCapError(w.name)
		w.giveBack()
		return 0, w.err
	}
	if grow := end - w.size; grow > 0 && q.used+grow > w.in.lim.UserBytes {
		w.err = w.in.userCapError(w.name, max(q.used-w.size, 0))
		w.giveBack()
		return 0, w.err
	}
	n, err := w.f.WriteAt(p, off)
	if got := off + int64(n); got > w.size {
		q.used += got - w.size
		w.size = got
	}
	if err != nil {
		w.err = refused("upload", quoteName(w.name)+" could not be written (the server's disk may be full)")
		return n, w.err
	}
	return n, nil
}

// giveBack empties a failed upload's file at once (Close removes it), so
// that uploads going on at the same time may use its bytes. The caller
// holds w.mu and the quota's lock.
func (w *InboxWriter) giveBack() {
	if w.f.Truncate(0) == nil {
		w.in.q.used = max(w.in.q.used-w.size, 0)
		w.size = 0
	}
}

// Write appends p.
func (w *InboxWriter) Write(p []byte) (int, error) {
	n, err := w.WriteAt(p, w.off)
	w.off += int64(n)
	return n, err
}

// Fail marks the upload failed: Close removes the file.
func (w *InboxWriter) Fail(err error) {
	w.mu.Lock()
	if w.err == nil {
		w.err = err
	}
	w.mu.Unlock()
}

// TransferError is called by the SFTP server when a transfer breaks off.
func (w *InboxWriter) TransferError(err error) { w.Fail(err) }

// Close ends the upload; after a failure the partial file is removed and
// the failure returned.
func (w *InboxWriter) Close() error {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.closed {
		return w.err
	}
	w.closed = true
	cerr := w.f.Close()
	if w.err == nil && cerr != nil {
		w.err = refused("upload", quoteName(w.name)+" could not be written (the server's disk may be full)")
	}
	q := w.in.q
	q.mu.Lock()
	defer q.mu.Unlock()
	if q.open[w.name] == w {
		delete(q.open, w.name)
	}
	if w.err != nil {
		if w.in.root.Remove(w.name) == nil {
			q.used = max(q.used-w.size, 0)
		}
	}
	return w.err
}

// Remove deletes the regular file name (links are removed too: removing
// one touches only the link). A file being uploaded is not removed.
func (in *Inbox) Remove(given string) error {
	name, err := InboxName("remove", given)
	if err != nil {
		return err
	}
	q := in.q
	q.mu.Lock()
	defer q.mu.Unlock()
	if q.open[name] != nil {
		return busyError("remove", name)
	}
	fi, err := in.root.Lstat(name)
	if errors.Is(err, fs.ErrNotExist) {
		return &InboxError{Op: "remove", Why: "no file " + quoteName(name) + " in your inbox", Err: fs.ErrNotExist}
	}
	if err != nil || fi.IsDir() {
		return refused("remove", quoteName(name)+" is not a file of your inbox")
	}
	if err := in.root.Remove(name); err != nil {
		return refused("remove", quoteName(name)+" could not be removed")
	}
	if fi.Mode().IsRegular() {
		q.used = max(q.used-fi.Size(), 0)
	}
	return nil
}

// Rename renames the regular file from to the name to; an existing to is
// replaced only when replace is set. Neither may be a file being
// uploaded.
func (in *Inbox) Rename(from, to string, replace bool) error {
	src, _, err := in.lstat("rename", from)
	if err != nil {
		return err
	}
	dst, err := InboxName("rename", to)
	if err != nil {
		return err
	}
	q := in.q
	q.mu.Lock()
	defer q.mu.Unlock()
	for _, n := range []string{src, dst} {
		if q.open[n] != nil {
			return busyError("rename", n)
		}
	}
	var replaced int64
	if fi, err := in.root.Lstat(dst); err == nil {
		if !replace || !fi.Mode().IsRegular() {
			return &InboxError{Op: "rename", Why: quoteName(dst) + " exists", Err: fs.ErrExist}
		}
		if dst != src {
			replaced = fi.Size()
		}
	}
	if err := in.root.Rename(src, dst); err != nil {
		return refused("rename", quoteName(src)+" could not be renamed")
	}
	q.used = max(q.used-replaced, 0)
	return nil
}

// CreateNew creates a file in the inbox for an export from the served
// workbench, under the inbox's name policy and caps, refusing a name that
// exists (model.FileWriter).
func (in *Inbox) CreateNew(given string) (io.WriteCloser, error) {
	return in.create(given, -1, true)
}

// existsError refuses to replace an inbox file (CreateNew).
func existsError(given string) error {
	return fmt.Errorf("%s exists in your inbox; nothing was written", Printable(given, 64, ""))
}
