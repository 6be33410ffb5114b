package solver

import (
	"context"
	"math"

	"junco/physics"
)

// Limits of Device.Light (far beyond low injection, so that every
// physically meaningful illumination passes and nothing overflows).
const (
	maxLightGeneration = 1e32 // m^-3 s^-1 (1e26 cm^-3 s^-1)
	maxLightFlux       = 1e28 // m^-2 s^-1 (about 2 MW/cm^2 of visible light)
	maxLightAbsorption = 1e10 // 1/m (1e8 1/cm)
)

func validateLight(l physics.Light) error {
	switch {
	case math.IsNaN(l.Generation) || l.Generation < 0 || l.Generation > maxLightGeneration:
		return paramErr("Device.Light.Generation", l.Generation, "0 to 1e32 m^-3 s^-1", "a uniform pair-generation rate (0 = none)")
	case math.IsNaN(l.PhotonFlux) || l.PhotonFlux < 0 || l.PhotonFlux > maxLightFlux:
		return paramErr("Device.Light.PhotonFlux", l.PhotonFlux, "0 to 1e28 m^-2 s^-1", "the flux of monochromatic photons entering the illuminated surface (0 = none)")
	case math.IsNaN(l.Absorption) || l.Absorption < 0 || l.Absorption > maxLightAbsorption:
		return paramErr("Device.Light.Absorption", l.Absorption, "0 to 1e10 1/m", "the absorption coefficient of the monochromatic light")
	}
	return nil
}

// setupGeneration integrates the optical generation over each node's box
// (the box method's control volume [x_i - h_{i-1}/2, x_i + h_i/2]):
//
//	uniform:        G d_i
//	Beer-Lambert:   int alpha Phi e^(-alpha xi) dxi = Phi (e^(-alpha xi_a) - e^(-alpha xi_b))
//
// with xi the depth from the illuminated contact (the anode's, or the
// cathode's with Light.FromN) and xi_a < xi_b the box's ends. The exact
// integral, not a point value times d_i, keeps the pairs of a short
// absorption length (alpha h >> 1) right on a coarse mesh: the box counts
// exactly the photons absorbed in it. The half boxes of the two contacts
// hold pairs too (their rows are Dirichlet conditions: the ohmic contact
// takes them), so that the sum over all boxes is the exact integral over
// the device, Phi (1 - e^(-alpha L)) + G L.
func (s *Solver) setupGeneration() {
	l := s.dev.Light
	if !l.Lit() {
		return
	}
	nn := len(s.x)
	s.gen = make([]float64, nn)
	length := s.dev.Length
	fromLeft := s.anodeLeft != l.FromN // the anode is the p contact
	depth := func(x float64) float64 {
		if fromLeft {
			return x
		}
		return length - x
	}
	mono := l.PhotonFlux > 0 && l.Absorption > 0
	for i := 0; i < nn; i++ {
		a, b := s.x[i], s.x[i]
		if i > 0 {
			a -= 0.5 * s.h[i-1]
		}
		if i < nn-1 {
			b += 0.5 * s.h[i]
		}
		g := l.Generation * s.d[i]
		if mono {
			da, db := depth(a), depth(b)
			lo, hi := math.Min(da, db), math.Max(da, db)
			g += l.PhotonFlux * math.Exp(-l.Absorption*lo) * -math.Expm1(-l.Absorption*(hi-lo))
		}
		s.gen[i] = g
		s.genTotal += g
	}
}

// Generation returns the optical generation over the device, m^-2 s^-1:
// the number of pairs the light of Device.Light creates per area and
// second between the contacts (exact integral, G L + Phi (1 - e^(-alpha
// L)); 0 in the dark). Each absorbed photon creates one pair.
func (s *Solver) Generation() float64 { return s.genTotal }

// generation returns the generation of node i's box at the state's light
// level, m^-2 s^-1.
func (s *Solver) generation(st *state, i int) float64 {
	if s.gen == nil || st.lit == 0 {
		return 0
	}
	return st.lit * s.gen[i]
}

// illuminate switches the light on at the tracker's present bias by
// continuation in the light level from dark (0) to full (1): the first
// step tries the full light, a failed step is halved (down to 1e-6 of the
// light), a step that converges within six iterations is doubled. Weak
// light converges in one step.
func (tr *tracker) illuminate(ctx context.Context) error {
	s := tr.s
	if s.gen == nil || tr.cur.lit == 1 {
		return nil
	}
	tr.w.ctx = ctx
	defer func() { tr.w.ctx = nil }()
	step := 1 - tr.cur.lit
	for tr.cur.lit < 1 {
		if err := ctx.Err(); err != nil {
			return err
		}
		next := math.Min(1, tr.cur.lit+step)
		g := tr.cur.clone()
		g.lit = next
		// a different light level: no extrapolation in bias through the
		// previous state
		it, upd, res, err := tr.try(g, nil)
		step = nextStep(step, it, err)
		if err == nil {
			continue
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		if step < 1e-6 {
			return &ConvergenceError{Stage: "light", Bias: tr.cur.v * s.vt, Reached: tr.cur.v * s.vt,
				Iterations: it, Update: upd, Residual: res,
				Reason: "switching the light on did not converge (light level " + fv(tr.cur.lit) + " of 1 reached): " + err.Error()}
		}
	}
	return nil
}

// Path is a continuation path in bias under the device's light: each
// Solve starts from the path's last solution, so that a sequence of
// nearby biases in any order (a search for the open-circuit voltage or
// the maximum-power point) costs a few Newton iterations each. A Path is
// not safe for concurrent use; a Solver may have many.
type Path struct{ tr *tracker }

// NewPath starts a path at the (dark) equilibrium.
func (s *Solver) NewPath() (*Path, error) {
	tr, err := s.newTracker()
	if err != nil {
		return nil, err
	}
	return &Path{tr: tr}, nil
}

// Solve returns the solution at anode bias v (V, forward positive),
// reached by continuation from the path's last solution (the light, if
// any, switched on first). Method and errors as Solver.SolveContext; after
// an error the path stays at its last converged bias.
func (p *Path) Solve(ctx context.Context, v float64) (*Result, error) {
	if err := checkBias(v, "bias"); err != nil {
		return nil, err
	}
	tr := p.tr
	if err := tr.advance(ctx, v); err != nil {
		return nil, err
	}
	if tr.cur.v == 0 && tr.prev == nil && tr.cur.lit == 0 {
		_, eq, _ := tr.s.equilibrium()
		return eq.clone(), nil
	}
	return tr.s.result(tr.cur, tr.w, tr.iters, tr.upd, tr.res), nil
}
