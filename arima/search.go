package arima

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"gonum.org/v1/gonum/mat"
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
	// LikelihoodAuto (the zero value): CSS while searching when the
	// series has more than 150 observations or a period above 12 and no
	// missing values (common practice); exact likelihood otherwise.
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
// Candidates are fitted with looser stopping rules than Spec.Fit's (the
// maximum-likelihood iterations stop once one improves the objective by
// less than 1e-6 of its value, at most 100 iterations); a candidate whose
// criterion comes within 2 of the best so far is refitted with the full
// rules before it is compared, so the model returned is the one Spec.Fit
// gives for the chosen orders. On the package's test datasets the choice
// is the same as with the full rules throughout.
//
// Performance (BenchmarkSearch, one core of a 2-core machine shared with
// other jobs, so indicative): the default stepwise search on the
// 144-point log air passengers series fits 14 models in 44–60 ms
// (120–131 ms before the looser stopping rules and the one-pass Kalman
// update, measured side by side); see the package documentation for the
// other figures. Nearly all the time is spent in the Kalman filter.
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
	// Differencing configures the choice of d (default: at most 2, KPSS
	// at 5%).
	Differencing DifferencesSpec
	// SeasonalDifferencing configures the choice of D (default: at most
	// 1, STL strength above 0.64).
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
	// (SearchResult.ForecastWith).
	Regressors []Regressor
	// Calendar holds regressors given as rules on the time axis, as in
	// Spec.Calendar: every candidate has them, and the chosen model
	// builds their future values itself.
	Calendar calendar.Design
}

var _ almanac.Model = Search{}

// Candidate is one model considered by a Search.
type Candidate struct {
	// Spec is the model: orders, period and constant (ConstantInclude or
	// ConstantNone).
	Spec Spec
	// Score is the criterion value, on the likelihood used while
	// searching (CSS when SearchResult.RankedByCSS); +Inf when the model
	// could not be fitted or was rejected. Candidates are fitted with
	// looser stopping rules than Spec.Fit's (see Search), which can leave
	// Score slightly above the value of a full fit; those that come within
	// 2 of the best, and the chosen one, are refitted with the full rules
	// and carry the full fit's value.
	Score float64
	// LogLik is the log-likelihood of the candidate fit (NaN when it
	// failed).
	LogLik float64
	// Err says why the candidate has no score: the fitting error, or a
	// rejection (wrapping ErrNearUnitRoot) when an AR or MA root lies
	// within 1.001 of the unit circle. nil for a scored candidate. The
	// root screen applies to the fit the Score comes from: a candidate
	// that was not refitted with the full rules (far from the best) may
	// pass it where the full fit, whose optimum lies on the unit circle,
	// would come closer to the circle and fail it.
	Err error
}

// String returns the candidate in the notation of Fitted.String:
// "ARIMA(1,1,0)(0,1,1)[12]", with " + mean" or " + drift" when it has a
// constant.
func (c Candidate) String() string {
	str := c.Spec.String()
	if c.Spec.Constant == ConstantInclude {
		if c.Spec.D+c.Spec.SD == 0 {
			str += " + mean"
		} else {
			str += " + drift"
		}
	}
	return str
}

// SearchResult is the model chosen by a Search: the chosen model's
// *Fitted (refitted by exact likelihood), whose methods it has, with the
// record of the search. It is read-only and safe for concurrent use.
type SearchResult struct {
	*Fitted
	// Criterion ranked the candidates.
	Criterion Criterion
	// Candidates lists every model fitted while searching, in the order
	// tried (stepwise) or grid order (exhaustive).
	Candidates []Candidate
	// Chosen is the index in Candidates of the chosen model.
	Chosen int
	// RankedByCSS reports that candidates were ranked by CSS (and the
	// chosen one refitted by exact likelihood).
	RankedByCSS bool
	// Exhaustive reports which search ran.
	Exhaustive bool
	// ModelLimitReached reports that a stepwise search stopped at
	// MaxModels before running out of better neighbours.
	ModelLimitReached bool
	// SeasonalStrength is the STL seasonal strength of the series when D
	// was chosen from it (NaN otherwise).
	SeasonalStrength float64
}

var (
	_ almanac.Fitted       = (*SearchResult)(nil)
	_ almanac.ParamCounter = (*SearchResult)(nil)
	_ almanac.Simulator    = (*SearchResult)(nil)
)

// Ranked returns the indices into Candidates of the scored candidates,
// best first (ties in candidate order), for reporting.
func (r *SearchResult) Ranked() []int {
	var idx []int
	for i, c := range r.Candidates {
		if c.Err == nil && !math.IsInf(c.Score, 0) {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool { return r.Candidates[idx[a]].Score < r.Candidates[idx[b]].Score })
	return idx
}

// searchPlan is a Search with the defaults resolved against one series.
type searchPlan struct {
	maxP, maxQ, maxSP, maxSQ int
	maxTerms                 int // ≤ 0: none
	d, sd, period            int
	constOK                  bool
	method                   Method
	crit                     Criterion
	maxModels                int
	regs                     []Regressor
	// full marks the candidates (by index) already fitted with the full
	// stopping rules (fullOpt); the others used searchOpt.
	full map[int]bool
}

func limit(v, def int) int {
	switch {
	case v == 0:
		return def
	case v < 0:
		return 0
	}
	return v
}

// Fit chooses and fits the model for y and returns a *SearchResult.
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
	return r, nil
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
		strength, err = SeasonalStrength(base, pl.period, s.SeasonalDifferencing.Span)
		if err != nil {
			return nil, fmt.Errorf("arima: search: choosing D: %w", err)
		}
		pl.sd, err = SeasonalDifferences(base, pl.period, s.SeasonalDifferencing)
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
		pl.d, err = Differences(w, s.Differencing)
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
		if complete && (y.Len() > 150 || pl.period > 12) {
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
	return pl.finish(ctx, y, res, fits)
}

// regressionResiduals returns the residuals of the least-squares
// regression of y on a constant and the regressors, over the observed
// values of y (NaN where y is missing).
func regressionResiduals(y []float64, regs []Regressor) ([]float64, error) {
	n := len(y)
	for _, r := range regs {
		if len(r.Values) != n {
			return nil, fmt.Errorf("arima: search: %w: regressor %q has %d values, the series %d", almanac.ErrLength, r.Name, len(r.Values), n)
		}
		for i, v := range r.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("arima: search: %w: regressor %q at index %d is %v", almanac.ErrNonFinite, r.Name, i, v)
			}
		}
	}
	var rows []int
	for t, v := range y {
		if !math.IsNaN(v) {
			rows = append(rows, t)
		}
	}
	k := len(regs) + 1
	if len(rows) <= k {
		return nil, fmt.Errorf("arima: search: %w: %d observed values for a constant and %d regressors", almanac.ErrTooShort, len(rows), len(regs))
	}
	// Columns divided by a power of two near their largest |value|
	// (exact; the residuals do not change), so that the conditioning test
	// below judges collinearity, not units.
	sc := make([]float64, len(regs))
	for j, r := range regs {
		sc[j] = columnScale(r.Values)
	}
	x := mat.NewDense(len(rows), k, nil)
	yv := mat.NewVecDense(len(rows), nil)
	for i, t := range rows {
		x.Set(i, 0, 1)
		for j, r := range regs {
			x.Set(i, j+1, r.Values[t]/sc[j])
		}
		yv.SetVec(i, y[t])
	}
	var qr mat.QR
	qr.Factorize(x)
	var b mat.VecDense
	if err := qr.SolveVecTo(&b, false, yv); err != nil {
		return nil, fmt.Errorf("arima: search: %w: the regressors and the constant are linearly dependent: %v", ErrCollinear, err)
	}
	var cond mat.SVD
	if cond.Factorize(x, mat.SVDNone) {
		if v := cond.Values(nil); v[len(v)-1] <= 1e-10*v[0] {
			return nil, fmt.Errorf("arima: search: %w: the regressors and the constant are (nearly) linearly dependent", ErrCollinear)
		}
	}
	out := make([]float64, n)
	for t := range out {
		out[t] = math.NaN()
	}
	for i, t := range rows {
		out[t] = y[t] - mat.Dot(x.RowView(i), &b)
	}
	return out, nil
}

// spec returns the candidate Spec for the given orders.
func (pl *searchPlan) spec(p, q, sp, sq int, constant bool) Spec {
	c := ConstantNone
	if constant {
		c = ConstantInclude
	}
	return Spec{P: p, D: pl.d, Q: q, SP: sp, SD: pl.sd, SQ: sq, Period: pl.period, Constant: c, Method: pl.method, Regressors: pl.regs}
}

// evaluate fits one candidate and scores it.
func (pl *searchPlan) evaluate(ctx context.Context, y almanac.Series, sp Spec) (Candidate, *Fitted) {
	c := Candidate{Spec: sp, Score: math.Inf(1), LogLik: math.NaN()}
	f, err := sp.fitWith(ctx, y, searchOpt)
	if err != nil {
		c.Err = err
		return c, nil
	}
	c.LogLik = f.LogLik()
	if err := nearUnitRoot(f); err != nil {
		c.Err = err
		return c, nil
	}
	score := pl.crit.Choose(f.AICc(), f.AIC(), f.BIC())
	if math.IsNaN(score) || math.IsInf(score, 0) {
		c.Err = fmt.Errorf("arima: %w: %s: %v is %v", almanac.ErrNotFitted, sp, pl.crit, score)
		return c, nil
	}
	c.Score = score
	return c, f
}

// confirmMargin: a candidate whose criterion value, fitted with the
// looser stopping rules of searchOpt, comes within this margin of the
// best one is refitted with the full rules before they are compared. The
// looser rules leave the criterion at most 1.3 above the full fit's on
// the package's test datasets; 2 is also the usual threshold of a
// substantial difference in an information criterion (common practice).
const confirmMargin = 2

// confirm refits candidate c, scored with the looser stopping rules of
// searchOpt, with those of Spec.Fit (fullOpt) and the same method, and
// records the refit's log-likelihood and score in c. When the refit fails
// or its roots come within 1.001 of the unit circle (a fit whose optimum
// lies on the boundary may stop short of it under the looser rules), c is
// marked rejected and confirm returns nil.
func (pl *searchPlan) confirm(ctx context.Context, y almanac.Series, c *Candidate) *Fitted {
	f, err := c.Spec.fitWith(ctx, y, fullOpt)
	if err == nil {
		err = nearUnitRoot(f)
	}
	score := math.Inf(1)
	if err == nil {
		if score = pl.crit.Choose(f.AICc(), f.AIC(), f.BIC()); math.IsNaN(score) || math.IsInf(score, 0) {
			err = fmt.Errorf("arima: %w: %s: %v is %v", almanac.ErrNotFitted, c.Spec, pl.crit, score)
		}
	}
	if err != nil {
		c.Err, c.Score = err, math.Inf(1)
		return nil
	}
	c.LogLik, c.Score = f.LogLik(), score
	return f
}

// orderKey identifies a candidate within one search (d, D and the period
// are fixed).
type orderKey struct {
	p, q, sp, sq int
	constant     bool
}

func (pl *searchPlan) allowed(k orderKey) bool {
	if k.p < 0 || k.q < 0 || k.sp < 0 || k.sq < 0 ||
		k.p > pl.maxP || k.q > pl.maxQ || k.sp > pl.maxSP || k.sq > pl.maxSQ {
		return false
	}
	if pl.maxTerms > 0 && k.p+k.q+k.sp+k.sq > pl.maxTerms {
		return false
	}
	return !k.constant || pl.constOK
}

// stepwise is the search of Hyndman & Khandakar (2008, sec. 3.2): fit the
// starting models, then move to the first neighbour that lowers the
// criterion (one of p, q, P, Q changed by ±1; p and q together by ±1; P
// and Q together by ±1; the constant toggled) until no neighbour does.
func (pl *searchPlan) stepwise(ctx context.Context, y almanac.Series, res *SearchResult) ([]*Fitted, error) {
	var fits []*Fitted
	seen := map[orderKey]int{}
	best := -1
	// try fits k once; it reports whether k became the best.
	try := func(k orderKey) (bool, error) {
		if !pl.allowed(k) {
			return false, nil
		}
		if _, ok := seen[k]; ok {
			return false, nil
		}
		if len(res.Candidates) >= pl.maxModels {
			res.ModelLimitReached = true
			return false, nil
		}
		if err := ctx.Err(); err != nil {
			return false, fmt.Errorf("arima: search: %w", err)
		}
		c, f := pl.evaluate(ctx, y, pl.spec(k.p, k.q, k.sp, k.sq, k.constant))
		if errors.Is(c.Err, context.Canceled) || errors.Is(c.Err, context.DeadlineExceeded) {
			return false, fmt.Errorf("arima: search: %w", c.Err)
		}
		if f != nil && (best < 0 || c.Score < res.Candidates[best].Score+confirmMargin) {
			// A candidate that may be the new best is refitted with the
			// full stopping rules before it is compared.
			f = pl.confirm(ctx, y, &c)
			if pl.full == nil {
				pl.full = map[int]bool{}
			}
			pl.full[len(res.Candidates)] = true
			if errors.Is(c.Err, context.Canceled) || errors.Is(c.Err, context.DeadlineExceeded) {
				return false, fmt.Errorf("arima: search: %w", c.Err)
			}
		}
		seen[k] = len(res.Candidates)
		res.Candidates = append(res.Candidates, c)
		fits = append(fits, f)
		if f != nil && (best < 0 || c.Score < res.Candidates[best].Score) {
			best = len(res.Candidates) - 1
			return true, nil
		}
		return false, nil
	}

	sAR, sMA := min(1, pl.maxSP), min(1, pl.maxSQ)
	c := pl.constOK
	starts := []orderKey{
		{min(2, pl.maxP), min(2, pl.maxQ), sAR, sMA, c},
		{0, 0, 0, 0, c},
		{min(1, pl.maxP), 0, sAR, 0, c},
		{0, min(1, pl.maxQ), 0, sMA, c},
	}
	if c {
		starts = append(starts, orderKey{0, 0, 0, 0, false})
	}
	for _, k := range starts {
		if _, err := try(k); err != nil {
			return nil, err
		}
	}

	moves := []orderKey{
		{p: -1}, {p: 1}, {q: -1}, {q: 1},
		{sp: -1}, {sp: 1}, {sq: -1}, {sq: 1},
		{p: -1, q: -1}, {p: 1, q: 1}, {p: -1, q: 1}, {p: 1, q: -1},
		{sp: -1, sq: -1}, {sp: 1, sq: 1}, {sp: -1, sq: 1}, {sp: 1, sq: -1},
	}
	for best >= 0 && !res.ModelLimitReached {
		cur := keyOf(res.Candidates[best].Spec)
		improved := false
		for _, m := range moves {
			k := orderKey{cur.p + m.p, cur.q + m.q, cur.sp + m.sp, cur.sq + m.sq, cur.constant}
			ok, err := try(k)
			if err != nil {
				return nil, err
			}
			if ok {
				improved = true
				break
			}
		}
		if !improved && pl.constOK {
			k := cur
			k.constant = !k.constant
			ok, err := try(k)
			if err != nil {
				return nil, err
			}
			improved = ok
		}
		if !improved {
			break
		}
	}
	return fits, nil
}

func keyOf(s Spec) orderKey {
	return orderKey{s.P, s.Q, s.SP, s.SQ, s.Constant == ConstantInclude}
}

// exhaustive fits every allowed model of the grid, in parallel over
// workers, writing each result at its grid index.
func (pl *searchPlan) exhaustive(ctx context.Context, y almanac.Series, workers int, res *SearchResult) ([]*Fitted, error) {
	// No order of the grid exceeds maxTerms (always set for the
	// exhaustive search), so the loops stop there: a huge MaxP would
	// otherwise be iterated through, one rejected order at a time.
	bound := func(m int) int {
		if pl.maxTerms > 0 {
			return min(m, pl.maxTerms)
		}
		return m
	}
	var keys []orderKey
	for p := 0; p <= bound(pl.maxP); p++ {
		for q := 0; q <= bound(pl.maxQ); q++ {
			for sp := 0; sp <= bound(pl.maxSP); sp++ {
				for sq := 0; sq <= bound(pl.maxSQ); sq++ {
					for _, c := range []bool{false, true} {
						if k := (orderKey{p, q, sp, sq, c}); pl.allowed(k) {
							keys = append(keys, k)
						}
					}
				}
			}
		}
	}
	cands := make([]Candidate, len(keys))
	fits := make([]*Fitted, len(keys))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(workers, len(keys)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				k := keys[i]
				cands[i], fits[i] = pl.evaluate(ctx, y, pl.spec(k.p, k.q, k.sp, k.sq, k.constant))
			}
		}()
	}
	var ctxErr error
	for i := range keys {
		if ctxErr = ctx.Err(); ctxErr != nil {
			break
		}
		next <- i
	}
	close(next)
	wg.Wait()
	if ctxErr == nil {
		ctxErr = ctx.Err()
	}
	if ctxErr != nil {
		return nil, fmt.Errorf("arima: search: %w", ctxErr)
	}
	res.Candidates = cands
	return fits, nil
}

// finish picks the best candidate (lowest score, ties to the earliest)
// and, when the candidates were ranked by CSS, refits candidates by exact
// likelihood in order of score until one succeeds.
func (pl *searchPlan) finish(ctx context.Context, y almanac.Series, res *SearchResult, fits []*Fitted) (*SearchResult, error) {
	order := make([]int, 0, len(res.Candidates))
	for i := range res.Candidates {
		if fits[i] != nil {
			order = append(order, i)
		}
	}
	if len(order) == 0 {
		return nil, noCandidate(res.Candidates)
	}
	// Stable insertion sort by score: ties keep the earlier index.
	for i := 1; i < len(order); i++ {
		for j := i; j > 0 && res.Candidates[order[j]].Score < res.Candidates[order[j-1]].Score; j-- {
			order[j], order[j-1] = order[j-1], order[j]
		}
	}
	if !res.RankedByCSS {
		// The best candidate after a refit with the full stopping rules
		// of each one that comes within confirmMargin of the best refitted
		// one (stepwise has refitted those already), in order of score;
		// ties go to the earlier candidate.
		chosen := -1
		for _, i := range order {
			if chosen >= 0 && res.Candidates[i].Score >= res.Candidates[chosen].Score+confirmMargin {
				break
			}
			f := fits[i]
			if !pl.full[i] {
				f = pl.confirm(ctx, y, &res.Candidates[i])
				fits[i] = f
			}
			if ctx.Err() != nil {
				return nil, fmt.Errorf("arima: search: %w", ctx.Err())
			}
			if f == nil {
				continue
			}
			if c, b := res.Candidates[i].Score, chosen; b < 0 || c < res.Candidates[b].Score || (c == res.Candidates[b].Score && i < b) {
				chosen = i
			}
		}
		if chosen < 0 {
			return nil, noCandidate(res.Candidates)
		}
		res.Chosen = chosen
		res.Fitted = fits[chosen]
		return res, nil
	}
	// Ranked by CSS: refit by exact likelihood (CSS then ML) in order of
	// score until one succeeds.
	var errs []string
	for _, i := range order {
		sp := res.Candidates[i].Spec
		sp.Method = CSSThenML
		f, err := sp.fitWith(ctx, y, fullOpt)
		if err == nil {
			err = nearUnitRoot(f)
		}
		if err == nil {
			res.Chosen = i
			res.Fitted = f
			return res, nil
		}
		if ctx.Err() != nil {
			return nil, fmt.Errorf("arima: search: %w", ctx.Err())
		}
		errs = append(errs, fmt.Sprintf("%s: %v", sp, err))
	}
	return nil, fmt.Errorf("arima: search: %w: no candidate could be refitted by exact likelihood: %s", almanac.ErrNotFitted, strings.Join(errs, "; "))
}

// noCandidate builds the error for a search in which nothing could be
// fitted: it wraps almanac.ErrNotFitted and the first candidate's error.
func noCandidate(cands []Candidate) error {
	if len(cands) == 0 {
		return fmt.Errorf("arima: search: %w: no candidate model within the limits", almanac.ErrNotFitted)
	}
	return fmt.Errorf("arima: search: %w: none of %d candidate models could be fitted; first, %s: %w", almanac.ErrNotFitted, len(cands), cands[0].Spec, cands[0].Err)
}

// unitRootMargin is the modulus below which a root of a fitted AR or MA
// polynomial counts as on the unit circle (Hyndman & Khandakar 2008).
const unitRootMargin = 1.001

// nearUnitRoot returns an error wrapping ErrNearUnitRoot when a root of
// the fitted AR, MA, seasonal AR or seasonal MA polynomial has modulus
// below 1.001 (for a seasonal polynomial in B^s, the corresponding roots
// in B: |z| = |w|^(1/s)).
func nearUnitRoot(f *Fitted) error {
	// The estimates only: Coef would also compute the standard errors
	// (a Hessian), which the screen does not need. AR polynomials are
	// 1 − φ₁z − …, MA ones 1 + θ₁z + ….
	l := f.lay
	neg := func(v []float64) []float64 {
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = -x
		}
		return out
	}
	ar := neg(f.coef[l.arOff() : l.arOff()+l.p])
	ma := f.coef[l.maOff() : l.maOff()+l.q]
	sar := neg(f.coef[l.sarOff() : l.sarOff()+l.sp])
	sma := f.coef[l.smaOff() : l.smaOff()+l.sq]
	s := max(f.Period(), 1)
	for _, b := range []struct {
		name  string
		coef  []float64
		power int
	}{{"AR", ar, 1}, {"MA", ma, 1}, {"seasonal AR", sar, s}, {"seasonal MA", sma, s}} {
		m := minRootModulus(b.coef)
		if m < math.Pow(unitRootMargin, float64(b.power)) {
			return fmt.Errorf("arima: %w: %s polynomial of %s has a root of modulus %.4f", ErrNearUnitRoot, b.name, f, math.Pow(m, 1/float64(b.power)))
		}
	}
	return nil
}

// minRootModulus returns the smallest modulus of the roots of
// 1 + c₁z + … + c_k z^k (+Inf when the polynomial is constant). The roots
// are the reciprocals of the eigenvalues of the companion matrix of the
// reversed polynomial z^k + c₁z^{k−1} + … + c_k.
func minRootModulus(c []float64) float64 {
	k := len(c)
	for k > 0 && c[k-1] == 0 {
		k--
	}
	if k == 0 {
		return math.Inf(1)
	}
	a := mat.NewDense(k, k, nil)
	for j := 0; j < k; j++ {
		a.Set(0, j, -c[j])
	}
	for i := 1; i < k; i++ {
		a.Set(i, i-1, 1)
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenNone) {
		return 0 // treat as unusable
	}
	maxAbs := 0.0
	for _, v := range eig.Values(nil) {
		maxAbs = math.Max(maxAbs, math.Hypot(real(v), imag(v)))
	}
	if maxAbs == 0 {
		return math.Inf(1)
	}
	return 1 / maxAbs
}
