package almanac

import (
	"context"
	"fmt"
	"runtime"
	"runtime/debug"
	"sync"
)

// BatchOptions configures BatchFit. The zero value uses GOMAXPROCS
// workers and reports no progress.
type BatchOptions struct {
	// Workers is the number of goroutines fitting series; 0 means
	// runtime.GOMAXPROCS(0). It is capped at the number of series.
	// Negative is invalid.
	Workers int
	// Progress, when not nil, is called after each series is finished
	// (fitted, failed or skipped after cancellation) with the number
	// finished so far and the total. Calls never overlap and done
	// increases by one each call; they come from the worker goroutines,
	// so Progress must not block for long.
	Progress func(done, total int)
}

// BatchResult is the outcome of fitting one series: Fitted on success,
// Err otherwise (never both).
type BatchResult struct {
	Key    string
	Fitted Fitted
	Err    error
}

// BatchFit fits m to every series in ys on a bounded pool of goroutines
// and returns one result per series, in the order of ys. The results do
// not depend on Workers: each series is fitted by the same sequential code
// and stored at its own index, so they are bit-identical for any pool
// size.
//
// A failure is recorded in that series' result and never stops the
// others; a panic inside m.Fit is recovered and recorded as a *PanicError
// (wrapping ErrNotFitted) that keeps the panic value and the stack, so it
// can be reported. When ctx is cancelled no further series are
// started; every series not started by then gets Err = ctx.Err(), and
// BatchFit returns ctx.Err() alongside the results (series already being
// fitted end as their model handles the cancelled ctx).
//
// Special cases: a nil m or negative Workers gives a nil slice and an
// error wrapping ErrInvalid; an empty ys gives an empty slice and no error.
func BatchFit(ctx context.Context, m Model, ys []Series, opt BatchOptions) ([]BatchResult, error) {
	if m == nil {
		return nil, fmt.Errorf("almanac: batch: %w: nil model", ErrInvalid)
	}
	if opt.Workers < 0 {
		return nil, fmt.Errorf("almanac: batch: %w: %d workers", ErrInvalid, opt.Workers)
	}
	out := make([]BatchResult, len(ys))
	if len(ys) == 0 {
		return out, nil
	}
	workers := opt.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(ys))

	var (
		mu   sync.Mutex
		next int // next index to hand out
		done int
	)
	// take returns the next index to fit, or -1 when there is none or ctx
	// is cancelled.
	take := func() int {
		mu.Lock()
		defer mu.Unlock()
		if next >= len(ys) || ctx.Err() != nil {
			return -1
		}
		i := next
		next++
		return i
	}
	finish := func() {
		if opt.Progress == nil {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		done++
		opt.Progress(done, len(ys))
	}
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for i := take(); i >= 0; i = take() {
				f, err := fitOne(ctx, m, ys[i])
				out[i] = BatchResult{Key: ys[i].Key, Fitted: f, Err: err}
				finish()
			}
		})
	}
	wg.Wait()
	// Series never handed out (cancellation).
	if err := ctx.Err(); err != nil && next < len(ys) {
		for i := next; i < len(ys); i++ {
			out[i] = BatchResult{Key: ys[i].Key, Err: err}
			finish()
		}
		return out, err
	}
	return out, nil
}

// fitOne fits one series, turning a panic into an error and a nil Fitted
// without error into one.
func fitOne(ctx context.Context, m Model, y Series) (f Fitted, err error) {
	defer func() {
		if r := recover(); r != nil {
			// debug.Stack here is the panicking goroutine's stack, with
			// the frames that panicked still on it.
			f, err = nil, &PanicError{Key: y.Key, Value: r, Stack: debug.Stack()}
		}
	}()
	f, err = m.Fit(ctx, y)
	if err == nil && f == nil {
		err = fmt.Errorf("almanac: batch: series %q: %w: model returned no fit and no error", y.Key, ErrNotFitted)
	}
	if err != nil {
		f = nil
	}
	return f, err
}

// BatchForecast is the forecast of one series of a batch: Forecast on
// success, Err otherwise.
type BatchForecast struct {
	Key      string
	Forecast Forecast
	Err      error
}

// ForecastAll forecasts h steps with the given levels from every
// successful result of BatchFit, in the same order. A failed fit carries
// its error over; a failed forecast records its own. Forecasting is
// cheap next to fitting, so this runs sequentially.
func ForecastAll(results []BatchResult, h int, levels ...float64) []BatchForecast {
	out := make([]BatchForecast, len(results))
	for i, r := range results {
		out[i].Key = r.Key
		switch {
		case r.Err != nil:
			out[i].Err = r.Err
		case r.Fitted == nil:
			out[i].Err = fmt.Errorf("almanac: batch: series %q: %w", r.Key, ErrNotFitted)
		default:
			out[i].Forecast, out[i].Err = r.Fitted.Forecast(h, levels...)
		}
	}
	return out
}
