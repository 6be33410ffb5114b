package report

import (
	"encoding/xml"
	"math"
	"strings"
	"testing"

	"junco/model/fit"
)

// invented rows of a two-wafer lot (not measurements): n from 1.00 to
// 1.08 by die, one failed fit.
func inventedLot() *fit.BatchResult {
	var rows []fit.BatchRow
	for k := 0; k < 9; k++ {
		w := "W1"
		if k >= 6 {
			w = "W2"
		}
		rows = append(rows, fit.BatchRow{File: "d.csv", Status: fit.StatusOK,
			Die:    fit.Die{X: k % 3, Y: k / 3 % 2, Wafer: w, Lot: "L1", Source: fit.DieFromManifest},
			Values: fit.BatchColumns(1e-12*(1+0.1*float64(k)), 1+0.01*float64(k), 4, math.Inf(1), math.NaN())})
	}
	rows[4].Status, rows[4].Err = fit.StatusError, errInvented{}
	res := &fit.BatchResult{Rows: rows, Fitted: 8, Failed: 1}
	res.Stats = fit.Statistics(rows)
	return res
}

type errInvented struct{}

func (errInvented) Error() string { return "invented failure" }

// The report links one SVG per wafer for the column asked, each a
// well-formed SVG with the title, the legend of the shades (the scale's
// edges) and the marks; the yield table counts the failed die as failing.
func TestBatchReport(t *testing.T) {
	res := inventedLot()
	lim := []fit.Limit{{Param: 1, Min: 1.0, Max: 1.05}}
	files, err := BatchReport(res, BatchReportOptions{Name: "lot1", Param: 1, Limits: lim, ToolVersion: "test", Model: "single"})
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 3 || files[0].Name != "lot1.md" || files[1].Name != "lot1-map-n-w1.svg" || files[2].Name != "lot1-map-n-w2.svg" {
		t.Fatalf("files %v", names(files))
	}
	md := string(files[0].Data)
	for _, want := range []string{"# Batch fit: lot1", "![wafer map of ideality factor n, wafer L1/W1](lot1-map-n-w1.svg)",
		"| ideality factor n | 1.000 | 1.050 | 5 of 9 | 55.6 % |", "invented failure"} {
		if !strings.Contains(md, want) {
			t.Errorf("report lacks %q:\n%s", want, md)
		}
	}
	svg := string(files[1].Data)
	if err := xml.Unmarshal(files[1].Data, new(struct{})); err != nil {
		t.Errorf("not well-formed SVG: %v", err)
	}
	sc := fit.NewShadeScale(res.Rows, res.Stats, 1)
	for _, want := range []string{"Wafer map: ideality factor n, wafer L1/W1", "1.000 to 1.020", "X fit failed", "! out of limits", "(linear shading)"} {
		if !strings.Contains(svg, want) {
			t.Errorf("SVG lacks %q (scale %+v)", want, sc)
		}
	}
	// The die marks are drawn: the failed die's X on W1, the dies of W2
	// above n = 1.05 marked !; no tick beyond the grid (W1 is y 0 to 1).
	if !strings.Contains(svg, ">X</text>") || strings.Count(string(files[2].Data), ">!</text>") != 3 {
		t.Error("die marks missing from the SVG")
	}
	if strings.Contains(svg, ">-1</text>") {
		t.Error("ticks beyond the grid")
	}
	if _, err := BatchReport(res, BatchReportOptions{Name: "a/b", Param: -1}); err == nil {
		t.Error("a name with a directory must be refused")
	}
	if _, err := WaferMapSVG(&fit.BatchResult{Rows: []fit.BatchRow{{Status: fit.StatusOK}}}, 0, "", nil, true); err == nil || !strings.Contains(err.Error(), fit.ManifestName) {
		t.Errorf("no dies: %v", err)
	}
}

func names(fs []File) []string {
	var out []string
	for _, f := range fs {
		out = append(out, f.Name)
	}
	return out
}
