package solver

import (
	"context"
	"errors"
	"testing"
)

// countdownCtx reports cancellation from its (after+1)-th Err call on and
// counts the calls: a deterministic Ctrl-C arriving inside a bias step.
type countdownCtx struct {
	context.Context
	after, calls int
}

func (c *countdownCtx) Err() error {
	c.calls++
	if c.calls > c.after {
		return context.Canceled
	}
	return nil
}

// A cancellation seen inside a continuation step (between Newton
// iterations or Gummel sweeps) ends the solve at once: it returns
// context.Canceled with at most three further checks, instead of finishing
// the step (which takes seconds on a 200000-node mesh).
func TestSolveCancelledInsideStep(t *testing.T) {
	d := stepDiode(material(t, "si"), 300, 1e17*cm3, 1e16*cm3, 5*um, 10*um)
	s := newSolver(t, d, Options{})
	full := &countdownCtx{Context: context.Background(), after: 1 << 30}
	if _, err := s.SolveContext(full, 0.6); err != nil {
		t.Fatal(err)
	}
	t.Logf("%d context checks in one solve", full.calls)
	// Checks made per step boundary only would be few; inside the step
	// there are many more.
	if full.calls < 10 {
		t.Fatalf("a solve to 0.6 V checks its context %d times; the Newton iterations do not check it", full.calls)
	}
	for _, after := range []int{1, 3, full.calls / 2, full.calls - 2} {
		c := &countdownCtx{Context: context.Background(), after: after}
		_, err := s.SolveContext(c, 0.6)
		if !errors.Is(err, context.Canceled) {
			t.Fatalf("cancelled after %d checks: %v", after, err)
		}
		if extra := c.calls - (after + 1); extra > 3 {
			t.Errorf("cancelled after %d checks: %d more checks before returning", after, extra)
		}
	}
}
