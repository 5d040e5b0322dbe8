// Quickstart: a year of coherent forecasts for an invented garden-supplies
// distributor.
//
// The data (data/garden_supplies.csv, embedded in the binary) are invented:
// 32 monthly product lines in four categories, January 2019 to December
// 2025, with one line missing two months after a warehouse system outage.
// The program
//
//  1. reads the long-format CSV into series,
//  2. repairs the gap with a seasonal-aware fill and says what it changed,
//  3. shows how strong trend and seasonality are, from STL,
//  4. backtests automatic exponential smoothing and automatic ARIMA against
//     the naive and seasonal naive benchmarks on every series (products,
//     categories and the total) and keeps, per series, whichever forecast
//     best over the backtest,
//  5. refits the winners on all the data, draws sample paths, and
//     reconciles them (MinT with a shrinkage covariance, non-negative) so
//     that products add up to categories and categories to the total,
//  6. prints the plan for next year with 80% bands, and writes a review
//     page (review.html: every series' chart, backtest and flags) into the
//     directory given by -out, by default almanac-quickstart in the
//     system's temporary directory.
//
// Run it from the repository root with: go -C examples run ./quickstart
package main

import (
	"context"
	_ "embed"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/reconcile"
	"github.com/almanac-go/almanac/smoothing"
)

//go:embed data/garden_supplies.csv
var gardenCSV string

const (
	horizon = 12   // months ahead
	nPaths  = 1000 // sample paths per series for the reconciled bands
	level   = 80.0 // prediction-interval level, percent
)

func main() {
	out := flag.String("out", defaultReviewDir, "directory for the review page, review.html")
	flag.Parse()
	if _, err := run(context.Background(), os.Stdout, *out); err != nil {
		fmt.Fprintln(os.Stderr, "quickstart:", err)
		os.Exit(1)
	}
}

// plan is what run produces, kept for the test.
type plan struct {
	structure reconcile.Structure
	nodes     []almanac.Series   // history per node, structure order
	chosen    []string           // winning candidate per node
	forecasts []almanac.Forecast // reconciled, per node
}

// run does the work, prints the plan to w and writes the review page into
// reviewDir.
func run(ctx context.Context, w io.Writer, reviewDir string) (*plan, error) {
	// 1. Read the long-format CSV: one row per product and month.
	lines, err := almanac.ReadCSV(strings.NewReader(gardenCSV), almanac.CSVOptions{
		KeyColumn: "product", TimeColumn: "month", ValueColumn: "units",
		Layouts: []string{"2006-01"}, Freq: calendar.Monthly,
	})
	if err != nil {
		return nil, err
	}
	fmt.Fprintf(w, "Garden supplies (invented data): %d product lines, %s to %s\n\n",
		len(lines), lines[0].Start.Format("Jan 2006"), lines[0].End().Format("Jan 2006"))

	// 2. Repair gaps rather than let a model trip over them.
	repairs := map[string][]decompose.Change{}
	for i, y := range lines {
		if y.Missing() == 0 {
			continue
		}
		filled, changes, err := decompose.Repair{}.Fill(y)
		if err != nil {
			return nil, fmt.Errorf("repairing %s: %w", y.Key, err)
		}
		for _, c := range changes {
			fmt.Fprintf(w, "repaired  %-24s %s  missing -> %.0f (seasonal-aware fill)\n", y.Key, c.Time.Format("Jan 2006"), c.New)
		}
		lines[i], repairs[y.Key] = filled, changes
	}
	fmt.Fprintln(w)

	// The hierarchy: total / category / product.
	paths := make([]string, len(lines))
	for i, y := range lines {
		paths[i] = "total/" + y.Key
	}
	st, err := reconcile.HierarchyFromPaths(paths, "/")
	if err != nil {
		return nil, err
	}
	nodes, err := aggregate(st, lines)
	if err != nil {
		return nil, err
	}

	// 3. What do the category totals look like?
	fmt.Fprintln(w, "Shape of the history (STL strength, 0 = none, 1 = dominant)")
	fmt.Fprintf(w, "  %-22s %6s %9s\n", "", "trend", "seasonal")
	for i, y := range nodes {
		if st.Level(i) > 1 {
			continue
		}
		d, err := decompose.STL{Robust: true}.Decompose(y)
		if err != nil {
			return nil, fmt.Errorf("decomposing %s: %w", y.Key, err)
		}
		s, err := d.Strength()
		if err != nil {
			return nil, fmt.Errorf("strength of %s: %w", y.Key, err)
		}
		fmt.Fprintf(w, "  %-22s %6.2f %9.2f\n", label(y.Key), s.Trend, s.Seasonal[0])
	}
	fmt.Fprintln(w)

	// 4. Backtest: 3 origins, 6 months apart, each forecasting 12 months.
	bt := accuracy.Backtest{Horizon: horizon, Origins: 3, Step: 6, Levels: []float64{level}}
	cmp, err := bt.RunBatch(ctx, nodes,
		accuracy.Candidate{Name: "exp. smoothing", Model: smoothing.Select{}},
		accuracy.Candidate{Name: "ARIMA", Model: arima.Search{}},
	)
	if err != nil {
		return nil, err
	}
	fmt.Fprintf(w, "Backtest over all %d series (3 origins x 12 months; ratios below 1 beat seasonal naive)\n", len(nodes))
	if err := cmp.WriteText(w); err != nil {
		return nil, err
	}
	// Bands that hold fewer outcomes than their level promise are a warning
	// worth printing: widen them in the plan, or trust the points less.
	for c, name := range cmp.Names {
		if iv, ok := cmp.Mean[c].Interval(level); ok && iv.Coverage < level/100-0.05 {
			fmt.Fprintf(w, "note: the %.0f%% bands of %s held only %.0f%% of the outcomes in the backtest\n", level, name, 100*iv.Coverage)
		}
	}
	// A series the backtest failed on is left out of the averages above
	// (the table lists it); plan it with the seasonal naive method, which
	// needs only a year of history.
	for _, f := range cmp.Failed {
		fmt.Fprintf(w, "note: %s is planned with the seasonal naive method, as its backtest failed\n", label(f.Key))
	}
	fmt.Fprintln(w)

	models := map[string]almanac.Model{
		"exp. smoothing": smoothing.Select{},
		"ARIMA":          arima.Search{},
		"naive":          almanac.Naive{},
		"seasonal naive": almanac.SeasonalNaive{},
	}
	chosen := make([]string, len(nodes))
	mase := make([]float64, len(nodes))
	leftOut := map[int]bool{}
	for _, f := range cmp.Failed {
		leftOut[f.Index] = true
	}
	for i, c := range cmp.Series {
		if c == nil || leftOut[i] { // left out of the backtest: see cmp.Failed
			chosen[i], mase[i] = "seasonal naive", math.NaN()
			continue
		}
		best, bestMASE := "", math.Inf(1)
		for _, r := range c.Runs {
			if m := r.Overall.MASE; m < bestMASE {
				best, bestMASE = r.Name, m
			}
		}
		if best == "" {
			return nil, fmt.Errorf("%s: no candidate has a defined MASE", c.Key)
		}
		chosen[i], mase[i] = best, bestMASE
	}

	// 5. Refit the winners on all the data and draw sample paths.
	fcs := make([]almanac.Forecast, len(nodes))
	fits := make([]almanac.Fitted, len(nodes))
	for i, y := range nodes {
		fit, err := models[chosen[i]].Fit(ctx, y)
		if err != nil {
			return nil, fmt.Errorf("%s with %s: %w", y.Key, chosen[i], err)
		}
		fits[i] = fit
		point, err := fit.Forecast(horizon)
		if err != nil {
			return nil, err
		}
		sim, ok := fit.(almanac.Simulator)
		if !ok {
			return nil, fmt.Errorf("%s: %s cannot draw sample paths", y.Key, fit)
		}
		// One seed per node keeps the run reproducible.
		draws, err := sim.Simulate(horizon, nPaths, rand.NewPCG(20261201, uint64(i)))
		if err != nil {
			return nil, fmt.Errorf("%s: %w", y.Key, err)
		}
		fcs[i], err = almanac.NewForecast(point.Start, point.Freq, point.Mean, &almanac.Sample{Paths: draws})
		if err != nil {
			return nil, err
		}
	}
	// In-sample errors on the data's scale (y − fitted), one column per node.
	residuals, err := reconcile.ResidualMatrix(st, fits)
	if err != nil {
		return nil, err
	}
	rec, err := reconcile.Forecasts(st, fcs, reconcile.Spec{
		Method: reconcile.MethodMinTShrink, Residuals: residuals, NonNegative: true,
	}, level)
	if err != nil {
		return nil, err
	}

	// 6. The plan, and a review page to look at it series by series.
	printPlan(w, st, nodes, fits, chosen, mase, rec)
	page, err := writeReview(reviewDir, nodes, fits, chosen, rec, cmp, repairs)
	if err != nil {
		return nil, fmt.Errorf("review page: %w", err)
	}
	fmt.Fprintf(w, "\nReview page (charts, backtests and flags for every series): %s\n", page)
	return &plan{structure: st, nodes: nodes, chosen: chosen, forecasts: rec}, nil
}

// aggregate returns one series per node of st (structure order), each the
// sum of the product lines below it.
func aggregate(st reconcile.Structure, lines []almanac.Series) ([]almanac.Series, error) {
	names := st.Names()
	m := st.NumBottom()
	if m != len(lines) {
		return nil, errors.New("hierarchy and data disagree on the number of product lines")
	}
	// Bottom node j is the line whose path is names[len-m+j].
	byPath := make(map[string]almanac.Series, len(lines))
	for _, y := range lines {
		byPath["total/"+y.Key] = y
	}
	bottom := make([]almanac.Series, m)
	for j := range m {
		y, ok := byPath[names[len(names)-m+j]]
		if !ok {
			return nil, fmt.Errorf("no data for %s", names[len(names)-m+j])
		}
		bottom[j] = y
	}
	out := make([]almanac.Series, len(names))
	for i, name := range names {
		vals := make([]float64, bottom[0].Len())
		for _, j := range st.Bottoms(i) {
			for t, v := range bottom[j].Values {
				vals[t] += v
			}
		}
		out[i] = almanac.Series{Key: strings.TrimPrefix(name, "total/"), Start: bottom[0].Start, Freq: bottom[0].Freq, Values: vals}
	}
	return out, nil
}

func label(key string) string {
	if key == "total" {
		return "all products"
	}
	return key
}

func printPlan(w io.Writer, st reconcile.Structure, nodes []almanac.Series, fits []almanac.Fitted, chosen []string, mase []float64, rec []almanac.Forecast) {
	year := rec[0].Start.Year()
	fmt.Fprintf(w, "Plan for %d: units, reconciled so products add up to categories and the total\n", year)
	fmt.Fprintf(w, "%-20s %-15s %-36s %5s %10s %10s  %s\n", "", "method won", "model", "MASE", "last year", "next year", fmt.Sprintf("%.0f%% band", level))
	for i, y := range nodes {
		last := 0.0
		for _, v := range y.Values[y.Len()-12:] {
			last += v
		}
		next := sum(rec[i].Mean)
		lo, hi := yearBand(rec[i])
		indent := strings.Repeat("  ", st.Level(i))
		fmt.Fprintf(w, "%-20s %-15s %-36s %5.2f %10.0f %10.0f  %.0f to %.0f\n",
			indent+shortName(label(y.Key)), chosen[i], clip(fits[i].String(), 36), mase[i], last, next, lo, hi)
	}
	fmt.Fprintln(w)

	fmt.Fprintln(w, "All products, month by month")
	fmt.Fprintf(w, "  %-9s %8s  %s\n", "month", "units", fmt.Sprintf("%.0f%% band", level))
	lo, hi, _ := rec[0].Bounds(level)
	for h, v := range rec[0].Mean {
		fmt.Fprintf(w, "  %-9s %8.0f  %.0f to %.0f\n", rec[0].Time(h).Format("Jan 2006"), v, lo[h], hi[h])
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Forecasts are uncertain: read the bands, not just the points, and check the")
	fmt.Fprintln(w, "backtest before relying on a line. The plan is an input to people's judgement.")
}

// yearBand returns the central band of the 12-month total, from the
// reconciled sample paths (so the months' joint uncertainty is respected).
func yearBand(f almanac.Forecast) (lo, hi float64) {
	ps := f.SamplePaths()
	totals := make([]float64, len(ps))
	for i, p := range ps {
		totals[i] = sum(p)
	}
	yd := &almanac.Sample{Paths: make([][]float64, len(totals))}
	for i, t := range totals {
		yd.Paths[i] = []float64{t}
	}
	return yd.Quantile(0, (1-level/100)/2), yd.Quantile(0, (1+level/100)/2)
}

func sum(xs []float64) float64 {
	s := 0.0
	for _, x := range xs {
		s += x
	}
	return s
}

func shortName(s string) string {
	if i := strings.LastIndex(s, "/"); i >= 0 {
		return s[i+1:]
	}
	return s
}

func clip(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[:n-1] + "~"
}
