package cli

import (
	"context"
	"os"
	"os/signal"
	"sync"
	"syscall"
	"time"
)

// signalContext is the context of a run of the command line: cancelled by
// SIGINT or SIGTERM, which it starts to catch when first asked (Done,
// Err, Value, or a context derived from it, as every command that can
// take long does at its start). Catching signals costs a thread and
// several switches between threads at start (the runtime unblocks them on
// a thread of its own): a third of a millisecond that a command finishing
// at once, such as junco --version, never pays. Until then SIGINT and
// SIGTERM end the process as they do any program.
type signalContext struct {
	sigs []os.Signal
	once sync.Once
	ctx  context.Context
	stop context.CancelFunc
}

// SignalContext returns the command line's context, cancelled by SIGINT or
// SIGTERM once a command consults it, and the function that stops
// catching them.
func SignalContext() (context.Context, func()) {
	c := newSignalContext(os.Interrupt, syscall.SIGTERM)
	return c, c.release
}

func newSignalContext(sigs ...os.Signal) *signalContext {
	return &signalContext{sigs: sigs}
}

func (c *signalContext) start() {
	c.once.Do(func() { c.ctx, c.stop = signal.NotifyContext(context.Background(), c.sigs...) })
}

// release stops catching the signals (if they were caught).
func (c *signalContext) release() {
	c.once.Do(func() {}) // nothing started: nothing to stop, and nothing will start
	if c.stop != nil {
		c.stop()
	}
}

func (c *signalContext) Deadline() (time.Time, bool) { return time.Time{}, false }

func (c *signalContext) Done() <-chan struct{} {
	c.start()
	if c.ctx == nil { // released before first use
		return nil
	}
	return c.ctx.Done()
}

func (c *signalContext) Err() error {
	c.start()
	if c.ctx == nil {
		return nil
	}
	return c.ctx.Err()
}

func (c *signalContext) Value(key any) any {
	c.start()
	if c.ctx == nil {
		return nil
	}
	return c.ctx.Value(key)
}
