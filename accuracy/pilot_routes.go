package accuracy

import (
	"context"
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/seasonal"
	"github.com/almanac-go/almanac/smoothing"
)

// stage is one step of Pilot's plan for a series: a route and how to fit
// it.
type stage struct {
	route         Route
	periods       []float64
	needsComplete bool // gaps are repaired before this stage
	fit           func(ctx context.Context, y almanac.Series) (almanac.Fitted, error)
	// rolls says that the route's fit can be brought forward to a longer
	// series without re-estimation (a combination of ETS, ARIMA and
	// Theta), so calibrating it is cheap; the other routes refit at each
	// calibration origin and calibrate on fewer of them.
	rolls bool
}

// Fit makes a stage an almanac.Model, for Calibrated.
func (st stage) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	return st.fit(ctx, y)
}

// routeOpts are the options every route passes to its combinations.
type routeOpts struct {
	seed  uint64
	paths int
}

// maxCombinationPeriod is the largest whole period the combination
// route models with seasonal ETS and ARIMA terms (smoothing.MaxPeriod);
// longer cycles go by decomposition.
const maxCombinationPeriod = smoothing.MaxPeriod

// planRoutes lists the stages to try for y, best first, ending with the
// benchmarks; decisions taken before fitting (a cycle the series is too
// short for) are recorded in rep.Fallbacks.
func planRoutes(y almanac.Series, rep *PilotReport, o routeOpts) []stage {
	var plan []stage
	n := y.Len() - y.Missing()
	periods := y.Freq.SeasonalPeriods()
	if rep.Demand.Intermittent() {
		if m := y.Period(); m >= 2 && cyclic(y, m) {
			rep.Fallbacks = append(rep.Fallbacks, fmt.Sprintf("%v: %v demand, but with a significant cycle of %d periods", RouteIntermittent, rep.Demand, m))
		} else {
			plan = append(plan, intermittentStage())
		}
	}
	nonSeasonalFirst := false
	switch {
	case len(periods) == 0:
		nonSeasonalFirst = true
	case len(periods) == 1 && periods[0] == math.Round(periods[0]) && periods[0] <= maxCombinationPeriod:
		m := int(periods[0])
		if n < 2*m {
			rep.Fallbacks = append(rep.Fallbacks, fmt.Sprintf("%v: %d observed values, fewer than two cycles of %d", RouteCombination, n, m))
			nonSeasonalFirst = true
			break
		}
		plan = append(plan, combinationStage(RouteCombination, m, o))
	case len(periods) == 1:
		// A long or non-integer cycle: the year of weekly data
		// (365.25/7 weeks), or of fortnightly data.
		if m := int(math.Round(periods[0])); n <= 2*m {
			rep.Fallbacks = append(rep.Fallbacks, fmt.Sprintf("%v: %d observed values, not more than two cycles of %d", RouteWeekly, n, m))
			nonSeasonalFirst = true
			break
		}
		plan = append(plan, weeklyStage(periods[0], o))
	default:
		var usable []float64
		for _, p := range periods {
			if float64(n) > 2*math.Round(p) {
				usable = append(usable, p)
			}
		}
		if len(usable) == 0 {
			rep.Fallbacks = append(rep.Fallbacks, fmt.Sprintf("%v: %d observed values, not more than two cycles of any period in %v", RouteMultiSeasonal, n, periods))
			nonSeasonalFirst = true
			break
		}
		plan = append(plan, multiSeasonalStage(usable, y.Freq.Unit == calendar.Day, o))
	}
	if nonSeasonalFirst {
		st := combinationStage(RouteCombination, 1, o)
		plan = append(plan, st)
	} else {
		plan = append(plan, combinationStage(RouteNonSeasonal, 1, o))
	}
	return append(plan, naiveStage(), lastValueStage())
}

// cyclic reports whether y, with gaps filled linearly, passes the
// autocorrelation test for a cycle of m periods at the 90% level (the
// test of Naive2 and Theta; needs n ≥ 3m). Demand that comes and goes
// with the hour of the day or the day of the week is better forecast by
// a seasonal route than by a flat intermittent-demand rate.
func cyclic(y almanac.Series, m int) bool {
	x := y.Slice()
	if y.Missing() > 0 {
		filled, _, err := decompose.Repair{Period: 1}.Fill(y)
		if err != nil {
			return false
		}
		x = filled.Values
	}
	return seasonal.IsSeasonal(x, m, 1.645)
}

// combineMembers fits the members as an equal-weight mean
// (almanac.Combination).
func combineMembers(ctx context.Context, y almanac.Series, o routeOpts, members ...almanac.Model) (almanac.Fitted, error) {
	return almanac.Combination{Members: members, Seed: o.seed, Paths: o.paths}.Fit(ctx, y)
}

// droppedOf lists what a route's fit left out: the members of a
// combination that failed, or the estimation of an intermittent-demand
// constant.
func droppedOf(fit almanac.Fitted) []string {
	switch f := fit.(type) {
	case *CalibratedFit:
		return droppedOf(f.Inner())
	case *almanac.CombinationFit:
		var out []string
		for _, m := range f.Failures() {
			out = append(out, m.Error())
		}
		return out
	case *smoothing.IntermittentFit:
		if !f.Estimated {
			return []string{fmt.Sprintf("%s: too few periods after the first demand to estimate the constant; fixed at %v", f.Method, f.Alpha)}
		}
	}
	return nil
}

// nonSeasonal are the members of the combination without seasonal
// terms: ETS chosen among the non-seasonal forms, ARIMA without seasonal
// terms, Theta without seasonal adjustment.
func nonSeasonal() []almanac.Model {
	return []almanac.Model{
		smoothing.Select{Seasons: []smoothing.SeasonType{smoothing.NoSeason}, Workers: 1},
		arima.Search{Period: 1},
		smoothing.Theta{Period: 1},
	}
}

// combinationStage is the mean of ETS, ARIMA and Theta with period m (1:
// no seasonal terms).
func combinationStage(r Route, m int, o routeOpts) stage {
	members := nonSeasonal()
	var periods []float64
	if m >= 2 {
		periods = []float64{float64(m)}
		members = []almanac.Model{
			smoothing.Select{Period: m, Workers: 1},
			arima.Search{Period: m},
			smoothing.Theta{Period: m},
		}
	}
	return stage{route: r, periods: periods, needsComplete: true, rolls: true, fit: func(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
		return combineMembers(ctx, y, o, members...)
	}}
}

// weeklyStage combines three views of the yearly cycle of weekly data:
// the non-seasonal models of the STL-adjusted series (a 52-week cycle),
// Theta adjusted by a classical 52-week decomposition, and dynamic
// harmonic regression (arima.HarmonicRegression: Fourier terms of the
// exact 365.25/7-week year with ARIMA errors). Measured with the
// evaluation program, adding the harmonic regression to the other two
// took MASE from 1.686 to 1.680 on the invented weekly series of
// internal/synth and from 1.246 to 0.901 on 14 windows of the weekly
// Mauna Loa CO2 record (../shared/data/co2_weekly.csv, 13 weeks ahead).
//
// The period p is the cycle in observations (365.25/7 for weekly data);
// STL and Theta use it rounded to whole observations (52), the harmonic
// regression exactly.
func weeklyStage(p float64, o routeOpts) stage {
	m := int(math.Round(p))
	return stage{route: RouteWeekly, periods: []float64{p}, needsComplete: true, fit: func(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
		return combineMembers(ctx, y, o,
			decompose.Forecaster{
				Method: decompose.STL{Period: m, Robust: true},
				Model:  almanac.Combination{Members: nonSeasonal(), Seed: o.seed, Paths: o.paths},
			},
			smoothing.Theta{Period: m},
			arima.HarmonicRegression{Periods: []float64{p}},
		)
	}}
}

// multiSeasonalStage adjusts the series by MSTL at the usable periods and
// combines non-seasonal models of the adjusted series. For daily data
// Theta with a classical adjustment at 7 days and dynamic harmonic
// regression at the usable periods join. Measured with the evaluation
// program on the invented daily series of internal/synth (MASE): MSTL
// combination 1.022, with Theta 0.984 (91 series with complete data);
// all three 0.915 against 0.935 for the MSTL combination with Theta (120
// series). On the invented hourly series Theta at 24 hours, blind to the
// weekly cycle, made the MSTL combination worse by 23%, and harmonic
// regression by 8% at five times the cost, so hourly and finer data keep
// the MSTL combination alone.
func multiSeasonalStage(periods []float64, daily bool, o routeOpts) stage {
	return stage{route: RouteMultiSeasonal, periods: slices.Clone(periods), needsComplete: true, fit: func(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
		members := []almanac.Model{decompose.Forecaster{
			Method: decompose.MSTL{Periods: periods},
			Model:  almanac.Combination{Members: nonSeasonal(), Seed: o.seed, Paths: o.paths},
		}}
		if daily {
			members = append(members,
				smoothing.Theta{Period: int(math.Round(periods[0]))},
				arima.HarmonicRegression{Periods: periods},
			)
		}
		return combineMembers(ctx, y, o, members...)
	}}
}

// naiveStage is the naive method (two observed values or more).
func naiveStage() stage {
	return stage{route: RouteBenchmark, fit: func(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
		return almanac.Naive{}.Fit(ctx, y)
	}}
}

// lastValueStage forecasts the last observed value with bands of zero
// width: with one observation nothing measures the spread.
func lastValueStage() stage {
	return stage{route: RouteBenchmark, fit: func(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
		return newLastValue(y), nil
	}}
}

// membersOf lists the fitted models behind fit, flattening combinations.
func membersOf(fit almanac.Fitted) []string {
	if c, ok := fit.(*CalibratedFit); ok {
		return membersOf(c.Inner())
	}
	if c, ok := fit.(*almanac.CombinationFit); ok {
		var out []string
		for _, m := range c.Members() {
			out = append(out, membersOf(m.Fitted)...)
		}
		return out
	}
	return []string{fit.String()}
}
