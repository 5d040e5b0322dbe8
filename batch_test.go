package almanac_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"
	"testing"

	"github.com/almanac-go/almanac"
)

// batchSeries returns invented series for batch tests; every fifth one is
// bad (empty) so that failures are mixed in.
func batchSeries(n int) []almanac.Series {
	ys := make([]almanac.Series, n)
	for i := range ys {
		y := demoSeries(20 + i%7)
		y.Key = fmt.Sprintf("s%03d", i)
		for j := range y.Values {
			y.Values[j] *= 1 + float64(i)/10
		}
		if i%5 == 4 {
			y.Values = nil
		}
		ys[i] = y
	}
	return ys
}

func TestBatchFitDeterministic(t *testing.T) {
	ys := batchSeries(40)
	m := almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaMaxLikelihood}
	var want []almanac.BatchForecast
	for _, workers := range []int{1, 2, 8, 0} {
		t.Run(fmt.Sprintf("workers=%d", workers), func(t *testing.T) {
			res, err := almanac.BatchFit(ctx, m, ys, almanac.BatchOptions{Workers: workers})
			if err != nil {
				t.Fatal(err)
			}
			if len(res) != len(ys) {
				t.Fatalf("%d results for %d series", len(res), len(ys))
			}
			for i, r := range res {
				if r.Key != ys[i].Key {
					t.Fatalf("result %d has key %q, want %q", i, r.Key, ys[i].Key)
				}
				if i%5 == 4 {
					if !errors.Is(r.Err, almanac.ErrEmpty) || r.Fitted != nil {
						t.Errorf("series %d: err %v, fitted %v; want ErrEmpty and no fit", i, r.Err, r.Fitted)
					}
				} else if r.Err != nil || r.Fitted == nil {
					t.Errorf("series %d: %v", i, r.Err)
				}
			}
			got := almanac.ForecastAll(res, 6, 80, 95)
			if want == nil {
				want = got
				return
			}
			for i := range got {
				if (got[i].Err == nil) != (want[i].Err == nil) {
					t.Fatalf("series %d: error differs", i)
				}
				if !bitsEqual(got[i].Forecast.Mean, want[i].Forecast.Mean) ||
					(got[i].Err == nil && !bitsEqual(got[i].Forecast.Intervals[1].Upper, want[i].Forecast.Intervals[1].Upper)) {
					t.Fatalf("series %d: forecasts differ from the first run", i)
				}
			}
		})
	}
}

func bitsEqual(a, b []float64) bool {
	return slices.EqualFunc(a, b, func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) })
}

type panicModel struct{}

func (panicModel) Fit(context.Context, almanac.Series) (almanac.Fitted, error) { panic("boom") }

// indexPanicModel panics with a runtime error (index out of range).
type indexPanicModel struct{}

func (indexPanicModel) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	i := -1 + y.Len()*0
	_ = y.Values[i]
	return nil, nil
}

type nilModel struct{}

func (nilModel) Fit(context.Context, almanac.Series) (almanac.Fitted, error) { return nil, nil }

// cancelAt cancels the batch's context when it is asked to fit the series
// with key at, then fits as Naive would.
type cancelAt struct {
	at     string
	cancel context.CancelFunc
}

func (c cancelAt) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if y.Key == c.at {
		c.cancel()
	}
	return almanac.Naive{}.Fit(ctx, y)
}

func TestBatchFitFailures(t *testing.T) {
	ys := batchSeries(6)
	t.Run("panic is recorded", func(t *testing.T) {
		res, err := almanac.BatchFit(ctx, panicModel{}, ys, almanac.BatchOptions{Workers: 3})
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range res {
			if !errors.Is(r.Err, almanac.ErrNotFitted) {
				t.Errorf("series %d: err = %v, want ErrNotFitted", i, r.Err)
			}
			// Issue 11: the stack is kept, so the panic can be reported.
			var pe *almanac.PanicError
			if !errors.As(r.Err, &pe) {
				t.Fatalf("series %d: %T is not a *PanicError", i, r.Err)
			}
			if pe.Key != ys[i].Key || pe.Value != "boom" {
				t.Errorf("series %d: key %q value %v", i, pe.Key, pe.Value)
			}
			if !strings.Contains(string(pe.Stack), "panicModel.Fit") {
				t.Errorf("series %d: stack does not show the panicking method:\n%s", i, pe.Stack)
			}
			if want := fmt.Sprintf("almanac: batch: series %q: model could not be fitted: model panicked: boom", ys[i].Key); r.Err.Error() != want {
				t.Errorf("message %q, want %q", r.Err, want)
			}
		}
	})
	t.Run("runtime error is reachable", func(t *testing.T) {
		res, _ := almanac.BatchFit(ctx, indexPanicModel{}, ys[:1], almanac.BatchOptions{})
		var re runtime.Error
		if !errors.As(res[0].Err, &re) || !errors.Is(res[0].Err, almanac.ErrNotFitted) {
			t.Errorf("err = %v, want a runtime.Error and ErrNotFitted", res[0].Err)
		}
	})
	t.Run("nil fit without error", func(t *testing.T) {
		res, _ := almanac.BatchFit(ctx, nilModel{}, ys[:1], almanac.BatchOptions{})
		if !errors.Is(res[0].Err, almanac.ErrNotFitted) {
			t.Errorf("err = %v, want ErrNotFitted", res[0].Err)
		}
	})
	t.Run("cancellation", func(t *testing.T) {
		c, cancel := context.WithCancel(ctx)
		defer cancel()
		res, err := almanac.BatchFit(c, cancelAt{at: "s002", cancel: cancel}, ys, almanac.BatchOptions{Workers: 1})
		if !errors.Is(err, context.Canceled) {
			t.Fatalf("err = %v, want context.Canceled", err)
		}
		for i, r := range res {
			switch {
			case i < 2:
				if r.Err != nil {
					t.Errorf("series %d fitted before cancellation: %v", i, r.Err)
				}
			default:
				// Series 2 sees the cancelled ctx inside Fit; later ones
				// are never started.
				if !errors.Is(r.Err, context.Canceled) {
					t.Errorf("series %d: err = %v, want context.Canceled", i, r.Err)
				}
			}
			if r.Key != ys[i].Key {
				t.Errorf("series %d: key %q", i, r.Key)
			}
		}
	})
	t.Run("bad options", func(t *testing.T) {
		if _, err := almanac.BatchFit(ctx, nil, ys, almanac.BatchOptions{}); !errors.Is(err, almanac.ErrInvalid) {
			t.Errorf("nil model: %v", err)
		}
		if _, err := almanac.BatchFit(ctx, almanac.Naive{}, ys, almanac.BatchOptions{Workers: -1}); !errors.Is(err, almanac.ErrInvalid) {
			t.Errorf("negative workers: %v", err)
		}
		res, err := almanac.BatchFit(ctx, almanac.Naive{}, nil, almanac.BatchOptions{})
		if err != nil || len(res) != 0 {
			t.Errorf("no series: %v, %d results", err, len(res))
		}
	})
}

func TestBatchFitProgress(t *testing.T) {
	ys := batchSeries(25)
	var mu sync.Mutex
	var seen []int
	_, err := almanac.BatchFit(ctx, almanac.Mean{}, ys, almanac.BatchOptions{Workers: 4, Progress: func(done, total int) {
		mu.Lock()
		defer mu.Unlock()
		if total != len(ys) {
			t.Errorf("total = %d", total)
		}
		seen = append(seen, done)
	}})
	if err != nil {
		t.Fatal(err)
	}
	want := make([]int, len(ys))
	for i := range want {
		want[i] = i + 1
	}
	if !slices.Equal(seen, want) {
		t.Errorf("progress calls %v, want 1..%d in order", seen, len(ys))
	}
}

func TestForecastAll(t *testing.T) {
	ys := batchSeries(5)
	res, _ := almanac.BatchFit(ctx, almanac.Naive{}, ys, almanac.BatchOptions{})
	fcs := almanac.ForecastAll(res, 3, 90)
	for i, f := range fcs {
		if f.Key != ys[i].Key {
			t.Errorf("key %q, want %q", f.Key, ys[i].Key)
		}
		if i == 4 {
			if !errors.Is(f.Err, almanac.ErrEmpty) {
				t.Errorf("failed fit: err %v", f.Err)
			}
			continue
		}
		if f.Err != nil || f.Forecast.Horizon() != 3 || len(f.Forecast.Intervals) != 1 {
			t.Errorf("series %d: %v, horizon %d", i, f.Err, f.Forecast.Horizon())
		}
	}
	bad := almanac.ForecastAll(res[:1], 0)
	if !errors.Is(bad[0].Err, almanac.ErrHorizon) {
		t.Errorf("h = 0: %v", bad[0].Err)
	}
	missing := almanac.ForecastAll([]almanac.BatchResult{{Key: "x"}}, 1)
	if !errors.Is(missing[0].Err, almanac.ErrNotFitted) {
		t.Errorf("result without fit: %v", missing[0].Err)
	}
}
