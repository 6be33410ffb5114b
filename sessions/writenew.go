package sessions

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// File is one file to write: its name (no directory) and content.
type File struct {
	Name string
	Data []byte
}

// WriteNew writes files into dir (created if missing) without replacing
// anything: if any of the names exists, nothing is written and the error
// names it. Each file is written to a temporary name, flushed and linked
// to its name, so a file that appears is complete. It returns the paths
// written.
func WriteNew(dir string, files []File) ([]string, error) {
	for _, f := range files {
		if f.Name == "" || f.Name != filepath.Base(f.Name) || strings.HasPrefix(f.Name, ".") {
			return nil, fmt.Errorf("export: %q is not a plain file name", f.Name)
		}
		if _, err := os.Lstat(filepath.Join(dir, f.Name)); err == nil {
			return nil, fmt.Errorf("export: %s exists; nothing was written (choose another --out directory or move the file)", filepath.Join(dir, f.Name))
		}
	}
	fsys := osFS{}
	if err := os.MkdirAll(dir, 0o755); err != nil { // the user's folder: ordinary modes
		return nil, fmt.Errorf("export: %w", err)
	}
	st := &Store{fs: fsys}
	var written []string
	for _, f := range files {
		tmp, err := st.writeTemp(dir, f.Data, exportMode)
		if err != nil {
			return written, fmt.Errorf("export: %w", err)
		}
		dst := filepath.Join(dir, f.Name)
		err = fsys.Link(tmp, dst)
		fsys.Remove(tmp)
		if err != nil {
			if errors.Is(err, fs.ErrExist) {
				return written, fmt.Errorf("export: %s appeared while exporting; it was left as it is", dst)
			}
			return written, fmt.Errorf("export: %w", err)
		}
		written = append(written, dst)
	}
	if err := fsys.SyncDir(dir); err != nil {
		return written, fmt.Errorf("export: flushing %s: %w", dir, err)
	}
	return written, nil
}
