package accuracy_test

import (
	"context"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
)

// BenchmarkPilot: one Pilot fit and an 80/95% forecast per route: the
// 144-point monthly AirPassengers series (combination route, 18 steps),
// four years of an invented weekly series (weekly route, 13 steps) and
// five weeks of invented hourly data (multi-seasonal route, 48 steps).
func BenchmarkPilot(b *testing.B) {
	weekly, _ := inventedWeekly(4*52, 0, 1)
	cases := []struct {
		name string
		y    almanac.Series
		h    int
	}{
		{"monthly", airPassengers(b), 18},
		{"weekly", weekly, 13},
		{"hourly", inventedCycles(calendar.Hourly, 24*35, 3), 48},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				f, err := accuracy.Pilot{}.Fit(context.Background(), c.y)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := f.Forecast(c.h, 80, 95); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
