package accuracy_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/smoothing"
)

// BenchmarkBacktest: rolling-origin backtests on the 144-point monthly
// AirPassengers series, 12 steps ahead, 80 and 95% intervals, without the
// default benchmarks (the model alone), for 6 and 24 origins and 1 and 2
// workers.
func BenchmarkBacktest(b *testing.B) {
	y := airPassengers(b)
	models := []struct {
		name  string
		model almanac.Model
	}{
		{"SeasonalNaive", almanac.SeasonalNaive{}},
		{"smoothing.Select", smoothing.Select{Workers: 1}},
	}
	for _, m := range models {
		for _, origins := range []int{6, 24} {
			for _, workers := range []int{1, 2} {
				b.Run(fmt.Sprintf("%s/origins=%d/workers=%d", m.name, origins, workers), func(b *testing.B) {
					bt := accuracy.Backtest{Horizon: 12, Origins: origins, Levels: []float64{80, 95}, NoBenchmarks: true, Workers: workers}
					b.ReportAllocs()
					for b.Loop() {
						if _, err := bt.Run(context.Background(), y, accuracy.Candidate{Name: m.name, Model: m.model}); err != nil {
							b.Fatal(err)
						}
					}
				})
			}
		}
	}
}

// BenchmarkRunBatch: batch backtests of the drift method beside the
// default benchmarks on windows of AirPassengers (120 to 144 months), 6
// origins 12 steps ahead with an 80% interval, one series in ten failing
// (a test model refusing its key), for 10 and 100 series and 1 and 2
// workers.
func BenchmarkRunBatch(b *testing.B) {
	y := airPassengers(b)
	for _, n := range []int{10, 100} {
		ys := make([]almanac.Series, n)
		for i := range ys {
			ys[i] = y.Window(i%25, 144)
			ys[i].Key = fmt.Sprintf("s%d", i)
			if i%10 == 3 {
				ys[i].Key = "refused"
			}
		}
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("series=%d/workers=%d", n, workers), func(b *testing.B) {
				bt := accuracy.Backtest{Horizon: 12, Origins: 6, Levels: []float64{80}, Workers: workers}
				m := accuracy.Candidate{Name: "drift", Model: keyTrouble{key: "refused", from: 1}}
				b.ReportAllocs()
				for b.Loop() {
					r, err := bt.RunBatch(context.Background(), ys, m)
					if err != nil || len(r.Failed) != n/10 {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

func randomPairs(n int) (actual, forecast, sd []float64) {
	r := rand.New(rand.NewPCG(1, 2))
	actual = make([]float64, n)
	forecast = make([]float64, n)
	sd = make([]float64, n)
	for i := range actual {
		actual[i] = 100 + 10*r.NormFloat64()
		forecast[i] = 100 + 5*r.NormFloat64()
		sd[i] = 8
	}
	return actual, forecast, sd
}

func BenchmarkMeasures(b *testing.B) {
	for _, n := range []int{18, 1000, 100000} {
		a, f, sd := randomPairs(n)
		b.Run(fmt.Sprintf("MASE/n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := accuracy.MASE(a, f, a, 1); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("CRPSNormal/n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := accuracy.CRPSNormal(a, f, sd); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
	for _, draws := range []int{100, 1000} {
		a, _, _ := randomPairs(12)
		r := rand.New(rand.NewPCG(3, 4))
		paths := make([][]float64, draws)
		for i := range paths {
			paths[i] = make([]float64, 12)
			for h := range paths[i] {
				paths[i][h] = 100 + 8*r.NormFloat64()
			}
		}
		b.Run(fmt.Sprintf("CRPSSample/h=12/draws=%d", draws), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := accuracy.CRPSSample(a, paths); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestMeasuresDoNotAllocate: the mean-type measures run without
// allocating, so scoring many series costs no garbage.
func TestMeasuresDoNotAllocate(t *testing.T) {
	a, f, sd := randomPairs(500)
	lo := make([]float64, len(a))
	hi := make([]float64, len(a))
	for i := range a {
		lo[i], hi[i] = f[i]-10, f[i]+10
	}
	for name, fn := range map[string]func() (float64, error){
		"MAE":            func() (float64, error) { return accuracy.MAE(a, f) },
		"RMSE":           func() (float64, error) { return accuracy.RMSE(a, f) },
		"sMAPE":          func() (float64, error) { return accuracy.SMAPE(a, f) },
		"MASE":           func() (float64, error) { return accuracy.MASE(a, f, a, 12) },
		"RMSSE":          func() (float64, error) { return accuracy.RMSSE(a, f, a, 12) },
		"interval score": func() (float64, error) { return accuracy.IntervalScore(a, lo, hi, 95) },
		"MSIS":           func() (float64, error) { return accuracy.MSIS(a, lo, hi, 95, a, 1) },
		"pinball":        func() (float64, error) { return accuracy.Pinball(a, f, 0.25) },
		"CRPS normal":    func() (float64, error) { return accuracy.CRPSNormal(a, f, sd) },
	} {
		allocs := testing.AllocsPerRun(50, func() {
			if _, err := fn(); err != nil {
				t.Fatal(err)
			}
		})
		if allocs != 0 {
			t.Errorf("%s: %v allocations per call, want 0", name, allocs)
		}
	}
}
