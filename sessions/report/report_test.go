package report

import (
	"bytes"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"junco/model"
	"junco/sessions"
)

func TestUnitAndColumnNames(t *testing.T) {
	units := map[string]string{"A/m^2": "A_per_m2", "m^-3": "per_m3", "F^-2": "per_F2", "1/K": "per_K",
		"V/m": "V_per_m", "C/m^3": "C_per_m3", "um": "um", "µm": "um", "m^2/(V s)": "m2_per_Vs", "": "", "V": "V"}
	for in, want := range units {
		if got := unitSlug(in); got != want {
			t.Errorf("unitSlug(%q) = %q, want %q", in, got, want)
		}
	}
	names := map[string]string{"bias V": "bias", "charge density rho": "charge density", "distance from depletion edge": "distance from depletion edge", "energy": "energy", "saturation current Is": "saturation current"}
	for in, want := range names {
		if got := axisName(in); got != want {
			t.Errorf("axisName(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestCurveCSV(t *testing.T) {
	spec := exampleSpec()
	iv, err := model.IVCurve(spec, model.Range{From: -0.5, To: 0.6, Step: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(CurveCSV(iv))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(recs[0], ","); !strings.HasPrefix(got, "bias_V,current_total_A,current_ideal_shockley_A,") {
		t.Errorf("header %q", got)
	}
	if len(recs[0]) != 1+len(iv.Series) {
		t.Fatalf("%d columns for %d series", len(recs[0]), len(iv.Series))
	}
	for i, s := range iv.Series {
		if want := "current_" + slug(s.Label) + "_A"; recs[0][i+1] != want {
			t.Errorf("column %d: %q, want %q", i+1, recs[0][i+1], want)
		}
	}
	if len(recs) != len(iv.Xs)+1 {
		t.Fatalf("%d rows for %d points", len(recs)-1, len(iv.Xs))
	}
	for i, r := range recs[1:] {
		x, _ := strconv.ParseFloat(r[0], 64)
		y, _ := strconv.ParseFloat(r[1], 64)
		if x != iv.Xs[i] || y != iv.Series[0].Y[i] {
			t.Errorf("row %d: %v, want %g %g", i, r, iv.Xs[i], iv.Series[0].Y[i])
		}
	}
	_, ms, err := model.CVCurve(spec, model.Range{From: -1, To: 0, Step: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if h := strings.SplitN(string(CurveCSV(ms)), "\n", 2)[0]; h != "bias_V,inv_c2_per_F2" {
		t.Errorf("1/C^2 header %q", h)
	}
	doc := exampleDocument()
	m := string(MeasurementCSV(doc.Measurements[0]))
	if want := "voltage_V,current_A\n0.1,2.5e-12\n0.2,1.1e-10\n0.3,5.2e-09\n"; m != want {
		t.Errorf("measurement CSV %q, want %q", m, want)
	}
}

func TestFiguresAndCharts(t *testing.T) {
	doc := exampleDocument()
	figs, notes, err := Figures(doc)
	if err != nil {
		t.Fatal(err)
	}
	ids := map[string]bool{}
	for _, f := range figs {
		ids[f.Curve.ID] = true
	}
	for _, id := range []string{"iv", "cv", "inv-c2", "charge", "field", "potential", "bands", "minority", "is-t", "vf-t"} {
		if !ids[id] {
			t.Errorf("figure %s missing (notes %q)", id, notes)
		}
	}
	for _, f := range figs {
		svg, err := FigureSVG(f)
		if err != nil {
			t.Errorf("%s: %v", f.Curve.ID, err)
			continue
		}
		if !bytes.Contains(svg, []byte("<svg")) || !bytes.Contains(svg, []byte(strings.ReplaceAll(f.Curve.Title, "&", "&amp;"))) {
			t.Errorf("%s: SVG lacks the drawing or its title", f.Curve.ID)
		}
		chart := TextChart(f, 64, 16)
		for i, r := range chart {
			if r > 0x7e || (r < 0x20 && r != '\n') {
				t.Fatalf("%s: chart has non-ASCII %q at %d", f.Curve.ID, r, i)
			}
		}
		if lines := strings.Count(chart, "\n"); lines < 16+3 {
			t.Errorf("%s: chart has %d lines", f.Curve.ID, lines)
		}
		if !strings.ContainsAny(chart, "*") {
			t.Errorf("%s: chart draws nothing:\n%s", f.Curve.ID, chart)
		}
	}
	// The I-V chart is on a log axis: its labels are decades.
	if c := TextChart(figs[0], 64, 16); !strings.Contains(c, "|current I|") || !strings.Contains(c, " 1e") {
		t.Errorf("I-V chart is not logarithmic:\n%s", c)
	}
	// Strong forward bias: where the model refuses the profiles, a note
	// says why and the rest is drawn.
	fwd := exampleDocument()
	fwd.Spec.Bias = 5
	figs, notes, err = Figures(fwd)
	if err != nil || len(figs) == 0 {
		t.Fatalf("forward bias: %v", err)
	}
	_, _, _, _, perr := model.JunctionProfiles(fwd.Spec, profilePoints)
	noted := strings.Contains(strings.Join(notes, " "), "junction profiles")
	if (perr != nil) != noted {
		t.Errorf("profiles error %v, notes %q", perr, notes)
	}
}

func TestReport(t *testing.T) {
	doc := exampleDocument()
	doc.Notes = append(doc.Notes, "<script>alert(1)</script> **bold**")
	files, err := Report(doc, ExportOptions{Session: "d7", Revision: 3, Figures: true, ASCII: true})
	if err != nil {
		t.Fatal(err)
	}
	if files[0].Name != "d7-r3.md" || len(files) < 8 {
		t.Fatalf("files: %d, first %q", len(files), files[0].Name)
	}
	md := string(files[0].Data)
	res, err := model.Evaluate(doc.Spec)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range res.Quantities {
		if !strings.Contains(md, "| "+mdCell(q.Text(4, true))+" |") {
			t.Errorf("report lacks %s = %s", q.Key, q.Text(4, true))
		}
	}
	for _, want := range []string{
		"# p+n test diode D7", "Session `d7`, revision 3.", Caution,
		"| Is | 1.2e-14 A | 3e-16 A | 2.5 % |", "| Rs | 0 ohm | not estimated | - |",
		"\\<script\\>alert(1)\\</script\\> \\*\\*bold\\*\\*",
		"**M. Osei**", "Check the series resistance at 0.7 V.",
		"| iv-25C | iv | d7\\_iv\\_25C.csv |",
		"![Current against bias](d7-r3-iv.svg)", "```text\n",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	for _, f := range files[1:] {
		if !strings.HasSuffix(f.Name, ".svg") || !strings.Contains(md, "("+f.Name+")") {
			t.Errorf("figure %s not linked", f.Name)
		}
	}
	// Without figures: text charts only.
	files, err = Report(doc, ExportOptions{Session: "d7", Revision: 3})
	if err != nil || len(files) != 1 || strings.Contains(string(files[0].Data), ".svg") {
		t.Errorf("report without figures: %d files, %v", len(files), err)
	}
}

func TestExportAndWriteNew(t *testing.T) {
	doc := exampleDocument()
	dir := filepath.Join(t.TempDir(), "out")
	csvs, err := Export(doc, FormatCSV, ExportOptions{Session: "d7", Revision: 1})
	if err != nil {
		t.Fatal(err)
	}
	names := map[string]bool{}
	for _, f := range csvs {
		names[f.Name] = true
	}
	for _, n := range []string{"d7-r1-iv.csv", "d7-r1-cv.csv", "d7-r1-bands.csv", "d7-r1-data-iv-25C.csv"} {
		if !names[n] {
			t.Errorf("csv export lacks %s", n)
		}
	}
	js, err := Export(doc, FormatJSON, ExportOptions{Session: "d7", Revision: 1})
	if err != nil || !bytes.Equal(js[0].Data, mustEncode(t, doc)) {
		t.Errorf("json export differs from the document: %v", err)
	}
	written, err := sessions.WriteNew(dir, js)
	if err != nil || len(written) != 1 {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(written[0])
	// A second export into the same directory replaces nothing.
	_, err = sessions.WriteNew(dir, append(csvs, js...))
	if err == nil || !strings.Contains(err.Error(), "d7-r1.json exists") {
		t.Errorf("overwrite: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "d7-r1-iv.csv")); !os.IsNotExist(err) {
		t.Error("files written although one existed")
	}
	if after, _ := os.ReadFile(written[0]); !bytes.Equal(before, after) {
		t.Error("existing file changed")
	}
	if _, err := sessions.WriteNew(dir, []File{{Name: "../escape.csv"}}); err == nil {
		t.Error("a path in a file name was accepted")
	}
	if _, err := ParseExportFormat("pdf"); err == nil || !strings.Contains(err.Error(), "md") {
		t.Errorf("bad format: %v", err)
	}
}

// TestDegenerateFigures: curves with nothing finite, one point or a flat
// line give an error or a drawing, never a panic.
func TestDegenerateFigures(t *testing.T) {
	nan := math.NaN()
	cases := []Figure{
		{Curve: model.Curve{ID: "nan", Xs: []float64{1, 2}, Series: []model.Series{{Label: "a", Y: []float64{nan, nan}}}}},
		{Curve: model.Curve{ID: "zero-log", Xs: []float64{1, 2}, Series: []model.Series{{Label: "a", Y: []float64{0, 0}}}}, LogY: true},
		{Curve: model.Curve{ID: "one", Xs: []float64{1}, Series: []model.Series{{Label: "a", Y: []float64{3}}}}},
		{Curve: model.Curve{ID: "flat-log", Xs: []float64{1, 2, 3}, Series: []model.Series{{Label: "a", Y: []float64{1e-9, 1e-9, 1e-9}}}}, LogY: true},
		{Curve: model.Curve{ID: "short", Xs: []float64{1, 2, 3}, Series: []model.Series{{Label: "a", Y: []float64{1}}}}},
		{Curve: model.Curve{ID: "empty"}},
	}
	for _, f := range cases {
		svg, err := FigureSVG(f)
		if err == nil && !bytes.Contains(svg, []byte("<svg")) {
			t.Errorf("%s: no error and no drawing", f.Curve.ID)
		}
		if (f.Curve.ID == "nan" || f.Curve.ID == "zero-log" || f.Curve.ID == "empty") && err == nil {
			t.Errorf("%s: nothing to draw but no error", f.Curve.ID)
		}
		if c := TextChart(f, 30, 8); c == "" {
			t.Errorf("%s: empty text chart", f.Curve.ID)
		}
	}
}
