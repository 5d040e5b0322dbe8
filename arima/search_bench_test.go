package arima_test

import (
	"context"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"github.com/almanac-go/almanac/arima"
)

// BenchmarkSearch runs the default stepwise search on monthly series:
// log(AirPassengers) (144 points, the benchmark series) and
// prefixes of it, with exact and CSS ranking, and a small exhaustive grid.
func BenchmarkSearch(b *testing.B) {
	full := logOf(selAirPassengers)
	for _, n := range []int{72, 144} {
		for _, s := range []struct {
			name string
			s    arima.Search
		}{
			{"stepwise", arima.Search{}},
			{"stepwise-css", arima.Search{Likelihood: arima.LikelihoodCSS}},
			{"exhaustive-2x2x1x1", arima.Search{Exhaustive: true, MaxP: 2, MaxQ: 2, MaxSP: 1, MaxSQ: 1}},
		} {
			y := monthly("log AirPassengers", full[:n])
			b.Run("n="+strconv.Itoa(n)+"/"+s.name, func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if _, err := s.s.Fit(context.Background(), y); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkSearchNonSeasonal runs the stepwise search on invented ARMA(1,1)
// series of growing length (CSS ranking above 150 points).
func BenchmarkSearchNonSeasonal(b *testing.B) {
	for _, n := range []int{100, 400, 1600} {
		src := rand.New(rand.NewPCG(1, uint64(n)))
		v := make([]float64, n)
		e1 := 0.0
		for i := range v {
			e := src.NormFloat64()
			v[i] = e + 0.4*e1
			if i > 0 {
				v[i] += 0.5 * v[i-1]
			}
			e1 = e
		}
		y := yearly("invented", v)
		b.Run("n="+strconv.Itoa(n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := (arima.Search{}).Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkKPSS times one KPSS test with each lag rule on 1000 points.
func BenchmarkKPSS(b *testing.B) {
	src := rand.New(rand.NewPCG(2, 3))
	y := make([]float64, 1000)
	for i := range y {
		y[i] = math.Sin(float64(i)/7) + src.NormFloat64()
	}
	for _, r := range []arima.LagRule{arima.LagSquareRoot, arima.LagDataDependent, arima.LagLong} {
		b.Run(r.String(), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := arima.KPSS(y, arima.KPSSSpec{LagRule: r}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSeasonalDifferences times the choice of D (STL strength) on
// log(AirPassengers).
func BenchmarkSeasonalDifferences(b *testing.B) {
	y := logOf(selAirPassengers)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := arima.SeasonalDifferences(y, 12, arima.SeasonalDifferencesSpec{}); err != nil {
			b.Fatal(err)
		}
	}
}
