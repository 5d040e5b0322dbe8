package accuracy_test

import (
	"context"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/persisttest"
	"github.com/almanac-go/almanac/internal/proptest"
	"github.com/almanac-go/almanac/smoothing"
)

// TestSavedExtremeScales saves and loads models fitted to the shared
// extreme-scale cases (1e-300 to 1e300, ±1e308, a single spike): what
// fits must load bit-identically, whatever the scale.
func TestSavedExtremeScales(t *testing.T) {
	models := []almanac.Model{
		smoothing.Spec{Trend: smoothing.DampedTrend, Season: smoothing.AdditiveSeason},
		smoothing.Theta{},
		arima.Spec{P: 1, D: 1},
		almanac.BoxCox{Model: almanac.Drift{}},
		decompose.Forecaster{Model: almanac.Naive{}},
		accuracy.Naive2{},
	}
	for _, c := range proptest.Cases(36, 4) {
		y := almanac.Series{Key: c.Name, Start: time.Date(2010, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: c.Values}
		for _, m := range models {
			f, err := m.Fit(context.Background(), y)
			if err != nil {
				continue // the fit's own errors are checked by its package
			}
			t.Run(c.Name+"/"+f.String(), func(t *testing.T) {
				persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 6})
			})
		}
	}
}
