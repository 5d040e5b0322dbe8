package calendar_test

import (
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

var sinkValues []float64
var sinkColumns []calendar.Column

// BenchmarkRegressors builds each regressor over daily grids of one and
// ten years (plus a 28-day horizon) and a weekly grid of ten years, with
// the eight-holiday invented calendar of the examples.
func BenchmarkRegressors(b *testing.B) {
	start := time.Date(2016, time.January, 1, 0, 0, 0, 0, time.UTC)
	grids := []struct {
		name string
		g    calendar.Grid
	}{
		{"daily/1y", calendar.Grid{Start: start, Freq: calendar.Daily, N: 366, H: 28}},
		{"daily/10y", calendar.Grid{Start: start, Freq: calendar.Daily, N: 3653, H: 28}},
		{"weekly/10y", calendar.Grid{Start: time.Date(2016, time.January, 4, 0, 0, 0, 0, time.UTC), Freq: calendar.Weekly, N: 522, H: 13}},
	}
	event := time.Date(2016, time.March, 15, 0, 0, 0, 0, time.UTC)
	for _, gg := range grids {
		g := gg.g
		run := func(name string, f func() error) {
			b.Run(gg.name+"/"+name, func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if err := f(); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
		var err error
		run("Holidays", func() error { sinkValues, err = g.Holidays(valley); return err })
		run("HolidayColumns", func() error { sinkColumns, err = g.HolidayColumns(valley); return err })
		run("WorkingDays", func() error { sinkValues, err = g.WorkingDays(valley); return err })
		run("Weekdays", func() error { sinkColumns, err = g.Weekdays(); return err })
		run("Pulse", func() error { sinkValues, err = g.Pulse(event); return err })
		run("Decay", func() error { sinkValues, err = g.Decay(event, 0.7); return err })
	}
}
