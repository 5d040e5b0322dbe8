package reconcile_test

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// benchSetup builds total → regions → 20 stores each (m bottom series),
// 60 rows of residuals and 12 steps of base forecasts.
func benchSetup(b *testing.B, m int) (*reconcile.Hierarchy, *mat.Dense, *mat.Dense) {
	b.Helper()
	stores := make([]int, m/20)
	for i := range stores {
		stores[i] = 20
	}
	h := testHierarchy(b, stores...)
	rng := rand.New(rand.NewPCG(uint64(m), 99))
	return h, coherentData(h, 12, 5, rng), randomResiduals(h, 60, rng)
}

func BenchmarkMinTShrink(b *testing.B) {
	for _, m := range []int{40, 200, 600} {
		h, base, resid := benchSetup(b, m)
		b.Run(fmt.Sprintf("m=%d/n=%d/h=12", m, h.Len()), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := reconcile.MinT(h, base, resid, reconcile.Shrinkage); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkMethods(b *testing.B) {
	h, base, resid := benchSetup(b, 200)
	// Base forecasts around zero so the non-negative solve has work to do.
	rng := rand.New(rand.NewPCG(7, 7))
	signed := mat.NewDense(12, h.Len(), nil)
	for i := 0; i < 12; i++ {
		for j := 0; j < h.Len(); j++ {
			signed.Set(i, j, rng.NormFloat64())
		}
	}
	for _, tt := range []struct {
		name string
		base *mat.Dense
		spec reconcile.Spec
	}{
		{"bottom-up", base, reconcile.Spec{Method: reconcile.MethodBottomUp}},
		{"top-down-forecast-proportions", base, reconcile.Spec{Method: reconcile.MethodTopDown}},
		{"OLS", base, reconcile.Spec{Method: reconcile.MethodOLS}},
		{"WLS-structural", base, reconcile.Spec{Method: reconcile.MethodWLSStructural}},
		{"MinT-sample-240-rows", base, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: randomResiduals(h, 240, rng)}},
		{"MinT-shrink-nonnegative-signed", signed, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}},
	} {
		b.Run(tt.name+"/m=200/h=12", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := reconcile.Reconcile(h, tt.base, tt.spec); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkForecastsGaussian(b *testing.B) {
	h, base, resid := benchSetup(b, 200)
	n := h.Len()
	fcs := make([]almanac.Forecast, n)
	for i := range fcs {
		mean := mat.Col(nil, i, base)
		sd := make([]float64, len(mean))
		for k := range sd {
			sd[k] = 1 + float64(k)
		}
		f, err := almanac.NewForecast(start, calendar.Monthly, mean, &almanac.Normal{Mean: mean, SD: sd})
		if err != nil {
			b.Fatal(err)
		}
		fcs[i] = f
	}
	b.Run("MinT-shrink/m=200/h=12", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: resid}, 80, 95); err != nil {
				b.Fatal(err)
			}
		}
	})
}

// BenchmarkForecastsSamplePaths: 1000 sample paths of 12 steps per node
// (n = 211), reconciled by MinT (shrinkage) after the joint draws of each
// kind, or as given.
func BenchmarkForecastsSamplePaths(b *testing.B) {
	h, base, resid := benchSetup(b, 200)
	n := h.Len()
	const np, steps = 1000, 12
	rng := rand.New(rand.NewPCG(5, 6))
	fcs := make([]almanac.Forecast, n)
	for i := range fcs {
		mean := mat.Col(nil, i, base)
		paths := make([][]float64, np)
		for p := range paths {
			paths[p] = make([]float64, steps)
			x := 0.0
			for k := range paths[p] {
				x += rng.NormFloat64()
				paths[p][k] = mean[k] + x
			}
		}
		f, err := almanac.NewForecast(start, calendar.Monthly, mean, &almanac.Sample{Paths: paths})
		if err != nil {
			b.Fatal(err)
		}
		fcs[i] = f
	}
	for _, draw := range []reconcile.Draw{reconcile.JointBootstrap, reconcile.JointGaussian, reconcile.IndependentPaths} {
		b.Run(fmt.Sprintf("%s/n=%d/h=%d/paths=%d", draw, n, steps, np), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: resid, Draw: draw}, 80); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
