package decompose_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
)

// BenchmarkSTL: the monthly CO2 series of the stl_co2_swin7 fixture (468
// points, period 12, s.window 7, R's default jumps) and the weekly Mauna
// Loa CO2 record (2,284 points, period 52, s.window 7, gaps repaired
// before the timer starts), each non-robust and robust. R 4.2.2 took
// 0.27–0.44 ms (non-robust) and 1.3–1.5 ms (robust) of user CPU time for
// the 468-point series on the same machine (see doc.go).
func BenchmarkSTL(b *testing.B) {
	week, _, err := decompose.Repair{}.Fill(co2Weekly(b))
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		y    almanac.Series
	}{
		{"monthly-468", fixtureInput(b, "stl_co2_swin7")},
		{"weekly-2284", week},
	} {
		for _, robust := range []bool{false, true} {
			b.Run(fmt.Sprintf("%s/robust=%v", c.name, robust), func(b *testing.B) {
				spec := decompose.STL{SeasonalWindow: 7, Robust: robust}
				b.ReportAllocs()
				for b.Loop() {
					if _, err := spec.Decompose(c.y); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkMSTL: weekly CO2 with periods 13 and 52.
func BenchmarkMSTL(b *testing.B) {
	week, _, err := decompose.Repair{}.Fill(co2Weekly(b))
	if err != nil {
		b.Fatal(err)
	}
	spec := decompose.MSTL{Periods: []float64{13, 365.25 / 7}}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := spec.Decompose(week); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkRepair: filling the 59 gaps of the weekly CO2 record.
func BenchmarkRepair(b *testing.B) {
	week := co2Weekly(b)
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := (decompose.Repair{}).Fill(week); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkForecaster: STL + drift on the monthly CO2 series, fit and a
// 24-step forecast with two interval levels.
func BenchmarkForecaster(b *testing.B) {
	y := fixtureInput(b, "stl_co2_swin7")
	m := decompose.Forecaster{Model: almanac.Drift{}}
	b.ReportAllocs()
	for b.Loop() {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := fit.Forecast(24, 80, 95); err != nil {
			b.Fatal(err)
		}
	}
}
