package accuracy

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
)

// Defaults of Calibrated.
const (
	// DefaultCalibrationOrigins is the most calibration origins per series
	// when Calibrated.Origins is 0.
	DefaultCalibrationOrigins = 20
	// DefaultMinErrors is the fewest error trajectories the bands rest on
	// when Calibrated.MinErrors is 0.
	DefaultMinErrors = 20
	// DefaultCalibrationPaths is the most sample paths behind the bands
	// when Calibrated.Paths is 0.
	DefaultCalibrationPaths = 2000
)

// RefitRule says how the wrapped model is estimated at the calibration
// origins. Programs should not rely on the numeric values.
type RefitRule int

const (
	// RollForward estimates the model once, at the first calibration
	// origin, and brings that fit forward through the later origins
	// without re-estimating it where the fitted model allows: a model
	// that implements almanac.Refresher (exponential smoothing, ARIMA,
	// Box-Cox, combinations, a user's own) takes the new observations by
	// almanac.Refresh. One that cannot refresh (almanac.ErrNotRefreshable)
	// falls back: ARIMA is refitted with every coefficient held fixed, a
	// combination brings forward the members it can and refits the
	// others. A fit that cannot be brought forward is re-estimated at
	// that origin and rolled on from there. The zero value.
	RollForward RefitRule = iota
	// RefitEach re-estimates the model at every calibration origin.
	RefitEach
)

// String returns "roll forward" or "refit each", and RefitRule(n)
// otherwise.
func (r RefitRule) String() string {
	switch r {
	case RollForward:
		return "roll forward"
	case RefitEach:
		return "refit each"
	}
	return fmt.Sprintf("RefitRule(%d)", int(r))
}

// ErrorScale is how out-of-sample errors are made scale-free.
// Programs should not rely on the numeric values.
type ErrorScale int

const (
	// ScaleBySpread divides the error at each step by the half-width of
	// the model's own central 80% band at that step, at the same origin:
	// the calibration then corrects the model's bands by an empirical
	// factor per step (a normalised nonconformity score, Papadopoulos,
	// Vovk & Gammerman 2011). Used when the model's forecasts carry a
	// distribution; otherwise ScaleByNaive is used. The zero value.
	ScaleBySpread ErrorScale = iota
	// ScaleByNaive divides the errors by the mean absolute in-sample
	// error of the naive (seasonal naive) method on the training window,
	// the scale of MASE (Hyndman & Koehler 2006).
	ScaleByNaive
)

// String returns "model spread" or "naive scale", and ErrorScale(n)
// otherwise.
func (s ErrorScale) String() string {
	switch s {
	case ScaleBySpread:
		return "model spread"
	case ScaleByNaive:
		return "naive scale"
	}
	return fmt.Sprintf("ErrorScale(%d)", int(s))
}

// PoolRule says when a calibrated fit uses the errors pooled across its
// batch (PoolCalibration) rather than its own.
// Programs should not rely on the numeric values.
type PoolRule int

const (
	// PoolAlways uses the pooled trajectories whenever a pool was given,
	// the fit's own otherwise. The zero value.
	PoolAlways PoolRule = iota
	// PoolWhenFew uses the fit's own error trajectories when it has at
	// least MinErrors of them, the pooled ones otherwise.
	PoolWhenFew
	// PoolNever uses only the fit's own trajectories.
	PoolNever
)

// String returns "pool always", "pool when few" or "pool never", and
// PoolRule(n) otherwise.
func (p PoolRule) String() string {
	switch p {
	case PoolAlways:
		return "pool always"
	case PoolWhenFew:
		return "pool when few"
	case PoolNever:
		return "pool never"
	}
	return fmt.Sprintf("PoolRule(%d)", int(p))
}

// BandSource says where the bands of a calibrated fit come from.
// Programs should not rely on the numeric values.
type BandSource int

const (
	// BandsFromOwnErrors: the fit's own out-of-sample errors.
	BandsFromOwnErrors BandSource = iota
	// BandsFromPooledErrors: the errors pooled across its batch group.
	BandsFromPooledErrors
	// BandsFromModel: too few errors; the wrapped model's own bands
	// (never with Strict, which gives an error instead).
	BandsFromModel
)

// String returns "own errors", "pooled errors" or "model bands", and
// BandSource(n) otherwise.
func (b BandSource) String() string {
	switch b {
	case BandsFromOwnErrors:
		return "own errors"
	case BandsFromPooledErrors:
		return "pooled errors"
	case BandsFromModel:
		return "model bands"
	}
	return fmt.Sprintf("BandSource(%d)", int(b))
}

// Calibrated wraps any almanac.Model and sets its bands and sample paths
// from the model's own out-of-sample errors, step by step, instead of
// from the model's assumptions. Parameter, model-selection and
// misspecification uncertainty are not in model-based bands, which come
// out too narrow on real data (for instance Makridakis, Spiliotis &
// Assimakopoulos 2020 on the M4 intervals); learning the spread from
// out-of-sample errors is the remedy of Williams & Goodman (1971), and
// with exchangeable errors it is split-conformal prediction (Vovk,
// Gammerman & Shafer 2005), here per horizon step as in Stankeviciute,
// Alaa & van der Schaar (2021).
//
// # Method
//
// Fit fits the model to the whole series (the point forecasts are the
// model's), then evaluates it at up to Origins rolling origins at the end
// of the series: at each origin o the model, trained on the observations
// before o, forecasts Horizon steps, and the errors y_{o+h} − ŷ_{o,h}
// are divided by a scale (ErrorScale: by default the half-width of the
// model's own 80% band at that step and origin), giving one scale-free
// error trajectory z_o = (z_{o,1}, …, z_{o,H}) per origin. A forecast
// then draws whole trajectories: sample path i is ŷ_h + s_h·z_{j,h}, with
// ŷ and s the final model's point forecasts and scales and j running over
// the trajectories (all of them when there are at most Paths, else a
// seeded subsample of Paths). Bands are the type 7 quantiles of these
// paths, step by step (Hyndman & Fan 1996). Resampling whole
// trajectories keeps the correlation of the errors across steps, so the
// paths' sums over the horizon — an annual total — are calibrated too.
// Steps beyond Horizon use the scaled errors of step Horizon.
//
// # Assumptions and finite samples
//
// The errors to come are assumed exchangeable with the out-of-sample
// errors measured: the model errs in the future as it erred at the
// recent origins. With M exchangeable trajectories the band between the
// k-th smallest and k-th largest of M + 1 values covers a new error with
// probability (M + 1 − 2k)/(M + 1) (the split-conformal argument); the
// type 7 quantiles used here fall slightly short of the nominal level for
// small M — a shortfall of about 2/(M + 1) of the tail probability — and
// with fewer than MinErrors trajectories the bands are not calibrated at
// all (see Strict). Overlapping origins one step apart give dependent
// trajectories, so the guarantee is approximate.
//
// # Pooling across a batch
//
// A short series has too few errors of its own: an M3 yearly series has
// 14 observations and a 6-step horizon. PoolCalibration gives every
// calibrated fit of a batch the trajectories of all the fits in its
// group (by default: the same frequency, calibrated horizon and error
// scale), and Pooling says when a fit uses them. Pooling assumes that,
// once scaled, the error trajectories of the series in a group are
// exchangeable: drawn from one distribution whatever the series, so
// the model's spread (or the naive scale) carries all the difference in
// predictability between series. Pooled bands are then calibrated on
// average over the group, not necessarily series by series.
//
// # Cost
//
// The calibration costs one fit at the first origin, the fit to the
// whole series, and a forecast at each origin when the fit can be rolled
// forward (RollForward); one fit per origin when it cannot, or with
// RefitEach.
//
// # Non-negative data
//
// With NonNegative the predictive distribution is censored at zero:
// sample paths below zero are set to zero, and so are point forecasts
// and band limits (the quantiles above the probability of a negative
// value are unchanged, the others become 0). Censoring rather than
// truncation: demand that a model forecasts below zero is zero demand,
// and censoring does not move the upper quantiles.
//
// A Calibrated value is a specification, safe to share between
// goroutines when its Model is.
type Calibrated struct {
	// Model is the wrapped model. Required.
	Model almanac.Model
	// Horizon is the number of steps calibrated; 0 means
	// max(6, ⌈1.5·period⌉) (6 yearly and quarterly, 18 monthly). A
	// series with fewer than MinTrain + Horizon observations has no
	// origin of its own (it can still take pooled errors).
	Horizon int
	// Origins is the most calibration origins, one step apart, ending
	// Horizon steps before the end of the series; 0 means
	// DefaultCalibrationOrigins. Negative is invalid.
	Origins int
	// MinTrain is the fewest observations before the first origin; 0
	// means max(8, 2·period, ⌈0.7·n⌉) for a series of n observations, so
	// that the errors come from fits on nearly as much data as the final
	// one (on M3, errors of fits on much shorter windows made the bands of
	// yearly series too wide: 90% coverage of 80% bands with 8, 85% with
	// the 70% rule). Negative is invalid.
	MinTrain int
	// Refit is how the model is estimated at the origins (default
	// RollForward).
	Refit RefitRule
	// Scale is how errors are made scale-free (default ScaleBySpread).
	Scale ErrorScale
	// Pooling says when pooled errors are used (default PoolAlways).
	Pooling PoolRule
	// MinErrors is the fewest error trajectories the bands may rest on;
	// 0 means DefaultMinErrors. With fewer (own or pooled, as Pooling
	// chooses) the forecast has the model's own bands, or an error with
	// Strict. Negative is invalid.
	MinErrors int
	// Strict makes Forecast and Simulate fail with an error wrapping
	// ErrUncalibrated instead of falling back to the model's bands.
	Strict bool
	// NonNegative censors the forecast distribution at zero (see the
	// type's documentation).
	NonNegative bool
	// Paths is the most sample paths behind the bands; 0 means
	// DefaultCalibrationPaths. Negative is invalid.
	Paths int
	// Seed seeds the generator (math/rand/v2 PCG) that subsamples the
	// trajectories when there are more than Paths.
	Seed uint64
}

var _ almanac.Model = Calibrated{}

// CalibrationStatus describes the calibration of one fit.
type CalibrationStatus struct {
	// Horizon is the number of steps calibrated.
	Horizon int
	// Origins is the number of calibration origins laid out; Failed of
	// them could not be fitted or forecast, and Rolled were reached by
	// bringing a fit forward without re-estimation.
	Origins, Failed, Rolled int
	// Own is the number of complete scaled error trajectories of the
	// fit itself (an origin whose errors include a missing value or a
	// zero scale gives none).
	Own int
	// Pooled is the number of trajectories in the pool the fit was given
	// by PoolCalibration (0 when none).
	Pooled int
	// Scale is the error scale used.
	Scale ErrorScale
	// Source is where the bands come from.
	Source BandSource
}

// CalibratedFit is a model fitted by Calibrated. It is read-only and safe
// for concurrent use when its inner model is.
type CalibratedFit struct {
	inner   almanac.Fitted
	spec    Calibrated // with the defaults resolved
	h       int
	scale   ErrorScale
	naive   float64     // in-sample naive scale of the whole series (ScaleByNaive)
	own     [][]float64 // scaled error trajectories, each of length h
	pooled  [][]float64 // shared with the batch; nil unless pooled
	status  CalibrationStatus
	pooling string // group label given by PoolCalibration
	freq    calendar.Frequency
}

var _ almanac.Fitted = (*CalibratedFit)(nil)
var _ almanac.Simulator = (*CalibratedFit)(nil)

// check validates the specification.
func (c Calibrated) check() error {
	bad := func(what string, v int) error {
		return fmt.Errorf("accuracy: calibrated: %w: %s %d is negative", almanac.ErrInvalid, what, v)
	}
	switch {
	case c.Model == nil:
		return fmt.Errorf("accuracy: calibrated: %w: no model", almanac.ErrInvalid)
	case c.Horizon < 0:
		return bad("horizon", c.Horizon)
	case c.Origins < 0:
		return bad("origin count", c.Origins)
	case c.MinTrain < 0:
		return bad("minimum training length", c.MinTrain)
	case c.MinErrors < 0:
		return bad("minimum error count", c.MinErrors)
	case c.Paths < 0:
		return bad("path count", c.Paths)
	case c.Refit != RollForward && c.Refit != RefitEach:
		return fmt.Errorf("accuracy: calibrated: %w: refit rule %v", almanac.ErrInvalid, c.Refit)
	case c.Scale != ScaleBySpread && c.Scale != ScaleByNaive:
		return fmt.Errorf("accuracy: calibrated: %w: error scale %v", almanac.ErrInvalid, c.Scale)
	case c.Pooling != PoolWhenFew && c.Pooling != PoolAlways && c.Pooling != PoolNever:
		return fmt.Errorf("accuracy: calibrated: %w: pooling rule %v", almanac.ErrInvalid, c.Pooling)
	}
	return nil
}

// spreadLevel is the level whose half-width is the model's spread.
const spreadLevel = 80

// Fit implements almanac.Model: it fits the wrapped model to y and
// measures its scaled out-of-sample errors (see Calibrated). Origins at
// which the model fails are skipped and counted; a fit with too few
// errors is still returned (its Status says so, and Forecast falls back
// or fails as Strict says), since a batch may pool errors into it later.
//
// Special cases: a nil Model, a negative option or an unknown rule gives
// an error wrapping almanac.ErrInvalid; an invalid series the error of
// Series.Validate; the wrapped model's error on the whole series is
// returned as is; a cancelled ctx gives ctx.Err().
func (c Calibrated) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := c.check(); err != nil {
		return nil, err
	}
	if err := y.Validate(); err != nil {
		return nil, err
	}
	inner, err := fitSafely(ctx, c.Model, y)
	if err != nil {
		return nil, err
	}
	period := max(y.Period(), 1)
	n := y.Len()
	spec := c
	if spec.Origins == 0 {
		spec.Origins = DefaultCalibrationOrigins
	}
	if spec.MinErrors == 0 {
		spec.MinErrors = DefaultMinErrors
	}
	if spec.Paths == 0 {
		spec.Paths = DefaultCalibrationPaths
	}
	h := spec.Horizon
	if h == 0 {
		h = max(6, (3*period+1)/2)
	}
	f := &CalibratedFit{inner: inner, spec: spec, h: h, scale: c.Scale, freq: y.Freq}
	// The spread needs a distribution; without one, the naive scale.
	if f.scale == ScaleBySpread {
		fc, err := bandForecast(inner, h, spreadLevel)
		if err != nil || len(fc.Intervals) == 0 {
			f.scale = ScaleByNaive
		}
	}
	f.naive, _, err = NaiveScale(y.Values, period)
	if err != nil {
		f.naive = math.NaN()
	}
	f.status = CalibrationStatus{Horizon: h, Scale: f.scale}
	last := n - h
	minTrain := spec.MinTrain
	if minTrain == 0 {
		minTrain = max(8, 2*period, (7*n+9)/10) // ⌈0.7·n⌉
	}
	first := max(minTrain, last-spec.Origins+1)
	var prev almanac.Fitted
	prevEnd := 0
	for o := first; o <= last; o++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		f.status.Origins++
		var fit almanac.Fitted
		if prev != nil && spec.Refit == RollForward {
			if e, ok := extendFit(ctx, prev, y, prevEnd, o); ok {
				fit = e
				f.status.Rolled++
			}
		}
		if fit == nil {
			fit, err = fitSafely(ctx, c.Model, y.Window(0, o))
			if err != nil {
				if cerr := ctx.Err(); cerr != nil {
					return nil, cerr
				}
				f.status.Failed++
				continue
			}
		}
		prev, prevEnd = fit, o
		z, err := f.scaledErrors(fit, y, o, period)
		if err != nil {
			f.status.Failed++
			continue
		}
		if z != nil {
			f.own = append(f.own, z)
		}
	}
	f.status.Own = len(f.own)
	f.status.Source = f.source()
	return f, nil
}

// scaledErrors forecasts h steps from fit (trained on y[:o]) and returns
// the scaled error trajectory, nil when an actual value is missing or a
// scale is not positive.
func (f *CalibratedFit) scaledErrors(fit almanac.Fitted, y almanac.Series, o, period int) ([]float64, error) {
	h := f.h
	var fc almanac.Forecast
	var err error
	if f.scale == ScaleBySpread {
		fc, err = bandForecast(fit, h, spreadLevel)
	} else {
		fc, err = bandForecast(fit, h)
	}
	if err != nil {
		return nil, err
	}
	var naive float64
	if f.scale == ScaleByNaive {
		if naive, _, err = NaiveScale(y.Values[:o], period); err != nil {
			return nil, nil
		}
	}
	z := make([]float64, h)
	for s := range h {
		sc := naive
		if f.scale == ScaleBySpread {
			if len(fc.Intervals) == 0 {
				return nil, nil
			}
			sc = (fc.Intervals[0].Upper[s] - fc.Intervals[0].Lower[s]) / 2
		}
		z[s] = (y.Values[o+s] - fc.Mean[s]) / sc
		if !(sc > 0) || math.IsNaN(z[s]) || math.IsInf(z[s], 0) {
			return nil, nil
		}
	}
	return z, nil
}

// fitSafely fits m to y, turning a panic and a nil fit into errors.
func fitSafely(ctx context.Context, m almanac.Model, y almanac.Series) (f almanac.Fitted, err error) {
	defer func() {
		if v := recover(); v != nil {
			f, err = nil, fmt.Errorf("accuracy: calibrated: %w: model panicked: %v", almanac.ErrNotFitted, v)
		}
	}()
	f, err = m.Fit(ctx, y)
	if err == nil && f == nil {
		err = fmt.Errorf("accuracy: calibrated: %w: model returned no fit and no error", almanac.ErrNotFitted)
	}
	return f, err
}

// forecastSafely forecasts from f, turning a panic and a wrong length
// into errors.
func forecastSafely(f almanac.Fitted, h int, levels ...float64) (almanac.Forecast, error) {
	return guarded(h, func() (almanac.Forecast, error) { return f.Forecast(h, levels...) })
}

// bandForecaster is implemented by fitted models that can give their
// bands more cheaply without sample paths (almanac.CombinationFit).
type bandForecaster interface {
	ForecastQuantiles(h int, levels ...float64) (almanac.Forecast, error)
}

// bandForecast forecasts from f for the calibration, which needs points
// and bands but no sample paths.
func bandForecast(f almanac.Fitted, h int, levels ...float64) (almanac.Forecast, error) {
	if b, ok := f.(bandForecaster); ok {
		return guarded(h, func() (almanac.Forecast, error) { return b.ForecastQuantiles(h, levels...) })
	}
	return forecastSafely(f, h, levels...)
}

// guarded calls forecast, turning a panic and a forecast of another
// length than h into errors.
func guarded(h int, forecast func() (almanac.Forecast, error)) (fc almanac.Forecast, err error) {
	defer func() {
		if v := recover(); v != nil {
			fc, err = almanac.Forecast{}, fmt.Errorf("accuracy: calibrated: %w: forecast panicked: %v", almanac.ErrNotFitted, v)
		}
	}()
	fc, err = forecast()
	if err == nil && len(fc.Mean) != h {
		err = fmt.Errorf("accuracy: calibrated: %w: %d forecasts for horizon %d", almanac.ErrLength, len(fc.Mean), h)
	}
	return fc, err
}

// extendFit brings fit, fitted to y[:from], forward to y[:to] without
// re-estimating it, when its kind allows; ok is false otherwise.
//
// Every model that implements almanac.Refresher is refreshed with the
// new observations (almanac.Refresh: its own filter run on at the
// estimated parameters). Only a model that cannot refresh
// (almanac.ErrNotRefreshable) takes a fallback: an ARIMA model (fitted by
// conditional sums of squares, say) is refitted with every coefficient
// held fixed, and a combination brings each member forward as far as it
// can and refits the others. Any other failure leaves ok false, and the
// origin is estimated afresh.
func extendFit(ctx context.Context, fit almanac.Fitted, y almanac.Series, from, to int) (out almanac.Fitted, ok bool) {
	defer func() {
		if v := recover(); v != nil {
			out, ok = nil, false
		}
	}()
	u, err := almanac.Refresh(fit, y.Values[from:to])
	if err == nil {
		if u == nil {
			return nil, false
		}
		return u, true
	}
	if !errors.Is(err, almanac.ErrNotRefreshable) {
		return nil, false
	}
	switch f := fit.(type) {
	case *arima.Fitted:
		spec := f.Spec()
		if len(spec.Regressors) > 0 {
			return nil, false
		}
		fixed := map[string]float64{}
		for _, c := range f.Coef() {
			fixed[c.Name] = c.Value
		}
		spec.Fixed = fixed
		u, err := spec.Fit(ctx, y.Window(0, to))
		if err != nil {
			return nil, false
		}
		return u, true
	case *almanac.CombinationFit:
		u, err := f.Update(ctx, y.Window(0, to), func(m almanac.Fitted) (almanac.Fitted, bool) {
			return extendFit(ctx, m, y, from, to)
		})
		if err != nil {
			return nil, false
		}
		return u, true
	}
	return nil, false
}

// trajectories returns the error trajectories the bands rest on (nil
// when the bands are the model's own): the fit's own or the pooled
// ones, as Status().Source says.
func (f *CalibratedFit) trajectories() [][]float64 {
	switch f.status.Source {
	case BandsFromOwnErrors:
		return f.own
	case BandsFromPooledErrors:
		return f.pooled
	}
	return nil
}

// source decides where the bands come from, by the Pooling rule, from
// the number of own trajectories and the size of the pool
// (status.Pooled, which PoolCalibration sets).
func (f *CalibratedFit) source() BandSource {
	usePool := f.status.Pooled > 0 && (f.spec.Pooling == PoolAlways ||
		f.spec.Pooling == PoolWhenFew && len(f.own) < f.spec.MinErrors)
	switch {
	case usePool && f.status.Pooled >= f.spec.MinErrors:
		return BandsFromPooledErrors
	case !usePool && len(f.own) >= f.spec.MinErrors:
		return BandsFromOwnErrors
	}
	return BandsFromModel
}

// Inner returns the wrapped fitted model.
func (f *CalibratedFit) Inner() almanac.Fitted { return f.inner }

// Status describes the calibration.
func (f *CalibratedFit) Status() CalibrationStatus { return f.status }

// Trajectories returns a copy of the fit's own scaled error trajectories
// (one per origin with complete errors, each of Status().Horizon steps).
func (f *CalibratedFit) Trajectories() [][]float64 {
	out := make([][]float64, len(f.own))
	for i, z := range f.own {
		out[i] = slices.Clone(z)
	}
	return out
}

// String returns "calibrated(" + the inner model's notation + ")".
func (f *CalibratedFit) String() string { return "calibrated(" + f.inner.String() + ")" }

// FittedValues returns the inner model's fitted values.
func (f *CalibratedFit) FittedValues() []float64 { return f.inner.FittedValues() }

// Residuals returns the inner model's residuals.
func (f *CalibratedFit) Residuals() []float64 { return f.inner.Residuals() }

// ResponseResiduals implements almanac.ResponseResidualer with the inner
// model's errors on the data's scale.
func (f *CalibratedFit) ResponseResiduals() []float64 { return almanac.ResponseResiduals(f.inner) }

// NumParams implements almanac.ParamCounter with the inner model's count
// (0 when it does not report one).
func (f *CalibratedFit) NumParams() int {
	if pc, ok := f.inner.(almanac.ParamCounter); ok {
		return pc.NumParams()
	}
	return 0
}

// scales returns the inner forecast for h steps and the scale of each
// step.
func (f *CalibratedFit) scales(h int) (almanac.Forecast, []float64, error) {
	var fc almanac.Forecast
	var err error
	if f.scale == ScaleBySpread {
		fc, err = bandForecast(f.inner, h, spreadLevel)
	} else {
		fc, err = bandForecast(f.inner, h)
	}
	if err != nil {
		return almanac.Forecast{}, nil, err
	}
	sc := make([]float64, h)
	for s := range h {
		if f.scale == ScaleBySpread {
			if len(fc.Intervals) == 0 {
				return almanac.Forecast{}, nil, fmt.Errorf("accuracy: calibrated: %w: %s gave no band to scale by", almanac.ErrNoDistribution, f.inner)
			}
			sc[s] = (fc.Intervals[0].Upper[s] - fc.Intervals[0].Lower[s]) / 2
		} else {
			sc[s] = f.naive
		}
		if math.IsNaN(sc[s]) || math.IsInf(sc[s], 0) || sc[s] < 0 {
			return almanac.Forecast{}, nil, fmt.Errorf("accuracy: calibrated: %w: scale %v at step %d", almanac.ErrNonFinite, sc[s], s+1)
		}
	}
	return fc, sc, nil
}

// path fills dst with ŷ + s·z over len(dst) steps (z of step Horizon
// beyond it), censored at zero when asked.
func (f *CalibratedFit) path(dst, mean, sc, z []float64) {
	for s := range dst {
		v := mean[s] + sc[s]*z[min(s, len(z)-1)]
		if f.spec.NonNegative && v < 0 {
			v = 0
		}
		dst[s] = v
	}
}

// Forecast implements almanac.Fitted: the inner model's point forecasts
// with bands from the scaled error trajectories (see Calibrated). The
// forecast's distribution is the Sample of the calibrated paths.
//
// Special cases: h < 1 gives an error wrapping almanac.ErrHorizon, a bad
// level one wrapping almanac.ErrLevel; with too few trajectories the
// inner model's forecast (censored at zero with NonNegative), or with
// Strict an error wrapping ErrUncalibrated; the inner model's errors are
// passed on; a non-finite result gives an error wrapping
// almanac.ErrNonFinite.
func (f *CalibratedFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, err
	}
	if err := almanac.CheckLevels(levels...); err != nil {
		return almanac.Forecast{}, err
	}
	traj := f.trajectories()
	if traj == nil {
		if f.spec.Strict {
			return almanac.Forecast{}, f.uncalibrated()
		}
		fc, err := f.inner.Forecast(h, levels...)
		if err != nil || !f.spec.NonNegative {
			return fc, err
		}
		return censored(fc), nil
	}
	fc, sc, err := f.scales(h)
	if err != nil {
		return almanac.Forecast{}, err
	}
	mean := slices.Clone(fc.Mean)
	if f.spec.NonNegative {
		for s, v := range mean {
			mean[s] = max(v, 0)
		}
	}
	pick := f.pick(len(traj))
	flat := make([]float64, len(pick)*h)
	paths := make([][]float64, len(pick))
	for i, j := range pick {
		paths[i] = flat[i*h : (i+1)*h : (i+1)*h]
		f.path(paths[i], fc.Mean, sc, traj[j])
	}
	out, err := almanac.NewForecast(fc.Start, fc.Freq, mean, &almanac.Sample{Paths: paths}, levels...)
	if err != nil {
		return almanac.Forecast{}, fmt.Errorf("accuracy: calibrated: %w", err)
	}
	for _, iv := range out.Intervals {
		for s := range iv.Lower {
			if math.IsNaN(iv.Lower[s]) || math.IsInf(iv.Lower[s], 0) || math.IsNaN(iv.Upper[s]) || math.IsInf(iv.Upper[s], 0) {
				return almanac.Forecast{}, fmt.Errorf("accuracy: calibrated: %w: %v%% band at step %d", almanac.ErrNonFinite, iv.Level, s+1)
			}
		}
	}
	return out, nil
}

// pick returns the trajectories behind the paths: all m when m ≤ Paths,
// else a seeded subsample of Paths of them, in increasing order.
func (f *CalibratedFit) pick(m int) []int {
	idx := make([]int, m)
	for i := range idx {
		idx[i] = i
	}
	if m <= f.spec.Paths {
		return idx
	}
	rng := rand.New(rand.NewPCG(f.spec.Seed, 0x853c49e6748fea9b))
	for i := range f.spec.Paths {
		j := i + rng.IntN(m-i)
		idx[i], idx[j] = idx[j], idx[i]
	}
	idx = idx[:f.spec.Paths]
	slices.Sort(idx)
	return idx
}

func (f *CalibratedFit) uncalibrated() error {
	return fmt.Errorf("accuracy: calibrated: %s: %w: %d own and %d pooled trajectories, need %d", f.inner, ErrUncalibrated, len(f.own), f.status.Pooled, f.spec.MinErrors)
}

// censored returns fc with its points, bands and sample paths set to
// zero where below zero. A distribution other than a Sample is mapped
// through max(0, ·).
func censored(fc almanac.Forecast) almanac.Forecast {
	out := fc
	out.Mean = make([]float64, len(fc.Mean))
	for s, v := range fc.Mean {
		out.Mean[s] = max(v, 0)
	}
	out.Intervals = make([]almanac.Interval, len(fc.Intervals))
	for k, iv := range fc.Intervals {
		lo, hi := make([]float64, len(iv.Lower)), make([]float64, len(iv.Upper))
		for s := range lo {
			lo[s], hi[s] = max(iv.Lower[s], 0), max(iv.Upper[s], 0)
		}
		out.Intervals[k] = almanac.Interval{Level: iv.Level, Lower: lo, Upper: hi}
	}
	switch d := fc.Dist.(type) {
	case nil:
	case *almanac.Sample:
		paths := make([][]float64, len(d.Paths))
		for i, p := range d.Paths {
			paths[i] = make([]float64, len(p))
			for s, v := range p {
				paths[i][s] = max(v, 0)
			}
		}
		out.Dist = &almanac.Sample{Paths: paths}
	default:
		out.Dist = &almanac.Mapped{Base: d, Map: func(v float64) float64 { return max(v, 0) }}
	}
	return out
}

// Simulate implements almanac.Simulator: n paths ŷ_h + s_h·z_{j,h}, each
// from a trajectory j drawn at random (with replacement) with src among
// those behind Forecast's paths (all of them, or the seeded subsample of
// Paths when there are more), so that the same src state gives the same
// paths.
//
// Special cases: h < 1 gives an error wrapping almanac.ErrHorizon; n < 1
// or a nil src one wrapping almanac.ErrInvalid; with too few
// trajectories the inner model's Simulate (censored at zero with
// NonNegative; an error wrapping almanac.ErrNoDistribution when it has
// none), or with Strict an error wrapping ErrUncalibrated; a path value
// beyond the float64 range one wrapping almanac.ErrNonFinite.
func (f *CalibratedFit) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return nil, err
	}
	if n < 1 || src == nil {
		return nil, fmt.Errorf("accuracy: calibrated: %w: need n ≥ 1 paths and a random source, have n = %d", almanac.ErrInvalid, n)
	}
	traj := f.trajectories()
	if traj == nil {
		if f.spec.Strict {
			return nil, f.uncalibrated()
		}
		sim, ok := f.inner.(almanac.Simulator)
		if !ok {
			return nil, fmt.Errorf("accuracy: calibrated: %w: %s cannot simulate", almanac.ErrNoDistribution, f.inner)
		}
		paths, err := sim.Simulate(h, n, src)
		if err == nil && f.spec.NonNegative {
			for _, p := range paths {
				for s, v := range p {
					p[s] = max(v, 0)
				}
			}
		}
		return paths, err
	}
	fc, sc, err := f.scales(h)
	if err != nil {
		return nil, err
	}
	pick := f.pick(len(traj))
	rng := rand.New(src)
	paths := make([][]float64, n)
	for i := range paths {
		paths[i] = make([]float64, h)
		f.path(paths[i], fc.Mean, sc, traj[pick[rng.IntN(len(pick))]])
		for s, v := range paths[i] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("accuracy: calibrated: %w: sample path value %v at step %d", almanac.ErrNonFinite, v, s+1)
			}
		}
	}
	return paths, nil
}

// PoolOptions configures PoolCalibration.
type PoolOptions struct {
	// Groups, when not nil, holds one label per result: the fits with
	// equal labels pool their errors (among those with the same
	// calibrated horizon and error scale, which are always kept apart).
	// Nil groups the fits by the frequency of their series, calibrated
	// horizon and error scale.
	Groups []string
}

// PoolCalibration gives every calibrated fit of a batch (the results of
// almanac.BatchFit with a Calibrated model, or a mix) the scaled error
// trajectories of all the calibrated fits in its group, and returns the
// results with those fits replaced by pooled copies (fitted models are
// read-only, so the inputs are not changed). Each pooled fit then uses
// the pool or its own errors as its Pooling rule says. Results that
// failed, or whose fit is not a *CalibratedFit, are passed through
// unchanged. The pool of a group holds the trajectories in input order
// and is shared, not copied, between its fits. See Calibrated for what
// pooling assumes.
//
// Special cases: Groups of another length than results gives an error
// wrapping almanac.ErrLength.
func PoolCalibration(results []almanac.BatchResult, opt PoolOptions) ([]almanac.BatchResult, error) {
	if opt.Groups != nil && len(opt.Groups) != len(results) {
		return nil, fmt.Errorf("accuracy: pool: %w: %d group labels for %d results", almanac.ErrLength, len(opt.Groups), len(results))
	}
	type groupKey struct {
		label string
		h     int
		scale ErrorScale
	}
	keys := make([]groupKey, len(results))
	pools := map[groupKey][][]float64{}
	for i, r := range results {
		cf, ok := r.Fitted.(*CalibratedFit)
		if r.Err != nil || !ok {
			continue
		}
		k := groupKey{h: cf.h, scale: cf.scale}
		if opt.Groups != nil {
			k.label = opt.Groups[i]
		} else {
			k.label = cf.freq.String()
		}
		keys[i] = k
		pools[k] = append(pools[k], cf.own...)
	}
	out := slices.Clone(results)
	for i, r := range results {
		cf, ok := r.Fitted.(*CalibratedFit)
		if r.Err != nil || !ok {
			continue
		}
		cp := *cf
		cp.pooled = pools[keys[i]]
		cp.pooling = keys[i].label
		cp.status.Pooled = len(cp.pooled)
		cp.status.Source = cp.source()
		out[i].Fitted = &cp
	}
	return out, nil
}
