package accuracy_test

import (
	"context"
	"testing"

	"github.com/almanac-go/almanac"
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
