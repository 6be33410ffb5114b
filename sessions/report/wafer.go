package report

import (
	"bytes"
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

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

// waferPlotter draws the dies of one wafer as squares, filled by class.
type waferPlotter struct {
	rows   []fit.BatchRow
	grid   fit.DieGrid
	param  int
	sc     fit.ShadeScale
	out    map[int]bool
	limits []fit.Limit
	label  text.Style
}

func (w waferPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for pos, k := range w.grid.At {
		cls := fit.ClassOfDie(w.rows, k, w.param, w.sc, w.out, w.limits)
		x, y := float64(pos[0]), float64(pos[1])
		x0, x1 := trX(x-0.45), trX(x+0.45)
		y0, y1 := trY(y-0.45), trY(y+0.45)
		c.FillPolygon(dieColor(cls), []vg.Point{{X: x0, Y: y0}, {X: x1, Y: y0}, {X: x1, Y: y1}, {X: x0, Y: y1}})
		if m := fit.DieMark(cls); m != "" {
			st := w.label
			st.Color = color.White
			if cls == fit.DieNotRun || cls == fit.DieUndetermined {
				st.Color = color.Black
			}
			c.FillText(st, vg.Point{X: (x0 + x1) / 2, Y: (y0 + y1) / 2}, m)
		}
	}
}

func (w waferPlotter) DataRange() (xmin, xmax, ymin, ymax float64) {
	return float64(w.grid.X0) - 0.5, float64(w.grid.X1) + 0.5, float64(w.grid.Y0) - 0.5, float64(w.grid.Y1) + 0.5
}

// swatch is a legend thumbnail: a filled square.
type swatch color.RGBA

func (s swatch) Thumbnail(c *draw.Canvas) {
	r := c.Rectangle
	c.FillPolygon(color.RGBA(s), []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}})
}

// dieTicks marks the whole die numbers from lo to hi (the grid's, not
// the padding's), at most about ten labelled.
type dieTicks struct{ lo, hi int }

func (d dieTicks) Ticks(lo, hi float64) []plot.Tick {
	a, b := max(int(math.Ceil(lo)), d.lo), min(int(math.Floor(hi)), d.hi)
	step := max(1, (b-a+1+9)/10)
	var out []plot.Tick
	for v := a; v <= b; v++ {
		t := plot.Tick{Value: float64(v)}
		if (v-a)%step == 0 {
			t.Label = strconv.Itoa(v)
		}
		out = append(out, t)
	}
	return out
}

// WaferMapSVG draws the wafer map of batch column param for wafer
// (fit.WaferKey) as SVG (16 cm by 11 cm, fonts not embedded): one square
// per die at (x, y), y growing downward, filled by its shade of the value
// (fit.NewShadeScale: four equal bins over the values within the Tukey
// fences, on log10 for Is, Is2 and Rsh) or by its mark (outlier, failed,
// out of limits, not run, not determined, lettered as in the text map),
// with the legend of the shades' value ranges at the right.
func WaferMapSVG(res *fit.BatchResult, param int, wafer string, limits []fit.Limit, ascii bool) (svg []byte, err error) {
	defer func() {
		if r := recover(); r != nil {
			svg, err = nil, fmt.Errorf("the wafer map cannot be drawn: %v", r)
		}
	}()
	g := fit.NewDieGrid(res.Rows, wafer)
	if g.N == 0 {
		return nil, fmt.Errorf("no die positions to draw: name files like die_x03_y07.csv or r07c03.csv, or list them in %s", fit.ManifestName)
	}
	bp := fit.BatchParams()[param]
	p := plot.New()
	p.Title.Text = "Wafer map: " + bp.Label
	if wafer != "" {
		p.Title.Text += ", wafer " + wafer
	}
	p.X.Label.Text, p.Y.Label.Text = "die x", "die y"
	p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	p.X.Tick.Marker, p.Y.Tick.Marker = dieTicks{g.X0, g.X1}, dieTicks{g.Y0, g.Y1}
	wp := waferPlotter{rows: res.Rows, grid: g, param: param, sc: fit.NewShadeScale(res.Rows, res.Stats, param),
		out: fit.OutlierSet(res.Stats[param]), limits: limits, label: p.X.Tick.Label}
	wp.label.XAlign, wp.label.YAlign = draw.XCenter, draw.YCenter
	p.Add(wp)
	// Square dies: the same data span on both axes.
	nx, ny := float64(g.X1-g.X0+1), float64(g.Y1-g.Y0+1)
	span := math.Max(nx, ny)
	p.X.Min, p.X.Max = float64(g.X0)-0.5-(span-nx)/2, float64(g.X1)+0.5+(span-nx)/2
	p.Y.Min, p.Y.Max = float64(g.Y0)-0.5-(span-ny)/2, float64(g.Y1)+0.5+(span-ny)/2

	leg := plot.NewLegend()
	leg.Top, leg.Left = true, true
	leg.TextStyle.Font.Size = vg.Points(9)
	leg.Padding = vg.Points(3)
	leg.ThumbnailWidth = vg.Points(14)
	f := func(v float64) string { return model.Format(bp.Kind, v, 4, true) }
	sc := wp.sc
	switch {
	case sc.OK && sc.Hi == sc.Lo:
		leg.Add(f(sc.Edge(0)), swatch(dieColor(fit.Shade2)))
	case sc.OK:
		for l := fit.ShadeLevels - 1; l >= 0; l-- {
			leg.Add(f(sc.Edge(l))+" to "+f(sc.Edge(l+1)), swatch(dieColor(fit.DieClass(l))))
		}
	}
	for _, m := range []struct {
		cls  fit.DieClass
		what string
	}{{fit.DieOutlier, "outlier"}, {fit.DieFailed, "fit failed"}, {fit.DieOutOfLimits, "out of limits"}, {fit.DieNotRun, "not run"}, {fit.DieUndetermined, "not determined"}} {
		if m.cls == fit.DieOutOfLimits && !fit.HasLimitOn(limits, param) {
			continue
		}
		leg.Add(fit.DieMark(m.cls)+" "+m.what, swatch(dieColor(m.cls)))
	}
	scale := "linear"
	if sc.Log {
		scale = "log"
	}
	cv := vgsvg.NewWith(vgsvg.UseWH(16*vg.Centimeter, 11*vg.Centimeter), vgsvg.EmbedFonts(false))
	dc := draw.New(cv)
	legendW := 5.5 * vg.Centimeter
	mapC := draw.Crop(dc, 0, -legendW, 0, 0)
	side := math.Min(float64(mapC.Max.X-mapC.Min.X), float64(mapC.Max.Y-mapC.Min.Y))
	mapC.Max.X = mapC.Min.X + vg.Length(side) // a square map area
	p.Draw(mapC)
	legC := draw.Crop(dc, dc.Max.X-dc.Min.X-legendW+vg.Millimeter*3, 0, 0, -vg.Centimeter)
	leg.Draw(legC)
	note := leg.TextStyle
	note.XAlign, note.YAlign = draw.XLeft, draw.YBottom
	legC.FillText(note, vg.Point{X: legC.Min.X, Y: legC.Min.Y + vg.Centimeter}, "("+scale+" shading)")
	var b bytes.Buffer
	if _, err := cv.WriteTo(&b); err != nil {
		return nil, fmt.Errorf("drawing the wafer map: %w", err)
	}
	return b.Bytes(), nil
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
