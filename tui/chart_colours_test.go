package tui

import (
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/charmbracelet/lipgloss"
	"github.com/muesli/termenv"
)

// colourRenderer is a renderer of profile p on a dark or light
// background.
func colourRenderer(p termenv.Profile, dark bool) *lipgloss.Renderer {
	r := lipgloss.NewRenderer(io.Discard)
	r.SetColorProfile(p)
	r.SetHasDarkBackground(dark)
	return r
}

// fgCode is the first foreground colour of the SGR sequences in s: "5;N"
// (256 colours), "2;R;G;B" (true colour) or the 16-colour code; "" for
// none.
func fgCode(s string) string {
	for _, m := range sgrRE.FindAllStringSubmatch(s, -1) {
		ps := strings.Split(m[1], ";")
		for k := 0; k < len(ps); k++ {
			switch n, _ := strconv.Atoi(ps[k]); {
			case n == 38 && k+2 < len(ps) && ps[k+1] == "5":
				return strings.Join(ps[k+1:k+3], ";")
			case n == 38 && k+4 < len(ps) && ps[k+1] == "2":
				return strings.Join(ps[k+1:k+5], ";")
			case n == 38 || n == 48:
				k += 2 // a background or a malformed colour: skip its arguments
				if k < len(ps) && ps[k-1] == "2" {
					k += 2
				}
			case n >= 30 && n <= 37, n >= 90 && n <= 97:
				return ps[k]
			}
		}
	}
	return ""
}

var sgrRE = regexp.MustCompile(`\x1b\[([0-9;]*)m`)

// codeRGB is the sRGB colour of a 256-colour or true-colour code. The
// 256-colour table is common practice (the xterm table): indices 16-231
// a 6x6x6 cube of levels 0, 95, 135, 175, 215, 255; 232-255 greys
// 8 + 10k. cube is the cube's coordinates (nil for a grey).
func codeRGB(code string) (rgb [3]float64, cube []int, ok bool) {
	f := strings.Split(code, ";")
	switch {
	case len(f) == 2 && f[0] == "5":
		i, err := strconv.Atoi(f[1])
		if err != nil || i < 16 {
			return rgb, nil, false
		}
		if i >= 232 {
			g := float64(8 + 10*(i-232))
			return [3]float64{g, g, g}, nil, true
		}
		lv := []float64{0, 95, 135, 175, 215, 255}
		c := []int{(i - 16) / 36, (i - 16) / 6 % 6, (i - 16) % 6}
		return [3]float64{lv[c[0]], lv[c[1]], lv[c[2]]}, c, true
	case len(f) == 4 && f[0] == "2":
		for k := range 3 {
			v, err := strconv.Atoi(f[k+1])
			if err != nil {
				return rgb, nil, false
			}
			rgb[k] = float64(v)
		}
		return rgb, nil, true
	}
	return rgb, nil, false
}

// deltaE76 is the CIE 1976 colour difference ΔE*ab of two sRGB colours:
// the Euclidean distance in CIELAB (CIE 15:2004, Colorimetry, 3rd ed.,
// the L*a*b* formulae and ΔE*ab) with the D65 white, after the sRGB
// transfer function and matrix of IEC 61966-2-1:1999. A just noticeable
// difference is about 2.3; neighbouring shades of the 256-colour cube
// (one level apart in one channel) measure about 20 to 27.
func deltaE76(a, b [3]float64) float64 {
	lab := func(c [3]float64) [3]float64 {
		var l [3]float64
		for k, v := range c {
			v /= 255
			if v <= 0.04045 {
				l[k] = v / 12.92
			} else {
				l[k] = math.Pow((v+0.055)/1.055, 2.4)
			}
		}
		x := (0.4124*l[0] + 0.3576*l[1] + 0.1805*l[2]) / 0.95047
		y := 0.2126*l[0] + 0.7152*l[1] + 0.0722*l[2]
		z := (0.0193*l[0] + 0.1192*l[1] + 0.9505*l[2]) / 1.08883
		f := func(t float64) float64 {
			if t > 216.0/24389 {
				return math.Cbrt(t)
			}
			return (24389.0/27*t + 16) / 116
		}
		return [3]float64{116*f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))}
	}
	p, q := lab(a), lab(b)
	return math.Sqrt((p[0]-q[0])*(p[0]-q[0]) + (p[1]-q[1])*(p[1]-q[1]) + (p[2]-q[2])*(p[2]-q[2]))
}

// minDeltaE is the least colour difference of two lines of one chart:
// beyond neighbouring shades (about 27 at most, see deltaE76).
const minDeltaE = 30

// The sanity of the colour maths: white against black is ΔE*ab 100
// (L* 100 and 0, a* and b* 0 for both: the definition of L*), and the
// neighbouring cube shades the total and hole diffusion once had (109,
// 110) measure below minDeltaE.
func TestDeltaE76(t *testing.T) {
	if d := deltaE76([3]float64{255, 255, 255}, [3]float64{0, 0, 0}); math.Abs(d-100) > 0.05 {
		t.Errorf("white-black ΔE %.3f, want 100", d)
	}
	a, _, _ := codeRGB("5;109")
	b, _, _ := codeRGB("5;110")
	if d := deltaE76(a, b); d >= minDeltaE {
		t.Errorf("109-110 ΔE %.1f: the threshold would not tell neighbouring shades", d)
	}
}

// distinctColours reports the pairs of codes (labelled) that are the
// same, neighbouring shades of the 256-colour cube (at most one level
// apart in every channel) or closer than minDeltaE.
func distinctColours(labels, codes []string) []string {
	var bad []string
	for i := range codes {
		for j := i + 1; j < len(codes); j++ {
			a, ca, oka := codeRGB(codes[i])
			b, cb, okb := codeRGB(codes[j])
			why := ""
			switch {
			case codes[i] == codes[j]:
				why = "the same colour"
			case !oka || !okb:
				continue // 16 colours: distinct codes is all there is
			case ca != nil && cb != nil && max(absInt(ca[0]-cb[0]), absInt(ca[1]-cb[1]), absInt(ca[2]-cb[2])) <= 1:
				why = "neighbouring cube shades"
			case deltaE76(a, b) < minDeltaE:
				why = fmt.Sprintf("ΔE*ab %.1f < %d", deltaE76(a, b), minDeltaE)
			}
			if why != "" {
				bad = append(bad, fmt.Sprintf("%s (%s) and %s (%s): %s", labels[i], codes[i], labels[j], codes[j], why))
			}
		}
	}
	return bad
}

func absInt(x int) int { return max(x, -x) }

// TestChartColoursDistinct: no two lines of one chart share a colour or
// neighbouring shades. Every chart paints its i-th series with the i-th
// colour of the palette (the solver's lines from the last back) and the
// pinned line with its own, so the palette is checked whole, with every
// colour profile and background; and the I-V chart's legend, drawn, has
// seven colours that pass the same check. Before, the total and hole
// diffusion (109, 110) and the diffusion and shunt (174, 173) were
// neighbouring shades.
func TestChartColoursDistinct(t *testing.T) {
	for _, c := range []struct {
		name string
		p    termenv.Profile
		dark bool
	}{
		{"256 dark", termenv.ANSI256, true}, {"256 light", termenv.ANSI256, false},
		{"true colour dark", termenv.TrueColor, true}, {"true colour light", termenv.TrueColor, false},
		{"16 colours", termenv.ANSI, true},
	} {
		st := newStyles(colourRenderer(c.p, c.dark), true)
		var labels, codes []string
		for i, s := range st.series {
			labels, codes = append(labels, fmt.Sprintf("series %d", i)), append(codes, fgCode(s.Paint("x")))
		}
		labels, codes = append(labels, "pinned"), append(codes, fgCode(st.pinSeries.Paint("x")))
		for i, code := range codes {
			if code == "" {
				t.Fatalf("%s: %s paints no colour: the check would prove nothing", c.name, labels[i])
			}
		}
		for _, b := range distinctColours(labels, codes) {
			t.Errorf("%s: %s", c.name, b)
		}
	}

	m := start(New(Options{Renderer: colourRenderer(termenv.ANSI256, true), Width: 200, Height: 60, syncCharts: true}))
	m = press(m, "tab", "tab")
	legend := regexp.MustCompile(`(\x1b\[[0-9;]*m)\S+\x1b\[0?m ([a-zA-Z][a-zA-Z ()/-]*?)(?:   |\s*$|\x1b)`)
	var labels, codes []string
	for _, l := range strings.Split(m.View(), "\n") {
		if !strings.Contains(l, "total") {
			continue
		}
		for _, g := range legend.FindAllStringSubmatch(l, -1) {
			labels, codes = append(labels, strings.TrimSpace(g[2])), append(codes, fgCode(g[1]))
		}
	}
	if len(codes) != 7 {
		t.Fatalf("I-V legend: %d entries %q, want the total and six components", len(codes), labels)
	}
	for _, b := range distinctColours(labels, codes) {
		t.Errorf("I-V chart: %s", b)
	}
}
