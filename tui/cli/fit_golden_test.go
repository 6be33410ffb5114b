package cli

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"testing"
)

var updateFitGolden = flag.Bool("update", false, "rewrite the fit golden files in testdata/fit/golden")

// fitGoldenCases are the fit commands whose whole output (exit code,
// standard output, standard error) is kept in testdata/fit/golden. The
// data files in testdata/fit are invented (INVENTED.md).
var fitGoldenCases = []struct {
	name string
	args []string
}{
	{"iv-text", []string{"iv", "testdata/fit/iv.csv", "testdata/fit/iv-no-temperature.csv"}},
	{"iv-json", []string{"iv", "testdata/fit/iv.csv", "testdata/fit/iv-no-temperature.csv", "--json"}},
	{"iv-double-json", []string{"iv", "testdata/fit/iv.csv", "--model", "double", "--json", "--model-card", "D1"}},
	{"iv-temp-option-json", []string{"iv", "testdata/fit/iv.csv", "testdata/fit/iv-no-temperature.csv", "--temp", "310K", "--json"}},
	{"cv-text", []string{"cv", "testdata/fit/cv.tsv", "--area", "1mm2", "--profile"}},
	{"cv-json", []string{"cv", "testdata/fit/cv.tsv", "--area", "1mm2", "--profile", "--model-card", "CJ1", "--json"}},
	{"arrhenius-text", []string{"arrhenius", "testdata/fit/arrhenius/iv-250K.csv", "testdata/fit/arrhenius/iv-300K.csv", "testdata/fit/arrhenius/iv-350K.csv", "--current", "1mA"}},
	{"arrhenius-json", []string{"arrhenius", "testdata/fit/arrhenius/iv-250K.csv", "testdata/fit/arrhenius/iv-300K.csv", "testdata/fit/arrhenius/iv-350K.csv", "--current", "1mA", "--json"}},
	{"batch-text", []string{"batch", "testdata/fit/wafer", "--jobs", "2"}},
	{"batch-json", []string{"batch", "testdata/fit/wafer", "--jobs", "2", "--json"}},
	{"batch-csv", []string{"batch", "testdata/fit/wafer", "--jobs", "2", "--csv", "-"}},
	{"batch-map-text", []string{"batch", "testdata/fit/wafermap", "--jobs", "2", "--map", "Is", "--limit", "n:1.3:1.42", "--limit", "Rs::8.2ohm", "--limit", "Is::1.25pA"}},
	{"batch-map-ascii", []string{"batch", "testdata/fit/wafermap", "--jobs", "2", "--map", "n", "--ascii"}},
	{"batch-map-json", []string{"batch", "testdata/fit/wafermap", "--jobs", "2", "--json", "--limit", "n:1.3:1.42", "--limit", "Rs::8.2ohm"}},
	{"batch-map-csv", []string{"batch", "testdata/fit/wafermap", "--jobs", "2", "--csv", "-", "--limit", "n:1.3:1.42"}},
	{"batch-manifest-text", []string{"batch", "testdata/fit/wafermap-manifest", "--jobs", "2", "--map", "Rs", "--ascii"}},
	{"batch-manifest-csv", []string{"batch", "testdata/fit/wafermap-manifest", "--jobs", "2", "--csv", "-"}},
}

// fitGoldenVolatile matches what differs between runs of the same batch:
// the worker count and the wall time.
var fitGoldenVolatile = regexp.MustCompile(`\d+ workers, [0-9.]+ s`)

func fitGoldenRun(args []string) string {
	var out, errb bytes.Buffer
	code := runFit(context.Background(), args, &out, &errb)
	s := fmt.Sprintf("exit %d\n--- stdout\n%s--- stderr\n%s", code, out.String(), errb.String())
	return fitGoldenVolatile.ReplaceAllString(s, "N workers, T s")
}

// The text, JSON and CSV output of every fit command on fixed files stays
// as recorded; go test -run TestFitGolden -update rewrites the records
// (then read the diff: it must show only intended changes).
func TestFitGolden(t *testing.T) {
	for _, c := range fitGoldenCases {
		t.Run(c.name, func(t *testing.T) {
			got := fitGoldenRun(c.args)
			path := filepath.Join("testdata", "fit", "golden", c.name+".golden")
			if *updateFitGolden {
				if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
					t.Fatal(err)
				}
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with -update to record)", err)
			}
			if got != string(want) {
				t.Errorf("output of junco fit %v differs from %s:\n--- got\n%s\n--- want\n%s", c.args, path, got, want)
			}
		})
	}
}

// The same batch gives the same output with one worker and with eight.
func TestFitBatchSameWhateverTheWorkers(t *testing.T) {
	for _, form := range []string{"--json", "--ascii"} {
		one := fitGoldenRun([]string{"batch", "testdata/fit/wafer", "--jobs", "1", form})
		eight := fitGoldenRun([]string{"batch", "testdata/fit/wafer", "--jobs", "8", form})
		if one != eight {
			t.Errorf("%s: 1 worker and 8 workers differ:\n%s\n---\n%s", form, one, eight)
		}
	}
	// The wafer map, the yield and the die columns too.
	for _, form := range [][]string{{"--json"}, {"--map", "n"}, {"--csv", "-"}} {
		args := append([]string{"batch", "testdata/fit/wafermap", "--limit", "Is::1.25pA"}, form...)
		one := fitGoldenRun(append(args, "--jobs", "1"))
		eight := fitGoldenRun(append(args, "--jobs", "8"))
		if one != eight {
			t.Errorf("%v: 1 worker and 8 workers differ:\n%s\n---\n%s", form, one, eight)
		}
	}
}
