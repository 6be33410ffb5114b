package report

import (
	"math"
	"strconv"
	"strings"
)

// The axes of the SVG figures: how a value in display units maps to its
// place along an axis (linear, logarithmic, or split at zero with each
// side on its own linear scale) and where the ticks go.

// scaleKind is how an axis maps values.
type scaleKind int

const (
	scaleLinear scaleKind = iota
	// scaleLog maps log10 of the value; Min and Max are positive.
	scaleLog
	// scaleSplit gives [Min, 0] and [0, Max] half the axis each (Min < 0
	// < Max), each on its own linear scale.
	scaleSplit
)

// axis is one axis of a figure, in display units.
type axis struct {
	Min, Max float64
	Scale    scaleKind
	// Inverted runs the values the other way (the wafer map's die y
	// grows downward).
	Inverted bool
	Title    string
	// tickFn, when set, places the ticks instead of the scale's rule.
	tickFn func(lo, hi float64) []tick
}

// tick is a mark on an axis; a tick without a label is a minor one.
type tick struct {
	Value float64
	Label string
}

// norm maps v to its fraction of the axis, 0 at the start (left or
// bottom) and 1 at the end; values outside the range fall outside [0, 1]
// (and are clipped by the drawing).
func (a axis) norm(v float64) float64 {
	var t float64
	switch a.Scale {
	case scaleLog:
		lo, hi := math.Log10(a.Min), math.Log10(a.Max)
		t = (math.Log10(v) - lo) / (hi - lo)
	case scaleSplit:
		if v < 0 {
			t = 0.5 * (v - a.Min) / -a.Min
		} else {
			t = 0.5 + 0.5*v/a.Max
		}
	default:
		t = (v - a.Min) / (a.Max - a.Min)
	}
	if a.Inverted {
		t = 1 - t
	}
	return t
}

// ticks places the axis' ticks.
func (a axis) ticks() []tick {
	switch {
	case a.tickFn != nil:
		return a.tickFn(a.Min, a.Max)
	case a.Scale == scaleLog:
		return decadeTicks(a.Min, a.Max)
	case a.Scale == scaleSplit:
		return splitTicks(a.Min, a.Max)
	}
	return linearTicks(a.Min, a.Max)
}

// maxMajorTicks bounds the labelled ticks of a linear axis.
const maxMajorTicks = 6

// linearTicks marks lo..hi at a round step (1, 2, 2.5 or 5 times a power
// of ten) giving at most maxMajorTicks labelled ticks, with unlabelled
// ticks between, labelled with the decimals the step needs (in
// exponent form beyond 1e5 or below 1e-3).
func linearTicks(lo, hi float64) []tick {
	span := hi - lo
	if !(span > 0) || math.IsInf(span, 0) {
		return []tick{{Value: lo, Label: tickLabel(lo, 1, 0)}}
	}
	mag := math.Pow(10, math.Floor(math.Log10(span/maxMajorTicks)))
	var step, mant float64
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		step, mant = m*mag, m
		if span/step <= maxMajorTicks {
			break
		}
	}
	minor := step / 5
	if mant == 2 {
		minor = step / 4
	}
	extra := 0
	if mant == 2.5 {
		extra = 1 // 2.5, 7.5: one more decimal
	}
	var out []tick
	eps := step * 1e-9
	for k := math.Ceil((lo - eps) / minor); k*minor <= hi+eps; k++ {
		v := k * minor
		if math.Abs(v) < eps {
			v = 0
		}
		t := tick{Value: v}
		if r := v / step; math.Abs(r-math.Round(r)) < 1e-6 {
			t.Label = tickLabel(v, step, extra)
		}
		out = append(out, t)
	}
	return out
}

// tickLabel writes a tick value at the precision of the step, in
// exponent form (2.5e17) for values of 1e5 and more or steps below 1e-3.
func tickLabel(v, step float64, extra int) string {
	if v == 0 {
		return "0"
	}
	stepExp := int(math.Floor(math.Log10(step) + 1e-9))
	big := math.Abs(v) >= 1e5 || step < 1e-3
	if !big {
		return strconv.FormatFloat(v, 'f', max(0, -stepExp+extra), 64)
	}
	digits := max(0, int(math.Floor(math.Log10(math.Abs(v))+1e-9))-stepExp+extra)
	s := strconv.FormatFloat(v, 'e', digits, 64)
	mant, exp, _ := strings.Cut(s, "e")
	if strings.Contains(mant, ".") {
		mant = strings.TrimRight(strings.TrimRight(mant, "0"), ".")
	}
	e, _ := strconv.Atoi(exp)
	return mant + "e" + strconv.Itoa(e)
}

// maxLabelledDecades bounds the labelled decades of a log axis: beyond
// it every second (third, ...) decade is labelled.
const maxLabelledDecades = 12

// decadeTicks marks a logarithmic axis at every decade, labelled 1e-9
// (every k-th when there are more than maxLabelledDecades), with
// unlabelled ticks at 2 to 9 times each decade when they are few.
func decadeTicks(lo, hi float64) []tick {
	if !(lo > 0) || !(hi >= lo) {
		return nil
	}
	d0, d1 := int(math.Floor(math.Log10(lo)+1e-9)), int(math.Ceil(math.Log10(hi)-1e-9))
	n := d1 - d0
	every := max(1, (n+maxLabelledDecades-1)/maxLabelledDecades)
	var out []tick
	for d := d0; d <= d1; d++ {
		v := math.Pow(10, float64(d))
		if v >= lo*(1-1e-9) && v <= hi*(1+1e-9) {
			t := tick{Value: v}
			if (d-d0)%every == 0 {
				t.Label = "1e" + strconv.Itoa(d)
			}
			out = append(out, t)
		}
		if n > maxLabelledDecades {
			continue
		}
		for m := 2; m <= 9; m++ {
			if w := float64(m) * v; w > lo && w < hi {
				out = append(out, tick{Value: w})
			}
		}
	}
	return out
}

// splitTicks marks each side of a split axis with its own round ticks,
// and zero.
func splitTicks(lo, hi float64) []tick {
	var out []tick
	for _, t := range linearTicks(lo, 0) {
		if t.Value < 0 {
			out = append(out, t)
		}
	}
	out = append(out, tick{Value: 0, Label: "0"})
	for _, t := range linearTicks(0, hi) {
		if t.Value > 0 {
			out = append(out, t)
		}
	}
	return out
}
