// Reviewpage writes the review page of a small batch run: the monthly
// units of nine product groups of an invented chain of hardware stores,
// January 2020 to December 2025. The data are invented here, with a
// seeded generator: seasonal lines, a line with three months lost in a
// till outage, a line whose sales jumped in the last year, a line
// launched eighteen months ago, and a line with no sales recorded at all.
//
// The run is deliberately cheap — the drift method against the naive and
// seasonal naive benchmarks, the best of the three in a backtest chosen
// per line — so that the page, and the browser test that opens it, take
// seconds. The quickstart writes the same kind of page for a run with
// automatic exponential smoothing and ARIMA.
//
// Run it from the repository root with
//
//	go -C examples run ./reviewpage -out /tmp/hardware
//
// and open the file it names in a browser.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
)

func main() {
	out := flag.String("out", filepath.Join(os.TempDir(), "almanac-reviewpage"), "directory to write review.html into")
	flag.Parse()
	path, err := write(context.Background(), *out)
	if err != nil {
		fmt.Fprintln(os.Stderr, "reviewpage:", err)
		os.Exit(1)
	}
	fmt.Println("review page:", path)
}

// write builds the review and writes it to dir/review.html.
func write(ctx context.Context, dir string) (string, error) {
	r, err := build(ctx)
	if err != nil {
		return "", err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return "", err
	}
	path := filepath.Join(dir, "review.html")
	f, err := os.Create(path)
	if err != nil {
		return "", err
	}
	if err := accuracy.WriteReview(f, r); err != nil {
		f.Close()
		return "", err
	}
	return path, f.Close()
}

// line is an invented product group: level, monthly trend, size of the
// seasonal swing and the month of its peak (0 = January).
type line struct {
	key                 string
	level, trend, swing float64
	peak                int
}

var lines = []line{
	{"paint", 420, 0.4, 60, 4},
	{"fasteners", 900, 2.5, 0, 0},
	{"garden tools", 260, 0.3, 140, 3},
	{"ladders", 140, 0.1, 30, 5},
	{"heaters", 180, 0, 120, 11},
	{"grills", 90, 0.2, 70, 6},
	{"snow shovels", 40, 0, 38, 0},
	{"smart locks", 60, 1.5, 5, 10},
	{"gift wrap", 0, 0, 0, 0},
}

// history invents the 72 months of every line.
func history() []almanac.Series {
	start := time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC)
	rng := rand.New(rand.NewPCG(2020, 1))
	out := make([]almanac.Series, len(lines))
	for k, l := range lines {
		v := make([]float64, 72)
		for i := range v {
			season := l.swing * math.Cos(2*math.Pi*float64(i-l.peak)/12)
			v[i] = math.Max(0, math.Round(l.level+l.trend*float64(i)+season+0.06*l.level*rng.NormFloat64()))
		}
		switch l.key {
		case "ladders": // a till outage lost three months
			v[44], v[45], v[46] = math.NaN(), math.NaN(), math.NaN()
		case "heaters": // a cold last year: sales well above the years before
			for i := 60; i < 72; i++ {
				v[i] += 90
			}
		case "smart locks": // launched in July 2024
			for i := range 54 {
				v[i] = math.NaN()
			}
		case "gift wrap": // sold, but never recorded
			for i := range v {
				v[i] = math.NaN()
			}
		}
		out[k] = almanac.Series{Key: l.key, Start: start, Freq: calendar.Monthly, Values: v}
	}
	return out
}

// candidates are the methods compared; the best in the backtest makes
// each line's forecast.
var candidates = map[string]almanac.Model{
	"drift":                    almanac.Drift{},
	accuracy.NaiveName:         almanac.Naive{},
	accuracy.SeasonalNaiveName: almanac.SeasonalNaive{},
}

const (
	horizon = 12
	route   = "best of three in backtest"
)

// build runs the batch and returns its review.
func build(ctx context.Context) (accuracy.Review, error) {
	ys := history()
	entries := make([]accuracy.ReviewSeries, len(ys))
	var repairs [][]decompose.Change
	for i, y := range ys {
		// Leading months before a launch are not gaps; trim them.
		first := 0
		for first < y.Len() && math.IsNaN(y.Values[first]) {
			first++
		}
		if first == y.Len() {
			repairs = append(repairs, nil)
			continue
		}
		ys[i] = y.Window(first, y.Len())
		var changes []decompose.Change
		if ys[i].Missing() > 0 {
			filled, ch, err := decompose.Repair{}.Fill(ys[i])
			if err != nil {
				return accuracy.Review{}, err
			}
			ys[i], changes = filled, ch
		}
		repairs = append(repairs, changes)
	}

	bt := accuracy.Backtest{Horizon: 6, Origins: 4, Step: 3, Levels: []float64{80, 95}}
	cmp, err := bt.RunBatch(ctx, ys, accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil && !errors.Is(err, accuracy.ErrBacktest) {
		return accuracy.Review{}, err
	}
	for i, y := range ys {
		e := accuracy.ReviewSeries{Key: y.Key, History: y, Repairs: repairs[i], Route: route}
		if cmp != nil {
			e.Backtest = cmp.Series[i]
			for _, f := range cmp.Failed {
				if f.Index == i {
					e.BacktestErr, e.Backtest = f.Err, nil
				}
			}
		}
		name := best(e.Backtest)
		if name == "" {
			// No backtest: the seasonal naive method when there are two
			// years to take the season from, the naive method otherwise.
			name = accuracy.SeasonalNaiveName
			if y.Len() < 24 {
				e.Fallbacks = append(e.Fallbacks, fmt.Sprintf("seasonal naive needs two years of data, %d months are recorded: the naive method forecasts instead", y.Len()))
				name = accuracy.NaiveName
			}
			e.Route = "no backtest: a benchmark"
		} else {
			e.Chosen = name
		}
		fit, err := candidates[name].Fit(ctx, y)
		if err != nil {
			e.Err = err
			entries[i] = e
			continue
		}
		fc, err := fit.Forecast(horizon, 80, 95)
		if err != nil {
			e.Err = err
			entries[i] = e
			continue
		}
		e.Forecast, e.Fitted, e.Model = fc, fit.FittedValues(), fit.String()
		entries[i] = e
	}
	return accuracy.Review{
		Title:  "Hardware stores: monthly units by product group",
		About:  "Invented data: nine product groups of a fictional chain of hardware stores, January 2020 to December 2025. Each line is forecast by whichever of the drift, naive and seasonal naive methods had the lowest scaled error in a backtest of four origins, six months ahead each.",
		Series: entries,
	}, nil
}

// best returns the run of c with the lowest scaled error, or "".
func best(c *accuracy.Comparison) string {
	if c == nil {
		return ""
	}
	name, low := "", math.Inf(1)
	for _, r := range c.Runs {
		if m := r.Overall.MASE; m < low {
			name, low = r.Name, m
		}
	}
	return name
}
