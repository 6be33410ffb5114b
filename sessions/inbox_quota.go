package sessions

import (
	"fmt"
	"io"
	"path/filepath"
	"sync"
)

// MaxInboxFiles is the most files one inbox holds: every file costs the
// server an entry however small it is, and the per-user byte cap alone
// would let a user store files without end.
const MaxInboxFiles = 10000

// InboxQuotas holds the per-user accounting of uploads for one server:
// every inbox of one user opened with the same InboxQuotas (in
// InboxLimits.Quotas) counts its uploads against one per-user cap, however
// many connections and open files upload at once. A server makes one with
// NewInboxQuotas and gives it to every OpenInbox; with none, each Inbox
// accounts for its own uploads only.
type InboxQuotas struct {
	mu    sync.Mutex
	users map[string]*inboxQuota
}

// NewInboxQuotas returns an empty accounting for one server.
func NewInboxQuotas() *InboxQuotas {
	return &InboxQuotas{users: map[string]*inboxQuota{}}
}

// forDir returns the accounting of the inbox folder dir.
func (q *InboxQuotas) forDir(dir string) *inboxQuota {
	q.mu.Lock()
	defer q.mu.Unlock()
	key := filepath.Clean(dir)
	u := q.users[key]
	if u == nil {
		u = &inboxQuota{open: map[string]*InboxWriter{}}
		q.users[key] = u
	}
	return u
}

// inboxQuota is one inbox's accounting. Its lock is held while an upload
// starts (the folder is counted again from disk), while a write checks
// and stores its bytes, and while a file is removed or renamed, so that
// used is always the bytes on disk, uploads in progress included.
type inboxQuota struct {
	mu   sync.Mutex
	used int64
	open map[string]*InboxWriter // uploads in progress by name
}

// scan counts the regular files of the inbox and their bytes, all of
// them (hidden ones too), reading the folder in batches so that memory
// stays bounded whatever it holds.
func (in *Inbox) scan() (files int, bytes int64, err error) {
	d, err := in.root.Open(".")
	if err != nil {
		return 0, 0, refused("list", "the inbox cannot be read")
	}
	defer d.Close()
	for {
		ents, err := d.ReadDir(256)
		for _, e := range ents {
			if !e.Type().IsRegular() {
				continue
			}
			if fi, err := e.Info(); err == nil {
				files++
				bytes += fi.Size()
			}
		}
		if err == io.EOF || len(ents) == 0 {
			return files, bytes, nil
		}
		if err != nil {
			return 0, 0, refused("list", "the inbox cannot be read")
		}
	}
}

// Usage returns the bytes held by the inbox's files.
func (in *Inbox) Usage() (int64, error) {
	_, n, err := in.scan()
	return n, err
}

func (in *Inbox) countCapError(name string) error {
	return refused("upload", fmt.Sprintf("%s: your inbox may hold at most %d files (MaxInboxFiles); remove files first", quoteName(name), MaxInboxFiles))
}

func busyError(op, name string) error {
	return refused(op, quoteName(name)+" is being uploaded on another connection; try again when that upload ends")
}
