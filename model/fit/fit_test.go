package fit

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"junco/physics"
	"junco/physics/extract"
)

// writeIV writes an invented forward sweep of the single-diode model (not a
// measurement) with 1 % multiplicative noise; header holds the comment
// lines and the header row, tcol adds a temperature column in K.
func writeIV(t testing.TB, path, header string, d extract.SingleDiode, tk, tcol float64, seed uint64) {
	t.Helper()
	rng := rand.New(rand.NewPCG(seed, 3))
	vt := physics.ThermalVoltage(tk)
	var b strings.Builder
	b.WriteString(header)
	for k := 0; k <= 60; k++ {
		v := 0.1 + 0.7*float64(k)/60
		i := d.Current(v, vt) * (1 + 0.01*rng.NormFloat64())
		if tcol > 0 {
			fmt.Fprintf(&b, "%.4f,%.6e,%g\n", v, i, tcol)
		} else {
			fmt.Fprintf(&b, "%.4f,%.6e\n", v, i)
		}
	}
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
}

var testDiode = extract.SingleDiode{SaturationCurrentA: 1e-12, IdealityFactor: 1.3, SeriesResistanceOhm: 4, ShuntResistanceOhm: math.Inf(1)}

// The temperature rule: the file's own (column, else comment), else the
// option, else the fallback, else 300 K assumed; the source is always
// given and a note says when the file's was not used or overrode the
// option. Round trip: the sweep was made at the file's temperature, so n
// comes back near 1.3 only when that temperature is used (n scales as
// 1/T at fixed slope).
func TestTemperatureRule(t *testing.T) {
	dir := t.TempDir()
	comment := filepath.Join(dir, "comment.csv")
	writeIV(t, comment, "# temperature: 250 K\nV,I (A)\n", testDiode, 250, 0, 1)
	column := filepath.Join(dir, "column.csv")
	writeIV(t, column, "V,I (A),T (K)\n", testDiode, 350, 350, 2)
	none := filepath.Join(dir, "none.csv")
	writeIV(t, none, "V,I (A)\n", testDiode, 300, 0, 3)
	cases := []struct {
		path     string
		rule     TemperatureRule
		k        float64
		src      string
		noteHas  string
		nearTrue bool
	}{
		{comment, TemperatureRule{}, 250, SourceComment, "", true},
		{comment, TemperatureRule{OptionK: 310, FallbackK: 296.15}, 250, SourceComment, "not used", true},
		{column, TemperatureRule{FallbackK: 296.15}, 350, SourceColumn, "", true},
		{none, TemperatureRule{OptionK: 300, FallbackK: 296.15}, 300, SourceOption, "", true},
		{none, TemperatureRule{FallbackK: 296.15, FallbackSource: SourceJunction}, 296.15, SourceJunction, "junction's 296.15 K", false},
		{none, TemperatureRule{}, 300, SourceAssumed, "300 K assumed", true},
	}
	for _, c := range cases {
		ds, err := Import(nil, c.path, "", nil)
		if err != nil {
			t.Fatal(err)
		}
		r, err := IV(ds, IVOptions{Temperature: c.rule})
		if err != nil {
			t.Fatal(err)
		}
		notes := strings.Join(r.Notes, " | ")
		if r.Temperature.K != c.k || r.Temperature.Source != c.src {
			t.Errorf("%s %+v: %v, want %g K (%s)", filepath.Base(c.path), c.rule, r.Temperature, c.k, c.src)
		}
		if c.noteHas == "" && strings.Contains(notes, "temperature") {
			t.Errorf("%s %+v: unexpected temperature note %q", filepath.Base(c.path), c.rule, notes)
		}
		if c.noteHas != "" && !strings.Contains(notes, c.noteHas) {
			t.Errorf("%s %+v: notes %q lack %q", filepath.Base(c.path), c.rule, notes, c.noteHas)
		}
		n := r.Fit.Single.IdealityFactor
		if c.nearTrue && math.Abs(n/1.3-1) > 0.02 {
			t.Errorf("%s %+v: n = %.4f, want 1.3 within 2 %% (task criterion)", filepath.Base(c.path), c.rule, n)
		}
		if !c.nearTrue && math.Abs(n/(1.3*300/296.15)-1) > 0.02 {
			t.Errorf("%s at the wrong temperature: n = %.4f, want 1.3*300/296.15 (n kT fixed by the slope)", filepath.Base(c.path), n)
		}
	}
}

// The batch file policy: recursive, .csv/.tsv/.txt/.dat in any case,
// hidden entries and other extensions skipped, sorted; files named
// directly are taken as given.
func TestBatchFilesPolicy(t *testing.T) {
	dir := t.TempDir()
	for _, n := range []string{"b.csv", "a.TSV", "sub/c.txt", "sub/deeper/d.dat", ".hidden.csv", ".git/e.csv", "notes.md", "f.json"} {
		p := filepath.Join(dir, n)
		os.MkdirAll(filepath.Dir(p), 0o755)
		if err := os.WriteFile(p, []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got, err := BatchFiles(nil, dir, filepath.Join(dir, "notes.md"))
	if err != nil {
		t.Fatal(err)
	}
	var rel []string
	for _, p := range got {
		r, _ := filepath.Rel(dir, p)
		rel = append(rel, filepath.ToSlash(r))
	}
	if want := "a.TSV b.csv sub/c.txt sub/deeper/d.dat notes.md"; strings.Join(rel, " ") != want {
		t.Errorf("files %q, want %q", strings.Join(rel, " "), want)
	}
	if _, err := BatchFiles(nil, filepath.Join(dir, "missing")); err == nil || !strings.Contains(err.Error(), "no directory or file") {
		t.Errorf("missing: %v", err)
	}
	// A hidden directory named on purpose is walked.
	if got, err := BatchFiles(nil, filepath.Join(dir, ".git")); err != nil || len(got) != 1 || filepath.Base(got[0]) != "e.csv" {
		t.Errorf("named hidden directory: %v %v", got, err)
	}
	empty := t.TempDir()
	if _, err := BatchFiles(nil, empty); err == nil || !strings.Contains(err.Error(), "no .csv, .tsv, .txt or .dat files") {
		t.Errorf("empty: %v", err)
	}
}

// A batch gives identical rows and statistics with 1 and 4 workers, and a
// cancelled batch keeps the rows finished before the cancel, in order.
func TestBatchWorkersAndCancel(t *testing.T) {
	dir := t.TempDir()
	for k := 0; k < 12; k++ {
		d := testDiode
		d.SaturationCurrentA *= 1 + 0.03*float64(k%5)
		writeIV(t, filepath.Join(dir, fmt.Sprintf("die%02d.csv", k)), "# temperature: 300 K\nV,I (A)\n", d, 300, 0, uint64(k))
	}
	os.WriteFile(filepath.Join(dir, "die99.csv"), []byte("V,T (K)\n1,300\n"), 0o644)
	files, err := BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	one, err := Batch(context.Background(), files, BatchOptions{Jobs: 1})
	if err != nil {
		t.Fatal(err)
	}
	four, err := Batch(context.Background(), files, BatchOptions{Jobs: 4})
	if err != nil {
		t.Fatal(err)
	}
	if one.Fitted != 12 || one.Failed != 1 || fmt.Sprint(one.Rows) != fmt.Sprint(four.Rows) || fmt.Sprint(one.Stats) != fmt.Sprint(four.Stats) {
		t.Errorf("1 and 4 workers differ or wrong counts: %d fitted %d failed", one.Fitted, one.Failed)
	}
	ctx, cancel := context.WithCancel(context.Background())
	res, err := Batch(ctx, files, BatchOptions{Jobs: 1, Progress: func(done, total int) {
		if done == 3 {
			cancel()
		}
	}})
	if err == nil || !res.Interrupted || res.NotRun == 0 || len(res.Rows) != len(files) {
		t.Fatalf("cancel: err %v, %+v", err, res)
	}
	for k := 0; k < 3; k++ {
		if res.Rows[k].Status != StatusOK || fmt.Sprint(res.Rows[k].Values) != fmt.Sprint(one.Rows[k].Values) {
			t.Errorf("finished row %d lost or changed: %+v", k, res.Rows[k])
		}
	}
	if res.Rows[len(files)-1].Status != StatusNotRun || res.Stats[0].N != res.Fitted {
		t.Errorf("not-run rows or statistics: %+v %+v", res.Rows[len(files)-1], res.Stats[0])
	}
}

// The import guard refuses directories and files over MaxFileBytes with a
// *FileError naming the path and the limit.
func TestImportGuard(t *testing.T) {
	dir := t.TempDir()
	big := filepath.Join(dir, "big.csv")
	f, err := os.Create(big)
	if err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(MaxFileBytes + 1); err != nil {
		t.Fatal(err)
	}
	f.Close()
	for _, c := range []struct{ path, want string }{{big, "at most 67108864 (64 MiB)"}, {dir, "is a directory"}, {"", "no file named"}} {
		_, err := Import(nil, c.path, "", nil)
		fe, ok := err.(*FileError)
		if !ok || !strings.Contains(fe.Error(), c.want) {
			t.Errorf("%q: %v, want a *FileError with %q", c.path, err, c.want)
		}
	}
}

// The batch walk reads through model.Files (a served user's inbox there):
// it lists what the Files give, walks their folders, and stops at
// MaxBatchDepth levels with an error naming the limit.
func TestBatchFilesThroughFiles(t *testing.T) {
	fsys := fstest.MapFS{
		"a.csv":       {Data: []byte("x")},
		"sub/b.TXT":   {Data: []byte("x")},
		".h/c.csv":    {Data: []byte("x")},
		"d.md":        {Data: []byte("x")},
		"sub/e/f.dat": {Data: []byte("x")},
	}
	got, err := BatchFiles(fsys, ".")
	if err != nil {
		t.Fatal(err)
	}
	if want := "a.csv sub/b.TXT sub/e/f.dat"; strings.Join(got, " ") != want {
		t.Errorf("files %q, want %q", strings.Join(got, " "), want)
	}
	deep := strings.Repeat("d/", MaxBatchDepth+2) + "x.csv"
	if _, err := BatchFiles(fstest.MapFS{deep: {Data: []byte("x")}}, "."); err == nil || !strings.Contains(err.Error(), fmt.Sprintf("at most %d", MaxBatchDepth)) {
		t.Errorf("deep tree: %v", err)
	}
}
