package report

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"

	"junco/model"
	"junco/physics"
	"junco/sessions"
)

// File is one exported file: its name (no directory) and content.
type File = sessions.File

// profilePoints is the number of samples of the junction and minority
// profiles in exports.
const profilePoints = 201

// Figure is one computed curve of a session with how to draw it.
type Figure struct {
	Curve model.Curve
	// LogY draws |y| on a logarithmic axis (I-V, Is(T), minority density).
	LogY bool
	// Dots, when set for a series (by index), draws it as separate
	// points (measured data) instead of a line.
	Dots []bool
}

// dots reports whether series si is drawn as points.
func (f Figure) dots(si int) bool { return si < len(f.Dots) && f.Dots[si] }

// Figures computes every curve of a document with the model: I-V (log
// |I|), ideality, C-V, 1/C^2, the junction profiles (charge, field,
// potential, bands), the minority-carrier profiles and the temperature
// curves. A curve the model refuses at these inputs (profiles in strong
// forward bias, for example) is left out and its reason returned in notes.
func Figures(doc *sessions.Document) (figs []Figure, notes []string, err error) {
	if err := doc.Spec.Validate(); err != nil {
		return nil, nil, err
	}
	skip := func(what string, e error) { notes = append(notes, what+": "+e.Error()) }
	bias := doc.Sweeps.Bias.Range()
	if iv, e := model.IVCurve(doc.Spec, bias); e != nil {
		skip("I-V", e)
	} else {
		figs = append(figs, Figure{Curve: iv, LogY: true})
	}
	if n, e := model.IdealityCurve(doc.Spec, bias); e != nil {
		skip("ideality", e)
	} else {
		figs = append(figs, Figure{Curve: n})
	}
	if cv, ms, e := model.CVCurve(doc.Spec, bias); e != nil {
		skip("C-V", e)
	} else {
		figs = append(figs, Figure{Curve: cv}, Figure{Curve: ms})
	}
	if ch, fi, po, ba, e := model.JunctionProfiles(doc.Spec, profilePoints); e != nil {
		skip("junction profiles", e)
	} else {
		figs = append(figs, Figure{Curve: ch}, Figure{Curve: fi}, Figure{Curve: po}, Figure{Curve: ba})
	}
	if de, cu, e := model.MinorityProfiles(doc.Spec, profilePoints); e != nil {
		skip("minority profiles", e)
	} else {
		figs = append(figs, Figure{Curve: de, LogY: true}, Figure{Curve: cu})
	}
	if is, vf, e := model.TemperatureCurves(doc.Spec, doc.Sweeps.Temperature.Range(), doc.Spec.ForwardCurrentOrDefault()); e != nil {
		skip("temperature curves", e)
	} else {
		figs = append(figs, Figure{Curve: is, LogY: true}, Figure{Curve: vf})
	}
	return figs, notes, nil
}

// ---------------------------------------------------------------- CSV

// slug turns a label into a lower-case identifier of letters, digits and
// underscores.
func slug(s string) string {
	if rest, ok := strings.CutPrefix(s, "1/"); ok {
		s = "inv " + rest
	}
	var b strings.Builder
	under := false
	for _, r := range strings.ToLower(s) {
		switch {
		case r >= 'a' && r <= 'z' || r >= '0' && r <= '9':
			b.WriteRune(r)
			under = false
		case r == 'µ' || r == 'μ':
			b.WriteByte('u')
			under = false
		case r == '^' || r == '/':
			if r == '/' && !under && b.Len() > 0 {
				b.WriteString("_per_")
				under = true
			}
		default:
			if !under && b.Len() > 0 {
				b.WriteByte('_')
				under = true
			}
		}
	}
	return strings.Trim(b.String(), "_")
}

// unitSlug writes a unit for a column name: "A/m^2" -> "A_per_m2",
// "m^-3" -> "per_m3", "F^-2" -> "per_F2", "1/K" -> "per_K". Letter case is
// kept (units are case-sensitive); characters other than ASCII letters
// and digits are dropped (µ becomes u).
func unitSlug(u string) string {
	u = strings.ReplaceAll(u, " ", "")
	if u == "" {
		return ""
	}
	num, den, _ := strings.Cut(u, "/")
	var parts []string
	term := func(s string, per bool) {
		s = strings.Trim(s, "()")
		if s == "" || s == "1" {
			return
		}
		neg := strings.Contains(s, "^-")
		s = strings.Map(func(r rune) rune {
			switch {
			case r == 'µ' || r == 'μ':
				return 'u'
			case r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9':
				return r
			}
			return -1
		}, s)
		if s == "" {
			return
		}
		if neg != per {
			s = "per_" + s
		}
		parts = append(parts, s)
	}
	term(num, false)
	term(den, true)
	return strings.Join(parts, "_")
}

// axisName is the quantity name of an axis label without its trailing
// symbol: "bias V" -> "bias", "charge density rho" -> "charge density",
// "distance from depletion edge" is kept whole.
func axisName(label string) string {
	words := strings.Fields(label)
	if len(words) >= 2 && isSymbol(words[len(words)-1]) {
		words = words[:len(words)-1]
	}
	return strings.Join(words, " ")
}

// isSymbol reports a word that reads as a symbol: a single letter, a word
// starting with a capital, or a Greek letter's name.
func isSymbol(w string) bool {
	switch w {
	case "rho", "psi", "mu", "tau", "phi", "eps", "sigma":
		return true
	}
	r := []rune(w)
	return len(r) == 1 || unicode.IsUpper(r[0])
}

// axisUnit is the unit an axis' values are in: its Unit, else the SI unit
// of its kind.
func axisUnit(a model.Axis) string {
	if a.Unit != "" {
		return a.Unit
	}
	return model.SIUnit(a.Kind)
}

func columnName(name, unit string) string {
	c := slug(name)
	if u := unitSlug(unit); u != "" {
		c += "_" + u
	}
	return c
}

// CurveCSV writes a curve as CSV: one column for x, one per series, with
// headers naming quantity, series and unit (bias_V,current_total_A,...).
// Values are those of the curve (SI unless the axis names another unit),
// with full precision; an empty cell marks a point where the quantity is
// not defined.
func CurveCSV(c model.Curve) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	yname := axisName(c.Y.Label)
	header := []string{columnName(axisName(c.X.Label), axisUnit(c.X))}
	for _, s := range c.Series {
		n := yname + " " + s.Label
		if len(c.Series) == 1 || slug(s.Label) == slug(yname) {
			n = yname
		}
		header = append(header, columnName(n, axisUnit(c.Y)))
	}
	_ = w.Write(header)
	row := make([]string, len(header))
	for i, x := range c.Xs {
		row[0] = csvNumber(x)
		for j, s := range c.Series {
			v := math.NaN()
			if i < len(s.Y) {
				v = s.Y[i]
			}
			row[j+1] = csvNumber(v)
		}
		_ = w.Write(row)
	}
	w.Flush()
	return b.Bytes()
}

func csvNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return ""
	}
	return strconv.FormatFloat(v, 'g', -1, 64)
}

// MeasurementCSV writes a measured data set as CSV, one row per point,
// with the columns it has under unit-labelled headers (voltage_V,
// current_A, capacitance_F, frequency_Hz, temperature_K), SI values.
func MeasurementCSV(m sessions.Measurement) []byte {
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	var cols []sessions.MeasurementColumn
	for _, c := range m.ValueColumns() {
		if c.Values != nil {
			cols = append(cols, c)
		}
	}
	header := make([]string, len(cols))
	for i, c := range cols {
		header[i] = c.Key
	}
	_ = w.Write(header)
	row := make([]string, len(cols))
	for k := range m.Len() {
		for i, c := range cols {
			row[i] = ""
			if k < len(c.Values) {
				row[i] = csvNumber(c.Values[k])
			}
		}
		_ = w.Write(row)
	}
	w.Flush()
	return b.Bytes()
}

// ---------------------------------------------------------------- scaling

// displayUnit returns the trade unit in which a curve axis is drawn and the
// factor from the axis' values to it. Units are converted by
// model.ParseValue, so no conversion factor is repeated here. For kinds
// shown with an SI prefix the prefix is chosen from the largest magnitude.
func displayUnit(a model.Axis, maxAbs float64) (string, float64) {
	if a.Unit != "" {
		return a.Unit, 1
	}
	trade := map[model.Kind]string{
		model.Density: "cm-3", model.Gradient: "cm-4", model.Field: "V/cm",
		model.CurrentDensity: "A/cm2", model.Mobility: "cm2/Vs", model.Diffusivity: "cm2/s",
		model.CapacitancePerArea: "nF/cm2", model.Velocity: "cm/s", model.Energy: "eV",
		model.Temperature: "K",
	}
	if u, ok := trade[a.Kind]; ok {
		if one, err := model.ParseValue(a.Kind, "1"+u); err == nil && one != 0 {
			return u, 1 / one
		}
	}
	prefixed := map[model.Kind][]string{
		model.Voltage:     {"mV", "V", "kV"},
		model.Current:     {"pA", "nA", "uA", "mA", "A"},
		model.Capacitance: {"fF", "pF", "nF", "uF", "F"},
		model.Time:        {"ps", "ns", "us", "ms", "s"},
		model.Length:      {"nm", "um", "mm", "m"},
	}
	if units, ok := prefixed[a.Kind]; ok && maxAbs > 0 && physics.Finite(maxAbs) {
		best, bestF := "", 0.0
		for _, u := range units {
			one, err := model.ParseValue(a.Kind, "1"+u)
			if err != nil || one == 0 {
				continue
			}
			if best == "" || maxAbs/one >= 1 {
				best, bestF = u, 1/one
			}
		}
		if best != "" {
			return best, bestF
		}
	}
	return model.SIUnit(a.Kind), 1
}

func xExtent(c model.Curve) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range c.Xs {
		if physics.Finite(x) {
			lo, hi = min(lo, x), max(hi, x)
		}
	}
	return lo, hi, lo <= hi
}

func axisTitle(a model.Axis, unit string, logAbs bool) string {
	name := a.Label
	if logAbs {
		name = "|" + name + "|"
	}
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

// ---------------------------------------------------------------- SVG

// buildPlot lays out a figure for drawing. The y range follows yExtent and
// every line is clipped to it.
func buildPlot(f Figure) (*chart, error) {
	c := f.Curve
	xlo, xhi, okx := xExtent(c)
	ylo, yhi, oky := yExtent(f)
	if !okx || !oky {
		return nil, fmt.Errorf("figure %q has no finite values to draw", c.ID)
	}
	xu, xf := displayUnit(c.X, math.Max(math.Abs(xlo), math.Abs(xhi)))
	yu, yf := displayUnit(c.Y, math.Max(math.Abs(ylo), math.Abs(yhi)))
	p := &chart{Title: c.Title, grid: true}
	p.X.Title = axisTitle(c.X, xu, false)
	p.Y.Title = axisTitle(c.Y, yu, f.LogY)
	if f.LogY {
		p.Y.Scale = scaleLog
	}
	prim := c.Primary()
	// The total is drawn last, over its components.
	order := make([]int, 0, len(c.Series))
	for i := range c.Series {
		if i != prim {
			order = append(order, i)
		}
	}
	if prim >= 0 {
		order = append(order, prim)
	}
	strokes := make([]stroke, len(c.Series))
	for _, si := range order {
		if f.dots(si) {
			continue
		}
		s := c.Series[si]
		st := stroke{colour: seriesColour(c, si), width: 1.2}
		if si == prim || (prim < 0 && si == 0) {
			st.width = 2
		} else {
			st.dash = []float64{4 + float64(si), 2}
		}
		strokes[si] = st
		ln := chartLine{st: st}
		var seg [][2]float64
		for i, x := range c.Xs {
			if i >= len(s.Y) {
				break
			}
			y := s.Y[i]
			if f.LogY {
				y = math.Abs(y)
			}
			if !physics.Finite(x) || !physics.Finite(y) || (f.LogY && y <= 0) {
				if len(seg) > 0 {
					ln.segs = append(ln.segs, seg)
				}
				seg = nil
				continue
			}
			seg = append(seg, [2]float64{x * xf, y * yf})
		}
		if len(seg) > 0 {
			ln.segs = append(ln.segs, seg)
		}
		p.lines = append(p.lines, ln)
	}
	if len(c.Series) > 1 {
		for si, s := range c.Series {
			if f.dots(si) {
				continue // listed with the points below
			}
			name := s.Label
			if f.LogY && model.ZeroSeries(s.Y) {
				// No line (zero everywhere on a log axis): the legend
				// still lists it, saying why.
				name += " (zero, not drawn)"
			}
			p.legend = append(p.legend, legendEntry{label: name, st: strokes[si]})
		}
	}
	// Points go on top of the lines, so that a fit through them leaves
	// them visible.
	for _, si := range dotted(f) {
		col := seriesColour(c, si)
		d := chartDots{colour: col}
		for i, x := range c.Xs {
			if i >= len(c.Series[si].Y) {
				break
			}
			y := c.Series[si].Y[i]
			if f.LogY {
				y = math.Abs(y)
			}
			if physics.Finite(x) && physics.Finite(y) && (!f.LogY || y > 0) {
				d.pts = append(d.pts, [2]float64{x * xf, y * yf})
			}
		}
		if len(d.pts) == 0 {
			continue
		}
		p.dots = append(p.dots, d)
		if len(c.Series) > 1 {
			p.legend = append(p.legend, legendEntry{label: c.Series[si].Label, st: stroke{colour: col, width: 1}, dot: true})
		}
	}
	// Every line and point is clipped to these ranges.
	if f.LogY {
		// Whole decades around the range.
		p.Y.Min = math.Pow(10, math.Floor(math.Log10(ylo*yf)+1e-9))
		p.Y.Max = math.Pow(10, math.Ceil(math.Log10(yhi*yf)-1e-9))
		if p.Y.Max <= p.Y.Min {
			p.Y.Max = p.Y.Min * 10
		}
	} else {
		lo, hi := ylo*yf, yhi*yf
		if hi == lo {
			d := math.Max(math.Abs(lo)*0.1, 1e-300)
			lo, hi = lo-d, hi+d
		}
		pad := 0.04 * (hi - lo)
		p.Y.Min, p.Y.Max = lo-pad, hi+pad
	}
	p.X.Min, p.X.Max = xlo*xf, xhi*xf
	if p.X.Max == p.X.Min {
		p.X.Min, p.X.Max = p.X.Min-1, p.X.Max+1
	}
	if splitFor(c, p.X.Min, p.X.Max) {
		p.X.Scale = scaleSplit
		p.X.Title += ", each side of the junction to its own scale"
	}
	if c.DepletionDominated() != nil && !f.LogY {
		p.Title += " (scaled where the depletion part dominates)"
	}
	return p, nil
}

// dotted lists the series drawn as points.
func dotted(f Figure) []int {
	var out []int
	for si := range f.Curve.Series {
		if f.dots(si) {
			out = append(out, si)
		}
	}
	return out
}

// FigureSVG draws a figure as SVG (a 16 cm by 10 cm plot, fonts not
// embedded): one line per series, a legend when there are several, in a
// column right of the plot (the figure is widened by it, so that it never
// covers a curve), trade units on both axes, |y| on a logarithmic axis
// for LogY figures. Points where a value is not defined (or not positive
// on a log axis) break the line.
func FigureSVG(f Figure) ([]byte, error) {
	p, err := buildPlot(f)
	if err != nil {
		return nil, err
	}
	return p.svg(), nil
}

// ---------------------------------------------------------------- text chart

// TextChart draws a figure as plain ASCII of the given plot area (at least
// 20 by 5 characters), with the y range at the left, the x range below and
// a legend of the series' marks. LogY figures plot log10 |y|.
func TextChart(f Figure, width, height int) string {
	width, height = max(width, 20), max(height, 5)
	c := f.Curve
	xlo, xhi, okx := xExtent(c)
	ylo, yhi, oky := yExtent(f)
	if !okx || !oky {
		return "(no finite values to draw)\n"
	}
	xu, xf := displayUnit(c.X, math.Max(math.Abs(xlo), math.Abs(xhi)))
	yu, yf := displayUnit(c.Y, math.Max(math.Abs(ylo), math.Abs(yhi)))
	ty := func(y float64) float64 {
		if f.LogY {
			return math.Log10(math.Abs(y) * yf)
		}
		return y * yf
	}
	y0, y1 := ty(ylo), ty(yhi)
	if f.LogY {
		y0, y1 = math.Floor(y0), math.Ceil(y1)
	}
	if y1 == y0 {
		y0, y1 = y0-1, y1+1
	}
	x0, x1 := xlo*xf, xhi*xf
	if x1 == x0 {
		x0, x1 = x0-1, x1+1
	}
	grid := make([][]byte, height)
	for i := range grid {
		grid[i] = bytes.Repeat([]byte{' '}, width)
	}
	col := func(x float64) int { return int(math.Round((x - x0) / (x1 - x0) * float64(width-1))) }
	row := func(y float64) int { return height - 1 - int(math.Round((y-y0)/(y1-y0)*float64(height-1))) }
	marks := "*o+x#%@"
	// The first series is drawn last, so it stays visible where lines meet.
	for si := len(c.Series) - 1; si >= 0; si-- {
		s := c.Series[si]
		m := marks[si%len(marks)]
		prevOK := false
		var pc, pr int
		for i, x := range c.Xs {
			if i >= len(s.Y) {
				break
			}
			y := s.Y[i]
			if !physics.Finite(x) || !physics.Finite(y) || (f.LogY && y == 0) {
				prevOK = false
				continue
			}
			cc, rr := col(x*xf), row(ty(y))
			if prevOK && !f.dots(si) {
				n := max(abs(cc-pc), abs(rr-pr))
				for k := 1; k < n; k++ {
					ic := pc + (cc-pc)*k/n
					ir := pr + (rr-pr)*k/n
					if ic >= 0 && ic < width && ir >= 0 && ir < height && grid[ir][ic] == ' ' {
						grid[ir][ic] = '.'
					}
				}
			}
			if cc >= 0 && cc < width && rr >= 0 && rr < height {
				grid[rr][cc] = m
			}
			pc, pr, prevOK = cc, rr, true
		}
	}
	label := func(v float64) string {
		if f.LogY {
			return "1e" + strconv.Itoa(int(math.Round(v)))
		}
		return strconv.FormatFloat(v, 'g', 3, 64)
	}
	top, bottom := label(y1), label(y0)
	lw := max(len(top), len(bottom))
	var b strings.Builder
	fmt.Fprintf(&b, "%s, %s\n", c.Title, axisTitle(c.Y, yu, f.LogY))
	for i, line := range grid {
		l := ""
		switch i {
		case 0:
			l = top
		case height - 1:
			l = bottom
		}
		fmt.Fprintf(&b, "%*s |%s\n", lw, l, strings.TrimRight(string(line), " "))
	}
	fmt.Fprintf(&b, "%*s +%s\n", lw, "", strings.Repeat("-", width))
	xl, xr := strconv.FormatFloat(x0, 'g', 3, 64), strconv.FormatFloat(x1, 'g', 3, 64)
	fmt.Fprintf(&b, "%*s  %s%*s\n", lw, "", xl, width-len(xl), xr)
	fmt.Fprintf(&b, "%*s  %s\n", lw, "", axisTitle(c.X, xu, false))
	if len(c.Series) > 1 {
		var parts []string
		for si, s := range c.Series {
			parts = append(parts, fmt.Sprintf("%c %s", marks[si%len(marks)], asciiOnly(s.Label)))
		}
		fmt.Fprintf(&b, "%*s  %s\n", lw, "", strings.Join(parts, "   "))
	}
	return asciiOnly(b.String())
}

func abs(n int) int {
	if n < 0 {
		return -n
	}
	return n
}

// asciiOnly replaces characters outside printable ASCII (the micro sign
// becomes u) so text charts stay plain ASCII.
func asciiOnly(s string) string {
	return strings.Map(func(r rune) rune {
		switch {
		case r == '\n':
			return r
		case r == 'µ' || r == 'μ':
			return 'u'
		case r < 0x20 || r > 0x7e:
			return '?'
		}
		return r
	}, s)
}
