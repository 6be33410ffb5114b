package model

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// Caps on the points of one sweep; each error that refuses a sweep names
// its cap.
const (
	// MaxSweepPoints caps an analytic sweep (calc --sweep and --tsweep, the
	// sweeps stored in a session): every point is computed and held in
	// memory.
	MaxSweepPoints = 100001
	// MaxNumericSweepPoints caps a drift-diffusion sweep (solve --sweep
	// and --cv): every point is a full numeric solve.
	MaxNumericSweepPoints = 5001
	// MaxChartPoints caps a sweep drawn by the workbench's charts: every
	// keystroke may redraw it.
	MaxChartPoints = 2001
)

// SweepError is a sweep refused: its text as given, which part is wrong
// (FROM, TO, STEP or the whole), and why. Points and Limit are set when
// the sweep has too many points (Points is counted in floating point and
// may be far beyond any int).
type SweepError struct {
	Text   string  // the sweep as given, e.g. "0:1e30:1" or "0 V to 1e+30 V step 1 V"
	Part   string  // "FROM", "TO", "STEP" or "" for the sweep as a whole
	Points float64 // points the sweep would have (too many points only)
	Limit  int     // the cap exceeded (too many points only)
	Why    string  // what is wrong, with the allowed form or range
}

// Error formats the error as "sweep TEXT: [PART: ]why".
func (e *SweepError) Error() string {
	s := "sweep " + e.Text + ": "
	if e.Part != "" {
		s += e.Part + " "
	}
	return s + e.Why
}

// limitName names a cap in errors, with why it exists.
func limitName(limit int) string {
	switch limit {
	case MaxSweepPoints:
		return fmt.Sprintf("MaxSweepPoints = %d (each point is computed and kept in memory)", limit)
	case MaxChartPoints:
		return fmt.Sprintf("MaxChartPoints = %d (a chart redraws as you type)", limit)
	case MaxNumericSweepPoints:
		return fmt.Sprintf("MaxNumericSweepPoints = %d (each point is a drift-diffusion solve)", limit)
	}
	return fmt.Sprintf("the limit of %d points", limit)
}

// Count returns the number of points of r, From + k Step for k = 0, 1,
// ... while not past To (a rounding slack of 1e-9 step keeps To itself),
// counted in floating point so that no range overflows an int, and
// refuses more than limit points with a *SweepError naming the limit.
func (r Range) Count(limit int) (int, error) {
	text := fmt.Sprintf("%g:%g:%g", r.From, r.To, r.Step)
	for _, v := range []float64{r.From, r.To, r.Step} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, &SweepError{Text: text, Why: "values must be finite"}
		}
	}
	if r.Step == 0 || (r.To-r.From)*r.Step < 0 {
		return 0, &SweepError{Text: text, Why: "the step must be non-zero and point from FROM to TO"}
	}
	n := math.Floor((r.To-r.From)/r.Step+1e-9) + 1
	if !(n <= float64(limit)) {
		return 0, &SweepError{Text: text, Points: n, Limit: limit,
			Why: fmt.Sprintf("%.4g points, over %s; take a larger step", n, limitName(limit))}
	}
	return int(n), nil
}

// PointsUpTo returns the sweep values, at most limit of them (Count).
func (r Range) PointsUpTo(limit int) ([]float64, error) {
	n, err := r.Count(limit)
	if err != nil {
		return nil, err
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = r.From + float64(i)*r.Step
	}
	return out, nil
}

// ParseSweep parses a sweep FROM:TO:STEP with the units of kind k
// ("-2V:0.9V:10mV", "250K:400K:10K", "0C:100C:10C") and checks it has at
// most limit points (MaxSweepPoints or MaxNumericSweepPoints). It is the
// one sweep parser of junco: calc --sweep and --tsweep, solve --sweep and
// --cv and the workbench's sweep editor (through ParseSweepParts) use it.
func ParseSweep(k Kind, text string, limit int) (Range, error) {
	parts := strings.Split(text, ":")
	if len(parts) != 3 {
		return Range{}, &SweepError{Text: fmt.Sprintf("%q", text), Why: "want FROM:TO:STEP, e.g. " + sweepExample(k)}
	}
	return parseSweep(k, fmt.Sprintf("%q", text), parts[0], parts[1], parts[2], limit)
}

// ParseSweepParts is ParseSweep for a sweep given as three texts (the
// workbench's FROM, TO and STEP fields).
func ParseSweepParts(k Kind, from, to, step string, limit int) (Range, error) {
	return parseSweep(k, fmt.Sprintf("%q to %q step %q", from, to, step), from, to, step, limit)
}

func parseSweep(k Kind, text, from, to, step string, limit int) (Range, error) {
	var v [3]float64
	for i, p := range []string{from, to, step} {
		var x float64
		var err error
		if i == 2 {
			// A step is a difference: 10 C is 10 K, not 283.15 K.
			x, err = ParseDifference(k, p)
		} else {
			x, err = ParseValue(k, p)
		}
		if err != nil {
			return Range{}, &SweepError{Text: text, Part: [3]string{"FROM", "TO", "STEP"}[i], Why: err.Error()}
		}
		v[i] = x
	}
	r := Range{From: v[0], To: v[1], Step: v[2]}
	if _, err := r.Count(limit); err != nil {
		var se *SweepError
		if errors.As(err, &se) {
			se.Text = text
		}
		return Range{}, err
	}
	return r, nil
}

// sweepExample is an example sweep of kind k for error messages.
func sweepExample(k Kind) string {
	if k == Temperature {
		return "250K:400K:10K"
	}
	return "-2V:0.9V:10mV"
}
