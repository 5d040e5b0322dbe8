package arima_test

import (
	"context"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
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

// hourlyLoad is an invented hourly series (a fictional depot's electricity
// load): a daily profile that drifts from day to day, AR(1) noise and a
// slowly wandering level. Benchmark data only.
func hourlyLoad(n int, seed uint64) almanac.Series {
	src := rand.New(rand.NewPCG(seed, 7))
	var profile [24]float64
	for h := range profile {
		profile[h] = 20*math.Sin(2*math.Pi*float64(h)/24) + 8*math.Cos(4*math.Pi*float64(h)/24)
	}
	v := make([]float64, n)
	noise, level := 0.0, 100.0
	for t := range v {
		h := t % 24
		level += 0.02 * src.NormFloat64()
		noise = 0.7*noise + src.NormFloat64()
		profile[h] += 0.8 * src.NormFloat64()
		v[t] = level + profile[h] + 3*noise
	}
	return almanac.Series{Key: "depot load", Start: time.Date(2025, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, Values: v}
}

// BenchmarkSearchHourly runs the default stepwise search on invented
// hourly series of 960 values (40 days, period 24; CSS ranking, as for
// any period above 12): one op is the search of three such series.
func BenchmarkSearchHourly(b *testing.B) {
	ys := []almanac.Series{hourlyLoad(960, 1), hourlyLoad(960, 2), hourlyLoad(960, 3)}
	b.ReportAllocs()
	for b.Loop() {
		for _, y := range ys {
			if _, err := (arima.Search{}).Fit(context.Background(), y); err != nil {
				b.Fatal(err)
			}
		}
	}
}

// BenchmarkSearchM3Monthly runs the default stepwise search on the
// training parts of every 50th M3 monthly series (29 series, Makridakis &
// Hibon 2000; read through internal/m3data): one op is the search of all
// of them. The whole set (1,428 series) is measured by an evaluation run,
// not here.
func BenchmarkSearchM3Monthly(b *testing.B) {
	all := m3data.Load(b, "m3_monthly.csv")
	var ys []almanac.Series
	for i := 0; i < len(all); i += 50 {
		ys = append(ys, almanac.Series{Key: all[i].ID, Start: time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: all[i].Train})
	}
	b.ReportAllocs()
	for b.Loop() {
		for _, y := range ys {
			if _, err := (arima.Search{}).Fit(context.Background(), y); err != nil {
				b.Fatal(err)
			}
		}
	}
}
