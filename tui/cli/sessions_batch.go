package cli

import (
	"fmt"
	"io"
	"strings"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
)

// sessionsShowBatches writes the kept batch tables of a document for
// sessions show: each batch's summary line, the median, quartiles and
// outliers of each column, and the yield against its limits; the rows
// themselves are in sessions export (CSV) and the report.
func sessionsShowBatches(w io.Writer, doc *sessions.Document, ascii bool) {
	if len(doc.Batches) == 0 {
		return
	}
	e := func(s string) string { return sessions.Printable(s, 0, "") }
	fmt.Fprintln(w, "\nBatch tables")
	for _, b := range doc.Batches {
		fmt.Fprintf(w, "  %s\n", e(b.Summary()))
		res, limits := b.Result()
		var rows [][]string
		for j, p := range fit.BatchParams() {
			s := res.Stats[j]
			if s.N == 0 {
				continue
			}
			f := func(v float64) string { return model.Format(p.Kind, v, 4, ascii) }
			rows = append(rows, []string{"    " + p.Label, "median " + f(s.Median), "Q1 " + f(s.Q1), "Q3 " + f(s.Q3), fmt.Sprintf("%d outliers of %d", len(s.Outliers), s.N)})
		}
		table(w, rows)
		if len(limits) > 0 {
			y := fit.BatchYield(res.Rows, limits)
			var ls []string
			for _, l := range limits {
				ls = append(ls, fit.BatchParams()[l.Param].Symbol+" "+fitLimitText(l, ascii))
			}
			fmt.Fprintf(w, "    yield %d of %d dies within every limit (%s)\n", y.Passed, y.Tested, strings.Join(ls, "; "))
		}
		for _, n := range b.Notes {
			fmt.Fprintf(w, "    %s\n", e(n))
		}
	}
}
