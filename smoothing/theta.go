package smoothing

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/seasonal"
)

// SeasonalAdjust says when the Theta method removes a multiplicative
// seasonal pattern before forecasting. The zero value is AdjustAuto.
// Programs should not rely on the numeric values of the constants.
type SeasonalAdjust int

const (
	// AdjustAuto adjusts when the period m is at least 2, the series has
	// at least 3m observations, every value is positive and the
	// autocorrelation test says the series is seasonal at the 90% level:
	// |r_m| > 1.645·√((1 + 2 Σ_{i<m} r_i²)/n). This is the test used with
	// the Theta method and the Naive2 benchmark in the M3 and M4
	// competitions (common practice; recalled from memory, as is its use
	// by Assimakopoulos & Nikolopoulos 2000).
	AdjustAuto SeasonalAdjust = iota
	// AdjustNever forecasts the series as it is.
	AdjustNever
	// AdjustAlways always adjusts; the series must be positive and hold
	// at least two full periods, and the period must be at least 2.
	AdjustAlways
)

// String returns "auto", "never" or "always", or "SeasonalAdjust(n)" for
// a value outside the defined set.
func (a SeasonalAdjust) String() string {
	switch a {
	case AdjustAuto:
		return "auto"
	case AdjustNever:
		return "never"
	case AdjustAlways:
		return "always"
	}
	return "SeasonalAdjust(" + strconv.Itoa(int(a)) + ")"
}

// thetaSeasonalZ is the critical value of the 90% seasonality test,
// Φ⁻¹(0.95) = 1.645 (the test compares |r_m|, so the level is two-sided;
// common practice with the Theta method and Naive2).
const thetaSeasonalZ = 1.645

// thetaGridN is the number of grid cells searched over α before Brent's
// method refines the best cell.
const thetaGridN = 20

// Theta is the Theta method of Assimakopoulos & Nikolopoulos (2000) for
// one series, with optional classical multiplicative seasonal adjustment.
// It implements almanac.Model. The zero value is the classic method:
//
//	smoothing.Theta{}                                          // θ = 2, period from the frequency, automatic seasonal test
//	smoothing.Theta{Period: 1}                                 // never seasonal
//	smoothing.Theta{Adjust: smoothing.AdjustAlways, Theta: 3}  // always adjust, θ = 3
//
// # Method
//
// The series (seasonally adjusted when Adjust says so) is forecast by
// simple exponential smoothing (SES) plus a drift, which Hyndman &
// Billah (2003) showed to be the Theta method: with α the SES parameter,
// ℓ_n the final SES level, n the number of observations and b the slope
// of the least-squares line of the series on time t = 1..n,
//
//	ŷ_{n+h} = ℓ_n + (1 − 1/θ)·b·(h − 1 + (1 − (1−α)^n)/α).
//
// For θ = 2 the drift is b/2: the equal-weight combination of the
// extrapolated θ = 0 line (the regression line) and SES on the θ = 2 line.
// Larger θ gives more weight to the regression trend; θ = 1 is plain SES.
//
// α and the initial level ℓ_0 are estimated jointly by least squares of
// the SES one-step errors (the Gaussian maximum-likelihood estimate of
// ETS(A,N,N)): ℓ_0 has a closed form for each α, and α is found by a grid
// search refined with Brent's method over [0.0001, 0.9999].
//
// Seasonal adjustment divides the series by the seasonal indices of a
// classical multiplicative decomposition (centred moving average, indices
// averaged by position and normalised to mean one; as R's
// stats::decompose); forecasts, fitted values and interval bounds are
// multiplied back by the index of their position.
//
// # Intervals
//
// Prediction intervals are Gaussian with the variance of the state-space
// form of simple exponential smoothing (ETS(A,N,N)), σ²·(1 + α²(h−1)),
// multiplied by the squared seasonal index when adjusted. This is common
// practice for the Theta method (Hyndman & Billah 2003); it ignores the
// uncertainty of the drift, so long-horizon intervals on trending series
// are too narrow. σ² is the mean squared one-step residual of the Theta
// fit on the adjusted scale (divisor n).
//
// # Input
//
// The series must be complete (no NaN: error wrapping almanac.ErrMissing)
// and hold at least 3 observations (almanac.ErrTooShort). A constant
// series is forecast as that constant with zero-width intervals.
//
// Theta values are specifications and safe for concurrent use.
type Theta struct {
	// Period is the seasonal period in observations. 0 takes it from
	// the series frequency (monthly 12, quarterly 4, ...); 1 means no
	// seasonality. Negative values are invalid.
	Period int
	// Adjust says when to remove a multiplicative seasonal pattern.
	// Default AdjustAuto.
	Adjust SeasonalAdjust
	// Theta is the θ coefficient of the extrapolated line, at least 1.
	// 0 means 2, the classic method.
	Theta float64
	// Alpha fixes the SES smoothing parameter, in (0, 1]. 0 means
	// estimated (the initial level is always estimated).
	Alpha float64
}

var (
	_ almanac.Model        = Theta{}
	_ almanac.Fitted       = (*ThetaFit)(nil)
	_ almanac.ParamCounter = (*ThetaFit)(nil)
	_ almanac.Simulator    = (*ThetaFit)(nil)
)

// ThetaFit is a Theta method fitted to one series. It implements
// almanac.Fitted and almanac.ParamCounter. It is read-only after Fit
// returns and safe for concurrent use; do not modify its fields.
type ThetaFit struct {
	// Theta is the θ coefficient used.
	Theta float64
	// Alpha is the SES smoothing parameter (estimated or fixed).
	Alpha float64
	// AlphaEstimated reports whether Alpha was estimated.
	AlphaEstimated bool
	// InitialLevel is ℓ_0 and Level is ℓ_n, on the adjusted scale.
	InitialLevel, Level float64
	// Intercept and Slope are the least-squares line of the adjusted
	// series on t = 1..n.
	Intercept, Slope float64
	// Drift is (1 − 1/θ)·Slope, the drift of the equivalent SES with
	// drift.
	Drift float64
	// Sigma2 is the mean squared one-step residual on the adjusted scale.
	Sigma2 float64
	// SSE is the sum of squared SES one-step errors minimised by α and
	// ℓ_0, on the adjusted scale.
	SSE float64
	// Period is the seasonal period considered (1 when none).
	Period int
	// Adjusted reports whether the series was seasonally adjusted; then
	// Indices[i] is the multiplicative seasonal index of position i
	// (counted from the first observation, i = 0..Period−1).
	Adjusted bool
	Indices  []float64

	n      int
	sigma  float64 // √Sigma2, kept apart so it never overflows
	start  time.Time
	freq   calendar.Frequency
	fitted []float64
	resid  []float64
	y      almanac.Series // the data (for saving)
}

// Fit estimates the Theta method on y.
//
// Special cases:
//   - invalid options (Theta < 1 or not finite, Alpha outside (0, 1],
//     negative Period, unknown Adjust, AdjustAlways with period < 2): error
//     wrapping almanac.ErrInvalid;
//   - an invalid series: the error of almanac.Series.Validate;
//   - a missing value: almanac.ErrMissing;
//   - fewer than 3 observations, or fewer than two full periods with
//     AdjustAlways: almanac.ErrTooShort;
//   - a value ≤ 0 with AdjustAlways: almanac.ErrNonPositive (with
//     AdjustAuto such a series is simply not adjusted);
//   - a seasonal adjustment whose classical decomposition has a
//     component beyond the float64 range: almanac.ErrNonFinite.
func (s Theta) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("smoothing: theta: %w", err)
	}
	theta := s.Theta
	if theta == 0 {
		theta = 2
	}
	if math.IsNaN(theta) || math.IsInf(theta, 0) || theta < 1 {
		return nil, fmt.Errorf("smoothing: theta: %w: Theta = %v, need a finite value ≥ 1 (0 means 2)", almanac.ErrInvalid, s.Theta)
	}
	if s.Alpha != 0 && !(s.Alpha > 0 && s.Alpha <= 1) {
		return nil, fmt.Errorf("smoothing: theta: %w: Alpha = %v, need 0 (estimate) or a value in (0, 1]", almanac.ErrInvalid, s.Alpha)
	}
	if s.Period < 0 {
		return nil, fmt.Errorf("smoothing: theta: %w: negative Period %d", almanac.ErrInvalid, s.Period)
	}
	if s.Adjust < AdjustAuto || s.Adjust > AdjustAlways {
		return nil, fmt.Errorf("smoothing: theta: %w: unknown Adjust %v", almanac.ErrInvalid, s.Adjust)
	}
	if err := y.Validate(); err != nil {
		return nil, fmt.Errorf("smoothing: theta: %w", err)
	}
	if err := y.CheckComplete(); err != nil {
		return nil, fmt.Errorf("smoothing: theta needs complete data (interpolate first): %w", err)
	}
	n := y.Len()
	if n < 3 {
		return nil, fmt.Errorf("smoothing: theta: %w: need at least 3 observations, have %d", almanac.ErrTooShort, n)
	}
	m := s.Period
	if m == 0 {
		m = y.Period()
	}
	if m < 1 {
		m = 1
	}

	adjust := false
	switch s.Adjust {
	case AdjustAlways:
		if m < 2 {
			return nil, fmt.Errorf("smoothing: theta: %w: AdjustAlways needs a seasonal period ≥ 2, have %d", almanac.ErrInvalid, m)
		}
		if n < 2*m {
			return nil, fmt.Errorf("smoothing: theta: %w: seasonal adjustment with period %d needs at least %d observations, have %d", almanac.ErrTooShort, m, 2*m, n)
		}
		if err := y.CheckPositive(); err != nil {
			return nil, fmt.Errorf("smoothing: theta: multiplicative seasonal adjustment needs positive data: %w", err)
		}
		adjust = true
	case AdjustAuto:
		adjust = m >= 2 && y.CheckPositive() == nil && seasonal.IsSeasonal(y.Values, m, thetaSeasonalZ)
	}

	f := &ThetaFit{
		Theta:  theta,
		Period: m,
		n:      n,
		start:  y.Time(n),
		freq:   y.Freq,
		fitted: make([]float64, n),
		resid:  make([]float64, n),
		y:      y.Clone(),
	}
	x := y.Slice()
	if adjust {
		dec, err := seasonal.Classical(y.Values, m, true)
		if err != nil {
			return nil, classicalError("theta: seasonal adjustment", err)
		}
		for i, v := range dec.Figure {
			if !(v > 0) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("smoothing: theta: %w: seasonal index %d is %v", almanac.ErrNotFitted, i, v)
			}
		}
		f.Adjusted = true
		f.Indices = dec.Figure
		for i := range x {
			x[i] /= dec.Figure[i%m]
		}
	}

	// Estimate on x/s0 (s0 = max |x|) so sums of squares cannot overflow,
	// and map the results back: levels, slopes and the residual scale
	// multiply by s0, sums of squares by s0².
	s0 := 0.0
	for _, v := range x {
		s0 = math.Max(s0, math.Abs(v))
	}
	if !(s0 > 0) {
		s0 = 1
	}
	xz := make([]float64, n)
	for i, v := range x {
		xz[i] = v / s0
	}
	var sseZ float64
	if s.Alpha != 0 {
		f.Alpha = s.Alpha
		f.InitialLevel, sseZ = sesProfile(xz, s.Alpha)
	} else {
		f.AlphaEstimated = true
		obj := func(a float64) float64 {
			_, sse := sesProfile(xz, a)
			return sse
		}
		f.Alpha, _ = minimize1D(obj, sesAlphaLower, sesAlphaUpper, thetaGridN)
		f.InitialLevel, sseZ = sesProfile(xz, f.Alpha)
	}
	if math.IsNaN(sseZ) || math.IsInf(sseZ, 0) {
		return nil, fmt.Errorf("smoothing: theta: %w: sum of squares not finite", almanac.ErrNotFitted)
	}
	interceptZ, slopeZ := olsTimeSlope(xz)
	driftZ := (1 - 1/theta) * slopeZ

	// One-step fitted values: the Theta forecast from origin t (0-based)
	// for h = 1: ℓ_t + Drift·(1 − (1−α)^t)/α.
	levels := f.fitted
	levelZ := sesFilterTo(levels, xz, f.Alpha, f.InitialLevel)
	pow, ss := 1.0, 0.0
	for t := range n {
		fit := levels[t] + driftZ*(1-pow)/f.Alpha
		e := xz[t] - fit
		ss += e * e
		fit *= s0
		if adjust {
			fit *= f.Indices[t%m]
		}
		f.fitted[t] = fit
		f.resid[t] = y.Values[t] - fit
		pow *= 1 - f.Alpha
	}
	f.InitialLevel *= s0
	f.Level = levelZ * s0
	f.Intercept, f.Slope, f.Drift = interceptZ*s0, slopeZ*s0, driftZ*s0
	f.SSE = sseZ * s0 * s0
	f.sigma = math.Sqrt(ss/float64(n)) * s0
	f.Sigma2 = f.sigma * f.sigma
	for _, v := range []float64{f.Level, f.Intercept, f.Slope, f.Drift, f.SSE, f.Sigma2} {
		if math.IsInf(v, 0) || math.IsNaN(v) {
			return nil, fmt.Errorf("smoothing: theta: %w: the fitted level, slope or residual variance is not representable in float64", almanac.ErrNonFinite)
		}
	}
	return f, nil
}

// Forecast returns forecasts for h steps after the end of the series with
// Gaussian prediction intervals at the given levels (percentages in
// (0, 100)); see Theta for the formulas.
//
// Special cases: h < 1 gives an error wrapping almanac.ErrHorizon, a
// level outside (0, 100) one wrapping almanac.ErrLevel, a ThetaFit not
// returned by Fit (e.g. a zero value) one wrapping almanac.ErrNotFitted.
func (f *ThetaFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := f.usable(); err != nil {
		return almanac.Forecast{}, err
	}
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: theta: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: theta: %w", err)
	}
	mean := make([]float64, h)
	sd := make([]float64, h)
	a := f.Alpha
	c := (1 - math.Pow(1-a, float64(f.n))) / a
	sigma := f.sigma
	for i := range h {
		mean[i] = f.Level + f.Drift*(float64(i)+c)
		sd[i] = sigma * math.Sqrt(1+a*a*float64(i))
		if f.Adjusted {
			s := f.Indices[(f.n+i)%f.Period]
			mean[i] *= s
			sd[i] *= s
		}
	}
	dist := &almanac.Normal{Mean: append([]float64(nil), mean...), SD: sd}
	fc, err := almanac.NewForecast(f.start, f.freq, mean, dist, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("smoothing: theta: %w", err)
	}
	if err := checkFinite(f.String(), fc); err != nil {
		return almanac.Forecast{}, err
	}
	return fc, nil
}

// Simulate returns n sample paths of h future steps (paths[i][step]) from
// the state-space form behind the intervals: on the adjusted scale,
// y_{n+j} = L_{j−1} + Drift·(j − 1 + (1 − (1−α)^n)/α) + e_j and
// L_j = L_{j−1} + α·e_j with L_0 = ℓ_n and e_j independent N(0, σ²);
// each value is then multiplied by its seasonal index when the series was
// adjusted. The mean and variance of each step equal the point forecast
// and the interval variance. The draws come from src only, so the same
// source state gives the same paths.
//
// Special cases: h < 1 gives an error wrapping almanac.ErrHorizon; n < 1
// or a nil src one wrapping almanac.ErrInvalid; a ThetaFit not returned
// by Fit one wrapping almanac.ErrNotFitted.
func (f *ThetaFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := f.usable(); err != nil {
		return nil, err
	}
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, fmt.Errorf("smoothing: theta: %w", err)
	}
	if n < 1 || src == nil {
		return nil, fmt.Errorf("smoothing: theta: %w: need n ≥ 1 paths and a random source (have n = %d, nil source %v)", almanac.ErrInvalid, n, src == nil)
	}
	rng := rand.New(src)
	a := f.Alpha
	c := (1 - math.Pow(1-a, float64(f.n))) / a
	sigma := f.sigma
	paths := make([][]float64, n)
	for i := range paths {
		p := make([]float64, h)
		level := f.Level
		for j := range p {
			e := sigma * rng.NormFloat64()
			v := level + f.Drift*(float64(j)+c) + e
			level += a * e
			if f.Adjusted {
				v *= f.Indices[(f.n+j)%f.Period]
			}
			p[j] = v
		}
		paths[i] = p
	}
	return paths, nil
}

// usable reports an error wrapping almanac.ErrNotFitted for a ThetaFit
// that did not come from Fit (e.g. a zero value, whose α of 0 would make
// the drift term 0/0).
func (f *ThetaFit) usable() error {
	if f == nil || f.n == 0 || !(f.Alpha > 0) || (f.Adjusted && len(f.Indices) != f.Period) {
		return fmt.Errorf("smoothing: theta: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	return nil
}

// FittedValues returns the in-sample one-step forecasts: for observation
// t (0-based) the Theta forecast made at origin t for one step,
// ℓ_t + Drift·(1 − (1−α)^t)/α, times the seasonal index when adjusted.
// The drift uses the slope of the whole sample. Returns a fresh copy.
func (f *ThetaFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns y − FittedValues() on the original scale.
func (f *ThetaFit) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// NumParams returns the number of estimated parameters: α (when
// estimated), ℓ_0, the slope, and Period − 1 seasonal indices when the
// series was adjusted.
func (f *ThetaFit) NumParams() int {
	k := 2
	if f.AlphaEstimated {
		k++
	}
	if f.Adjusted {
		k += f.Period - 1
	}
	return k
}

// String returns "Theta" for the classic θ = 2 and "Theta(θ=…)"
// otherwise.
func (f *ThetaFit) String() string {
	if f.Theta == 2 {
		return "Theta"
	}
	return "Theta(θ=" + strconv.FormatFloat(f.Theta, 'g', -1, 64) + ")"
}
