// Weekly: a quarter's plan for an invented ferry operator whose traffic is
// shaped by regional holidays and one-off disruptions.
//
// Gullwater Ferries (invented, like every number here) runs four routes in
// two regions with different public-holiday calendars: Northreach (N1
// Harbour Loop, a commuter route; N2 Skerry Run, a leisure route) and
// Southholm (S1 Tidewater Crossing, commuter; S2 Lantern Bay, leisure).
// Five years of weekly boardings (ISO weeks, stamped on Mondays, March 2021
// to February 2026) are generated deterministically from a fixed seed
// (scenario.go), with:
//
//   - holidays: fixed dates moved off weekends, Easter-relative days,
//     nth-weekday days and a one-off span (two days off for a bridge
//     opening), which cut commuter traffic and lift leisure traffic;
//   - a summer season;
//   - quay works that stopped most S1 sailings for five weeks in autumn 2023;
//   - a one-week lantern festival on S2 in August 2024;
//   - a temporary reclassification: from March to July 2024 passengers
//     boarding at Gull Point were counted under N2 instead of N1;
//   - S2's data arrive from a partner's system in seat-kilometres, a unit
//     whose factor to boardings nobody documented.
//
// The program
//
//  1. builds each region's calendar with package calendar and the
//     regressors on a calendar.Grid (holiday days per week, the events as a
//     pulse or temporary shifts, Fourier terms of the year), future weeks
//     included;
//  2. defines its own almanac.Model, calendarARIMA (model.go), a regression
//     with ARIMA errors on those regressors that builds them for whatever
//     weeks it is fitted on, and prints the effects it recovers;
//  3. backtests it against an STL-based alternative (exponential smoothing
//     of the seasonally adjusted series, since ETS cannot take a 52-week
//     season) and the naive benchmarks, and says which wins per route;
//  4. shows that S2's forecasts do not depend on the unit its data arrive
//     in;
//  5. prints the plan for the next 13 weeks with 80% bands, holiday weeks
//     flagged.
//
// Run it from the repository root with: go -C examples run ./weekly
//
// It takes about a second (main_test.go about 15–20 s under -race), on a
// 2-core machine shared with other jobs, so the figures are indicative.
package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/smoothing"
)

const (
	horizon   = 13   // weeks ahead: one quarter
	level     = 80.0 // prediction-interval level, percent
	harmonics = 3    // Fourier pairs for the annual cycle
)

func main() {
	if _, err := run(context.Background(), os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "weekly:", err)
		os.Exit(1)
	}
}

// model returns the calendar model of a region's routes.
func model(reg region) calendarARIMA {
	return calendarARIMA{
		Cal: reg.Cal, Events: reg.Events, Harmonics: harmonics, MaxHorizon: horizon,
		// The annual cycle is in the Fourier terms: no seasonal ARIMA
		// part (a 52-week seasonal state would be slow and is not needed).
		Search: arima.Search{MaxP: 3, MaxQ: 3, MaxSP: -1, MaxSQ: -1, SD: arima.NoDifferencing},
	}
}

// plain is the alternative without calendar knowledge: STL (robust, as
// the shutdown is an outlier to it) and automatic non-seasonal exponential
// smoothing of the seasonally adjusted series.
var plain = decompose.Forecaster{
	Model:  smoothing.Select{Seasons: []smoothing.SeasonType{smoothing.NoSeason}},
	Method: decompose.STL{Robust: true},
}

// result is what run produces, kept for the test.
type result struct {
	regions   []region
	routes    []route
	series    []almanac.Series
	fits      []*calendarFit
	forecasts []almanac.Forecast
	winners   []string
	// scaleDiff is the largest relative difference between S2's forecasts
	// (points and bounds) fitted in the delivered unit and fitted on an
	// index (mean 100), brought back to the delivered unit.
	scaleDiff float64
}

func run(ctx context.Context, w io.Writer) (*result, error) {
	regs, rs := regions(), routes()
	ys, err := generate(regs, rs)
	if err != nil {
		return nil, err
	}
	fmt.Fprintf(w, "Gullwater Ferries (invented data): %d routes, %d weeks, %s to %s\n\n",
		len(ys), ys[0].Len(), isoWeek(ys[0].Start), isoWeek(ys[0].End()))

	// 1. The calendars and the regressors of the plan period.
	if err := printCalendars(w, regs); err != nil {
		return nil, err
	}

	// 2. Fit the calendar model on all the history, one region's routes
	// at a time with BatchFit (they share the model), and show what it
	// found.
	res := &result{regions: regs, routes: rs, series: ys, fits: make([]*calendarFit, len(rs))}
	for g, reg := range regs {
		var idx []int
		var batch []almanac.Series
		for r, rt := range rs {
			if rt.Region == g {
				idx = append(idx, r)
				batch = append(batch, ys[r])
			}
		}
		out, err := almanac.BatchFit(ctx, model(reg), batch, almanac.BatchOptions{})
		if err != nil {
			return nil, fmt.Errorf("fitting %s: %w", reg.Name, err)
		}
		for k, b := range out {
			if b.Err != nil {
				return nil, fmt.Errorf("fitting %s: %w", b.Key, b.Err)
			}
			cf, ok := b.Fitted.(*calendarFit)
			if !ok {
				return nil, fmt.Errorf("fitting %s: unexpected %T", b.Key, b.Fitted)
			}
			res.fits[idx[k]] = cf
		}
	}
	fmt.Fprintln(w, "What the calendar explains (per week, in the route's unit; ± one standard error)")
	for r, rt := range rs {
		cf := res.fits[r]
		fmt.Fprintf(w, "  %s %-19s %s\n", rt.Key, rt.Name, shortModel(cf))
		names := []string{holidayColumn}
		for _, e := range regs[rt.Region].Events {
			names = append(names, e.Name)
		}
		for _, name := range names {
			v, se, ok := cf.effect(name)
			if !ok {
				fmt.Fprintf(w, "      %-30s not estimable from this history\n", name)
				continue
			}
			fmt.Fprintf(w, "      %-30s %+9.1f ± %6.1f %s\n", name, v, se, rt.Unit)
		}
	}
	fmt.Fprintln(w)

	// 3. Backtest: three origins a quarter apart, 13 weeks each.
	bt := accuracy.Backtest{Horizon: horizon, Origins: 3, Step: horizon, Levels: []float64{level}}
	var summary []string
	for r, rt := range rs {
		c, err := bt.Run(ctx, ys[r],
			accuracy.Candidate{Name: "calendar ARIMA", Model: model(regs[rt.Region])},
			accuracy.Candidate{Name: "STL + ETS", Model: plain},
		)
		if err != nil {
			return nil, fmt.Errorf("backtesting %s: %w", rt.Key, err)
		}
		fmt.Fprintf(w, "Backtest of %s %s (3 origins x 13 weeks)\n", rt.Key, rt.Name)
		if err := c.WriteText(w); err != nil {
			return nil, err
		}
		best, bestMASE := "", math.Inf(1)
		for _, run := range c.Runs {
			if m := run.Overall.MASE; m < bestMASE {
				best, bestMASE = run.Name, m
			}
		}
		if best == "" {
			return nil, fmt.Errorf("backtesting %s: no candidate has a defined MASE", rt.Key)
		}
		res.winners = append(res.winners, best)
		var others []string
		for _, run := range c.Runs {
			if run.Name != best {
				others = append(others, fmt.Sprintf("%s %.2f", run.Name, run.Overall.MASE))
			}
		}
		summary = append(summary, fmt.Sprintf("  %s %-19s %-15s MASE %.2f (%s)", rt.Key, rt.Name, best, bestMASE, strings.Join(others, ", ")))
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w, "Winner per route (lowest MASE over the backtest)")
	for _, line := range summary {
		fmt.Fprintln(w, line)
	}
	fmt.Fprintln(w)

	// 4. The plan: forecasts from the calendar model fitted on everything.
	for r := range rs {
		fc, err := res.fits[r].Forecast(horizon, level)
		if err != nil {
			return nil, fmt.Errorf("forecasting %s: %w", rs[r].Key, err)
		}
		res.forecasts = append(res.forecasts, fc)
	}

	// 5. Scale: refit S2 on an index (mean 100) instead of its unknown unit.
	for r, rt := range rs {
		if rt.Unit == "boardings" {
			continue
		}
		d, err := scaleCheck(ctx, model(regs[rt.Region]), ys[r], res.forecasts[r])
		if err != nil {
			return nil, err
		}
		res.scaleDiff = d
		fmt.Fprintf(w, "%s arrives in %s, whose factor to boardings is unknown. Fitted instead on an index\n", rt.Key, rt.Unit)
		fmt.Fprintf(w, "(mean 100) and scaled back, its forecasts and bands differ by at most %.1e (relative):\n", d)
		fmt.Fprintln(w, "the unit does not matter, so the plan keeps the delivered unit.")
		fmt.Fprintln(w)
	}

	if err := printPlan(w, res); err != nil {
		return nil, err
	}
	return res, nil
}

// scaleCheck fits m on y divided by its mean over 100 and returns the
// largest relative difference between the rescaled forecasts (points and
// bounds) and fc, m's forecasts fitted on y itself.
func scaleCheck(ctx context.Context, m almanac.Model, y almanac.Series, fc almanac.Forecast) (float64, error) {
	mean := 0.0
	for _, v := range y.Values {
		mean += v
	}
	mean /= float64(y.Len())
	k := mean / 100
	idx := y.Clone()
	for i := range idx.Values {
		idx.Values[i] /= k
	}
	fit, err := m.Fit(ctx, idx)
	if err != nil {
		return 0, fmt.Errorf("fitting %s as an index: %w", y.Key, err)
	}
	fi, err := fit.Forecast(horizon, level)
	if err != nil {
		return 0, fmt.Errorf("forecasting %s as an index: %w", y.Key, err)
	}
	lo, hi, err := fc.Bounds(level)
	if err != nil {
		return 0, err
	}
	ilo, ihi, err := fi.Bounds(level)
	if err != nil {
		return 0, err
	}
	worst := 0.0
	for _, p := range [][2][]float64{{fc.Mean, fi.Mean}, {lo, ilo}, {hi, ihi}} {
		for h := range p[0] {
			d := math.Abs(p[1][h]*k-p[0][h]) / math.Abs(p[0][h])
			worst = math.Max(worst, d)
		}
	}
	return worst, nil
}

// printCalendars lists each region's holidays in the plan period.
func printCalendars(w io.Writer, regs []region) error {
	from := calendar.Weekly.Add(lastWeek, 1)
	to := calendar.Weekly.Add(lastWeek, horizon).AddDate(0, 0, 6)
	fmt.Fprintf(w, "Holidays in the plan period (%s to %s)\n", from.Format("2 Jan"), to.Format("2 Jan 2006"))
	for _, reg := range regs {
		occ, err := reg.Cal.Occurrences(from, to)
		if err != nil {
			return err
		}
		var parts []string
		for _, o := range occ {
			parts = append(parts, fmt.Sprintf("%s %s", o.Name, o.Date.Format("Mon 2 Jan")))
		}
		fmt.Fprintf(w, "  %-11s %s\n", reg.Name, strings.Join(parts, "; "))
	}
	fmt.Fprintln(w)
	return nil
}

// printPlan writes the 13-week plan: one row per week, one column per
// route with the point forecast and its band, and the holidays of the week.
func printPlan(w io.Writer, res *result) error {
	rs, regs := res.routes, res.regions
	fmt.Fprintf(w, "Plan for the next %d weeks: point forecast and %.0f%% band per route (S2 in %s);\n", horizon, level, rs[3].Unit)
	fmt.Fprintln(w, "a * marks a route whose region has a holiday that week")
	fmt.Fprintf(w, "%-8s %-6s", "week", "Monday")
	for _, rt := range rs {
		fmt.Fprintf(w, " | %-21s", rt.Key+" "+rt.Name)
	}
	fmt.Fprintln(w, " | holidays")
	// Holiday days per future week and region, on a grid of no history
	// and the plan's weeks.
	regionHol := make([][]float64, len(regs))
	for g, reg := range regs {
		grid := calendar.Grid{Start: calendar.Weekly.Add(lastWeek, 1), Freq: calendar.Weekly, H: horizon}
		hol, err := grid.Holidays(reg.Cal)
		if err != nil {
			return err
		}
		regionHol[g] = hol
	}
	bands := make([][2][]float64, len(rs))
	for r := range rs {
		lo, hi, err := res.forecasts[r].Bounds(level)
		if err != nil {
			return err
		}
		bands[r] = [2][]float64{lo, hi}
	}
	for h := range horizon {
		monday := res.forecasts[0].Time(h)
		fmt.Fprintf(w, "%-8s %-6s", isoWeek(monday), monday.Format("2 Jan"))
		for r, rt := range rs {
			flag := " "
			if regionHol[rt.Region][h] > 0 {
				flag = "*"
			}
			cell := fmt.Sprintf("%6.0f%s %5.0f-%-5.0f", res.forecasts[r].Mean[h], flag, bands[r][0][h], bands[r][1][h])
			fmt.Fprintf(w, " | %-21s", cell)
		}
		var names []string
		for _, reg := range regs {
			occ, err := reg.Cal.Occurrences(monday, monday.AddDate(0, 0, 6))
			if err != nil {
				return err
			}
			for _, o := range occ {
				names = append(names, reg.Tag+": "+o.Name)
			}
		}
		fmt.Fprintln(w, strings.TrimRight(" | "+strings.Join(names, ", "), " "))
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "The bands carry the uncertainty of the ARIMA errors given the calendar; they")
	fmt.Fprintln(w, "assume no new disruption. Read them with the backtest above before relying on a route.")
	return nil
}

// isoWeek formats the ISO week of t, e.g. "2026-W10".
func isoWeek(t time.Time) string {
	y, wk := calendar.ISOWeek(t)
	return fmt.Sprintf("%d-W%02d", y, wk)
}

// shortModel is the fitted model's notation without the list of
// regressors, which the table below it shows.
func shortModel(f *calendarFit) string {
	s := f.Fitted.String()
	if i := strings.Index(s, " + regressors("); i >= 0 {
		s = s[:i] + " + calendar regressors"
	}
	return s
}
