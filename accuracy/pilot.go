package accuracy

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
)

// Pilot is the automatic forecaster: an almanac.Model to point at any
// series of a catalogue, unattended. It looks at the frequency and the
// data, repairs gaps, chooses a route, fits it, and falls back to
// simpler methods when the route cannot be fitted, so that every series
// with at least one observed value gets a forecast with bands. What it
// did for a series — the route, the models combined, the values it
// filled, the fallbacks it took — is in the fitted value's Report.
//
// The routes (see Route) and the order in which they are tried:
//
//   - Intermittent demand: a non-negative series with an average interval
//     between demands of at least 1.32 periods, the cut-off of Syntetos,
//     Boylan & Croston (2005), is forecast by the Syntetos–Boylan
//     approximation (SBA); see DemandClass. Demand that follows the
//     series' cycle (it passes the 90% autocorrelation test at the
//     period, as hourly counts that vanish at night do) goes by frequency
//     instead.
//   - Yearly, quarterly, monthly and other series with one whole seasonal
//     period of at most 24: the mean of the forecasts of the automatic
//     ETS choice (smoothing.Select), the automatic ARIMA (arima.Search)
//     and the Theta method (RouteCombination), combined by
//     almanac.Combination.
//   - Weekly series (a year of 365.25/7 weeks) of more than two years,
//     and others with one cycle longer than 24 or not a whole number of
//     observations: the non-seasonal combination on the series adjusted
//     by STL at 52 weeks, Theta with a 52-week seasonal adjustment, and
//     dynamic harmonic regression on the exact year
//     (arima.HarmonicRegression), combined (RouteWeekly).
//   - Daily, hourly and finer series (two seasonal periods: 7 and 365.25
//     days, 24 and 168 hours): the non-seasonal combination on the series
//     adjusted by MSTL at the periods with more than two cycles of data;
//     for daily data combined with Theta adjusted at 7 days and harmonic
//     regression (RouteMultiSeasonal).
//
// When a route cannot be fitted (every one of its models fails, which
// happens on very short series), the fallback chain is: the non-seasonal
// combination (ETS without season, ARIMA without seasonal terms, Theta
// without adjustment), then the naive method (two observed values or
// more), then the last observed value with bands of zero width (one
// observed value). Each step taken is recorded in Report().Fallbacks.
//
// Missing values: leading missing values are left out; the others are
// filled by decompose.Repair (seasonal-aware interpolation with the
// series' period when it holds more than two cycles, linear otherwise)
// and every filled value is listed in Report().Repairs.
//
// Bands are calibrated by default: the route is wrapped in Calibrated,
// which measures its scale-free out-of-sample errors at rolling origins
// at the end of the series and draws the sample paths behind the bands
// by resampling whole error trajectories (so the bands of single steps
// and of sums over the horizon agree). The combination route is brought
// forward through its origins without re-estimation (up to
// DefaultCalibrationOrigins of them); the other routes refit at each of
// 5 origins. A short series has too few errors of its own: fit a batch
// with almanac.BatchFit and pass the results through PoolPilots, which
// pools the errors of the series of the same frequency and route (the
// exchangeability this assumes is discussed at Calibrated). Without
// enough errors, own or pooled, the bands are the route's own, and
// Report().Calibration says so. Uncalibrated switches the calibration
// off. When every observed value is ≥ 0 the paths, the bands and the
// point forecasts are censored at zero: a forecast of a quantity that
// cannot be negative is never negative (the quantiles of max(Y, 0) are
// the quantiles of Y raised to 0).
//
// The zero value is ready to use. A Pilot is a specification, safe to
// share between goroutines; one fit runs on the calling goroutine.
type Pilot struct {
	// Uncalibrated switches off the calibration of the bands: they are
	// then the route's own (see the type's documentation).
	Uncalibrated bool
	// Seed seeds the sample paths behind the bands; the same Seed gives
	// the same bands. 0 is a valid seed.
	Seed uint64
	// Paths is the number of sample paths behind the bands; 0 means
	// 1000. Negative is invalid.
	Paths int
}

// defaultPilotPaths is the number of sample paths when Pilot.Paths is 0.
const defaultPilotPaths = 1000

var (
	_ almanac.Model     = Pilot{}
	_ almanac.Fitted    = (*PilotFit)(nil)
	_ almanac.Simulator = (*PilotFit)(nil)
	_ almanac.Refresher = (*PilotFit)(nil)
)

// Route says how Pilot forecast a series. Programs should not rely on
// the numeric values.
type Route int

const (
	// RouteBenchmark: a benchmark at the end of the fallback chain (the
	// naive method, or the last value of a series with one observation).
	RouteBenchmark Route = iota
	// RouteCombination: the mean of ETS, ARIMA and Theta, seasonal when
	// the series has a period of 2 to 24.
	RouteCombination
	// RouteNonSeasonal: the same combination without seasonal terms,
	// for series too short for their period (a fallback).
	RouteNonSeasonal
	// RouteWeekly: decomposition at 52 weeks, Theta with a 52-week
	// seasonal adjustment and harmonic regression, combined.
	RouteWeekly
	// RouteMultiSeasonal: MSTL at two or more periods with non-seasonal
	// models of the adjusted series, combined.
	RouteMultiSeasonal
	// RouteIntermittent: the Syntetos–Boylan approximation of Croston's
	// method for intermittent demand.
	RouteIntermittent
)

// String returns a short name of the route.
func (r Route) String() string {
	switch r {
	case RouteBenchmark:
		return "benchmark"
	case RouteCombination:
		return "combination"
	case RouteNonSeasonal:
		return "non-seasonal combination"
	case RouteWeekly:
		return "weekly"
	case RouteMultiSeasonal:
		return "multi-seasonal"
	case RouteIntermittent:
		return "intermittent"
	}
	return fmt.Sprintf("Route(%d)", int(r))
}

// PilotReport says what Pilot did for one series.
type PilotReport struct {
	// Route is the route that produced the forecast.
	Route Route
	// Periods are the seasonal periods the route used (none for a
	// non-seasonal route).
	Periods []float64
	// Members are the fitted models behind the forecast, in their
	// published notation (one for a single model).
	Members []string
	// Dropped lists the models of the route that failed and were left
	// out, with the reason.
	Dropped []string
	// Fallbacks lists, in order, each route given up for a simpler one
	// and why.
	Fallbacks []string
	// Trimmed is the number of leading missing values left out.
	Trimmed int
	// Repairs lists every value filled before fitting.
	Repairs []decompose.Change
	// Demand is the demand class of a non-negative series with zeros
	// (DemandUnclassified otherwise).
	Demand DemandClass
	// NonNegative reports that every observed value was ≥ 0, so forecasts,
	// bands and paths are censored at zero.
	NonNegative bool
	// Calibrated reports that the bands are calibrated (Calibrated
	// wraps the route); Calibration then says from how many errors and
	// from where (the series' own, pooled across a batch by PoolPilots,
	// or, with too few, the route's own bands).
	Calibrated  bool
	Calibration CalibrationStatus
}

// PilotFit is a series fitted by Pilot. It is read-only and safe for
// concurrent use. It saves as a document of kind "accuracy.pilot"
// (almanac.SaveModel) with the route's model nested, once every model of
// the route is storable (see the package documentation, Persistence).
type PilotFit struct {
	inner  almanac.Fitted
	backup almanac.Fitted // the end of the fallback chain, should inner fail to forecast
	report PilotReport
	y      almanac.Series // as given
	fitted []float64
	resid  []float64
	paths  int
	seed   uint64
	// refreshed is the number of values at the end of y that Refresh
	// added (given to the route's model as they came, gaps included).
	refreshed int
}

// Report returns what Pilot did for the series (a copy).
func (f *PilotFit) Report() PilotReport {
	r := f.report
	r.Periods = slices.Clone(r.Periods)
	r.Members = slices.Clone(r.Members)
	r.Dropped = slices.Clone(r.Dropped)
	r.Fallbacks = slices.Clone(r.Fallbacks)
	r.Repairs = slices.Clone(r.Repairs)
	return r
}

// Inner returns the fitted model of the route.
func (f *PilotFit) Inner() almanac.Fitted { return f.inner }

// String returns the fitted route's model in published notation, e.g.
// "mean(ETS(M,Ad,N), ARIMA(0,1,1) + drift, Theta)".
func (f *PilotFit) String() string { return f.inner.String() }

// FittedValues returns the route's one-step in-sample forecasts, NaN for
// leading missing values that were left out.
func (f *PilotFit) FittedValues() []float64 { return slices.Clone(f.fitted) }

// Residuals returns y − FittedValues (NaN where y is missing).
func (f *PilotFit) Residuals() []float64 { return slices.Clone(f.resid) }

// Fit chooses a route for y, fits it and returns a *PilotFit.
//
// Special cases: an invalid series (no observations, an infinite value,
// every value missing, no frequency) gives the error of Series.Validate
// wrapped (almanac.ErrEmpty, almanac.ErrNonFinite, almanac.ErrAllMissing,
// almanac.ErrFrequency); negative Paths almanac.ErrInvalid; a cancelled
// ctx ctx.Err(). Any series with an observed value otherwise gets a fit.
func (p Pilot) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if p.Paths < 0 {
		return nil, fmt.Errorf("accuracy: pilot: %w: %d paths", almanac.ErrInvalid, p.Paths)
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("accuracy: pilot: %w", err)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	f := &PilotFit{y: y.Clone(), paths: p.Paths, seed: p.Seed}
	if f.paths == 0 {
		f.paths = defaultPilotPaths
	}
	rep := &f.report
	// Leading missing values carry nothing.
	first := slices.IndexFunc(y.Values, func(v float64) bool { return !math.IsNaN(v) })
	rep.Trimmed = first
	work := y.Window(first, y.Len())
	rep.NonNegative = !slices.ContainsFunc(work.Values, func(v float64) bool { return v < 0 })
	rep.Demand = classifyDemand(work.Values)

	plan := planRoutes(work, rep, routeOpts{seed: p.Seed, paths: f.paths})
	var inner almanac.Fitted
	for k, st := range plan {
		if st.needsComplete && work.Missing() > 0 && rep.Repairs == nil {
			filled, changes, err := repairGaps(work)
			if err != nil {
				rep.Fallbacks = append(rep.Fallbacks, fmt.Sprintf("%v: gaps could not be repaired: %v", st.route, err))
				continue
			}
			work, rep.Repairs = filled, changes
		}
		fit, err := p.fitStage(ctx, st, work, rep.NonNegative, f.paths)
		if err != nil {
			if ctx.Err() != nil {
				return nil, ctx.Err()
			}
			if k == len(plan)-1 {
				return nil, fmt.Errorf("accuracy: pilot: series %q: %w: every route failed, the last with: %w", y.Key, almanac.ErrNotFitted, err)
			}
			rep.Fallbacks = append(rep.Fallbacks, fmt.Sprintf("%v: %v", st.route, err))
			continue
		}
		rep.Route, rep.Periods = st.route, st.periods
		f.describe(fit, y.Window(first, y.Len()))
		inner = fit
		break
	}
	f.settle(ctx, inner, work)
	return f, nil
}

// settle completes a fit whose route is fitted to work (the series with
// leading missing values left out and gaps repaired): the benchmark at
// the end of the fallback chain and the fitted values on the axis of the
// series as given. Fit and the saved-model loader share it, so a loaded
// fit is rebuilt exactly as it was made.
func (f *PilotFit) settle(ctx context.Context, inner almanac.Fitted, work almanac.Series) {
	f.inner = inner
	if f.report.Route == RouteBenchmark {
		f.backup = inner
	} else if nv, err := (almanac.Naive{}).Fit(ctx, work); err == nil {
		f.backup = nv
	} else {
		f.backup = newLastValue(work)
	}
	first := f.report.Trimmed
	n := f.y.Len()
	f.fitted = make([]float64, n)
	f.resid = make([]float64, n)
	fv := inner.FittedValues()
	for t := range n {
		f.fitted[t], f.resid[t] = math.NaN(), math.NaN()
		if k := t - first; k >= 0 && k < len(fv) {
			f.fitted[t] = fv[k]
			f.resid[t] = f.y.Values[t] - fv[k]
		}
	}
}

// refitOrigins is the number of calibration origins of a route that
// refits its models at each origin (see stage.rolls): a few per series
// suffice when a batch pools them (PoolPilots), and they cost a fit each.
const refitOrigins = 5

// fitStage fits a stage, calibrated unless switched off (the benchmarks
// at the end of the chain keep their own bands).
func (p Pilot) fitStage(ctx context.Context, st stage, y almanac.Series, nonNegative bool, paths int) (almanac.Fitted, error) {
	if p.Uncalibrated || st.route == RouteBenchmark {
		return st.fit(ctx, y)
	}
	c := Calibrated{Model: st, NonNegative: nonNegative, Seed: p.Seed, Paths: paths}
	if !st.rolls {
		c.Origins = refitOrigins
	}
	return c.Fit(ctx, y)
}

// repairGaps fills the missing values of y with decompose.Repair, at the
// series' period when it holds more than two cycles and linearly
// otherwise.
func repairGaps(y almanac.Series) (almanac.Series, []decompose.Change, error) {
	period := y.Period()
	if period < 2 || y.Len() <= 2*period {
		period = 1
	}
	return decompose.Repair{Period: period}.Fill(y)
}

// Forecast returns h steps of forecasts with central bands at the given
// levels (percentages in (0, 100)). The bands are quantiles of sample
// paths of the fitted route (censored at zero for non-negative data);
// the point forecast is the route's own (the mean of the members'),
// censored the same way. Should the route's forecast fail at this
// horizon (a model whose forecast overflows far ahead), the forecast is
// that of the benchmark at the end of the fallback chain (the naive
// method, or the last value), so a fitted series always gets one.
//
// Special cases: h < 1 or beyond almanac.MaxHorizon gives an error
// wrapping almanac.ErrHorizon, a bad level one wrapping almanac.ErrLevel.
func (f *PilotFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: pilot: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: pilot: %w", err)
	}
	out, err := f.forecastWith(f.inner, h, levels)
	if err != nil && f.backup != nil {
		out, err = f.forecastWith(f.backup, h, levels)
	}
	return out, err
}

func (f *PilotFit) forecastWith(inner almanac.Fitted, h int, levels []float64) (almanac.Forecast, error) {
	fc, err := inner.Forecast(h)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: pilot: %w", err)
	}
	if err := checkPoints(inner, fc, h); err != nil {
		return almanac.Forecast{}, err
	}
	mean := slices.Clone(fc.Mean)
	for j, v := range mean {
		if f.report.NonNegative {
			mean[j] = math.Max(v, 0)
		}
	}
	// The route's forecast usually holds its sample paths already (a
	// combination's do); otherwise they are drawn.
	paths := fc.SamplePaths()
	if len(paths) > 0 {
		paths = f.tidy(clonePaths(paths), fc.Mean)
	} else if paths, err = f.simulateWith(inner, fc, h, f.paths, rand.NewPCG(f.seed, pilotStream)); err != nil {
		return almanac.Forecast{}, err
	}
	out, err := almanac.NewForecast(fc.Start, fc.Freq, mean, &almanac.Sample{Paths: paths}, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: pilot: %w", err)
	}
	return out, nil
}

// pilotStream is the second PCG word of the generator behind Forecast.
const pilotStream = 0x2545f4914f6cdd1d

// Simulate draws n sample paths of h steps from the fitted route
// (censored at zero for non-negative data; from the benchmark when the
// route fails, as Forecast). A path step that is not a finite number (a
// multiplicative model leaving its domain) is replaced by the point
// forecast of that step.
//
// Special cases: h < 1 wraps almanac.ErrHorizon; n < 1 or a nil src
// almanac.ErrInvalid.
func (f *PilotFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("accuracy: pilot: %w", err)
	}
	if n < 1 || src == nil {
		return nil, fmt.Errorf("accuracy: pilot: %w: %d paths or a nil source", almanac.ErrInvalid, n)
	}
	fc, err := f.inner.Forecast(h)
	if err == nil {
		err = checkPoints(f.inner, fc, h)
	}
	var paths [][]float64
	if err == nil {
		paths, err = f.simulateWith(f.inner, fc, h, n, src)
	}
	if err != nil && f.backup != nil {
		if fc, err = f.backup.Forecast(h); err == nil {
			paths, err = f.simulateWith(f.backup, fc, h, n, src)
		}
	}
	return paths, err
}

func (f *PilotFit) simulateWith(inner almanac.Fitted, fc almanac.Forecast, h, n int, src rand.Source) ([][]float64, error) {
	sim, ok := inner.(almanac.Simulator)
	if !ok {
		return nil, fmt.Errorf("accuracy: pilot: %w: %s cannot simulate", almanac.ErrNoDistribution, inner)
	}
	paths, err := sim.Simulate(h, n, src)
	if err != nil {
		return nil, fmt.Errorf("accuracy: pilot: %w", err)
	}
	if len(paths) != n {
		return nil, fmt.Errorf("accuracy: pilot: %w: %d paths for %d asked", almanac.ErrLength, len(paths), n)
	}
	for _, p := range paths {
		if len(p) != h {
			return nil, fmt.Errorf("accuracy: pilot: %w: a path of %d steps for %d", almanac.ErrLength, len(p), h)
		}
	}
	return f.tidy(paths, fc.Mean), nil
}

// checkPoints rejects a forecast of the wrong length or with a value
// that is not finite.
func checkPoints(inner almanac.Fitted, fc almanac.Forecast, h int) error {
	if len(fc.Mean) != h {
		return fmt.Errorf("accuracy: pilot: %w: %s gave %d forecasts for %d steps", almanac.ErrLength, inner, len(fc.Mean), h)
	}
	for j, v := range fc.Mean {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("accuracy: pilot: %w: %s forecast %v at step %d", almanac.ErrNonFinite, inner, v, j+1)
		}
	}
	return nil
}

// tidy replaces path values that are not finite (a multiplicative model
// leaving its domain) by the point forecast of their step and, for
// non-negative data, raises negative values to zero. It works in place.
func (f *PilotFit) tidy(paths [][]float64, mean []float64) [][]float64 {
	for _, p := range paths {
		for j, v := range p {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				p[j] = mean[j]
			}
			if f.report.NonNegative && p[j] < 0 {
				p[j] = 0
			}
		}
	}
	return paths
}

func clonePaths(paths [][]float64) [][]float64 {
	out := make([][]float64, len(paths))
	for i, p := range paths {
		out[i] = slices.Clone(p)
	}
	return out
}

// Refresh implements almanac.Refresher: the route's fitted model takes
// the new observations through almanac.Refresh, without estimating
// anything again, and the report keeps the route, its periods, the
// fallbacks and the repairs of the fit (new missing values go to the
// route's model as they are, not repaired). A route refreshes only when
// every model in it does: today ETS, ARIMA and the calibrated wrapper
// do, while Theta, the intermittent-demand methods and the benchmarks do
// not, so every route Pilot fits gives an error wrapping
// almanac.ErrNotRefreshable: refit the series (almanac.RefreshPolicy
// decides when). The method is there so that a route made only of
// refreshable models refreshes through them.
//
// Special cases: a new value of ±Inf gives an error wrapping
// almanac.ErrNonFinite; the route's model's error is passed on.
func (f *PilotFit) Refresh(newValues []float64) (almanac.Fitted, error) {
	if f == nil || f.inner == nil {
		return nil, fmt.Errorf("accuracy: pilot: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	y := f.y.Clone()
	y.Values = append(y.Values, newValues...)
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("accuracy: pilot refresh: %w", err)
	}
	inner, err := almanac.Refresh(f.inner, newValues)
	if err != nil {
		return nil, fmt.Errorf("accuracy: pilot refresh: %w", err)
	}
	g := &PilotFit{y: y, paths: f.paths, seed: f.seed, refreshed: f.refreshed + len(newValues), report: f.Report()}
	work := f.y.Window(f.report.Trimmed, f.y.Len()).Clone()
	for _, c := range f.report.Repairs {
		work.Values[c.Index] = c.New
	}
	work.Values = append(work.Values, newValues...)
	g.describe(inner, y.Window(g.report.Trimmed, y.Len()))
	g.settle(context.Background(), inner, work)
	return g, nil
}

// describe sets the parts of the report that follow from the data as
// given (after leading missing values) and from the route's fitted
// model.
func (f *PilotFit) describe(inner almanac.Fitted, given almanac.Series) {
	rep := &f.report
	rep.NonNegative = !slices.ContainsFunc(given.Values, func(v float64) bool { return v < 0 })
	rep.Demand = classifyDemand(given.Values)
	rep.Dropped = droppedOf(inner)
	rep.Members = membersOf(inner)
	rep.Calibrated, rep.Calibration = false, CalibrationStatus{}
	if cf, ok := inner.(*CalibratedFit); ok {
		rep.Calibrated, rep.Calibration = true, cf.Status()
	}
}
