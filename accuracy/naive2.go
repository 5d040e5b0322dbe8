package accuracy

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
	"github.com/almanac-go/almanac/internal/seasonal"
)

// Naive2Name is the candidate name conventionally given to Naive2.
const Naive2Name = "naive2"

var _ almanac.Model = Naive2{}

// Naive2 is the seasonally adjusted naive benchmark of the M3 and M4
// competitions (Makridakis & Hibon 2000; Makridakis, Spiliotis &
// Assimakopoulos 2020), against which M4 states its OWA. When the series
// passes the autocorrelation seasonality test at the 90% level
// (|r_m| > 1.645·√((1 + 2 Σ_{i<m} r_i²)/n), with n ≥ 3m), it is divided
// by the seasonal indices of a classical multiplicative decomposition,
// forecast by its last adjusted value, and the forecasts multiplied back
// by the indices of their seasons; otherwise it is the naive method.
//
// Intervals (not part of the published method) are normal on the adjusted
// scale, σ̂√h with σ̂² the mean squared one-step change of the adjusted
// series, multiplied by the season's index.
//
// Naive2 needs complete data (almanac.ErrMissing otherwise), at least two
// observations, and positive values when it adjusts for seasonality
// (almanac.ErrNonPositive). The zero value takes the period from the
// series. It is a specification, safe to share between goroutines.
//
// It computes on the data times a power of two (largest magnitude near
// 2^256, exact) and maps the results back, so data near the float64
// limit give their representable forecasts and bands; in-sample errors,
// forecasts or bounds beyond the float64 range are errors wrapping
// almanac.ErrNonFinite.
type Naive2 struct {
	// Period is the seasonal period; 0 means y.Period(). 1 gives the naive
	// method. Negative is invalid.
	Period int
}

// Naive2Fit is a fitted Naive2 model, read-only and safe for concurrent
// use.
type Naive2Fit struct {
	y        almanac.Series
	period   int
	seasonal bool
	figure   []float64 // seasonal index by position from the first observation; nil when not seasonal
	scale    int       // last and sigma are in units of the data times 2^scale
	last     float64   // last seasonally adjusted value
	sigma    float64   // adjusted-scale one-step standard deviation
	fitted   []float64
	resid    []float64
}

// Fit implements almanac.Model.
func (m Naive2) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if m.Period < 0 {
		return nil, fmt.Errorf("accuracy: naive2: %w: period %d", almanac.ErrInvalid, m.Period)
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("accuracy: naive2: %w", err)
	}
	if err := y.CheckComplete(); err != nil {
		return nil, fmt.Errorf("accuracy: naive2: %w", err)
	}
	n := y.Len()
	if n < 2 {
		return nil, fmt.Errorf("accuracy: naive2: %w: %d observation, need 2", almanac.ErrTooShort, n)
	}
	p := m.Period
	if p == 0 {
		p = max(y.Period(), 1)
	}
	f := &Naive2Fit{y: y.Clone(), period: p}
	v := f.y.Values
	// The test needs n ≥ 3m; checked here as m ≤ n/3 so that a huge
	// Period cannot overflow 3m (and reach an autocorrelation of that
	// lag).
	f.seasonal = p > 1 && p <= n/3 && seasonal.IsSeasonal(v, p, 1.645)
	adj := make([]float64, n)
	idx := func(t int) float64 { return 1 }
	if f.seasonal {
		if err := y.CheckPositive(); err != nil {
			return nil, fmt.Errorf("accuracy: naive2: multiplicative seasonal adjustment: %w", err)
		}
		dec, err := seasonal.Classical(v, p, true)
		if err != nil {
			// The test above needs n ≥ 3m, so the decomposition has its
			// two full periods: what is left is a component beyond the
			// float64 range (seasonal.ErrOverflow).
			if errors.Is(err, seasonal.ErrOverflow) {
				return nil, fmt.Errorf("accuracy: naive2: seasonal adjustment: %w: %v", almanac.ErrNonFinite, err)
			}
			return nil, fmt.Errorf("accuracy: naive2: seasonal adjustment: %w: %v", almanac.ErrTooShort, err)
		}
		for i, s := range dec.Figure {
			if !(s > 0) || math.IsInf(s, 0) {
				return nil, fmt.Errorf("accuracy: naive2: %w: seasonal index %v at position %d", almanac.ErrNotFitted, s, i)
			}
		}
		f.figure = dec.Figure
		idx = func(t int) float64 { return f.figure[t%p] }
	}
	f.scale = scaling.Exponent(v)
	w := scaling.Scale(nil, v, f.scale)
	for t, x := range w {
		adj[t] = x / idx(t)
	}
	f.last = adj[n-1]
	f.fitted = make([]float64, n)
	f.resid = make([]float64, n)
	f.fitted[0], f.resid[0] = math.NaN(), math.NaN()
	ss := 0.0
	for t := 1; t < n; t++ {
		d := adj[t] - adj[t-1]
		ss += d * d
		f.fitted[t] = adj[t-1] * idx(t)
		f.resid[t] = w[t] - f.fitted[t]
	}
	f.sigma = math.Sqrt(ss / float64(n-1))
	scaling.Scale(f.fitted, f.fitted, -f.scale)
	scaling.Scale(f.resid, f.resid, -f.scale)
	if !scaling.NoInf(f.fitted) || !scaling.NoInf(f.resid) || math.IsInf(math.Ldexp(f.sigma, -f.scale), 0) || math.IsInf(math.Ldexp(f.last, -f.scale), 0) {
		return nil, fmt.Errorf("accuracy: naive2: series %q: %w: the in-sample forecasts or errors exceed the float64 range", y.Key, almanac.ErrNonFinite)
	}
	return f, nil
}

// Seasonal reports whether the series passed the seasonality test and
// was seasonally adjusted.
func (f *Naive2Fit) Seasonal() bool { return f.seasonal }

// Indices returns the multiplicative seasonal indices by position counted
// from the first observation (a copy), or nil when the series was not
// seasonally adjusted.
func (f *Naive2Fit) Indices() []float64 { return append([]float64(nil), f.figure...) }

// String returns "Naive2(m)" when the series was seasonally adjusted with
// period m and "Naive2" otherwise.
func (f *Naive2Fit) String() string {
	if f.seasonal {
		return fmt.Sprintf("Naive2(%d)", f.period)
	}
	return "Naive2"
}

// FittedValues returns the one-step in-sample forecasts (a copy); the
// first is NaN.
func (f *Naive2Fit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns y − FittedValues() (a copy).
func (f *Naive2Fit) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// Forecast implements almanac.Fitted. Special cases: h < 1 wraps
// almanac.ErrHorizon, a level outside (0, 100) almanac.ErrLevel, a
// forecast or bound beyond the float64 range almanac.ErrNonFinite.
func (f *Naive2Fit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: naive2: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: naive2: %w", err)
	}
	n := f.y.Len()
	mean := make([]float64, h)
	sd := make([]float64, h)
	for j := range h {
		s := 1.0
		if f.seasonal {
			s = f.figure[(n+j)%f.period]
		}
		mean[j] = math.Ldexp(f.last*s, -f.scale)
		sd[j] = math.Ldexp(f.sigma*math.Sqrt(float64(j+1))*s, -f.scale)
		if math.IsInf(sd[j], 0) {
			return almanac.Forecast{}, fmt.Errorf("accuracy: naive2: %w: the standard deviation at step %d exceeds the float64 range", almanac.ErrNonFinite, j+1)
		}
	}
	fc, err := almanac.NewForecast(f.y.Time(n), f.y.Freq, mean, &almanac.Normal{Mean: mean, SD: sd}, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: naive2: %w", err)
	}
	return fc, nil
}

// OWA returns the overall weighted average of the M4 competition,
// ½·(sMAPE/sMAPE_Naive2 + MASE/MASE_Naive2): below 1 the method beat
// Naive2 on the two measures together. M4 computes it from the sMAPE and
// MASE averaged over all series.
//
// Special cases: a NaN, infinite or negative input wraps
// almanac.ErrInvalid; a Naive2 measure of 0 wraps ErrUndefined.
func OWA(smape, mase, smapeNaive2, maseNaive2 float64) (float64, error) {
	for _, v := range [4]float64{smape, mase, smapeNaive2, maseNaive2} {
		if !(v >= 0) || math.IsInf(v, 0) {
			return math.NaN(), fmt.Errorf("accuracy: OWA: %w: measure %v", almanac.ErrInvalid, v)
		}
	}
	if smapeNaive2 == 0 || maseNaive2 == 0 {
		return math.NaN(), fmt.Errorf("accuracy: OWA: %w: a Naive2 measure is 0", ErrUndefined)
	}
	return (smape/smapeNaive2 + mase/maseNaive2) / 2, nil
}

// OWA returns the M4 OWA of the run named model against the run named
// naive2 (for instance Naive2Name), from their sMAPE and MASE over the
// same cells: the origins both completed. When both completed the same
// origins these are their Overall scores; when a failure left one of them
// without some origins, both are scored again over the origins they have
// in common, so that a candidate is never compared on origins the other
// did not forecast.
//
// Special cases: unknown names wrap almanac.ErrInvalid; no origin
// completed by both wraps ErrUndefined (the two cannot be compared); the
// special cases of the function OWA otherwise.
func (c *Comparison) OWA(model, naive2 string) (float64, error) {
	a, ok := c.Run(model)
	b, ok2 := c.Run(naive2)
	if !ok || !ok2 {
		return math.NaN(), fmt.Errorf("accuracy: OWA: %w: no run named %q or %q", almanac.ErrInvalid, model, naive2)
	}
	sa, sb, common := c.pairScores(a, b)
	if common == 0 {
		return math.NaN(), fmt.Errorf("accuracy: OWA: series %q: %w: %q and %q completed no origin in common", c.Key, ErrUndefined, model, naive2)
	}
	return OWA(sa.SMAPE, sa.MASE, sb.SMAPE, sb.MASE)
}

// pairScores returns the scores of runs a and b over the origins both
// completed, and the number of those origins: their Overall scores when
// they completed the same origins, else both scored again over the
// common ones (with the same rules as Overall; interval scores and CRPS
// are left out, being NaN).
func (c *Comparison) pairScores(a, b *Run) (Scores, Scores, int) {
	common := 0
	for o := range c.Origins {
		if o < len(a.Done) && o < len(b.Done) && a.Done[o] && b.Done[o] {
			common++
		}
	}
	if slices.Equal(a.Done, b.Done) {
		return a.Overall, b.Overall, common
	}
	return c.rescore(a, b), c.rescore(b, a), common
}

// rescore scores run r over the (origin, step) cells of the origins that
// both r and other completed.
func (c *Comparison) rescore(r, other *Run) Scores {
	h, no := c.Horizon, len(c.Origins)
	cl := newCells(h, no, nil)
	nan := math.NaN()
	var idx []int
	for o, org := range c.Origins {
		use := r.Done[o] && other.Done[o] && len(r.Forecasts[o].Mean) == h && len(c.Actual[o]) == h
		for s := range h {
			i := o*h + s
			cl.scale[i], cl.scaleSq[i], cl.crps[i] = org.Scale, org.ScaleSq, nan
			cl.actual[i], cl.mean[i] = nan, nan
			if use {
				cl.actual[i], cl.mean[i] = c.Actual[o][s], r.Forecasts[o].Mean[s]
				idx = append(idx, i)
			}
		}
	}
	return cl.summarize(idx)
}

// OWA returns the M4 OWA of candidate model against candidate naive2
// from the sMAPE and MASE averaged over the compared series, as M4 does.
// Like Comparison.OWA it compares like with like: on a series where one
// of the two completed origins the other did not, both are scored over
// their common origins before averaging (with no failure these are the
// series' Overall scores, and the result is that of Mean).
//
// Special cases: unknown names wrap almanac.ErrInvalid; a series on
// which the two completed no origin in common is left out of both
// averages, and when none is left the error wraps ErrUndefined; the
// special cases of the function OWA otherwise.
func (b *BatchComparison) OWA(model, naive2 string) (float64, error) {
	i, j := -1, -1
	for k, n := range b.Names {
		if n == model {
			i = k
		}
		if n == naive2 {
			j = k
		}
	}
	if i < 0 || j < 0 {
		return math.NaN(), fmt.Errorf("accuracy: OWA: %w: no candidate named %q or %q", almanac.ErrInvalid, model, naive2)
	}
	left := map[int]bool{}
	for _, f := range b.Failed {
		left[f.Index] = true
	}
	var sa, sb []Scores
	for k, c := range b.Series {
		if c == nil || left[k] || i >= len(c.Runs) || j >= len(c.Runs) {
			continue
		}
		x, y, common := c.pairScores(&c.Runs[i], &c.Runs[j])
		if common == 0 {
			continue
		}
		sa, sb = append(sa, x), append(sb, y)
	}
	if len(sa) == 0 {
		return math.NaN(), fmt.Errorf("accuracy: OWA: %w: %q and %q completed no origin in common on any compared series", ErrUndefined, model, naive2)
	}
	ma, _ := averageScores(sa)
	mb, _ := averageScores(sb)
	return OWA(ma.SMAPE, ma.MASE, mb.SMAPE, mb.MASE)
}
