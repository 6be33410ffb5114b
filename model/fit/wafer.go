package fit

import (
	"math"
	"sort"

	"junco/physics/extract"
)

// DieClass is what a die shows on a wafer map of one column: a shade of
// its value (ShadeLevels levels, low to high) or a mark. The text map
// (tui/wafermap) and the report's figure (sessions/report) both draw
// these classes.
type DieClass int

// Die classes. Shades 0-3 bin a value from low to high.
const (
	Shade0 DieClass = iota
	Shade1
	Shade2
	Shade3
	DieOutlier      // a Tukey outlier of the column shown
	DieFailed       // the fit of the die failed
	DieOutOfLimits  // the die fails a limit on the column shown
	DieNotRun       // an interrupted batch did not reach the die
	DieUndetermined // the column's value was not determined (NaN)
	DieGap          // no die at this position
)

// DieMark is the letter a map writes for a marked class ("" for a shade
// or a gap): O outlier, X failed, ! out of limits, ? not run, ~ not
// determined.
func DieMark(c DieClass) string {
	switch c {
	case DieOutlier:
		return "O"
	case DieFailed:
		return "X"
	case DieOutOfLimits:
		return "!"
	case DieNotRun:
		return "?"
	case DieUndetermined:
		return "~"
	}
	return ""
}

// ShadeLevels is the number of shades of a wafer map.
const ShadeLevels = 4

// WaferKey names a die's wafer for grouping: "lot/wafer", "lot/",
// "wafer" or "" (no wafer stated).
func WaferKey(d Die) string {
	switch {
	case d.Lot != "" && d.Wafer != "":
		return d.Lot + "/" + d.Wafer
	case d.Lot != "":
		return d.Lot + "/"
	}
	return d.Wafer
}

// Wafers lists the wafers (WaferKey) of the rows with a known die, in
// the order they first appear.
func Wafers(rows []BatchRow) []string {
	seen := map[string]bool{}
	var out []string
	for _, r := range rows {
		if !r.Die.Known() {
			continue
		}
		if k := WaferKey(r.Die); !seen[k] {
			seen[k] = true
			out = append(out, k)
		}
	}
	return out
}

// ShadeScale is the shading of a column: ShadeLevels equal bins from Lo
// to Hi (on log10 when Log), over the fitted values within the Tukey
// fences (outliers are marked, not shaded, so they do not stretch it).
type ShadeScale struct {
	Lo, Hi float64
	Log    bool
	OK     bool // false when no value is shaded
}

// NewShadeScale is the scale of column j over rows (stats: their
// Statistics).
func NewShadeScale(rows []BatchRow, stats BatchStats, j int) ShadeScale {
	sc := ShadeScale{Lo: math.Inf(1), Hi: math.Inf(-1), Log: BatchParams()[j].Log}
	out := OutlierSet(stats[j])
	for k, r := range rows {
		if r.Status != StatusOK || out[k] {
			continue
		}
		v, ok := sc.coord(r.Values[j])
		if !ok {
			continue
		}
		sc.Lo, sc.Hi = math.Min(sc.Lo, v), math.Max(sc.Hi, v)
	}
	sc.OK = sc.Lo <= sc.Hi
	return sc
}

// coord is the value on the scale's axis (log10 when Log).
func (s ShadeScale) coord(v float64) (float64, bool) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	if s.Log {
		if v <= 0 {
			return 0, false
		}
		return math.Log10(v), true
	}
	return v, true
}

// Level is the shade of v, 0..ShadeLevels-1 (values beyond the range
// clamped; all values equal: the middle shade); ok is false when v cannot
// be placed (NaN, infinite, not positive on a log scale).
func (s ShadeScale) Level(v float64) (int, bool) {
	c, ok := s.coord(v)
	if !ok || !s.OK {
		return 0, false
	}
	if s.Hi == s.Lo {
		return ShadeLevels / 2, true
	}
	l := int(math.Floor((c - s.Lo) / (s.Hi - s.Lo) * ShadeLevels))
	return min(max(l, 0), ShadeLevels-1), true
}

// Edge is the value at the lower edge of shade l (l = ShadeLevels: the
// top of the range).
func (s ShadeScale) Edge(l int) float64 {
	c := s.Lo + (s.Hi-s.Lo)*float64(l)/ShadeLevels
	if s.Log {
		return math.Pow(10, c)
	}
	return c
}

// OutlierSet is the set of row indices a summary calls outliers.
func OutlierSet(s extract.Summary) map[int]bool {
	m := make(map[int]bool, len(s.Outliers))
	for _, k := range s.Outliers {
		m[k] = true
	}
	return m
}

// ClassOfDie is what row k shows on the map of column j: the first that
// applies of not run, failed, out of limits (a limit on column j),
// outlier (of column j), not determined, else its shade on sc.
func ClassOfDie(rows []BatchRow, k, j int, sc ShadeScale, outliers map[int]bool, limits []Limit) DieClass {
	r := rows[k]
	switch {
	case r.Status == StatusNotRun:
		return DieNotRun
	case r.Status != StatusOK:
		return DieFailed
	case failsLimitOf(r, j, limits):
		return DieOutOfLimits
	case outliers[k]:
		return DieOutlier
	}
	l, ok := sc.Level(r.Values[j])
	if !ok {
		return DieUndetermined
	}
	return DieClass(l)
}

// DieGrid is the dies of one wafer by position: the bounding box, the
// first row at each position, the number placed and the number that
// share a position with an earlier row (not placed).
type DieGrid struct {
	X0, X1, Y0, Y1 int
	At             map[[2]int]int
	N, Dup         int
}

// NewDieGrid places the rows of wafer (WaferKey) with a known die.
func NewDieGrid(rows []BatchRow, wafer string) DieGrid {
	g := DieGrid{X0: math.MaxInt, Y0: math.MaxInt, X1: math.MinInt, Y1: math.MinInt, At: map[[2]int]int{}}
	for k, r := range rows {
		if !r.Die.Known() || WaferKey(r.Die) != wafer {
			continue
		}
		p := [2]int{r.Die.X, r.Die.Y}
		if _, taken := g.At[p]; taken {
			g.Dup++
			continue
		}
		g.At[p] = k
		g.N++
		g.X0, g.X1 = min(g.X0, p[0]), max(g.X1, p[0])
		g.Y0, g.Y1 = min(g.Y0, p[1]), max(g.Y1, p[1])
	}
	return g
}

// StepDie moves from row k to a die of the same wafer in direction (dx,
// dy) (one of them 0, the other +1 or -1): among the dies ahead, the one
// with the smallest distance along plus twice the distance across (the
// same row or column is preferred), the nearer along on a tie; k when
// there is none.
func StepDie(rows []BatchRow, k, dx, dy int) int {
	if k < 0 || k >= len(rows) || !rows[k].Die.Known() {
		return k
	}
	d0 := rows[k].Die
	wafer := WaferKey(d0)
	best, bestScore, bestAlong := k, math.MaxInt, math.MaxInt
	for j, r := range rows {
		if j == k || !r.Die.Known() || WaferKey(r.Die) != wafer {
			continue
		}
		ax, ay := r.Die.X-d0.X, r.Die.Y-d0.Y
		along, across := ax*dx+ay*dy, absInt(ax*dy)+absInt(ay*dx)
		if along <= 0 {
			continue
		}
		if score := along + 2*across; score < bestScore || score == bestScore && along < bestAlong {
			best, bestScore, bestAlong = j, score, along
		}
	}
	return best
}

func absInt(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

// FirstDie is the row of the first die in reading order (smallest y,
// then x) of wafer, -1 when it has none.
func FirstDie(rows []BatchRow, wafer string) int {
	var idx []int
	for k, r := range rows {
		if r.Die.Known() && WaferKey(r.Die) == wafer {
			idx = append(idx, k)
		}
	}
	if len(idx) == 0 {
		return -1
	}
	sort.SliceStable(idx, func(a, b int) bool {
		da, db := rows[idx[a]].Die, rows[idx[b]].Die
		return da.Y < db.Y || da.Y == db.Y && da.X < db.X
	})
	return idx[0]
}

// failsLimitOf reports whether a row fails a limit on column j.
func failsLimitOf(r BatchRow, j int, limits []Limit) bool {
	for _, l := range limits {
		if l.Param == j && !l.Pass(r) {
			return true
		}
	}
	return false
}

// HasLimitOn reports whether one of limits is on column j.
func HasLimitOn(limits []Limit, j int) bool {
	for _, l := range limits {
		if l.Param == j {
			return true
		}
	}
	return false
}
