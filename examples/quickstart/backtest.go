package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/reconcile"
)

// bandCheck is the backtest of the plan: the plan remade as of December
// of each of several years and scored on the year after.
type bandCheck struct {
	origins []originScore // oldest first
	levels  []levelScore  // one per level of the hierarchy, then every series
}

// originScore is the plan made with the data up to one origin, beside
// what happened in the following horizon months.
type originScore struct {
	origin    time.Time          // the last month fitted
	forecasts []almanac.Forecast // reconciled, per node
	actual    [][]float64        // the next horizon months, per node
	total     []float64          // actual annual total, per node
	lo, hi    []float64          // 80% band of the annual total, per node
	inside    []bool             // the annual total fell inside its band
	months    []int              // months inside their 80% band, per node
	lastYear  []float64          // the total of the 12 months up to the origin
}

// levelScore sums a level's node-years over the origins.
type levelScore struct {
	name         string
	nodes        int
	years        int     // node-years scored
	yearsInside  int     // annual totals inside their 80% band
	months       int     // node-months scored
	monthsInside int     // months inside their 80% band
	pctErr       float64 // mean absolute % error of the annual totals
	bias         float64 // mean % error (forecast − outcome) of the annual totals
	naivePctErr  float64 // the same for "as much as the year before"
}

// backtestPlan remakes the plan (makePlan: Pilot, pooled calibration,
// joint reconciliation) as of December of each of the opt.Origins years
// before the last year of data and scores its forecast of the following
// twelve months.
func backtestPlan(ctx context.Context, st reconcile.Structure, nodes []almanac.Series, opt options) (*bandCheck, error) {
	n := nodes[0].Len()
	if opt.Origins < 1 {
		return nil, fmt.Errorf("%w: %d backtest origins", almanac.ErrInvalid, opt.Origins)
	}
	// The earliest origin keeps at least three years to fit to.
	if first := n - horizon*opt.Origins; first < 36 {
		return nil, fmt.Errorf("%w: %d months of data leave %d to fit to at the earliest of %d yearly origins, want at least 36",
			almanac.ErrTooShort, n, first, opt.Origins)
	}
	check := &bandCheck{}
	for k := opt.Origins; k >= 1; k-- {
		end := n - horizon*k
		train := make([]almanac.Series, len(nodes))
		for i, y := range nodes {
			train[i] = y.Window(0, end)
		}
		_, rec, err := makePlan(ctx, st, train, opt)
		if err != nil {
			return nil, fmt.Errorf("origin %s: %w", train[0].End().Format("Jan 2006"), err)
		}
		o := originScore{origin: train[0].End(), forecasts: rec}
		for i, y := range nodes {
			future := y.Values[end : end+horizon]
			lo, hi := yearBand(rec[i])
			total := sum(future)
			mlo, mhi, err := rec[i].Bounds(level)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", y.Key, err)
			}
			in := 0
			for h, v := range future {
				if v >= mlo[h] && v <= mhi[h] {
					in++
				}
			}
			o.actual = append(o.actual, future)
			o.total = append(o.total, total)
			o.lo, o.hi = append(o.lo, lo), append(o.hi, hi)
			o.inside = append(o.inside, total >= lo && total <= hi)
			o.months = append(o.months, in)
			o.lastYear = append(o.lastYear, sum(y.Values[end-12:end]))
		}
		check.origins = append(check.origins, o)
	}
	check.levels = scoreLevels(st, check.origins)
	return check, nil
}

// scoreLevels adds up the origins' scores per level of st, then over
// every node.
func scoreLevels(st reconcile.Structure, origins []originScore) []levelScore {
	names := []string{"all products", "categories", "product lines"}
	var out []levelScore
	for lv := range st.NumLevels() + 1 {
		var nodes []int
		s := levelScore{name: "every series"}
		if lv < st.NumLevels() {
			nodes = st.LevelNodes(lv)
			s.name = fmt.Sprintf("level %d", lv)
			if lv < len(names) {
				s.name = names[lv]
			}
		} else {
			for i := range st.Len() {
				nodes = append(nodes, i)
			}
		}
		s.nodes = len(nodes)
		pct := 0
		for _, o := range origins {
			for _, i := range nodes {
				s.years++
				if o.inside[i] {
					s.yearsInside++
				}
				s.months += len(o.actual[i])
				s.monthsInside += o.months[i]
				if o.total[i] > 0 {
					e := (sum(o.forecasts[i].Mean) - o.total[i]) / o.total[i]
					s.pctErr += math.Abs(e)
					s.bias += e
					s.naivePctErr += math.Abs(o.lastYear[i]-o.total[i]) / o.total[i]
					pct++
				}
			}
		}
		if pct > 0 { // else no annual total was positive: nothing to divide by
			s.pctErr, s.bias, s.naivePctErr = 100*s.pctErr/float64(pct), 100*s.bias/float64(pct), 100*s.naivePctErr/float64(pct)
		}
		out = append(out, s)
	}
	return out
}

// printCheck prints the backtest of the plan: per level, the share of
// annual totals and of months that fell inside their 80% bands, and how
// far the annual totals were off.
func printCheck(w io.Writer, st reconcile.Structure, c *bandCheck) {
	var when []string
	for _, o := range c.origins {
		when = append(when, o.origin.Format("Jan 2006"))
	}
	fmt.Fprintf(w, "Do the plan's bands hold? The plan remade with the data up to %s,\n", joinAnd(when))
	fmt.Fprintf(w, "each time forecasting the next %d months, beside what was then sold\n", horizon)
	fmt.Fprintf(w, "  %-15s %6s  %-26s %-24s %s\n", "", "series",
		fmt.Sprintf("year's total in %.0f%% band", level), fmt.Sprintf("months in %.0f%% band", level), "year's total off by (mean)")
	fmt.Fprintf(w, "  %-15s %6s  %-26s %-24s %8s %8s %9s\n", "", "", "", "", "plan", "signed", "as 1y ago")
	for _, s := range c.levels {
		fmt.Fprintf(w, "  %-15s %6d  %-26s %-24s %7.1f%% %+7.1f%% %8.1f%%\n", s.name, s.nodes,
			share(s.yearsInside, s.years), share(s.monthsInside, s.months), s.pctErr, s.bias, s.naivePctErr)
	}
	fmt.Fprintf(w, "  annual totals inside by origin:")
	for _, o := range c.origins {
		in := 0
		for _, ok := range o.inside {
			if ok {
				in++
			}
		}
		fmt.Fprintf(w, "  %s %d of %d", o.origin.Format("Jan 2006"), in, len(o.inside))
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "  (an %.0f%% band should hold about %.0f%% of outcomes; 70%% to 90%% of node-years is the aim at every level)\n\n", level, level)
}

func share(k, n int) string {
	return fmt.Sprintf("%d of %d (%.0f%%)", k, n, 100*float64(k)/float64(n))
}

func joinAnd(xs []string) string {
	switch len(xs) {
	case 0:
		return ""
	case 1:
		return xs[0]
	}
	return strings.Join(xs[:len(xs)-1], ", ") + " and " + xs[len(xs)-1]
}

// compareVariants backtests the plan made with the models' own bands and
// with independent paths, and prints per level how many annual totals
// fell inside their bands, beside the plan's own way (c).
func compareVariants(ctx context.Context, w io.Writer, st reconcile.Structure, nodes []almanac.Series, opt options, c *bandCheck) error {
	variants := []struct {
		name string
		opt  options
	}{
		{"models' own bands, joint paths", opt},
		{"calibrated bands, independent paths", opt},
	}
	variants[0].opt.uncalibrated = true
	variants[1].opt.draw = reconcile.IndependentPaths
	checks := []*bandCheck{c}
	for _, v := range variants {
		vc, err := backtestPlan(ctx, st, nodes, v.opt)
		if err != nil {
			return fmt.Errorf("%s: %w", v.name, err)
		}
		checks = append(checks, vc)
	}
	fmt.Fprintf(w, "The same backtest made other ways: year's totals inside their %.0f%% bands\n", level)
	row := func(name string, cells []string) {
		line := fmt.Sprintf("  %-38s", name)
		for _, c := range cells {
			line += fmt.Sprintf(" %-17s", c)
		}
		fmt.Fprintln(w, strings.TrimRight(line, " "))
	}
	var names []string
	for _, s := range c.levels {
		names = append(names, s.name)
	}
	row("", names)
	for k, name := range []string{"the plan (calibrated, joint paths)", variants[0].name, variants[1].name} {
		var cells []string
		for _, s := range checks[k].levels {
			cells = append(cells, share(s.yearsInside, s.years))
		}
		row(name, cells)
	}
	fmt.Fprintln(w)
	return nil
}

// planCandidate is the name of the plan's run in the per-series backtest.
const planCandidate = "plan"

// scoreAgainstBenchmarks scores, series by series, the forecasts the
// backtest of the plan made (reconciled, calibrated) against the naive
// and seasonal naive benchmarks at the same origins, with
// accuracy.Backtest, for the review page. Nothing is refitted but the
// benchmarks: the plan's run replays the forecasts backtestPlan made.
func scoreAgainstBenchmarks(ctx context.Context, nodes []almanac.Series, c *bandCheck) (*accuracy.BatchComparison, error) {
	r := replay{}
	for _, o := range c.origins {
		for i, y := range nodes {
			if r[y.Key] == nil {
				r[y.Key] = map[time.Time]almanac.Forecast{}
			}
			r[y.Key][o.origin] = o.forecasts[i]
		}
	}
	// The same origins as backtestPlan: the last a year before the end
	// of the data, one year apart.
	bt := accuracy.Backtest{Horizon: horizon, Origins: len(c.origins), Step: 12, Levels: []float64{level}}
	return bt.RunBatch(ctx, nodes, accuracy.Candidate{Name: planCandidate, Model: r})
}

// replay is an almanac.Model that returns, for a series fitted up to a
// backtest origin, the forecast the plan made there: by series key, then
// by the time of the last observation.
type replay map[string]map[time.Time]almanac.Forecast

func (r replay) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if y.Len() == 0 {
		return nil, fmt.Errorf("%w: series %q", almanac.ErrEmpty, y.Key)
	}
	fc, ok := r[y.Key][y.End()]
	if !ok {
		return nil, fmt.Errorf("%w: no plan was made for %q with the data up to %s", almanac.ErrNotFitted, y.Key, y.End().Format("Jan 2006"))
	}
	return replayed{fc: fc, n: y.Len()}, nil
}

// replayed is a forecast made earlier, as an almanac.Fitted.
type replayed struct {
	fc almanac.Forecast
	n  int
}

// Forecast returns the first h steps of the plan's forecast, with bands
// from its sample paths.
func (r replayed) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, err
	}
	if h > len(r.fc.Mean) {
		return almanac.Forecast{}, fmt.Errorf("%w: the plan forecast %d months, not %d", almanac.ErrHorizon, len(r.fc.Mean), h)
	}
	paths := r.fc.SamplePaths()
	cut := make([][]float64, len(paths))
	for k, p := range paths {
		cut[k] = p[:h:h]
	}
	return almanac.NewForecast(r.fc.Start, r.fc.Freq, r.fc.Mean[:h:h], &almanac.Sample{Paths: cut}, levels...)
}

// FittedValues has nothing to give: the plan's one-step fits belong to
// the models behind it.
func (r replayed) FittedValues() []float64 { return nanSlice(r.n) }

// Residuals: see FittedValues.
func (r replayed) Residuals() []float64 { return nanSlice(r.n) }

func (r replayed) String() string { return "reconciled plan" }

func nanSlice(n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = math.NaN()
	}
	return out
}
