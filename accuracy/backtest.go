package accuracy

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
	"time"

	"github.com/almanac-go/almanac"
)

// WindowKind is the shape of the training window of a backtest.
type WindowKind int

const (
	// Expanding trains at each origin on every observation before it
	// (the zero value).
	Expanding WindowKind = iota
	// Sliding trains at each origin on the Length observations just
	// before it.
	Sliding
)

// String returns "expanding" or "sliding", and WindowKind(n) otherwise.
func (k WindowKind) String() string {
	switch k {
	case Expanding:
		return "expanding"
	case Sliding:
		return "sliding"
	}
	return fmt.Sprintf("WindowKind(%d)", int(k))
}

// Candidate is a model taking part in a backtest, under a name of the
// caller's choosing (names must be distinct within one backtest).
type Candidate struct {
	Name  string
	Model almanac.Model
}

// Names of the default benchmark candidates.
const (
	NaiveName         = "naive"
	SeasonalNaiveName = "seasonal naive"
)

// Backtest is a rolling-origin evaluation (Tashman 2000): for each origin
// o the models are fitted to the observations before o and forecast the
// Horizon observations from o on, which are then compared with what
// happened. Origins are First, First+Step, First+2·Step, ...; an origin
// is used only when all Horizon observations after it exist.
//
// The zero value is usable: horizon one seasonal period, origins from
// the middle of the series to the end, an expanding window, the naive
// and seasonal naive benchmarks, relative scores against the seasonal
// naive (the naive for non-seasonal data). Write it with keyed fields:
//
//	accuracy.Backtest{Horizon: 12, Origins: 24, Levels: []float64{80, 95}}
//
// A Backtest is a plain specification, safe to share between
// goroutines.
type Backtest struct {
	// Horizon is the number of steps forecast from each origin. 0 means
	// the seasonal period (see Period), and 1 for non-seasonal data.
	Horizon int
	// First is the number of observations before the first origin. 0
	// means automatic: the latest first origin that leaves room for
	// Origins origins when Origins > 0, else half the series.
	First int
	// Origins caps the number of origins. 0 means as many as fit.
	Origins int
	// Step is the distance between consecutive origins. 0 means 1.
	Step int
	// Window is the training window shape (default Expanding).
	Window WindowKind
	// Length is the training window length of a Sliding window. 0 means
	// First. Ignored for an Expanding window.
	Length int
	// Levels are the prediction-interval levels to score, percentages in
	// (0, 100). None means no interval scores.
	Levels []float64
	// Period is the seasonal period used for the MASE/RMSSE/MSIS scale,
	// the default Horizon and the seasonal naive benchmark. 0 means the
	// series' own (Series.Period: 12 monthly, 4 quarterly, 1 yearly).
	Period int
	// Benchmarks are evaluated alongside the models. Nil means the naive
	// method ("naive") and, for a seasonal Period, the seasonal naive
	// method ("seasonal naive"); see also NoBenchmarks.
	Benchmarks []Candidate
	// NoBenchmarks evaluates only the models given to Run.
	NoBenchmarks bool
	// Baseline names the candidate the relative scores are against. ""
	// means "seasonal naive" when it takes part, else "naive", else the
	// first model.
	Baseline string
	// Workers is the number of goroutines fitting (candidate, origin)
	// pairs. 0 means runtime.GOMAXPROCS(0). Results do not depend on it.
	Workers int
	// Progress, when not nil, is called after each (series, candidate,
	// origin) fit is finished — completed, failed, or skipped after
	// cancellation — with the number finished so far and the total. Calls
	// never overlap and done increases by one each call; they come from
	// the worker goroutines, so Progress must not block for long.
	Progress func(done, total int)
	// Paths is the number of sample paths drawn, for the band of the
	// horizon total, from a fitted model that implements
	// almanac.Simulator when its forecast holds no paths of its own. 0
	// means DefaultTotalPaths. Negative is invalid.
	Paths int
}

// Origin describes one forecast origin of a backtest of one series.
type Origin struct {
	Index      int       // observations before the origin; forecasts cover [Index, Index+Horizon)
	TrainStart int       // first observation of the training window
	Time       time.Time // time of the first forecast step
	// Scale and ScaleSq are the naive in-sample scales (NaiveScale) of the
	// training window with the backtest's period; NaN when undefined.
	Scale, ScaleSq float64
}

// Run is one candidate's results on one series.
//
// A candidate that fails to fit or forecast at an origin (or panics) is
// scored over the origins it completed: Done is false at that origin, the
// failure is in Failures, its Fits entry is "", its Forecasts entry the
// zero Forecast and its Errors row NaN. After a cancellation the origins
// not reached are not Done either, but are not failures.
type Run struct {
	Name string
	// Fits holds the fitted model's published notation (Fitted.String) at
	// each origin ("" where not Done).
	Fits []string
	// Forecasts holds the forecast made at each origin.
	Forecasts []almanac.Forecast
	// Errors[o][h] is actual − forecast at origin o and step h+1 (NaN
	// where the actual value is missing or the origin not Done).
	Errors [][]float64
	// Done[o] reports whether the candidate was fitted and forecast at
	// origin o.
	Done []bool
	// Failures lists the origins at which the candidate failed, in origin
	// order (empty when it failed nowhere).
	Failures []FitFailure
	// ByStep[h] scores step h+1 over the origins Done.
	ByStep []Scores
	// Overall scores every (origin, step) cell of the origins Done.
	Overall Scores
	// Relative holds Overall divided by the baseline's, both scored over
	// the origins Done by this candidate and the baseline alike.
	Relative Ratios
	// Totals[o] is the forecast of the total over the Horizon steps made
	// at origin o (see HorizonTotal).
	Totals []HorizonTotal
	// Total scores the forecasts of the horizon totals over the origins
	// Done (see TotalScores).
	Total TotalScores
}

// Comparison is the result of a backtest on one series: every
// candidate's forecasts and scores at the same origins.
type Comparison struct {
	Key      string // series key
	Horizon  int
	Period   int
	Window   WindowKind
	Levels   []float64
	Origins  []Origin
	Actual   [][]float64 // Actual[o][h]: the observation forecast at origin o, step h+1
	Runs     []Run       // the models in the order given, then the benchmarks
	Baseline string      // name of the run the relative scores are against
	// Partial reports that the backtest was cancelled before every
	// (candidate, origin) pair of this series was fitted; Run.Done says
	// which were.
	Partial bool
}

// Run returns the run named name.
func (c *Comparison) Run(name string) (*Run, bool) {
	for i := range c.Runs {
		if c.Runs[i].Name == name {
			return &c.Runs[i], true
		}
	}
	return nil, false
}

// Failures returns every candidate's failures, candidate by candidate in
// the order of Runs, each in origin order.
func (c *Comparison) Failures() []FitFailure {
	var out []FitFailure
	for _, r := range c.Runs {
		out = append(out, r.Failures...)
	}
	return out
}

// FitFailure is a candidate that could not be fitted, or could not
// forecast, at one origin of a backtest.
type FitFailure struct {
	Series    int       // position of the series in the batch (0 for Run)
	Key       string    // its key
	Candidate string    // the candidate's name
	Origin    int       // index into Comparison.Origins
	Time      time.Time // time of the origin's first forecast step
	// Stage is "fit", "forecast" or "panic".
	Stage string
	// Cause is the model's own error (for a panic, an error wrapping
	// almanac.ErrNotFitted with the recovered value).
	Cause error
	// Err wraps ErrBacktest and Cause, with the series, model and origin
	// in its text.
	Err error
}

// plan is a resolved backtest of one series.
type plan struct {
	y          almanac.Series
	period     int
	h          int
	origins    []Origin
	candidates []Candidate
	baseline   int
	levels     []float64
}

func (b Backtest) candidates(models []Candidate, period int) ([]Candidate, int, error) {
	all := slices.Clone(models)
	if !b.NoBenchmarks {
		bench := b.Benchmarks
		if bench == nil {
			bench = []Candidate{{Name: NaiveName, Model: almanac.Naive{}}}
			if period > 1 {
				bench = append(bench, Candidate{Name: SeasonalNaiveName, Model: almanac.SeasonalNaive{Period: period}})
			}
		}
		all = append(all, bench...)
	}
	if len(all) == 0 {
		return nil, 0, fmt.Errorf("accuracy: backtest: %w: no model to evaluate", almanac.ErrInvalid)
	}
	for i, c := range all {
		if c.Model == nil {
			return nil, 0, fmt.Errorf("accuracy: backtest: %w: candidate %q has no model", almanac.ErrInvalid, c.Name)
		}
		if c.Name == "" {
			return nil, 0, fmt.Errorf("accuracy: backtest: %w: candidate %d has no name", almanac.ErrInvalid, i)
		}
		for _, d := range all[:i] {
			if d.Name == c.Name {
				return nil, 0, fmt.Errorf("accuracy: backtest: %w: two candidates named %q", almanac.ErrInvalid, c.Name)
			}
		}
	}
	find := func(name string) int {
		return slices.IndexFunc(all, func(c Candidate) bool { return c.Name == name })
	}
	base := 0
	switch {
	case b.Baseline != "":
		if base = find(b.Baseline); base < 0 {
			return nil, 0, fmt.Errorf("accuracy: backtest: %w: baseline %q is not a candidate", almanac.ErrInvalid, b.Baseline)
		}
	case find(SeasonalNaiveName) >= 0:
		base = find(SeasonalNaiveName)
	case find(NaiveName) >= 0:
		base = find(NaiveName)
	}
	return all, base, nil
}

// check validates the parts of the specification that do not depend on
// the series: levels, signs of the options, the window kind, and a
// sliding window longer than an explicit First.
func (b Backtest) check() error {
	for _, l := range b.Levels {
		if err := almanac.CheckLevels(l); err != nil {
			return fmt.Errorf("accuracy: backtest: %w", err)
		}
	}
	bad := func(what string, v int) error {
		return fmt.Errorf("accuracy: backtest: %w: %s %d is negative", almanac.ErrInvalid, what, v)
	}
	switch {
	case b.Horizon < 0:
		return bad("horizon", b.Horizon)
	case b.First < 0:
		return bad("first origin", b.First)
	case b.Origins < 0:
		return bad("origin count", b.Origins)
	case b.Step < 0:
		return bad("step", b.Step)
	case b.Length < 0:
		return bad("window length", b.Length)
	case b.Period < 0:
		return bad("period", b.Period)
	case b.Workers < 0:
		return bad("worker count", b.Workers)
	case b.Paths < 0:
		return bad("path count", b.Paths)
	case b.Window != Expanding && b.Window != Sliding:
		return fmt.Errorf("accuracy: backtest: %w: window %v", almanac.ErrInvalid, b.Window)
	case b.Window == Sliding && b.First > 0 && b.Length > b.First:
		return b.slidingTooLong(b.First)
	}
	return nil
}

func (b Backtest) slidingTooLong(first int) error {
	return fmt.Errorf("accuracy: backtest: %w: sliding window of %d observations is longer than the %d before the first origin", almanac.ErrInvalid, b.Length, first)
}

// layout checks y and lays out its origins (the specification must have
// passed check). Its errors are about the series: invalid values, or too
// few observations for the origins.
func (b Backtest) layout(y almanac.Series) (*plan, error) {
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("accuracy: backtest: %w", err)
	}
	p := &plan{y: y, period: b.Period, levels: slices.Clone(b.Levels)}
	if p.period == 0 {
		p.period = max(y.Period(), 1)
	}
	p.h = b.Horizon
	if p.h == 0 {
		p.h = p.period
	}
	step := max(b.Step, 1)
	n := y.Len()
	// The comparisons below are written so that no sum or product of
	// caller options can overflow (a huge Horizon, Period, First, Step or
	// Origins is a too-short series, not a wrapped-around index).
	if p.h >= n {
		return nil, fmt.Errorf("accuracy: backtest: series %q: %w: %d observations cannot hold a training window and %d steps ahead", y.Key, almanac.ErrTooShort, n, p.h)
	}
	first := b.First
	if first == 0 {
		if b.Origins > 0 {
			room := n - p.h                  // the latest origin
			if b.Origins-1 > (room-1)/step { // first = room − (Origins−1)·step would be below 1
				return nil, fmt.Errorf("accuracy: backtest: series %q: %w: %d observations cannot hold %d origins every %d steps, each with a training window and %d steps ahead", y.Key, almanac.ErrTooShort, n, b.Origins, step, p.h)
			}
			first = room - (b.Origins-1)*step
		} else {
			first = n / 2
		}
	}
	if first < 1 || first > n-p.h {
		return nil, fmt.Errorf("accuracy: backtest: series %q: %w: %d observations cannot hold a first origin after %d observations and %d steps ahead", y.Key, almanac.ErrTooShort, n, first, p.h)
	}
	count := (n-p.h-first)/step + 1
	if b.Origins > 0 {
		if b.Origins > count {
			return nil, fmt.Errorf("accuracy: backtest: series %q: %w: %d observations hold at most %d origins of %d steps every %d from %d, not %d", y.Key, almanac.ErrTooShort, n, count, p.h, step, first, b.Origins)
		}
		count = b.Origins
	}
	length := b.Length
	if length == 0 {
		length = first
	}
	if b.Window == Sliding && length > first {
		return nil, b.slidingTooLong(first)
	}
	for k := range count {
		o := first + k*step
		start := 0
		if b.Window == Sliding {
			start = o - length
		}
		sc, sq, err := NaiveScale(y.Values[start:o], p.period)
		if err != nil {
			sc, sq = math.NaN(), math.NaN()
		}
		p.origins = append(p.origins, Origin{Index: o, TrainStart: start, Time: y.Time(o), Scale: sc, ScaleSq: sq})
	}
	return p, nil
}

// job is one (series, candidate, origin) fit.
type job struct{ series, cand, origin int }

// outcome is the result of one job: done with a forecast, failed with
// err, or neither (not reached before cancellation).
type outcome struct {
	done     bool
	fit      string
	forecast almanac.Forecast
	total    totalBand
	err      error  // wraps ErrBacktest and cause
	stage    string // of the failure
	cause    error  // the model's own error
}

// execute runs every job of the plans (nil plans are skipped) on the
// worker pool and returns the outcomes by (plan, candidate, origin). Every
// job runs whatever the others gave, so the results do not depend on
// scheduling. When ctx is cancelled no further job is started, jobs
// stopped by the cancellation are left not done, and the second result is
// the context's error, wrapped.
func (b Backtest) execute(ctx context.Context, plans []*plan) ([][][]outcome, error) {
	var jobs []job
	out := make([][][]outcome, len(plans))
	for s, p := range plans {
		if p == nil {
			continue
		}
		out[s] = make([][]outcome, len(p.candidates))
		for c := range p.candidates {
			out[s][c] = make([]outcome, len(p.origins))
			for o := range p.origins {
				jobs = append(jobs, job{s, c, o})
			}
		}
	}
	paths := b.Paths
	if paths == 0 {
		paths = DefaultTotalPaths
	}
	workers := b.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = max(min(workers, len(jobs)), 1)
	var (
		next     atomic.Int64
		mu       sync.Mutex
		finished int
	)
	progress := func(k int) {
		if b.Progress == nil || k <= 0 {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		for range k {
			finished++
			b.Progress(finished, len(jobs))
		}
	}
	var started atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			for ctx.Err() == nil {
				i := int(next.Add(1) - 1)
				if i >= len(jobs) {
					return
				}
				started.Add(1)
				j := jobs[i]
				r := runOne(ctx, plans[j.series], j.cand, j.origin, paths)
				if r.err != nil && ctx.Err() != nil {
					r = outcome{} // stopped by the cancellation: not reached
				}
				out[j.series][j.cand][j.origin] = r
				progress(1)
			}
		})
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		// Jobs never started count as finished for Progress, as in
		// almanac.BatchFit.
		progress(len(jobs) - int(started.Load()))
		return out, fmt.Errorf("accuracy: backtest: %w", err)
	}
	return out, nil
}

// runOne fits candidate ci to the training window of origin oi and
// forecasts from it, with the band of the horizon total. A panic inside
// the model is recovered and reported as an error wrapping ErrBacktest
// and almanac.ErrNotFitted.
func runOne(ctx context.Context, p *plan, ci, oi, paths int) (res outcome) {
	c, o := p.candidates[ci], p.origins[oi]
	fail := func(what string, err error) outcome {
		return outcome{stage: what, cause: err, err: fmt.Errorf("accuracy: %w: series %q, model %q, origin %d (%s): %s: %w",
			ErrBacktest, p.y.Key, c.Name, o.Index, o.Time.Format(time.DateOnly), what, err)}
	}
	defer func() {
		if v := recover(); v != nil {
			res = fail("panic", fmt.Errorf("%w: %v", almanac.ErrNotFitted, v))
		}
	}()
	train := p.y.Window(o.TrainStart, o.Index)
	fit, err := c.Model.Fit(ctx, train)
	if err != nil {
		return fail("fit", err)
	}
	if fit == nil {
		return fail("fit", fmt.Errorf("%w: nil fitted model", almanac.ErrNotFitted))
	}
	fc, err := fit.Forecast(p.h, p.levels...)
	if err != nil {
		return fail("forecast", err)
	}
	if len(fc.Mean) != p.h {
		return fail("forecast", fmt.Errorf("%w: %d forecasts for horizon %d", almanac.ErrLength, len(fc.Mean), p.h))
	}
	return outcome{done: true, fit: fit.String(), forecast: fc, total: bandOfTotal(fit, fc, p.levels, paths, ci, oi)}
}

// assemble turns the outcomes of one plan, series number series of the
// batch, into a Comparison.
func (b Backtest) assemble(p *plan, outs [][]outcome, series int) *Comparison {
	h := p.h
	no := len(p.origins)
	c := &Comparison{
		Key: p.y.Key, Horizon: h, Period: p.period, Window: b.Window,
		Levels: slices.Clone(b.Levels), Origins: p.origins,
		Baseline: p.candidates[p.baseline].Name,
	}
	c.Actual = make([][]float64, no)
	for o, org := range p.origins {
		c.Actual[o] = slices.Clone(p.y.Values[org.Index : org.Index+h])
	}
	nan := math.NaN()
	var sorted []float64
	all := make([]*cells, len(p.candidates))
	for ci, cand := range p.candidates {
		cl := newCells(h, no, b.Levels)
		all[ci] = cl
		r := Run{Name: cand.Name, Fits: make([]string, no), Forecasts: make([]almanac.Forecast, no),
			Errors: make([][]float64, no), Done: make([]bool, no), Totals: make([]HorizonTotal, no)}
		for o, org := range p.origins {
			oc := outs[ci][o]
			r.Errors[o] = make([]float64, h)
			r.Done[o] = oc.done
			switch {
			case oc.done:
				r.Fits[o] = oc.fit
				r.Forecasts[o] = oc.forecast
			case oc.err != nil:
				r.Failures = append(r.Failures, FitFailure{Series: series, Key: p.y.Key, Candidate: cand.Name, Origin: o, Time: org.Time, Stage: oc.stage, Cause: oc.cause, Err: oc.err})
			default:
				c.Partial = true
			}
			r.Totals[o] = oc.total.horizonTotal(c.Actual[o], oc.forecast.Mean, b.Levels)
			for s := range h {
				i := o*h + s
				a := c.Actual[o][s]
				cl.actual[i], cl.scale[i], cl.scaleSq[i] = a, org.Scale, org.ScaleSq
				if !oc.done {
					r.Errors[o][s] = nan
					cl.mean[i], cl.crps[i] = nan, nan
					for k := range b.Levels {
						cl.lower[k][i], cl.upper[k][i] = nan, nan
					}
					continue
				}
				f := oc.forecast.Mean[s]
				r.Errors[o][s] = a - f
				cl.mean[i] = f
				cl.crps[i], sorted = cellCRPS(a, oc.forecast, s, sorted)
				for k, level := range b.Levels {
					cl.lower[k][i], cl.upper[k][i] = boundsAt(oc.forecast, level, s)
				}
			}
		}
		r.ByStep, r.Overall = cl.byStep(no)
		r.Total = scoreTotals(r.Totals, p.origins, h, b.Levels)
		c.Runs = append(c.Runs, r)
	}
	base := p.baseline
	for i := range c.Runs {
		if slices.Equal(c.Runs[i].Done, c.Runs[base].Done) {
			c.Runs[i].Relative = c.Runs[i].Overall.RelativeTo(c.Runs[base].Overall)
			continue
		}
		// Score both over the cells of the origins both completed.
		var idx []int
		for o := range no {
			if c.Runs[i].Done[o] && c.Runs[base].Done[o] {
				for s := range h {
					idx = append(idx, o*h+s)
				}
			}
		}
		mine := all[i].summarize(idx)
		theirs := all[base].summarize(idx)
		c.Runs[i].Relative = mine.RelativeTo(theirs)
	}
	return c
}

// newCells allocates the score inputs of no origins of h steps.
func newCells(h, no int, levels []float64) *cells {
	size := no * h
	cl := &cells{h: h, levels: levels}
	cl.actual = make([]float64, size)
	cl.mean = make([]float64, size)
	cl.scale = make([]float64, size)
	cl.scaleSq = make([]float64, size)
	cl.crps = make([]float64, size)
	cl.lower = make([][]float64, len(levels))
	cl.upper = make([][]float64, len(levels))
	for k := range levels {
		cl.lower[k] = make([]float64, size)
		cl.upper[k] = make([]float64, size)
	}
	return cl
}

// cellCRPS is the CRPS of forecast step s at y for a normal or sample
// distribution, NaN otherwise (and NaN for a missing y).
func cellCRPS(y float64, f almanac.Forecast, s int, buf []float64) (float64, []float64) {
	if math.IsNaN(y) {
		return math.NaN(), buf
	}
	switch d := f.Dist.(type) {
	case *almanac.Normal:
		if s < len(d.Mean) && s < len(d.SD) && d.SD[s] >= 0 {
			return crpsNormal(y, d.Mean[s], d.SD[s]), buf
		}
	case *almanac.Sample:
		buf = buf[:0]
		for _, p := range d.Paths {
			if s < len(p) && !math.IsNaN(p[s]) && !math.IsInf(p[s], 0) {
				buf = append(buf, p[s])
			}
		}
		if len(buf) > 0 {
			slices.Sort(buf)
			return crpsSorted(y, buf), buf
		}
	}
	return math.NaN(), buf
}

// boundsAt returns the interval at level for step s, from Intervals (or
// NaN when the forecast has none at that level).
func boundsAt(f almanac.Forecast, level float64, s int) (lo, hi float64) {
	for _, iv := range f.Intervals {
		if iv.Level == level && s < len(iv.Lower) && s < len(iv.Upper) {
			return iv.Lower[s], iv.Upper[s]
		}
	}
	return math.NaN(), math.NaN()
}

// resolve checks the specification and y and lays out the backtest.
func (b Backtest) resolve(y almanac.Series, models []Candidate) (*plan, error) {
	if err := b.check(); err != nil {
		return nil, err
	}
	p, err := b.layout(y)
	if err != nil {
		return nil, err
	}
	if p.candidates, p.baseline, err = b.candidates(models, p.period); err != nil {
		return nil, err
	}
	return p, nil
}

// Run backtests the models on y, together with the benchmarks, and
// returns every candidate's forecasts and scores at the same origins.
//
// A candidate that fails to fit or forecast at some origins (or panics)
// does not stop the backtest: it is scored over the origins it completed
// and its failures are listed in its Run (Comparison.Failures gathers
// them).
//
// Special cases: an invalid series or specification gives a nil
// Comparison and an error wrapping the root sentinel (ErrTooShort when
// the series cannot hold the origins, ErrInvalid for a bad option,
// ErrLevel for a bad level). In two cases the Comparison comes back with
// an error, holding what was done: a cancelled ctx gives ctx.Err()
// wrapped (Comparison.Partial is set and Run.Done says which pairs were
// fitted); a candidate that completed none of the origins gives an error
// wrapping ErrBacktest and that candidate's first failure (the first such
// candidate in the order of Runs), as RunBatch does when it leaves a
// series out of its summaries.
func (b Backtest) Run(ctx context.Context, y almanac.Series, models ...Candidate) (*Comparison, error) {
	p, err := b.resolve(y, models)
	if err != nil {
		return nil, err
	}
	outs, cerr := b.execute(ctx, []*plan{p})
	c := b.assemble(p, outs[0], 0)
	if cerr != nil {
		return c, cerr
	}
	if err := c.unscored(nil); err != nil {
		return c, err
	}
	return c, nil
}

// unscored returns nil when every candidate completed at least one
// origin; otherwise an error about the first that did not: wrapping
// ErrBacktest and its first failure, or cancelled (wrapping cancelled)
// when it failed nowhere but was not reached.
func (c *Comparison) unscored(cancelled error) error {
	for _, r := range c.Runs {
		if slices.Contains(r.Done, true) {
			continue
		}
		if len(r.Failures) > 0 {
			return fmt.Errorf("%w; model %q completed none of the %d origins", r.Failures[0].Err, r.Name, len(c.Origins))
		}
		return fmt.Errorf("accuracy: backtest: series %q: model %q not fitted before the cancellation: %w", c.Key, r.Name, cancelled)
	}
	return nil
}

// SeriesFailure is a series left out of the summaries of a batch
// backtest.
type SeriesFailure struct {
	Index int    // position of the series in the input
	Key   string // its key
	// Err says why: an error about the series (for instance
	// almanac.ErrTooShort when it cannot hold the origins,
	// almanac.ErrNonFinite), one wrapping ErrBacktest and a candidate's
	// first failure when that candidate completed none of the origins (the
	// error Run gives for the series alone), or the context's error when
	// the batch was cancelled before a candidate was fitted on it.
	Err error
}

// BatchComparison is the result of a backtest of many series.
//
// The summaries (Mean, Counts, Relative, AvgRelMAE, Total, and OWA) cover
// the compared series: those on which every candidate completed at least
// one origin, so the candidates are compared on the same series. A series
// left out of them is listed in Failed; its Comparison is kept in Series
// (nil only when the series could not be laid out). A candidate that
// failed at some origins of a compared series is scored there over the
// origins it completed; every such failure is in FitFailures.
type BatchComparison struct {
	// Series holds one comparison per input series, in input order; nil
	// for a series whose data cannot hold the backtest.
	Series []*Comparison
	// Failed lists the series left out of the summaries, in input order
	// (empty when every series was compared).
	Failed []SeriesFailure
	// FitFailures lists every (series, candidate, origin) that failed, by
	// series, then candidate, then origin.
	FitFailures []FitFailure
	// Partial reports that the batch was cancelled before every fit was
	// done; the summaries then cover what was done.
	Partial bool
	// Names lists the candidates in the order of each Comparison's Runs.
	Names    []string
	Baseline string
	// Mean[c] averages candidate c's Overall scores over the compared
	// series, measure by measure, each over the series where it is
	// defined (Counts[c] says over how many; NaN when over none). N is
	// the total number of cells. TrackingSignal is not averaged (NaN): a
	// sum of errors means something for one series, not across them.
	Mean []Scores
	// Counts[c] says over how many compared series each average of
	// Mean[c], AvgRelMAE[c] and Total[c] was taken.
	Counts []SeriesCounts
	// Relative[c] is Mean[c] divided by the baseline's Mean, measure by
	// measure: the ratio of averages across series, as the M4 competition
	// relates sMAPE and MASE to its benchmark.
	Relative []Ratios
	// AvgRelMAE[c] is the geometric mean over the compared series of
	// candidate c's MAE relative to the baseline's, each series weighted
	// by its number of scored cells: (Π_i r_i^{n_i})^{1/Σ n_i} (Davydenko
	// & Fildes 2013, recalled from memory). Series where the ratio is
	// undefined (a baseline MAE of 0, a model MAE of 0) are left out and
	// counted in Counts; NaN when none is left.
	AvgRelMAE []float64
	// Total[c] averages candidate c's horizon-total scores over the
	// compared series, as Mean does.
	Total []TotalScores
}

// Scored returns the number of series compared (not left out of the
// summaries).
func (b *BatchComparison) Scored() int { return len(b.Series) - len(b.Failed) }

// RunBatch backtests the models on every series, fitting all (series,
// candidate, origin) triples on one worker pool. The same specification
// applies to each series (origins are laid out per series, so series may
// differ in length).
//
// A failure never stops the other fits: a candidate that fails at an
// origin is scored over the origins it completed (see
// BatchComparison); a series whose data cannot hold the backtest, or on
// which some candidate completed no origin, is left out of the summaries
// and listed in Failed with the error Run would give for it alone. Which
// series and fits fail, and why, does not depend on Workers.
//
// Special cases: no series gives an error wrapping almanac.ErrEmpty; an
// invalid specification (bad option or level, no candidate, duplicate or
// unknown names, candidate sets that differ between series because the
// default benchmarks follow the period) an error wrapping the root
// sentinel, as for Run; these come with a nil result. A cancelled ctx
// gives the partial result (Partial set, summaries over what was done)
// and ctx.Err() wrapped; when no series at all can be compared, the
// result comes with an error wrapping ErrBacktest and the first left-out
// series' reason.
func (b Backtest) RunBatch(ctx context.Context, ys []almanac.Series, models ...Candidate) (*BatchComparison, error) {
	if len(ys) == 0 {
		return nil, fmt.Errorf("accuracy: backtest: %w: no series", almanac.ErrEmpty)
	}
	if err := b.check(); err != nil {
		return nil, err
	}
	plans := make([]*plan, len(ys))
	errs := make([]error, len(ys))
	ref := -1 // first series laid out: the reference candidate set
	for i, y := range ys {
		p, err := b.layout(y)
		if err != nil {
			errs[i] = err
			continue
		}
		if p.candidates, p.baseline, err = b.candidates(models, p.period); err != nil {
			return nil, fmt.Errorf("accuracy: backtest: series %d: %w", i, err)
		}
		if ref < 0 {
			ref = i
		} else {
			r := plans[ref]
			if len(p.candidates) != len(r.candidates) {
				return nil, fmt.Errorf("accuracy: backtest: %w: series %d has %d candidates and series %d has %d (the default benchmarks depend on the period; set Period or Benchmarks)", almanac.ErrInvalid, i, len(p.candidates), ref, len(r.candidates))
			}
			for c := range p.candidates {
				if p.candidates[c].Name != r.candidates[c].Name {
					return nil, fmt.Errorf("accuracy: backtest: %w: candidates differ between series %d and %d (set Period or Benchmarks)", almanac.ErrInvalid, ref, i)
				}
			}
		}
		plans[i] = p
	}
	if ref < 0 {
		// No series can hold the backtest: the candidates still follow
		// from the specification alone when it names them.
		if _, _, err := b.candidates(models, max(b.Period, 1)); err != nil {
			return nil, err
		}
	}
	outs, cerr := b.execute(ctx, plans)
	bc := &BatchComparison{Series: make([]*Comparison, len(ys)), Partial: cerr != nil}
	var compared []*Comparison
	for i, p := range plans {
		if errs[i] != nil {
			bc.Failed = append(bc.Failed, SeriesFailure{Index: i, Key: ys[i].Key, Err: errs[i]})
			continue
		}
		c := b.assemble(p, outs[i], i)
		bc.Series[i] = c
		bc.FitFailures = append(bc.FitFailures, c.Failures()...)
		if err := c.unscored(cerr); err != nil {
			bc.Failed = append(bc.Failed, SeriesFailure{Index: i, Key: ys[i].Key, Err: err})
			continue
		}
		compared = append(compared, c)
	}
	if ref >= 0 {
		r := plans[ref]
		bc.Baseline = r.candidates[r.baseline].Name
		for _, c := range r.candidates {
			bc.Names = append(bc.Names, c.Name)
		}
		bc.summarize(compared, r.baseline, r.h)
	}
	if cerr != nil {
		return bc, cerr
	}
	if len(compared) == 0 {
		f := bc.Failed[0]
		return bc, fmt.Errorf("accuracy: %w: none of the %d series could be compared; series %d (%q): %w", ErrBacktest, len(ys), f.Index, f.Key, f.Err)
	}
	return bc, nil
}

// summarize sets the summaries of the batch over the compared series.
func (bc *BatchComparison) summarize(compared []*Comparison, base, h int) {
	nc := len(bc.Names)
	bc.Mean = make([]Scores, nc)
	bc.Counts = make([]SeriesCounts, nc)
	bc.Relative = make([]Ratios, nc)
	bc.AvgRelMAE = make([]float64, nc)
	bc.Total = make([]TotalScores, nc)
	per := make([]Scores, len(compared))
	tot := make([]TotalScores, len(compared))
	for c := range nc {
		for i, cmp := range compared {
			per[i] = cmp.Runs[c].Overall
			tot[i] = cmp.Runs[c].Total
		}
		bc.Mean[c], bc.Counts[c] = averageScores(per)
		bc.Total[c], bc.Counts[c].Total = averageTotals(tot)
	}
	for c := range nc {
		bc.Relative[c] = bc.Mean[c].RelativeTo(bc.Mean[base])
		bc.AvgRelMAE[c], bc.Counts[c].AvgRelMAE = avgRelMAE(compared, c, base)
	}
}

// avgRelMAE is the cell-weighted geometric mean over the series of run
// c's MAE divided by run base's, leaving out the series where the ratio
// is undefined, and the number of series used.
func avgRelMAE(series []*Comparison, c, base int) (float64, int) {
	var sumLog float64
	var cells, used int
	for _, cmp := range series {
		a, b := cmp.Runs[c].Overall, cmp.Runs[base].Overall
		r := a.MAE / b.MAE
		if a.N == 0 || !(r > 0) || math.IsInf(r, 0) {
			continue
		}
		sumLog += float64(a.N) * math.Log(r)
		cells += a.N
		used++
	}
	if cells == 0 {
		return math.NaN(), 0
	}
	return math.Exp(sumLog / float64(cells)), used
}
