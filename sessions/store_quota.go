package sessions

import (
	"fmt"
	"io/fs"
	"path/filepath"
	"strings"
)

// StoreQuotaError refuses a write that would take a store past its cap
// (Options.MaxBytes): a served user's revisions, drafts and review notes
// share the server's disk with every other user.
type StoreQuotaError struct {
	Used, Adding, Limit int64
	Flag                string // the server option that sets the cap, or ""
}

func (e *StoreQuotaError) Error() string {
	return fmt.Sprintf("your sessions hold %s and this would add %s, over the %s a user may keep on this server%s; ask the administrator to make room",
		sizeText(e.Used), sizeText(e.Adding), sizeText(e.Limit), flagNote(e.Flag))
}

func sizeText(n int64) string {
	if n >= 1<<20 {
		return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
	}
	return fmt.Sprintf("%d bytes", n)
}

// checkQuota refuses to write adding bytes when the store's files (every
// regular file under its root but the inbox, which has caps of its own)
// would then hold more than MaxBytes. A store without a cap writes
// anything.
func (s *Store) checkQuota(adding int64) error {
	if s.maxBytes <= 0 {
		return nil
	}
	var used int64
	err := filepath.WalkDir(s.root, func(path string, d fs.DirEntry, err error) error {
		if err != nil {
			return nil // a folder that vanished or cannot be read counts nothing
		}
		if d.IsDir() && path == filepath.Join(s.root, inboxDir) {
			return filepath.SkipDir
		}
		if d.Type().IsRegular() {
			if fi, err := d.Info(); err == nil {
				used += fi.Size()
			}
		}
		return nil
	})
	if err != nil {
		return err
	}
	if used+adding > s.maxBytes {
		return &StoreQuotaError{Used: used, Adding: adding, Limit: s.maxBytes, Flag: s.maxBytesFlag}
	}
	return nil
}

// inStore reports whether dir lies in the store (exports write elsewhere).
func (s *Store) inStore(dir string) bool {
	rel, err := filepath.Rel(s.root, dir)
	return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
}
