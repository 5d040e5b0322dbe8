package calendar_test

import (
	"strconv"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

var sinkTime time.Time
var sinkInt int

func BenchmarkAdd(b *testing.B) {
	start := time.Date(2020, time.January, 31, 0, 0, 0, 0, time.UTC)
	for _, f := range []calendar.Frequency{calendar.Every(15, calendar.Minute), calendar.Daily, calendar.Monthly} {
		b.Run(f.String(), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				sinkTime = f.Add(start, i%1000)
			}
		})
	}
}

func BenchmarkBetween(b *testing.B) {
	start := time.Date(2020, time.January, 31, 0, 0, 0, 0, time.UTC)
	for _, f := range []calendar.Frequency{calendar.Every(15, calendar.Minute), calendar.Daily, calendar.Monthly} {
		end := f.Add(start, 999)
		b.Run(f.String(), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				sinkInt, _ = f.Between(start, end)
			}
		})
	}
}

func BenchmarkFourier(b *testing.B) {
	for _, n := range []int{100, 1000, 10000} {
		b.Run("n="+strconv.Itoa(n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := calendar.Fourier(n, 365.25/7, 5); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
