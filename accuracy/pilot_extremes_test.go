package accuracy_test

import (
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/proptest"
)

// TestPilotExtremeScales runs the shared property check (issue 11) on
// Pilot's routes: quarterly (combination), weekly and hourly series at
// extreme scales give finite forecasts, bands and paths, or an error
// wrapping a sentinel; never a panic, never NaN or ±Inf with a nil error.
func TestPilotExtremeScales(t *testing.T) {
	for _, c := range []struct {
		freq calendar.Frequency
		n, m int
	}{
		{calendar.Quarterly, 36, 4},
		{calendar.Weekly, 120, 52},
		{calendar.Hourly, 24 * 9, 24},
	} {
		for _, k := range proptest.Cases(c.n, c.m) {
			y := almanac.Series{Key: c.freq.String() + "/" + k.Name, Start: time.Date(2020, 1, 6, 0, 0, 0, 0, time.UTC), Freq: c.freq, Values: k.Values}
			t.Run(y.Key, func(t *testing.T) {
				// Pilot fits every valid series (scaling a pattern by 1e307
				// overflows to +Inf, which Validate rejects).
				if !proptest.CheckModel(t, accuracy.Pilot{Paths: 200}, y, 8) && y.Validate() == nil {
					t.Errorf("no fit: Pilot must fit every valid series")
				}
			})
		}
	}
}
