package extract

import (
	"context"
	"errors"
	"math"
	"testing"

	"junco/physics"
)

// directSlopes is the reference for slidingSlopes: every window refitted
// from scratch with fitLine (centred sums), O(N k).
func directSlopes(x, y []float64, k int) (starts []int, slopes []float64) {
	for s := 0; s+k <= len(x); s++ {
		if f, ok := fitLine(x[s:s+k], y[s:s+k], nil); ok {
			starts = append(starts, s)
			slopes = append(slopes, f.b)
		}
	}
	return
}

// The one-pass running-sum slopes equal the slopes of every window fitted
// from scratch (an identity: the centred sum of squares equals the raw sum
// minus n times the squared mean; Draper & Smith 1998, ch. 1), to
// rounding, on the curves of the recovery tests, so the start values and
// therefore the fits do not change.
func TestSlidingSlopesMatchDirectFits(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	for _, d := range []SingleDiode{{1e-14, 1.05, 2, 1e7}, {1e-12, 1.5, 10, 1e4}, {1e-11, 1.8, 20, 1e5}} {
		for _, n := range []int{40, 200, 1000} {
			v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.02, 1.0, n, 0.015, uint64(n))
			y := make([]float64, n)
			for j := range i {
				y[j] = math.Log(i[j])
			}
			for _, k := range []int{5, n / 8, n/40*2 + 1} {
				if k < 2 {
					continue
				}
				wantS, wantB := directSlopes(v, y, k)
				var gotS []int
				var gotB []float64
				if err := slidingSlopes(context.Background(), v, y, k, func(s int, b float64) {
					gotS = append(gotS, s)
					gotB = append(gotB, b)
				}); err != nil {
					t.Fatal(err)
				}
				if len(gotS) != len(wantS) {
					t.Fatalf("n=%d k=%d: %d windows, want %d", n, k, len(gotS), len(wantS))
				}
				for j := range gotS {
					if gotS[j] != wantS[j] || math.Abs(gotB[j]-wantB[j]) > 1e-9*math.Abs(wantB[j])+1e-12 {
						t.Fatalf("n=%d k=%d window %d: slope %g, direct %g", n, k, gotS[j], gotB[j], wantB[j])
					}
				}
			}
		}
	}
}

// A window whose x values are all equal has no slope: the direct fit
// refuses it (zero spread) and so does the sliding one.
func TestSlidingSlopesSkipFlatWindows(t *testing.T) {
	x := []float64{0.1, 0.2, 0.3, 0.3, 0.3, 0.3, 0.3, 0.4, 0.5}
	y := []float64{1, 2, 3, 3.1, 2.9, 3.2, 3, 4, 5}
	wantS, _ := directSlopes(x, y, 4)
	var gotS []int
	if err := slidingSlopes(context.Background(), x, y, 4, func(s int, b float64) { gotS = append(gotS, s) }); err != nil {
		t.Fatal(err)
	}
	if len(gotS) != len(wantS) {
		t.Fatalf("windows %v, direct %v", gotS, wantS)
	}
	for j := range gotS {
		if gotS[j] != wantS[j] {
			t.Fatalf("windows %v, direct %v", gotS, wantS)
		}
	}
}

// cancelAfter is a context whose Err reports cancellation from its
// (after+1)-th call on, counting the calls: a deterministic stand-in for
// a Ctrl-C arriving part-way through a fit.
type cancelAfter struct {
	context.Context
	after, calls int
}

func (c *cancelAfter) Err() error {
	c.calls++
	if c.calls > c.after {
		return context.Canceled
	}
	return nil
}

// A cancelled fit returns the cancellation, recognisable with errors.Is,
// at every stage (start-value search, each Levenberg-Marquardt
// evaluation), and stops at the first check that sees it: at most two
// further checks happen on the way out, so no loop runs on after the
// cancellation is seen.
func TestFitIVContextCancel(t *testing.T) {
	vt := physics.ThermalVoltage(300)
	d := SingleDiode{1e-12, 1.5, 10, 1e6}
	v, i := synthIV(func(x float64) float64 { return d.Current(x, vt) }, 0.01, 1.0, 20000, 0.01, 1)
	// How many checks a whole fit makes.
	full := &cancelAfter{Context: context.Background(), after: math.MaxInt}
	if _, err := FitIVContext(full, v, i, IVOptions{TemperatureK: 300, Model: ModelDouble}); err != nil {
		t.Fatal(err)
	}
	if full.calls < 20 {
		t.Fatalf("a fit of 20000 points checks its context only %d times", full.calls)
	}
	for _, after := range []int{0, 1, 3, 8, 20, full.calls / 2, full.calls - 1} {
		c := &cancelAfter{Context: context.Background(), after: after}
		f, err := FitIVContext(c, v, i, IVOptions{TemperatureK: 300, Model: ModelDouble})
		if f != nil || !errors.Is(err, context.Canceled) {
			t.Fatalf("cancelled after %d checks: fit %v, err %v; want context.Canceled", after, f != nil, err)
		}
		if extra := c.calls - (after + 1); extra > 2 {
			t.Errorf("cancelled after %d checks: %d more checks before returning", after, extra)
		}
	}
}
