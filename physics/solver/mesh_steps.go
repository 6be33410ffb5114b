package solver

import (
	"math"
	"sort"
)

// An abrupt doping step (a knot where the net doping jumps) holds the
// heavy side's majority-carrier dipole within a Debye length of the step:
// at an ideally abrupt p+n step the heavy side's majority carriers spill
// over the step and the field there exceeds the field of the depletion
// charge (Result.PeakField). The automatic mesh resolves it with cells of
// meshStepDebye times the heavy side's extrinsic Debye length at the step,
// growing geometrically (meshGrading) away from it, and places the step
// at the middle of a cell, so that each box holds the doping of one side
// only and the edge field of that cell is the field at the step.
const (
	meshStepDebye = 0.2 // spacing at an abrupt step, in the heavy side's L_D
	meshStepJump  = 0.2 // |d ln(|N| + ni)| across a knot that makes it a step
	meshStepTaper = 8   // cells over which the shift that centres a step fades
)

// step is an abrupt doping step: its position (m) and the spacing (m)
// wanted there.
type step struct{ x, h float64 }

// findSteps returns the knots of the profile in (0, L) across which the
// net doping jumps by more than meshStepJump in ln(|N| + ni) or changes
// sign, sorted, with their spacing meshStepDebye L_D(max |N| of the two
// sides) (L_D = sqrt(eps kT/(q^2 N)), Sze & Ng 2007, eq. 2.27).
func (e *meshEnv) findSteps() []step {
	var out []step
	for _, k := range e.prof.Knots() {
		// One part in 1e12 of the device, at least 1e-15 m: far below
		// any spacing the mesh uses, far above rounding of k.
		d := math.Max(1e-12*e.length, 1e-15)
		if !(k-d > 0 && k+d < e.length) {
			continue
		}
		a, b := e.prof.NetAt(k-d), e.prof.NetAt(k+d)
		jump := math.Abs(math.Log((math.Abs(a)+e.ni)/(math.Abs(b)+e.ni))) > meshStepJump
		if !jump && sign(a)*sign(b) >= 0 {
			continue
		}
		h := meshStepDebye * e.debye(math.Max(math.Abs(a), math.Abs(b)))
		if n := len(out); n > 0 && k-out[n-1].x < 1e-14*e.length {
			out[n-1].h = math.Min(out[n-1].h, h)
			continue
		}
		out = append(out, step{k, h})
	}
	return out
}

// stepSpacing returns the spacing the steps ask for at x (m): the step's
// own spacing growing by meshGrading per unit distance, from the nearest
// step on each side (+Inf without steps).
func (e *meshEnv) stepSpacing(x float64) float64 {
	h := math.Inf(1)
	i := sort.Search(len(e.steps), func(i int) bool { return e.steps[i].x >= x })
	for _, j := range []int{i - 1, i} {
		if j >= 0 && j < len(e.steps) {
			s := e.steps[j]
			h = math.Min(h, s.h+meshGrading*math.Abs(x-s.x))
		}
	}
	return h
}

// centreSteps moves the nodes of x (node positions, contacts fixed) so
// that every step lies at the middle of a cell: the two nodes of the cell
// holding the step move by the offset of the step from the cell's middle,
// and the shift fades linearly over meshStepTaper cells on each side
// (fewer where a contact or the previous step's cell is nearer), so that
// the spacing changes by at most about 1/(2 meshStepTaper) of a cell. A
// step whose shift would break the order of the nodes is left where it
// is.
func centreSteps(x []float64, steps []step) {
	n := len(x)
	fixed := 0 // nodes up to this index must not move
	for _, s := range steps {
		k := sort.SearchFloat64s(x, s.x) - 1 // x[k] <= s.x < x[k+1] (or at x[k+1])
		if k < 1 || k+2 > n-1 || k <= fixed {
			continue
		}
		delta := s.x - 0.5*(x[k]+x[k+1])
		ml := min(meshStepTaper, k-fixed)
		mr := min(meshStepTaper, n-1-(k+1))
		old := append([]float64(nil), x[k-ml+1:k+1+mr]...)
		for j := 0; j < ml; j++ {
			x[k-j] += delta * (1 - float64(j)/float64(ml))
		}
		for j := 0; j < mr; j++ {
			x[k+1+j] += delta * (1 - float64(j)/float64(mr))
		}
		ok := true
		for i := k - ml; i < k+1+mr; i++ {
			ok = ok && x[i+1] > x[i]
		}
		if !ok {
			copy(x[k-ml+1:k+1+mr], old)
			continue
		}
		fixed = k + 1
	}
}
