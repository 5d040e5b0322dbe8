package smoothing

import (
	"context"
	"errors"
	"fmt"
	"testing"

	"github.com/almanac-go/almanac"
)

// horizonModels are the models of issue 11.2 (quadratic forecast time)
// and one of each interval method.
func horizonModels() []almanac.Model {
	return []almanac.Model{
		HoltWinters{Estimate: true},
		HoltWinters{Estimate: true, Multiplicative: true},
		Spec{Error: MultiplicativeError},
		Spec{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason},
		Spec{Error: MultiplicativeError, Trend: DampedTrend, Season: AdditiveSeason},
		Spec{Error: MultiplicativeError, Trend: MultiplicativeTrend, Season: MultiplicativeSeason},
	}
}

// TestForecastMaxHorizon: a forecast at almanac.MaxHorizon (2^20 steps)
// with an interval returns, finite or with an error wrapping a sentinel.
// Every model here costs O(h) (O(h·m) for the seasonal variances): at
// MaxHorizon that is a few million operations, while the former
// quadratic variance sums needed about 10^12 and did not return within
// 30 s, so a return to quadratic work makes this test run into the test
// binary's timeout instead of passing. The simulated model (ETS(M,M,M))
// must refuse clearly: 5000 paths of 2^20 steps would need 40 GB.
// (Timings against h are in BenchmarkForecastHorizon.)
func TestForecastMaxHorizon(t *testing.T) {
	y := airPassengers(t)
	y = y.Head(60)
	for _, m := range horizonModels() {
		t.Run(fmt.Sprint(m), func(t *testing.T) {
			fit, err := m.Fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			fc, err := fit.Forecast(almanac.MaxHorizon, 80)
			if sp, ok := m.(Spec); ok && sp.Trend.multiplicative() {
				if !errors.Is(err, almanac.ErrHorizon) {
					t.Errorf("simulated intervals at MaxHorizon: error %v, want one wrapping almanac.ErrHorizon", err)
				}
				// Point forecasts alone are still given.
				if _, err := fit.Forecast(almanac.MaxHorizon); err != nil && !wrapsSentinel(err) {
					t.Error(err)
				}
				return
			}
			if err != nil {
				if !wrapsSentinel(err) {
					t.Errorf("error wraps no sentinel: %v", err)
				}
				return
			}
			if len(fc.Mean) != almanac.MaxHorizon {
				t.Errorf("%d steps", len(fc.Mean))
			}
		})
	}
}

// BenchmarkForecastHorizon: forecast time against h (issue 11.2 measured
// 0.30 s, 1.24 s and 5.1 s for HoltWinters at 10,000, 20,000 and 40,000
// steps); linear cost doubles with h.
func BenchmarkForecastHorizon(b *testing.B) {
	y := airPassengers(b).Head(60)
	for _, m := range horizonModels()[:4] {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			b.Fatal(err)
		}
		for _, h := range []int{10000, 20000, 40000} {
			b.Run(fmt.Sprintf("%v/h=%d", m, h), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if _, err := fit.Forecast(h, 80); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
