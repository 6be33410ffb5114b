//go:build linux

package cli

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"golang.org/x/sys/unix"
)

// openPTY opens a pseudo-terminal pair (Linux /dev/ptmx, pts(4)).
func openPTY(t *testing.T) (master, slave *os.File) {
	t.Helper()
	m, err := os.OpenFile("/dev/ptmx", os.O_RDWR|syscall.O_NOCTTY, 0)
	if err != nil {
		t.Skipf("no pseudo-terminals here: %v", err)
	}
	fd := int(m.Fd())
	if err := unix.IoctlSetPointerInt(fd, unix.TIOCSPTLCK, 0); err != nil {
		t.Fatalf("unlock pty: %v", err)
	}
	n, err := unix.IoctlGetInt(fd, unix.TIOCGPTN)
	if err != nil {
		t.Fatalf("pty number: %v", err)
	}
	s, err := os.OpenFile(fmt.Sprintf("/dev/pts/%d", n), os.O_RDWR|syscall.O_NOCTTY, 0)
	if err != nil {
		t.Fatalf("open pty slave: %v", err)
	}
	if err := unix.IoctlSetWinsize(int(s.Fd()), unix.TIOCSWINSZ, &unix.Winsize{Row: 24, Col: 80}); err != nil {
		t.Fatalf("pty size: %v", err)
	}
	t.Cleanup(func() { m.Close(); s.Close() })
	return m, s
}

// buildJunco builds the command once per test binary run.
func buildJunco(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "junco")
	cmd := exec.Command("go", "build", "-o", bin, "junco")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// runInPTY starts bin with args on a pseudo-terminal whose other end
// answers cursor-position queries (when answerCPR) and nothing else, like a
// terminal that does not report colours. It returns what the program wrote
// up to its exit, or up to stopAt appearing (then it sends "q").
func runInPTY(t *testing.T, bin string, answerCPR bool, stopAt string, args ...string) string {
	t.Helper()
	m, s := openPTY(t)
	cmd := exec.Command(bin, args...)
	cmd.Stdin, cmd.Stdout, cmd.Stderr = s, s, s
	cmd.Env = append(os.Environ(), "TERM=xterm-256color", "NO_COLOR=", "XDG_DATA_HOME="+t.TempDir(), "HOME="+t.TempDir())
	cmd.SysProcAttr = &syscall.SysProcAttr{Setsid: true, Setctty: true}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	// The child holds its own copy of the terminal; closing ours lets a
	// read on the master end fail once the child has gone.
	s.Close()
	done := make(chan error, 1)
	go func() { done <- cmd.Wait() }()
	chunks := make(chan []byte, 64)
	go func() {
		defer close(chunks)
		buf := make([]byte, 64<<10)
		for {
			n, err := m.Read(buf)
			if n > 0 {
				chunks <- append([]byte(nil), buf[:n]...)
			}
			if err != nil {
				return
			}
		}
	}()
	var out bytes.Buffer
	timeout := time.After(40 * time.Second)
	quitSent, exited := false, false
	for {
		select {
		case chunk, ok := <-chunks:
			if !ok {
				if !exited {
					<-done
				}
				return out.String()
			}
			out.Write(chunk)
			if answerCPR && bytes.Contains(chunk, []byte("\x1b[6n")) {
				_, _ = m.Write([]byte("\x1b[24;1R"))
			}
			if stopAt != "" && !quitSent && strings.Contains(out.String(), stopAt) {
				_, _ = m.Write([]byte("q"))
				quitSent = true
			}
		case <-done:
			exited = true
			// Drain what is left, then the read fails and chunks closes.
			done = nil
		case <-timeout:
			_ = cmd.Process.Kill()
			t.Fatalf("%v did not finish; output so far %q", args, out.String())
		}
	}
}

// The command line never questions the terminal, and the workbench asks at
// most once (its background colour, for the colour scheme). Terminal
// queries are an OSC 10/11 colour request or a DSR cursor-position request
// (ECMA-48, DSR "CSI 6 n"; xterm control sequences, OSC 10/11); each waits
// up to five seconds in a terminal that does not answer.
func TestStartupQueriesTheTerminalAtMostOnce(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command")
	}
	bin := buildJunco(t)
	count := func(out string) int {
		return strings.Count(out, "\x1b]10;?") + strings.Count(out, "\x1b]11;?")
	}
	for _, args := range [][]string{{"--version"}, {"calc", "--na", "1e17", "--nd", "1e16"}} {
		out := runInPTY(t, bin, false, "", args...)
		if n := count(out); n != 0 || strings.Contains(out, "\x1b[6n") {
			t.Errorf("junco %v sent %d colour queries (and cursor query: %v); want none: %q",
				args, n, strings.Contains(out, "\x1b[6n"), out)
		}
	}
	out := runInPTY(t, bin, true, "invented demo data")
	if n := count(out); n > 1 {
		t.Errorf("the workbench sent %d colour queries before its first frame, want at most 1", n)
	}
	if !strings.Contains(out, "invented demo data") {
		t.Errorf("no first frame: %q", out)
	}
}
