package smoothing

import (
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
)

// m3File reads one category of the M3 competition data (Makridakis &
// Hibon 2000, IJF 16(4):451–476; see internal/m3data): train and test
// parts per series, in file order.
func m3File(t *testing.T, name string) (train, test [][]float64) {
	t.Helper()
	for _, s := range m3data.Load(t, name) {
		train = append(train, s.Train)
		test = append(test, s.Test)
	}
	return train, test
}

// TestM3Accuracy forecasts every yearly and quarterly M3 series with
// Select and compares the symmetric MAPE (mean of 200|y−f|/(|y|+|f|) over
// all series and horizons) with the published M3 results in
// /work/shared/data/README.md (recomputed from the competition's
// submitted forecasts): it must beat the Naive2 benchmark (yearly 17.88,
// quarterly 9.95), and is reported beside the damped-trend method (17.36,
// 9.36) and Theta (16.87, 8.96). The monthly category (1428 series) is
// left out to keep the test short; run by hand with the same code it gave
// 14.41 against Naive2 16.91 and damped trend 14.59.
func TestM3Accuracy(t *testing.T) {
	if testing.Short() {
		t.Skip("whole M3 categories; skipped with -short")
	}
	for _, tc := range []struct {
		file           string
		freq           calendar.Frequency
		naive2, damped float64
		theta          float64
	}{
		{"m3_yearly.csv", calendar.Yearly, 17.88, 17.36, 16.87},
		{"m3_quarterly.csv", calendar.Quarterly, 9.95, 9.36, 8.96},
	} {
		t.Run(tc.file, func(t *testing.T) {
			train, test := m3File(t, tc.file)
			sum, cnt := 0.0, 0
			for i := range train {
				y := almanac.Series{Start: time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC), Freq: tc.freq, Values: train[i]}
				fit, err := Select{}.Fit(ctx, y)
				if err != nil {
					t.Fatalf("series %d: %v", i, err)
				}
				fc, err := fit.Forecast(len(test[i]))
				if err != nil {
					t.Fatal(err)
				}
				for h, a := range test[i] {
					f := fc.Mean[h]
					sum += 200 * math.Abs(a-f) / (math.Abs(a) + math.Abs(f))
					cnt++
				}
			}
			smape := sum / float64(cnt)
			t.Logf("%s: %d series, sMAPE %.2f (published: Naive2 %.2f, damped trend %.2f, Theta %.2f)", tc.file, len(train), smape, tc.naive2, tc.damped, tc.theta)
			if !(smape < tc.naive2) {
				t.Errorf("sMAPE %.2f not below Naive2's %.2f", smape, tc.naive2)
			}
		})
	}
}
