package accuracy_test

import (
	"context"
	"fmt"
	"os"
	"path/filepath"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
)

// A review page for a small batch: fit, forecast, backtest, then one call
// writes the page (invented monthly sales of a fictional chain of
// hardware stores).
func ExampleWriteReview() {
	ctx := context.Background()
	ys := []almanac.Series{
		storeSeries("paint", 400, 0, 72),
		storeSeries("ladders", 120, 0.2, 72),
	}
	fits, err := almanac.BatchFit(ctx, almanac.SeasonalNaive{}, ys, almanac.BatchOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fcs := almanac.ForecastAll(fits, 12, 80, 95)
	bt := accuracy.Backtest{Horizon: 6, Origins: 3, Step: 6, Levels: []float64{80}}
	cmp, err := bt.RunBatch(ctx, ys, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		fmt.Println(err)
		return
	}
	entries, err := accuracy.ReviewFromBatch(ys, fits, fcs, cmp)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range entries {
		entries[i].Route = "seasonal naive for every line"
		entries[i].Chosen = accuracy.SeasonalNaiveName // the backtest run that made the forecast
	}

	path := filepath.Join(os.TempDir(), "hardware-review.html")
	f, err := os.Create(path)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer f.Close()
	err = accuracy.WriteReview(f, accuracy.Review{
		Title:  "Hardware stores, monthly units",
		About:  "Invented data; seasonal naive forecasts backtested against the drift and naive methods.",
		Series: entries,
	})
	fmt.Println("review page written:", err == nil)
	// Output:
	// review page written: true
}

// Trigg's tracking signal over a model's one-step errors: the last few
// months ran above the forecasts (invented errors).
func ExampleTriggSignal() {
	errs := []float64{3, -4, 2, -1, 5, -3, 1, -2, 4, 6, 7, 5, 8, 6}
	s, err := accuracy.TriggSignal(errs, accuracy.TriggAlpha)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("signal %.3f, biased: %v\n", s, s > accuracy.TriggLimit || s < -accuracy.TriggLimit)
	// Output:
	// signal 0.660, biased: true
}
