package report

import (
	"fmt"
	"image/color"
	"strconv"
	"strings"
	"unicode/utf8"
)

// The report's SVG writer: plain SVG 1.1 of our own making, in points
// (1/72 inch) with y growing downward, text in the viewer's sans-serif
// font (not embedded). It knows rectangles, lines, polylines, circles,
// text and rectangular clipping; the figures and wafer maps are drawn
// with nothing else.

// svgCanvas accumulates the elements of one SVG document.
type svgCanvas struct {
	w, h  float64 // size, pt
	b     strings.Builder
	clips int
}

// newSVG starts a document of w by h points on a white ground.
func newSVG(w, h float64) *svgCanvas {
	c := &svgCanvas{w: w, h: h}
	fmt.Fprintf(&c.b, `<?xml version="1.0" encoding="UTF-8"?>`+"\n"+
		`<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="%spt" height="%spt" viewBox="0 0 %s %s" font-family="sans-serif">`+"\n",
		num(w), num(h), num(w), num(h))
	c.rect(0, 0, w, h, color.RGBA{255, 255, 255, 255})
	return c
}

// bytes ends the document and returns it.
func (c *svgCanvas) bytes() []byte {
	c.b.WriteString("</svg>\n")
	return []byte(c.b.String())
}

// num writes a coordinate with at most two decimals (a hundredth of a
// point is far below what a viewer shows).
func num(v float64) string {
	s := strconv.FormatFloat(v, 'f', 2, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if s == "-0" {
		return "0"
	}
	return s
}

// hexColour is a colour as #RRGGBB.
func hexColour(c color.RGBA) string {
	return fmt.Sprintf("#%02X%02X%02X", c.R, c.G, c.B)
}

// escape makes s safe as SVG text or attribute content.
func escape(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '&':
			b.WriteString("&amp;")
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '"':
			b.WriteString("&quot;")
		default:
			if r < 0x20 || r == utf8.RuneError {
				b.WriteByte('?')
				continue
			}
			b.WriteRune(r)
		}
	}
	return b.String()
}

// rect fills a rectangle (x, y its top left corner); a fill of zero
// alpha is transparent and draws nothing.
func (c *svgCanvas) rect(x, y, w, h float64, fill color.RGBA) {
	if fill.A == 0 {
		return
	}
	fmt.Fprintf(&c.b, `<rect x="%s" y="%s" width="%s" height="%s" fill="%s"/>`+"\n", num(x), num(y), num(w), num(h), hexColour(fill))
}

// stroke is how a line is drawn: colour, width (pt) and dash pattern
// (pt on, pt off; none for a solid line).
type stroke struct {
	colour color.RGBA
	width  float64
	dash   []float64
}

func (s stroke) attrs() string {
	a := fmt.Sprintf(`fill="none" stroke="%s" stroke-width="%s" stroke-linejoin="round"`, hexColour(s.colour), num(s.width))
	if len(s.dash) > 0 {
		parts := make([]string, len(s.dash))
		for i, d := range s.dash {
			parts[i] = num(d)
		}
		a += ` stroke-dasharray="` + strings.Join(parts, ",") + `"`
	}
	return a
}

// line draws a straight line.
func (c *svgCanvas) line(x1, y1, x2, y2 float64, s stroke) {
	fmt.Fprintf(&c.b, `<line x1="%s" y1="%s" x2="%s" y2="%s" %s/>`+"\n", num(x1), num(y1), num(x2), num(y2), s.attrs())
}

// polyline draws the points joined, clipped to the clip path id ("" for
// none).
func (c *svgCanvas) polyline(pts [][2]float64, s stroke, clip string) {
	if len(pts) == 0 {
		return
	}
	c.b.WriteString(`<polyline points="`)
	for i, p := range pts {
		if i > 0 {
			c.b.WriteByte(' ')
		}
		c.b.WriteString(num(p[0]) + "," + num(p[1]))
	}
	c.b.WriteString(`" ` + s.attrs() + clipAttr(clip) + "/>\n")
}

// circle draws an open circle of radius r (pt).
func (c *svgCanvas) circle(x, y, r float64, s stroke, clip string) {
	fmt.Fprintf(&c.b, `<circle cx="%s" cy="%s" r="%s" %s%s/>`+"\n", num(x), num(y), num(r), s.attrs(), clipAttr(clip))
}

// dot fills a circle of radius r (pt).
func (c *svgCanvas) dot(x, y, r float64, fill color.RGBA, clip string) {
	fmt.Fprintf(&c.b, `<circle cx="%s" cy="%s" r="%s" fill="%s"%s/>`+"\n", num(x), num(y), num(r), hexColour(fill), clipAttr(clip))
}

func clipAttr(id string) string {
	if id == "" {
		return ""
	}
	return ` clip-path="url(#` + id + `)"`
}

// clipRect defines a rectangular clip path and returns its id.
func (c *svgCanvas) clipRect(x, y, w, h float64) string {
	c.clips++
	id := "clip" + strconv.Itoa(c.clips)
	fmt.Fprintf(&c.b, `<defs><clipPath id="%s"><rect x="%s" y="%s" width="%s" height="%s"/></clipPath></defs>`+"\n", id, num(x), num(y), num(w), num(h))
	return id
}

// textStyle is how a text is set: size (pt), horizontal anchor (start,
// middle, end), whether (x, y) is its vertical middle rather than its
// baseline, rotation a quarter turn counter-clockwise, colour.
type textStyle struct {
	size   float64
	anchor string
	middle bool
	rotate bool
	colour color.RGBA
}

// text sets s at (x, y).
func (c *svgCanvas) text(x, y float64, s string, st textStyle) {
	if st.middle {
		// A third of the size below the middle is the baseline of
		// capitals and digits in common fonts; dominant-baseline is not
		// SVG 1.1 everywhere.
		if st.rotate {
			x += st.size / 3
		} else {
			y += st.size / 3
		}
	}
	attrs := fmt.Sprintf(`x="%s" y="%s" font-size="%s"`, num(x), num(y), num(st.size))
	if st.anchor != "" && st.anchor != "start" {
		attrs += ` text-anchor="` + st.anchor + `"`
	}
	if st.colour != (color.RGBA{}) && st.colour != (color.RGBA{0, 0, 0, 255}) {
		attrs += ` fill="` + hexColour(st.colour) + `"`
	}
	if st.rotate {
		attrs += fmt.Sprintf(` transform="rotate(-90 %s %s)"`, num(x), num(y))
	}
	fmt.Fprintf(&c.b, "<text %s>%s</text>\n", attrs, escape(s))
}

// textWidth estimates the width of s set at size pt in a common
// sans-serif font, generously (the font is the viewer's: the layout keeps
// room for a wide one): 0.62 em a character, 0.8 em for capitals and wide
// letters.
func textWidth(s string, size float64) float64 {
	w := 0.0
	for _, r := range s {
		switch {
		case r == 'm' || r == 'w' || r == 'M' || r == 'W':
			w += 0.9
		case r >= 'A' && r <= 'Z':
			w += 0.75
		case r == 'i' || r == 'l' || r == 'j' || r == '.' || r == ',' || r == ':' || r == '|' || r == '!' || r == '\'':
			w += 0.32
		case r == ' ' || r == '(' || r == ')' || r == '/' || r == '-' || r == 'f' || r == 't' || r == 'r':
			w += 0.42
		default:
			w += 0.62
		}
	}
	return w * size
}
