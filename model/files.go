package model

import (
	"io"
	"io/fs"
	"os"
)

// Files is where the workbench reads measurement files from: the local
// file system (LocalFiles) or, on a server, the user's inbox
// (sessions.Inbox), which opens nothing outside it. Open opens a file for
// reading; ReadDir lists a folder. Their errors are shown to the user.
type Files interface {
	Open(name string) (fs.File, error)
	ReadDir(name string) ([]fs.DirEntry, error)
}

// LocalFiles is the local file system, reached with the rights of the
// user who runs junco.
type LocalFiles struct{}

// Open opens the file at path.
func (LocalFiles) Open(path string) (fs.File, error) { return os.Open(path) }

// ReadDir lists the folder at path.
func (LocalFiles) ReadDir(path string) ([]fs.DirEntry, error) { return os.ReadDir(path) }

// FileWriter is a file access that can also create a file, for exports
// from the workbench: the local file system, or a served user's inbox.
type FileWriter interface {
	// CreateNew creates the file name, refusing one that exists.
	CreateNew(name string) (io.WriteCloser, error)
}

// CreateNew creates the file at path, refusing to replace one (mode 0644:
// the user's own folder, ordinary modes).
func (LocalFiles) CreateNew(path string) (io.WriteCloser, error) {
	return os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o644)
}
