package model

import "math"

// The rules that set the scale of a drawn curve, shared by the workbench's
// charts and the report's figures.

// Primary is the index of the series a drawing's scale follows: the total,
// where the curve has one (its components are drawn clipped to the frame:
// an idealised Shockley current runs to amperes where the total is
// milliamperes), else -1 (every series counts).
func (c Curve) Primary() int {
	for i, s := range c.Series {
		if s.Label == "total" {
			return i
		}
	}
	return -1
}

// DepletionDominated returns the total capacitance of a C-V curve where the
// depletion part is at least the diffusion part (the reverse and low
// forward bias a C-V measurement reads), or nil when there are fewer than
// two such points, when every point is such, or when the curve is not a
// C-V curve. The forward-bias diffusion capacitance grows as exp(V/Vt)
// and would flatten the rest on a linear axis; it runs off the top
// instead.
func (c Curve) DepletionDominated() []float64 {
	if c.ID != "cv" {
		return nil
	}
	var dep, dif, tot []float64
	for _, s := range c.Series {
		switch s.Label {
		case "depletion":
			dep = s.Y
		case "diffusion":
			dif = s.Y
		case "total":
			tot = s.Y
		}
	}
	var out []float64
	for i := range tot {
		if i < len(dep) && i < len(dif) && !math.IsNaN(dep[i]) && !math.IsInf(dep[i], 0) && dep[i] >= dif[i] {
			out = append(out, tot[i])
		}
	}
	if len(out) < 2 || len(out) == len(tot) {
		return nil
	}
	return out
}

// ZeroSeries reports a series with no finite value off zero: on a log axis
// it has no line, and its legend entry says so.
func ZeroSeries(y []float64) bool {
	for _, v := range y {
		if !math.IsNaN(v) && !math.IsInf(v, 0) && v != 0 {
			return false
		}
	}
	return true
}
