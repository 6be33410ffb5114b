package cli

import (
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"junco/model"
	"junco/model/fit"
	"junco/sessions"
	"junco/sessions/report"
	"junco/tui/wafermap"
)

// fitWaferOpts are the wafer options of fit batch: the column mapped
// (--map; -1: none), the limits (--limit, repeatable) and the Markdown
// report written (--report).
type fitWaferOpts struct {
	param  int
	limits []fit.Limit
	report string
}

// fitParseWafer reads --map, --limit and --report.
func fitParseWafer(a *fitArgs) (fitWaferOpts, error) {
	o := fitWaferOpts{param: -1}
	if s, ok := a.str("map"); ok {
		j, err := fit.BatchParamIndex(s)
		if err != nil {
			return o, fitBad("junco fit batch: --map: %v", err)
		}
		o.param = j
	}
	ls := a.vals["limit"]
	if len(ls) > fit.MaxLimits {
		return o, fitBad("junco fit batch: %d --limit options: at most %d", len(ls), fit.MaxLimits)
	}
	for _, s := range ls {
		l, err := fit.ParseLimit(s)
		if err != nil {
			return o, fitBad("junco fit batch: --limit: %v", err)
		}
		o.limits = append(o.limits, l)
	}
	if s, ok := a.str("report"); ok {
		s = strings.TrimSpace(s)
		if !strings.EqualFold(filepath.Ext(s), ".md") || strings.HasPrefix(filepath.Base(s), ".") {
			return o, fitBad("junco fit batch: --report %q: expected a Markdown file name ending .md (its figures are written beside it)", s)
		}
		o.report = s
	}
	return o, nil
}

// fitDieNotes says, on one line, how many dies carry a note (a manifest
// that disagrees with the name, a name with two positions), with the
// first of them.
func fitDieNotes(rows []fit.BatchRow) string {
	var first string
	n := 0
	for _, r := range rows {
		if r.Die.Note != "" {
			if n == 0 {
				first = filepath.Base(r.File) + ": " + r.Die.Note
			}
			n++
		}
	}
	switch n {
	case 0:
		return ""
	case 1:
		return first
	}
	return fmt.Sprintf("%s (and %d more die notes: see die_note in --json)", first, n-1)
}

type fitLimitJSON struct {
	Parameter string   `json:"parameter"`
	Min       *float64 `json:"min"`
	Max       *float64 `json:"max"`
	Passed    int      `json:"passed"`
	Tested    int      `json:"tested"`
	Fraction  *float64 `json:"fraction"`
}

type fitYieldJSON struct {
	Passed   int            `json:"passed"`
	Tested   int            `json:"tested"`
	Fraction *float64       `json:"fraction"`
	PerLimit []fitLimitJSON `json:"per_limit"`
}

// fitYieldOf is the yield of the rows against the limits (nil without
// limits).
func fitYieldOf(rows []fit.BatchRow, limits []fit.Limit) *fitYieldJSON {
	if len(limits) == 0 {
		return nil
	}
	y := fit.BatchYield(rows, limits)
	out := &fitYieldJSON{Passed: y.Passed, Tested: y.Tested, Fraction: fitNum(fit.Fraction(y.Passed, y.Tested))}
	for _, l := range y.PerLimit {
		out.PerLimit = append(out.PerLimit, fitLimitJSON{Parameter: fit.BatchParams()[l.Limit.Param].Key,
			Min: fitNum(l.Limit.Min), Max: fitNum(l.Limit.Max), Passed: l.Passed, Tested: l.Tested, Fraction: fitNum(fit.Fraction(l.Passed, l.Tested))})
	}
	return out
}

// fitLimitText writes a limit's band in trade units: "1 to 1.2",
// "at most 5 ohm", "at least 1 Mohm".
func fitLimitText(l fit.Limit, ascii bool) string {
	k := fit.BatchParams()[l.Param].Kind
	f := func(v float64) string { return model.Format(k, v, 4, ascii) }
	switch {
	case math.IsInf(l.Min, -1):
		return "at most " + f(l.Max)
	case math.IsInf(l.Max, 1):
		return "at least " + f(l.Min)
	}
	return f(l.Min) + " to " + f(l.Max)
}

// fitWaferText writes the yield (with --limit) and the wafer maps (with
// --map, one per wafer) after the text summary.
func fitWaferText(w io.Writer, res *fit.BatchResult, o fitWaferOpts, ascii bool) {
	if len(o.limits) > 0 {
		y := fit.BatchYield(res.Rows, o.limits)
		fmt.Fprintf(w, "\nlimits and yield (%d dies tested; a failed fit fails every limit)\n", y.Tested)
		tw := fitTable(w)
		fmt.Fprintf(tw, "parameter\tlimit\tpassed\tyield\n")
		pct := func(p, t int) string {
			if t == 0 {
				return "-"
			}
			return fmt.Sprintf("%.1f %%", 100*fit.Fraction(p, t))
		}
		for _, l := range y.PerLimit {
			fmt.Fprintf(tw, "%s\t%s\t%d of %d\t%s\n", fit.BatchParams()[l.Limit.Param].Label, fitLimitText(l.Limit, ascii), l.Passed, l.Tested, pct(l.Passed, l.Tested))
		}
		fmt.Fprintf(tw, "overall\tevery limit\t%d of %d\t%s\n", y.Passed, y.Tested, pct(y.Passed, y.Tested))
		tw.Flush()
	}
	if o.param < 0 {
		return
	}
	wafers := fit.Wafers(res.Rows)
	if len(wafers) == 0 {
		wafers = []string{""}
	}
	for _, wf := range wafers {
		fmt.Fprintln(w)
		for _, l := range wafermap.Render(res.Rows, res.Stats, wafermap.Options{Param: o.param, Limits: o.limits, Wafer: wf, ASCII: ascii, Width: 100, Cursor: -1}) {
			fmt.Fprintln(w, l)
		}
	}
}

// fitBatchReport writes the Markdown report of --report and its SVG wafer
// maps beside it, never over an existing file.
func fitBatchReport(o fitWaferOpts, res *fit.BatchResult, c fitCommon) ([]string, error) {
	name := filepath.Base(o.report)
	files, err := report.BatchReport(res, report.BatchReportOptions{
		Name: strings.TrimSuffix(name, filepath.Ext(name)), Param: o.param, Limits: o.limits,
		ASCII: c.ascii, ToolVersion: Version, Model: fmt.Sprint(c.model),
	})
	if err != nil {
		return nil, err
	}
	return sessions.WriteNew(filepath.Dir(o.report), files)
}

// fitDieText is " at x3 y7" (with the wafer when stated) for a die with a
// position, "" otherwise: the die of a file named in the text summary.
func fitDieText(d fit.Die) string {
	if !d.Known() {
		return ""
	}
	s := fmt.Sprintf(" at x%d y%d", d.X, d.Y)
	if k := fit.WaferKey(d); k != "" {
		s += " wafer " + k
	}
	return s
}
