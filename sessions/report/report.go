package report

import (
	"fmt"
	"strings"
	"time"
	"unicode"

	"junco/model"
	"junco/sessions"
)

// Caution is the notice every exported report carries.
const Caution = "Estimates only: the results come from idealised models (depletion approximation, ideal diffusion currents) applied to the inputs above; they are not measurements and guarantee nothing about a real device. " +
	"High-voltage and high-current measurement is hazardous: local electrical codes, your laboratory's safety rules and the device's rated limits govern every test set-up, not this report."

// ExportFormat names an export format.
type ExportFormat string

// Export formats.
const (
	FormatMarkdown ExportFormat = "md"
	FormatCSV      ExportFormat = "csv"
	FormatJSON     ExportFormat = "json"
)

// ParseExportFormat checks a format name.
func ParseExportFormat(s string) (ExportFormat, error) {
	switch f := ExportFormat(strings.ToLower(s)); f {
	case FormatMarkdown, FormatCSV, FormatJSON:
		return f, nil
	}
	return "", fmt.Errorf("export format %q: allowed md (report with SVG figures), csv (one table per curve and data set), json (the session document)", s)
}

// ExportOptions say what is exported and how.
type ExportOptions struct {
	Session  string // session name, used in file names and the title
	Revision int    // revision number, used in file names and the title
	// Figures selects SVG files beside a Markdown report (linked from it);
	// without, the report has only text charts.
	Figures bool
	// ASCII selects u for micro and +/- in the report's tables.
	ASCII bool
	// ToolVersion names the junco that computes the report's results.
	ToolVersion string
}

// prefix is the common start of exported file names: NAME-rN.
func (o ExportOptions) prefix() string {
	return fmt.Sprintf("%s-r%d", o.Session, o.Revision)
}

// Export returns the files of one export of doc: for md the report
// NAME-rN.md (and NAME-rN-ID.svg figures when o.Figures, NAME-rN-fit-ID.svg
// for each kept fit drawn against its data), for csv one NAME-rN-ID.csv per
// curve, NAME-rN-data-ID.csv per measured data set, NAME-rN-fit-ID.csv per
// kept fit with a data set (bias, measured and fitted values) and
// NAME-rN-fits.csv with the parameters of every fit and NAME-rN-ID.csv
// per kept batch table, for json NAME-rN.json. A kept batch's wafer maps
// are NAME-rN-ID-map-KEY.svg.
func Export(doc *sessions.Document, f ExportFormat, o ExportOptions) ([]File, error) {
	if err := sessions.ValidateName(o.Session); err != nil {
		return nil, err
	}
	switch f {
	case FormatJSON:
		data, err := sessions.Encode(doc)
		if err != nil {
			return nil, err
		}
		return []File{{Name: o.prefix() + ".json", Data: data}}, nil
	case FormatCSV:
		figs, _, err := Figures(doc)
		if err != nil {
			return nil, err
		}
		var out []File
		for _, fg := range figs {
			out = append(out, File{Name: o.prefix() + "-" + fg.Curve.ID + ".csv", Data: CurveCSV(fg.Curve)})
		}
		for _, m := range doc.Measurements {
			out = append(out, File{Name: o.prefix() + "-data-" + m.ID + ".csv", Data: MeasurementCSV(m)})
		}
		for _, ff := range FitFigures(doc) {
			out = append(out, File{Name: o.prefix() + "-fit-" + ff.Extraction.ID + ".csv", Data: CurveCSV(ff.Data)})
		}
		if len(doc.Extractions) > 0 {
			out = append(out, File{Name: o.prefix() + "-fits.csv", Data: FitParametersCSV(doc)})
		}
		batches, err := batchCSVFiles(doc, o)
		return append(out, batches...), err
	case FormatMarkdown:
		return Report(doc, o)
	}
	return nil, fmt.Errorf("export format %q: allowed md, csv, json", f)
}

// Report writes the Markdown report of a document: the record, a caution,
// the inputs, the results of model.Evaluate with their validity flags,
// the sweeps, measurements, extracted parameters with standard errors,
// references compared with this junction, notes, review notes and the
// figures — each as a text chart in a code block and, with o.Figures, as
// an SVG file beside the report. The first file is the report.
func Report(doc *sessions.Document, o ExportOptions) ([]File, error) {
	res, err := model.Evaluate(doc.Spec)
	if err != nil {
		return nil, err
	}
	figs, skipped, err := Figures(doc)
	if err != nil {
		return nil, err
	}
	var b strings.Builder
	p := func(format string, a ...any) { fmt.Fprintf(&b, format, a...) }
	title := doc.Meta.Title
	if title == "" {
		title = "(untitled)"
	}
	p("# %s\n\n", md(title))
	p("Session `%s`, revision %d.\n\n", o.Session, o.Revision)
	p("| record | |\n|---|---|\n")
	p("| author | %s |\n", mdCell(orDash(doc.Meta.Author)))
	p("| created | %s |\n", stamp(doc.Meta.Created))
	p("| saved | %s |\n", stamp(doc.Meta.Modified))
	p("| saved by | %s |\n", mdCell(orDash(doc.Meta.SavedBy)))
	p("| saved with | junco %s |\n", mdCell(orDash(doc.Meta.ToolVersion)))
	if doc.Meta.BasedOn > 0 {
		p("| based on | revision %d |\n", doc.Meta.BasedOn)
	}
	if doc.Meta.Origin != "" {
		p("| origin | %s |\n", mdCell(doc.Meta.Origin))
	}
	p("\n> **Caution.** %s\n\n", Caution)

	p("## Inputs\n\n| input | value |\n|---|---|\n")
	for _, r := range sessions.SpecRows(doc.Spec, o.ASCII) {
		p("| %s | %s |\n", mdCell(r.Label), mdCell(r.Value))
	}

	p("\n## Results\n\nComputed from the inputs above by junco %s when this report was made.\n\n", mdCell(orDash(o.ToolVersion)))
	p("| group | quantity | symbol | value | flags |\n|---|---|---|---|---|\n")
	for _, q := range res.Quantities {
		p("| %s | %s | %s | %s | %s |\n", mdCell(q.Group), mdCell(strings.TrimSpace(q.Label)), mdCell(q.Symbol), mdCell(q.Text(4, o.ASCII)), mdCell(strings.Join(q.Flags, ", ")))
	}
	if len(res.Flags) > 0 {
		p("\nValidity warnings:\n\n")
		for _, f := range res.Flags {
			p("- **%s**: %s\n", md(f.Code), md(f.Message))
		}
	}

	p("\n## Sweeps\n\n| sweep | from | to | step |\n|---|---|---|---|\n")
	sw := doc.Sweeps
	p("| bias | %s | %s | %s |\n", f4(model.Voltage, sw.Bias.From, o), f4(model.Voltage, sw.Bias.To, o), f4(model.Voltage, sw.Bias.Step, o))
	p("| temperature | %s | %s | %s |\n", f4(model.Temperature, sw.Temperature.From, o), f4(model.Temperature, sw.Temperature.To, o), f4(model.Temperature, sw.Temperature.Step, o))
	p("\nForward voltage followed over temperature at %s; chart shown first: %s.\n", f4(model.Current, doc.Spec.ForwardCurrentOrDefault(), o), md(sw.Chart))

	p("\n## Measurements\n\n")
	if len(doc.Measurements) == 0 {
		p("None imported.\n")
	} else {
		p("| data set | kind | source file | imported | temperature | columns | points | rows left out |\n|---|---|---|---|---|---|---|---|\n")
		for _, m := range doc.Measurements {
			t := "-"
			if v, ok := m.Temperature(); ok {
				t = f4(model.Temperature, v, o)
			}
			var cols []string
			for _, c := range m.ValueColumns() {
				if c.Values != nil {
					cols = append(cols, c.Key)
				}
			}
			p("| %s | %s | %s | %s | %s | %s | %d | %d |\n", mdCell(m.ID), mdCell(string(m.Kind)), mdCell(m.SourceFile), stamp(m.ImportedAt), t, mdCell(strings.Join(cols, ", ")), m.Len(), m.ProblemRows)
		}
	}

	p("\n## Extracted parameters\n\n")
	if len(doc.Extractions) == 0 {
		p("None.\n")
	}
	for _, x := range doc.Extractions {
		from := "no data set"
		if x.Measurement != "" {
			from = "data set `" + x.Measurement + "`"
		}
		p("### %s: %s\n\nFrom %s, %s. Standard errors are one standard deviation.\n\n", md(x.ID), md(x.Method), from, stamp(x.Performed))
		p("| parameter | value | standard error | relative |\n|---|---|---|---|\n")
		for _, par := range x.Parameters {
			se, rel := "not estimated", "-"
			if par.StdError != nil {
				se = sessions.FormatWithUnit(*par.StdError, par.Unit)
				if par.Value != 0 {
					rel = fmt.Sprintf("%.2g %%", abs64(*par.StdError/par.Value)*100)
				}
			}
			p("| %s | %s | %s | %s |\n", mdCell(par.Name), mdCell(sessions.FormatWithUnit(par.Value, par.Unit)), mdCell(se), rel)
		}
		for _, n := range x.Notes {
			p("\n- %s", md(n))
		}
		if len(x.Notes) > 0 {
			p("\n")
		}
		p("\n")
	}

	p("\n## References\n\n")
	if len(doc.References) == 0 {
		p("None pinned.\n")
	}
	for _, r := range doc.References {
		p("### %s\n\nPinned %s. Results as computed when pinned, against this session now.\n\n", md(r.Name), stamp(r.Pinned))
		p("| quantity | reference | this session | change |\n|---|---|---|---|\n")
		for _, q := range res.Quantities {
			for _, rv := range r.Results {
				if rv.Key != q.Key {
					continue
				}
				ref := "n/a"
				d := ""
				if rv.Value != nil {
					ref = model.Format(q.Kind, *rv.Value, 4, o.ASCII)
					if *rv.Value != q.Value {
						d = sessions.Delta(q.Kind, *rv.Value, q.Value, o.ASCII)
					}
				}
				p("| %s | %s | %s | %s |\n", mdCell(sessions.ResultLabel(q)), mdCell(ref), mdCell(q.Text(4, o.ASCII)), mdCell(d))
			}
		}
		p("\n")
	}

	p("\n## Notes\n\n")
	if len(doc.Notes) == 0 {
		p("None.\n")
	}
	for _, l := range doc.Notes {
		p("%s  \n", md(l))
	}
	p("\n## Review notes\n\n")
	if len(doc.Reviews) == 0 {
		p("None.\n")
	}
	for _, r := range doc.Reviews {
		p("- **%s**, %s: %s\n", md(r.Author), stamp(r.Time), md(strings.Join(strings.Fields(r.Text), " ")))
	}

	p("\n## Figures\n\n")
	var files []File
	// figure writes a figure's heading, its SVG file and link when
	// figures are asked for, and its text chart.
	figure := func(fg Figure) {
		p("### %s\n\n", md(fg.Curve.Title))
		if o.Figures {
			svg, err := FigureSVG(fg)
			if err != nil {
				p("SVG figure not drawn: %s.\n\n", md(err.Error()))
			} else {
				name := o.prefix() + "-" + fg.Curve.ID + ".svg"
				files = append(files, File{Name: name, Data: svg})
				p("![%s](%s)\n\n", md(fg.Curve.Title), name)
			}
		}
		p("```text\n%s```\n\n", TextChart(fg, 64, 16))
	}
	for _, fg := range figs {
		figure(fg)
	}
	for _, s := range skipped {
		p("Not drawn: %s.\n\n", md(s))
	}
	if ffs := FitFigures(doc); len(ffs) > 0 {
		p("\n## Fits against their data\n\nEach kept fit: the measured points (dots), the fitted model and the prediction of this session's junction at the data set's temperature.\n\n")
		for _, ff := range ffs {
			figure(ff.Figure)
			for _, n := range ff.Notes {
				p("- %s\n", md(n))
			}
			if len(ff.Notes) > 0 {
				p("\n")
			}
		}
	}
	files = append(files, batchSection(&b, doc, o)...)
	report := File{Name: o.prefix() + ".md", Data: []byte(b.String())}
	return append([]File{report}, files...), nil
}

func f4(k model.Kind, v float64, o ExportOptions) string {
	return mdCell(model.Format(k, v, 4, o.ASCII))
}

func abs64(v float64) float64 {
	if v < 0 {
		return -v
	}
	return v
}

func orDash(s string) string {
	if strings.TrimSpace(s) == "" {
		return "-"
	}
	return s
}

func stamp(t time.Time) string {
	if t.IsZero() {
		return "-"
	}
	return t.UTC().Format("2006-01-02 15:04:05 UTC")
}

// md escapes user text for Markdown: characters that would start
// formatting, links or HTML are backslash-escaped, line breaks and tabs
// become spaces, and other control and invisible format characters are
// written as \uXXXX.
func md(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '\\', '`', '*', '_', '[', ']', '<', '>', '#', '|', '!', '~':
			b.WriteByte('\\')
			b.WriteRune(r)
		case '\n', '\r', '\t':
			b.WriteByte(' ')
		default:
			if unicode.IsControl(r) || unicode.Is(unicode.Cf, r) {
				// Shown as an escape (as sessions.Printable shows it),
				// never acted on: an escape sequence or a bidirectional
				// override would reach a terminal or a viewer as it is.
				fmt.Fprintf(&b, `\\u%04x`, r)
				continue
			}
			b.WriteRune(r)
		}
	}
	return b.String()
}

// mdCell escapes text for a table cell.
func mdCell(s string) string { return md(s) }
