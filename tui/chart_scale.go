package tui

import (
	"math"
	"strconv"
	"strings"

	"junco/model"
	"junco/physics"
)

// Axis transforms of the charts panel: the value an axis shows (in its
// display unit) is mapped to the plotted coordinate the braille grid
// draws in. Linear is the identity, log plots log10 |x|, split gives each
// side of zero its own scale (a junction whose one side is far thinner
// than the other).

type axisMap struct {
	kind int // mapLinear, mapLog, mapSplit
	// neg and pos are the magnitudes of the display values that map to
	// -1 and +1 on a split axis.
	neg, pos float64
}

const (
	mapLinear = iota
	mapLog
	mapSplit
)

// splitRatio is the ratio of the two sides' extents beyond which a
// spatial chart gives each side its own scale.
const splitRatio = 100

// fwd maps a display value to the plotted coordinate (NaN when it has
// none: zero or the wrong sign on a log axis).
func (a axisMap) fwd(v float64) float64 {
	switch a.kind {
	case mapLog:
		if !(math.Abs(v) > 0) {
			return math.NaN()
		}
		return math.Log10(math.Abs(v))
	case mapSplit:
		if v < 0 {
			return v / a.neg
		}
		return v / a.pos
	}
	return v
}

// inv maps a plotted coordinate back to a display value (a magnitude on a
// log axis).
func (a axisMap) inv(p float64) float64 {
	switch a.kind {
	case mapLog:
		return math.Pow(10, p)
	case mapSplit:
		if p < 0 {
			return p * a.neg
		}
		return p * a.pos
	}
	return p
}

func (a axisMap) apply(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = a.fwd(x)
	}
	return out
}

// splitMap returns the split map for display values spanning lo..hi when
// they straddle zero and one side is more than splitRatio times shorter
// than the other.
func splitMap(lo, hi float64) (axisMap, bool) {
	if !(lo < 0 && hi > 0) {
		return axisMap{}, false
	}
	n, p := -lo, hi
	if math.Max(n, p) < splitRatio*math.Min(n, p) {
		return axisMap{}, false
	}
	return axisMap{kind: mapSplit, neg: n, pos: p}, true
}

// logMap reports whether a log x axis makes sense for values xs: all of
// one sign (zeros are left out) and spanning more than one decade.
func logMapFor(xs []float64) (ok bool, why string) {
	pos, neg := 0, 0
	lo, hi := math.Inf(1), 0.0
	for _, x := range xs {
		if !physics.Finite(x) || x == 0 {
			continue
		}
		if x > 0 {
			pos++
		} else {
			neg++
		}
		lo, hi = math.Min(lo, math.Abs(x)), math.Max(hi, math.Abs(x))
	}
	switch {
	case pos > 0 && neg > 0:
		return false, "log x: the x values cross zero (r changes the sweep)"
	case pos+neg < 2:
		return false, "log x: fewer than two points off zero"
	case hi < 10*lo:
		return false, "log x: the x values span less than a decade"
	}
	return true, ""
}

// viewScale builds the axis drawn over plotted coordinates lo..hi for a
// map, with about n ticks, labelled in display values.
func viewScale(m axisMap, lo, hi float64, n int) axisScale {
	switch m.kind {
	case mapLog:
		return logViewScale(lo, hi, n)
	case mapSplit:
		return splitViewScale(m, lo, hi, n)
	}
	return exactScale(lo, hi, n)
}

// logViewScale is a log axis over exponents lo..hi: whole decades where
// two or more show, else 1-2-5 steps inside the decade, labelled 1e-9,
// 2e-9, ...
func logViewScale(lo, hi float64, n int) axisScale {
	a := axisScale{min: lo, max: hi}
	d0, d1 := int(math.Ceil(lo-1e-9)), int(math.Floor(hi+1e-9))
	if d1-d0 >= 1 {
		k := max(1, int(math.Ceil(float64(d1-d0+1)/float64(max(n, 1)))))
		for d := d0; d <= d1; d++ {
			if (d-d0)%k == 0 {
				a.ticks = append(a.ticks, float64(d))
			}
		}
	} else {
		for d := int(math.Floor(lo)); d <= int(math.Ceil(hi)); d++ {
			for _, m := range []float64{1, 2, 5} {
				t := float64(d) + math.Log10(m)
				if t >= lo-1e-9 && t <= hi+1e-9 {
					a.ticks = append(a.ticks, t)
				}
			}
		}
	}
	a.label = func(v float64) string {
		e := math.Floor(v + 1e-9)
		m := math.Round(math.Pow(10, v-e))
		if m >= 10 {
			m, e = 1, e+1
		}
		if m == 1 {
			return "1e" + strconv.Itoa(int(e))
		}
		return strconv.Itoa(int(m)) + "e" + strconv.Itoa(int(e))
	}
	return a
}

// splitViewScale labels a split axis: each side gets round ticks of its
// own scale, a tick at zero, and every label reads the display value.
func splitViewScale(m axisMap, lo, hi float64, n int) axisScale {
	a := axisScale{min: lo, max: hi}
	half := max(1, n/2)
	var labels = map[float64]string{}
	side := func(plo, phi float64) {
		if phi <= plo {
			return
		}
		// At least one tick inside the side besides zero: finer steps
		// until one falls there.
		for k := half; k <= 8*half; k *= 2 {
			s := linearScale(m.inv(plo), m.inv(phi), k)
			var in []float64
			for _, t := range s.ticks {
				if p := m.fwd(t); p >= plo-1e-9 && p <= phi+1e-9 && t != 0 {
					in = append(in, t)
				}
			}
			if len(in) == 0 && k < 8*half {
				continue
			}
			for _, t := range in {
				p := m.fwd(t)
				a.ticks = append(a.ticks, p)
				labels[p] = s.label(t)
			}
			break
		}
	}
	side(lo, math.Min(hi, 0))
	if lo <= 0 && hi >= 0 {
		a.ticks = append(a.ticks, 0)
		labels[0] = "0"
	}
	side(math.Max(lo, 0), hi)
	a.label = func(v float64) string {
		if l, ok := labels[v]; ok {
			return l
		}
		return strconv.FormatFloat(m.inv(v), 'g', 3, 64)
	}
	return a
}

// spatial reports a chart whose x axis is a position across the junction.
func spatial(c model.Curve) bool {
	return c.X.Kind == model.Length && strings.Contains(c.X.Unit, "m")
}

// valueText is a value of an axis in trade units (model.Format), for the
// cursor's readout.
func valueText(a model.Axis, v float64, ascii bool) string {
	switch {
	case a.Unit == "um":
		return model.Format(model.Length, v*1e-6, 4, ascii)
	case a.Unit != "":
		return strconv.FormatFloat(v, 'g', 4, 64) + " " + a.Unit
	}
	return model.Format(a.Kind, v, 4, ascii)
}
