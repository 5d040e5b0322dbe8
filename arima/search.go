package arima

import (
	"context"
	"fmt"
	"math"
	"runtime"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// Criterion is the information criterion used to rank candidates; the
// zero value is AICc. It is the root package's almanac.Criterion.
type Criterion = almanac.Criterion

// The criteria, as in the root package.
const (
	AICc = almanac.AICc
	AIC  = almanac.AIC
	BIC  = almanac.BIC
)

// SearchLikelihood says which likelihood ranks the candidates of a
// Search. Programs should not rely on the numeric values of the
// constants.
type SearchLikelihood int

const (
	// LikelihoodAuto (the zero value): exact likelihood, unless the
	// series is complete and n·s exceeds exactLimit (50 000; n the
	// number of values, s the period, 1 without seasonal terms), where
	// CSS ranks the candidates. An exact likelihood evaluation costs
	// O(n·r) with r ≈ p + s·P the state dimension (Chandrasekhar
	// recursions, see Search), a CSS one O(n) times the number of
	// non-zero coefficients. (It was CSS above 150 observations or a
	// period above 12, common practice when each exact evaluation cost
	// O(n·r²): ranking by CSS changed the path of the stepwise search and
	// made it miss models better by exact AICc.)
	LikelihoodAuto SearchLikelihood = iota
	// LikelihoodExact: every candidate by exact maximum likelihood (CSS
	// then ML).
	LikelihoodExact
	// LikelihoodCSS: every candidate by conditional sum of squares (exact
	// likelihood when the series has missing values, which CSS cannot
	// handle).
	LikelihoodCSS
)

// String returns "auto", "exact" or "CSS", or "SearchLikelihood(n)".
func (l SearchLikelihood) String() string {
	switch l {
	case LikelihoodAuto:
		return "auto"
	case LikelihoodExact:
		return "exact"
	case LikelihoodCSS:
		return "CSS"
	}
	return fmt.Sprintf("SearchLikelihood(%d)", int(l))
}

// Defaults of Search's choice of differencing, chosen on the M3 data
// (Makridakis & Hibon 2000; all 3,003 series, sMAPE on the held-out
// parts, one search per training part; doc.go, Order selection, gives
// the figures).
const (
	// DefaultSearchMaxD is the largest d Search chooses when
	// Differencing.MaxD is 0. A second difference extrapolates the
	// latest local slope without damping; on short series KPSS rejects
	// stationarity of the once-differenced series often (yearly M3: 132
	// of 645 series), and those forecasts were the worst of the search.
	// With at most one difference the sMAPE of the search fell on yearly
	// (17.30 to 16.50), quarterly (9.91 to 9.76) and monthly series
	// (14.71 to 14.64 on every third) and rose on "other" (4.46 to 4.60);
	// with DefaultSearchStrength as well, 13.89 to 13.50 on all 3,003.
	DefaultSearchMaxD = 1
	// DefaultSearchStrength is the STL seasonal strength above which
	// Search takes a seasonal difference when
	// SeasonalDifferencing.Threshold is 0: series of moderate seasonal
	// strength are then fitted with stationary seasonal AR and MA terms
	// instead of a seasonal difference, which on monthly M3 series (4 to
	// 10 years of data) forecast better (sMAPE 14.64 at 0.64, 14.34 at
	// 0.8, 14.34 at 0.9 on every third monthly series, with at most one
	// difference; quarterly 9.76, 9.76, 9.72). The published strength
	// rule uses 0.64 (DefaultStrengthThreshold, common practice).
	DefaultSearchStrength = 0.8
)

// exactLimit bounds n·s for the exact ranking of LikelihoodAuto.
const exactLimit = 50000

// NoDifferencing, given as Search.D or Search.SD, fixes that order of
// differencing at zero (the zero value of those fields means "choose").
const NoDifferencing = -1

// Default limits of a Search.
const (
	DefaultMaxP      = 5
	DefaultMaxQ      = 5
	DefaultMaxSP     = 2
	DefaultMaxSQ     = 2
	DefaultMaxTerms  = 5   // exhaustive search only, unless set
	DefaultMaxModels = 100 // stepwise search
)

// Search chooses the orders of a seasonal ARIMA model automatically and
// fits it; it is itself an almanac.Model. Differencing is chosen first
// (D by seasonal strength, SeasonalDifferences; then d by repeated KPSS
// tests on the seasonally differenced series, Differences), then the ARMA
// orders and the constant by an information criterion, either by the
// stepwise search of Hyndman & Khandakar (2008) or, with Exhaustive, over
// the whole bounded grid.
//
// The zero value is the stepwise search ranked by AICc with the default
// limits. Fields whose zero value means a default say so; a negative
// limit means 0 (the term is left out):
//
//	arima.Search{MaxP: 3, MaxQ: 3, MaxSP: -1, MaxSQ: -1, SD: arima.NoDifferencing}
//	arima.Search{Exhaustive: true, Workers: 4, Criterion: arima.BIC}
//
// A Search is a plain value, safe to share between goroutines. Fit runs
// the candidates one after another (the exhaustive search on Workers
// goroutines, results written by grid index), so the result is the same
// whatever the number of goroutines.
//
// Candidates are fitted and ranked on the exact likelihood of the
// differenced series (DiffusePrior), whose evaluations run the O(r)
// Chandrasekhar recursions, with looser stopping rules than Spec.Fit's
// (the maximum-likelihood iterations stop once one improves the
// objective by less than 1e-6 of its value, at most 100 iterations); a
// candidate whose criterion comes within 2 of the best so far is
// refitted with the full rules before it is compared. The chosen model
// is refitted as Spec.Fit fits it (R's finite prior by default), so the
// model returned is the one Spec.Fit gives for the chosen orders; when
// that refit fails or comes within 1.001 of the unit circle, the next
// best candidate is refitted. Candidates ranked by CSS (very long
// series, or Likelihood CSS) are screened by exact diffuse-prior fits
// first, so that those whose exact optimum lies on the unit circle are
// not refitted with the O(r²) recursion of the finite prior.
//
// Performance (one core, CPU time on a shared machine; the package
// documentation says how measured): the default stepwise search takes
// 13–15 ms on the 144-point log air passengers series (53–59 ms before
// the changes there described), 39–49 ms a series on average over the
// 1,428 M3 monthly series (at most 0.36–0.56 s; 185 ms and 2.04 s before
// the Chandrasekhar recursions), 0.16–0.40 s on invented hourly series
// of 960 values with period 24.
type Search struct {
	// MaxP and MaxQ bound the non-seasonal AR and MA orders (0 means 5,
	// negative means 0).
	MaxP, MaxQ int
	// MaxSP and MaxSQ bound the seasonal AR and MA orders (0 means 2,
	// negative means 0).
	MaxSP, MaxSQ int
	// MaxTerms bounds p + q + P + Q. 0 means 5 for the exhaustive search
	// and no bound for the stepwise one (whose first starting model,
	// (2,d,2)(1,D,1), has order 6); negative is invalid.
	MaxTerms int
	// D is the order of differencing: 0 chooses it (Differences with
	// Differencing), NoDifferencing fixes 0, a positive value is used as
	// given.
	D int
	// SD is the order of seasonal differencing: 0 chooses it
	// (SeasonalDifferences with SeasonalDifferencing), NoDifferencing
	// fixes 0, a positive value is used as given.
	SD int
	// Differencing configures the choice of d: KPSS tests at 5% with the
	// square-root lag rule, at most DefaultSearchMaxD (1) differences
	// when Differencing.MaxD is 0 (the helper Differences alone allows
	// 2; see DefaultSearchMaxD for why Search does not).
	Differencing DifferencesSpec
	// SeasonalDifferencing configures the choice of D: at most 1, when
	// the STL seasonal strength exceeds DefaultSearchStrength (0.8) if
	// SeasonalDifferencing.Threshold is 0 (the helper
	// SeasonalDifferences alone uses 0.64; see DefaultSearchStrength).
	SeasonalDifferencing SeasonalDifferencesSpec
	// Period is the seasonal period; 0 takes it from the series'
	// frequency; negative is invalid. Seasonal terms are searched only when the period is ≥ 2
	// and the series has more than two full periods of observed values.
	Period int
	// Criterion ranks the candidates; default AICc.
	Criterion Criterion
	// Exhaustive fits every model of the bounded grid instead of the
	// stepwise search (default false: stepwise).
	Exhaustive bool
	// Workers is the number of goroutines fitting the candidates of an
	// exhaustive search (0 means runtime.GOMAXPROCS(0)). The result does
	// not depend on it.
	Workers int
	// NoDrift leaves out the drift term that is otherwise considered
	// when d + D = 1; NoMean leaves out the mean considered when
	// d + D = 0.
	NoDrift, NoMean bool
	// Likelihood ranks the candidates: exact, or CSS (cheaper) for long
	// series by default; a model chosen by CSS is always refitted by exact
	// likelihood (CSS then ML).
	Likelihood SearchLikelihood
	// MaxModels bounds the number of models a stepwise search fits (0
	// means 100); the result records whether the bound was reached.
	MaxModels int
	// Regressors, when given, make every candidate a regression with
	// ARIMA errors (see Spec.Regressors); the orders of differencing are
	// then chosen on the residuals of the least-squares regression of y
	// on a constant and the regressors, and forecasts need future values
	// (Fitted.ForecastWith).
	Regressors []Regressor
	// Calendar holds regressors given as rules on the time axis, as in
	// Spec.Calendar: every candidate has them, and the chosen model
	// builds their future values itself.
	Calendar calendar.Design
}

var _ almanac.Model = Search{}

// Fit chooses and fits the model for y and returns it as a *Fitted, the
// same type Spec.Fit returns (its String gives the chosen orders). The
// record of the search (every candidate and its score) is reachable from
// the fitted model through Fitted.SearchResult, or by Compare.
//
// Special cases:
//   - an invalid series (empty, all missing, ±Inf) gives the error of
//     almanac.Series.Validate; a constant series almanac.ErrConstant;
//   - too few observations to choose d, or fewer than 3 left after
//     differencing (plus one for a constant when one is considered and
//     one per regressor), give
//     almanac.ErrTooShort; a series with no more than two full periods of
//     observed values is searched without seasonal terms;
//   - a negative MaxTerms or Period, an unknown Criterion or Likelihood, or a D
//     or SD below NoDifferencing wrap almanac.ErrInvalid;
//   - regressors of the wrong length wrap almanac.ErrLength, non-finite
//     regressor values almanac.ErrNonFinite, regressors linearly dependent
//     with each other or the constant ErrCollinear;
//   - when no candidate can be fitted the error wraps almanac.ErrNotFitted
//     and the first candidate's error; there is never a silent fallback.
func (s Search) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	r, err := s.searchTimed(ctx, y)
	if err != nil {
		return nil, err
	}
	return r.Model, nil
}

// Compare runs the search as Fit does and returns its record: every
// candidate tried with its score, the index of the chosen one and the
// chosen *Fitted (SearchResult.Model, the model Fit returns). Its special
// cases are those of Fit.
func (s Search) Compare(ctx context.Context, y almanac.Series) (*SearchResult, error) {
	return s.searchTimed(ctx, y)
}

func (s Search) search(ctx context.Context, y almanac.Series) (*SearchResult, error) {
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("arima: search: %w", err)
	}
	if y.IsConstant() {
		return nil, fmt.Errorf("arima: search: %w: series %q has one observed value repeated; no ARIMA model is identifiable", almanac.ErrConstant, y.Key)
	}
	switch {
	case s.MaxTerms < 0:
		return nil, fmt.Errorf("arima: search: %w: MaxTerms %d is negative", almanac.ErrInvalid, s.MaxTerms)
	case s.D < NoDifferencing || s.SD < NoDifferencing:
		return nil, fmt.Errorf("arima: search: %w: D = %d, SD = %d (use NoDifferencing for none)", almanac.ErrInvalid, s.D, s.SD)
	case !s.Criterion.Valid():
		return nil, fmt.Errorf("arima: search: %w: unknown Criterion %v", almanac.ErrInvalid, s.Criterion)
	case s.Likelihood < LikelihoodAuto || s.Likelihood > LikelihoodCSS:
		return nil, fmt.Errorf("arima: search: %w: unknown Likelihood %v", almanac.ErrInvalid, s.Likelihood)
	case s.Workers < 0 || s.MaxModels < 0:
		return nil, fmt.Errorf("arima: search: %w: Workers %d, MaxModels %d must be ≥ 0", almanac.ErrInvalid, s.Workers, s.MaxModels)
	}

	pl := searchPlan{
		maxP: limit(s.MaxP, DefaultMaxP), maxQ: limit(s.MaxQ, DefaultMaxQ),
		maxSP: limit(s.MaxSP, DefaultMaxSP), maxSQ: limit(s.MaxSQ, DefaultMaxSQ),
		maxTerms: s.MaxTerms, crit: s.Criterion, maxModels: limit(s.MaxModels, DefaultMaxModels),
	}
	if pl.maxTerms == 0 && s.Exhaustive {
		pl.maxTerms = DefaultMaxTerms
	}

	// The series whose differencing is chosen: y itself, or the residuals
	// of its regression on the regressors.
	base := y.Values
	if len(s.Regressors) > 0 {
		var err error
		if base, err = regressionResiduals(y.Values, s.Regressors); err != nil {
			return nil, err
		}
	}

	// Seasonal period and seasonal differencing.
	nObs := y.Len() - y.Missing()
	pl.period = s.Period
	if pl.period == 0 {
		pl.period = y.Period()
	}
	if pl.period < 0 {
		return nil, fmt.Errorf("arima: search: %w: Period %d is negative", almanac.ErrInvalid, pl.period)
	}
	seasonal := pl.period >= 2 && !tooFewPeriods(nObs, pl.period)
	strength := math.NaN()
	if !seasonal {
		pl.maxSP, pl.maxSQ = 0, 0
		if s.SD > 0 {
			return nil, fmt.Errorf("arima: search: %w: SD = %d needs a seasonal period ≥ 2 and more than two full periods of data (period %d, %d observed values)", almanac.ErrTooShort, s.SD, pl.period, nObs)
		}
	}
	switch {
	case s.SD > 0:
		pl.sd = s.SD
	case s.SD == 0 && seasonal:
		var err error
		sds := s.SeasonalDifferencing
		if sds.Threshold == 0 {
			sds.Threshold = DefaultSearchStrength
		}
		strength, err = SeasonalStrength(base, pl.period, sds.Span)
		if err != nil {
			return nil, fmt.Errorf("arima: search: choosing D: %w", err)
		}
		pl.sd, err = SeasonalDifferences(base, pl.period, sds)
		if err != nil {
			return nil, fmt.Errorf("arima: search: choosing D: %w", err)
		}
	}
	if pl.sd == 0 && pl.maxSP == 0 && pl.maxSQ == 0 {
		pl.period = 0 // non-seasonal model
	}

	// Ordinary differencing, on the seasonally differenced series.
	switch {
	case s.D > 0:
		pl.d = s.D
	case s.D == 0:
		w := append([]float64(nil), base...)
		for range pl.sd {
			w = selDiff(w, pl.period)
		}
		var err error
		ds := s.Differencing
		if ds.MaxD == 0 {
			ds.MaxD = DefaultSearchMaxD
		}
		pl.d, err = Differences(w, ds)
		if err != nil {
			return nil, fmt.Errorf("arima: search: choosing d: %w", err)
		}
	}
	switch pl.d + pl.sd {
	case 0:
		pl.constOK = !s.NoMean
	case 1:
		pl.constOK = !s.NoDrift
	}
	// The simplest candidates (white noise, with the constant when one is
	// allowed) need n − k − 2 ≥ 1 for a finite AICc; with fewer
	// observations the models cannot be compared, and choosing the
	// zero-mean model by default would be a silent wrong answer.
	need := 3 + len(s.Regressors)
	if pl.constOK {
		need++
	}
	if used := nObs - pl.d - pl.period*pl.sd; used < need {
		return nil, fmt.Errorf("arima: search: %w: %d observed values leave %d after differencing (d = %d, D = %d); comparing models needs at least %d", almanac.ErrTooShort, nObs, used, pl.d, pl.sd, need)
	}

	// Likelihood used while searching.
	complete := y.Missing() == 0
	switch s.Likelihood {
	case LikelihoodAuto:
		if complete && y.Len()*max(pl.period, 1) > exactLimit {
			pl.method = CSS
		}
	case LikelihoodCSS:
		if complete {
			pl.method = CSS
		}
	}

	pl.regs = s.Regressors
	res := &SearchResult{Criterion: s.Criterion, RankedByCSS: pl.method == CSS, Exhaustive: s.Exhaustive, SeasonalStrength: strength}
	var fits []*Fitted
	var err error
	if s.Exhaustive {
		workers := s.Workers
		if workers == 0 {
			workers = runtime.GOMAXPROCS(0)
		}
		fits, err = pl.exhaustive(ctx, y, workers, res)
	} else {
		fits, err = pl.stepwise(ctx, y, res)
	}
	if err != nil {
		return nil, err
	}
	if res, err = pl.finish(ctx, y, res, fits); err != nil {
		return nil, err
	}
	res.Model.search = res
	return res, nil
}
