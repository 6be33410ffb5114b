package serve

import (
	"bufio"
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"encoding/pem"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"time"

	gossh "golang.org/x/crypto/ssh"
)

// userNamePattern is what a user name (the comment of an authorized key)
// may contain: letters, digits, '.', '_' and '-', 1 to 64 characters, not
// starting with '.' or '-' (so that it is always a safe directory name).
var userNamePattern = regexp.MustCompile(`^[A-Za-z0-9_][A-Za-z0-9._-]{0,63}$`)

// ValidUserName reports whether name may name a user.
func ValidUserName(name string) bool {
	return userNamePattern.MatchString(name) && name != "." && name != ".."
}

// authorizedKey is one usable line of the authorized-keys file.
type authorizedKey struct {
	user        string
	key         gossh.PublicKey
	fingerprint string
}

// keyring holds the parsed authorized-keys file and re-reads it when it
// changes on disk (checked at every login) or on Reload.
type keyring struct {
	path string
	logf func(format string, args ...any)

	mu      sync.Mutex
	modTime time.Time
	size    int64
	keys    []authorizedKey
	loaded  bool
}

func newKeyring(path string, logf func(string, ...any)) (*keyring, error) {
	k := &keyring{path: path, logf: logf}
	if err := k.reload(true); err != nil {
		return nil, err
	}
	return k, nil
}

// reload re-reads the file when force is set or its size or modification
// time changed. A file that cannot be read locks everyone out (and says so
// in the log) rather than keeping stale keys.
func (k *keyring) reload(force bool) error {
	k.mu.Lock()
	defer k.mu.Unlock()
	st, err := os.Stat(k.path)
	if err != nil {
		if k.loaded || force {
			k.logf("authorized keys %s unreadable (%v): refusing every login until it is fixed", k.path, err)
		}
		k.keys, k.loaded = nil, true
		k.modTime, k.size = time.Time{}, -1
		return fmt.Errorf("authorized keys: %w", err)
	}
	if !force && k.loaded && st.ModTime().Equal(k.modTime) && st.Size() == k.size {
		return nil
	}
	data, err := os.ReadFile(k.path)
	if err != nil {
		k.keys, k.loaded = nil, true
		return fmt.Errorf("authorized keys: %w", err)
	}
	keys, problems := parseAuthorizedKeys(data)
	for _, p := range problems {
		k.logf("authorized keys %s: %s", k.path, p)
	}
	k.keys, k.loaded, k.modTime, k.size = keys, true, st.ModTime(), st.Size()
	k.logf("authorized keys %s: %d key(s) for %d user(s)", k.path, len(keys), countUsers(keys))
	return nil
}

func countUsers(keys []authorizedKey) int {
	seen := map[string]bool{}
	for _, k := range keys {
		seen[k.user] = true
	}
	return len(seen)
}

// parseAuthorizedKeys reads the OpenSSH authorized-keys format. Each usable
// line's comment names the key's user. Lines that do not parse, or whose
// comment is not a valid user name, are skipped and reported; they never
// lock out the other users.
func parseAuthorizedKeys(data []byte) ([]authorizedKey, []string) {
	var keys []authorizedKey
	var problems []string
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64*1024), 1024*1024)
	line := 0
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" || strings.HasPrefix(text, "#") {
			continue
		}
		pub, comment, _, _, err := gossh.ParseAuthorizedKey([]byte(text))
		if err != nil {
			problems = append(problems, fmt.Sprintf("line %d skipped: %v", line, err))
			continue
		}
		user := strings.TrimSpace(comment)
		if !ValidUserName(user) {
			problems = append(problems, fmt.Sprintf("line %d skipped: the comment %q must name the user (letters, digits, '.', '_', '-')", line, user))
			continue
		}
		keys = append(keys, authorizedKey{user: user, key: pub, fingerprint: gossh.FingerprintSHA256(pub)})
	}
	if err := sc.Err(); err != nil {
		problems = append(problems, err.Error())
	}
	return keys, problems
}

// lookup returns the user a key belongs to, re-reading the file first if it
// changed.
func (k *keyring) lookup(key gossh.PublicKey) (string, bool) {
	_ = k.reload(false)
	k.mu.Lock()
	defer k.mu.Unlock()
	m := key.Marshal()
	for _, a := range k.keys {
		if bytes.Equal(a.key.Marshal(), m) {
			return a.user, true
		}
	}
	return "", false
}

// users returns the sorted distinct user names currently authorised.
func (k *keyring) users() []string {
	_ = k.reload(false)
	k.mu.Lock()
	defer k.mu.Unlock()
	seen := map[string]bool{}
	var out []string
	for _, a := range k.keys {
		if !seen[a.user] {
			seen[a.user] = true
			out = append(out, a.user)
		}
	}
	return out
}

// loadOrCreateHostKey reads the ed25519 host key at path, creating it (mode
// 0600, its directory 0700 if new) on first start.
func loadOrCreateHostKey(path string) (gossh.Signer, bool, error) {
	data, err := os.ReadFile(path)
	if err == nil {
		s, err := gossh.ParsePrivateKey(data)
		if err != nil {
			return nil, false, fmt.Errorf("host key %s: %w", path, err)
		}
		return s, false, nil
	}
	if !errors.Is(err, os.ErrNotExist) {
		return nil, false, fmt.Errorf("host key %s: %w", path, err)
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o700); err != nil {
		return nil, false, fmt.Errorf("host key directory: %w", err)
	}
	_, priv, err := ed25519.GenerateKey(rand.Reader)
	if err != nil {
		return nil, false, err
	}
	block, err := gossh.MarshalPrivateKey(priv, "junco host key")
	if err != nil {
		return nil, false, err
	}
	f, err := os.OpenFile(path, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return nil, false, fmt.Errorf("host key %s: %w", path, err)
	}
	if _, err := f.Write(pem.EncodeToMemory(block)); err != nil {
		f.Close()
		return nil, false, err
	}
	if err := f.Sync(); err != nil {
		f.Close()
		return nil, false, err
	}
	if err := f.Close(); err != nil {
		return nil, false, err
	}
	s, err := gossh.NewSignerFromKey(priv)
	return s, true, err
}
