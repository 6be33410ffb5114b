package model

import (
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
