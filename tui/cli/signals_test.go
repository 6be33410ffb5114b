package cli

import (
	"context"
	"os"
	"syscall"
	"testing"
	"time"
)

// The run's context catches nothing until first asked; once a command has
// derived its own context from it (as the long commands do), a signal
// cancels both. SIGUSR1 stands in for SIGINT, sent to this process only
// after the context catches it.
func TestSignalContextCatchesOnFirstUse(t *testing.T) {
	c := newSignalContext(syscall.SIGUSR1)
	if c.ctx != nil {
		t.Fatal("signals caught before any use")
	}
	derived, cancel := context.WithCancel(c)
	defer cancel()
	if c.ctx == nil {
		t.Fatal("deriving a context did not start catching signals")
	}
	if err := syscall.Kill(os.Getpid(), syscall.SIGUSR1); err != nil {
		t.Fatal(err)
	}
	select {
	case <-derived.Done():
	case <-time.After(5 * time.Second):
		t.Fatal("SIGUSR1 did not cancel the derived context within 5 s")
	}
	if c.Err() == nil {
		t.Error("the run's context is not cancelled")
	}
	c.release()
}

// Released before any use, the context never starts catching and is
// never done.
func TestSignalContextReleasedUnused(t *testing.T) {
	c := newSignalContext(syscall.SIGUSR1)
	c.release()
	if c.Done() != nil || c.Err() != nil || c.ctx != nil {
		t.Error("a released, unused context started catching signals")
	}
}
