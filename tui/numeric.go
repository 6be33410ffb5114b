package tui

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"time"

	tea "github.com/charmbracelet/bubbletea"

	"junco/model"
	"junco/physics"
)

// Solver mode: the charts that both models can draw overlay the
// drift-diffusion solution on the analytic (depletion-approximation)
// curve, one extra chart shows the solver's carrier densities, and a
// short table reads out where the two models differ.

// solveTimeout bounds one drift-diffusion solution.
const solveTimeout = 30 * time.Second

// carriersKind is the solver-only chart, listed in solver mode only.
func carriersKind() chartKind {
	return chartKind{"carriers", "carrier densities (solver)", sweepNone, true}
}

// numericCurveID names the solver curve drawn with a chart ("" when the
// chart has none).
func numericCurveID(kind string) string {
	switch kind {
	case "charge":
		return model.CurveNumericCharge
	case "field":
		return model.CurveNumericField
	case "potential":
		return model.CurveNumericPotential
	case "bands":
		return model.CurveNumericBands
	case "carriers":
		return model.CurveNumericCarriers
	}
	return ""
}

// solverState is the drift-diffusion side of the charts panel.
type solverState struct {
	on bool
	// seq numbers the solve requests; an answer to an older one is
	// dropped. solving is set while the latest is out.
	seq     int
	solving bool
	asked   *model.Spec // the junction of the latest request
	// The answer to the latest request: its curves by ID and the
	// comparison with the analytic result, or the reason it failed.
	curves map[string]model.Curve
	diffs  []model.Difference
	err    string
	cancel context.CancelFunc
}

// solveDoneMsg delivers the answer to solve request seq.
type solveDoneMsg struct {
	seq    int
	curves map[string]model.Curve
	diffs  []model.Difference
	err    error
}

// kindsFor lists the charts of the drawing mode and model mode.
func kindsFor(ascii, solver bool) []chartKind {
	k := chartKinds(ascii)
	if solver {
		k = append(k, carriersKind())
	}
	return k
}

// runSolve solves the junction and compares it with the analytic result;
// it only reads its arguments, so it may run on any goroutine. A panic
// inside the solver becomes an error.
func runSolve(ctx context.Context, seq int, spec model.Spec, analytic *model.Result) (msg solveDoneMsg) {
	msg.seq = seq
	defer func() {
		if r := recover(); r != nil {
			msg = solveDoneMsg{seq: seq, err: fmt.Errorf("the solver failed: %v", r)}
		}
	}()
	res, err := model.Solve(ctx, spec, model.NumericSpec{}, nil)
	if err != nil {
		msg.err = err
		return msg
	}
	msg.curves = map[string]model.Curve{}
	for _, c := range model.NumericCurves(res) {
		msg.curves[c.ID] = c
	}
	msg.diffs = model.Compare(analytic, res)
	return msg
}

// solveRequest asks for the drift-diffusion solution of the junction in
// force when solver mode is on and the junction changed since the last
// request; nothing otherwise.
func (c *chartModel) solveRequest(spec model.Spec, analytic *model.Result) tea.Cmd {
	n := &c.num
	if !n.on || (n.asked != nil && reflect.DeepEqual(*n.asked, spec)) {
		return nil
	}
	if n.cancel != nil {
		n.cancel()
	}
	s := spec
	n.asked = &s
	n.seq++
	n.solving, n.curves, n.diffs, n.err = true, nil, nil, ""
	ctx, cancel := context.WithTimeout(context.Background(), solveTimeout)
	n.cancel = cancel
	seq := n.seq
	c.render()
	return func() tea.Msg {
		defer cancel()
		return runSolve(ctx, seq, s, analytic)
	}
}

// applySolve takes a solution if it answers the latest request.
func (c *chartModel) applySolve(msg solveDoneMsg) {
	n := &c.num
	if !n.on || msg.seq != n.seq {
		return
	}
	n.solving, n.cancel = false, nil
	n.curves, n.diffs, n.err = msg.curves, msg.diffs, ""
	if msg.err != nil {
		n.curves, n.diffs = nil, nil
		n.err = solveErrText(msg.err)
	}
	c.render()
}

// solveErrText is the one-line reason a solution is missing.
func solveErrText(err error) string {
	var ve *model.ValidationError
	t := strings.Join(strings.Fields(err.Error()), " ")
	switch {
	case errors.Is(err, context.DeadlineExceeded):
		return "the solver took too long and was stopped"
	case errors.As(err, &ve):
		return "the solver refuses this junction: " + t
	}
	return "no drift-diffusion solution: " + t
}

// toggleSolver switches between the analytic model and the solver.
func (c *chartModel) toggleSolver(spec model.Spec, analytic *model.Result) tea.Cmd {
	n := &c.num
	n.on = !n.on
	if !n.on {
		if n.cancel != nil {
			n.cancel()
		}
		*n = solverState{seq: n.seq}
	}
	c.kinds = kindsFor(c.e.ascii, n.on)
	c.idx = min(max(c.idx, 0), len(c.kinds)-1)
	c.render()
	return tea.Batch(c.request(), c.solveRequest(spec, analytic))
}

// overlay returns the solver's lines for the chart shown (clipped to the
// analytic curve's span) and, for the solver-only chart, the curve itself
// in place of cur. ok is false when the chart cannot be drawn yet; msg
// then says why ("" while solving).
func (c chartModel) overlay(kind string, cur model.Curve) (out model.Curve, extra []model.Series, xs []float64, msg string, ok bool) {
	id := numericCurveID(kind)
	if !c.num.on || id == "" {
		return cur, nil, nil, "", true
	}
	nc, have := c.num.curves[id]
	if kind == "carriers" {
		switch {
		case have:
			return nc, nil, nil, "", true
		case c.num.err != "":
			return cur, nil, nil, c.num.err, false
		}
		return cur, nil, nil, "", false
	}
	if !have {
		return cur, nil, nil, "", true
	}
	lo, hi := minMax(cur.Xs, 1)
	for _, x := range nc.Xs {
		if x >= lo && x <= hi {
			xs = append(xs, x)
		} else {
			xs = append(xs, math.NaN())
		}
	}
	for _, s := range nc.Series {
		l := s.Label
		if !strings.Contains(l, "numeric") {
			l += " (numeric)"
		}
		extra = append(extra, model.Series{Label: l, Y: s.Y})
	}
	return cur, extra, xs, "", true
}

// waiting reports whether the chart shown waits for the solver.
func (c chartModel) waiting() bool {
	return c.num.on && c.num.solving && c.kind().id == "carriers"
}

// readoutRows is the height of the difference readout under the chart.
func (c chartModel) readoutRows() int {
	if !c.num.on {
		return 0
	}
	if c.num.solving || c.num.err != "" || len(c.num.diffs) == 0 || c.h < 26 {
		return 1
	}
	return len(c.num.diffs) + 2
}

// readout draws the comparison of the analytic and numeric values:
// quantity, analytic, numeric, relative difference, marked beyond 5 %.
func (c chartModel) readout(w int) []string {
	n := c.num
	if !n.on {
		return nil
	}
	st, g, ascii := c.e.st, c.e.g, c.e.ascii
	switch {
	case n.solving:
		return []string{st.muted.Paint(cut("drift-diffusion: solving"+g.ellipsis, w, g.ellipsis))}
	case n.err != "":
		return []string{st.err.Paint(cut(g.bad+" "+n.err, w, g.ellipsis))}
	case len(n.diffs) == 0:
		return []string{st.muted.Paint(cut("drift-diffusion: no comparison (the analytic result is missing)", w, g.ellipsis))}
	}
	worst, bad := 0.0, 0
	for _, d := range n.diffs {
		if a := math.Abs(d.Relative); physics.Finite(a) {
			worst = math.Max(worst, a)
			if d.Flagged {
				bad++
			}
		}
	}
	if c.h < 26 {
		l := fmt.Sprintf("analytic vs numeric: largest difference %s", relText(worst))
		if bad > 0 {
			return []string{st.warn.Paint(cut(fmt.Sprintf("%s %s, %d beyond tolerance: the depletion approximation is not to be trusted here", g.bad, l, bad), w, g.ellipsis))}
		}
		return []string{st.ok.Paint(cut(g.good+" "+l, w, g.ellipsis))}
	}
	head := fmt.Sprintf("%-22s %11s %11s %9s", "analytic vs numeric", "analytic", "numeric", "diff")
	out := []string{st.muted.Paint(cut(head, w, g.ellipsis))}
	for _, d := range n.diffs {
		mark := " "
		if d.Flagged {
			mark = g.bad
		}
		name := d.Label
		if d.Symbol != "" {
			name += " " + d.Symbol
		}
		l := fmt.Sprintf("%-22s %11s %11s %9s %s", cut(name, 22, g.ellipsis),
			model.Format(d.Kind, d.Analytic, 3, ascii), model.Format(d.Kind, d.Numeric, 3, ascii), relText(d.Relative), mark)
		if mark != " " {
			out = append(out, st.warn.Paint(cut(l, w, g.ellipsis)))
		} else {
			out = append(out, cut(l, w, g.ellipsis))
		}
	}
	note := g.good + " within 1 % (Vbi) and 5 %: the depletion approximation holds"
	if bad > 0 {
		note = g.bad + " not to be trusted here: Vbi over 1 %, others over 5 %"
	}
	return append(out, st.faint.Paint(cut(note, w, g.ellipsis)))
}

// relText formats a relative difference as a signed percentage.
func relText(r float64) string {
	if !physics.Finite(r) {
		return "n/a"
	}
	return fmt.Sprintf("%+.1f %%", 100*r)
}

// numericMarker picks the marker of solver series i among n markers:
// counted from the end, so that it differs from the analytic series'.
func numericMarker(i, n int) int {
	return (n - 1 - i%n + n) % n
}

// toggleSolver switches the charts between the analytic model and the
// drift-diffusion solver, with a note saying which is in force.
func (m *Model) toggleSolver() tea.Cmd {
	cmd := m.chart.toggleSolver(m.form.spec, m.form.res)
	if m.chart.num.on {
		m.note = "solver mode: the charts overlay the drift-diffusion solution and read out the differences (m switches back)"
	} else {
		m.note = "analytic mode: the charts show the depletion approximation (m switches to the solver)"
	}
	return cmd
}
