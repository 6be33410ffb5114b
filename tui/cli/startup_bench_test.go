package cli

import (
	"context"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"
)

// BenchmarkVersion is the work of `junco --version` after the process has
// started: building the command tree, parsing, printing. The process's
// start-up as a whole is measured against a hello-world binary by
// BenchmarkStartupRatio (issue 16, target at most 2x); this part should
// stay well under a millisecond.
func BenchmarkVersion(b *testing.B) {
	for b.Loop() {
		if code := run(context.Background(), []string{"--version"}, strings.NewReader(""), io.Discard, io.Discard); code != exitOK {
			b.Fatal(code)
		}
	}
}

// BenchmarkStartupRatio times whole processes: `junco --version` (built
// from this tree with a plain `go build`, or JUNCO_BIN) against a
// hello-world Go program built with the same toolchain and settings,
// started alternately (so that a change of load on the machine falls on
// both alike), JUNCO_STARTUP_RUNS times each (default 1000) after 50
// starts of each to warm the caches. It reports the medians (hello_ms,
// junco_ms) and their ratio (target at most 2), and the median of the
// ratios of the two starts of each round (round_ratio). Start-up is
// dominated by the kernel and the dynamic loader, so the ratio moves with
// the load on the machine: run it more than once. Run only when
// JUNCO_STARTUP_BENCH=1:
//
//	JUNCO_STARTUP_BENCH=1 go test -run '^$' -bench StartupRatio -benchtime 1x ./tui/cli/
func BenchmarkStartupRatio(b *testing.B) {
	if os.Getenv("JUNCO_STARTUP_BENCH") != "1" {
		b.Skip("set JUNCO_STARTUP_BENCH=1 to time process start-up")
	}
	runs := 1000
	if s := os.Getenv("JUNCO_STARTUP_RUNS"); s != "" {
		v, err := strconv.Atoi(s)
		if err != nil || v < 10 || v > 100000 {
			b.Fatalf("JUNCO_STARTUP_RUNS=%q: want a whole number 10..100000", s)
		}
		runs = v
	}
	work := b.TempDir()
	bin := os.Getenv("JUNCO_BIN")
	if bin == "" {
		bin = filepath.Join(work, "junco")
		if out, err := exec.Command("go", "build", "-o", bin, "junco").CombinedOutput(); err != nil {
			b.Fatalf("go build: %v\n%s", err, out)
		}
	}
	hello := filepath.Join(work, "hello")
	src := filepath.Join(work, "hellosrc")
	if err := os.Mkdir(src, 0o755); err != nil {
		b.Fatal(err)
	}
	for name, data := range map[string]string{
		"go.mod":  "module hello\n",
		"main.go": "package main\n\nimport \"fmt\"\n\nfunc main() { fmt.Println(\"hello\") }\n",
	} {
		if err := os.WriteFile(filepath.Join(src, name), []byte(data), 0o644); err != nil {
			b.Fatal(err)
		}
	}
	build := exec.Command("go", "build", "-o", hello, ".")
	build.Dir = src
	if out, err := build.CombinedOutput(); err != nil {
		b.Fatalf("go build hello: %v\n%s", err, out)
	}
	null, err := os.OpenFile(os.DevNull, os.O_RDWR, 0)
	if err != nil {
		b.Fatal(err)
	}
	defer null.Close()
	start := func(argv ...string) time.Duration {
		t0 := time.Now()
		p, err := os.StartProcess(argv[0], argv, &os.ProcAttr{Files: []*os.File{null, null, null}})
		if err != nil {
			b.Fatal(err)
		}
		st, err := p.Wait()
		d := time.Since(t0)
		if err != nil || !st.Success() {
			b.Fatalf("%v: %v %v", argv, err, st)
		}
		return d
	}
	var hs, js, rs []float64
	for b.Loop() {
		hs, js, rs = hs[:0], js[:0], rs[:0]
		for range 50 {
			start(hello)
			start(bin, "--version")
		}
		for k := range runs {
			var h, j time.Duration
			if k%2 == 0 {
				h, j = start(hello), start(bin, "--version")
			} else {
				j, h = start(bin, "--version"), start(hello)
			}
			hs, js, rs = append(hs, ms(h)), append(js, ms(j)), append(rs, float64(j)/float64(h))
		}
	}
	hm, jm := median(hs), median(js)
	b.ReportMetric(hm, "hello_ms")
	b.ReportMetric(jm, "junco_ms")
	b.ReportMetric(jm/hm, "ratio")
	b.ReportMetric(median(rs), "round_ratio")
}

func ms(d time.Duration) float64 { return float64(d) / float64(time.Millisecond) }

func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	n := len(s)
	if n%2 == 1 {
		return s[n/2]
	}
	return (s[n/2-1] + s[n/2]) / 2
}
