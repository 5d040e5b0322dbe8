package almanac

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/almanac-go/almanac/internal/scaling"
)

// The benchmark methods every forecast should beat: Naive, SeasonalNaive,
// Drift and Mean. Each is a Model whose Fitted also implements Simulator
// and ParamCounter.
//
// Prediction intervals are normal with the closed-form variances of
// Hyndman & Athanasopoulos, Forecasting: Principles and Practice, 3rd
// ed., §5.5, Table 5.2 (recalled from memory; each variance is also
// derived in the comments below):
//
//	Mean:          σ̂ √(1 + 1/T)
//	Naive:         σ̂ √h
//	SeasonalNaive: σ̂ √(k + 1),        k = ⌊(h − 1)/m⌋
//	Drift:         σ̂ √(h (1 + h/(T − 1)))
//
// σ̂ is the residual standard deviation σ̂² = Σ e_t² / (R − K), with R
// the number of residuals that exist and K the number of estimated
// parameters (0 for Naive and SeasonalNaive, 1 for Drift and Mean) —
// the T − K − M denominator of the same book's §5.5 (common practice).
// For Mean it equals the sample standard deviation (n − 1 denominator).
//
// Missing values: every benchmark accepts NaN. Naive and Drift forecast
// from the last observed value, SeasonalNaive from the last observed
// value of each season, Mean averages the observed values. A residual
// that spans j missing steps (for example y_t − y_{t−2} when y_{t−1} is
// missing) has variance jσ² and enters σ̂ divided by √j; intervals use
// the exact number of steps from the value forecast from. Without
// missing values all of this reduces to the formulas above.
//
// Numerical notes: every benchmark computes on the data multiplied by a
// power of two that brings the largest magnitude near 2^256 and maps its
// results back (exact for powers of two), so data near the float64 limit
// give their representable mean, drift and standard deviation instead of
// overflowing, and scaling the data by a power of two scales every result
// exactly. In-sample errors or a σ̂ that do not fit in a float64 make Fit
// fail, forecasts or bounds beyond the float64 range make Forecast fail
// (errors wrapping ErrNonFinite); neither ever returns ±Inf or NaN.

var (
	_ Model = Naive{}
	_ Model = SeasonalNaive{}
	_ Model = Drift{}
	_ Model = Mean{}
)

// Naive forecasts every future value by the last observed value (a random
// walk). It needs at least two observed values. Its zero value is ready
// to use.
type Naive struct{}

// SeasonalNaive forecasts each future value by the last observed value of
// the same season.
type SeasonalNaive struct {
	// Period is the seasonal period in observations; 0 means y.Period()
	// (12 for monthly data, 4 for quarterly, ...). Negative is invalid.
	Period int
}

// Drift forecasts by the last observed value plus h times the average
// change between the first and the last observed value (a random walk
// with drift). It needs at least three observed values.
type Drift struct{}

// Mean forecasts every future value by the mean of the observed values.
// It needs at least two observed values.
type Mean struct{}

// benchKind tells the benchmark methods apart inside one fitted type.
type benchKind int

const (
	kindNaive benchKind = iota
	kindSeasonalNaive
	kindDrift
	kindMean
)

// BenchmarkFit is a fitted benchmark method (Naive, SeasonalNaive, Drift
// or Mean). It is read-only and safe for concurrent use.
type BenchmarkFit struct {
	kind   benchKind
	series Series
	// scale is the power of two the data are multiplied by for the
	// computation; level, drift, sigma and w are in those units.
	scale  int
	w      []float64 // the data times 2^scale
	period int       // seasonal period (SeasonalNaive), else 1
	last   int       // index of the last observed value
	first  int       // index of the first observed value
	level  float64   // mean (Mean) or last observed value (Naive, Drift)
	drift  float64   // Drift: slope per step
	seas   []int     // SeasonalNaive: index of the last observed value of each season position t mod m
	sigma  float64   // residual standard deviation
	nobs   int       // number of observed values
	fitted []float64 // one-step in-sample forecasts, data units
	resid  []float64 // y − fitted, data units
}

// Fit implements Model.
func (Naive) Fit(ctx context.Context, y Series) (Fitted, error) {
	return fitBenchmark(ctx, y, kindNaive, 1)
}

// Fit implements Model.
func (m SeasonalNaive) Fit(ctx context.Context, y Series) (Fitted, error) {
	if m.Period < 0 {
		return nil, fmt.Errorf("almanac: seasonal naive: %w: period %d", ErrInvalid, m.Period)
	}
	p := m.Period
	if p == 0 {
		if err := y.Validate(); err != nil {
			return nil, err
		}
		p = y.Period()
	}
	return fitBenchmark(ctx, y, kindSeasonalNaive, p)
}

// Fit implements Model.
func (Drift) Fit(ctx context.Context, y Series) (Fitted, error) {
	return fitBenchmark(ctx, y, kindDrift, 1)
}

// Fit implements Model.
func (Mean) Fit(ctx context.Context, y Series) (Fitted, error) {
	return fitBenchmark(ctx, y, kindMean, 1)
}

func (k benchKind) name() string {
	switch k {
	case kindNaive:
		return "naive"
	case kindSeasonalNaive:
		return "seasonal naive"
	case kindDrift:
		return "drift"
	}
	return "mean"
}

func fitBenchmark(ctx context.Context, y Series, kind benchKind, period int) (*BenchmarkFit, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := y.Validate(); err != nil {
		return nil, err
	}
	n := y.Len()
	f := &BenchmarkFit{kind: kind, series: y.Clone(), period: period, first: -1, last: -1}
	f.scale = scaling.Exponent(f.series.Values)
	f.w = scaling.Scale(nil, f.series.Values, f.scale)
	v := f.w
	for i, x := range v {
		if !math.IsNaN(x) {
			if f.first < 0 {
				f.first = i
			}
			f.last = i
			f.nobs++
		}
	}
	f.fitted = make([]float64, n)
	f.resid = make([]float64, n)
	// sumsq accumulates squared standardised residuals e_t/√j, nres counts them.
	sumsq, nres, params := 0.0, 0, 0
	addResid := func(t int, fit float64, steps int) {
		f.fitted[t] = fit
		if math.IsNaN(v[t]) || math.IsNaN(fit) {
			f.resid[t] = math.NaN()
			return
		}
		e := v[t] - fit
		f.resid[t] = e
		sumsq += e * e / float64(steps)
		nres++
	}
	switch kind {
	case kindNaive, kindDrift:
		need := 2
		if kind == kindDrift {
			need, params = 3, 1
			f.drift = (v[f.last] - v[f.first]) / float64(f.last-f.first)
		}
		if f.nobs < need {
			return nil, fmt.Errorf("almanac: %s: %w: %d observed values, need at least %d", kind.name(), ErrTooShort, f.nobs, need)
		}
		f.level = v[f.last]
		prev := -1 // last observed index before t
		for t := range n {
			if prev < 0 {
				f.fitted[t], f.resid[t] = math.NaN(), math.NaN()
			} else {
				steps := t - prev
				addResid(t, v[prev]+float64(steps)*f.drift, steps)
			}
			if !math.IsNaN(v[t]) {
				prev = t
			}
		}
	case kindSeasonalNaive:
		if period < 1 {
			return nil, fmt.Errorf("almanac: %s: %w: period %d", kind.name(), ErrInvalid, period)
		}
		if n <= period {
			return nil, fmt.Errorf("almanac: %s: %w: %d observations, need more than one period (%d)", kind.name(), ErrTooShort, n, period)
		}
		f.seas = make([]int, period)
		for i := range f.seas {
			f.seas[i] = -1
		}
		for t := range n {
			s := f.seas[t%period]
			if s < 0 {
				f.fitted[t], f.resid[t] = math.NaN(), math.NaN()
			} else {
				addResid(t, v[s], (t-s)/period)
			}
			if !math.IsNaN(v[t]) {
				f.seas[t%period] = t
			}
		}
		for i, s := range f.seas {
			if s < 0 {
				return nil, fmt.Errorf("almanac: %s: %w: season %d of %d has no observed value", kind.name(), ErrMissing, i+1, period)
			}
		}
		if nres < 1 {
			return nil, fmt.Errorf("almanac: %s: %w: no value has an observed value one period earlier", kind.name(), ErrTooShort)
		}
	case kindMean:
		params = 1
		if f.nobs < 2 {
			return nil, fmt.Errorf("almanac: %s: %w: %d observed values, need at least 2", kind.name(), ErrTooShort, f.nobs)
		}
		sum := 0.0
		for _, x := range v {
			if !math.IsNaN(x) {
				sum += x
			}
		}
		f.level = sum / float64(f.nobs)
		for t := range n {
			addResid(t, f.level, 1)
		}
	}
	if nres-params < 1 {
		return nil, fmt.Errorf("almanac: %s: %w: %d residuals for %d parameters", kind.name(), ErrTooShort, nres, params)
	}
	f.sigma = math.Sqrt(sumsq / float64(nres-params))
	scaling.Scale(f.fitted, f.fitted, -f.scale)
	scaling.Scale(f.resid, f.resid, -f.scale)
	if !scaling.NoInf(f.fitted) || !scaling.NoInf(f.resid) || math.IsInf(f.Sigma(), 0) {
		return nil, &SeriesError{Key: y.Key, Index: -1, Err: fmt.Errorf("%w: %s: the in-sample errors or their standard deviation exceed the float64 range", ErrNonFinite, kind.name())}
	}
	return f, nil
}

// Sigma returns the residual standard deviation σ̂ behind the intervals.
func (f *BenchmarkFit) Sigma() float64 { return math.Ldexp(f.sigma, -f.scale) }

// NumParams implements ParamCounter: 1 for Drift (the slope) and Mean
// (the mean), 0 for Naive and SeasonalNaive.
func (f *BenchmarkFit) NumParams() int {
	if f.kind == kindDrift || f.kind == kindMean {
		return 1
	}
	return 0
}

// String returns "Naive", "SeasonalNaive(m)", "Drift" or "Mean".
func (f *BenchmarkFit) String() string {
	switch f.kind {
	case kindNaive:
		return "Naive"
	case kindSeasonalNaive:
		return fmt.Sprintf("SeasonalNaive(%d)", f.period)
	case kindDrift:
		return "Drift"
	}
	return "Mean"
}

// FittedValues returns the one-step in-sample forecasts (a copy). The
// first value of Naive and Drift and the first period of SeasonalNaive
// are NaN; Mean's fitted values are all the sample mean.
func (f *BenchmarkFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns y − FittedValues() (a copy), NaN where either is
// missing.
func (f *BenchmarkFit) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// pointAndSD returns the point forecast and its standard deviation for
// future index t (t ≥ Len), in the scaled units.
func (f *BenchmarkFit) pointAndSD(t int) (mean, sd float64) {
	v := f.w
	switch f.kind {
	case kindNaive:
		// y_t = y_L + Σ_{L<i≤t} ε_i: variance (t − L) σ².
		return f.level, f.sigma * math.Sqrt(float64(t-f.last))
	case kindDrift:
		// ŷ_t = y_L + j d̂ with j = t − L and d̂ the mean of the
		// (L − F) one-step changes: error = Σ ε_i − j (d̂ − d), so the
		// variance is σ² j (1 + j/(L − F)); with no missing values
		// L − F = T − 1 and j = h.
		j := float64(t - f.last)
		return f.level + j*f.drift, f.sigma * math.Sqrt(j*(1+j/float64(f.last-f.first)))
	case kindSeasonalNaive:
		// y_t = y_s + (j seasonal innovations), s the last observed value
		// of t's season and j = (t − s)/m: variance j σ²; with no
		// missing values j = ⌊(h − 1)/m⌋ + 1.
		s := f.seas[t%f.period]
		return v[s], f.sigma * math.Sqrt(float64((t-s)/f.period))
	}
	// y_t = μ + ε_t with μ estimated by the mean of T values:
	// variance σ² (1 + 1/T).
	return f.level, f.sigma * math.Sqrt(1+1/float64(f.nobs))
}

// Forecast implements Fitted: normal forecasts with the closed-form
// standard deviations above.
//
// Special cases: h < 1 gives an error wrapping ErrHorizon; a level outside
// (0, 100) one wrapping ErrLevel; a forecast, standard deviation or bound
// beyond the float64 range one wrapping ErrNonFinite.
func (f *BenchmarkFit) Forecast(h int, levels ...float64) (Forecast, error) {
	if err := CheckHorizon(h); err != nil {
		return Forecast{}, err
	}
	if err := CheckLevels(levels...); err != nil {
		return Forecast{}, err
	}
	n := f.series.Len()
	mean := make([]float64, h)
	sd := make([]float64, h)
	for i := range h {
		m, s := f.pointAndSD(n + i)
		mean[i], sd[i] = math.Ldexp(m, -f.scale), math.Ldexp(s, -f.scale)
		if math.IsInf(sd[i], 0) {
			return Forecast{}, fmt.Errorf("almanac: %s: %w: the forecast standard deviation at step %d exceeds the float64 range", f.kind.name(), ErrNonFinite, i+1)
		}
	}
	return NewForecast(f.series.Time(n), f.series.Freq, mean, &Normal{Mean: mean, SD: sd}, levels...)
}

// Simulate implements Simulator: n sample paths of h steps from the
// fitted model with normal innovations of standard deviation σ̂ drawn from
// src. The estimated parameters (drift, mean) are held fixed, so the
// paths' spread matches the √h and √(k+1) terms but not the 1/T terms of
// the closed-form intervals.
//
// Special cases: h < 1 gives an error wrapping ErrHorizon; n < 1 or a nil
// src one wrapping ErrInvalid; a draw beyond the float64 range one
// wrapping ErrNonFinite.
func (f *BenchmarkFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := CheckHorizon(h); err != nil {
		return nil, err
	}
	if n < 1 {
		return nil, fmt.Errorf("almanac: %s: %w: %d sample paths", f.kind.name(), ErrInvalid, n)
	}
	if src == nil {
		return nil, fmt.Errorf("almanac: %s: %w: nil random source", f.kind.name(), ErrInvalid)
	}
	rng := rand.New(src)
	T := f.series.Len()
	v := f.w
	paths := make([][]float64, n)
	for p := range paths {
		path := make([]float64, h)
		switch f.kind {
		case kindNaive, kindDrift:
			gap := float64(T - 1 - f.last) // steps between the last observation and the sample end
			x := f.level + gap*f.drift + f.sigma*math.Sqrt(gap)*rng.NormFloat64()
			for i := range path {
				x += f.drift + f.sigma*rng.NormFloat64()
				path[i] = x
			}
		case kindSeasonalNaive:
			m := f.period
			for i := range path {
				t := T + i
				if i >= m {
					path[i] = path[i-m] + f.sigma*rng.NormFloat64()
					continue
				}
				s := f.seas[t%m]
				path[i] = v[s] + f.sigma*math.Sqrt(float64((t-s)/m))*rng.NormFloat64()
			}
		case kindMean:
			for i := range path {
				path[i] = f.level + f.sigma*rng.NormFloat64()
			}
		}
		scaling.Scale(path, path, -f.scale)
		if !scaling.Finite(path) {
			return nil, fmt.Errorf("almanac: %s: %w: a simulated value exceeds the float64 range", f.kind.name(), ErrNonFinite)
		}
		paths[p] = path
	}
	return paths, nil
}
