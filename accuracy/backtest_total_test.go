package accuracy_test

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
)

// TestHorizonTotalBands: how the band of the horizon total is made, each
// source worked by hand.
func TestHorizonTotalBands(t *testing.T) {
	y := lhSeries(t)
	ctx := context.Background()
	bt := accuracy.Backtest{Horizon: 3, Origins: 4, Levels: []float64{80, 95}, NoBenchmarks: true}

	t.Run("forecast paths", func(t *testing.T) {
		// Paths last + offset·step: the totals over 3 steps are
		// 3·last + 6·offset, so the band is 3·last plus six times the
		// type 7 quantiles of the offsets (Hyndman & Fan 1996).
		offsets := []float64{-2, -1, 0, 1, 2}
		c, err := bt.Run(ctx, y, accuracy.Candidate{Name: "p", Model: pathModel{offsets: offsets}})
		if err != nil {
			t.Fatal(err)
		}
		r := c.Runs[0]
		for o, tot := range r.Totals {
			last := y.Values[c.Origins[o].Index-1]
			// 80%: p = 0.1 → position 0.4 of 4 → −2 + 0.4 = −1.6.
			want := []float64{3*last - 6*1.6, 3*last + 6*1.6}
			if tot.Source != accuracy.TotalFromPaths || math.Abs(tot.Lower[0]-want[0]) > 1e-12 || math.Abs(tot.Upper[0]-want[1]) > 1e-12 || tot.Point != 3*last {
				t.Errorf("origin %d: %+v, want %v around %v", o, tot, want, 3*last)
			}
			act := c.Actual[o][0] + c.Actual[o][1] + c.Actual[o][2]
			if tot.Actual != act {
				t.Errorf("origin %d: actual total %v, want %v", o, tot.Actual, act)
			}
		}
	})
	t.Run("sum of step bounds", func(t *testing.T) {
		// A model with normal bands and no Simulate: the sum of the step
		// bounds, last ± 1.2816 at 80% per step (Φ⁻¹(0.9), common value).
		rec := windowRecorder{mu: nil, seen: nil}
		c, err := bt.Run(ctx, y, accuracy.Candidate{Name: "n", Model: unlocked{rec}})
		if err != nil {
			t.Fatal(err)
		}
		for o, tot := range c.Runs[0].Totals {
			last := y.Values[c.Origins[o].Index-1]
			z := 1.2815515655446004
			if tot.Source != accuracy.TotalFromStepBands || math.Abs(tot.Lower[0]-3*(last-z)) > 1e-9 || math.Abs(tot.Upper[0]-3*(last+z)) > 1e-9 {
				t.Errorf("origin %d: %+v", o, tot)
			}
		}
		if s := c.Runs[0].Total; s.N != 4 || len(s.Intervals) != 2 || math.IsNaN(s.Intervals[0].Coverage) {
			t.Errorf("total scores %+v", s)
		}
	})
	t.Run("simulated", func(t *testing.T) {
		c, err := bt.Run(ctx, y, accuracy.Candidate{Name: "naive", Model: almanac.Naive{}})
		if err != nil {
			t.Fatal(err)
		}
		for o, tot := range c.Runs[0].Totals {
			if tot.Source != accuracy.TotalFromSimulation || !(tot.Lower[1] < tot.Lower[0] && tot.Lower[0] < tot.Point && tot.Point < tot.Upper[0] && tot.Upper[0] < tot.Upper[1]) {
				t.Errorf("origin %d: %+v", o, tot)
			}
		}
	})
	t.Run("no levels", func(t *testing.T) {
		b := bt
		b.Levels = nil
		c, err := b.Run(ctx, y, accuracy.Candidate{Name: "naive", Model: almanac.Naive{}})
		if err != nil {
			t.Fatal(err)
		}
		tot := c.Runs[0].Totals[0]
		if tot.Source != accuracy.TotalNoBand || len(tot.Lower) != 0 || math.IsNaN(tot.Point) || c.Runs[0].Total.N != 4 {
			t.Errorf("%+v, scores %+v", tot, c.Runs[0].Total)
		}
	})
}

// unlocked is windowRecorder without its bookkeeping: last value with
// unit normal bands, no Simulate.
type unlocked struct{ windowRecorder }

func (u unlocked) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	return lastValue{y.Values[y.Len()-1]}, nil
}

// TestHorizonTotalCoverage: on a Gaussian random walk the naive method is
// the true model, so its simulated bands of the 6-step total must hold
// about 80% and 95% of the totals (a property of the random walk; the
// data are simulated). 300 non-overlapping origins: the binomial standard
// error of an 80% coverage is 2.3 points, of 95% 1.3 points.
func TestHorizonTotalCoverage(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	v := make([]float64, 1900)
	x := 100.0
	for i := range v {
		x += rng.NormFloat64()
		v[i] = x
	}
	y := almanac.Series{Key: "walk", Start: time.Date(1900, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Yearly, Values: v}
	bt := accuracy.Backtest{Horizon: 6, Origins: 300, Step: 6, Levels: []float64{80, 95}, NoBenchmarks: true, Paths: 2000}
	c, err := bt.Run(context.Background(), y, accuracy.Candidate{Name: "naive", Model: almanac.Naive{}})
	if err != nil {
		t.Fatal(err)
	}
	tot := c.Runs[0].Total
	for k, want := range []float64{0.80, 0.95} {
		got := tot.Intervals[k].Coverage
		se := math.Sqrt(want * (1 - want) / 300)
		if math.Abs(got-want) > 3*se {
			t.Errorf("%v%% band of the total holds %.3f of the totals, want %.2f ± %.3f", tot.Intervals[k].Level, got, want, 3*se)
		}
	}
	// The per-step bands are right too, and the step bounds summed would
	// overstate: the total's band is narrower than the sum of the steps'.
	step, _ := c.Runs[0].Overall.Interval(80)
	if math.Abs(step.Coverage-0.8) > 0.04 {
		t.Errorf("per-step 80%% coverage %.3f", step.Coverage)
	}
	tt := c.Runs[0].Totals[0]
	sum := 0.0
	for s := range 6 {
		iv := c.Runs[0].Forecasts[0].Intervals[0]
		sum += iv.Upper[s] - iv.Lower[s]
	}
	if w := tt.Upper[0] - tt.Lower[0]; !(w < sum) {
		t.Errorf("total's band width %v not below the sum of the steps' %v", w, sum)
	}
}

// TestBacktestProgress: Progress sees every fit once, in order, with the
// total, and the results do not change.
func TestBacktestProgress(t *testing.T) {
	y := airPassengers(t)
	var calls []int
	bt := accuracy.Backtest{Horizon: 6, Origins: 5, Workers: 3, Levels: []float64{80}}
	with := bt
	with.Progress = func(done, total int) {
		if total != 5*2 {
			t.Errorf("total %d, want 10 (5 origins, 2 benchmarks)", total)
		}
		calls = append(calls, done)
	}
	a, err := with.Run(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	b, err := bt.Run(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(calls, []int{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}) {
		t.Errorf("progress %v", calls)
	}
	if a.Runs[0].Overall.MASE != b.Runs[0].Overall.MASE {
		t.Error("progress changed the results")
	}
}
