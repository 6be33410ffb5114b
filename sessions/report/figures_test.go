package report

import (
	"fmt"
	"junco/physics"
	"math"
	"strconv"
	"strings"
	"testing"
)

// figureByID returns the figure of the example document with the id.
func figureByID(t *testing.T, id string) Figure {
	t.Helper()
	figs, notes, err := Figures(exampleDocument())
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range figs {
		if f.Curve.ID == id {
			return f
		}
	}
	t.Fatalf("no figure %q (notes %q)", id, notes)
	return Figure{}
}

func seriesMax(t *testing.T, f Figure, label string) float64 {
	t.Helper()
	for _, s := range f.Curve.Series {
		if s.Label == label {
			m := math.Inf(-1)
			for _, y := range s.Y {
				if physics.Finite(y) {
					m = math.Max(m, y)
				}
			}
			return m
		}
	}
	t.Fatalf("%s has no series %q", f.Curve.ID, label)
	return 0
}

// The I-V figure's current axis ends at the decade above the largest
// total current; the ideal Shockley current, which once set it (to
// 1e8 A), runs above and is clipped.
func TestFigureIVRangeFollowsTotal(t *testing.T) {
	f := figureByID(t, "iv")
	p, err := buildPlot(f)
	if err != nil {
		t.Fatal(err)
	}
	_, yf := displayUnit(f.Curve.Y, 1e-3)
	_, hi, _ := yExtent(f)
	_, yf = displayUnit(f.Curve.Y, hi)
	top := p.Y.Max / yf // A
	total, ideal := seriesMax(t, f, "total"), seriesMax(t, f, "ideal (Shockley)")
	if !(top >= total && top <= 10*total) {
		t.Errorf("top of the current axis %g A, want within the decade above the largest total %g A", top, total)
	}
	if !(ideal > top) {
		t.Errorf("the ideal current %g A no longer runs off this figure (top %g A): the test does not test the clipping", ideal, top)
	}
	if p.Y.Min <= 0 || p.Y.Max/p.Y.Min > math.Pow(10, maxLogDecades+1.5) {
		t.Errorf("log range %g to %g spans more than %d decades", p.Y.Min, p.Y.Max, maxLogDecades)
	}
}

// The linear C-V figure is scaled to the total capacitance where the
// depletion part dominates: the forward-bias diffusion capacitance runs
// off the top.
func TestFigureCVRange(t *testing.T) {
	f := figureByID(t, "cv")
	p, err := buildPlot(f)
	if err != nil {
		t.Fatal(err)
	}
	d := f.Curve.DepletionDominated()
	if d == nil {
		t.Skip("the example's sweep has no forward bias where diffusion dominates")
	}
	m := 0.0
	for _, v := range d {
		m = math.Max(m, v)
	}
	_, yf := displayUnit(f.Curve.Y, m)
	top := p.Y.Max / yf
	if !(top >= m && top <= 1.1*m) {
		t.Errorf("top of the C axis %g F, want the largest depletion-dominated total %g F plus a margin", top, m)
	}
	if total := seriesMax(t, f, "total"); !(total > 2*top) {
		t.Errorf("the largest total %g F lies within the frame (top %g F): nothing is clipped", total, top)
	}
}

// Every series of every figure has its own colour, and the SVG draws
// with each of them (the legend lists a series drawn nowhere, such as a
// zero shunt current on a log axis).
func TestFigureColoursDistinct(t *testing.T) {
	figs, _, err := Figures(exampleDocument())
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range figs {
		seen := map[string]string{}
		svg, err := FigureSVG(f)
		if err != nil {
			t.Fatal(err)
		}
		for i, s := range f.Curve.Series {
			c := seriesColour(f.Curve, i)
			hex := fmt.Sprintf("#%02X%02X%02X", c.R, c.G, c.B)
			if other, ok := seen[hex]; ok {
				t.Errorf("%s: %q and %q share the colour %s", f.Curve.ID, other, s.Label, hex)
			}
			seen[hex] = s.Label
			if !strings.Contains(strings.ToUpper(string(svg)), hex) {
				t.Errorf("%s: the SVG never uses %q's colour %s", f.Curve.ID, s.Label, hex)
			}
		}
		if p := f.Curve.Primary(); p >= 0 && seriesColour(f.Curve, p) != palette()[0] {
			t.Errorf("%s: the total is not drawn in the first colour", f.Curve.ID)
		}
	}
}

// The legend stands beside the plot: the figure is wider than the plot's
// 16 cm by the legend's column when there is a legend, and not otherwise.
func TestFigureLegendBesidePlot(t *testing.T) {
	iv, err := FigureSVG(figureByID(t, "iv"))
	if err != nil {
		t.Fatal(err)
	}
	field, err := FigureSVG(figureByID(t, "field"))
	if err != nil {
		t.Fatal(err)
	}
	width := func(svg []byte) float64 {
		s := string(svg)
		i := strings.Index(s, `width="`)
		if i < 0 {
			t.Fatal("no width in the SVG")
		}
		num, _, _ := strings.Cut(s[i+len(`width="`):], "pt")
		w, err := strconv.ParseFloat(num, 64)
		if err != nil {
			t.Fatalf("SVG width %q: %v", num, err)
		}
		return w
	}
	if !(width(iv) > width(field)) {
		t.Errorf("the I-V figure (legend) is %g wide, the field figure (none) %g", width(iv), width(field))
	}
}

// A figure across a junction whose one side is over 100 times thinner
// than the other gives each side half the width: the normalised position
// of zero is the middle, and each side's end its edge.
func TestFigureSplitSides(t *testing.T) {
	f := figureByID(t, "field")
	p, err := buildPlot(f)
	if err != nil {
		t.Fatal(err)
	}
	if !splitFor(f.Curve, p.X.Min, p.X.Max) {
		t.Skipf("the example's sides (%g, %g) are not 100x apart", p.X.Min, p.X.Max)
	}
	if p.X.Scale != scaleSplit {
		t.Fatalf("x scale %v, want the split scale", p.X.Scale)
	}
	n := p.X.norm
	if got := n(0); got != 0.5 {
		t.Errorf("zero at %g of the width, want 0.5", got)
	}
	if n(p.X.Min) != 0 || n(p.X.Max) != 1 {
		t.Error("the ends of the two sides are not the edges of the axis")
	}
	neg, pos := 0, 0
	for _, tk := range splitTicks(p.X.Min, p.X.Max) {
		if tk.Label == "" {
			continue
		}
		switch {
		case tk.Value < 0:
			neg++
		case tk.Value > 0:
			pos++
		}
	}
	if neg == 0 || pos == 0 {
		t.Errorf("labelled ticks: %d on the thin side, %d on the other", neg, pos)
	}
}
