package sessions

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// TestInboxCapHoldsForUploadsAtOnce checks that the per-user cap holds
// when several uploads are open at the same time (SFTP lets one client
// open many files; OpenSSH's scp opens one connection per run): the
// uploads together never store more than the cap. Before the cap was
// shared, each upload was checked against the files present when it
// began, and four uploads of 900000 bytes filled a 3 MiB inbox with
// 3.6 MB.
func TestInboxCapHoldsForUploadsAtOnce(t *testing.T) {
	lim := InboxLimits{FileBytes: 1000, UserBytes: 2500, UserFlag: "--inbox-max-mib"}
	in, _, _ := openTestInbox(t, lim)
	var ws []*InboxWriter
	for i := 0; i < 4; i++ {
		w, err := in.Create(fmt.Sprintf("f%d.csv", i), -1)
		if err != nil {
			t.Fatal(err)
		}
		ws = append(ws, w)
	}
	var wg sync.WaitGroup
	for _, w := range ws {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for off := 0; off < 1000; off += 100 {
				if _, err := w.WriteAt(make([]byte, 100), int64(off)); err != nil {
					if !strings.Contains(err.Error(), "--inbox-max-mib") {
						t.Errorf("refusal names no limit: %v", err)
					}
					return
				}
			}
		}()
	}
	wg.Wait()
	stored := 0
	for _, w := range ws {
		if w.Close() == nil {
			stored++
		}
	}
	used, err := in.Usage()
	if err != nil {
		t.Fatal(err)
	}
	if used > lim.UserBytes || stored != 2 {
		t.Errorf("uploads at once: %d bytes stored in %d files; the cap is %d bytes (2 whole files)", used, stored, lim.UserBytes)
	}
}

// TestInboxCapSharedAcrossConnections checks that two inboxes of one user
// opened with one InboxLimits (two connections of the user) share the
// per-user cap.
func TestInboxCapSharedAcrossConnections(t *testing.T) {
	lim := InboxLimits{FileBytes: 1000, UserBytes: 1500, Quotas: NewInboxQuotas()}
	a, data, _ := openTestInbox(t, lim)
	b, err := OpenInbox(data, "alice", lim)
	if err != nil {
		t.Fatal(err)
	}
	defer b.Close()
	wa, err := a.Create("a.csv", -1)
	if err != nil {
		t.Fatal(err)
	}
	wb, err := b.Create("b.csv", -1)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := wa.Write(make([]byte, 1000)); err != nil {
		t.Fatal(err)
	}
	if _, err := wb.Write(make([]byte, 1000)); err == nil {
		t.Error("the second connection's upload crossed the per-user cap")
	}
	wa.Close()
	wb.Close()
	// The same name uploaded on two connections at once: the second
	// waits for the first to end.
	wa, err = a.Create("same.csv", -1)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := b.Create("same.csv", -1); err == nil || !strings.Contains(err.Error(), "being uploaded") {
		t.Errorf("a second upload of a name being uploaded: %v", err)
	}
	wa.Close()
}

// TestInboxFileCountCap checks that an inbox holds at most MaxInboxFiles
// files (each costs the server an entry however small) and that bytes of
// files beyond what a listing shows still count against the per-user
// cap. Before, uploads of empty files never stopped, and with more than
// 10000 files the usage left the rest out: 3.6 MB went into a 3 MiB
// inbox.
func TestInboxFileCountCap(t *testing.T) {
	lim := InboxLimits{FileBytes: 1000, UserBytes: 1500}
	in, data, _ := openTestInbox(t, lim)
	dir, err := InboxRoot(data, "alice")
	if err != nil {
		t.Fatal(err)
	}
	// Files put there by the server's account (or left by an older
	// junco): the server must count them all.
	for i := 0; i < MaxInboxFiles+5; i++ {
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("e%05d.csv", i)), nil, 0o600); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(dir, "zz-full.csv"), make([]byte, 1400), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, err := in.Create("new.csv", -1); err == nil || !strings.Contains(err.Error(), fmt.Sprint(MaxInboxFiles)) {
		t.Errorf("a file past the file-count cap: %v", err)
	}
	// Replacing a file keeps the count: allowed, but the bytes of every
	// file count.
	w, err := in.Create("e00000.csv", -1)
	if err != nil {
		t.Fatalf("replacing a file at the count cap: %v", err)
	}
	if _, err := w.Write(make([]byte, 200)); err == nil {
		t.Error("write past the per-user cap with more files than a listing shows")
	}
	w.Close()
}

// Uploads that write in turn (as parallel transfers do) share the cap
// without starving one another: the upload whose write would cross the
// cap fails and gives its bytes back at once, and the others go on. Before,
// the failed upload kept its bytes until its client closed it, so every
// upload in turn crossed the cap: five scp runs of 900000 bytes at once
// into an empty 3 MiB inbox stored nothing.
func TestInboxUploadsInTurnShareTheCap(t *testing.T) {
	lim := InboxLimits{FileBytes: 1000, UserBytes: 2500}
	in, _, _ := openTestInbox(t, lim)
	var ws []*InboxWriter
	for i := 0; i < 4; i++ {
		w, err := in.Create(fmt.Sprintf("t%d.csv", i), -1)
		if err != nil {
			t.Fatal(err)
		}
		ws = append(ws, w)
	}
	failed := make([]bool, len(ws))
	for off := 0; off < 1000; off += 100 {
		for i, w := range ws {
			if !failed[i] {
				_, err := w.WriteAt(make([]byte, 100), int64(off))
				failed[i] = err != nil
			}
		}
	}
	stored := 0
	for _, w := range ws {
		if w.Close() == nil {
			stored++
		}
	}
	if used, _ := in.Usage(); stored != 2 || used != 2000 {
		t.Errorf("4 uploads of 1000 bytes in turn into 2500 bytes: %d stored, %d bytes; want 2 files, 2000 bytes", stored, used)
	}
}
