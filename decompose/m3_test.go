package decompose_test

import (
	"context"
	"math"
	"os"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/m3data"
	"github.com/almanac-go/almanac/internal/seasonal"
)

// TestNaive2M3 rebuilds the M3 competition's Naive2 benchmark from this
// package's parts — Forecaster with a multiplicative Classical
// decomposition and the naive method on the adjusted series, applied when
// the series passes the 90% autocorrelation seasonality test (the
// definition in /work/shared/reference/published.md, "Forecast-competition
// definitions"), the naive method otherwise — and compares its sMAPE over
// all (series, horizon) points of the M3 monthly and quarterly series
// with the published Naive2 figures (/work/shared/data/README.md: 16.91
// monthly, 9.95 quarterly; recomputed from the competition's submitted
// forecasts, second decimal uncertain).
//
// The competition's own Naive2 forecasts came from the organisers'
// software, whose decomposition and seasonality-test details are not
// published, so this is a loose check: we obtain 16.77 monthly and 10.03
// quarterly (measured when this test was written), within ±0.2 of the
// published figures. Applying the adjustment to every series or to none
// gives 17.37 / 18.18 monthly instead, so the check does tell the
// seasonal machinery apart from its absence.
//
// It runs over whole categories (2,184 series), which belongs in an
// evaluation run, not in the test command developers run often: it runs
// only when ALMANAC_M3_FULL is set (go test -run TestNaive2M3 with
// ALMANAC_M3_FULL=1). TestNaive2M3Subset is the quick check run always.
func TestNaive2M3(t *testing.T) {
	if os.Getenv("ALMANAC_M3_FULL") == "" {
		t.Skip("whole M3 categories: set ALMANAC_M3_FULL=1 to run (an evaluation, not a routine test)")
	}
	for _, c := range []struct {
		name      string
		file      string
		freq      calendar.Frequency
		published float64
	}{
		{"monthly", "m3_monthly.csv", calendar.Monthly, 16.91},
		{"quarterly", "m3_quarterly.csv", calendar.Quarterly, 9.95},
	} {
		t.Run(c.name, func(t *testing.T) {
			data := m3data.Load(t, c.file)
			start := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
			sum, count := 0.0, 0
			for _, s := range data {
				y := almanac.Series{Key: s.ID, Start: start, Freq: c.freq, Values: s.Train}
				var m almanac.Model = almanac.Naive{}
				if seasonal.IsSeasonal(s.Train, y.Period(), 1.645) {
					m = decompose.Forecaster{Model: almanac.Naive{}, Method: decompose.Classical{Multiplicative: true}}
				}
				fit, err := m.Fit(context.Background(), y)
				if err != nil {
					t.Fatalf("%s: %v", s.ID, err)
				}
				fc, err := fit.Forecast(len(s.Test))
				if err != nil {
					t.Fatalf("%s: %v", s.ID, err)
				}
				for h, v := range s.Test {
					sum += 200 * math.Abs(v-fc.Mean[h]) / (math.Abs(v) + math.Abs(fc.Mean[h]))
					count++
				}
			}
			got := sum / float64(count)
			t.Logf("Naive2 from decompose on M3 %s: %d series, sMAPE %.4f (published %.2f)", c.name, len(data), got, c.published)
			if math.Abs(got-c.published) > 0.2 {
				t.Errorf("sMAPE %.4f, published %.2f (tolerance ±0.2)", got, c.published)
			}
		})
	}
}

// TestNaive2M3Subset is the quick part of TestNaive2M3: on every 40th
// monthly and quarterly M3 series (Makridakis & Hibon 2000; 36 + 19
// series), the Naive2 benchmark rebuilt from this package's parts (the
// multiplicative Classical decomposition, reproduced from R's decompose in
// the reference test, with the naive method on the adjusted series) gives
// the same forecasts as accuracy.Naive2, which implements the published
// definition directly, and they are finite. Both follow
// /work/shared/reference/published.md, "Forecast-competition
// definitions".
func TestNaive2M3Subset(t *testing.T) {
	for _, c := range []struct {
		file string
		freq calendar.Frequency
	}{{"m3_monthly.csv", calendar.Monthly}, {"m3_quarterly.csv", calendar.Quarterly}} {
		data := m3data.Load(t, c.file)
		start := time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
		seasonalCount := 0
		for i := 0; i < len(data); i += 40 {
			s := data[i]
			y := almanac.Series{Key: s.ID, Start: start, Freq: c.freq, Values: s.Train}
			var m almanac.Model = almanac.Naive{}
			if seasonal.IsSeasonal(s.Train, y.Period(), 1.645) {
				m = decompose.Forecaster{Model: almanac.Naive{}, Method: decompose.Classical{Multiplicative: true}}
				seasonalCount++
			}
			fit, err := m.Fit(context.Background(), y)
			if err != nil {
				t.Fatalf("%s: %v", s.ID, err)
			}
			fc, err := fit.Forecast(len(s.Test))
			if err != nil {
				t.Fatalf("%s: %v", s.ID, err)
			}
			ref, err := accuracy.Naive2{}.Fit(context.Background(), y)
			if err != nil {
				t.Fatalf("%s: accuracy.Naive2: %v", s.ID, err)
			}
			rc, err := ref.Forecast(len(s.Test))
			if err != nil {
				t.Fatal(err)
			}
			for h := range fc.Mean {
				if math.IsNaN(fc.Mean[h]) || math.Abs(fc.Mean[h]-rc.Mean[h]) > 1e-9*math.Abs(rc.Mean[h]) {
					t.Fatalf("%s step %d: %v, accuracy.Naive2 %v", s.ID, h+1, fc.Mean[h], rc.Mean[h])
				}
			}
		}
		if seasonalCount == 0 {
			t.Errorf("%s: no series of the subset passed the seasonality test", c.file)
		}
	}
}
