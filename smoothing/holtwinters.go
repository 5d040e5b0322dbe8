package smoothing

import (
	"context"
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/seasonal"
)

var (
	_ almanac.Model  = HoltWinters{}
	_ almanac.Fitted = (*HoltWintersFit)(nil)
)

// HoltWinters is the classical Holt-Winters seasonal method (Holt 1957;
// Winters 1960) in its error-correction form, computed exactly as R's
// stats::HoltWinters with
// start.periods = 2: start values from a classical decomposition of the
// first two seasons (trend regressed on time for the level and slope),
// the recursion from observation m+1, and R's prediction-interval formula
// (predict.HoltWinters). Unlike Spec it is not a statistical model: the
// constants are used as given, or chosen by least squares when Estimate
// is set, and the intervals follow R's ψ-weight formula with the sample
// variance of the one-step errors.
//
// A HoltWinters value is immutable and safe to share between goroutines.
type HoltWinters struct {
	// Alpha, Beta and Gamma are the level, slope and seasonal smoothing
	// constants of the classical form, each in [0, 1].
	Alpha, Beta, Gamma float64
	// Multiplicative selects multiplicative seasonality; the zero value
	// is additive.
	Multiplicative bool
	// Estimate chooses Alpha, Beta and Gamma in [0, 1] by minimising the
	// sum of squared one-step errors (as R's HoltWinters does when the
	// constants are not given), starting from 0.3, 0.1, 0.1; the given
	// constants are then ignored. The estimates are in Fit's result
	// (HoltWintersFit.Constants).
	Estimate bool
	// Period is the seasonal period; 0 takes it from the series.
	Period int
}

// HoltWintersFit is a fitted Holt-Winters recursion. Read-only after Fit.
type HoltWintersFit struct {
	spec HoltWinters
	m    int
	y    almanac.Series
	// StartLevel, StartSlope and StartSeason are the start values
	// (states at observation m; StartSeason[j] is used for observation
	// j+1, 1-based).
	StartLevel, StartSlope float64
	StartSeason            []float64
	// Level, Slope and Season hold, for observations m+1..n, the states
	// used for their one-step forecast (level and slope after the
	// previous observation, the seasonal state m steps back).
	Level, Slope, Season []float64
	// SSE is the sum of squared one-step errors over observations m+1..n.
	SSE float64
	// A, B and S are the final level, slope and the last m seasonal
	// states (S[0] belongs to the first forecast step's position).
	A, B float64
	S    []float64
	// ResidualVariance is the sample variance (denominator n−m−1) of the
	// one-step errors, used by the intervals.
	ResidualVariance float64

	xhat []float64
}

// String returns "Holt-Winters(additive)" or "Holt-Winters(multiplicative)".
func (h HoltWinters) String() string {
	if h.Multiplicative {
		return "Holt-Winters(multiplicative)"
	}
	return "Holt-Winters(additive)"
}

// Fit runs the recursion on y. y must be complete, hold at least two full
// seasons plus one observation, and be positive for multiplicative
// seasonality.
//
// Special cases: a constant outside [0, 1] or a period below 2 wraps
// almanac.ErrInvalid; a NaN wraps almanac.ErrMissing; a value ≤ 0 with
// multiplicative seasonality wraps almanac.ErrNonPositive; fewer than
// 2m+1 observations wrap almanac.ErrTooShort; a classical decomposition
// of the first two seasons (the start values) with a component beyond the
// float64 range wraps almanac.ErrNonFinite; a sum of squared errors that
// overflows (values near the largest float64) wraps almanac.ErrNotFitted.
func (h HoltWinters) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	f, err := h.fit(ctx, y)
	if err != nil {
		return nil, err
	}
	return f, nil
}

func (h HoltWinters) fit(ctx context.Context, y almanac.Series) (*HoltWintersFit, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	for _, c := range []float64{h.Alpha, h.Beta, h.Gamma} {
		if !(c >= 0 && c <= 1) {
			return nil, fmt.Errorf("smoothing: %v: %w: smoothing constants must lie in [0, 1], have α=%v β=%v γ=%v", h, errInvalid, h.Alpha, h.Beta, h.Gamma)
		}
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("smoothing: %v: %w", h, err)
	}
	if err := y.CheckComplete(); err != nil {
		return nil, fmt.Errorf("smoothing: %v needs complete data; fill the gaps first (e.g. the interpolation in package decompose): %w", h, err)
	}
	if h.Multiplicative {
		if err := y.CheckPositive(); err != nil {
			return nil, fmt.Errorf("smoothing: %v needs positive data: %w", h, err)
		}
	}
	m := h.Period
	if m == 0 {
		m = y.Period()
	}
	if m < 2 {
		return nil, fmt.Errorf("smoothing: %v: %w: seasonal period %d, need at least 2", h, errInvalid, m)
	}
	x := y.Values
	n := len(x)
	if n < 2*m+1 {
		return nil, fmt.Errorf("smoothing: %v: %w: start values need two full seasons and one more observation (%d), have %d", h, almanac.ErrTooShort, 2*m+1, n)
	}
	dec, err := seasonal.Classical(x[:2*m], m, h.Multiplicative)
	if err != nil {
		return nil, classicalError(fmt.Sprintf("%v: start values", h), err)
	}
	// Least squares of the defined trend values on 1..k.
	var tv []float64
	for _, v := range dec.Trend {
		if !math.IsNaN(v) {
			tv = append(tv, v)
		}
	}
	// (m ≥ 2 leaves at least two defined trend values in two seasons.)
	icept, slope := olsTimeSlope(tv)
	out := &HoltWintersFit{spec: h, m: m, y: y.Clone(), StartLevel: icept, StartSlope: slope, StartSeason: slices.Clone(dec.Figure)}
	cnt := n - m
	out.Level = make([]float64, cnt)
	out.Slope = make([]float64, cnt)
	out.Season = make([]float64, cnt)
	out.xhat = make([]float64, cnt)
	seas := make([]float64, n) // seas[i] = seasonal state of observation i (0-based)
	if h.Estimate {
		if err := h.estimate(ctx, x, m, out, seas); err != nil {
			return nil, err
		}
		h = out.spec
	}
	var level, trend float64
	out.SSE, level, trend = hwRun(x, m, h.Multiplicative, h.Alpha, h.Beta, h.Gamma, out.StartLevel, out.StartSlope, out.StartSeason, seas, out)
	out.A, out.B = level, trend
	out.S = slices.Clone(seas[n-m:])
	mean := 0.0
	for k, xh := range out.xhat {
		mean += x[m+k] - xh
	}
	mean /= float64(cnt)
	ss := 0.0
	for k, xh := range out.xhat {
		d := x[m+k] - xh - mean
		ss += d * d
	}
	out.ResidualVariance = ss / float64(cnt-1)
	if math.IsInf(out.SSE, 0) || math.IsNaN(out.SSE) || math.IsInf(out.ResidualVariance, 0) || math.IsNaN(out.ResidualVariance) {
		return nil, fmt.Errorf("smoothing: %v: %w: sum of squared one-step errors not finite (values too large?)", h, almanac.ErrNotFitted)
	}
	return out, nil
}

// Constants returns the smoothing constants used (estimated when
// HoltWinters.Estimate is set).
func (f *HoltWintersFit) Constants() (alpha, beta, gamma float64) {
	return f.spec.Alpha, f.spec.Beta, f.spec.Gamma
}

// hwRun runs R's Holt-Winters recursion from observation m+1 (1-based)
// with the start values, writing the seasonal states into seas (length n)
// and, when out is not nil, the per-observation records. It returns the
// SSE and the final level and slope.
func hwRun(x []float64, m int, mult bool, a, b, g, l0, b0 float64, s0, seas []float64, out *HoltWintersFit) (sse, level, trend float64) {
	copy(seas, s0)
	level, trend = l0, b0
	for i := m; i < len(x); i++ {
		s := seas[i-m]
		k := i - m
		var xh, lv float64
		if mult {
			xh = (level + trend) * s
			lv = a*(x[i]/s) + (1-a)*(level+trend)
		} else {
			xh = level + trend + s
			lv = a*(x[i]-s) + (1-a)*(level+trend)
		}
		if out != nil {
			out.Level[k], out.Slope[k], out.Season[k] = level, trend, s
			out.xhat[k] = xh
		}
		sse += (x[i] - xh) * (x[i] - xh)
		tr := b*(lv-level) + (1-b)*trend
		if mult {
			seas[i] = g*(x[i]/lv) + (1-g)*s
		} else {
			seas[i] = g*(x[i]-lv) + (1-g)*s
		}
		level, trend = lv, tr
	}
	return sse, level, trend
}

// estimate minimises the SSE over the constants in [0, 1]³ (through the
// periodic map of squash) with the restarted simplex search, and stores
// the result in out.spec.
func (h HoltWinters) estimate(ctx context.Context, x []float64, m int, out *HoltWintersFit, seas []float64) error {
	sse := func(u []float64) float64 {
		v, _, _ := hwRun(x, m, h.Multiplicative, squash(u[0]), squash(u[1]), squash(u[2]), out.StartLevel, out.StartSlope, out.StartSeason, seas, nil)
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return penalty
		}
		return v
	}
	u := []float64{unsquash(0.3), unsquash(0.1), unsquash(0.1)}
	fu := sse(u)
	f, _, err := simplexRestarts(ctx, sse, u, fu, []float64{0.5, 0.5, 0.5}, 1e-10, 3000, 0, 1e-10)
	if err != nil {
		return fmt.Errorf("smoothing: %v: %w", h, err)
	}
	fu = f
	if fu >= penalty {
		return fmt.Errorf("smoothing: %v: %w: no constants give a finite sum of squares", h, almanac.ErrNotFitted)
	}
	out.spec.Alpha, out.spec.Beta, out.spec.Gamma = squash(u[0]), squash(u[1]), squash(u[2])
	return nil
}

// String returns the method's name with its seasonal form.
func (f *HoltWintersFit) String() string { return f.spec.String() }

// FittedValues returns the one-step forecasts, NaN for the first m
// observations (used for the start values).
func (f *HoltWintersFit) FittedValues() []float64 {
	out := make([]float64, f.y.Len())
	for i := range f.m {
		out[i] = math.NaN()
	}
	copy(out[f.m:], f.xhat)
	return out
}

// Residuals returns y − ŷ, NaN for the first m observations.
func (f *HoltWintersFit) Residuals() []float64 {
	out := f.FittedValues()
	for i := range out {
		out[i] = f.y.Values[i] - out[i]
	}
	return out
}

// Variance returns the forecast-error variances of R's predict.HoltWinters:
// σ̂²(1 + Σ_{j=1}^{h−1} ψ_j²) (additive) with ψ_j = α(1 + jβ) + [j mod m
// = 0]γ(1 − α), and for multiplicative seasonality
// σ̂² Σ_{j=0}^{h−1} (ψ_j c[2+r]/c[2+((r−j) mod m)])², r = 1 + (h−1) mod m,
// c = (a, b, s_1, …, s_m) 1-based — including R's pick of c[2] = b when
// (r−j) mod m = 0, reproduced as R computes it. Because of that pick the
// multiplicative variance divides by the final slope b: when b is 0 (a
// constant series, for one) the variances from step m on are not finite.
//
// Special cases: H < 1 gives an error wrapping almanac.ErrHorizon, a
// HoltWintersFit not returned by Fit one wrapping almanac.ErrNotFitted.
func (f *HoltWintersFit) Variance(H int) ([]float64, error) {
	if err := f.usable(); err != nil {
		return nil, err
	}
	if err := almanac.CheckHorizon(H); err != nil {
		return nil, fmt.Errorf("smoothing: %w", err)
	}
	h := f.spec
	m := f.m
	psi := func(j int) float64 {
		v := h.Alpha * (1 + float64(j)*h.Beta)
		if j%m == 0 {
			v += h.Gamma * (1 - h.Alpha)
		}
		return v
	}
	c := append([]float64{f.A, f.B}, f.S...) // c[i-1] is R's c[i]
	out := make([]float64, H)
	if !h.Multiplicative {
		sum := 1.0
		for hh := 1; hh <= H; hh++ {
			if hh > 1 {
				p := psi(hh - 1)
				sum += p * p
			}
			out[hh-1] = f.ResidualVariance * sum
		}
		return out, nil
	}
	// Σ_{j<hh} (ψ_j c[2+rel]/c[2+((rel−j) mod m)])² grouped by the
	// residue q = j mod m: acc[q] = Σ ψ_j² over those j, so each step
	// costs O(m) and the whole horizon O(H·m).
	acc := make([]float64, m)
	for hh := 1; hh <= H; hh++ {
		j := hh - 1
		p := psi(j)
		acc[j%m] += p * p
		rel := 1 + (hh-1)%m
		num := c[2+rel-1]
		sum := 0.0
		for q := 0; q < m; q++ {
			if acc[q] == 0 {
				continue
			}
			r := ((rel-q)%m + m) % m
			d := c[2+r-1]
			sum += acc[q] * (num / d) * (num / d)
		}
		out[hh-1] = f.ResidualVariance * sum
	}
	return out, nil
}

// usable reports an error wrapping almanac.ErrNotFitted for a
// HoltWintersFit that did not come from Fit (e.g. a zero value).
func (f *HoltWintersFit) usable() error {
	if f == nil || f.m < 2 || len(f.S) != f.m {
		return fmt.Errorf("smoothing: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	return nil
}

// Forecast returns (a + h·b) (+) s forecasts with Gaussian intervals of
// variance Variance(h) (R's predict.HoltWinters).
//
// Special cases: h < 1 wraps almanac.ErrHorizon; a level outside
// (0, 100) wraps almanac.ErrLevel; when a variance is not finite (see
// Variance: multiplicative seasonality with a final slope of 0) the
// forecast has no distribution, and asking for levels gives an error
// wrapping almanac.ErrNoDistribution rather than NaN bounds.
func (f *HoltWintersFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := f.usable(); err != nil {
		return almanac.Forecast{}, err
	}
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %w", err)
	}
	mean := make([]float64, h)
	for i := range mean {
		s := f.S[i%f.m]
		if f.spec.Multiplicative {
			mean[i] = (f.A + float64(i+1)*f.B) * s
		} else {
			mean[i] = f.A + float64(i+1)*f.B + s
		}
	}
	v, err := f.Variance(h)
	if err != nil {
		return almanac.Forecast{}, err
	}
	sd := make([]float64, h)
	var dist almanac.Distribution = &almanac.Normal{Mean: mean, SD: sd}
	for i := range v {
		sd[i] = math.Sqrt(v[i])
		if math.IsNaN(sd[i]) || math.IsInf(sd[i], 0) {
			if len(levels) > 0 {
				why := ""
				if f.spec.Multiplicative && f.B == 0 {
					why = " (R's multiplicative formula divides by the final slope, which is 0)"
				}
				return almanac.Forecast{}, fmt.Errorf("smoothing: %v: %w: the interval variance at step %d is %v%s", f, almanac.ErrNoDistribution, i+1, v[i], why)
			}
			dist = nil
			break
		}
	}
	fc, err := almanac.NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, dist, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: %w", err)
	}
	if err := checkFinite(f.String(), fc); err != nil {
		return almanac.Forecast{}, err
	}
	return fc, nil
}
