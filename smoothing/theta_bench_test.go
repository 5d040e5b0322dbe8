package smoothing_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/almanac-go/almanac/smoothing"
)

// BenchmarkThetaFit fits the classic Theta method (seasonal test,
// multiplicative adjustment, α and ℓ_0 estimated) on the first n months
// of AirPassengers; n = 144 is the whole series.
func BenchmarkThetaFit(b *testing.B) {
	ap := airPassengers(&testing.T{})
	for _, n := range []int{48, 96, 144} {
		y := ap.Head(n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := (smoothing.Theta{}).Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkThetaForecast forecasts 24 months with 80% and 95% intervals
// from a Theta fit on AirPassengers.
func BenchmarkThetaForecast(b *testing.B) {
	f, err := (smoothing.Theta{}).Fit(context.Background(), airPassengers(&testing.T{}))
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := f.Forecast(24, 80, 95); err != nil {
			b.Fatal(err)
		}
	}
}
