package report

import (
	"cmp"
	"fmt"
	"image/color"
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"

	"junco/model"
	"junco/model/fit"
)

// dieColor fills the dies of a wafer map by class: four shades of a
// sequential scale (dark blue to yellow, readable in grey), then the
// marked classes; a class without a colour (a gap) is transparent. The
// table is built on each call, so no caller can change it.
func dieColor(cls fit.DieClass) color.RGBA {
	colors := [...]color.RGBA{
		fit.Shade0:          {0x3b, 0x4c, 0xc0, 255},
		fit.Shade1:          {0x2a, 0x9d, 0x8f, 255},
		fit.Shade2:          {0x8a, 0xc9, 0x26, 255},
		fit.Shade3:          {0xf9, 0xd0, 0x57, 255},
		fit.DieOutlier:      {0xe3, 0x77, 0xc2, 255},
		fit.DieFailed:       {0x55, 0x55, 0x55, 255},
		fit.DieOutOfLimits:  {0xd6, 0x27, 0x28, 255},
		fit.DieNotRun:       {0xdd, 0xdd, 0xdd, 255},
		fit.DieUndetermined: {0xbb, 0xbb, 0xbb, 255},
	}
	if cls < 0 || int(cls) >= len(colors) {
		return color.RGBA{}
	}
	return colors[cls]
}

// dieTicks marks the whole die numbers from lo to hi (the grid's, not
// the padding's), at most about ten labelled.
func dieTicks(glo, ghi int) func(lo, hi float64) []tick {
	return func(lo, hi float64) []tick {
		a, b := max(int(math.Ceil(lo)), glo), min(int(math.Floor(hi)), ghi)
		step := max(1, (b-a+1+9)/10)
		var out []tick
		for v := a; v <= b; v++ {
			t := tick{Value: float64(v)}
			if (v-a)%step == 0 {
				t.Label = strconv.Itoa(v)
			}
			out = append(out, t)
		}
		return out
	}
}

// Wafer map sizes, in points.
const (
	waferWidth   = 16 * cm
	waferHeight  = 11 * cm
	waferLegendW = 5.5 * cm
	waferLegendF = 9.0 // legend font size
)

// WaferMapSVG draws the wafer map of batch column param for wafer
// (fit.WaferKey) as SVG (16 cm by 11 cm, fonts not embedded): one square
// per die at (x, y), y growing downward, filled by its shade of the value
// (fit.NewShadeScale: four equal bins over the values within the Tukey
// fences, on log10 for Is, Is2 and Rsh) or by its mark (outlier, failed,
// out of limits, not run, not determined, lettered as in the text map),
// with the legend of the shades' value ranges at the right.
func WaferMapSVG(res *fit.BatchResult, param int, wafer string, limits []fit.Limit, ascii bool) ([]byte, error) {
	if param < 0 || param >= len(fit.BatchParams()) {
		return nil, fmt.Errorf("batch column %d: allowed 0 to %d", param, len(fit.BatchParams())-1)
	}
	g := fit.NewDieGrid(res.Rows, wafer)
	if g.N == 0 {
		return nil, fmt.Errorf("no die positions to draw: name files like die_x03_y07.csv or r07c03.csv, or list them in %s", fit.ManifestName)
	}
	bp := fit.BatchParams()[param]
	title := "Wafer map: " + bp.Label
	if wafer != "" {
		title += ", wafer " + wafer
	}
	// Square dies: the same data span on both axes.
	nx, ny := float64(g.X1-g.X0+1), float64(g.Y1-g.Y0+1)
	span := math.Max(nx, ny)
	X := axis{Title: "die x", tickFn: dieTicks(g.X0, g.X1),
		Min: float64(g.X0) - 0.5 - (span-nx)/2, Max: float64(g.X1) + 0.5 + (span-nx)/2}
	Y := axis{Title: "die y", tickFn: dieTicks(g.Y0, g.Y1), Inverted: true,
		Min: float64(g.Y0) - 0.5 - (span-ny)/2, Max: float64(g.Y1) + 0.5 + (span-ny)/2}
	side := math.Min(waferWidth-waferLegendW, waferHeight)
	f := frameIn(0, 0, side, side, X, Y, true)
	s := math.Min(f.x1-f.x0, f.y1-f.y0) // a square map area
	f.x1, f.y0 = f.x0+s, f.y1-s

	c := newSVG(waferWidth, waferHeight)
	drawAxes(c, f, title, false)
	sc := fit.NewShadeScale(res.Rows, res.Stats, param)
	out := fit.OutlierSet(res.Stats[param])
	// In row order, so that the same batch gives the same file.
	pos := slices.SortedFunc(maps.Keys(g.At), func(a, b [2]int) int {
		return cmp.Or(cmp.Compare(a[1], b[1]), cmp.Compare(a[0], b[0]))
	})
	for _, pos := range pos {
		k := g.At[pos]
		cls := fit.ClassOfDie(res.Rows, k, param, sc, out, limits)
		x, y := float64(pos[0]), float64(pos[1])
		x0, x1 := f.px(x-0.45), f.px(x+0.45)
		y0, y1 := f.py(y-0.45), f.py(y+0.45)
		c.rect(math.Min(x0, x1), math.Min(y0, y1), math.Abs(x1-x0), math.Abs(y1-y0), dieColor(cls))
		if m := fit.DieMark(cls); m != "" {
			st := textStyle{size: tickSize, anchor: "middle", middle: true, colour: white}
			if cls == fit.DieNotRun || cls == fit.DieUndetermined {
				st.colour = black
			}
			c.text((x0+x1)/2, (y0+y1)/2, m, st)
		}
	}

	var leg []legendEntry
	add := func(label string, cls fit.DieClass) {
		leg = append(leg, legendEntry{label: label, st: stroke{colour: dieColor(cls)}, swatch: true})
	}
	fv := func(v float64) string { return model.Format(bp.Kind, v, 4, true) }
	switch {
	case sc.OK && sc.Hi == sc.Lo:
		add(fv(sc.Edge(0)), fit.Shade2)
	case sc.OK:
		for l := fit.ShadeLevels - 1; l >= 0; l-- {
			add(fv(sc.Edge(l))+" to "+fv(sc.Edge(l+1)), fit.DieClass(l))
		}
	}
	for _, m := range []struct {
		cls  fit.DieClass
		what string
	}{{fit.DieOutlier, "outlier"}, {fit.DieFailed, "fit failed"}, {fit.DieOutOfLimits, "out of limits"}, {fit.DieNotRun, "not run"}, {fit.DieUndetermined, "not determined"}} {
		if m.cls == fit.DieOutOfLimits && !fit.HasLimitOn(limits, param) {
			continue
		}
		add(fit.DieMark(m.cls)+" "+m.what, m.cls)
	}
	lx := waferWidth - waferLegendW + 3*cm/10
	drawLegend(c, leg, lx, f.y0, waferLegendF)
	scale := "linear"
	if sc.Log {
		scale = "log"
	}
	c.text(lx, f.y1, "("+scale+" shading)", textStyle{size: waferLegendF})
	return c.bytes(), nil
}

// BatchReportOptions say what a batch report holds: the file name stem
// (NAME.md, NAME-map-KEY.svg), the column mapped (-1: every column with
// fitted values), the limits, the tool version and the fit model.
type BatchReportOptions struct {
	Name        string
	Param       int
	Limits      []fit.Limit
	ASCII       bool
	ToolVersion string
	Model       string
}

// BatchReport writes the Markdown report of a batch fit: the counts, the
// summary of each column, the limits and yield, the wafer maps (an SVG
// file per column and wafer, linked from the report) and the failed
// files. The first file is the report.
func BatchReport(res *fit.BatchResult, o BatchReportOptions) ([]File, error) {
	if o.Name == "" || strings.ContainsAny(o.Name, `/\`) {
		return nil, fmt.Errorf("batch report name %q: a plain file name is needed", o.Name)
	}
	var b strings.Builder
	p := func(format string, a ...any) { fmt.Fprintf(&b, format, a...) }
	p("# Batch fit: %s\n\n", md(o.Name))
	p("Computed by junco %s: %d files, %d fitted, %d failed, %d not run; %s diode model.\n\n", mdCell(orDash(o.ToolVersion)), len(res.Rows), res.Fitted, res.Failed, res.NotRun, mdCell(orDash(o.Model)))
	figs := batchBody(&b, res, o, "##", o.Name, true)
	return append([]File{{Name: o.Name + ".md", Data: []byte(b.String())}}, figs...), nil
}

// batchBody writes the sections of a batch's report under headings of
// level h ("##"): the summary of each column, the limits and yield, the
// wafer maps (with figures: SVG files named stem-map-KEY[-wN].svg,
// linked) and the failed files; it returns the SVG files.
func batchBody(b *strings.Builder, res *fit.BatchResult, o BatchReportOptions, h, stem string, figures bool) []File {
	p := func(format string, a ...any) { fmt.Fprintf(b, format, a...) }
	if res.Interrupted {
		p("The batch was interrupted: the files not run are marked.\n\n")
	}
	p("%s Summary\n\nQuartiles by linear interpolation; outliers beyond 1.5 IQR, on a log scale for Is, Is2 and Rsh.\n\n", h)
	p("| parameter | N | median | Q1 | Q3 | outliers |\n|---|---|---|---|---|---|\n")
	var params []int
	for j, bp := range fit.BatchParams() {
		s := res.Stats[j]
		if s.N == 0 {
			continue
		}
		params = append(params, j)
		f := func(v float64) string { return model.Format(bp.Kind, v, 4, o.ASCII) }
		p("| %s | %d | %s | %s | %s | %d |\n", mdCell(bp.Label), s.N, mdCell(f(s.Median)), mdCell(f(s.Q1)), mdCell(f(s.Q3)), len(s.Outliers))
	}
	if len(o.Limits) > 0 {
		y := fit.BatchYield(res.Rows, o.Limits)
		p("\n%s Limits and yield\n\n%d dies tested; a failed fit fails every limit.\n\n| parameter | min | max | passed | yield |\n|---|---|---|---|---|\n", h, y.Tested)
		pct := func(a, t int) string {
			if t == 0 {
				return "-"
			}
			return fmt.Sprintf("%.1f %%", 100*fit.Fraction(a, t))
		}
		for _, l := range y.PerLimit {
			bp := fit.BatchParams()[l.Limit.Param]
			side := func(v float64) string {
				if math.IsInf(v, 0) {
					return "-"
				}
				return model.Format(bp.Kind, v, 4, o.ASCII)
			}
			p("| %s | %s | %s | %d of %d | %s |\n", mdCell(bp.Label), mdCell(side(l.Limit.Min)), mdCell(side(l.Limit.Max)), l.Passed, l.Tested, pct(l.Passed, l.Tested))
		}
		p("| overall | | | %d of %d | %s |\n", y.Passed, y.Tested, pct(y.Passed, y.Tested))
	}
	if o.Param >= 0 {
		params = []int{o.Param}
	}
	var files []File
	wafers := fit.Wafers(res.Rows)
	p("\n%s Wafer maps\n\n", h)
	switch {
	case len(wafers) == 0:
		p("No die positions: name the files like `die_x03_y07.csv` or `r07c03.csv`, or list them in `%s`.\n", fit.ManifestName)
	case !figures:
		params = nil
		p("Drawn as SVG figures when the report is exported with its figures.\n\n")
	}
	for _, j := range params {
		for i, wf := range wafers {
			svg, err := WaferMapSVG(res, j, wf, o.Limits, o.ASCII)
			if err != nil {
				p("%s: %s\n\n", mdCell(fit.BatchParams()[j].Label), md(err.Error()))
				continue
			}
			name := stem + "-map-" + slug(fit.BatchParams()[j].Symbol)
			if len(wafers) > 1 {
				name += "-w" + strconv.Itoa(i+1)
			}
			name += ".svg"
			files = append(files, File{Name: name, Data: svg})
			title := "wafer map of " + fit.BatchParams()[j].Label
			if wf != "" {
				title += ", wafer " + wf
			}
			p("![%s](%s)\n\n", md(title), name)
		}
	}
	if res.Failed > 0 {
		p("%s Failed files\n\n", h)
		shown := 0
		for _, r := range res.Rows {
			if r.Status != fit.StatusError {
				continue
			}
			if shown == 50 {
				p("- ... %d more\n", res.Failed-50)
				break
			}
			p("- %s\n", md(oneLineErr(r.Err)))
			shown++
		}
	}
	return files
}

func oneLineErr(err error) string {
	if err == nil {
		return ""
	}
	return strings.Join(strings.Fields(err.Error()), " ")
}
