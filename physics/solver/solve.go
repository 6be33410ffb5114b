package solver

import (
	"context"
	"fmt"
	"junco/physics"
	"math"
)

// solveEquilibrium computes the zero-bias solution: the nonlinear Poisson
// equation with phin = phip = 0, from the local-neutrality guess psi =
// asinh(N / (2 n_ie)).
func (s *Solver) solveEquilibrium() (*state, *Result, error) {
	st := s.newState(0)
	copy(st.psi, s.psiNeutral)
	s.applyContacts(st)
	w := s.newWork()
	it, upd, res, err := s.poisson(st, w, s.opt.Tolerance, 60+s.opt.MaxIterations)
	if err != nil {
		return nil, nil, &ConvergenceError{Stage: "equilibrium", Iterations: it, Update: upd, Residual: res, Reason: err.Error()}
	}
	return st, s.result(st, w, it, upd, res), nil
}

// equilibrium returns the cached zero-bias solution, computing it once.
func (s *Solver) equilibrium() (*state, *Result, error) {
	s.eqOnce.Do(func() { s.eq, s.eqRes, s.eqErr = s.solveEquilibrium() })
	return s.eq, s.eqRes, s.eqErr
}

// Equilibrium returns the zero-bias solution (computed once and cached; the
// caller receives its own copy). Method: Newton's method on the
// nonlinear Poisson equation with the quasi-Fermi potentials at zero, from
// the local-neutrality guess psi = asinh(N/(2 n_ie)), each node's update
// limited so that no carrier density rises by more than e^3 above the
// local charge scale per iteration. Its Barrier field is the built-in
// potential as the solver sees it.
func (s *Solver) Equilibrium() (*Result, error) {
	_, r, err := s.equilibrium()
	if err != nil {
		return nil, err
	}
	return r.clone(), nil
}

// BuiltInPotential returns the electrostatic potential difference between
// the cathode and the anode at equilibrium, V. For non-degenerate,
// completely ionised contacts it equals (kT/q) ln(Na Nd / ni^2) up to
// (ni/N)^2 (Sze & Ng 2007, eq. 2.8).
func (s *Solver) BuiltInPotential() (float64, error) {
	_, r, err := s.equilibrium()
	if err != nil {
		return math.NaN(), err
	}
	return r.Barrier, nil
}

// tracker follows a continuation path in bias.
type tracker struct {
	s          *Solver
	w          *work
	cur, prev  *state
	iters      int
	upd, res   float64
	totalIters int
	// rough: cur comes from a Newton solve not yet polished (see polish).
	rough bool
}

func (s *Solver) newTracker() (*tracker, error) {
	eq, _, err := s.equilibrium()
	if err != nil {
		return nil, err
	}
	tr := &tracker{s: s, w: s.newWork(), cur: eq.clone()}
	return tr, nil
}

// predict returns the starting guess at bias v (kT/q): linear extrapolation
// through the last two converged points when it is an interpolation-like
// step (factor in (0, 2]), else the last solution with the potentials
// shifted by the bias change weighted across the junction.
func (tr *tracker) predict(v float64) *state {
	s := tr.s
	g := tr.cur.clone()
	g.v = v
	dv := v - tr.cur.v
	if tr.prev != nil && tr.prev.v != tr.cur.v {
		f := dv / (tr.cur.v - tr.prev.v)
		if f > 0 && f <= 2 {
			for i := range g.psi {
				g.psi[i] += f * (tr.cur.psi[i] - tr.prev.psi[i])
				g.phin[i] += f * (tr.cur.phin[i] - tr.prev.phin[i])
				g.phip[i] += f * (tr.cur.phip[i] - tr.prev.phip[i])
			}
			s.applyContacts(g)
			return g
		}
	}
	// Shift psi by the bias change weighted across the junction and the
	// quasi-Fermi potentials with it, so that no density changes: each
	// density keeps its value and the iteration starts from a state
	// whose exponents cannot overflow, however large the step. The weight
	// is the share of the present potential drop between the anode and
	// each node, so the extra bias spreads over the present depletion
	// region like the drop it already holds.
	a, c := tr.cur.psi[s.ia], tr.cur.psi[s.ic]
	for i := range g.psi {
		w := 0.0
		if c != a {
			w = math.Min(1, math.Max(0, (c-tr.cur.psi[i])/(c-a)))
		}
		g.psi[i] += dv * w
		g.phin[i] += dv * w
		g.phip[i] -= dv * (1 - w)
	}
	s.applyContacts(g)
	return g
}

// maxStep returns the largest step allowed from bias v toward target (kT/q):
// MaxBiasStep in forward bias, growing in reverse bias to a quarter of the
// bias when going deeper and a tenth when coming back (a fractional step
// from reverse bias cannot cross into forward bias).
func (tr *tracker) maxStep(v, target float64) float64 {
	m := tr.s.opt.MaxBiasStep / tr.s.vt
	if v < 0 {
		f := 0.25 // deeper into reverse bias: the depletion region grows
		if target > v {
			f = 0.1 // back toward zero: the depletion region refills
		}
		m = math.Max(m, f*math.Abs(v))
	}
	return m
}

// try solves from the guess g (Gummel, then Newton) and counts the
// iterations. On convergence g becomes the current state and prev the
// previous one (nil: none to extrapolate through). It returns Newton's
// iteration count, last update and residual, and its error.
func (tr *tracker) try(g, prev *state) (it int, upd, res float64, err error) {
	tr.s.gummel(g, tr.w)
	it, upd, res, err = tr.s.newton(g, tr.w)
	tr.totalIters += it
	if err == nil {
		tr.prev, tr.cur = prev, g
		tr.iters, tr.upd, tr.res = it, upd, res
		tr.rough = true
	}
	return it, upd, res, err
}

// nextStep is the continuation's step control: a step that converged
// within six Newton iterations is doubled, a failed one halved.
func nextStep(step float64, iters int, err error) float64 {
	switch {
	case err != nil:
		return step / 2
	case iters <= 6:
		return step * 2
	}
	return step
}

// advance moves the tracker to bias target (V) by continuation with step
// halving on failure, and polishes the state it reaches (see polish).
func (tr *tracker) advance(ctx context.Context, targetV float64) error {
	s := tr.s
	if err := tr.illuminate(ctx); err != nil {
		return err
	}
	target := targetV / s.vt
	minStep := s.opt.MinBiasStep / s.vt
	step := 0.0
	tr.w.ctx = ctx
	defer func() { tr.w.ctx = nil }()
	for tr.cur.v != target {
		if err := ctx.Err(); err != nil {
			return err
		}
		rem := target - tr.cur.v
		ms := tr.maxStep(tr.cur.v, target)
		if step == 0 || math.Abs(step) > ms {
			step = math.Copysign(ms, rem)
		}
		if math.Abs(step) >= math.Abs(rem) {
			step = rem
		}
		next := tr.cur.v + step
		g := tr.predict(next)
		it, upd, res, err := tr.try(g, tr.cur)
		step = nextStep(step, it, err)
		if err == nil {
			continue
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		if math.Abs(step) < minStep {
			return &ConvergenceError{Stage: "bias", Bias: targetV, Reached: tr.cur.v * s.vt, Step: 2 * math.Abs(step) * s.vt,
				Iterations: it, Update: upd, Residual: res, Reason: err.Error()}
		}
	}
	if tr.rough {
		s.polish(tr.cur, tr.w)
		tr.rough = false
	}
	return nil
}

func checkBias(v float64, field string) error {
	if !physics.Finite(v) || math.Abs(v) > 1e5 {
		return paramErr(field, v, "finite, |V| <= 1e5 V", "an applied bias")
	}
	return nil
}

// Solve returns the steady-state solution at anode bias v (V, forward
// positive), reached from equilibrium by continuation.
func (s *Solver) Solve(v float64) (*Result, error) { return s.SolveContext(context.Background(), v) }

// SolveContext is Solve with cancellation.
//
// Method: continuation in bias from equilibrium in steps of at most
// Options.MaxBiasStep (forward) or a quarter of the bias (reverse; a tenth
// when returning toward zero); each step starts from a predictor (linear
// extrapolation or a density-preserving weighted shift),
// improved by Options.GummelIterations decoupled Gummel sweeps, then
// solved by the coupled Newton iteration in (psi, phin, phip) with an
// O(N) banded LU (bandwidth 5 on each side, partial pivoting). A failed
// step is halved down to Options.MinBiasStep, after which a
// *ConvergenceError is returned.
func (s *Solver) SolveContext(ctx context.Context, v float64) (*Result, error) {
	if err := checkBias(v, "bias"); err != nil {
		return nil, err
	}
	if v == 0 && s.gen == nil {
		return s.Equilibrium()
	}
	tr, err := s.newTracker()
	if err != nil {
		return nil, err
	}
	if err := tr.advance(ctx, v); err != nil {
		return nil, err
	}
	return s.result(tr.cur, tr.w, tr.iters, tr.upd, tr.res), nil
}

// Progress reports the advance of a sweep.
type Progress struct {
	Done, Total int     // points finished, points requested
	Bias        float64 // the bias just finished, V
	Current     float64 // its terminal current density, A/m^2 (CV: capacitance, F/m^2)
}

// ProgressFunc receives Progress after every point; it runs on the
// sweeping goroutine and should return quickly.
type ProgressFunc func(Progress)

// Sweep solves the biases in the given order (V, forward positive), each by
// continuation from the previous one (the first from equilibrium). It
// returns the results of the points finished; on cancellation or
// non-convergence it returns those together with the error (ctx.Err() or
// a *ConvergenceError). progress may be nil.
func (s *Solver) Sweep(ctx context.Context, biases []float64, progress ProgressFunc) ([]*Result, error) {
	for i, v := range biases {
		if err := checkBias(v, fmt.Sprintf("biases[%d]", i)); err != nil {
			return nil, err
		}
	}
	tr, err := s.newTracker()
	if err != nil {
		return nil, err
	}
	out := make([]*Result, 0, len(biases))
	for i, v := range biases {
		if err := tr.advance(ctx, v); err != nil {
			return out, err
		}
		var r *Result
		if tr.cur.v == 0 && tr.prev == nil && tr.cur.lit == 0 {
			_, eq, _ := s.equilibrium()
			r = eq.clone()
		} else {
			r = s.result(tr.cur, tr.w, tr.iters, tr.upd, tr.res)
		}
		out = append(out, r)
		if progress != nil {
			progress(Progress{Done: i + 1, Total: len(biases), Bias: v, Current: r.Current})
		}
	}
	return out, nil
}

// CVPoint is one point of a capacitance-voltage sweep.
type CVPoint struct {
	// Bias is the anode bias, V.
	Bias float64
	// Capacitance is the small-signal depletion capacitance per area,
	// F/m^2: C = -[Q(V + dV/2) - Q(V - dV/2)] / dV with Q the charge
	// between a fixed plane and the cathode (Gauss's law: eps times the
	// field on that plane). The plane is the electrical junction (n = p)
	// of the first of the two solutions: there the mobile carriers, and
	// hence the small-signal conduction current, are negligible in
	// reverse bias, so the change of Q is the change of the depletion
	// charge. Quasi-static; the stored minority charge of forward bias
	// (diffusion capacitance) is not included.
	Capacitance float64
	// Charge is the dipole charge Result.JunctionCharge at the bias, C/m^2
	// (mean of the two evaluations).
	Charge float64
	// Width is the depletion width at the bias (mean of the two
	// evaluations), m; NaN where no depleted region exists.
	Width float64
	// Current is the terminal current density, A/m^2 (mean).
	Current float64
	// Mode says whether the dopant occupation followed the signal
	// (low-frequency) or was frozen (high-frequency); without
	// Device.Occupation the two are the same.
	Mode CVMode
}

// CV computes the capacitance at each bias (V) in order, by continuation,
// from the change of the junction charge over Options.CVStep. It returns
// the points finished and, on failure or cancellation, the error. It needs
// a pn junction; progress may be nil.
func (s *Solver) CV(ctx context.Context, biases []float64, progress ProgressFunc) ([]CVPoint, error) {
	for i, v := range biases {
		if err := checkBias(v, fmt.Sprintf("biases[%d]", i)); err != nil {
			return nil, err
		}
	}
	if s.jEdge < 0 {
		return nil, &ParamError{Field: "Device.Profile", Value: "no junction", Allowed: "a profile with a pn junction", Why: "the capacitance is that of the junction charge"}
	}
	tr, err := s.newTracker()
	if err != nil {
		return nil, err
	}
	dv := s.opt.CVStep
	out := make([]CVPoint, 0, len(biases))
	for i, v := range biases {
		var q, qd, wd, cur [2]float64
		plane := -1
		for k, b := range []float64{v - dv/2, v + dv/2} {
			if err := tr.advance(ctx, b); err != nil {
				return out, err
			}
			if plane < 0 {
				plane = s.electricalEdge(tr.cur)
			}
			q[k] = s.junctionCharge(tr.cur, plane)
			wd[k], cur[k], qd[k] = s.summary(tr.cur, tr.w)
			if k == 0 && s.opt.CVMode == CVHighFrequency && s.occ != nil {
				// Frozen occupation: the second point is solved from this
				// one with the ionised doping held at its present value.
				g, err := s.frozenStep(ctx, tr, (v+dv/2)/s.vt)
				if cerr := ctx.Err(); cerr != nil {
					return out, cerr
				}
				if err != nil {
					return out, &ConvergenceError{Stage: "high-frequency capacitance", Bias: v + dv/2, Reached: tr.cur.v * s.vt,
						Step: dv, Reason: err.Error()}
				}
				q[1] = s.junctionCharge(g, plane)
				wd[1], cur[1], qd[1] = s.summary(g, tr.w)
				break
			}
		}
		p := CVPoint{Bias: v, Capacitance: -(q[1] - q[0]) / dv, Charge: 0.5 * (qd[0] + qd[1]),
			Width: 0.5 * (wd[0] + wd[1]), Current: 0.5 * (cur[0] + cur[1]), Mode: s.opt.CVMode}
		out = append(out, p)
		if progress != nil {
			progress(Progress{Done: i + 1, Total: len(biases), Bias: v, Current: p.Capacitance})
		}
	}
	return out, nil
}

// frozenStep returns the solution at bias v (kT/q) reached by one Newton
// solve from the tracker's present state with the ionised doping frozen
// at that state's values; the tracker itself is not moved.
func (s *Solver) frozenStep(ctx context.Context, tr *tracker, v float64) (*state, error) {
	tr.w.ctx = ctx
	defer func() { tr.w.ctx = nil }()
	g := tr.cur.clone()
	n, p := tr.w.n, tr.w.p
	s.carriers(g, n, p)
	g.fix = make([]float64, len(g.psi))
	for i := range g.fix {
		g.fix[i], _, _ = s.ionised(i, nil, n[i], p[i])
	}
	g.v = v
	s.applyContacts(g)
	if _, _, _, err := s.newton(g, tr.w); err != nil {
		return nil, err
	}
	s.polish(g, tr.w)
	return g, nil
}
