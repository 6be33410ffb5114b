package extract

import (
	"context"
	"errors"
	"math"
	"sync/atomic"
	"testing"
)

// Quartiles of 1..10 by Hyndman & Fan (1996) definition 7 (the default of
// many statistics packages): Q1 = 3.25, median = 5.5, Q3 = 7.75 (computed
// by hand from h = (n-1)p + 1).
func TestSummarize(t *testing.T) {
	x := []float64{10, 9, 8, 7, 6, 5, 4, 3, 2, 1}
	s := Summarize(x, false)
	if s.Q1 != 3.25 || s.Median != 5.5 || s.Q3 != 7.75 || s.N != 10 || len(s.Outliers) != 0 || s.Min != 1 || s.Max != 10 {
		t.Errorf("%+v", s)
	}
	// Tukey fences for 1..10 plus 30 (n = 11): Q1 = 3.5, Q3 = 8.5, IQR = 5,
	// upper fence 16 (type 7, computed by hand); 30 is out, NaN skipped.
	x = append(x, 30, math.NaN())
	s = Summarize(x, false)
	if len(s.Outliers) != 1 || s.Outliers[0] != 10 || s.N != 11 {
		t.Errorf("outliers %v (N %d)", s.Outliers, s.N)
	}
	// Log scale: decades 1e-12..1e-10 and one value at 1e-6.
	s = Summarize([]float64{1e-12, 1e-11, 2e-11, 1e-10, 1e-6, -1}, true)
	if len(s.Outliers) != 1 || s.Outliers[0] != 4 || math.Abs(s.Median/2e-11-1) > 1e-12 {
		t.Errorf("log summary %+v", s)
	}
	if e := Summarize(nil, false); e.N != 0 || !math.IsNaN(e.Median) {
		t.Errorf("empty: %+v", e)
	}
}

func TestRunBatch(t *testing.T) {
	items := make([]int, 100)
	for k := range items {
		items[k] = k
	}
	var calls atomic.Int64
	lastDone := 0
	res, err := RunBatch(context.Background(), items, BatchOptions{Jobs: 3, Progress: func(d, n int) {
		if d != lastDone+1 || n != 100 {
			t.Errorf("progress %d/%d after %d", d, n, lastDone)
		}
		lastDone = d
	}}, func(_ context.Context, k int) (int, error) {
		calls.Add(1)
		switch k {
		case 13:
			return 0, errors.New("bad item")
		case 17:
			panic("boom")
		}
		return k * k, nil
	})
	if err != nil || calls.Load() != 100 || lastDone != 100 {
		t.Fatalf("err %v calls %d", err, calls.Load())
	}
	for k, r := range res {
		switch {
		case !r.Done:
			t.Errorf("item %d not done", k)
		case k == 13 || k == 17:
			if r.Err == nil {
				t.Errorf("item %d must fail", k)
			}
		case r.Err != nil || r.Value != k*k:
			t.Errorf("item %d: %v %v", k, r.Value, r.Err)
		}
	}
}

func TestRunBatchCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	items := make([]int, 1000)
	res, err := RunBatch(ctx, items, BatchOptions{Jobs: 2}, func(_ context.Context, _ int) (int, error) {
		return 1, nil
	})
	_ = res
	if err != nil {
		t.Fatal(err)
	}
	var done atomic.Int64
	res, err = RunBatch(ctx, items, BatchOptions{Jobs: 2}, func(_ context.Context, _ int) (int, error) {
		if done.Add(1) == 10 {
			cancel()
		}
		return 1, nil
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("err = %v", err)
	}
	ok, notRun := 0, 0
	for _, r := range res {
		switch {
		case r.Done && r.Err == nil && r.Value == 1:
			ok++
		case !r.Done && errors.Is(r.Err, ErrNotRun):
			notRun++
		default:
			t.Errorf("inconsistent result %+v", r)
		}
	}
	if ok < 10 || ok+notRun != 1000 || notRun == 0 {
		t.Errorf("ok %d not run %d", ok, notRun)
	}
}
