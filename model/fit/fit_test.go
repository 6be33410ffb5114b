package fit

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/fstest"

	"junco/model"
	"junco/model/fit/fittest"
	"junco/model/measure"
	"junco/physics"
	"junco/physics/extract"
)

// writeIV writes an invented forward sweep of the single-diode model (not a
// measurement) with 1 % multiplicative noise; header holds the comment
// lines and the header row, tcol adds a temperature column in K.
func writeIV(t testing.TB, path, header string, d extract.SingleDiode, tk, tcol float64, seed uint64) {
	t.Helper()
	vt := physics.ThermalVoltage(tk)
	row := "%.4f,%.6e\n"
	if tcol > 0 {
		row = "%.4f,%.6e," + fmt.Sprint(tcol) + "\n"
	}
	fittest.Sweep{Head: header, From: 0.1, To: 0.8, Points: 61, Model: func(v float64) float64 { return d.Current(v, vt) },
		Rel: 0.01, Seed: [2]uint64{seed, 3}, Row: row}.Write(t, path)
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
	one, four := batchOneAndFour(t, dir)
	if one.Fitted != 12 || one.Failed != 1 || fmt.Sprint(one.Rows) != fmt.Sprint(four.Rows) || fmt.Sprint(one.Stats) != fmt.Sprint(four.Stats) {
		t.Errorf("1 and 4 workers differ or wrong counts: %d fitted %d failed", one.Fitted, one.Failed)
	}
	files, err := BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
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

// limitedFiles is the local file system with a row cap, as a served
// user's inbox has (sessions.Inbox.RowLimit).
type limitedFiles struct {
	model.LocalFiles
	rows int
}

func (l limitedFiles) RowLimit() int { return l.rows }

func (l limitedFiles) Open(name string) (fs.File, error) { return os.Open(name) }

// A file access with a row cap (a served inbox) refuses an import above
// it with the cap named; the same file imports through the local file
// system, whose cap is measure.MaxRows.
func TestImportHonoursTheRowCapOfTheFiles(t *testing.T) {
	var b strings.Builder
	b.WriteString("V,I\n")
	for i := range 500 {
		fmt.Fprintf(&b, "%g,%g\n", 0.001*float64(i), 1e-12*float64(i+1))
	}
	p := filepath.Join(t.TempDir(), "rows.csv")
	if err := os.WriteFile(p, []byte(b.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, err := Import(nil, p, measure.KindIV, nil); err != nil {
		t.Fatalf("local import: %v", err)
	}
	_, err := Import(limitedFiles{rows: 100}, p, measure.KindIV, nil)
	if !errors.Is(err, measure.ErrTooManyRows) || !strings.Contains(err.Error(), "at most 100 data rows") {
		t.Errorf("capped import: %v", err)
	}
}

// litTruth is an invented lit diode (of the order of a silicon cell);
// writeLit writes invented data from it: the model's curve plus 0.02 %
// noise, in the load sign or (generator) the delivered current.
var litTruth = extract.LitDiode{PhotocurrentA: 0.5, SaturationCurrentA: 1e-8, IdealityFactor: 1.35, SeriesResistanceOhm: 0.05, ShuntResistanceOhm: 80}

func writeLit(t testing.TB, path string, generator bool, seed uint64) {
	t.Helper()
	vt := physics.ThermalVoltage(300)
	fittest.Sweep{Head: "# invented lit sweep (test data, not a measurement)\n# temperature: 300 K\nV,I (mA)\n",
		From: -0.05, To: 0.65, Points: 71, Model: func(v float64) float64 { return litTruth.Current(v, vt) },
		Abs: 1e-4, Negate: generator, Seed: [2]uint64{seed, 5}, Scale: 1e3, Row: "%.4f,%.8e\n"}.Write(t, path)
}

// A lit file is recognised in either sign, a dark one is not; the lit fit
// of the file recovers the invented truth within the tolerances
// (ln Is 0.10, n 2 %, Rs 10 %, Rsh 30 %, Iph 0.5 %), says which sign it
// assumed, and its record and view carry the five parameters.
func TestLitRoutingAndFit(t *testing.T) {
	dir := t.TempDir()
	dark := filepath.Join(dir, "dark.csv")
	writeIV(t, dark, "V,I (A)\n", testDiode, 300, 0, 1)
	ds, err := Import(nil, dark, "", nil)
	if err != nil {
		t.Fatal(err)
	}
	if IsLit(ds) {
		t.Errorf("dark sweep taken as lit: %+v", RecogniseLit(ds))
	}
	for _, gen := range []bool{false, true} {
		p := filepath.Join(dir, fmt.Sprintf("lit-%v.csv", gen))
		writeLit(t, p, gen, 2)
		ds, err := Import(nil, p, "", nil)
		if err != nil {
			t.Fatal(err)
		}
		rec := RecogniseLit(ds)
		want := extract.SignLoad
		if gen {
			want = extract.SignGenerator
		}
		if !rec.Lit || rec.Sign != want {
			t.Fatalf("generator %v: %+v", gen, rec)
		}
		r, err := LitIV(ds, LitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if r.Temperature.Source != SourceComment || !strings.Contains(r.Notes[0], want.String()) {
			t.Errorf("temperature %+v, notes %q", r.Temperature, r.Notes)
		}
		d := r.Fit.Diode
		if math.Abs(math.Log(d.SaturationCurrentA/litTruth.SaturationCurrentA)) > 0.1 ||
			math.Abs(d.IdealityFactor/litTruth.IdealityFactor-1) > 0.02 ||
			math.Abs(d.SeriesResistanceOhm/litTruth.SeriesResistanceOhm-1) > 0.1 ||
			math.Abs(d.ShuntResistanceOhm/litTruth.ShuntResistanceOhm-1) > 0.3 ||
			math.Abs(d.PhotocurrentA/litTruth.PhotocurrentA-1) > 0.005 {
			t.Errorf("generator %v: fitted %+v, truth %+v", gen, d, litTruth)
		}
		rc := LitRecord(r)
		if rc.Method != MethodIVLit || len(rc.Params) != 5 || rc.Params[0].Name != "Iph" {
			t.Errorf("record %+v", rc)
		}
		v, err := NewLitView(ds, LitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		// The fitted current is drawn in the file's sign; the delivered
		// power peaks at the fit's maximum-power point.
		i0 := v.Curve.Series[0].Y[0]
		if (i0 > 0) != gen {
			t.Errorf("generator %v: fitted current at the lowest bias %g has the wrong sign", gen, i0)
		}
		pk := 0.0
		for _, p := range v.Power.Series[1].Y {
			pk = math.Max(pk, p)
		}
		if !(v.MaxPowerW >= pk) || v.MaxPowerW > pk*1.01 || len(v.Rows) != 5 || len(v.Figures) != 5 {
			t.Errorf("max power %g W, sampled peak %g W, rows %d", v.MaxPowerW, pk, len(v.Rows))
		}
	}
}

// batchOneAndFour fits the batch of dir with one worker and with four.
func batchOneAndFour(t *testing.T, dir string) (one, four *BatchResult) {
	t.Helper()
	files, err := BatchFiles(nil, dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, jobs := range []int{1, 4} {
		r, err := Batch(context.Background(), files, BatchOptions{Jobs: jobs})
		if err != nil {
			t.Fatal(err)
		}
		if jobs == 1 {
			one = r
		} else {
			four = r
		}
	}
	return one, four
}
