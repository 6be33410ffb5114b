package extract

import (
	"errors"
	"fmt"
)

// Sentinel errors wrapped by the errors this package returns; test with
// errors.Is.
var (
	// ErrInput marks invalid caller input (wrong lengths, non-finite or
	// out-of-range values, empty windows). Every *InputError wraps it.
	ErrInput = errors.New("invalid input")
	// ErrTooFewPoints means the fit window holds fewer usable points than
	// the model has parameters plus one.
	ErrTooFewPoints = errors.New("too few usable points")
	// ErrNoConvergence means the least-squares iteration ended without
	// reaching a finite minimum.
	ErrNoConvergence = errors.New("fit did not converge")
	// ErrNotRun marks a batch item that was never started because the
	// batch context was cancelled.
	ErrNotRun = errors.New("not run")
)

// InputError describes invalid input: which field, the offending value, the
// allowed range and why it is required.
type InputError struct {
	Field   string // name of the argument or option, e.g. "TemperatureK"
	Value   string // offending value as text
	Allowed string // allowed range or form
	Reason  string // why
	Err     error  // ErrInput or a more specific sentinel (ErrTooFewPoints)
}

// Error formats the error as "Field = Value: allowed ...; reason".
func (e *InputError) Error() string {
	s := fmt.Sprintf("%s = %s: ", e.Field, e.Value)
	if e.Allowed != "" {
		s += "allowed " + e.Allowed + "; "
	}
	return s + e.Reason
}

// Unwrap returns the sentinel the error wraps (ErrInput when unset).
func (e *InputError) Unwrap() []error {
	if e.Err == nil || e.Err == ErrInput {
		return []error{ErrInput}
	}
	return []error{ErrInput, e.Err}
}

func inputErr(field string, value any, allowed, reason string) error {
	return &InputError{Field: field, Value: fmt.Sprint(value), Allowed: allowed, Reason: reason}
}

func tooFew(field string, got, need int, why string) error {
	return &InputError{Field: field, Value: fmt.Sprintf("%d usable points", got),
		Allowed: fmt.Sprintf("at least %d", need), Reason: why, Err: ErrTooFewPoints}
}

// checkSweep checks what every I-V fit needs: voltage and current columns
// of one length, a device temperature in 1..2000 K (for kT/q) and a valid
// window.
func checkSweep(v, i []float64, t float64, w Window) error {
	if len(v) != len(i) {
		return inputErr("current", fmt.Sprintf("%d values", len(i)), fmt.Sprintf("%d values (one per voltage)", len(v)), "voltage and current columns must have the same length")
	}
	if !(t >= 1 && t <= 2000) {
		return inputErr("TemperatureK", t, "1..2000 K", "the thermal voltage kT/q needs the device temperature")
	}
	return w.check("Window")
}
