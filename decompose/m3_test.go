package decompose_test

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
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
func TestNaive2M3(t *testing.T) {
	if testing.Short() {
		t.Skip("whole M3 categories")
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
