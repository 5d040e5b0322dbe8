package smoothing

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"github.com/almanac-go/almanac"
)

var _ almanac.Model = Select{}

// Criterion is the information criterion used to rank candidates; the
// zero value is AICc. It is the root package's almanac.Criterion.
type Criterion = almanac.Criterion

// The criteria, as in the root package.
const (
	AICc = almanac.AICc
	AIC  = almanac.AIC
	BIC  = almanac.BIC
)

// Select fits every admissible ETS model to a series and keeps the one
// with the lowest information criterion. It implements almanac.Model; Fit
// returns the chosen *Fitted. The zero value is the default: AICc; error
// A and M; trend N and Ad; season N, A, M (when the series has a period
// of 2..MaxPeriod and at least two full seasons).
//
// Undamped trends are left out of the default set (UndampedTrends adds
// them), on evidence from the M3 competition data (Makridakis & Hibon
// 2000; all 3,003 series, fit on the training part, sMAPE over the test
// part): AICc picked an undamped additive trend for 1,192 of them (230
// of the 645 yearly series as ETS(M,A,N), sMAPE 19.9 there against 17.0
// for the damped trend alone), because the in-sample likelihood cannot
// see the cost of extrapolating a trend without damping. With trends N
// and Ad the sMAPE is 16.75 yearly, 9.34 quarterly, 13.93 monthly, 4.30
// other and 13.12 over all series, against 17.65, 9.63, 14.52, 4.31 and
// 13.66 with trends N, A and Ad. Counting σ² among the parameters
// (13.68 without it), the cap φ ≤ 0.98 and damped fits ending below
// their undamped neighbour's likelihood (letting each damped candidate
// score at least its neighbour's likelihood: 13.66) did not change the
// outcome measurably.
//
// Excluded from the candidate set:
//   - multiplicative error, trend or season when any value is ≤ 0;
//   - seasonal models with fewer than two full seasons of data;
//   - models with more parameters than the data supports (n ≤ DF + 1,
//     so AICc is defined);
//   - multiplicative trends unless MultiplicativeTrends (common
//     practice: they forecast explosively);
//   - additive error with a multiplicative trend or season unless
//     AllowUnstable (common practice: numerically unstable, the
//     forecast distribution can put weight on non-positive values).
//
// A seasonal period above MaxPeriod is an error (wrapping
// ErrPeriodTooLong) unless Seasons is restricted to NoSeason: forecast such
// series by decomposition (package decompose). A constant series skips the
// search and gives ETS(A,N,N) with zero variance.
//
// Select is immutable and safe to share between goroutines.
type Select struct {
	// Criterion chooses among the candidates; zero = AICc.
	Criterion Criterion
	// Errors, Trends and Seasons restrict the candidate set; nil means
	// all (within the exclusions above).
	Errors  []ErrorType
	Trends  []TrendType
	Seasons []SeasonType
	// MultiplicativeTrends adds the damped multiplicative trend Md to the
	// default set of trends, and with UndampedTrends also M (ignored when
	// Trends is set). Default false.
	MultiplicativeTrends bool
	// UndampedTrends adds the undamped trends (A, and M with
	// MultiplicativeTrends) to the default set (ignored when Trends is
	// set). Default false: see above.
	UndampedTrends bool
	// AllowUnstable admits additive error with multiplicative trend or
	// season.
	AllowUnstable bool
	// Period is the seasonal period; 0 takes it from the series.
	Period int
	// Bounds is the parameter region of every candidate.
	Bounds Bounds
	// Workers is the number of candidates fitted concurrently; 0 means
	// runtime.GOMAXPROCS(0). The result does not depend on it.
	Workers int
	// Seed and Paths are passed to the chosen model's simulated
	// intervals (see Spec).
	Seed  uint64
	Paths int
}

// Candidate is one model tried by Select.
type Candidate struct {
	Spec  Spec
	Fit   *Fitted // nil when Err is set
	Score float64 // the criterion value (+Inf when the fit failed)
	Err   error
}

// Fit fits the candidates and returns the best as a *Fitted.
func (s Select) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	best, _, err := s.search(ctx, y)
	if err != nil {
		return nil, err
	}
	return best, nil
}

// Compare fits every candidate and returns them all, in a fixed order
// (error, then trend, then season, as listed in the type declarations),
// with the index of the chosen one.
func (s Select) Compare(ctx context.Context, y almanac.Series) ([]Candidate, int, error) {
	best, cands, err := s.search(ctx, y)
	if err != nil {
		return cands, -1, err
	}
	for i, c := range cands {
		if c.Fit == best {
			return cands, i, nil
		}
	}
	return cands, -1, nil
}

// check validates the options that do not depend on the data.
func (s Select) check() error {
	if !s.Criterion.Valid() {
		return fmt.Errorf("smoothing: select: %w: criterion %v", errInvalid, s.Criterion)
	}
	if s.Period < 0 || s.Workers < 0 || s.Paths < 0 {
		return fmt.Errorf("smoothing: select: %w: negative period, workers or paths", errInvalid)
	}
	if s.Bounds < UsualBounds || s.Bounds > UsualAdmissibleBounds {
		return fmt.Errorf("smoothing: select: %w: bounds %v", errInvalid, s.Bounds)
	}
	return nil
}

// candidates lists the specs to try for y.
func (s Select) candidates(y almanac.Series) ([]Spec, error) {
	positive := y.CheckPositive() == nil
	n := y.Len()
	errs := s.Errors
	if errs == nil {
		errs = []ErrorType{AdditiveError, MultiplicativeError}
	}
	trends := s.Trends
	if trends == nil {
		trends = []TrendType{NoTrend, DampedTrend}
		if s.UndampedTrends {
			trends = []TrendType{NoTrend, AdditiveTrend, DampedTrend}
		}
		if s.MultiplicativeTrends {
			if s.UndampedTrends {
				trends = append(trends, MultiplicativeTrend)
			}
			trends = append(trends, DampedMultiplicativeTrend)
		}
	}
	m := s.Period
	if m == 0 {
		m = y.Period()
	}
	seasons := s.Seasons
	explicit := seasons != nil
	if seasons == nil {
		seasons = []SeasonType{NoSeason}
		if m >= 2 {
			seasons = append(seasons, AdditiveSeason, MultiplicativeSeason)
		}
	}
	wantsSeason := slices.ContainsFunc(seasons, func(v SeasonType) bool { return v != NoSeason })
	if wantsSeason && m > MaxPeriod {
		return nil, fmt.Errorf("smoothing: select: %w: period %d > %d; forecast this series by decomposition (package decompose's decomposition model), or restrict Seasons to NoSeason", ErrPeriodTooLong, m, MaxPeriod)
	}
	if explicit && wantsSeason && m < 2 {
		return nil, fmt.Errorf("smoothing: select: %w: seasonal candidates need a period of at least 2, have %d", errInvalid, m)
	}
	var out []Spec
	for _, e := range errs {
		for _, t := range trends {
			for _, se := range seasons {
				sp := Spec{Error: e, Trend: t, Season: se, Bounds: s.Bounds, Seed: s.Seed, Paths: s.Paths}
				if se != NoSeason {
					sp.Period = m
				}
				if err := sp.check(); err != nil {
					return nil, err
				}
				if sp.multiplicativeParts() && !positive {
					continue
				}
				if e == AdditiveError && (t.multiplicative() || se == MultiplicativeSeason) && !s.AllowUnstable {
					continue
				}
				if se != NoSeason && n < 2*m {
					continue
				}
				if n <= sp.df(m)+1 {
					continue
				}
				out = append(out, sp)
			}
		}
	}
	return out, nil
}

// df is the number of parameters the criteria count when everything is
// estimated (see Fitted.DF).
func (s Spec) df(m int) int {
	k := 2 + 1 // alpha, level, sigma2
	if s.Trend != NoTrend {
		k += 2
	}
	if s.Trend.damped() {
		k++
	}
	if s.Season != NoSeason {
		k += 1 + m
	}
	return k
}

func (s Select) search(ctx context.Context, y almanac.Series) (*Fitted, []Candidate, error) {
	if err := s.check(); err != nil {
		return nil, nil, err
	}
	if err := y.Validate(); err != nil {
		return nil, nil, fmt.Errorf("smoothing: select: %w", err)
	}
	if err := y.CheckComplete(); err != nil {
		return nil, nil, fmt.Errorf("smoothing: select: ETS needs complete data; fill the gaps first (e.g. the interpolation in package decompose): %w", err)
	}
	if y.IsConstant() {
		sp := Spec{Bounds: s.Bounds, Seed: s.Seed, Paths: s.Paths}
		f, err := sp.fit(ctx, y)
		if err != nil {
			return nil, nil, err
		}
		return f, []Candidate{{Spec: sp, Fit: f, Score: math.Inf(-1)}}, nil
	}
	specs, err := s.candidates(y)
	if err != nil {
		return nil, nil, err
	}
	if len(specs) == 0 {
		if y.Len() <= (Spec{}).df(1)+1 {
			return nil, nil, fmt.Errorf("smoothing: select: %w: %w: %d observations, even ETS(A,N,N) needs %d", ErrNoCandidate, almanac.ErrTooShort, y.Len(), (Spec{}).df(1)+2)
		}
		return nil, nil, fmt.Errorf("smoothing: select: %w: no candidate model suits %d observations with the given restrictions", ErrNoCandidate, y.Len())
	}
	cands := make([]Candidate, len(specs))
	workers := s.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(specs))
	var wg sync.WaitGroup
	next := make(chan int)
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				f, err := specs[i].fit(ctx, y)
				c := Candidate{Spec: specs[i], Fit: f, Err: err, Score: math.Inf(1)}
				if err == nil {
					c.Score = s.Criterion.Choose(f.AICc, f.AIC, f.BIC)
				}
				cands[i] = c
			}
		}()
	}
	for i := range specs {
		next <- i
	}
	close(next)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, cands, err
	}
	best := -1
	var errs []error
	for i, c := range cands {
		if c.Err != nil {
			errs = append(errs, c.Err)
			continue
		}
		if math.IsNaN(c.Score) {
			continue
		}
		if best < 0 || c.Score < cands[best].Score {
			best = i
		}
	}
	if best < 0 {
		if len(errs) == 0 {
			return nil, cands, fmt.Errorf("smoothing: select: %w", ErrNoCandidate)
		}
		return nil, cands, fmt.Errorf("smoothing: select: %w: %w", ErrNoCandidate, errors.Join(errs...))
	}
	return cands[best].Fit, cands, nil
}
