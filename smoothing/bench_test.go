package smoothing

import (
	"context"
	"fmt"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/reftest"
)

// airPassengers returns R's AirPassengers (monthly 1949–1960, 144 values)
// from the reference fixture's dataset block.
func airPassengers(tb testing.TB) almanac.Series {
	tb.Helper()
	f, err := reftest.Load("testdata/reference/airpassengers_madm_known.json")
	if err != nil {
		tb.Fatal(err)
	}
	return almanac.Series{Key: "AirPassengers", Start: time.Date(1949, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: f.Floats(tb, "dataset.values")}
}

// BenchmarkFit: one ETS fit on the first n values of AirPassengers
// (m = 12), by model and length.
func BenchmarkFit(b *testing.B) {
	y := airPassengers(b)
	for _, sp := range []Spec{
		{},
		{Trend: AdditiveTrend, Season: AdditiveSeason},
		{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason},
	} {
		for _, n := range []int{48, 96, 144} {
			b.Run(fmt.Sprintf("%v/n=%d", sp, n), func(b *testing.B) {
				yn := y.Head(n)
				b.ReportAllocs()
				for b.Loop() {
					if _, err := sp.fit(context.Background(), yn); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkSelect: automatic selection on AirPassengers, one worker and
// the default pool.
func BenchmarkSelect(b *testing.B) {
	y := airPassengers(b)
	for _, w := range []int{1, 0} {
		b.Run(map[int]string{1: "workers=1", 0: "workers=all"}[w], func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := (Select{Workers: w}).Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkForecast: 24-step forecasts with 80% and 95% intervals, for an
// analytic (ETS(M,Ad,M), class 3) and a simulated (ETS(M,Md,M)) model.
func BenchmarkForecast(b *testing.B) {
	y := airPassengers(b)
	for _, sp := range []Spec{
		{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason},
		{Error: MultiplicativeError, Trend: DampedMultiplicativeTrend, Season: MultiplicativeSeason, Paths: 1000},
	} {
		fit, err := sp.fit(context.Background(), y)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(sp.String(), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := fit.Forecast(24, 80, 95); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkLikelihood: one evaluation of the objective, by length.
func BenchmarkLikelihood(b *testing.B) {
	y := airPassengers(b)
	sp := Spec{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason}
	for _, n := range []int{48, 144} {
		p, x := objectiveFor(b, sp, y.Head(n))
		b.Run(map[int]string{48: "n=48", 144: "n=144"}[n], func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				p.objective(x)
			}
		})
	}
}

// objectiveFor sets up the likelihood problem of sp on y at its start
// values.
func objectiveFor(tb testing.TB, sp Spec, y almanac.Series) (*problem, []float64) {
	tb.Helper()
	f, err := sp.resolve(y)
	if err != nil {
		tb.Fatal(err)
	}
	p := sp.newProblem(f, y.Slice(), scaling{s0: 1, d: 1})
	return p, p.start()
}

// BenchmarkGradient: one evaluation of the objective with its analytic
// gradient (ETS(M,Ad,M), n = 144, 17 coordinates).
func BenchmarkGradient(b *testing.B) {
	y := airPassengers(b)
	sp := Spec{Error: MultiplicativeError, Trend: DampedTrend, Season: MultiplicativeSeason}
	p, x := objectiveFor(b, sp, y)
	g := make([]float64, len(x))
	b.ReportAllocs()
	for b.Loop() {
		p.objectiveGrad(x, g)
	}
}
