package fit

import (
	"fmt"
	"math"
	"strings"

	"junco/model"
)

// Limit is a pass band of one batch column (Param indexes BatchParams):
// a die passes when its fitted value v has Min <= v <= Max. An open side
// is -Inf or +Inf.
type Limit struct {
	Param    int
	Min, Max float64
}

// MaxLimits bounds the limits of one batch (one per column is the use;
// a few more allow two bands written by mistake to be reported).
const MaxLimits = 32

// ParseLimit reads a limit written PARAM:MIN:MAX: PARAM is a column's
// symbol or key without case (Is, n, Rs, Rsh, Is2, saturation_current_A,
// ...); MIN and MAX are values of its kind with units (1fA, 5ohm; bare:
// SI), either may be empty for an open side, and MIN <= MAX.
func ParseLimit(s string) (Limit, error) {
	parts := strings.Split(s, ":")
	if len(parts) != 3 {
		return Limit{}, fmt.Errorf("limit %q: expected PARAM:MIN:MAX (for example n:1.0:1.2, Rs::5ohm), with PARAM one of %s", s, limitParamNames())
	}
	j, err := BatchParamIndex(parts[0])
	if err != nil {
		return Limit{}, fmt.Errorf("limit %q: %v", s, err)
	}
	p := BatchParams()[j]
	l := Limit{Param: j, Min: math.Inf(-1), Max: math.Inf(1)}
	for i, to := range []*float64{&l.Min, &l.Max} {
		t := strings.TrimSpace(parts[1+i])
		if t == "" {
			continue
		}
		v, err := model.ParseValue(p.Kind, t)
		if err != nil {
			return Limit{}, fmt.Errorf("limit %q: %s: %v", s, []string{"MIN", "MAX"}[i], err)
		}
		if math.IsNaN(v) {
			return Limit{}, fmt.Errorf("limit %q: %s is not a number", s, []string{"MIN", "MAX"}[i])
		}
		*to = v
	}
	if l.Min > l.Max {
		return Limit{}, fmt.Errorf("limit %q: MIN %g is above MAX %g: a pass band needs MIN <= MAX", s, l.Min, l.Max)
	}
	if math.IsInf(l.Min, -1) && math.IsInf(l.Max, 1) {
		return Limit{}, fmt.Errorf("limit %q: both sides are open: give MIN, MAX or both", s)
	}
	return l, nil
}

// BatchParamIndex finds a batch column by its symbol or key, without
// case (Is, n, Rs, Rsh, Is2, saturation_current_A, ...).
func BatchParamIndex(name string) (int, error) {
	name = strings.TrimSpace(name)
	for k, p := range BatchParams() {
		if strings.EqualFold(name, p.Symbol) || strings.EqualFold(name, p.Key) {
			return k, nil
		}
	}
	return -1, fmt.Errorf("parameter %q: expected one of %s (or their JSON keys)", name, limitParamNames())
}

func limitParamNames() string {
	var names []string
	for _, p := range BatchParams() {
		names = append(names, p.Symbol)
	}
	return strings.Join(names, ", ")
}

// Pass reports whether a row passes the limit: fitted, and its value
// finite (an infinite Rsh counts as above any finite MAX and passes an
// open MAX) and within the band. A row that failed, was not run, or whose
// value was not determined (NaN) does not pass.
func (l Limit) Pass(r BatchRow) bool {
	if r.Status != StatusOK || l.Param < 0 || l.Param >= len(r.Values) {
		return false
	}
	v := r.Values[l.Param]
	return !math.IsNaN(v) && v >= l.Min && v <= l.Max
}

// String writes the limit back as PARAM:MIN:MAX in SI.
func (l Limit) String() string {
	side := func(v float64) string {
		if math.IsInf(v, 0) {
			return ""
		}
		return fmt.Sprintf("%g", v)
	}
	return BatchParams()[l.Param].Symbol + ":" + side(l.Min) + ":" + side(l.Max)
}

// LimitYield is how many dies passed one limit of the dies tested.
type LimitYield struct {
	Limit          Limit
	Passed, Tested int
}

// Yield is the yield of a batch against limits: per limit, and overall
// (the dies that pass every limit).
type Yield struct {
	PerLimit       []LimitYield
	Passed, Tested int
}

// Fraction is passed/tested, NaN when nothing was tested.
func Fraction(passed, tested int) float64 {
	if tested == 0 {
		return math.NaN()
	}
	return float64(passed) / float64(tested)
}

// BatchYield counts the yield of rows against limits. Every row that was
// run is a die tested (a failed fit is a die that fails every limit: a
// device whose curve cannot be fitted is not a good device); rows not run
// (an interrupted batch) are left out.
func BatchYield(rows []BatchRow, limits []Limit) Yield {
	y := Yield{PerLimit: make([]LimitYield, len(limits))}
	for i, l := range limits {
		y.PerLimit[i].Limit = l
	}
	for _, r := range rows {
		if r.Status == StatusNotRun {
			continue
		}
		y.Tested++
		all := true
		for i, l := range limits {
			y.PerLimit[i].Tested++
			if l.Pass(r) {
				y.PerLimit[i].Passed++
			} else {
				all = false
			}
		}
		if all {
			y.Passed++
		}
	}
	return y
}

// OutOfLimits lists the keys of the columns whose limits a fitted row
// fails (nil when it passes them all, or was not fitted).
func OutOfLimits(r BatchRow, limits []Limit) []string {
	if r.Status != StatusOK {
		return nil
	}
	var out []string
	for _, l := range limits {
		if !l.Pass(r) {
			k := BatchParams()[l.Param].Key
			if len(out) == 0 || out[len(out)-1] != k {
				out = append(out, k)
			}
		}
	}
	return out
}
