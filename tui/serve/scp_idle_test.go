package serve

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"testing"
	"time"

	"junco/sessions"
)

// A legacy scp download (`scp -O host:file .`) longer than --idle is not
// cut while the client takes the bytes: the client sends nothing during a
// file's bytes in that protocol, and before, the idle watchdog closed the
// connection mid-file. Here a 4 MiB file is taken at about 1.3 MiB/s
// (about 3 s) with --idle 300 ms; every byte must arrive. A client that
// stops reading is still closed: the second half of the test stops after
// the header and waits.
func TestSCPDownloadLongerThanIdle(t *testing.T) {
	f := startInboxServer(t, sessions.InboxLimits{}, func(c *Config) { c.IdleTimeout = 300 * time.Millisecond })
	data, ada, fx := f.data, f.ada, f.fixture
	in, err := sessions.OpenInbox(data, "ada", sessions.InboxLimits{})
	if err != nil {
		t.Fatal(err)
	}
	big := bytes.Repeat([]byte("0.65,1.2e-3\n"), 4<<20/12)
	w, err := in.Create("big.csv", -1)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := w.Write(big); err != nil || w.Close() != nil {
		t.Fatal("writing the inbox file", err)
	}
	in.Close()

	got := 0
	scpRun(t, fx.addr, "ada", ada, "scp -f big.csv", func(cin io.Writer, out *bufio.Reader) {
		cin.Write([]byte{0})
		line, err := out.ReadString('\n')
		if err == nil && line[0] == 'T' { // the times line comes first
			cin.Write([]byte{0})
			line, err = out.ReadString('\n')
		}
		if err != nil || line != fmt.Sprintf("C0600 %d big.csv\n", len(big)) {
			t.Errorf("header %q, %v", line, err)
			return
		}
		cin.Write([]byte{0})
		buf := make([]byte, 32<<10)
		for got < len(big) {
			n, err := out.Read(buf[:min(len(buf), len(big)-got)])
			got += n
			if err != nil {
				t.Logf("read after %d bytes: %v", got, err)
				return
			}
			time.Sleep(25 * time.Millisecond)
		}
		cin.Write([]byte{0})
	})
	if got != len(big) {
		t.Errorf("the download was cut after %d of %d bytes with --idle 300ms", got, len(big))
	}

	var stalled int64
	scpRun(t, fx.addr, "ada", ada, "scp -f big.csv", func(cin io.Writer, out *bufio.Reader) {
		for range 2 { // the times line and the file line
			cin.Write([]byte{0})
			if _, err := out.ReadString('\n'); err != nil {
				return
			}
		}
		cin.Write([]byte{0})
		time.Sleep(2 * time.Second) // takes nothing
		stalled, _ = io.Copy(io.Discard, out)
	})
	if stalled >= int64(len(big)) {
		t.Errorf("a client that took nothing for 2 s with --idle 300ms got the whole file (%d bytes)", stalled)
	}
}
