package cli

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"
	"testing"
	"time"

	tea "github.com/charmbracelet/bubbletea"
	"github.com/charmbracelet/x/ansi"
	"github.com/pkg/sftp"
	gossh "golang.org/x/crypto/ssh"

	"junco/model"
	"junco/sessions"
	"junco/tui/serve"
	"junco/tui/serve/servetest"
)

type sshUser struct {
	name string
	servetest.Key
}

func newSSHUser(t testing.TB, name string) sshUser {
	t.Helper()
	return sshUser{name: name, Key: servetest.NewKey(t, name)}
}

// startJunco runs the real workbench server on loopback with the given users.
func startJunco(t testing.TB, users ...sshUser) (addr, data string, app *serveApp) {
	t.Helper()
	data = t.TempDir()
	var lines []string
	for _, u := range users {
		lines = append(lines, u.Line)
	}
	keys := filepath.Join(data, "authorized_keys")
	writeTestFile(t, keys, []byte(strings.Join(lines, "\n")+"\n"))
	lg := slog.New(slog.NewTextHandler(io.Discard, nil))
	app, err := newServeApp(data, lg)
	if err != nil {
		t.Fatal(err)
	}
	srv, err := serve.New(serve.Config{HostKeyPath: filepath.Join(data, "host", "ed25519"), AuthorizedKeysPath: keys,
		App: app, Logger: lg, MaxConnections: 200, ShutdownMsg: shutdownMsg(), Inbox: app.inbox})
	if err != nil {
		t.Fatal(err)
	}
	return servetest.Serve(t, srv), data, app
}

func sshRun(t testing.TB, addr string, u sshUser, cmd string) (string, string, error) {
	t.Helper()
	s := servetest.Session(t, servetest.Login(t, addr, u.name, u.Key))
	var out, errb bytes.Buffer
	s.Stdout, s.Stderr = &out, &errb
	err := s.Run(cmd)
	return out.String(), errb.String(), err
}

// saveFor stores a session in user's space of the server data directory.
func saveFor(t testing.TB, data, user, name string) {
	t.Helper()
	root, err := sessions.UserStoreRoot(data, user)
	if err != nil {
		t.Fatal(err)
	}
	st, err := sessions.New(root, sessions.Options{ToolVersion: Version, User: user})
	if err != nil {
		t.Fatal(err)
	}
	doc := sessions.NewDocument("private work of "+user, user, model.DefaultSpec(), time.Now())
	if _, err := st.Save(name, doc, 0); err != nil {
		t.Fatal(err)
	}
}

func TestServePerUserIsolationAndSharing(t *testing.T) {
	ada, bob, carol := newSSHUser(t, "ada"), newSSHUser(t, "bob"), newSSHUser(t, "carol")
	addr, data, app := startJunco(t, ada, bob, carol)
	saveFor(t, data, "ada", "d7")

	out, _, err := sshRun(t, addr, ada, "sessions list")
	if err != nil || !strings.Contains(out, "d7") {
		t.Fatalf("ada's own list: %q %v", out, err)
	}
	// Bob can neither list, show nor export Ada's private session.
	if out, _, _ := sshRun(t, addr, bob, "sessions list"); strings.Contains(out, "d7") {
		t.Errorf("bob lists ada's private session: %q", out)
	}
	for _, cmd := range []string{"sessions show ada/d7", "sessions export ada/d7 --format md", "sessions show ../ada/sessions/d7"} {
		if out, errs, err := sshRun(t, addr, bob, cmd); err == nil || strings.Contains(out, "private work") {
			t.Errorf("bob ran %q: %q %q", cmd, out, errs)
		}
	}
	// Flags that name paths are refused.
	if _, errs, err := sshRun(t, addr, ada, "sessions export d7 --out /tmp/x"); err == nil || !strings.Contains(errs, "not available over SSH") {
		t.Errorf("--out accepted over SSH: %q", errs)
	}
	if _, errs, err := sshRun(t, addr, ada, "sessions show d7 --data "+data); err == nil || !strings.Contains(errs, "not available") {
		t.Errorf("--data accepted over SSH: %q", errs)
	}
	// Shared with bob: he sees, shows and exports it; carol still does not.
	if err := app.shares.Set("ada", "d7", []string{"bob"}); err != nil {
		t.Fatal(err)
	}
	if out, _, err := sshRun(t, addr, bob, "sessions list"); err != nil || !strings.Contains(out, "ada/d7") {
		t.Errorf("shared session missing from bob's list: %q %v", out, err)
	}
	if out, _, err := sshRun(t, addr, bob, "sessions show ada/d7"); err != nil || !strings.Contains(out, "private work of ada") {
		t.Errorf("bob cannot show the shared session: %q %v", out, err)
	}
	if out, _, err := sshRun(t, addr, bob, "sessions export ada/d7 --format md"); err != nil || !strings.Contains(out, "# ") {
		t.Errorf("bob cannot export the shared session: %q %v", out, err)
	}
	if _, _, err := sshRun(t, addr, carol, "sessions show ada/d7"); err == nil {
		t.Error("carol shows a session not shared with her")
	}
	// A review note from bob reaches ada.
	root, _ := sessions.UserStoreRoot(data, "ada")
	st, _ := sessions.New(root, sessions.Options{})
	if err := st.AddReviewNote("d7", sessions.ReviewNote{Author: "bob", Text: "please add the C-V data"}); err != nil {
		t.Fatal(err)
	}
	if out, _, err := sshRun(t, addr, ada, "sessions show d7"); err != nil || !strings.Contains(out, "please add the C-V data") {
		t.Errorf("review note does not reach the owner: %q %v", out, err)
	}
	// Unsharing takes effect for new openings at once.
	if err := app.shares.Set("ada", "d7", nil); err != nil {
		t.Fatal(err)
	}
	if _, _, err := sshRun(t, addr, bob, "sessions show ada/d7"); err == nil {
		t.Error("bob still shows the unshared session")
	}
}

// TestServeLoad is the bounded load test: 50 concurrent clients each send
// 200 keystrokes to the real workbench over loopback. It reports the p50
// and p99 keystroke-to-redraw latency and the server's peak heap. It runs
// only with JUNCO_LOADTEST=1 (it takes tens of seconds on 2 cores).
func TestServeLoad(t *testing.T) {
	if os.Getenv("JUNCO_LOADTEST") == "" {
		t.Skip("set JUNCO_LOADTEST=1 to run the SSH load test")
	}
	const clients, keys = 50, 200
	users := make([]sshUser, clients)
	for i := range users {
		users[i] = newSSHUser(t, fmt.Sprintf("user%02d", i))
	}
	addr, _, _ := startJunco(t, users...)
	var base runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&base)
	var peak uint64
	stop := make(chan struct{})
	var sampler sync.WaitGroup
	sampler.Add(1)
	go func() {
		defer sampler.Done()
		var m runtime.MemStats
		for {
			select {
			case <-stop:
				return
			case <-time.After(50 * time.Millisecond):
				runtime.ReadMemStats(&m)
				if m.HeapInuse > peak {
					peak = m.HeapInuse
				}
			}
		}
	}()
	var mu sync.Mutex
	var lat []time.Duration
	var wg sync.WaitGroup
	errs := make(chan error, clients)
	for _, u := range users {
		wg.Add(1)
		go func(u sshUser) {
			defer wg.Done()
			d, err := driveClient(addr, u, keys)
			if err != nil {
				errs <- fmt.Errorf("%s: %w", u.name, err)
				return
			}
			mu.Lock()
			lat = append(lat, d...)
			mu.Unlock()
		}(u)
	}
	wg.Wait()
	close(stop)
	sampler.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
	if len(lat) == 0 {
		t.Fatal("no latencies measured")
	}
	sort.Slice(lat, func(i, j int) bool { return lat[i] < lat[j] })
	p50, p99 := lat[len(lat)/2], lat[len(lat)*99/100]
	perConn := float64(peak-min(peak, base.HeapInuse)) / clients / (1 << 20)
	t.Logf("%d clients x %d keys: p50 %v, p99 %v keystroke-to-redraw; peak heap %.1f MiB (%.2f MiB per connection)",
		clients, keys, p50, p99, float64(peak)/(1<<20), perConn)
}

// driveClient opens an interactive workbench and sends keys one at a time,
// timing each from the write to the first output that follows it.
func driveClient(addr string, u sshUser, keys int) ([]time.Duration, error) {
	c, err := gossh.Dial("tcp", addr, &gossh.ClientConfig{User: u.name, Auth: []gossh.AuthMethod{gossh.PublicKeys(u.Signer)},
		HostKeyCallback: gossh.InsecureIgnoreHostKey(), Timeout: 10 * time.Second})
	if err != nil {
		return nil, err
	}
	defer c.Close()
	s, err := c.NewSession()
	if err != nil {
		return nil, err
	}
	defer s.Close()
	in, _ := s.StdinPipe()
	outPipe, _ := s.StdoutPipe()
	if err := s.RequestPty("xterm-256color", 40, 120, gossh.TerminalModes{}); err != nil {
		return nil, err
	}
	if err := s.Shell(); err != nil {
		return nil, err
	}
	got := make(chan int, 1024)
	go func() {
		buf := make([]byte, 32<<10)
		for {
			n, err := outPipe.Read(buf)
			if n > 0 {
				got <- n
			}
			if err != nil {
				close(got)
				return
			}
		}
	}()
	// Wait for the first screen, then let it settle.
	settle := func(quiet time.Duration) bool {
		for {
			select {
			case _, ok := <-got:
				if !ok {
					return false
				}
			case <-time.After(quiet):
				return true
			}
		}
	}
	select {
	case <-got:
	case <-time.After(10 * time.Second):
		return nil, fmt.Errorf("no first screen")
	}
	settle(300 * time.Millisecond)
	// Alternate moving down and up the form: every key redraws.
	seq := []string{"j", "k"}
	var lat []time.Duration
	for i := 0; i < keys; i++ {
		start := time.Now()
		if _, err := io.WriteString(in, seq[i%2]); err != nil {
			return lat, err
		}
		select {
		case _, ok := <-got:
			if !ok {
				return lat, fmt.Errorf("connection closed")
			}
			lat = append(lat, time.Since(start))
		case <-time.After(5 * time.Second):
			return lat, fmt.Errorf("no redraw after key %d", i)
		}
		settle(5 * time.Millisecond)
	}
	return lat, nil
}

// A session shared with Bob opens read-only for him over SSH; the review
// note he writes in the workbench reaches Ada; once unshared it no longer
// opens.
func TestServeReviewMode(t *testing.T) {
	ada, bob := newSSHUser(t, "ada"), newSSHUser(t, "bob")
	addr, data, app := startJunco(t, ada, bob)
	saveFor(t, data, "ada", "d7")
	if err := app.shares.Set("ada", "d7", []string{"bob"}); err != nil {
		t.Fatal(err)
	}
	in, wait := openWorkbench(t, addr, bob, "review ada/d7")
	wait("review (read-only)")
	io.WriteString(in, "n")
	time.Sleep(200 * time.Millisecond)
	io.WriteString(in, "series resistance looks high")
	time.Sleep(200 * time.Millisecond)
	io.WriteString(in, "\r")
	wait("review note added")
	if out, _, err := sshRun(t, addr, ada, "sessions show d7"); err != nil || !strings.Contains(out, "series resistance looks high") || !strings.Contains(out, "bob") {
		t.Errorf("the review note did not reach the owner: %q %v", out, err)
	}
	if err := app.shares.Set("ada", "d7", nil); err != nil {
		t.Fatal(err)
	}
	s2 := servetest.Session(t, servetest.Login(t, addr, "bob", bob.Key))
	var errb bytes.Buffer
	s2.Stderr = &errb
	_ = s2.RequestPty("xterm", 24, 80, gossh.TerminalModes{})
	if err := s2.Run("review ada/d7"); err == nil || !strings.Contains(errb.String(), "no session") {
		t.Errorf("unshared session still opens for review: %v %q", err, errb.String())
	}
}

// The owner shares a session from the workbench over SSH; the reviewer
// then finds it in `sessions list`.
func TestServeOwnerSharesFromWorkbench(t *testing.T) {
	ada, bob := newSSHUser(t, "ada"), newSSHUser(t, "bob")
	addr, data, _ := startJunco(t, ada, bob)
	saveFor(t, data, "ada", "d7")
	in, wait := openWorkbench(t, addr, ada, "open d7")
	wait("d7")
	io.WriteString(in, "\x12") // ctrl+r
	wait("Reviewers")
	io.WriteString(in, "bob")
	time.Sleep(200 * time.Millisecond)
	io.WriteString(in, "\r")
	wait("shared d7 read-only with bob")
	if out, _, err := sshRun(t, addr, bob, "sessions list"); err != nil || !strings.Contains(out, "ada/d7") {
		t.Errorf("bob does not see the shared session: %q %v", out, err)
	}
}

// openWorkbench starts the interactive workbench for u over SSH with the
// given command (120x40 PTY) and returns its input and a function that
// waits until the screen shows a text.
func openWorkbench(t *testing.T, addr string, u sshUser, cmd string) (io.Writer, func(string)) {
	t.Helper()
	s := servetest.Session(t, servetest.Login(t, addr, u.name, u.Key))
	out := &servetest.Buffer{}
	s.Stdout = out
	in, _ := s.StdinPipe()
	if err := s.RequestPty("xterm-256color", 40, 120, gossh.TerminalModes{}); err != nil {
		t.Fatal(err)
	}
	if err := s.Start(cmd); err != nil {
		t.Fatal(err)
	}
	wait := func(want string) {
		t.Helper()
		deadline := time.Now().Add(10 * time.Second)
		for time.Now().Before(deadline) {
			if strings.Contains(out.String(), want) {
				return
			}
			time.Sleep(20 * time.Millisecond)
		}
		t.Fatalf("screen never showed %q", want)
	}
	return in, wait
}

// TestServeUploadThenImport: a file put over SFTP by ada lands in
// DATA/users/ada/inbox (mode 0700), and ada's served workbench imports it
// by name while refusing a server path.
func TestServeUploadThenImport(t *testing.T) {
	ada := newSSHUser(t, "ada")
	addr, data, app := startJunco(t, ada)
	c := servetest.Login(t, addr, "ada", ada.Key)
	sc, err := sftp.NewClient(c)
	if err != nil {
		t.Fatal(err)
	}
	defer sc.Close()
	w, err := sc.Create("die.csv")
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(w, "V (V),I (A)\n0.5,1e-6\n0.6,1e-5\n")
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(data, "users", "ada", "inbox")
	if fi, err := os.Stat(dir); err != nil || fi.Mode().Perm() != 0o700 {
		t.Fatalf("inbox: %v, %v; want a folder of mode 0700", fi, err)
	}
	if _, err := os.Stat(filepath.Join(dir, "die.csv")); err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	tm, err := app.Model(ctx, serve.Conn{User: "ada", Width: 120, Height: 40})
	if err != nil {
		t.Fatal(err)
	}
	keys := func(ks ...tea.KeyMsg) string {
		for _, k := range ks {
			tm, _ = tm.Update(k)
		}
		return strings.Join(strings.Fields(ansi.Strip(tm.View())), " ")
	}
	runes := func(s string) tea.KeyMsg { return tea.KeyMsg{Type: tea.KeyRunes, Runes: []rune(s)} }
	enter, esc, clear := tea.KeyMsg{Type: tea.KeyEnter}, tea.KeyMsg{Type: tea.KeyEscape}, tea.KeyMsg{Type: tea.KeyCtrlU}
	if v := keys(runes("i"), clear, runes("die.csv"), enter); !strings.Contains(v, "I-V sweep: 2 points") {
		t.Errorf("the uploaded file was not imported:\n%s", v)
	}
	v := keys(esc, runes("i"), clear, runes("/etc/passwd"), enter)
	if !strings.Contains(v, "Nothing was imported") || strings.Contains(v, "root:") {
		t.Errorf("/etc/passwd on a served import:\n%s", v)
	}
}

// The inbox caps are flags of junco serve; out-of-range values are
// refused with the allowed range.
func TestServeInboxCapFlags(t *testing.T) {
	for _, args := range [][]string{{"--upload-max-mib", "0"}, {"--inbox-max-mib", "0"}, {"--upload-max-mib", "100000"},
		{"--upload-max-mib", "64", "--inbox-max-mib", "32"}} {
		var out, errb bytes.Buffer
		code := runServe(context.Background(), append(args, "--data", t.TempDir()), &out, &errb)
		if code != exitUsage || !strings.Contains(errb.String(), "allowed 1 to 65536") {
			t.Errorf("%v: exit %d, %q", args, code, errb.String())
		}
	}
}
