package extract

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// ComplianceResolution is the relative resolution to which clipped
// readings count as equal (1e-4: a reading written with 5 significant
// digits; common practice for source-measure units, which report the
// compliance value itself for every clipped point).
const ComplianceResolution = 1e-4

// FloorFactor is how many times the noise floor a forward current must
// exceed to be fitted: below 3 floor standard deviations a reading's sign
// and size are mostly noise (common practice, a 3-sigma rule).
const FloorFactor = 3.0

// Clip is a run of readings clipped at the instrument's compliance.
type Clip struct {
	CurrentA float64 // the compliance current, A (negative on the reverse side)
	Indices  []int   // indices of the clipped points in the caller's slices
	MinV     float64 // bias span of the clipped points, V
	MaxV     float64
	Stated   bool // true when the compliance was given, not detected
}

// DetectCompliance finds the plateau of an I-V sweep clipped at the
// instrument's compliance on one side (forward: V > 0, I > 0, sign = +1;
// reverse: V < 0, I < 0, sign = -1). The points of that side are ordered
// by |V|; starting from the largest |V| it takes the run of consecutive
// points whose current equals the top reading to the relative resolution
// res (ComplianceResolution when 0). The run is a plateau when the top
// reading is the largest |I| of the side and the run covers at least three
// points, or two points with identical readings (the instrument writes the
// compliance value itself). A diode's current rises with bias (by more
// than 1 % per 10 mV step even when Rs-limited at Rs*I of a volt), so such
// a run is not a property of the device. Units: V, A. Returns ok = false
// when there is no plateau.
func DetectCompliance(v, i []float64, sign float64, res float64) (Clip, bool) {
	if res <= 0 {
		res = ComplianceResolution
	}
	var idx []int
	for k := range v {
		if sign*v[k] > 0 && sign*i[k] > 0 && !math.IsInf(v[k], 0) && !math.IsInf(i[k], 0) {
			idx = append(idx, k)
		}
	}
	if len(idx) < 2 {
		return Clip{}, false
	}
	sort.SliceStable(idx, func(a, b int) bool { return sign*v[idx[a]] < sign*v[idx[b]] })
	top := idx[len(idx)-1]
	it := sign * i[top]
	for _, k := range idx {
		if sign*i[k] > it*(1+res) {
			return Clip{}, false
		}
	}
	run, exact := 1, true
	for j := len(idx) - 2; j >= 0; j-- {
		c := sign * i[idx[j]]
		if math.Abs(c-it) > res*it {
			break
		}
		run++
		if c != it {
			exact = false
		}
	}
	if !(run >= 3 || (run == 2 && exact)) {
		return Clip{}, false
	}
	cl := Clip{CurrentA: sign * it, Indices: append([]int(nil), idx[len(idx)-run:]...)}
	cl.MinV, cl.MaxV = math.Inf(1), math.Inf(-1)
	for _, k := range cl.Indices {
		cl.MinV, cl.MaxV = math.Min(cl.MinV, v[k]), math.Max(cl.MaxV, v[k])
	}
	sort.Ints(cl.Indices)
	return cl, true
}

// StatedCompliance returns the points whose |I| reaches the stated
// compliance current comp (> 0, A) to the relative resolution res
// (ComplianceResolution when 0), on both sides of the sweep.
func StatedCompliance(v, i []float64, comp, res float64) Clip {
	if res <= 0 {
		res = ComplianceResolution
	}
	cl := Clip{CurrentA: comp, Stated: true, MinV: math.Inf(1), MaxV: math.Inf(-1)}
	for k := range i {
		if math.Abs(i[k]) >= comp*(1-res) {
			cl.Indices = append(cl.Indices, k)
			cl.MinV, cl.MaxV = math.Min(cl.MinV, v[k]), math.Max(cl.MaxV, v[k])
		}
	}
	return cl
}

// Note describes the clipped points for a fit's notes.
func (c Clip) Note() string {
	how := "found as a plateau of equal current at the top of the sweep"
	if c.Stated {
		how = "stated"
	}
	if len(c.Indices) == 0 {
		return fmt.Sprintf("no point reached the stated compliance %.4g A", c.CurrentA)
	}
	return fmt.Sprintf("%d points at %.4g..%.4g V (points %s) clipped at the compliance %.4g A (%s): left out",
		len(c.Indices), c.MinV, c.MaxV, rowList(c.Indices), c.CurrentA, how)
}

// rowList gives 1-based point numbers as runs, "3, 5-9, 12" (sorted idx),
// the first eight runs and a count of the rest.
func rowList(idx []int) string {
	var runs []string
	for k := 0; k < len(idx); {
		j := k
		for j+1 < len(idx) && idx[j+1] == idx[j]+1 {
			j++
		}
		if j > k {
			runs = append(runs, fmt.Sprintf("%d-%d", idx[k]+1, idx[j]+1))
		} else {
			runs = append(runs, fmt.Sprint(idx[k]+1))
		}
		k = j + 1
	}
	if len(runs) > 8 {
		return strings.Join(runs[:8], ", ") + fmt.Sprintf(" and %d more runs", len(runs)-8)
	}
	return strings.Join(runs, ", ")
}

// NoiseFloor is an estimate of the absolute current noise of a sweep.
type NoiseFloor struct {
	SigmaA float64 // standard deviation of the additive current noise, A
	Points int     // points the estimate used
	// Floor is true when the scatter is a floor: at least a tenth of the
	// median |I| of those points, far more than a relative noise of a few
	// per cent explains.
	Floor bool
}

// EstimateNoiseFloor estimates the additive current noise from the points
// where a diode's current is small and smooth in V: every point at reverse
// bias or at V <= vt (vt = kT/q in V), and, when the sweep has forward
// readings at or below zero (noise larger than the current), every point up
// to the last of them; when that scatter is a floor, a second pass extends
// the points up to the first forward reading above 30 times it. Sorted by V, on each run of five equally spaced
// points (spacing equal to 1 %) the fourth difference
//
//	d = I(k-2) - 4 I(k-1) + 6 I(k) - 4 I(k+1) + I(k+2)
//
// removes any cubic trend (leakage, the start of the exponential: for an
// exponential of steps h = dV/(n kT/q) it leaves (e^h - 1)^4 I, 5 % of I
// at h = 0.4) and leaves noise of variance 70 sigma^2 for independent
// readings of standard deviation sigma; sigma is 1.4826 times the median of
// |d|/sqrt(70) (the median absolute deviation, consistent for normal noise
// and robust to outliers). Needs 6 such runs. Units: V, A. Source:
// Rousseeuw & Croux, J. Am. Stat. Assoc. 88, 1273 (1993) (the MAD and its
// 1.4826 factor); variance of a difference of independent readings
// (binomial coefficients 1, 4, 6, 4, 1 squared sum to 70): an identity.
func EstimateNoiseFloor(v, i []float64, vt float64) (NoiseFloor, bool) {
	lim := vt
	for k := range v {
		if v[k] > lim && i[k] <= 0 && !math.IsInf(v[k], 0) {
			lim = v[k]
		}
	}
	nf, ok := noiseFloorBelow(v, i, lim)
	if !ok || !nf.Floor {
		return nf, ok
	}
	// Second pass: the points up to the first forward reading above 30
	// first-pass sigmas, where the fourth difference of the diode's own
	// current is still below a fifth of sigma for steps h <= 0.4 (5 % of
	// 30 sigma over sqrt(70)); more points, a steadier median.
	lim2 := math.Inf(1)
	for k := range v {
		if v[k] > lim && i[k] > 30*nf.SigmaA && v[k] < lim2 {
			lim2 = v[k]
		}
	}
	if math.IsInf(lim2, 1) {
		return nf, ok
	}
	if nf2, ok2 := noiseFloorBelow(v, i, math.Nextafter(lim2, math.Inf(-1))); ok2 && nf2.Points > nf.Points {
		nf2.Floor = true
		return nf2, true
	}
	return nf, ok
}

// noiseFloorBelow is EstimateNoiseFloor's fourth-difference estimate over
// the points with V <= lim.
func noiseFloorBelow(v, i []float64, lim float64) (NoiseFloor, bool) {
	var pv, pi []float64
	for k := range v {
		if v[k] <= lim && !math.IsNaN(v[k]) && !math.IsInf(v[k], 0) && !math.IsNaN(i[k]) && !math.IsInf(i[k], 0) {
			pv = append(pv, v[k])
			pi = append(pi, i[k])
		}
	}
	p := ivPoints{pv, pi}
	sort.Stable(p)
	var e, mag []float64
	for k := 2; k+2 < len(pv); k++ {
		h := pv[k] - pv[k-1]
		if !(h > 0) {
			continue
		}
		even := true
		for _, d := range []float64{pv[k-1] - pv[k-2], pv[k+1] - pv[k], pv[k+2] - pv[k+1]} {
			if math.Abs(d-h) > 0.01*h {
				even = false
			}
		}
		if !even {
			continue
		}
		d := pi[k-2] - 4*pi[k-1] + 6*pi[k] - 4*pi[k+1] + pi[k+2]
		e = append(e, math.Abs(d)/math.Sqrt(70))
	}
	if len(e) < 6 {
		return NoiseFloor{}, false
	}
	for _, c := range pi {
		mag = append(mag, math.Abs(c))
	}
	nf := NoiseFloor{SigmaA: 1.4826 * median(e), Points: len(pv)}
	nf.Floor = nf.SigmaA > 0 && nf.SigmaA >= 0.1*median(mag)
	return nf, true
}

// screened is a sweep with the clipped points taken out and the noise
// floor chosen, with notes saying what was done.
type screened struct {
	v, i       []float64
	clip       Clip
	floor      float64
	floorSrc   string
	belowFloor int
	notes      []string
}

// screen applies the bench-data rules before a fit: points clipped at the
// compliance (stated, else detected on either side) are left out; the
// noise floor is the stated one, else estimated from the reverse and
// near-zero-bias scatter (EstimateNoiseFloor) when that scatter is a
// floor; forward points in the window below FloorFactor times the floor
// are left out.
func screen(v, i []float64, vt float64, opt IVOptions) screened {
	s := screened{v: v, i: i}
	var drop []int
	if opt.ComplianceA > 0 {
		s.clip = StatedCompliance(v, i, opt.ComplianceA, 0)
		s.notes = append(s.notes, s.clip.Note())
		drop = s.clip.Indices
	} else {
		for _, sign := range []float64{1, -1} {
			if c, ok := DetectCompliance(v, i, sign, 0); ok {
				if sign > 0 {
					s.clip = c
				}
				s.notes = append(s.notes, c.Note())
				drop = append(drop, c.Indices...)
			}
		}
	}
	if len(drop) > 0 {
		out := make(map[int]bool, len(drop))
		for _, k := range drop {
			out[k] = true
		}
		s.v, s.i = make([]float64, 0, len(v)), make([]float64, 0, len(i))
		for k := range v {
			if !out[k] {
				s.v = append(s.v, v[k])
				s.i = append(s.i, i[k])
			}
		}
	}
	switch {
	case opt.CurrentFloorA > 0:
		s.floor, s.floorSrc = opt.CurrentFloorA, "stated"
	case !opt.NoFloorEstimate:
		if nf, ok := EstimateNoiseFloor(s.v, s.i, vt); ok && nf.Floor {
			s.floor, s.floorSrc = nf.SigmaA, "estimated"
			s.notes = append(s.notes, fmt.Sprintf("noise floor %.3g A estimated from the scatter of %d reverse, near-zero-bias and noise-dominated points", nf.SigmaA, nf.Points))
		}
	}
	if s.floor > 0 {
		lim := FloorFactor * s.floor
		kv, ki := make([]float64, 0, len(s.v)), make([]float64, 0, len(s.i))
		lo, hi := math.Inf(1), math.Inf(-1)
		for k := range s.v {
			if s.v[k] > 0 && s.i[k] > 0 && s.i[k] < lim && opt.Window.Contains(s.v[k]) {
				s.belowFloor++
				lo, hi = math.Min(lo, s.v[k]), math.Max(hi, s.v[k])
				continue
			}
			kv, ki = append(kv, s.v[k]), append(ki, s.i[k])
		}
		s.v, s.i = kv, ki
		if s.belowFloor > 0 {
			s.notes = append(s.notes, fmt.Sprintf("%d forward points at %.4g..%.4g V below %g times the %s noise floor (%.3g A) left out; points weighted by relative plus floor noise",
				s.belowFloor, lo, hi, FloorFactor, s.floorSrc, lim))
		}
	}
	return s
}
