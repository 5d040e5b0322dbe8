package accuracy_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/smoothing"
)

// BenchmarkRefresh compares taking one new month (Refresh) with saving
// and loading the model, for an ETS and an ARIMA model fitted to 120
// months of invented data.
func BenchmarkRefresh(b *testing.B) {
	y := paintSales(121)
	head := y.Head(120)
	for _, m := range []almanac.Model{
		smoothing.Spec{Trend: smoothing.DampedTrend, Season: smoothing.AdditiveSeason},
		arima.Spec{P: 1, D: 1, SD: 1, SQ: 1},
	} {
		fit, err := m.Fit(context.Background(), head)
		if err != nil {
			b.Fatal(err)
		}
		doc, err := almanac.MarshalModel(fit)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fit.String()+"/refresh", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.Refresh(fit, y.Values[120:]); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fit.String()+"/save", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.MarshalModel(fit); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fit.String()+"/load", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := almanac.UnmarshalModel(doc); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fit.String()+"/fit", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := m.Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSavedCalibrated saves and loads a calibrated fit whose bands
// come from a pool larger than the default Paths (120 invented monthly
// series of 120 values, seasonal naive inner model, 18-step horizon, 19
// origins each: a pool of 2280 trajectories), and reports the size of
// its document: the pooled trajectories stored are the 2000 drawn.
func BenchmarkSavedCalibrated(b *testing.B) {
	ys := make([]almanac.Series, 120)
	for i := range ys {
		ys[i] = paintSales(120 + i%7)
		ys[i].Values = ys[i].Values[i%7:]
		ys[i].Key = fmt.Sprint("store-", i)
	}
	res, err := almanac.BatchFit(context.Background(), accuracy.Calibrated{Model: almanac.SeasonalNaive{}}, ys, almanac.BatchOptions{Workers: 1})
	if err != nil {
		b.Fatal(err)
	}
	if res, err = accuracy.PoolCalibration(res, accuracy.PoolOptions{}); err != nil {
		b.Fatal(err)
	}
	fit := res[0].Fitted
	if st := fit.(*accuracy.CalibratedFit).Status(); st.Source != accuracy.BandsFromPooledErrors || st.Pooled <= accuracy.DefaultCalibrationPaths {
		b.Fatalf("status %+v: want bands from a pool above %d", st, accuracy.DefaultCalibrationPaths)
	}
	doc, err := almanac.MarshalModel(fit)
	if err != nil {
		b.Fatal(err)
	}
	b.Run("save", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := almanac.MarshalModel(fit); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(len(doc)), "doc-bytes")
	})
	b.Run("load", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := almanac.UnmarshalModel(doc); err != nil {
				b.Fatal(err)
			}
		}
	})
}
