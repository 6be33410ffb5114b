package extract

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"
)

// BatchOptions configures RunBatch.
type BatchOptions struct {
	// Jobs is the number of parallel workers (default runtime.NumCPU();
	// capped at the number of items).
	Jobs int
	// Progress, when set, is called after each finished item with the
	// number done so far and the total, always from one goroutine at a time.
	Progress func(done, total int)
}

// BatchResult is the outcome of one batch item, at the item's index.
type BatchResult[T any] struct {
	Value T // fn's result (zero value when Err is set)
	// Err is the item's error (a panic inside the item is recovered and
	// reported here), or an error wrapping ErrNotRun when the batch was
	// cancelled before the item started.
	Err  error
	Done bool // the item ran to the end (successfully or with Err)
}

// RunBatch applies fn to every item on a pool of workers and returns one
// result per item, in item order. A failing item is recorded with its error
// and never stops the batch. When ctx is cancelled no new item starts; the
// results finished so far are kept, the rest carry ErrNotRun, and the
// returned error is ctx.Err() (nil otherwise). fn receives ctx and should
// return early when it is cancelled.
func RunBatch[In, Out any](ctx context.Context, items []In, opt BatchOptions, fn func(context.Context, In) (Out, error)) ([]BatchResult[Out], error) {
	n := len(items)
	res := make([]BatchResult[Out], n)
	jobs := opt.Jobs
	if jobs <= 0 {
		jobs = runtime.NumCPU()
	}
	jobs = min(jobs, n)
	if n == 0 {
		return res, ctx.Err()
	}
	// Each worker takes the next item by an atomic counter (no feeding
	// goroutine, no channel hand-off for each item).
	var next atomic.Int64
	done := make(chan int, jobs)
	var wg sync.WaitGroup
	for w := 0; w < jobs; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for ctx.Err() == nil { // once cancelled, the items left stay not run
				k := int(next.Add(1) - 1)
				if k >= n {
					return
				}
				res[k] = runOne(ctx, items[k], fn)
				done <- k
			}
		}()
	}
	go func() { wg.Wait(); close(done) }()
	count := 0
	for range done {
		count++
		if opt.Progress != nil {
			opt.Progress(count, n)
		}
	}
	err := ctx.Err()
	for k := range res {
		if !res[k].Done {
			res[k].Err = fmt.Errorf("%w: %w", ErrNotRun, err)
		}
	}
	return res, err
}

func runOne[In, Out any](ctx context.Context, in In, fn func(context.Context, In) (Out, error)) (r BatchResult[Out]) {
	defer func() {
		if p := recover(); p != nil {
			r = BatchResult[Out]{Err: fmt.Errorf("item failed: %v", p), Done: true}
		}
	}()
	v, err := fn(ctx, in)
	return BatchResult[Out]{Value: v, Err: err, Done: true}
}

// Summary describes the distribution of one parameter over a batch.
type Summary struct {
	N                 int     // number of finite values used
	Median, Q1, Q3    float64 // quartiles (Hyndman-Fan type 7)
	IQR               float64 // Q3 - Q1 (on the log10 scale when Log)
	LowFence, HiFence float64 // Q1 - 1.5 IQR, Q3 + 1.5 IQR
	Min, Max          float64 // smallest and largest value used
	// Outliers are the indices (into the input slice) of values outside
	// the fences.
	Outliers []int
	// Log reports that quartiles and fences were computed on log10 of the
	// values (then converted back), as for quantities spanning decades.
	Log bool
}

// Summarize returns the median, quartiles and Tukey outliers of the finite
// values (NaN and Inf are skipped; with log, non-positive values too).
//
// Quartiles: linear interpolation between order statistics, Hyndman & Fan,
// Amer. Statist. 50, 361 (1996), definition 7: for sorted x_1..x_n and
// probability p, h = (n - 1) p + 1, Q = x_floor(h) + (h - floor(h))
// (x_floor(h)+1 - x_floor(h)). Outliers lie below Q1 - 1.5 IQR or above
// Q3 + 1.5 IQR (Tukey, Exploratory Data Analysis, 1977). With log the
// computation runs on log10(x), suited to saturation currents or
// resistances spread over decades; the returned numbers are in linear
// units, IQR stays in decades.
func Summarize(values []float64, log bool) Summary {
	type iv struct {
		i int
		x float64
	}
	var xs []iv
	for k, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) || (log && !(v > 0)) {
			continue
		}
		if log {
			v = math.Log10(v)
		}
		xs = append(xs, iv{k, v})
	}
	s := Summary{N: len(xs), Log: log}
	if len(xs) == 0 {
		nan := math.NaN()
		s.Median, s.Q1, s.Q3, s.IQR, s.LowFence, s.HiFence, s.Min, s.Max = nan, nan, nan, nan, nan, nan, nan, nan
		return s
	}
	sort.Slice(xs, func(a, b int) bool { return xs[a].x < xs[b].x })
	sorted := make([]float64, len(xs))
	for k := range xs {
		sorted[k] = xs[k].x
	}
	q1, med, q3 := Quantile(sorted, 0.25), Quantile(sorted, 0.5), Quantile(sorted, 0.75)
	iqr := q3 - q1
	lo, hi := q1-1.5*iqr, q3+1.5*iqr
	for _, e := range xs {
		if e.x < lo || e.x > hi {
			s.Outliers = append(s.Outliers, e.i)
		}
	}
	sort.Ints(s.Outliers)
	back := func(x float64) float64 {
		if log {
			return math.Pow(10, x)
		}
		return x
	}
	s.Median, s.Q1, s.Q3, s.IQR = back(med), back(q1), back(q3), iqr
	s.LowFence, s.HiFence = back(lo), back(hi)
	s.Min, s.Max = back(sorted[0]), back(sorted[len(sorted)-1])
	return s
}

// Quantile returns the p-quantile (0 <= p <= 1) of sorted ascending data by
// Hyndman & Fan (1996) definition 7 (linear interpolation between order
// statistics). Returns NaN for empty input or p outside [0, 1].
func Quantile(sorted []float64, p float64) float64 {
	n := len(sorted)
	if n == 0 || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	h := float64(n-1) * p
	lo := int(math.Floor(h))
	if lo >= n-1 {
		return sorted[n-1]
	}
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}
