package reconcile_test

import (
	"context"
	"errors"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// The whole path on real data: R's ldeaths = mdeaths + fdeaths (fixture
// uk_lung_deaths, R datasets), seasonal naive base models fitted to the
// first 60 months, residuals and forecasts reconciled with MinT.
//
// Seasonal naive residuals are differences y_t − y_{t−12}, so they add up
// exactly like the data: their sample covariance is singular (a fact of
// linear algebra), which must be reported with the advice to shrink, and
// the shrinkage estimator must then work.
func TestPipelineLungDeaths(t *testing.T) {
	f, err := reftest.Load("testdata/reference/uk_lung_deaths.json")
	if err != nil {
		t.Fatal(err)
	}
	h, err := reconcile.NewHierarchy(
		reconcile.Link{Name: "ldeaths"},
		reconcile.Link{Name: "mdeaths", Parent: "ldeaths"},
		reconcile.Link{Name: "fdeaths", Parent: "ldeaths"},
	)
	if err != nil {
		t.Fatal(err)
	}
	start := time.Date(1974, time.January, 1, 0, 0, 0, 0, time.UTC)
	var series []almanac.Series
	var fits []almanac.Fitted
	var fcs []almanac.Forecast
	for _, name := range h.Names() {
		y := almanac.Series{Key: name, Start: start, Freq: calendar.Monthly, Values: f.Floats(t, "series."+name)[:60]}
		series = append(series, y)
		fit, err := almanac.SeasonalNaive{}.Fit(context.Background(), y)
		if err != nil {
			t.Fatal(err)
		}
		fits = append(fits, fit)
		fc, err := fit.Forecast(12, 80, 95)
		if err != nil {
			t.Fatal(err)
		}
		fcs = append(fcs, fc)
	}
	resid, err := reconcile.ResidualMatrix(h, fits)
	if err != nil {
		t.Fatal(err)
	}
	hist, err := reconcile.HistoryMatrix(h, series)
	if err != nil {
		t.Fatal(err)
	}
	_, err = reconcile.Forecasts(h, fcs, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid}, 80)
	if !errors.Is(err, reconcile.ErrSingular) {
		t.Fatalf("sample MinT on additive residuals: error %v, want ErrSingular", err)
	}
	for _, spec := range []reconcile.Spec{
		{Method: reconcile.MethodMinTShrink, Residuals: resid},
		{Method: reconcile.MethodTopDown, Disaggregation: reconcile.AverageHistoricalProportions, History: hist, Residuals: resid},
	} {
		t.Run(spec.Method.String(), func(t *testing.T) {
			rec, err := reconcile.Forecasts(h, fcs, spec, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			means := mat.NewDense(12, 3, nil)
			for i, fc := range rec {
				means.SetCol(i, fc.Mean)
				for k := range fc.Mean {
					lo80, hi80 := fc.Intervals[0].Lower[k], fc.Intervals[0].Upper[k]
					lo95, hi95 := fc.Intervals[1].Lower[k], fc.Intervals[1].Upper[k]
					if !(lo95 <= lo80 && lo80 <= fc.Mean[k] && fc.Mean[k] <= hi80 && hi80 <= hi95) {
						t.Errorf("%s step %d: intervals not nested around the mean", h.Names()[i], k+1)
					}
				}
			}
			if d := maxIncoherence(h, means); d > 1e-9 {
				t.Errorf("incoherent means (%.3g)", d)
			}
		})
	}
	// Seasonal naive forecasts of coherent data are coherent already, so
	// MinT leaves the means as they were (projection property).
	rec, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: resid})
	if err != nil {
		t.Fatal(err)
	}
	for i := range rec {
		for k := range rec[i].Mean {
			if d := rec[i].Mean[k] - fcs[i].Mean[k]; d > 1e-9*fcs[i].Mean[k] || -d > 1e-9*fcs[i].Mean[k] {
				t.Errorf("%s step %d: %v, base %v", h.Names()[i], k+1, rec[i].Mean[k], fcs[i].Mean[k])
			}
		}
	}
	// Simulated paths through the model's Simulator, reconciled path by
	// path.
	var simFcs []almanac.Forecast
	for i, fit := range fits {
		sim, ok := fit.(almanac.Simulator)
		if !ok {
			t.Fatalf("%s does not implement almanac.Simulator; the path check would be lost", fit)
		}
		paths, err := sim.Simulate(12, 200, rand.NewPCG(uint64(i), 7))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := almanac.NewForecast(fcs[i].Start, fcs[i].Freq, fcs[i].Mean, &almanac.Sample{Paths: paths})
		if err != nil {
			t.Fatal(err)
		}
		simFcs = append(simFcs, fc)
	}
	recSim, err := reconcile.Forecasts(h, simFcs, reconcile.Spec{Residuals: resid, NonNegative: true}, 90)
	if err != nil {
		t.Fatal(err)
	}
	for p := 0; p < 200; p++ {
		path := mat.NewDense(12, 3, nil)
		for i := range recSim {
			path.SetCol(i, recSim[i].SamplePaths()[p])
		}
		if d := maxIncoherence(h, path); d > 1e-9 {
			t.Fatalf("path %d incoherent", p)
		}
		for k := 0; k < 12; k++ {
			for i := 0; i < 3; i++ {
				if path.At(k, i) < 0 {
					t.Fatalf("path %d negative", p)
				}
			}
		}
	}
}
