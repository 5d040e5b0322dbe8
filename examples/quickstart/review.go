package main

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/decompose"
)

// defaultReviewDir is where the review page goes unless -out says
// otherwise: the system's temporary directory, never the repository.
var defaultReviewDir = filepath.Join(os.TempDir(), "almanac-quickstart")

// writeReview writes the run's review page, review.html in dir, from what
// the run computed (nothing is refitted) and returns its path: for every
// node the history, the winning model's one-step fit, the reconciled
// forecast with 80% and 95% bands from its sample paths, the backtest of
// every candidate and the values filled.
func writeReview(dir string, nodes []almanac.Series, fits []almanac.Fitted, chosen []string, rec []almanac.Forecast,
	cmp *accuracy.BatchComparison, repairs map[string][]decompose.Change) (string, error) {
	entries := make([]accuracy.ReviewSeries, len(nodes))
	for i, y := range nodes {
		e := accuracy.NewReviewSeries(y, fits[i], rec[i])
		e.Key = label(y.Key)
		e.Route = "lowest backtest error"
		e.Repairs = repairs[y.Key]
		e.Notes = []string{"The forecast drawn is reconciled (MinT, shrinkage, non-negative), so it adds up across products, categories and the total; the one-step fit is the model's own."}
		e.Backtest, e.Chosen = cmp.Series[i], chosen[i]
		for _, f := range cmp.Failed {
			if f.Index == i {
				e.BacktestErr = f.Err
			}
		}
		if e.Backtest == nil || e.BacktestErr != nil { // as run plans it
			e.Backtest, e.Chosen, e.Route = nil, "", "seasonal naive"
			e.Fallbacks = []string{"the backtest failed, so no model was chosen by it: the seasonal naive method forecasts"}
		}
		entries[i] = e
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", err
	}
	path := filepath.Join(dir, "review.html")
	f, err := os.Create(path)
	if err != nil {
		return "", err
	}
	err = accuracy.WriteReview(f, accuracy.Review{
		Title:  "Garden supplies: the plan for next year",
		About:  fmt.Sprintf("Invented data: %d monthly series of a garden-supplies distributor (products, categories and the total). Each series is forecast by whichever of automatic exponential smoothing, automatic ARIMA and the two benchmarks had the lowest scaled error in a backtest of 3 origins, 12 months ahead each; the forecasts are reconciled across the hierarchy.", len(nodes)),
		Levels: []float64{80, 95},
		Series: entries,
	})
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return path, err
}
