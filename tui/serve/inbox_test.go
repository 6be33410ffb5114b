package serve

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/pkg/sftp"
	gossh "golang.org/x/crypto/ssh"

	"junco/sessions"
	"junco/tui/serve/servetest"
)

// inboxFixture is a server with file transfer into DATA/users/USER/inbox
// for ada and bob, a readable file outside every inbox and a file in
// bob's inbox.
type inboxFixture struct {
	*fixture
	data, outside string
	ada, bob      servetest.Key
}

// startInboxServer starts a server with ada's and bob's inboxes under lim
// (bob's holding bobs.csv); configure, if given, changes the server's
// configuration first.
func startInboxServer(t *testing.T, lim sessions.InboxLimits, configure ...func(*Config)) *inboxFixture {
	t.Helper()
	data := t.TempDir()
	f := &inboxFixture{data: data, outside: filepath.Join(data, "outside.txt"), ada: servetest.NewKey(t, "ada"), bob: servetest.NewKey(t, "bob")}
	if err := os.WriteFile(f.outside, []byte("TOPSECRET\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	fx := &fixture{dir: data, hostKey: filepath.Join(data, "host", "ed25519"), authKeys: filepath.Join(data, "authorized_keys"), logs: &servetest.Buffer{}}
	writeKeys(t, fx.authKeys, f.ada.Line, f.bob.Line)
	cfg := Config{Listen: "127.0.0.1:0", HostKeyPath: fx.hostKey, AuthorizedKeysPath: fx.authKeys,
		App: testApp{}, Logger: slog.New(slog.NewTextHandler(fx.logs, nil)), Grace: time.Second,
		Inbox: func(user string) (*sessions.Inbox, error) { return sessions.OpenInbox(data, user, lim) }}
	for _, c := range configure {
		c(&cfg)
	}
	srv, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	fx.srv, fx.addr = srv, servetest.Serve(t, srv)
	f.fixture = fx
	in, err := sessions.OpenInbox(data, "bob", lim)
	if err != nil {
		t.Fatal(err)
	}
	w, _ := in.Create("bobs.csv", -1)
	io.WriteString(w, "BOBSECRET\n")
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	in.Close()
	return f
}

// sftpClient opens an SFTP session as user over loopback.
func sftpClient(t *testing.T, addr, user string, k servetest.Key) *sftp.Client {
	t.Helper()
	c, err := dial(addr, servetest.ClientConfig(user, gossh.PublicKeys(k.Signer)))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { c.Close() })
	sc, err := sftp.NewClient(c)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { sc.Close() })
	return sc
}

// noLeak fails when an error message shows a server path or a file's text.
func (f *inboxFixture) noLeak(t *testing.T, what string, err error) {
	t.Helper()
	if err == nil {
		t.Errorf("%s: not refused", what)
		return
	}
	// The SFTP client puts the path asked for around the server's
	// status; only the server's message is checked.
	msg := err.Error()
	var se *sftp.StatusError
	var pe *os.PathError
	switch {
	case errors.As(err, &se):
		msg = se.Error()
	case errors.As(err, &pe):
		msg = pe.Err.Error()
	}
	for _, leak := range []string{f.data, "users/", "TOPSECRET", "BOBSECRET", "root:"} {
		if strings.Contains(msg, leak) {
			t.Errorf("%s: message %q shows %q", what, msg, leak)
		}
	}
}

func TestSFTPConfinedToInbox(t *testing.T) {
	f := startInboxServer(t, sessions.InboxLimits{})
	sc := sftpClient(t, f.addr, "ada", f.ada)
	wd, err := sc.Getwd()
	if err != nil || wd != "/" {
		t.Errorf("Getwd = %q, %v; want the inbox as /", wd, err)
	}
	// put, list, get, rename, remove inside the inbox.
	w, err := sc.Create("iv.csv")
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(w, "V,I\n0.1,1e-9\n")
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	dir, _ := sessions.InboxRoot(f.data, "ada")
	if b, err := os.ReadFile(filepath.Join(dir, "iv.csv")); err != nil || string(b) != "V,I\n0.1,1e-9\n" {
		t.Fatalf("uploaded file on the server: %q, %v", b, err)
	}
	fis, err := sc.ReadDir("/")
	if err != nil || len(fis) != 1 || fis[0].Name() != "iv.csv" {
		t.Errorf("ReadDir(/) = %v, %v", fis, err)
	}
	if err := sc.Rename("iv.csv", "die1.csv"); err != nil {
		t.Errorf("rename: %v", err)
	}
	r, err := sc.Open("/die1.csv")
	if err != nil {
		t.Fatal(err)
	}
	got, _ := io.ReadAll(r)
	r.Close()
	if string(got) != "V,I\n0.1,1e-9\n" {
		t.Errorf("get: %q", got)
	}
	// Every way out is refused; nothing outside is read, written or listed.
	if err := os.Symlink(f.outside, filepath.Join(dir, "link.txt")); err != nil {
		t.Fatal(err)
	}
	// Gets: nothing outside is served ("../../../outside.txt" is the
	// client's "/outside.txt", which the inbox does not hold).
	for _, p := range []string{"/etc/passwd", "../../../outside.txt", f.outside, "link.txt", "../bob/inbox/bobs.csv",
		"/../../bob/inbox/bobs.csv", "../../bob/inbox/bobs.csv"} {
		r, err := sc.Open(p)
		if err == nil {
			b, _ := io.ReadAll(r)
			r.Close()
			t.Errorf("get %s: served %q", p, b)
			continue
		}
		f.noLeak(t, "get "+p, err)
	}
	// Puts, removes and renames to a path with folders are refused.
	for _, p := range []string{"/etc/passwd", f.outside, "../bob/inbox/bobs.csv", "/../../bob/inbox/bobs.csv", "../../users/bob/inbox/bobs.csv"} {
		if w, err := sc.Create(p); err == nil {
			w.Close()
			t.Errorf("put %s: accepted", p)
		} else {
			f.noLeak(t, "put "+p, err)
		}
		f.noLeak(t, "remove "+p, sc.Remove(p))
		f.noLeak(t, "rename to "+p, sc.Rename("die1.csv", p))
	}
	// "/.." is "/": listing it lists the inbox, nothing else.
	own, _ := os.ReadDir(dir)
	for _, p := range []string{"/", "..", "/../..", "../bob/inbox", "/etc"} {
		fis, err := sc.ReadDir(p)
		for _, fi := range fis {
			if !slices.ContainsFunc(own, func(e os.DirEntry) bool { return e.Name() == fi.Name() }) {
				t.Errorf("ReadDir(%s) listed %s", p, fi.Name())
			}
		}
		if err != nil {
			f.noLeak(t, "list "+p, err)
		}
	}
	f.noLeak(t, "mkdir", sc.Mkdir("sub"))
	f.noLeak(t, "symlink", sc.Symlink(f.outside, "ln"))
	f.noLeak(t, "hard link", sc.Link("die1.csv", "ln2"))
	if b, _ := os.ReadFile(f.outside); string(b) != "TOPSECRET\n" {
		t.Errorf("the file outside changed: %q", b)
	}
	if err := sc.Remove("die1.csv"); err != nil {
		t.Errorf("remove: %v", err)
	}
}

// TestSFTPCaps checks the per-file and per-user caps over SFTP: a write
// past either fails with a message naming the limit, and no partial file
// is kept.
func TestSFTPCaps(t *testing.T) {
	f := startInboxServer(t, sessions.InboxLimits{FileBytes: 1 << 20, UserBytes: 3 << 19, FileFlag: "--upload-max-mib", UserFlag: "--inbox-max-mib"})
	sc := sftpClient(t, f.addr, "ada", f.ada)
	up := func(name string, n int) error {
		w, err := sc.Create(name)
		if err != nil {
			return err
		}
		_, err = w.Write(bytes.Repeat([]byte("x"), n))
		if cerr := w.Close(); err == nil {
			err = cerr
		}
		return err
	}
	if err := up("big.csv", 1<<20+1); err == nil || !strings.Contains(err.Error(), "--upload-max-mib") {
		t.Errorf("upload past the file cap: %v", err)
	}
	if _, err := sc.Stat("big.csv"); err == nil {
		t.Error("the partial file was kept")
	}
	if err := up("one.csv", 1<<20); err != nil {
		t.Fatal(err)
	}
	if err := up("two.csv", 1<<19+1); err == nil || !strings.Contains(err.Error(), "--inbox-max-mib") {
		t.Errorf("upload past the user cap: %v", err)
	}
}

// scpRun runs a legacy scp protocol command (`scp -t` or `scp -f`) as
// user and lets talk drive the protocol; it returns the session's stderr.
func scpRun(t *testing.T, addr, user string, k servetest.Key, cmd string, talk func(in io.Writer, out *bufio.Reader)) string {
	t.Helper()
	c := login(t, addr, user, k)
	defer c.Close()
	s := openSession(t, c)
	var stderr servetest.Buffer
	s.Stderr = &stderr
	in, _ := s.StdinPipe()
	out, _ := s.StdoutPipe()
	if err := s.Start(cmd); err != nil {
		t.Fatal(err)
	}
	done := make(chan struct{})
	go func() {
		defer close(done)
		talk(in, bufio.NewReader(out))
		in.Close()
		io.Copy(io.Discard, out)
	}()
	select {
	case <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("scp protocol hung")
	}
	_ = s.Wait()
	return stderr.String()
}

// scpSend uploads one file with the legacy protocol: "C0644 size name",
// the bytes, a NUL; each step answered by a NUL from the server.
func scpSend(name string, data []byte) func(io.Writer, *bufio.Reader) {
	return func(in io.Writer, out *bufio.Reader) {
		if b, err := out.ReadByte(); err != nil || b != 0 {
			return
		}
		fmt.Fprintf(in, "C0644 %d %s\n", len(data), name)
		if b, err := out.ReadByte(); err != nil || b != 0 {
			return
		}
		in.Write(data)
		in.Write([]byte{0})
		out.ReadByte()
	}
}

func TestLegacySCPConfinedToInbox(t *testing.T) {
	f := startInboxServer(t, sessions.InboxLimits{FileBytes: 1 << 20, FileFlag: "--upload-max-mib"})
	dir, _ := sessions.InboxRoot(f.data, "ada")
	// A plain upload into the inbox ("scp -O file ada@host:").
	if e := scpRun(t, f.addr, "ada", f.ada, "scp -t .", scpSend("iv.csv", []byte("V,I\n"))); e != "" {
		t.Errorf("upload: stderr %q", e)
	}
	if b, err := os.ReadFile(filepath.Join(dir, "iv.csv")); err != nil || string(b) != "V,I\n" {
		t.Fatalf("uploaded: %q, %v", b, err)
	}
	// Escapes through the target and through the file's own name.
	escapes := []struct{ cmd, name string }{
		{"scp -t ../x", "x"},
		{"scp -t ../../../escaped.txt", "x"},
		{"scp -t " + filepath.Join(f.data, "escaped.txt"), "x"},
		{"scp -t /tmp/escaped.txt", "x"},
		{"scp -t ../bob/inbox/bobs.csv", "x"},
		{"scp -t .", "../escaped.txt"},
		{"scp -t .", "../../../../escaped.txt"},
		{"scp -t -r .", "sub"},
	}
	for _, e := range escapes {
		talk := scpSend(e.name, []byte("PWNED\n"))
		if e.name == "sub" {
			talk = func(in io.Writer, out *bufio.Reader) {
				out.ReadByte()
				fmt.Fprintf(in, "D0755 0 sub\n")
				out.ReadByte()
			}
		}
		stderr := scpRun(t, f.addr, "ada", f.ada, e.cmd, talk)
		if stderr == "" {
			t.Errorf("%s with %s: no error", e.cmd, e.name)
		}
		f.noLeak(t, e.cmd, fmt.Errorf("%s", stderr))
	}
	for _, p := range []string{filepath.Join(f.data, "escaped.txt"), filepath.Join(f.data, "users", "escaped.txt"), filepath.Join(f.data, "users", "ada", "x"),
		filepath.Join(f.data, "users", "ada", "escaped.txt")} {
		if _, err := os.Stat(p); err == nil {
			t.Errorf("a file was written outside the inbox: %s", p)
		}
	}
	if b, _ := os.ReadFile(filepath.Join(f.data, "users", "bob", "inbox", "bobs.csv")); string(b) != "BOBSECRET\n" {
		t.Errorf("bob's file changed: %q", b)
	}
	// Downloads: the inbox file comes; nothing outside does.
	var got string
	stderr := scpRun(t, f.addr, "ada", f.ada, "scp -f iv.csv", func(in io.Writer, out *bufio.Reader) {
		in.Write([]byte{0})
		hdr, _ := out.ReadString('\n')
		if strings.HasPrefix(hdr, "T") { // times first
			in.Write([]byte{0})
			hdr, _ = out.ReadString('\n')
		}
		in.Write([]byte{0})
		b := make([]byte, 4)
		io.ReadFull(out, b)
		got = hdr + string(b)
		in.Write([]byte{0})
	})
	if got != "C0600 4 iv.csv\nV,I\n" || stderr != "" {
		t.Errorf("download: %q, stderr %q", got, stderr)
	}
	if err := os.Symlink(f.outside, filepath.Join(dir, "link.txt")); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{"/etc/passwd", "../../../outside.txt", f.outside, "link.txt", "../bob/inbox/bobs.csv", "'*'", "../*"} {
		var body bytes.Buffer
		stderr := scpRun(t, f.addr, "ada", f.ada, "scp -f "+p, func(in io.Writer, out *bufio.Reader) {
			in.Write([]byte{0})
			io.Copy(&body, out)
		})
		if strings.Contains(body.String(), "SECRET") || strings.Contains(body.String(), "root:") {
			t.Errorf("scp -f %s served %q", p, body.String())
		}
		if p != "'*'" {
			f.noLeak(t, "scp -f "+p, fmt.Errorf("%s", stderr))
		}
	}
	// The per-file cap is named when the announced size is over it.
	stderr = scpRun(t, f.addr, "ada", f.ada, "scp -t .", scpSend("big.csv", make([]byte, 1<<20+1)))
	if !strings.Contains(stderr, "at most 1 MiB (the server's --upload-max-mib)") {
		t.Errorf("over the file cap: %q", stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "big.csv")); err == nil {
		t.Error("a file over the cap was kept")
	}
}

// Without an inbox configured, neither subsystem nor scp serves files.
func TestNoInboxNoTransfer(t *testing.T) {
	ada := servetest.NewKey(t, "ada")
	f := startServer(t, t.TempDir(), ada.Line)
	c := login(t, f.addr, "ada", ada)
	if sc, err := sftp.NewClient(c); err == nil {
		if _, err := sc.ReadDir("/"); err == nil {
			t.Error("SFTP served without an inbox")
		}
		sc.Close()
	}
}

// TestSFTPReasonsOnStderr: a refusal's reason, which OpenSSH's clients do
// not print from the SFTP status, reaches stderr with the cap named. (The
// exit status after SFTP, which Go's client cannot wait for, was checked
// with OpenSSH's scp by hand.)
func TestSFTPReasonsOnStderr(t *testing.T) {
	f := startInboxServer(t, sessions.InboxLimits{FileBytes: 1 << 20, FileFlag: "--upload-max-mib"})
	s := openSession(t, login(t, f.addr, "ada", f.ada))
	// RequestSubsystem starts no copying: read stderr from its pipe.
	var stderr servetest.Buffer
	errPipe, _ := s.StderrPipe()
	copied := make(chan struct{})
	go func() { io.Copy(&stderr, errPipe); close(copied) }()
	in, _ := s.StdinPipe()
	out, _ := s.StdoutPipe()
	if err := s.RequestSubsystem("sftp"); err != nil {
		t.Fatal(err)
	}
	sc, err := sftp.NewClientPipe(out, in)
	if err != nil {
		t.Fatal(err)
	}
	w, _ := sc.Create("big.csv")
	w.Write(make([]byte, 1<<20+1))
	w.Close()
	sc.Mkdir("sub")
	sc.Close()
	in.Close()
	select {
	case <-copied:
	case <-time.After(5 * time.Second):
		t.Fatal("stderr never closed")
	}
	for _, want := range []string{"at most 1 MiB (the server's --upload-max-mib)", "mkdir: the inbox has no folders"} {
		if !strings.Contains(stderr.String(), want) {
			t.Errorf("stderr lacks %q: %q", want, stderr.String())
		}
	}
}

// One SFTP session holds at most maxSFTPHandles files open at once: the
// next open is refused (the reason on stderr), a closed file gives its
// place back, and listings still work after. Before, one session held
// 3000 descriptors of one file (by hand, against `junco serve`) and could
// go on to the server process's limit, after which nobody could connect.
func TestSFTPOpenFilesBounded(t *testing.T) {
	f := startInboxServer(t, sessions.InboxLimits{})
	c := sftpClient(t, f.addr, "ada", f.ada)
	w, err := c.Create("x.csv")
	if err != nil {
		t.Fatal(err)
	}
	w.Write([]byte("1,2\n"))
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	var held []*sftp.File
	defer func() {
		for _, h := range held {
			h.Close()
		}
	}()
	var refused error
	for i := 0; i < 3*maxSFTPHandles; i++ {
		h, err := c.Open("x.csv")
		if err != nil {
			refused = err
			break
		}
		held = append(held, h)
	}
	if len(held) != maxSFTPHandles || refused == nil {
		t.Fatalf("%d files open at once in one session (refusal %v), want %d", len(held), refused, maxSFTPHandles)
	}
	if _, err := c.Create("y.csv"); err == nil {
		t.Error("an upload opened beyond the bound")
	}
	held[0].Close()
	held = held[1:]
	h, err := c.Open("x.csv")
	if err != nil {
		t.Fatalf("a closed file did not give its place back: %v", err)
	}
	held = append(held, h)
	for _, h := range held {
		h.Close()
	}
	held = nil
	if fis, err := c.ReadDir("/"); err != nil || len(fis) != 1 {
		t.Errorf("listing after closing: %d files, %v", len(fis), err)
	}
	for i := 0; i < 2*maxSFTPHandles; i++ { // listings give their place back
		if _, err := c.ReadDir("/"); err != nil {
			t.Fatalf("listing %d: %v", i+1, err)
		}
	}
}
