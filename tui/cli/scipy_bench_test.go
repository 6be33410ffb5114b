package cli

import (
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"junco/physics"
	"junco/physics/extract"
)

// BenchmarkScipyPool compares the wall time of `junco fit batch` (the built
// binary, whole process, 2 workers) with a scipy fitter in a pool of 2
// processes (testdata/bench/scipy_pool.py: vectorised model, analytic
// Jacobian, Levenberg-Marquardt by scipy.optimize.least_squares with
// method='lm') on the same generated I-V files, checks that both find the
// same Is, n, Rs and Rsh (to 1e-3 relative; junco's CSV carries 6 digits)
// and reports the ratio junco/scipy of the whole-process times (ratio) and
// of junco's whole process to scipy's fitting alone, pool start to last
// result (ratio_fitonly). Target: ratio at most 0.2.
//
// It runs only when JUNCO_SCIPY_BENCH=1 and a Python with scipy is found
// (JUNCO_PYTHON, default python3); JUNCO_SCIPY_FILES sets the number of
// files (default 2000), JUNCO_BIN a junco binary to time instead of one
// built from this tree. The files are invented data: the single-diode model
// with Is, n, Rs and Rsh varied from file to file, 100 points from 0.05 to
// 0.9 V, 1 % Gaussian current noise, written in five dialects in turn
// (scipyBenchDialects: separators, decimal comma, units in the header or a
// row of units, current in A, mA or uA, CRLF, quoted fields, extra
// columns), which the scipy script reads too. Run:
//
//	JUNCO_SCIPY_BENCH=1 go test -run '^$' -bench ScipyPool -benchtime 3x ./tui/cli/
func BenchmarkScipyPool(b *testing.B) {
	if os.Getenv("JUNCO_SCIPY_BENCH") != "1" {
		b.Skip("set JUNCO_SCIPY_BENCH=1 to compare with scipy")
	}
	py := os.Getenv("JUNCO_PYTHON")
	if py == "" {
		py = "python3"
	}
	if out, err := exec.Command(py, "-c", "import scipy.optimize, scipy.special, numpy").CombinedOutput(); err != nil {
		b.Skipf("no scipy in %s: %v %s", py, err, out)
	}
	n := 2000
	if s := os.Getenv("JUNCO_SCIPY_FILES"); s != "" {
		v, err := strconv.Atoi(s)
		if err != nil || v < 1 || v > 1000000 {
			b.Fatalf("JUNCO_SCIPY_FILES=%q: want a whole number 1..1000000", s)
		}
		n = v
	}
	work := b.TempDir()
	bin := os.Getenv("JUNCO_BIN") // a junco binary built elsewhere (an older commit, say)
	if bin == "" {
		bin = filepath.Join(work, "junco")
		if out, err := exec.Command("go", "build", "-o", bin, "junco").CombinedOutput(); err != nil {
			b.Fatalf("go build: %v\n%s", err, out)
		}
	}
	dir := filepath.Join(work, "files")
	if err := os.Mkdir(dir, 0o755); err != nil {
		b.Fatal(err)
	}
	for k := 0; k < n; k++ {
		writeScipyBenchFile(b, dir, k)
	}
	script, err := filepath.Abs(filepath.Join("testdata", "bench", "scipy_pool.py"))
	if err != nil {
		b.Fatal(err)
	}
	jout, pout := filepath.Join(work, "junco.csv"), filepath.Join(work, "scipy.csv")
	var jt, pt, pfit time.Duration
	checked := false
	for b.Loop() {
		t0 := time.Now()
		if out, err := exec.Command(bin, "fit", "batch", dir, "--jobs", "2", "--csv", jout).CombinedOutput(); err != nil {
			b.Fatalf("junco fit batch: %v\n%s", err, out)
		}
		jt += time.Since(t0)
		t0 = time.Now()
		out, err := exec.Command(py, script, dir, pout).CombinedOutput()
		if err != nil {
			b.Fatalf("scipy pool: %v\n%s", err, out)
		}
		pt += time.Since(t0)
		sec, err := strconv.ParseFloat(strings.TrimSpace(string(out)), 64)
		if err != nil {
			b.Fatalf("scipy pool output %q", out)
		}
		pfit += time.Duration(sec * float64(time.Second))
		if !checked {
			compareScipyAnswers(b, jout, pout, n)
			checked = true
		}
	}
	runs := float64(b.N)
	b.ReportMetric(jt.Seconds()/runs, "junco-s")
	b.ReportMetric(pt.Seconds()/runs, "scipy-s")
	b.ReportMetric(pfit.Seconds()/runs, "scipyfit-s")
	b.ReportMetric(jt.Seconds()/pt.Seconds(), "ratio")
	b.ReportMetric(jt.Seconds()/pfit.Seconds(), "ratio_fitonly")
}

// scipyBenchDialect is one way bench software writes an I-V file: the
// file's extension, the field separator, the header (a second line is a
// row of units), the temperature comment, the current unit's factor, a
// decimal comma, CRLF line ends.
type scipyBenchDialect struct {
	ext, sep, header, temp string
	perA                   float64 // current unit per ampere
	dcomma, crlf           bool
}

// scipyBenchDialects are the dialects of the comparison's files, file k
// taking dialect k mod 5: comma-separated with units in parentheses;
// semicolons, a decimal comma and mA in the column name; tabs with units
// in brackets and uA; blank-separated with a row of units and CRLF line
// ends; quoted comma-separated fields with extra columns (time and a
// compliance flag) before and after.
func scipyBenchDialects() []scipyBenchDialect {
	return []scipyBenchDialect{
		{".csv", ",", "Voltage (V),Current (A)", "# temperature: 300 K", 1, false, false},
		{".csv", ";", "bias_V;current_mA", "# T = 300K", 1e3, true, false},
		{".tsv", "\t", "V [V]\tI [uA]", "# temp=300", 1e6, false, false},
		{".dat", " ", "V I\nV A", "# Temperature 300 K", 1, false, true},
		{".csv", ",", "\"time (s)\",\"V (V)\",\"I (A)\",\"compliance\"", "# Tchuck: 300 K (set point)", 1, false, false},
	}
}

// writeScipyBenchFile writes invented file k of the comparison in dialect
// k mod 5.
func writeScipyBenchFile(b *testing.B, dir string, k int) {
	rng := rand.New(rand.NewPCG(uint64(k), 16))
	d := extract.SingleDiode{
		SaturationCurrentA:  1e-12 * math.Pow(10, rng.Float64()-0.5),
		IdealityFactor:      1.1 + 0.4*rng.Float64(),
		SeriesResistanceOhm: 5 + 10*rng.Float64(),
		ShuntResistanceOhm:  1e5 * math.Pow(10, rng.Float64()),
	}
	ds := scipyBenchDialects()
	dl := ds[k%len(ds)]
	const tempK = 300
	vt := physics.ThermalVoltage(tempK)
	var s strings.Builder
	s.WriteString("# invented data for the speed comparison (single-diode model plus 1 % noise)\n" + dl.temp + "\n" + dl.header + "\n")
	num := func(format string, x float64) string {
		t := fmt.Sprintf(format, x)
		if dl.dcomma {
			t = strings.Replace(t, ".", ",", 1)
		}
		return t
	}
	const pts = 100
	for j := 0; j < pts; j++ {
		v := 0.05 + 0.85*float64(j)/(pts-1)
		i := d.Current(v, vt) * (1 + 0.01*rng.NormFloat64()) * dl.perA
		if strings.HasPrefix(dl.header, "\"time") {
			fmt.Fprintf(&s, "\"%.3f\",\"%s\",\"%s\",\"0\"\n", 0.02*float64(j), num("%.6g", v), num("%.8g", i))
			continue
		}
		s.WriteString(num("%.6g", v) + dl.sep + num("%.8g", i) + "\n")
	}
	text := s.String()
	if dl.crlf {
		text = strings.ReplaceAll(text, "\n", "\r\n")
	}
	if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("die%06d%s", k, dl.ext)), []byte(text), 0o644); err != nil {
		b.Fatal(err)
	}
}

// compareScipyAnswers fails the benchmark unless junco and scipy agree on
// every file's four parameters to 1e-3 relative.
func compareScipyAnswers(b *testing.B, jout, pout string, n int) {
	read := func(p string) [][]string {
		f, err := os.Open(p)
		if err != nil {
			b.Fatal(err)
		}
		defer f.Close()
		recs, err := csv.NewReader(f).ReadAll()
		if err != nil {
			b.Fatal(err)
		}
		return recs
	}
	j, p := read(jout), read(pout)
	col := map[string]int{}
	for k, h := range j[0] {
		col[h] = k
	}
	want := map[string][]string{}
	for _, r := range p[1:] {
		want[r[0]] = r[1:]
	}
	if len(j)-1 != n || len(want) != n {
		b.Fatalf("junco %d rows, scipy %d rows, want %d", len(j)-1, len(want), n)
	}
	keys := []string{"saturation_current_A", "ideality_factor", "series_resistance_ohm", "shunt_resistance_ohm"}
	worst, bad := 0.0, 0
	for _, r := range j[1:] {
		name := filepath.Base(r[col["file"]])
		w, ok := want[name]
		if !ok || r[col["status"]] != "ok" {
			b.Fatalf("%s: junco status %q, in scipy's output %v", name, r[col["status"]], ok)
		}
		for k, key := range keys {
			got, err1 := strconv.ParseFloat(r[col[key]], 64)
			ref, err2 := strconv.ParseFloat(w[k], 64)
			e := math.Abs(got/ref - 1)
			if err1 != nil || err2 != nil || !(e <= 1e-3) {
				bad++
				if bad <= 5 {
					b.Errorf("%s %s: junco %s, scipy %s", name, key, r[col[key]], w[k])
				}
				continue
			}
			worst = math.Max(worst, e)
		}
	}
	if bad > 0 {
		b.Fatalf("%d parameters disagree", bad)
	}
	b.Logf("%d files: junco and scipy agree on Is, n, Rs, Rsh to %.2g relative at worst", n, worst)
}
