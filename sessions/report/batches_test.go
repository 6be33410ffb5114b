package report

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"junco/sessions"
)

// batchDocument is the sessions package's golden document with a kept
// batch table (golden-session-batch.json: five dies of wafer W12, one
// failed, one not run, limits on n and Rs).
func batchDocument(t *testing.T) *sessions.Document {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("..", "testdata", "golden-session-batch.json"))
	if err != nil {
		t.Fatal(err)
	}
	doc, err := sessions.Decode(data)
	if err != nil {
		t.Fatal(err)
	}
	return doc
}

// TestReportBatchTables: the Markdown report of a session with a kept
// batch has the batch's summary, limits and yield, wafer maps as SVG
// figures (with figures only) and failed files; the CSV export has the
// batch table with one line per file.
func TestReportBatchTables(t *testing.T) {
	doc := batchDocument(t)
	o := ExportOptions{Session: "d7", Revision: 3, Figures: true, ASCII: true, ToolVersion: "test"}
	files, err := Export(doc, FormatMarkdown, o)
	if err != nil {
		t.Fatal(err)
	}
	md := string(files[0].Data)
	for _, want := range []string{
		"\n## Batch tables\n",
		"\n### batch-1\n",
		"Folder `wafer12`",
		"5 files, 3 fitted, 1 failed, 1 not run; single diode model",
		"- window: every forward point",
		"#### Summary",
		"| ideality factor n | 3 | 1.030 |",
		"#### Limits and yield",
		"4 dies tested",
		"| overall | | | 1 of 4 | 25.0 % |", // by hand: see sessions.TestBatchRoundTrip
		"![wafer map of ideality factor n, wafer W12](d7-r3-batch-1-map-n.svg)",
		"#### Failed files",
		"no forward points",
	} {
		if !strings.Contains(md, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	svgs := map[string]bool{}
	for _, f := range files[1:] {
		if strings.HasPrefix(f.Name, "d7-r3-batch-1-map-") {
			svgs[f.Name] = true
			if !strings.Contains(string(f.Data), "<svg") {
				t.Errorf("%s is not SVG", f.Name)
			}
		}
	}
	// Is, n, Rs and Rsh have fitted values; Is2 (single diode) has none.
	if len(svgs) != 4 || !svgs["d7-r3-batch-1-map-n.svg"] {
		t.Errorf("wafer map files %v, want 4 (Is, n, Rs, Rsh)", svgs)
	}

	o.Figures = false
	files, err = Export(doc, FormatMarkdown, o)
	if err != nil {
		t.Fatal(err)
	}
	if strings.Contains(string(files[0].Data), ".svg") || !strings.Contains(string(files[0].Data), "Drawn as SVG figures when") {
		t.Error("without figures the report links SVG files or does not say where the maps are")
	}

	files, err = Export(doc, FormatCSV, o)
	if err != nil {
		t.Fatal(err)
	}
	var table string
	for _, f := range files {
		if f.Name == "d7-r3-batch-1.csv" {
			table = string(f.Data)
		}
	}
	lines := strings.Split(strings.TrimSpace(table), "\n")
	if len(lines) != 6 || !strings.HasPrefix(lines[0], "file,status,error,model,temperature_K") || !strings.Contains(table, "out_of_limits") ||
		!strings.HasPrefix(lines[1], "die_x01_y01.csv,ok,") || !strings.Contains(lines[2], ",inf,") {
		t.Errorf("batch CSV:\n%s", table)
	}

	// A session without batches has no batch section.
	plain, err := Export(exampleDocument(), FormatMarkdown, o)
	if err != nil || strings.Contains(string(plain[0].Data), "Batch tables") {
		t.Errorf("plain report: %v, batch section present", err)
	}
}

// Names in a kept table reach the Markdown report escaped: a
// bidirectional override (which an inbox name could hold, and which turns
// "rlo\u202egnp.csv" into "rlovsc.png" on screen) and an escape character
// in a failed file's message are written as \uXXXX, never as themselves,
// and a very long folder is cut. Before, md() passed them through, so
// `sessions export` over SSH sent them to the reviewer's terminal.
func TestReportBatchNamesEscaped(t *testing.T) {
	doc := batchDocument(t)
	kb := &doc.Batches[0]
	kb.Folder = "lot\u202e7" + strings.Repeat("x", 300)
	for i := range kb.Rows {
		if kb.Rows[i].Error != "" {
			kb.Rows[i].Error = "rlo\u202egnp.csv: bad \x1b[31m line"
		}
	}
	files, err := Export(doc, FormatMarkdown, ExportOptions{Session: "d7", Revision: 3, ASCII: true, ToolVersion: "test"})
	if err != nil {
		t.Fatal(err)
	}
	md := string(files[0].Data)
	if strings.ContainsAny(md, "\u202e\x1b") {
		t.Error("the report holds a raw bidirectional override or escape character")
	}
	for _, want := range []string{"rlo\\\\u202egnp.csv", "\\\\u001b\\[31m", "Folder `lot\\u202e7xxx"} {
		if !strings.Contains(md, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	if strings.Contains(md, strings.Repeat("x", 200)) {
		t.Error("a 300-character folder is not cut")
	}
}
