package sessions

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"syscall"
)

// fileSystem is every file operation the store performs. The store uses
// osFS; tests wrap it to fail any chosen operation and check that a save
// interrupted at any step loses nothing.
type fileSystem interface {
	// MkdirAll creates dir and its missing parents private to the owner
	// (dirMode, whatever the umask).
	MkdirAll(dir string) error
	// CreateTemp creates a new file in dir with a unique name from pattern
	// (as os.CreateTemp), opened for writing.
	CreateTemp(dir, pattern string) (tempFile, error)
	// Link makes newname a second name of oldname; it fails with an error
	// matching fs.ErrExist when newname exists, which is how a revision
	// number is claimed exclusively.
	Link(oldname, newname string) error
	Rename(oldname, newname string) error
	Remove(name string) error
	// SyncDir flushes a directory's entries to stable storage.
	SyncDir(dir string) error
	ReadDir(dir string) ([]fs.DirEntry, error)
	// ReadFile reads at most limit bytes of name and reports whether the
	// file is longer.
	ReadFile(name string, limit int64) (data []byte, more bool, err error)
	Stat(name string) (fs.FileInfo, error)
}

// tempFile is a file being written.
type tempFile interface {
	Name() string
	Write(p []byte) (int, error)
	Chmod(mode fs.FileMode) error
	Sync() error
	Close() error
}

// osFS is the real file system.
type osFS struct{}

func (osFS) MkdirAll(dir string) error { return mkdirPrivate(dir) }

// mkdirPrivate creates dir and every missing parent with mode dirMode,
// set explicitly after each create so that no umask widens or narrows
// it. Directories that exist are left as they are (tightenModes deals
// with those). Another process creating the same directory at the same
// time is not an error.
func mkdirPrivate(dir string) error {
	info, err := os.Stat(dir)
	if err == nil {
		if !info.IsDir() {
			return &fs.PathError{Op: "mkdir", Path: dir, Err: syscall.ENOTDIR}
		}
		return nil
	}
	if !errors.Is(err, fs.ErrNotExist) {
		return err
	}
	if parent := filepath.Dir(dir); parent != dir {
		if err := mkdirPrivate(parent); err != nil {
			return err
		}
	}
	if err := os.Mkdir(dir, dirMode); err != nil {
		if errors.Is(err, fs.ErrExist) {
			if info, serr := os.Stat(dir); serr == nil && info.IsDir() {
				return nil
			}
		}
		return err
	}
	return os.Chmod(dir, dirMode)
}

func (osFS) CreateTemp(dir, pattern string) (tempFile, error) { return os.CreateTemp(dir, pattern) }

func (osFS) Link(oldname, newname string) error { return os.Link(oldname, newname) }

func (osFS) Rename(oldname, newname string) error { return os.Rename(oldname, newname) }

func (osFS) Remove(name string) error { return os.Remove(name) }

func (osFS) SyncDir(dir string) error {
	f, err := os.Open(dir)
	if err != nil {
		return err
	}
	err = f.Sync()
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	// Some file systems cannot sync a directory; the rename or link is
	// still atomic there, only its durability is up to the system.
	if errors.Is(err, errors.ErrUnsupported) {
		return nil
	}
	return err
}

func (osFS) ReadDir(dir string) ([]fs.DirEntry, error) { return os.ReadDir(dir) }

func (osFS) Stat(name string) (fs.FileInfo, error) { return os.Stat(name) }

func (osFS) ReadFile(name string, limit int64) ([]byte, bool, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, false, err
	}
	defer f.Close()
	info, err := f.Stat()
	if err != nil {
		return nil, false, err
	}
	if !info.Mode().IsRegular() {
		return nil, false, fmt.Errorf("not a regular file (%s)", info.Mode().Type())
	}
	size := info.Size()
	n := min(size, limit)
	buf := make([]byte, n)
	got, err := io.ReadFull(f, buf)
	if err != nil && !errors.Is(err, io.ErrUnexpectedEOF) {
		return nil, false, err
	}
	return buf[:got], size > limit, nil
}
