package report

import (
	"image/color"
	"math"

	"junco/model"
	"junco/physics"
)

// What sets a figure's scale, its colours and its legend's room.

// maxLogDecades bounds the decades a log figure spans below its top.
const maxLogDecades = 16

// yExtent is the y range a figure is drawn over: the extremes of the
// finite values (the positive magnitudes on a log axis) of the series
// that set the scale: the total (see primary) and the measured points,
// else every series; on a log axis at most maxLogDecades below the top.
func yExtent(f Figure) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	p := f.Curve.Primary()
	measured := len(dotted(f)) > 0
	for i, s := range f.Curve.Series {
		if (p >= 0 || measured) && i != p && !f.dots(i) {
			continue
		}
		ys := s.Y
		if d := f.Curve.DepletionDominated(); d != nil && !f.LogY {
			ys = d
		}
		for _, y := range ys {
			if f.LogY {
				y = math.Abs(y)
				if y <= 0 {
					continue
				}
			}
			if physics.Finite(y) {
				lo, hi = min(lo, y), max(hi, y)
			}
		}
	}
	if f.LogY && lo <= hi {
		lo = max(lo, hi*math.Pow(10, -maxLogDecades))
	}
	return lo, hi, lo <= hi
}

// palette is the figure's line colours, one per series, all distinct and
// told apart by colour-blind readers (Okabe and Ito's eight colours, with
// black for the first series, which is the total where there is one).
func palette() []color.RGBA {
	return []color.RGBA{
		{0, 0, 0, 255}, {0xe6, 0x9f, 0x00, 255}, {0x56, 0xb4, 0xe9, 255}, {0x00, 0x9e, 0x73, 255},
		{0x00, 0x72, 0xb2, 255}, {0xd5, 0x5e, 0x00, 255}, {0xcc, 0x79, 0xa7, 255}, {0x99, 0x99, 0x99, 255},
	}
}

// seriesColour is the colour of series i of a curve: the total gets the
// first (black), the others the rest in order.
func seriesColour(c model.Curve, i int) color.RGBA {
	p := c.Primary()
	k := i
	switch {
	case p < 0:
	case i == p:
		k = 0
	case i < p:
		k = i + 1
	}
	colours := palette()
	return colours[k%len(colours)]
}

// splitRatio is the ratio of the two sides' extents beyond which a figure
// across the junction gives each side its own x scale.
const splitRatio = 100

// splitFor reports whether a figure's x values (display units, lo..hi)
// call for a split axis: a position across the junction whose one side
// is more than splitRatio times shorter than the other.
func splitFor(c model.Curve, lo, hi float64) bool {
	if c.X.Kind != model.Length || !(lo < 0 && hi > 0) {
		return false
	}
	return math.Max(-lo, hi) >= splitRatio*math.Min(-lo, hi)
}
