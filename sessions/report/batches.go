package report

import (
	"bytes"
	"fmt"
	"strings"

	"junco/model/fit"
	"junco/sessions"
)

// batchSection writes the batch tables kept with a session (none: no
// section) under "## Batch tables": per batch its folder, counts, model
// and notes, then the summary of each column, the limits and yield, the
// wafer maps (SVG files NAME-rN-ID-map-KEY.svg with o.Figures) and the
// failed files, as fit batch --report writes them. It returns the SVG
// files.
func batchSection(b *strings.Builder, doc *sessions.Document, o ExportOptions) []File {
	if len(doc.Batches) == 0 {
		return nil
	}
	p := func(format string, a ...any) { fmt.Fprintf(b, format, a...) }
	p("\n## Batch tables\n\nThe I-V fit of every file of a folder, kept with the session; the statistics and yield are computed from the kept rows.\n\n")
	var files []File
	for _, kb := range doc.Batches {
		res, limits := kb.Result()
		p("### %s\n\n", md(kb.ID))
		p("Folder `%s`, fitted %s: %d files, %d fitted, %d failed, %d not run; %s diode model.\n\n",
			strings.ReplaceAll(sessions.Printable(orDash(kb.Folder), sessions.MaxEchoRunes, "..."), "`", "'"), stamp(kb.Performed), len(res.Rows), res.Fitted, res.Failed, res.NotRun, md(kb.Model))
		for _, n := range kb.Notes {
			p("- %s\n", md(n))
		}
		if len(kb.Notes) > 0 {
			p("\n")
		}
		files = append(files, batchBody(b, res, BatchReportOptions{Param: -1, Limits: limits, ASCII: o.ASCII}, "####", o.prefix()+"-"+kb.ID, o.Figures)...)
	}
	return files
}

// batchCSVFiles are the kept batch tables as CSV (fit.WriteBatchCSV, the
// table of fit batch --csv): NAME-rN-ID.csv each.
func batchCSVFiles(doc *sessions.Document, o ExportOptions) ([]File, error) {
	var out []File
	for _, kb := range doc.Batches {
		res, limits := kb.Result()
		var buf bytes.Buffer
		if err := fit.WriteBatchCSV(&buf, res, limits); err != nil {
			return nil, fmt.Errorf("batch table %s: %w", kb.ID, err)
		}
		out = append(out, File{Name: o.prefix() + "-" + kb.ID + ".csv", Data: buf.Bytes()})
	}
	return out, nil
}
