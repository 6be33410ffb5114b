package sessions

import (
	"fmt"
	"math"
	"reflect"
	"strings"

	"junco/model"
	"junco/model/fit"
)

// SectionBatches is the section of a comparison that lists the kept
// batch tables.
const SectionBatches = "batch tables"

// diffBatches compares kept batch tables by ID, in summary: a batch added
// or removed is one row; a changed one gives at most a row for its
// files (how many rows changed, were added or removed, compared by file
// name), one per column whose median changed, one for its limits and one
// for its yield, however many files it has.
func diffBatches(a, b []Batch, ascii bool) []Change {
	var out []Change
	add := func(q, o, n, d string) {
		out = append(out, Change{Section: SectionBatches, Quantity: q, Old: o, New: n, Delta: d})
	}
	diffByID(a, b, func(x Batch) string { return x.ID }, func(id string, x, y *Batch) {
		switch {
		case x == nil:
			add(id, "", y.counted(), "added")
			return
		case y == nil:
			add(id, x.counted(), "", "removed")
			return
		case reflect.DeepEqual(x, y):
			return
		}
		if x.Folder != y.Folder || x.Model != y.Model {
			add(id+": folder and model", x.Folder+", "+x.Model+" diode", y.Folder+", "+y.Model+" diode", "changed")
		}
		changed, added, removed := rowChanges(x.Rows, y.Rows)
		if changed+added+removed > 0 || x.Interrupted != y.Interrupted {
			add(id+": files", x.counted(), y.counted(), fmt.Sprintf("%d changed, %d added, %d removed", changed, added, removed))
		}
		rx, lx := x.Result()
		ry, ly := y.Result()
		for j, p := range fit.BatchParams() {
			sx, sy := rx.Stats[j], ry.Stats[j]
			if sx.N == 0 && sy.N == 0 {
				continue
			}
			if sx.Median == sy.Median && len(sx.Outliers) == len(sy.Outliers) {
				continue
			}
			f := func(s float64, n, outliers int) string {
				if n == 0 {
					return "none fitted"
				}
				return fmt.Sprintf("%s (%d outliers)", model.Format(p.Kind, s, 4, ascii), outliers)
			}
			d := "changed"
			if sx.N > 0 && sy.N > 0 {
				d = Delta(p.Kind, sx.Median, sy.Median, ascii)
			}
			add(id+": median "+p.Symbol, f(sx.Median, sx.N, len(sx.Outliers)), f(sy.Median, sy.N, len(sy.Outliers)), d)
		}
		if limitsText(lx) != limitsText(ly) {
			add(id+": limits", limitsText(lx), limitsText(ly), "changed")
		}
		if len(lx)+len(ly) > 0 {
			yx, yy := fit.BatchYield(rx.Rows, lx), fit.BatchYield(ry.Rows, ly)
			if yx.Passed != yy.Passed || yx.Tested != yy.Tested {
				add(id+": yield", yieldText(yx, lx), yieldText(yy, ly), fmt.Sprintf("%+d passed", yy.Passed-yx.Passed))
			}
		}
	})
	return out
}

// counted is "wafer12, 97 files (95 fitted, 2 failed)".
func (b Batch) counted() string {
	ok, failed, notRun := b.counts()
	s := fmt.Sprintf("%s, %d files (%d fitted, %d failed", orDashText(b.Folder), len(b.Rows), ok, failed)
	if notRun > 0 {
		s += fmt.Sprintf(", %d not run", notRun)
	}
	return s + ")"
}

// rowChanges counts the rows, matched by file name, that differ, were
// added or were removed.
func rowChanges(a, b []BatchRow) (changed, added, removed int) {
	old := make(map[string]*BatchRow, len(a))
	for i := range a {
		old[a[i].File] = &a[i]
	}
	seen := make(map[string]bool, len(b))
	for i := range b {
		r := &b[i]
		seen[r.File] = true
		switch o, ok := old[r.File]; {
		case !ok:
			added++
		case !reflect.DeepEqual(o, r):
			changed++
		}
	}
	for f := range old {
		if !seen[f] {
			removed++
		}
	}
	return
}

// limitsText lists limits as PARAM:MIN:MAX in SI ("none" without).
func limitsText(ls []fit.Limit) string {
	if len(ls) == 0 {
		return "none"
	}
	var s []string
	for _, l := range ls {
		s = append(s, l.String())
	}
	return strings.Join(s, " ")
}

// yieldText is "95 of 97 passed (97.9 %)", "-" without limits.
func yieldText(y fit.Yield, ls []fit.Limit) string {
	if len(ls) == 0 {
		return "-"
	}
	f := fit.Fraction(y.Passed, y.Tested)
	if math.IsNaN(f) {
		return fmt.Sprintf("%d of %d passed", y.Passed, y.Tested)
	}
	return fmt.Sprintf("%d of %d passed (%.1f %%)", y.Passed, y.Tested, 100*f)
}
