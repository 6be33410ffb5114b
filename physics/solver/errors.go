package solver

import (
	"fmt"
	"strconv"
)

// ParamError reports an input (device, profile, mesh or option field) that
// is outside the domain the solver accepts. It names the field, the value it
// had, the allowed range and the reason for the rule, so that a user
// interface can show it unchanged.
type ParamError struct {
	// Field is the path of the offending field, e.g. "Profile.Donors[1].Straggle".
	Field string
	// Value is the offending value as text.
	Value string
	// Allowed describes the accepted range, e.g. "> 0 and finite".
	Allowed string
	// Why says why the rule exists.
	Why string
}

// Error implements error.
func (e *ParamError) Error() string {
	s := fmt.Sprintf("solver: %s = %s: must be %s", e.Field, e.Value, e.Allowed)
	if e.Why != "" {
		s += " (" + e.Why + ")"
	}
	return s
}

// prefixed returns a copy of the error with the field path prefixed.
func (e *ParamError) prefixed(p string) *ParamError {
	c := *e
	if c.Field == "" {
		c.Field = p
	} else {
		c.Field = p + "." + c.Field
	}
	return &c
}

// fv formats a float for a ParamError.
func fv(v float64) string { return strconv.FormatFloat(v, 'g', 6, 64) }

// paramErr builds a *ParamError for a float field.
func paramErr(field string, v float64, allowed, why string) *ParamError {
	return &ParamError{Field: field, Value: fv(v), Allowed: allowed, Why: why}
}

// ConvergenceError reports that the nonlinear iteration did not reach the
// requested tolerance. No result is returned for the failing bias: the
// solver never hands back an unconverged solution as if it were one.
type ConvergenceError struct {
	// Stage is "equilibrium" (nonlinear Poisson) or "bias" (coupled
	// drift-diffusion Newton).
	Stage string
	// Bias is the bias the caller asked for, V (forward positive).
	Bias float64
	// Reached is the last bias at which the solution converged, V.
	Reached float64
	// Step is the last (smallest) continuation step tried, V.
	Step float64
	// Iterations is the number of Newton iterations of the last attempt.
	Iterations int
	// Update is the infinity norm of the last Newton update, in units of
	// the thermal voltage kT/q.
	Update float64
	// Residual is the infinity norm of the row-equilibrated residual of the
	// last iterate, in units of kT/q (each equation divided by the largest
	// magnitude of its Jacobian row).
	Residual float64
	// Reason says what stopped the iteration.
	Reason string
}

// Error implements error.
func (e *ConvergenceError) Error() string {
	if e.Stage == "equilibrium" {
		return fmt.Sprintf("solver: equilibrium did not converge: %s after %d Newton iterations (update %.3g kT/q, residual %.3g kT/q)",
			e.Reason, e.Iterations, e.Update, e.Residual)
	}
	return fmt.Sprintf("solver: no convergence at %.6g V: %s; last converged bias %.6g V, smallest step tried %.3g V, %d Newton iterations (update %.3g kT/q, residual %.3g kT/q)",
		e.Bias, e.Reason, e.Reached, e.Step, e.Iterations, e.Update, e.Residual)
}
