package serve

import (
	"bufio"
	"bytes"
	"crypto/ed25519"
	"crypto/rand"
	"crypto/sha256"
	"encoding/pem"
	"errors"
	"fmt"
	"io"
	"net/netip"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"

	gossh "golang.org/x/crypto/ssh"
)

// ValidUserName reports whether name may name a user (the comment of an
// authorized key): letters, digits, '.', '_' and '-', 1 to 64 characters,
// not starting with '.' or '-' (so that it is always a safe directory
// name); the pattern ^[A-Za-z0-9_][A-Za-z0-9._-]{0,63}$ checked by hand,
// because a compiled regular expression with that repetition costs every
// junco command 0.2 ms and 860 allocations at start-up.
func ValidUserName(name string) bool {
	if len(name) < 1 || len(name) > 64 {
		return false
	}
	for k := 0; k < len(name); k++ {
		c := name[k]
		ok := c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '_' ||
			k > 0 && (c == '.' || c == '-')
		if !ok {
			return false
		}
	}
	return true
}

// authorizedKey is one usable line of the authorized-keys file.
type authorizedKey struct {
	user        string
	key         gossh.PublicKey
	fingerprint string
	line        int // 1-based line number in the file, for log lines
	opts        keyOptions
}

// terms describes what a live session of this line may do; a reload that
// changes them for a connected key closes that connection.
func (a authorizedKey) terms() string {
	return fmt.Sprintf("pty=%t command=%q", !a.opts.noPTY, a.opts.command)
}

// maxKeysFileBytes bounds the authorized-keys file read into memory.
const maxKeysFileBytes = 4 << 20

// keyring holds the parsed authorized-keys file. It re-reads the file when
// its content changes (compared by SHA-256, never by size or modification
// time) and calls changed after every reload that changed the keys.
type keyring struct {
	path    string
	logf    func(format string, args ...any)
	loc     *time.Location
	changed func()

	mu     sync.Mutex
	sum    [sha256.Size]byte
	keys   []authorizedKey
	loaded bool
}

func newKeyring(path string, logf func(string, ...any)) (*keyring, error) {
	k := &keyring{path: path, logf: logf, loc: time.Local}
	if err := k.reload(true); err != nil {
		return nil, err
	}
	return k, nil
}

// reload re-reads the file; unless force is set, it parses and logs only
// when the content differs from the last read. A file that cannot be read
// (or is larger than maxKeysFileBytes) locks everyone out, and says so in
// the log, rather than keeping stale keys.
func (k *keyring) reload(force bool) error {
	data, err := readBounded(k.path, maxKeysFileBytes)
	k.mu.Lock()
	if err != nil {
		wasLoaded := k.loaded && k.keys != nil
		if wasLoaded || force {
			k.logf("authorized keys %s unreadable (%v): refusing every login until it is fixed", k.path, err)
		}
		// Live connections are left alone: a file being replaced may be
		// missing for a moment, and closing them needs a readable file
		// that no longer lists their key.
		k.keys, k.loaded, k.sum = nil, true, [sha256.Size]byte{}
		k.mu.Unlock()
		return fmt.Errorf("authorized keys: %w", err)
	}
	sum := sha256.Sum256(data)
	if !force && k.loaded && k.keys != nil && sum == k.sum {
		k.mu.Unlock()
		return nil
	}
	keys, problems := parseAuthorizedKeys(data, k.loc)
	for _, p := range problems {
		k.logf("authorized keys %s: %s", k.path, p)
	}
	changed := k.loaded && sum != k.sum
	if keys == nil {
		keys = []authorizedKey{}
	}
	k.keys, k.loaded, k.sum = keys, true, sum
	k.logf("authorized keys %s: %d key(s) for %d user(s)", k.path, len(keys), countUsers(keys))
	k.mu.Unlock()
	if changed {
		k.notify()
	}
	return nil
}

func (k *keyring) notify() {
	if k.changed != nil {
		k.changed()
	}
}

// readBounded reads a whole file of at most limit bytes.
func readBounded(path string, limit int64) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, limit+1))
	if err != nil {
		return nil, err
	}
	if int64(len(data)) > limit {
		return nil, fmt.Errorf("larger than the limit of %d bytes", limit)
	}
	return data, nil
}

func countUsers(keys []authorizedKey) int {
	seen := map[string]bool{}
	for _, k := range keys {
		seen[k.user] = true
	}
	return len(seen)
}

// parseAuthorizedKeys reads the OpenSSH authorized-keys format. Each usable
// line's comment names the key's user; its options are those of
// parseKeyOptions. Lines that do not parse, whose comment is not a valid
// user name or that carry an option the server does not implement are
// refused and reported with their line number; they never lock out the
// other users.
func parseAuthorizedKeys(data []byte, loc *time.Location) ([]authorizedKey, []string) {
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
		pub, comment, options, _, err := gossh.ParseAuthorizedKey([]byte(text))
		if err != nil {
			problems = append(problems, fmt.Sprintf("line %d refused: %v", line, err))
			continue
		}
		user := strings.TrimSpace(comment)
		if !ValidUserName(user) {
			problems = append(problems, fmt.Sprintf("line %d refused: the comment %q must name the user (letters, digits, '.', '_', '-')", line, user))
			continue
		}
		opts, err := parseKeyOptions(options, loc)
		if err != nil {
			problems = append(problems, fmt.Sprintf("line %d (%s) refused: %v", line, user, err))
			continue
		}
		keys = append(keys, authorizedKey{user: user, key: pub, fingerprint: gossh.FingerprintSHA256(pub), line: line, opts: opts})
	}
	if err := sc.Err(); err != nil {
		problems = append(problems, fmt.Sprintf("after line %d: %v (lines are limited to 1 MiB)", line, err))
	}
	return keys, problems
}

// errNotAuthorised is wrapped by every refusal of authorise.
var errNotAuthorised = errors.New("not authorised")

// authorise returns the first line that lets key log in as login from addr
// at now: the key is listed, its comment names login, its from= list
// admits addr and it has not expired. It does not re-read the file.
func (k *keyring) authorise(key gossh.PublicKey, login string, addr netip.Addr, now time.Time) (authorizedKey, error) {
	k.mu.Lock()
	defer k.mu.Unlock()
	m := key.Marshal()
	var why error
	for _, a := range k.keys {
		if !bytes.Equal(a.key.Marshal(), m) {
			continue
		}
		switch {
		case a.user != login:
			why = fmt.Errorf("%w: key belongs to another user (line %d names %s)", errNotAuthorised, a.line, a.user)
		case !a.opts.permitsFrom(addr):
			why = fmt.Errorf("%w: from= on line %d does not admit %s", errNotAuthorised, a.line, addr)
		case !a.opts.expiry.IsZero() && !now.Before(a.opts.expiry):
			why = fmt.Errorf("%w: key on line %d expired at %s", errNotAuthorised, a.line, a.opts.expiry.UTC().Format(time.RFC3339))
		default:
			return a, nil
		}
	}
	if why == nil {
		why = fmt.Errorf("%w: unknown key", errNotAuthorised)
	}
	return authorizedKey{}, why
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
	sort.Strings(out)
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
