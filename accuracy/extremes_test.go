package accuracy_test

import (
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/proptest"
)

// TestExtremeScales is the shared property check (issue 11, item 3) over
// Naive2 and every error measure of the package: on values from 1e−300
// to 1e300, at ±1e308, with a single 1e308 spike and with tiny and huge
// values mixed, each gives a finite number or an error wrapping a
// sentinel (ErrUndefined included); never a panic, never NaN or ±Inf with
// a nil error.
func TestExtremeScales(t *testing.T) {
	cases := proptest.Cases(36, 4)
	for _, c := range cases {
		y := almanac.Series{Key: c.Name, Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: c.Values}
		for _, m := range []accuracy.Naive2{{}, {Period: 1}} {
			t.Run(fmt.Sprintf("%s/Naive2 period %d", c.Name, m.Period), func(t *testing.T) {
				proptest.CheckModel(t, m, y, 8, accuracy.ErrUndefined)
			})
		}
		// Measures: the last 12 values as actuals, against forecasts taken
		// from the same case (shifted) and from every other case, so that
		// tiny, huge and opposite-signed values meet.
		ins, act := c.Values[:24], c.Values[24:]
		for _, o := range cases {
			fc := o.Values[12:24]
			lo, hi := make([]float64, len(fc)), make([]float64, len(fc))
			sd := make([]float64, len(fc))
			for i, v := range fc {
				w := o.Values[i]
				lo[i], hi[i], sd[i] = math.Min(v, w), math.Max(v, w), math.Abs(w)
			}
			t.Run(c.Name+"/measures against "+o.Name, func(t *testing.T) {
				check := func(name string, v float64, err error) {
					t.Helper()
					if err != nil {
						proptest.CheckErr(t, name, err, accuracy.ErrUndefined)
						if !math.IsNaN(v) {
							t.Errorf("%s: %v alongside error %v", name, v, err)
						}
						return
					}
					proptest.Finite(t, name, []float64{v})
				}
				proptest.Safely(t, "measures", func() {
					for name, fn := range map[string]accuracy.PointMeasure{
						"ME": accuracy.ME, "MAE": accuracy.MAE, "MSE": accuracy.MSE, "RMSE": accuracy.RMSE,
						"MAPE": accuracy.MAPE, "sMAPE": accuracy.SMAPE, "MdAE": accuracy.MdAE, "tracking signal": accuracy.TrackingSignal,
					} {
						v, err := fn(act, fc)
						check(name, v, err)
						v, err = accuracy.Relative(fn, act, fc, ins[:12])
						check("relative "+name, v, err)
					}
					for _, m := range []int{1, 4} {
						v, err := accuracy.MASE(act, fc, ins, m)
						check("MASE", v, err)
						v, err = accuracy.RMSSE(act, fc, ins, m)
						check("RMSSE", v, err)
						v, err = accuracy.MSIS(act, lo, hi, 95, ins, m)
						check("MSIS", v, err)
						a, s, err := accuracy.NaiveScale(ins, m)
						if err != nil {
							proptest.CheckErr(t, "naive scale", err)
						} else {
							proptest.Finite(t, "naive scale", []float64{a, s})
						}
					}
					v, err := accuracy.Coverage(act, lo, hi)
					check("coverage", v, err)
					v, err = accuracy.IntervalScore(act, lo, hi, 80)
					check("interval score", v, err)
					v, err = accuracy.Pinball(act, fc, 0.9)
					check("pinball", v, err)
					v, err = accuracy.CRPSNormal(act, fc, sd)
					check("CRPS normal", v, err)
					v, err = accuracy.CRPSSample(act, [][]float64{fc, lo, hi})
					check("CRPS sample", v, err)
				})
			})
		}
	}
}

// TestScoresNearTheLimit: the backtest scores of a model whose forecasts
// and actual values are near the float64 limit are representable numbers
// (or NaN where undefined), never ±Inf.
func TestScoresNearTheLimit(t *testing.T) {
	for _, c := range proptest.Cases(40, 4) {
		t.Run(c.Name, func(t *testing.T) {
			y := almanac.Series{Key: c.Name, Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: c.Values}
			cmp, err := accuracy.Backtest{Horizon: 4, Origins: 3, Levels: []float64{80}}.Run(t.Context(), y,
				accuracy.Candidate{Name: "mean", Model: almanac.Mean{}})
			if err != nil {
				proptest.CheckErr(t, "backtest", err, accuracy.ErrBacktest)
				return
			}
			for _, r := range cmp.Runs {
				for _, s := range append(r.ByStep, r.Overall) {
					for _, v := range []float64{s.ME, s.MAE, s.MSE, s.RMSE, s.MAPE, s.SMAPE, s.MdAE, s.MASE, s.RMSSE, s.TrackingSignal, s.CRPS} {
						if math.IsInf(v, 0) {
							t.Fatalf("%s: a score is %v: %+v", r.Name, v, s)
						}
					}
					for _, iv := range s.Intervals {
						if math.IsInf(iv.Score, 0) || math.IsInf(iv.MSIS, 0) {
							t.Fatalf("%s: interval scores %+v", r.Name, iv)
						}
					}
				}
			}
		})
	}
}
