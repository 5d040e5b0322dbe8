package accuracy

import (
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
)

// Review is the content of a review page: one entry per series of a
// batch run, written by WriteReview as a single static HTML file that a
// planner opens in a browser. Fill it from whatever the run produced —
// fitted models and forecasts (NewReviewSeries, ReviewFromBatch),
// backtest comparisons, the notes of the method that chose the models —
// and leave out what the run did not compute: every field but Series is
// optional.
//
// The page's look, wording and layout are not a stable API; the fields of
// Review and ReviewSeries are.
type Review struct {
	// Title heads the page; "" means "Forecast review".
	Title string
	// About is a paragraph of plain text under the title: what the data
	// are, which run produced the page, when. The page holds nothing
	// else that changes from run to run (no clock), so the same Review
	// always gives the same bytes.
	About string
	// Levels are the levels of the bands drawn around every forecast,
	// percentages in (0, 100), taken from the forecast's Intervals when
	// it has them and from its distribution otherwise. Nil means each
	// forecast's own Intervals.
	Levels []float64
	// Shown is the number of observations of history drawn before the
	// forecast (the latest ones). 0 means DefaultReviewShown. Negative is
	// invalid.
	Shown int
	// Series lists the series in the order the page shows them; every
	// one appears, a failed one with its reason.
	Series []ReviewSeries
}

// DefaultReviewShown is the number of observations of history drawn when
// Review.Shown is 0: 40 years of months, 9 of weeks, 16 months of days.
const DefaultReviewShown = 480

// ReviewSeries is one series on a review page.
type ReviewSeries struct {
	// Key names the series; "" means History.Key.
	Key string
	// History holds the observations the model was fitted to (NaN =
	// missing), drawn as a line broken at the gaps. It may be empty for
	// a failed series.
	History almanac.Series
	// Fitted holds the in-sample one-step forecasts, one per observation
	// of History (NaN where undefined), or nil. They are drawn beside the
	// history, and the errors History − Fitted feed the bias signal
	// (TriggSignal).
	Fitted []float64
	// Forecast is the forecast drawn after the history, with its bands
	// (see Review.Levels). It must start within the history or in the
	// period after it, at the history's frequency. Ignored when Err is
	// set.
	Forecast almanac.Forecast
	// Model is the fitted model in its notation (Fitted.String()).
	Model string
	// Route says how the model was chosen, in a few words: the automatic
	// forecaster's route, "lowest backtest error", "set by hand".
	Route string
	// Members lists the models behind a combination.
	Members []string
	// Fallbacks lists each method given up for a simpler one, and why.
	// A series with fallbacks is marked on the page.
	Fallbacks []string
	// Notes are any other remarks for the planner, one sentence each
	// (models left out of a combination, a band that could not be
	// drawn, ...).
	Notes []string
	// Repairs lists the values filled or replaced before fitting; they
	// are marked on the chart (located by Time) and listed.
	Repairs []decompose.Change
	// Backtest is the series' backtest comparison, or nil.
	Backtest *Comparison
	// Chosen names the run of Backtest that is the model forecasting the
	// series (it may be a benchmark); "" means the first run.
	Chosen string
	// BacktestErr says why the series has no backtest (for instance a
	// BatchComparison's SeriesFailure.Err); nil when it has one or none
	// was run.
	BacktestErr error
	// Err is why the series has no forecast; the page lists it as failed
	// with this reason.
	Err error
}

// NewReviewSeries returns the review entry of series y fitted as fit,
// with the forecast fc: its key, history, fitted values and model.
// Route, backtest and the rest are the caller's to add.
func NewReviewSeries(y almanac.Series, fit almanac.Fitted, fc almanac.Forecast) ReviewSeries {
	rs := ReviewSeries{Key: y.Key, History: y, Forecast: fc}
	if fit != nil {
		rs.Fitted = fit.FittedValues()
		rs.Model = fit.String()
	}
	return rs
}

// ReviewFromBatch returns one review entry per series of a batch run:
// the series ys, their fits from almanac.BatchFit, their forecasts from
// almanac.ForecastAll (or any slice of the same shape), and optionally
// the backtest of the same series in the same order (nil for none). A
// series whose fit or forecast failed gets Err; one left out of the
// backtest gets BacktestErr.
//
// Special cases: slices of different lengths, or a comparison of another
// number of series, give an error wrapping almanac.ErrLength.
func ReviewFromBatch(ys []almanac.Series, fits []almanac.BatchResult, fcs []almanac.BatchForecast, cmp *BatchComparison) ([]ReviewSeries, error) {
	if len(fits) != len(ys) || len(fcs) != len(ys) {
		return nil, fmt.Errorf("accuracy: review: %w: %d series, %d fits, %d forecasts", almanac.ErrLength, len(ys), len(fits), len(fcs))
	}
	if cmp != nil && len(cmp.Series) != len(ys) {
		return nil, fmt.Errorf("accuracy: review: %w: %d series, a backtest of %d", almanac.ErrLength, len(ys), len(cmp.Series))
	}
	out := make([]ReviewSeries, len(ys))
	for i, y := range ys {
		rs := NewReviewSeries(y, fits[i].Fitted, fcs[i].Forecast)
		switch {
		case fits[i].Err != nil:
			rs.Err = fits[i].Err
		case fits[i].Fitted == nil:
			rs.Err = fmt.Errorf("accuracy: review: series %q: %w", y.Key, almanac.ErrNotFitted)
		case fcs[i].Err != nil:
			rs.Err = fcs[i].Err
		}
		if cmp != nil {
			rs.Backtest = cmp.Series[i]
		}
		out[i] = rs
	}
	if cmp != nil {
		for _, f := range cmp.Failed {
			if f.Index >= 0 && f.Index < len(out) {
				out[f.Index].BacktestErr = f.Err
			}
		}
	}
	return out, nil
}

// WriteReview writes the review page of r to w: one self-contained HTML
// file (no external resources, charts as inline SVG, a few lines of
// inline script to sort and filter the summary table) with
//
//   - a summary table of every series: status, how the model was chosen
//     and the model, its backtest error (MASE) and the ratio to the
//     backtest's baseline, the share of outcomes inside each band in the
//     backtest, the bias signal (TriggSignal of the one-step errors,
//     TriggAlpha) and the number of values filled; flags mark a failed
//     series, fallbacks, bias beyond TriggLimit, a model behind its
//     baseline, bands holding far fewer outcomes than their level (more
//     than 10 points short), filled values and a missing backtest, and
//     the page explains each;
//   - for each series a chart (history, one-step fit, forecast with its
//     bands, filled values marked) and its details: route, members,
//     fallbacks, notes, filled values, the backtest of every candidate,
//     and for a failed series the reason.
//
// The output depends only on r: the same Review gives the same bytes.
// The page is well-formed XML as well as HTML, so XML tools can check
// it.
//
// Special cases: no series gives an error wrapping almanac.ErrEmpty; a
// level outside (0, 100) almanac.ErrLevel; negative Shown
// almanac.ErrInvalid. For a series that has a forecast (Err nil): an
// invalid History wraps the error of Series.Validate (ErrEmpty,
// ErrNonFinite, ErrAllMissing, ErrFrequency); Fitted of another length
// than History, or forecast bands of another length than the forecast,
// almanac.ErrLength; an empty forecast almanac.ErrEmpty; ±Inf or NaN in
// the forecast or its bands, or ±Inf in Fitted, almanac.ErrNonFinite; a
// forecast at another frequency, starting before the second observation
// or after the period following the last, a repair outside the history,
// or a Chosen that names no run of Backtest almanac.ErrInvalid. A failed
// series is drawn when its History can be, and listed with its reason
// whatever it holds. Nothing is written when an error is returned.
func WriteReview(w io.Writer, r Review) error {
	page, err := buildPage(r)
	if err != nil {
		return err
	}
	return reviewTemplate.Execute(w, page)
}

// reviewMark is one kind of flag on the page.
type reviewMark struct {
	ID    string // filter value and CSS class
	Label string // shown in the table
	Means string // the explanation on the page
}

// The flags, in the order they are shown and explained.
var reviewMarks = []reviewMark{
	{"failed", "failed", "No forecast: the series could not be fitted. The reason is in its details."},
	{"fallback", "fell back", "The method first chosen could not be fitted, and a simpler one made the forecast. The details say which and why."},
	{"bias", "bias", "Bias signal beyond ±" + strconv.FormatFloat(TriggLimit, 'f', -1, 64) + ". The signal is Trigg's (1964) tracking signal over the model's one-step errors (actual − fitted): the errors smoothed with weight " + strconv.FormatFloat(TriggAlpha, 'f', -1, 64) + " on the newest, divided by the absolute errors smoothed the same way, at the last observation. It runs from −1 to +1. Positive means the model has been forecasting too low lately, negative too high. With unbiased errors it passes ±" + strconv.FormatFloat(TriggLimit, 'f', -1, 64) + " in about one period in twenty, so a flag asks for a look, not a verdict."},
	{"behind", "behind baseline", "In the backtest the model's scaled error was larger than the baseline benchmark's (ratio above 1): a simple benchmark forecast this series better."},
	{"narrow", "narrow bands", "In the backtest, fewer of the outcomes fell inside a band than its level promises, by more than 10 percentage points: the bands are too narrow for this series."},
	{"filled", "filled values", "Values were missing or replaced and were filled before fitting; the chart marks them and the details list them."},
	{"untested", "no backtest", "There is no backtest for this series, so its accuracy against the benchmarks is unknown."},
}

// narrowBy is how far, as a fraction, the backtest coverage of a band may
// fall short of its level before the band is flagged as narrow.
const narrowBy = 0.10

// reviewError wraps err with the series' key.
func reviewError(key string, err error) error {
	return fmt.Errorf("accuracy: review: series %q: %w", key, err)
}

// seriesKey is the key shown for entry i.
func seriesKey(i int, rs ReviewSeries) string {
	switch {
	case rs.Key != "":
		return rs.Key
	case rs.History.Key != "":
		return rs.History.Key
	}
	return fmt.Sprintf("(series %d)", i+1)
}

// checkReviewSeries validates one entry that has a forecast.
func checkReviewSeries(key string, rs ReviewSeries) error {
	y := rs.History
	if err := y.Validate(); err != nil {
		return reviewError(key, err)
	}
	if rs.Fitted != nil && len(rs.Fitted) != y.Len() {
		return reviewError(key, fmt.Errorf("%w: %d fitted values for %d observations", almanac.ErrLength, len(rs.Fitted), y.Len()))
	}
	for i, v := range rs.Fitted {
		if math.IsInf(v, 0) {
			return reviewError(key, fmt.Errorf("%w: fitted value %v at index %d", almanac.ErrNonFinite, v, i))
		}
	}
	f := rs.Forecast
	if len(f.Mean) == 0 {
		return reviewError(key, fmt.Errorf("%w: the forecast has no steps", almanac.ErrEmpty))
	}
	if !f.Freq.Equal(y.Freq) {
		return reviewError(key, fmt.Errorf("%w: forecast %v, history %v", almanac.ErrInvalid, f.Freq, y.Freq))
	}
	off, err := y.Index(f.Start)
	if err != nil {
		return reviewError(key, fmt.Errorf("%w: forecast start: %w", almanac.ErrInvalid, err))
	}
	if off < 1 || off > y.Len() {
		return reviewError(key, fmt.Errorf("%w: the forecast starts at observation %d of %d; it must start after the first and no later than the period after the last", almanac.ErrInvalid, off+1, y.Len()))
	}
	if err := finite("forecast", f.Mean); err != nil {
		return reviewError(key, err)
	}
	for _, iv := range f.Intervals {
		if len(iv.Lower) != len(f.Mean) || len(iv.Upper) != len(f.Mean) {
			return reviewError(key, fmt.Errorf("%w: %v%% band of %d and %d steps for a forecast of %d", almanac.ErrLength, iv.Level, len(iv.Lower), len(iv.Upper), len(f.Mean)))
		}
		if err := finite(fmt.Sprintf("%v%% band", iv.Level), iv.Lower, iv.Upper); err != nil {
			return reviewError(key, err)
		}
	}
	return checkCommon(key, rs)
}

// checkCommon validates what any entry, failed or not, must get right.
func checkCommon(key string, rs ReviewSeries) error {
	n := rs.History.Len()
	for _, c := range rs.Repairs {
		i, err := rs.History.Index(c.Time)
		if err != nil || i < 0 || i >= n {
			return reviewError(key, fmt.Errorf("%w: filled value at %v is outside the history", almanac.ErrInvalid, c.Time))
		}
		if math.IsNaN(c.New) || math.IsInf(c.New, 0) {
			return reviewError(key, fmt.Errorf("%w: filled value %v at %v", almanac.ErrNonFinite, c.New, c.Time))
		}
	}
	if rs.Chosen != "" {
		if rs.Backtest == nil {
			return reviewError(key, fmt.Errorf("%w: chosen run %q but no backtest", almanac.ErrInvalid, rs.Chosen))
		}
		if _, ok := rs.Backtest.Run(rs.Chosen); !ok {
			return reviewError(key, fmt.Errorf("%w: the backtest has no run named %q", almanac.ErrInvalid, rs.Chosen))
		}
	}
	return nil
}

// finite returns an error wrapping almanac.ErrNonFinite when a value is
// NaN or ±Inf.
func finite(what string, xs ...[]float64) error {
	for _, x := range xs {
		for h, v := range x {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("%w: %s at step %d is %v", almanac.ErrNonFinite, what, h+1, v)
			}
		}
	}
	return nil
}

// band is one band of a forecast to draw.
type band struct {
	level        float64
	lower, upper []float64
}

// bandsOf returns the bands of f to draw: at levels when given (from the
// intervals or the distribution; a level the forecast cannot give is
// reported in the returned notes), else its Intervals. Widest first.
func bandsOf(key string, f almanac.Forecast, levels []float64) ([]band, []string, error) {
	var out []band
	var notes []string
	if levels == nil {
		for _, iv := range f.Intervals {
			out = append(out, band{iv.Level, iv.Lower, iv.Upper})
		}
	} else {
		for _, l := range levels {
			lo, hi, err := f.Bounds(l)
			if err != nil {
				if errors.Is(err, almanac.ErrNoDistribution) {
					notes = append(notes, fmt.Sprintf("The %s band is not drawn: the forecast has neither that band nor a distribution to compute it from.", pct(l)))
					continue
				}
				return nil, nil, reviewError(key, err)
			}
			if len(lo) != len(f.Mean) || len(hi) != len(f.Mean) {
				return nil, nil, reviewError(key, fmt.Errorf("%w: %v%% band of %d steps for a forecast of %d", almanac.ErrLength, l, len(lo), len(f.Mean)))
			}
			if err := finite(fmt.Sprintf("%v%% band", l), lo, hi); err != nil {
				return nil, nil, reviewError(key, err)
			}
			out = append(out, band{l, lo, hi})
		}
	}
	slices.SortStableFunc(out, func(a, b band) int {
		switch {
		case a.level > b.level:
			return -1
		case a.level < b.level:
			return 1
		}
		return 0
	})
	return out, notes, nil
}

// pct formats a level: "80%", "97.5%".
func pct(l float64) string { return strconv.FormatFloat(l, 'f', -1, 64) + "%" }

// chosenRun returns the run of c that made the forecast, or nil.
func chosenRun(c *Comparison, name string) *Run {
	if c == nil || len(c.Runs) == 0 {
		return nil
	}
	if name == "" {
		return &c.Runs[0]
	}
	r, _ := c.Run(name)
	return r
}

// biasSignal returns the Trigg signal of History − Fitted, or NaN when it
// is undefined (no fitted values, no pair observed, every error 0).
func biasSignal(rs ReviewSeries) float64 {
	if rs.Fitted == nil || len(rs.Fitted) != rs.History.Len() {
		return math.NaN()
	}
	errs := make([]float64, len(rs.Fitted))
	for i, f := range rs.Fitted {
		// Differences of finite values near the float64 limit can
		// overflow; such an error is left out like a missing one.
		e := rs.History.Values[i] - f
		if math.IsInf(e, 0) {
			e = math.NaN()
		}
		errs[i] = e
	}
	s, err := TriggSignal(errs, TriggAlpha)
	if err != nil {
		return math.NaN()
	}
	return s
}
