package sessions

import (
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// openTestInbox makes a data folder with a file outside every inbox, a
// file in bob's inbox, and opens alice's inbox.
func openTestInbox(t *testing.T, lim InboxLimits) (in *Inbox, data, outside string) {
	t.Helper()
	data = t.TempDir()
	outside = filepath.Join(data, "secret.csv")
	if err := os.WriteFile(outside, []byte("V,I\n0.1,1e-9\nTOPSECRET\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	bob, err := OpenInbox(data, "bob", InboxLimits{})
	if err != nil {
		t.Fatal(err)
	}
	w, err := bob.Create("bobs.csv", -1)
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(w, "V,I\n0.1,1e-9\n")
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	bob.Close()
	in, err = OpenInbox(data, "alice", lim)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { in.Close() })
	return in, data, outside
}

// checkRefused fails unless err is a refusal that names no server path.
func checkRefused(t *testing.T, what string, err error, data string) {
	t.Helper()
	if err == nil {
		t.Fatalf("%s: not refused", what)
	}
	var ie *InboxError
	if !errors.As(err, &ie) {
		t.Errorf("%s: %T %v is not an InboxError", what, err, err)
	}
	msg := err.Error()
	for _, leak := range []string{data, filepath.Base(data), "/etc", "passwd", "TOPSECRET", "users/", "inbox/"} {
		if strings.Contains(msg, leak) {
			t.Errorf("%s: message %q names %q", what, msg, leak)
		}
	}
}

func TestInboxNamePolicy(t *testing.T) {
	for _, ok := range []struct{ given, want string }{
		{"x.csv", "x.csv"}, {"./x.csv", "x.csv"}, {"  diode 3 (run 2).csv ", "diode 3 (run 2).csv"}, {"a..b.csv", "a..b.csv"},
	} {
		got, err := InboxName("open", ok.given)
		if err != nil || got != ok.want {
			t.Errorf("InboxName(%q) = %q, %v; want %q", ok.given, got, err, ok.want)
		}
	}
	for _, bad := range []string{"", ".", "..", "../x", "../../x", "a/../../x", "/etc/passwd", "/x.csv", `\x`, `..\x`,
		"sub/x.csv", "C:x", ".hidden", "-rf", "x\x00y", "x\ny", "\xff", strings.Repeat("a", 256), "../bob/inbox/bobs.csv",
		// Invisible format characters: "rlo\u202egnp.csv" shows as "rlovsc.png".
		"rlo\u202egnp.csv", "a\u200bb.csv", "x\u2066y.csv"} {
		if _, err := InboxName("open", bad); err == nil {
			t.Errorf("InboxName(%q) accepted", bad)
		} else if len(bad) > 2 && strings.Contains(err.Error(), bad) {
			t.Errorf("InboxName(%q): message repeats the path: %v", bad, err)
		}
	}
}

// TestInboxConfined tries every way out of an inbox the issue names: a
// relative escape, an absolute path, a symbolic link to a file outside
// (and to a folder outside), another user's inbox. Each is refused with a
// message that names no server path and shows no content.
func TestInboxConfined(t *testing.T) {
	in, data, outside := openTestInbox(t, InboxLimits{})
	dir, _ := InboxRoot(data, "alice")
	if err := os.Symlink(outside, filepath.Join(dir, "link.csv")); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(data, filepath.Join(dir, "up")); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{"../../x", "../secret.csv", "../../secret.csv", outside, "/etc/passwd", "link.csv",
		"up/secret.csv", "../bob/inbox/bobs.csv", "../../users/bob/inbox/bobs.csv", "up"} {
		f, err := in.Open(p)
		if err == nil {
			f.Close()
		}
		checkRefused(t, "open "+p, err, data)
		_, err = in.Create(p, -1)
		checkRefused(t, "create "+p, err, data)
		if p != "link.csv" && p != "up" { // removing a link inside the inbox is allowed
			checkRefused(t, "remove "+p, in.Remove(p), data)
		}
		checkRefused(t, "rename to "+p, in.Rename("nothing.csv", p, true), data)
	}
	if _, err := in.ReadDir("/etc"); err == nil {
		t.Error("ReadDir(/etc) was served")
	}
	// Removing the link removes the link only.
	if err := in.Remove("link.csv"); err != nil {
		t.Errorf("remove the link: %v", err)
	}
	if _, err := os.Stat(outside); err != nil {
		t.Fatal(err)
	}
	fis, err := in.List()
	if err != nil || len(fis) != 0 {
		t.Errorf("List = %v, %v; links are not listed", fis, err)
	}
	fi, err := os.Stat(dir)
	if err != nil || fi.Mode().Perm() != 0o700 {
		t.Errorf("inbox mode = %v, %v; want 0700", fi.Mode().Perm(), err)
	}
}

func TestInboxPutGetRenameRemove(t *testing.T) {
	in, _, _ := openTestInbox(t, InboxLimits{})
	w, err := in.Create("a.csv", 5)
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(w, "hello")
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if err := in.Rename("a.csv", "b.csv", false); err != nil {
		t.Fatal(err)
	}
	f, err := in.Open("./b.csv")
	if err != nil {
		t.Fatal(err)
	}
	got, _ := io.ReadAll(f)
	fi, _ := f.Stat()
	f.Close()
	if string(got) != "hello" || fi.Mode().Perm() != 0o600 {
		t.Errorf("read %q mode %v; want hello, 0600", got, fi.Mode().Perm())
	}
	if err := in.Remove("b.csv"); err != nil {
		t.Fatal(err)
	}
	if _, err := in.Open("b.csv"); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("after remove: %v", err)
	}
}

// TestInboxCaps checks the per-file and per-user caps: an announced size
// over a cap is refused at once, a write that crosses one fails and the
// partial file is removed, and each message names the limit.
func TestInboxCaps(t *testing.T) {
	in, _, _ := openTestInbox(t, InboxLimits{FileBytes: 1 << 20, UserBytes: 3 << 19, FileFlag: "--upload-max-mib", UserFlag: "--inbox-max-mib"})
	if _, err := in.Create("big.csv", 1<<20+1); err == nil || !strings.Contains(err.Error(), "at most 1 MiB (the server's --upload-max-mib)") {
		t.Errorf("announced size over the file cap: %v", err)
	}
	w, err := in.Create("big.csv", -1)
	if err != nil {
		t.Fatal(err)
	}
	chunk := make([]byte, 1<<19)
	for i := 0; i < 2; i++ {
		if _, err := w.Write(chunk); err != nil {
			t.Fatalf("write %d: %v", i, err)
		}
	}
	_, err = w.Write([]byte{1})
	if err == nil || !strings.Contains(err.Error(), "--upload-max-mib") {
		t.Errorf("write past the file cap: %v", err)
	}
	if cerr := w.Close(); cerr == nil {
		t.Error("Close after a cap error reported success")
	}
	if _, err := in.Stat("big.csv"); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("the partial file was kept: %v", err)
	}
	// 1 MiB stored; the inbox holds 1.5 MiB in all.
	w, _ = in.Create("one.csv", -1)
	w.Write(make([]byte, 1<<20))
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := in.Create("two.csv", 1<<19+1); err == nil || !strings.Contains(err.Error(), "--inbox-max-mib") {
		t.Errorf("announced size over the user cap: %v", err)
	}
	w, _ = in.Create("two.csv", -1)
	if _, err := w.WriteAt(make([]byte, 10), 1<<19-5); err == nil || !strings.Contains(err.Error(), "in all") {
		t.Errorf("write past the user cap: %v", err)
	}
	w.Close()
	// Replacing a file counts the new size only.
	w, _ = in.Create("one.csv", 1<<20)
	if _, err := w.Write(make([]byte, 1<<20)); err != nil {
		t.Errorf("replacing a file within the caps: %v", err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
}

// CreateNew writes a new file and never replaces one: over an existing
// name (a finished upload, or one still being written) it is refused,
// naming the file, and the file keeps its bytes.
func TestInboxCreateNewNeverReplaces(t *testing.T) {
	in, err := OpenInbox(t.TempDir(), "ada", InboxLimits{})
	if err != nil {
		t.Fatal(err)
	}
	defer in.Close()
	up, err := in.Create("table.csv", -1) // an upload in progress
	if err != nil {
		t.Fatal(err)
	}
	if _, err := up.Write([]byte("uploaded\n")); err != nil {
		t.Fatal(err)
	}
	if _, err := in.CreateNew("table.csv"); err == nil || !strings.Contains(err.Error(), "table.csv") {
		t.Errorf("CreateNew over an upload in progress: %v", err)
	}
	if err := up.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := in.CreateNew("table.csv"); err == nil || !strings.Contains(err.Error(), "nothing was written") {
		t.Errorf("CreateNew over a finished upload: %v", err)
	}
	f, err := in.Open("table.csv")
	if err != nil {
		t.Fatal(err)
	}
	b, _ := io.ReadAll(f)
	f.Close()
	if string(b) != "uploaded\n" {
		t.Errorf("the upload became %q", b)
	}
	w, err := in.CreateNew("export.csv")
	if err != nil {
		t.Fatalf("CreateNew of a new name: %v", err)
	}
	if _, err := io.WriteString(w, "x\n"); err != nil || w.Close() != nil {
		t.Errorf("writing the new file: %v", err)
	}
}
