package decompose

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/almanac-go/almanac"
)

// Forecaster forecasts by decomposition: it decomposes the series with
// Method, forecasts the seasonally adjusted series with Model, and adds
// the seasonal part forward, each seasonal component continued as its
// own last cycle (a seasonal naive forecast of the seasonal component).
// Prediction intervals and quantiles are those of Model shifted by the
// seasonal part (scaled by it for a multiplicative decomposition), so
// they carry only the uncertainty of the adjusted series.
//
// Example:
//
//	m := decompose.Forecaster{Model: almanac.Drift{}, Method: decompose.STL{Robust: true}}
//	fit, err := m.Fit(ctx, y)
//	fc, err := fit.Forecast(12, 80, 95)
//
// A Forecaster is an almanac.Model, safe for concurrent use when Model
// and Method are.
type Forecaster struct {
	// Model forecasts the seasonally adjusted series; required.
	Model almanac.Model
	// Method decomposes the series; nil means STL{} (period of the
	// series frequency, default windows).
	Method Method
}

var _ almanac.Model = Forecaster{}

// Fit decomposes y and fits Model to the seasonally adjusted series.
//
// Special cases: a nil Model gives an error wrapping almanac.ErrInvalid;
// the decomposition's errors are returned as they are (for STL and MSTL:
// missing values wrap almanac.ErrMissing, too short a series
// almanac.ErrTooShort); the inner model's errors are wrapped.
func (f Forecaster) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if f.Model == nil {
		return nil, fmt.Errorf("decompose: forecaster: %w: no model for the adjusted series", almanac.ErrInvalid)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	method := f.Method
	if method == nil {
		method = STL{}
	}
	d, err := method.Decompose(y)
	if err != nil {
		return nil, err
	}
	if err := d.check(y.Len()); err != nil {
		return nil, err
	}
	adj := d.Adjusted()
	inner, err := f.Model.Fit(ctx, adj)
	if err != nil {
		return nil, fmt.Errorf("decompose: forecaster: model of the adjusted series: %w", err)
	}
	return newForecasterFit(y, d, inner)
}

// newForecasterFit completes a fit of y decomposed as d whose adjusted
// series was fitted by inner (also used to rebuild a saved model).
func newForecasterFit(y almanac.Series, d *Decomposition, inner almanac.Fitted) (*ForecasterFit, error) {
	n := y.Len()
	fv := inner.FittedValues()
	if len(fv) != n {
		return nil, fmt.Errorf("decompose: forecaster: %w: %s returned %d fitted values for %d observations", almanac.ErrLength, inner.String(), len(fv), n)
	}
	fitted := make([]float64, n)
	resid := make([]float64, n)
	for i := range fitted {
		if d.Multiplicative {
			fitted[i] = fv[i] * d.Seasonal[i]
		} else {
			fitted[i] = fv[i] + d.Seasonal[i]
		}
		resid[i] = y.Values[i] - fitted[i]
		if math.IsInf(fitted[i], 0) || math.IsInf(resid[i], 0) {
			return nil, fmt.Errorf("decompose: forecaster: %w: the in-sample forecast or error at index %d exceeds the float64 range", almanac.ErrNonFinite, i)
		}
	}
	return &ForecasterFit{decomp: d, inner: inner, fitted: fitted, resid: resid}, nil
}

// ForecasterFit is a fitted Forecaster. It is read-only and safe for
// concurrent use.
type ForecasterFit struct {
	decomp *Decomposition
	inner  almanac.Fitted
	fitted []float64
	resid  []float64
}

var (
	_ almanac.Fitted       = (*ForecasterFit)(nil)
	_ almanac.Simulator    = (*ForecasterFit)(nil)
	_ almanac.ParamCounter = (*ForecasterFit)(nil)
)

// Decomposition returns the decomposition of the fitted series.
func (f *ForecasterFit) Decomposition() *Decomposition { return f.decomp }

// Inner returns the model fitted to the seasonally adjusted series.
func (f *ForecasterFit) Inner() almanac.Fitted { return f.inner }

// String returns the decomposition method and the inner model, e.g.
// "STL+ETS(A,N,N)".
func (f *ForecasterFit) String() string { return f.decomp.Method + "+" + f.inner.String() }

// FittedValues returns the inner model's one-step fitted values of the
// adjusted series with the in-sample seasonal component put back.
func (f *ForecasterFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

// Residuals returns y − FittedValues.
func (f *ForecasterFit) Residuals() []float64 { return append([]float64(nil), f.resid...) }

// NumParams returns the inner model's parameter count when it reports
// one, else 0. The decomposition's smoothing is not counted.
func (f *ForecasterFit) NumParams() int {
	if pc, ok := f.inner.(almanac.ParamCounter); ok {
		return pc.NumParams()
	}
	return 0
}

// SeasonalForward returns the seasonal part for steps 1..h after the
// series: each seasonal component continued as its last cycle, summed
// (multiplied for a multiplicative decomposition). It returns nil for
// h < 1.
func (d *Decomposition) SeasonalForward(h int) []float64 {
	if h < 1 {
		return nil
	}
	n := len(d.Seasonal)
	out := make([]float64, h)
	for k := range out {
		if d.Multiplicative {
			out[k] = 1
		}
		for c, s := range d.Seasonals {
			p := d.Periods[c]
			v := s[n-p+k%p]
			if d.Multiplicative {
				out[k] *= v
			} else {
				out[k] += v
			}
		}
	}
	return out
}

// Forecast returns the inner model's forecasts of the adjusted series
// with the seasonal part added (multiplied) back, together with its
// intervals and distribution moved the same way.
//
// Special cases: h < 1 gives an error wrapping almanac.ErrHorizon; a bad
// level one wrapping almanac.ErrLevel; a forecast or bound that is NaN or
// beyond the float64 range once the seasonal part is added back one
// wrapping almanac.ErrNonFinite; the inner model's errors are wrapped.
func (f *ForecasterFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, fmt.Errorf("decompose: %w", err)
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, fmt.Errorf("decompose: %w", err)
	}
	fc, err := f.inner.Forecast(h, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("decompose: forecaster: %w", err)
	}
	if len(fc.Mean) != h {
		return almanac.Forecast{}, fmt.Errorf("decompose: forecaster: %w: %s returned %d forecasts for horizon %d", almanac.ErrLength, f.inner.String(), len(fc.Mean), h)
	}
	for _, iv := range fc.Intervals {
		if len(iv.Lower) != h || len(iv.Upper) != h {
			return almanac.Forecast{}, fmt.Errorf("decompose: forecaster: %w: %s returned an interval of length %d/%d for horizon %d", almanac.ErrLength, f.inner.String(), len(iv.Lower), len(iv.Upper), h)
		}
	}
	s := f.decomp.SeasonalForward(h)
	mul := f.decomp.Multiplicative
	var bad error
	move := func(what string, x []float64) []float64 {
		out := make([]float64, len(x))
		for i, v := range x {
			if mul {
				out[i] = v * s[i]
			} else {
				out[i] = v + s[i]
			}
			if bad == nil && (math.IsNaN(out[i]) || math.IsInf(out[i], 0)) {
				bad = fmt.Errorf("decompose: forecaster: %w: %s at step %d is %v with the seasonal part added back", almanac.ErrNonFinite, what, i+1, out[i])
			}
		}
		return out
	}
	out := almanac.Forecast{Start: fc.Start, Freq: fc.Freq, Mean: move("the point forecast", fc.Mean)}
	for _, iv := range fc.Intervals {
		lo := move(fmt.Sprintf("the lower %v%% bound", iv.Level), iv.Lower)
		hi := move(fmt.Sprintf("the upper %v%% bound", iv.Level), iv.Upper)
		out.Intervals = append(out.Intervals, almanac.Interval{Level: iv.Level, Lower: lo, Upper: hi})
	}
	if bad != nil {
		return almanac.Forecast{}, bad
	}
	if fc.Dist != nil {
		out.Dist = &seasonalDist{base: fc.Dist, s: s, mul: mul}
	}
	return out, nil
}

// seasonalDist is a forecast distribution moved by a seasonal part:
// quantile + s[h], or quantile · s[h] (s > 0) when multiplicative.
type seasonalDist struct {
	base almanac.Distribution
	s    []float64
	mul  bool
}

// Quantile returns the inner quantile at step h moved by the seasonal
// part of that step.
func (d *seasonalDist) Quantile(h int, p float64) float64 {
	q := d.base.Quantile(h, p)
	if d.mul {
		return q * d.s[h]
	}
	return q + d.s[h]
}

// Simulate draws sample paths of the inner model (which must implement
// almanac.Simulator) and adds (multiplies) the seasonal part to each.
// It returns an error wrapping almanac.ErrNoDistribution when the inner
// model cannot simulate.
func (f *ForecasterFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	sim, ok := f.inner.(almanac.Simulator)
	if !ok {
		return nil, fmt.Errorf("decompose: forecaster: %w: %s cannot simulate", almanac.ErrNoDistribution, f.inner.String())
	}
	paths, err := sim.Simulate(h, n, src)
	if err != nil {
		return nil, fmt.Errorf("decompose: forecaster: %w", err)
	}
	s := f.decomp.SeasonalForward(h)
	for _, p := range paths {
		if len(p) != h {
			return nil, fmt.Errorf("decompose: forecaster: %w: %s simulated a path of %d steps for horizon %d", almanac.ErrLength, f.inner.String(), len(p), h)
		}
		for k := range p {
			if f.decomp.Multiplicative {
				p[k] *= s[k]
			} else {
				p[k] += s[k]
			}
			if math.IsInf(p[k], 0) || math.IsNaN(p[k]) {
				return nil, fmt.Errorf("decompose: forecaster: %w: a simulated value at step %d is %v with the seasonal part added back", almanac.ErrNonFinite, k+1, p[k])
			}
		}
	}
	return paths, nil
}

// check verifies that a decomposition (possibly from a caller's Method)
// has the shape Forecaster relies on.
func (d *Decomposition) check(n int) error {
	bad := d == nil || len(d.Seasonal) != n || len(d.Series.Values) != n || len(d.Seasonals) != len(d.Periods) || len(d.Seasonals) == 0
	if !bad {
		for k, s := range d.Seasonals {
			if len(s) != n || d.Periods[k] < 1 || d.Periods[k] > n {
				bad = true
			}
		}
	}
	if bad {
		return fmt.Errorf("decompose: forecaster: %w: the decomposition does not match the series (%d observations)", almanac.ErrLength, n)
	}
	return nil
}
