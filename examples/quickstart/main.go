// Quickstart: a year of coherent forecasts for an invented garden-supplies
// distributor, with bands that are checked before they are trusted.
//
// The data (data/garden_supplies.csv, embedded in the binary) are invented:
// 32 monthly product lines in four categories, January 2019 to December
// 2025, with one line missing two months after a warehouse system outage.
// The program
//
//  1. reads the long-format CSV into series,
//  2. repairs the gap with a seasonal-aware fill, says what it changed,
//     and adds the lines up into categories and the total,
//  3. shows how strong trend and seasonality are, from STL,
//  4. checks the way it plans in a backtest: as of December 2022, 2023
//     and 2024 it makes the plan exactly as in step 5 from the data up to
//     then, forecasts the following twelve months, and prints per level
//     of the hierarchy (the total, the categories, the product lines) how
//     many annual totals and how many months fell inside their 80% bands,
//     and how far the annual totals were off, beside "as much as the year
//     before" (with -compare, also the same backtest with the models' own
//     bands and with independent paths),
//  5. plans next year: every series (products, categories and the total)
//     is forecast by the automatic forecaster, accuracy.Pilot, whose bands
//     are calibrated on out-of-sample errors pooled across the catalogue
//     (accuracy.PoolPilots); the forecasts are reconciled with joint
//     sample paths (reconcile.FromBatch: MinT with a shrinkage covariance,
//     non-negative), so that products add up to categories and categories
//     to the total, and the bands of totals carry the correlation between
//     their parts,
//  6. prints the plan with 80% bands for each series' year and for the
//     total month by month, and writes a review page (review.html: every
//     series' chart, models, calibration, backtest result and flags) into
//     the directory given by -out, by default almanac-quickstart in the
//     system's temporary directory.
//
// Nothing is chosen by hand per series: the automatic forecaster decides.
// The program runs in well under a minute on two cores (its test runs a
// subset through the same code).
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
	"os"
	"slices"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/reconcile"
)

//go:embed data/garden_supplies.csv
var gardenCSV string

const (
	horizon = 12   // months ahead: one budget year
	level   = 80.0 // prediction-interval level, percent
	seed    = 20261201
)

// options says how much work run does. The program uses defaultOptions;
// the test runs a smaller set so that it stays quick.
type options struct {
	// Paths is the number of sample paths per series behind the bands,
	// for the calibration and for the joint reconciled paths.
	Paths int
	// Origins is the number of yearly backtest origins: the plan is
	// remade as of December of each of the Origins years before the last
	// year of data, and its forecast of the following year is scored.
	Origins int
	// LinesPerCategory keeps only the first product lines of each
	// category (in the data's order); 0 keeps them all.
	LinesPerCategory int
	// Categories keeps only these categories; nil keeps them all.
	Categories []string
	// ReviewDir is where review.html is written.
	ReviewDir string
	// Compare adds to the backtest the same plan made two other ways, to
	// show what calibration and joint paths do: with the models' own
	// bands (Pilot.Uncalibrated) and with each series' paths drawn
	// independently of the others (reconcile.IndependentPaths).
	Compare bool

	// uncalibrated and draw are the variant makePlan makes (the zero
	// values are the plan's own way).
	uncalibrated bool
	draw         reconcile.Draw
}

func defaultOptions() options {
	return options{Paths: 1000, Origins: 3, ReviewDir: defaultReviewDir}
}

func main() {
	opt := defaultOptions()
	flag.StringVar(&opt.ReviewDir, "out", opt.ReviewDir, "directory for the review page, review.html")
	flag.BoolVar(&opt.Compare, "compare", false, "also backtest the plan with the models' own bands and with independent paths (takes about two and a half times as long)")
	flag.Parse()
	if _, err := run(context.Background(), os.Stdout, opt); err != nil {
		fmt.Fprintln(os.Stderr, "quickstart:", err)
		os.Exit(1)
	}
}

// plan is what run produces, kept for the test.
type plan struct {
	structure reconcile.Structure
	nodes     []almanac.Series          // history per node, structure order
	fits      []almanac.BatchResult     // Pilot fits, pooled, per node
	forecasts []almanac.Forecast        // reconciled, per node
	check     *bandCheck                // the backtest of the plan
	scored    *accuracy.BatchComparison // its forecasts against the benchmarks
}

// run does the work, prints the plan to w and writes the review page into
// opt.ReviewDir.
func run(ctx context.Context, w io.Writer, opt options) (*plan, error) {
	// 1. Read the long-format CSV: one row per product and month.
	lines, err := almanac.ReadCSV(strings.NewReader(gardenCSV), almanac.CSVOptions{
		KeyColumn: "product", TimeColumn: "month", ValueColumn: "units",
		Layouts: []string{"2006-01"}, Freq: calendar.Monthly,
	})
	if err != nil {
		return nil, err
	}
	lines = subset(lines, opt)
	if len(lines) == 0 {
		return nil, errors.New("no product line left to plan")
	}
	fmt.Fprintf(w, "Garden supplies (invented data): %d product lines, %s to %s\n\n",
		len(lines), lines[0].Start.Format("Jan 2006"), lines[0].End().Format("Jan 2006"))

	// 2. Repair gaps before adding the lines up, so that categories and
	// the total are sums of the same values the products are fitted to.
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

	// 4. The plan made as of December of each earlier year, scored on the
	// year after.
	check, err := backtestPlan(ctx, st, nodes, opt)
	if err != nil {
		return nil, fmt.Errorf("backtest of the plan: %w", err)
	}
	printCheck(w, st, check)
	if opt.Compare {
		if err := compareVariants(ctx, w, st, nodes, opt, check); err != nil {
			return nil, fmt.Errorf("backtest of the plan: %w", err)
		}
	}

	// 5. The plan: every node forecast by Pilot, bands calibrated on the
	// catalogue's pooled errors, reconciled with joint sample paths.
	fits, rec, err := makePlan(ctx, st, nodes, opt)
	if err != nil {
		return nil, err
	}

	// 6. The plan, and a review page to look at it series by series.
	printPlan(w, st, nodes, fits, rec)
	cmp, err := scoreAgainstBenchmarks(ctx, nodes, check)
	if err != nil {
		return nil, fmt.Errorf("backtest against the benchmarks: %w", err)
	}
	page, err := writeReview(opt.ReviewDir, st, nodes, fits, rec, check, cmp, repairs)
	if err != nil {
		return nil, fmt.Errorf("review page: %w", err)
	}
	fmt.Fprintf(w, "\nReview page (charts, models, backtest and flags for every series): %s\n", page)
	return &plan{structure: st, nodes: nodes, fits: fits, forecasts: rec, check: check, scored: cmp}, nil
}

// makePlan fits Pilot to every node (in parallel; the results do not
// depend on the number of workers), pools the calibration errors across
// the nodes, and returns the fits and the reconciled forecasts of the
// next horizon months with an 80% band.
func makePlan(ctx context.Context, st reconcile.Structure, nodes []almanac.Series, opt options) ([]almanac.BatchResult, []almanac.Forecast, error) {
	model := accuracy.Pilot{Seed: seed, Paths: opt.Paths, Uncalibrated: opt.uncalibrated}
	fits, err := almanac.BatchFit(ctx, model, nodes, almanac.BatchOptions{})
	if err != nil {
		return nil, nil, err
	}
	// Each series has only a few out-of-sample errors of its own; the
	// bands learn their spread from the whole catalogue's.
	fits, err = accuracy.PoolPilots(fits, accuracy.PoolOptions{})
	if err != nil {
		return nil, nil, err
	}
	// Joint sample paths (the default draw): each node keeps its own
	// calibrated spread over the months, and the nodes are tied together
	// by resampling whole months of their in-sample errors, so a total's
	// band knows that its parts tend to err together.
	rec, err := reconcile.FromBatch(ctx, st, fits, horizon, reconcile.Spec{
		Method: reconcile.MethodMinTShrink, NonNegative: true, Paths: opt.Paths, Seed: seed, Draw: opt.draw,
	}, level)
	if err != nil {
		return nil, nil, err
	}
	return fits, rec, nil
}

// subset keeps the categories and lines opt asks for.
func subset(lines []almanac.Series, opt options) []almanac.Series {
	if opt.LinesPerCategory == 0 && opt.Categories == nil {
		return lines
	}
	var out []almanac.Series
	perCategory := map[string]int{}
	for _, y := range lines {
		category, _, _ := strings.Cut(y.Key, "/")
		if opt.Categories != nil && !slices.Contains(opt.Categories, category) {
			continue
		}
		if opt.LinesPerCategory > 0 && perCategory[category] >= opt.LinesPerCategory {
			continue
		}
		perCategory[category]++
		out = append(out, y)
	}
	return out
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
	nodes, err := reconcile.Aggregate(st, bottom)
	if err != nil {
		return nil, err
	}
	for i := range nodes {
		nodes[i].Key = strings.TrimPrefix(nodes[i].Key, "total/")
	}
	return nodes, nil
}

func label(key string) string {
	if key == "total" {
		return "all products"
	}
	return key
}

func printPlan(w io.Writer, st reconcile.Structure, nodes []almanac.Series, fits []almanac.BatchResult, rec []almanac.Forecast) {
	year := rec[0].Start.Year()
	fmt.Fprintf(w, "Plan for %d: units, reconciled so products add up to categories and the total\n", year)
	fmt.Fprintf(w, "%-18s %10s %10s  %-19s %s\n", "", "last year", "next year", fmt.Sprintf("%.0f%% band", level), "models averaged")
	for i, y := range nodes {
		last := sum(y.Values[y.Len()-12:])
		next := sum(rec[i].Mean)
		lo, hi := yearBand(rec[i])
		indent := strings.Repeat("  ", st.Level(i))
		fmt.Fprintf(w, "%-18s %10.0f %10.0f  %-19s %s\n",
			indent+shortName(label(y.Key)), last, next, fmt.Sprintf("%.0f to %.0f", lo, hi), models(fits[i].Fitted))
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

// yearBand returns the central band of the horizon's total, from the
// reconciled sample paths (so the months' joint uncertainty is respected).
func yearBand(f almanac.Forecast) (lo, hi float64) {
	ps := f.SamplePaths()
	yd := &almanac.Sample{Paths: make([][]float64, len(ps))}
	for i, p := range ps {
		yd.Paths[i] = []float64{sum(p)}
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

// models lists the models the automatic forecaster combined for a
// series, or its model when it used one.
func models(f almanac.Fitted) string {
	if pf, ok := f.(*accuracy.PilotFit); ok {
		if m := pf.Report().Members; len(m) > 0 {
			return strings.Join(m, ", ")
		}
	}
	return f.String()
}
