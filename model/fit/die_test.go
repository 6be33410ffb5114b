package fit

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Each file-name form gives its position, without case; the x/y form wins
// over the row/column form; one form twice with different positions is
// ambiguous; a letter before the form or a fifth digit is no match.
func TestDieFromFileName(t *testing.T) {
	cases := []struct {
		name  string
		x, y  int
		ok    bool
		amb   bool
		about string
	}{
		{"lot5_die_x03_y07.csv", 3, 7, true, false, "x/y with underscores"},
		{"die_x03-y07_300K.csv", 3, 7, true, false, "x/y with a hyphen"},
		{"W12X3Y7.csv", 3, 7, true, false, "x/y joined, upper case, after a digit"},
		{"DIE_X03_Y07.CSV", 3, 7, true, false, "upper case"},
		{"r07c03.csv", 3, 7, true, false, "row/column: r is y, c is x"},
		{"wafer2_R7_C3.tsv", 3, 7, true, false, "row/column with an underscore"},
		{"x-2y5.csv", -2, 5, true, false, "negative x"},
		{"x1y2_r05c06.csv", 1, 2, true, false, "both forms: x/y wins"},
		{"x1y2_again_x1y2.csv", 1, 2, true, false, "the same position twice is fine"},
		{"x1y2_x3y4.csv", 0, 0, false, true, "two positions: ambiguous"},
		{"die03.csv", 0, 0, false, false, "no form"},
		{"max3y7.csv", 0, 0, false, false, "a letter before x: no match"},
		{"x12345y1.csv", 0, 0, false, false, "five digits: no match"},
		{filepath.Join("x9y9", "die.csv"), 0, 0, false, false, "the directory is not read"},
	}
	for _, c := range cases {
		x, y, ok, err := DieFromFileName(c.name)
		if (err != nil) != c.amb || ok != c.ok || x != c.x || y != c.y {
			t.Errorf("%s (%s): got x=%d y=%d ok=%v err=%v", c.name, c.about, x, y, ok, err)
		}
		if c.amb && err != nil && !strings.Contains(err.Error(), ManifestName) {
			t.Errorf("%s: the error must point to the manifest: %v", c.name, err)
		}
	}
}

func writeFiles(t *testing.T, dir string, files map[string]string) {
	t.Helper()
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o600); err != nil {
			t.Fatal(err)
		}
	}
}

// A manifest gives positions, wafer and lot; it wins over a name that
// disagrees (and the die's note says so); files it does not name fall
// back to their names; the manifest itself is not a data file.
func TestDiesFromManifest(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{
		"Dies.CSV":        "# die map\nFile,X,Y,Wafer,Lot\na.csv,0,0,W1,L7\nB.csv, 1 ,0,W1,L7\ndie_x09_y09.csv,0,1,W1,L7\n",
		"a.csv":           "V,I\n",
		"b.csv":           "V,I\n",
		"die_x09_y09.csv": "V,I\n",
		"r02c05.csv":      "V,I\n",
		"plain.csv":       "V,I\n",
	})
	files, err := BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		if isManifest(f) {
			t.Fatalf("the manifest is listed as a data file: %v", files)
		}
	}
	if len(files) != 5 {
		t.Fatalf("files %v", files)
	}
	dies, err := Dies(nil, files)
	if err != nil {
		t.Fatal(err)
	}
	got := map[string]Die{}
	for k, f := range files {
		got[filepath.Base(f)] = dies[k]
	}
	want := map[string]Die{
		"a.csv":           {X: 0, Y: 0, Wafer: "W1", Lot: "L7", Source: DieFromManifest},
		"b.csv":           {X: 1, Y: 0, Wafer: "W1", Lot: "L7", Source: DieFromManifest},
		"die_x09_y09.csv": {X: 0, Y: 1, Wafer: "W1", Lot: "L7", Source: DieFromManifest},
		"r02c05.csv":      {X: 5, Y: 2, Source: DieFromName},
		"plain.csv":       {},
	}
	for name, w := range want {
		g := got[name]
		note := g.Note
		g.Note = ""
		if g != w {
			t.Errorf("%s: got %+v, want %+v", name, g, w)
		}
		if (name == "die_x09_y09.csv") != (note != "") {
			t.Errorf("%s: note %q (only a disagreement has one)", name, note)
		}
	}
	if n := got["die_x09_y09.csv"].Note; !strings.Contains(n, "manifest wins") || !strings.Contains(n, "x=9 y=9") {
		t.Errorf("disagreement note %q", n)
	}
}

// A manifest that cannot be used is an error naming the file, the line
// and the rule; a folder without one is fine.
func TestManifestErrors(t *testing.T) {
	cases := []struct{ body, want string }{
		{"", "is empty"},
		{"file,x\na.csv,1\n", `no column "y"`},
		{"file,x,y\na.csv,1,two\n", `:2: y "two" of a.csv: expected a whole number from -9999 to 9999`},
		{"file,x,y\na.csv,10000,1\n", "-9999 to 9999"},
		{"file,x,y\na.csv,1,1\nA.csv,2,2\n", ":3: file A.csv is named twice"},
		{"file,x,y\nsub/a.csv,1,1\n", "directory part"},
		{"file,x,x,y\n", `column "x" appears twice`},
		{"file,x,y\n,1,1\n", "file column is empty"},
		{"file,x,y\na.csv,1,1\nb\"c.csv,2,2\n", ":3: bare \" in non-quoted-field"},
	}
	for _, c := range cases {
		dir := t.TempDir()
		writeFiles(t, dir, map[string]string{"dies.csv": c.body, "a.csv": "V,I\n"})
		_, err := Dies(nil, []string{filepath.Join(dir, "a.csv")})
		var me *ManifestError
		if !errors.As(err, &me) || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), "dies.csv") {
			t.Errorf("%q: got %v, want a ManifestError with %q", c.body, err, c.want)
		}
	}
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{"x1y2.csv": "V,I\n"})
	dies, err := Dies(nil, []string{filepath.Join(dir, "x1y2.csv")})
	if err != nil || dies[0] != (Die{X: 1, Y: 2, Source: DieFromName}) {
		t.Errorf("no manifest: %+v %v", dies, err)
	}
}

// A batch whose manifest is bad fits nothing and says why.
func TestBatchStopsOnBadManifest(t *testing.T) {
	dir := t.TempDir()
	writeFiles(t, dir, map[string]string{"dies.csv": "name,x,y\n", "a.csv": "V,I\n"})
	res, err := Batch(t.Context(), []string{filepath.Join(dir, "a.csv")}, BatchOptions{Jobs: 1})
	if res != nil || err == nil || !strings.Contains(err.Error(), `no column "file"`) {
		t.Errorf("got %+v, %v", res, err)
	}
}

func TestParseLimit(t *testing.T) {
	good := []struct {
		s        string
		j        int
		min, max float64
	}{
		{"n:1.0:1.2", 1, 1.0, 1.2},
		{"N:1:1.2", 1, 1, 1.2},
		{"Rs::5ohm", 2, math.Inf(-1), 5},
		{"is:1fA:1pA", 0, 1e-15, 1e-12},
		{"shunt_resistance_ohm:1Mohm:", 3, 1e6, math.Inf(1)},
	}
	for _, c := range good {
		l, err := ParseLimit(c.s)
		if err != nil || l.Param != c.j || math.Abs(l.Min-c.min) > 1e-9*math.Abs(c.min) || math.Abs(l.Max-c.max) > 1e-9*math.Abs(c.max) {
			t.Errorf("%s: got %+v, %v", c.s, l, err)
		}
	}
	bad := []struct{ s, want string }{
		{"n:1.2", "PARAM:MIN:MAX"},
		{"vf:1:2", `parameter "vf"`},
		{"n:1.2:1.0", "MIN <= MAX"},
		{"n::", "both sides are open"},
		{"Rs:abc:5", "MIN"},
	}
	for _, c := range bad {
		if _, err := ParseLimit(c.s); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want %q", c.s, err, c.want)
		}
	}
}

// Yield counted by hand on five invented rows: a failed fit fails every
// limit, a row not run is not tested, an undetermined value fails.
func TestBatchYield(t *testing.T) {
	nan := math.NaN()
	row := func(st string, n, rs float64) BatchRow {
		return BatchRow{Status: st, Values: BatchColumns(1e-12, n, rs, math.Inf(1), nan)}
	}
	rows := []BatchRow{
		row(StatusOK, 1.05, 2),   // passes both
		row(StatusOK, 1.30, 2),   // n too high
		row(StatusOK, 1.10, 9),   // Rs too high
		row(StatusError, 0, 0),   // failed: fails both
		row(StatusNotRun, 0, 0),  // not tested
		row(StatusOK, nan, 1),    // n not determined: fails n
		row(StatusOK, 1.20, 5.0), // on both edges: passes
	}
	lim := []Limit{{Param: 1, Min: 1.0, Max: 1.2}, {Param: 2, Min: math.Inf(-1), Max: 5}}
	y := BatchYield(rows, lim)
	if y.Tested != 6 || y.Passed != 2 {
		t.Errorf("overall %d of %d, want 2 of 6", y.Passed, y.Tested)
	}
	if p := y.PerLimit[0]; p.Passed != 3 || p.Tested != 6 {
		t.Errorf("n: %d of %d, want 3 of 6", p.Passed, p.Tested)
	}
	if p := y.PerLimit[1]; p.Passed != 4 || p.Tested != 6 {
		t.Errorf("Rs: %d of %d, want 4 of 6", p.Passed, p.Tested)
	}
	if got := strings.Join(OutOfLimits(rows[2], lim), " "); got != "series_resistance_ohm" {
		t.Errorf("out of limits %q", got)
	}
	if OutOfLimits(rows[3], lim) != nil {
		t.Error("a failed row has no values to be out of limits")
	}
	// An infinite Rsh passes an open MAX and fails a finite one.
	if !(Limit{Param: 3, Min: 1e6, Max: math.Inf(1)}).Pass(rows[0]) || (Limit{Param: 3, Min: 0, Max: 1e9}).Pass(rows[0]) {
		t.Error("infinite Rsh against limits")
	}
}

// The shades are four equal bins between the smallest and largest value
// within the fences (an identity on evenly spaced values); walking the
// grid picks the same row first.
func TestShadeScaleAndStep(t *testing.T) {
	sc := ShadeScale{Lo: 0, Hi: 4, OK: true}
	for v, want := range map[float64]int{0: 0, 0.99: 0, 1: 1, 2.5: 2, 3.99: 3, 4: 3, 9: 3, -1: 0} {
		if l, ok := sc.Level(v); !ok || l != want {
			t.Errorf("level of %g: %d %v, want %d", v, l, ok, want)
		}
	}
	lg := ShadeScale{Lo: -12, Hi: -10, Log: true, OK: true}
	if l, _ := lg.Level(1e-11); l != 2 || math.Abs(lg.Edge(2)/1e-11-1) > 1e-12 {
		t.Errorf("log level of 1e-11: %d, edge %g", l, lg.Edge(2))
	}
	if _, ok := lg.Level(-1); ok {
		t.Error("a negative value has no place on a log scale")
	}
	at := func(x, y int) BatchRow { return BatchRow{Status: StatusOK, Die: Die{X: x, Y: y, Source: DieFromName}} }
	rows := []BatchRow{at(0, 0), at(1, 0), at(3, 0), at(0, 1), at(2, 2), {Status: StatusOK}}
	steps := []struct{ from, dx, dy, want int }{
		{0, 1, 0, 1}, {1, 1, 0, 2}, {2, 1, 0, 2}, {0, 0, 1, 3}, {3, 0, 1, 4}, {2, -1, 0, 1}, {5, 1, 0, 5},
	}
	for _, s := range steps {
		if got := StepDie(rows, s.from, s.dx, s.dy); got != s.want {
			t.Errorf("step from %d by (%d,%d): %d, want %d", s.from, s.dx, s.dy, got, s.want)
		}
	}
	if FirstDie(rows, "") != 0 || FirstDie(rows, "W9") != -1 {
		t.Error("first die")
	}
}
