package report

import (
	"encoding/xml"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"

	"junco/model"
)

// svgParts is what the layout checks read back from a drawn SVG.
type svgParts struct {
	Width  string `xml:"width,attr"`
	Height string `xml:"height,attr"`
	Texts  []struct {
		X        float64 `xml:"x,attr"`
		Y        float64 `xml:"y,attr"`
		Size     float64 `xml:"font-size,attr"`
		Anchor   string  `xml:"text-anchor,attr"`
		Rotate   string  `xml:"transform,attr"`
		Contents string  `xml:",chardata"`
	} `xml:"text"`
	Lines []struct {
		X1     float64 `xml:"x1,attr"`
		Stroke string  `xml:"stroke,attr"`
	} `xml:"line"`
	Polylines []struct {
		Stroke string `xml:"stroke,attr"`
		Clip   string `xml:"clip-path,attr"`
	} `xml:"polyline"`
	Circles []struct {
		Clip string `xml:"clip-path,attr"`
		Fill string `xml:"fill,attr"`
	} `xml:"circle"`
	Clips []struct {
		X float64 `xml:"x,attr"`
		W float64 `xml:"width,attr"`
	} `xml:"defs>clipPath>rect"`
}

func parseSVG(t *testing.T, id string, svg []byte) svgParts {
	t.Helper()
	var p svgParts
	if err := xml.Unmarshal(svg, &p); err != nil {
		t.Fatalf("%s: not well-formed SVG: %v", id, err)
	}
	return p
}

func points(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(strings.TrimSuffix(s, "pt"), 64)
	if err != nil {
		t.Fatalf("size %q: %v", s, err)
	}
	return v
}

// Every figure of the example session and its fit figure: the SVG is
// well-formed; every text (titles, tick labels, legend) lies within the
// canvas by the layout's own width estimate, so no tick label is cut at
// an edge; every line and point is clipped to the plot area and the
// legend stands right of it, so it covers no curve; a component that is
// zero everywhere on a log axis (the example's shunt current) is listed
// in the legend and drawn nowhere (not as a line along the floor).
func TestFigureSVGLayout(t *testing.T) {
	figs, _, err := Figures(exampleDocument())
	if err != nil {
		t.Fatal(err)
	}
	doc, _ := benchDocument(t)
	for _, ff := range FitFigures(doc) {
		figs = append(figs, ff.Figure)
	}
	zeroChecked := false
	for _, f := range figs {
		id := f.Curve.ID
		svg, err := FigureSVG(f)
		if err != nil {
			t.Fatalf("%s: %v", id, err)
		}
		p := parseSVG(t, id, svg)
		w, h := points(t, p.Width), points(t, p.Height)
		for _, tx := range p.Texts {
			ext := textWidth(tx.Contents, tx.Size)
			lo, hi := tx.X, tx.X+ext
			switch tx.Anchor {
			case "middle":
				lo, hi = tx.X-ext/2, tx.X+ext/2
			case "end":
				lo, hi = tx.X-ext, tx.X
			}
			if tx.Rotate != "" { // a quarter turn: the extent is vertical
				if lo, hi = tx.Y-(hi-tx.X), tx.Y-(lo-tx.X); lo < 0 || hi > h || tx.X-tx.Size < 0 {
					t.Errorf("%s: %q (rotated) runs off the canvas", id, tx.Contents)
				}
				continue
			}
			if lo < 0 || hi > w || tx.Y-tx.Size < 0 || tx.Y > h {
				t.Errorf("%s: %q at (%g, %g) runs off the %g x %g canvas", id, tx.Contents, tx.X, tx.Y, w, h)
			}
		}
		if len(p.Clips) != 1 {
			t.Fatalf("%s: %d clip areas, want 1", id, len(p.Clips))
		}
		right := p.Clips[0].X + p.Clips[0].W
		if right > plotWidth {
			t.Errorf("%s: plot area ends at %g, beyond the plot's %g", id, right, plotWidth)
		}
		for _, l := range p.Polylines {
			if l.Clip == "" {
				t.Errorf("%s: a line is not clipped to the plot area", id)
			}
		}
		for _, c := range p.Circles {
			if c.Clip == "" && len(f.Curve.Series) == 1 {
				t.Errorf("%s: a point is not clipped", id)
			}
		}
		if len(f.Curve.Series) > 1 {
			for _, s := range f.Curve.Series {
				found := false
				for _, tx := range p.Texts {
					if strings.HasPrefix(tx.Contents, s.Label) {
						found = true
						if tx.X < right {
							t.Errorf("%s: legend entry %q at x %g, over the plot area (ends %g)", id, s.Label, tx.X, right)
						}
					}
				}
				if !found {
					t.Errorf("%s: legend lacks %q", id, s.Label)
				}
			}
		}
		for si, s := range f.Curve.Series {
			if !f.LogY || !allZero(s.Y) {
				continue
			}
			zeroChecked = true
			hex := hexColour(seriesColour(f.Curve, si))
			for _, l := range p.Polylines {
				if l.Stroke == hex {
					t.Errorf("%s: %q is zero everywhere but drawn on the log axis", id, s.Label)
				}
			}
			if !strings.Contains(string(svg), s.Label+" (zero, not drawn)") {
				t.Errorf("%s: the legend does not say %q is not drawn", id, s.Label)
			}
		}
	}
	if !zeroChecked {
		t.Error("no figure has a zero component on a log axis: the check did not run")
	}
}

func allZero(y []float64) bool {
	for _, v := range y {
		if v != 0 && !math.IsNaN(v) {
			return false
		}
	}
	return len(y) > 0
}

// A curve of one point, or a value alone between undefined ones, is drawn
// as a dot in its series' colour, not left out.
func TestFigureLonePoint(t *testing.T) {
	nan := math.NaN()
	for _, f := range []Figure{
		{Curve: model.Curve{ID: "one", Xs: []float64{1}, Series: []model.Series{{Label: "a", Y: []float64{3}}}}},
		{Curve: model.Curve{ID: "gaps", Xs: []float64{1, 2, 3, 4, 5}, Series: []model.Series{{Label: "a", Y: []float64{1, 2, nan, 4, nan}}}}},
	} {
		svg, err := FigureSVG(f)
		if err != nil {
			t.Fatal(err)
		}
		p := parseSVG(t, f.Curve.ID, svg)
		dots := 0
		for _, c := range p.Circles {
			if c.Fill == hexColour(seriesColour(f.Curve, 0)) && c.Clip != "" {
				dots++
			}
		}
		if dots != 1 {
			t.Errorf("%s: %d dots for the lone point, want 1", f.Curve.ID, dots)
		}
	}
}

// Linear ticks over random ranges: 2 to maxMajorTicks+1 labelled ticks,
// at a round step (1, 2, 2.5 or 5 times a power of ten: common practice
// for axis labels), labels distinct and reading back as their values.
func TestLinearTicks(t *testing.T) {
	rng := rand.New(rand.NewPCG(16, 2))
	for range 2000 {
		scale := math.Pow(10, float64(rng.IntN(40)-20))
		lo := (rng.Float64()*2 - 1) * scale
		hi := lo + rng.Float64()*scale*3 + scale*1e-3
		var lab []tick
		for _, tk := range linearTicks(lo, hi) {
			if tk.Value < lo-1e-9*(hi-lo) || tk.Value > hi+1e-9*(hi-lo) {
				t.Fatalf("[%g, %g]: tick %g outside", lo, hi, tk.Value)
			}
			if tk.Label != "" {
				lab = append(lab, tk)
			}
		}
		if len(lab) < 2 || len(lab) > maxMajorTicks+1 {
			t.Fatalf("[%g, %g]: %d labelled ticks", lo, hi, len(lab))
		}
		step := lab[1].Value - lab[0].Value
		m := step / math.Pow(10, math.Floor(math.Log10(step)+1e-9))
		if !slicesNear(m, 1, 2, 2.5, 5, 10) {
			t.Fatalf("[%g, %g]: step %g is not round", lo, hi, step)
		}
		seen := map[string]bool{}
		for _, tk := range lab {
			if seen[tk.Label] {
				t.Fatalf("[%g, %g]: label %q twice", lo, hi, tk.Label)
			}
			seen[tk.Label] = true
			v, err := strconv.ParseFloat(tk.Label, 64)
			if err != nil || math.Abs(v-tk.Value) > step*1e-6 {
				t.Fatalf("[%g, %g]: label %q for %g", lo, hi, tk.Label, tk.Value)
			}
		}
	}
	if got := tickLabel(2.5e17, 5e16, 1); got != "2.50e17" && got != "2.5e17" {
		t.Errorf("tickLabel(2.5e17) = %q", got)
	}
}

func slicesNear(v float64, want ...float64) bool {
	for _, w := range want {
		if math.Abs(v-w) < 1e-6 {
			return true
		}
	}
	return false
}

// A log axis is labelled at its decades (1e-9 ... 1e2), every second
// decade beyond maxLabelledDecades.
func TestDecadeTicks(t *testing.T) {
	var got []string
	for _, tk := range decadeTicks(1e-9, 1e2) {
		if tk.Label != "" {
			got = append(got, tk.Label)
		}
	}
	if strings.Join(got, " ") != "1e-9 1e-8 1e-7 1e-6 1e-5 1e-4 1e-3 1e-2 1e-1 1e0 1e1 1e2" {
		t.Errorf("decades %q", got)
	}
	n := 0
	for _, tk := range decadeTicks(1e-20, 1e0) {
		if tk.Label != "" {
			n++
		}
	}
	if n != 11 {
		t.Errorf("20 decades: %d labelled, want every second (11)", n)
	}
}
