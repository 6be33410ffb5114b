package wafermap

import (
	"math"
	"strings"
	"testing"

	"github.com/charmbracelet/x/exp/golden"

	"junco/model/fit"
)

// smallWafer is an invented wafer of ten dies (not a measurement): n
// rises from left to right, one die is an outlier, one failed, one was not
// run, and two files have no position.
func smallWafer() *fit.BatchResult {
	die := func(x, y int) fit.Die { return fit.Die{X: x, Y: y, Source: fit.DieFromName} }
	ok := func(x, y int, n float64) fit.BatchRow {
		return fit.BatchRow{File: "d.csv", Status: fit.StatusOK, Die: die(x, y), Values: fit.BatchColumns(1e-12, n, 5, math.Inf(1), math.NaN())}
	}
	rows := []fit.BatchRow{
		ok(1, 0, 1.02), ok(2, 0, 1.04),
		ok(0, 1, 1.00), ok(1, 1, 1.03), ok(2, 1, 1.05), ok(3, 1, 1.08),
		ok(0, 2, 1.01), {File: "f.csv", Status: fit.StatusError, Die: die(1, 2)}, ok(2, 2, 1.90), {File: "g.csv", Status: fit.StatusNotRun, Die: die(3, 2)},
		ok(1, 3, 1.06),
		{File: "nameless.csv", Status: fit.StatusOK, Values: fit.BatchColumns(1e-12, 1.04, 5, 1, 1)},
	}
	res := &fit.BatchResult{Rows: rows}
	res.Stats = fit.Statistics(rows)
	return res
}

// The map of n on the invented wafer, in ASCII and Unicode, with a limit
// and the cursor, stays as recorded (go test -update rewrites the
// records; read the diff). The outlier (n = 1.90) is marked, not shaded,
// and does not stretch the shading.
func TestRenderGolden(t *testing.T) {
	res := smallWafer()
	lim := []fit.Limit{{Param: 1, Min: 1.0, Max: 1.07}}
	var b strings.Builder
	for _, o := range []Options{
		{Param: 1, ASCII: true, Cursor: -1},
		{Param: 1, ASCII: false, Cursor: 4},
		{Param: 1, ASCII: true, Cursor: 5, Limits: lim, Width: 40},
		{Param: 1, ASCII: true, Cursor: 5, Width: 10},
		{Param: 1, ASCII: true, Cursor: 10, Rows: 2},
	} {
		for _, l := range Render(res.Rows, res.Stats, o) {
			b.WriteString(l + "\n")
		}
		b.WriteString("--\n")
	}
	golden.RequireEqual(t, []byte(b.String()))
	if res.Stats[1].Outliers[0] != 8 {
		t.Fatalf("the invented outlier must be row 8: %v", res.Stats[1].Outliers)
	}
	if sc := fit.NewShadeScale(res.Rows, res.Stats, 1); sc.Hi != 1.08 || sc.Lo != 1.00 {
		t.Errorf("the shading must span the values within the fences, 1.00 to 1.08: %+v", sc)
	}
}

// Paint sees every die with its class; a wafer with no positions says
// how to give them.
func TestRenderPaintAndNoDies(t *testing.T) {
	res := smallWafer()
	seen := map[fit.DieClass]int{}
	Render(res.Rows, res.Stats, Options{Param: 1, Cursor: -1, Paint: func(c fit.DieClass, s string) string {
		seen[c]++
		return s
	}})
	if seen[fit.DieOutlier] != 2 || seen[fit.DieFailed] != 2 || seen[fit.DieNotRun] != 2 { // the die and its legend item
		t.Errorf("classes painted: %v", seen)
	}
	rows := []fit.BatchRow{{File: "a.csv", Status: fit.StatusOK}}
	out := Render(rows, fit.Statistics(rows), Options{Param: 0, Cursor: -1})
	if len(out) != 2 || !strings.Contains(out[1], fit.ManifestName) {
		t.Errorf("no dies: %q", out)
	}
}

// MinWidth is the least room that shows the whole grid, with the cursor
// framed at its right edge, and every legend item whole: the map drawn in
// it has no line over it but the title, and one column less cuts the
// grid or an item.
func TestMinWidth(t *testing.T) {
	res := smallWafer()
	for p := range 3 {
		o := Options{Param: p, Cursor: -1}
		w := MinWidth(res.Rows, res.Stats, o)
		if w <= 0 {
			t.Fatalf("param %d: MinWidth %d", p, w)
		}
		fits := func(w int) bool {
			o := o
			o.Width = w
			for k := range res.Rows { // the cursor on every die, the right edge too
				o.Cursor = k
				for _, l := range Render(res.Rows, res.Stats, o)[1:] {
					if strings.HasSuffix(l, "without a position") {
						continue // the title's second line; the workbench gives the map at least 30 columns
					}
					if visibleWidth(l) > w || strings.Contains(l, "widen the terminal") {
						return false
					}
				}
			}
			return true
		}
		if !fits(w) {
			t.Errorf("param %d: the map does not fit in MinWidth %d", p, w)
		}
		if fits(w - 1) {
			t.Errorf("param %d: the map fits in %d, less than MinWidth %d", p, w-1, w)
		}
	}
}

// The title's count of files without a position is never cut: on the
// title line where it fits, on a line of its own where the map is narrow.
func TestTitleCountNeverCut(t *testing.T) {
	res := smallWafer()
	wide := Render(res.Rows, res.Stats, Options{Param: 1, Cursor: -1, Width: 200})
	if !strings.HasSuffix(wide[0], ", 1 file without a position") {
		t.Errorf("wide title %q", wide[0])
	}
	narrow := Render(res.Rows, res.Stats, Options{Param: 1, Cursor: -1, Width: 30})
	if narrow[1] != "1 file without a position" || visibleWidth(narrow[0]) > 30 {
		t.Errorf("narrow title lines %q, %q", narrow[0], narrow[1])
	}
}
