package accuracy_test

import (
	"context"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/smoothing"
)

// BenchmarkCalibrated measures the calibration of the damped-trend ETS
// model on the 144 monthly AirPassengers values (18 steps, 20 origins):
// one fit at the first origin rolled forward, against a re-estimation at
// every origin, beside the model alone; the same rolled forward for the
// airline ARIMA model (0,1,1)×(0,1,1)_12; and a forecast of 18 steps with
// two bands from a pool of 2000 trajectories.
func BenchmarkCalibrated(b *testing.B) {
	y := airPassengers(b)
	ets := smoothing.Spec{Error: smoothing.AdditiveError, Trend: smoothing.DampedTrend, Season: smoothing.NoSeason}
	airline := arima.Spec{D: 1, Q: 1, SD: 1, SQ: 1}
	ctx := context.Background()
	for _, tc := range []struct {
		name string
		m    almanac.Model
	}{
		{"model alone", ets},
		{"roll forward", accuracy.Calibrated{Model: ets, Horizon: 18}},
		{"refit each", accuracy.Calibrated{Model: ets, Horizon: 18, Refit: accuracy.RefitEach}},
		{"arima alone", airline},
		{"arima roll forward", accuracy.Calibrated{Model: airline, Horizon: 18}},
	} {
		b.Run("fit/"+tc.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := tc.m.Fit(ctx, y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
	// 100 copies pool 2000 trajectories.
	ys := make([]almanac.Series, 100)
	for i := range ys {
		ys[i] = y
	}
	res, err := almanac.BatchFit(ctx, accuracy.Calibrated{Model: ets, Horizon: 18}, ys, almanac.BatchOptions{})
	if err != nil {
		b.Fatal(err)
	}
	if res, err = accuracy.PoolCalibration(res, accuracy.PoolOptions{}); err != nil {
		b.Fatal(err)
	}
	b.Run("forecast/pooled", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := res[0].Fitted.Forecast(18, 80, 95); err != nil {
				b.Fatal(err)
			}
		}
	})
}
