package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/reconcile"
)

// defaultReviewDir is where the review page goes unless -out says
// otherwise: the system's temporary directory, never the repository.
var defaultReviewDir = filepath.Join(os.TempDir(), "almanac-quickstart")

// writeReview writes the run's review page, review.html in dir, from what
// the run computed (nothing is refitted) and returns its path: for every
// node the history, the automatic forecaster's one-step fit and what it
// did, the reconciled forecast with 80% and 95% bands from its sample
// paths, the plan's forecasts at the backtest origins scored against the
// benchmarks (cmp), how its annual bands held and the values filled.
func writeReview(dir string, st reconcile.Structure, nodes []almanac.Series, fits []almanac.BatchResult, rec []almanac.Forecast,
	check *bandCheck, cmp *accuracy.BatchComparison, repairs map[string][]decompose.Change) (string, error) {
	entries := make([]accuracy.ReviewSeries, len(nodes))
	for i, y := range nodes {
		e := accuracy.NewReviewSeries(y, fits[i].Fitted, rec[i])
		e.Key = label(y.Key)
		e.Repairs = repairs[y.Key]
		e.Notes = []string{"The forecast drawn is reconciled (MinT, shrinkage, non-negative, joint sample paths), so it adds up across products, categories and the total; the one-step fit is the automatic forecaster's own."}
		if pf, ok := fits[i].Fitted.(*accuracy.PilotFit); ok {
			r := pf.Report()
			e.Route, e.Members, e.Fallbacks = r.Route.String(), r.Members, r.Fallbacks
			for _, d := range r.Dropped {
				e.Notes = append(e.Notes, "Left out of the combination: "+d+".")
			}
			if r.Calibrated {
				c := r.Calibration
				e.Notes = append(e.Notes, fmt.Sprintf("Bands from %s (%d trajectories of its own, %d pooled across the catalogue).", c.Source, c.Own, c.Pooled))
			}
		}
		e.Notes = append(e.Notes, checkNote(check, i))
		e.Backtest, e.Chosen = cmp.Series[i], planCandidate
		for _, f := range cmp.Failed {
			if f.Index == i {
				e.Backtest, e.BacktestErr = nil, f.Err
			}
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
		Title: "Garden supplies: the plan for next year",
		About: fmt.Sprintf("Invented data: %d monthly series of a garden-supplies distributor (%d product lines, their categories and the total). "+
			"Each series is forecast by the automatic forecaster, its bands calibrated on out-of-sample errors pooled across all the series; "+
			"the forecasts are reconciled across the hierarchy with joint sample paths. "+
			"The same plan made a year earlier, at %d origins, held the annual total inside its 80%% band for %s of the series-years.",
			len(nodes), st.NumBottom(), len(check.origins), share(check.levels[len(check.levels)-1].yearsInside, check.levels[len(check.levels)-1].years)),
		Levels: []float64{80, 95},
		Series: entries,
	})
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	return path, err
}

// checkNote says how node i's annual bands held in the backtest.
func checkNote(c *bandCheck, i int) string {
	in := 0
	var years []string
	for _, o := range c.origins {
		mark := "outside"
		if o.inside[i] {
			in++
			mark = "inside"
		}
		years = append(years, fmt.Sprintf("%d: %.0f, band %.0f to %.0f, %s", o.origin.Year()+1, o.total[i], o.lo[i], o.hi[i], mark))
	}
	return fmt.Sprintf("Backtest of the plan: the year's total fell inside its 80%% band in %d of %d years (%s).", in, len(c.origins), strings.Join(years, "; "))
}
