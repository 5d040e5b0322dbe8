package accuracy

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// kindCalibrated is the kind of a CalibratedFit in saved documents (see
// almanac.SaveModel).
const kindCalibrated = "accuracy.calibrated"

func init() { almanac.Register(kindCalibrated, 1, loadCalibrated) }

var (
	_ almanac.Storable  = (*CalibratedFit)(nil)
	_ almanac.Refresher = (*CalibratedFit)(nil)
)

// calibratedBody is the saved form of a CalibratedFit: the inner model as
// a nested document, its own scaled error trajectories, the pooled
// trajectories its bands are drawn from (only when they are), the
// counts and options that shape its forecasts, and where its bands come
// from. Nothing is measured again on loading: the trajectories are the
// calibration.
type calibratedBody struct {
	Inner       json.RawMessage        `json:"inner"`
	Horizon     int                    `json:"horizon"`
	ErrorScale  string                 `json:"error_scale"`
	NaiveScale  almanac.StoredValues   `json:"naive_scale"` // one value, null when undefined
	Own         []almanac.StoredValues `json:"own"`
	PoolSize    int                    `json:"pool_size"`
	Drawn       []almanac.StoredValues `json:"pool_drawn,omitempty"`
	PoolGroup   string                 `json:"pool_group,omitempty"`
	Pooling     string                 `json:"pooling"`
	Source      string                 `json:"bands_from"`
	MinErrors   int                    `json:"min_errors"`
	Strict      bool                   `json:"strict"`
	NonNegative bool                   `json:"non_negative"`
	Paths       int                    `json:"paths"`
	Seed        uint64                 `json:"seed"`
	Unit        string                 `json:"unit"`
	Every       int                    `json:"every"`
	Origins     int                    `json:"origins"`
	Failed      int                    `json:"failed"`
	Rolled      int                    `json:"rolled"`
}

// StoredKind implements almanac.Storable.
func (f *CalibratedFit) StoredKind() (string, int) { return kindCalibrated, 1 }

// StoredBody implements almanac.Storable; the inner model must be
// Storable too. The document holds the fit's own trajectories (at most
// Origins) and, when its bands are drawn from a pool given by
// PoolCalibration, the pooled trajectories they are drawn from: the
// whole pool when it has at most Paths, else the seeded subsample of
// Paths that Forecast and Simulate use. So a document holds at most
// Origins + Paths trajectories of Status().Horizon numbers, whatever the
// size of the batch (with the defaults, a monthly series and a pool
// above 2000: 2019 trajectories of 18 numbers, 693 kB; saving took about
// 30 ms and loading 40 to 120 ms on the loaded development machine,
// BenchmarkSavedCalibrated); a fit that uses its own errors or the
// model's bands stores no pool, only its size.
func (f *CalibratedFit) StoredBody() ([]byte, error) {
	if f == nil || f.inner == nil {
		return nil, fmt.Errorf("accuracy: calibrated: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	inner, err := almanac.MarshalModel(f.inner)
	if err != nil {
		return nil, err
	}
	b := calibratedBody{
		Inner: inner, Horizon: f.h, ErrorScale: f.scale.String(), NaiveScale: almanac.StoredValues{f.naive},
		Own: storeTrajectories(f.own), PoolSize: f.status.Pooled, PoolGroup: f.pooling,
		Pooling: f.spec.Pooling.String(), Source: f.status.Source.String(),
		MinErrors: f.spec.MinErrors, Strict: f.spec.Strict,
		NonNegative: f.spec.NonNegative, Paths: f.spec.Paths, Seed: f.spec.Seed,
		Unit: f.freq.Unit.String(), Every: f.freq.N,
		Origins: f.status.Origins, Failed: f.status.Failed, Rolled: f.status.Rolled,
	}
	if f.status.Source == BandsFromPooledErrors {
		for _, j := range f.pick(len(f.pooled)) {
			b.Drawn = append(b.Drawn, almanac.StoredValues(f.pooled[j]))
		}
	}
	if b.Own == nil {
		b.Own = []almanac.StoredValues{}
	}
	return json.Marshal(b)
}

func storeTrajectories(z [][]float64) []almanac.StoredValues {
	if z == nil {
		return nil
	}
	out := make([]almanac.StoredValues, len(z))
	for i, v := range z {
		out[i] = almanac.StoredValues(v)
	}
	return out
}

// maxCalibratedPaths bounds the sample paths a loaded fit draws per
// forecast, so that a tampered document cannot make Forecast exhaust
// memory.
const maxCalibratedPaths = 1 << 20

func loadCalibrated(_ int, body []byte) (almanac.Fitted, error) {
	var b calibratedBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	if b.Horizon < 1 || b.Horizon > almanac.MaxHorizon {
		return nil, fmt.Errorf("horizon %d (need 1 to %d)", b.Horizon, almanac.MaxHorizon)
	}
	f := &CalibratedFit{h: b.Horizon, pooling: b.PoolGroup}
	var ok bool
	if f.scale, ok = parseEnum(b.ErrorScale, ScaleBySpread, ScaleByNaive); !ok {
		return nil, fmt.Errorf("unknown error scale %q", b.ErrorScale)
	}
	if f.spec.Pooling, ok = parseEnum(b.Pooling, PoolAlways, PoolWhenFew, PoolNever); !ok {
		return nil, fmt.Errorf("unknown pooling rule %q", b.Pooling)
	}
	source, ok := parseEnum(b.Source, BandsFromOwnErrors, BandsFromPooledErrors, BandsFromModel)
	if !ok {
		return nil, fmt.Errorf("unknown band source %q", b.Source)
	}
	// NaiveScale gives 0 for a constant series and fails (NaN) on one
	// with no observed difference.
	if len(b.NaiveScale) != 1 || b.NaiveScale[0] < 0 || math.IsInf(b.NaiveScale[0], 0) {
		return nil, fmt.Errorf("naive scale %v (want one value ≥ 0, or null)", []float64(b.NaiveScale))
	}
	f.naive = b.NaiveScale[0]
	var err error
	if f.own, err = loadTrajectories("own", b.Own, b.Horizon); err != nil {
		return nil, err
	}
	if f.pooled, err = loadTrajectories("pooled", b.Drawn, b.Horizon); err != nil {
		return nil, err
	}
	switch {
	case b.MinErrors < 1:
		return nil, fmt.Errorf("minimum error count %d", b.MinErrors)
	case b.Paths < 1 || b.Paths > maxCalibratedPaths:
		return nil, fmt.Errorf("%d sample paths (need 1 to %d)", b.Paths, maxCalibratedPaths)
	case b.Origins < 0 || b.Failed < 0 || b.Rolled < 0 || b.Failed > b.Origins || b.Rolled > b.Origins:
		return nil, fmt.Errorf("origin counts %d laid out, %d failed, %d rolled", b.Origins, b.Failed, b.Rolled)
	case len(f.own) > b.Origins-b.Failed:
		return nil, fmt.Errorf("%d own trajectories from %d origins of which %d failed", len(f.own), b.Origins, b.Failed)
	case b.PoolSize < 0:
		return nil, fmt.Errorf("pool size %d", b.PoolSize)
	}
	f.spec.MinErrors, f.spec.Strict, f.spec.NonNegative = b.MinErrors, b.Strict, b.NonNegative
	f.spec.Paths, f.spec.Seed, f.spec.Scale, f.spec.Horizon = b.Paths, b.Seed, f.scale, b.Horizon
	f.status = CalibrationStatus{Horizon: b.Horizon, Origins: b.Origins, Failed: b.Failed, Rolled: b.Rolled,
		Own: len(f.own), Pooled: b.PoolSize, Scale: f.scale}
	f.status.Source = f.source()
	if f.status.Source != source {
		return nil, fmt.Errorf("bands from %s, but %d own trajectories and a pool of %d give %s under %q with at least %d", source, len(f.own), b.PoolSize, f.status.Source, b.Pooling, b.MinErrors)
	}
	// The pooled trajectories stored are those the paths are drawn from.
	if want := min(b.PoolSize, b.Paths); source == BandsFromPooledErrors && len(f.pooled) != want {
		return nil, fmt.Errorf("%d pooled trajectories stored, want %d (a pool of %d, at most %d paths)", len(f.pooled), want, b.PoolSize, b.Paths)
	} else if source != BandsFromPooledErrors && f.pooled != nil {
		return nil, fmt.Errorf("%d pooled trajectories stored for bands from %s", len(f.pooled), source)
	}
	f.freq = calendar.Frequency{N: b.Every}
	for u := calendar.Minute; u <= calendar.Year; u++ {
		if u.String() == b.Unit {
			f.freq.Unit = u
		}
	}
	if err := f.freq.Validate(); err != nil {
		return nil, err
	}
	if f.inner, err = almanac.UnmarshalModel(b.Inner); err != nil {
		return nil, fmt.Errorf("inner model: %w", err)
	}
	return f, nil
}

// parseEnum returns the value among vs whose String is s.
func parseEnum[T fmt.Stringer](s string, vs ...T) (T, bool) {
	for _, v := range vs {
		if v.String() == s {
			return v, true
		}
	}
	var zero T
	return zero, false
}

// loadTrajectories checks stored trajectories: each of h finite values.
func loadTrajectories(what string, z []almanac.StoredValues, h int) ([][]float64, error) {
	if z == nil {
		return nil, nil
	}
	out := make([][]float64, len(z))
	for i, v := range z {
		if len(v) != h {
			return nil, fmt.Errorf("%s trajectory %d has %d steps, want %d", what, i, len(v), h)
		}
		if err := almanac.CheckFinite(fmt.Sprintf("%s trajectory %d", what, i), v...); err != nil {
			return nil, err
		}
		out[i] = slices.Clone([]float64(v))
	}
	return out, nil
}

// Refresh implements almanac.Refresher: the inner model takes the new
// observations by almanac.Refresh (its states advanced, nothing
// estimated again), and the calibration is kept as it was measured at
// the fit: the same error trajectories (own and pooled), error scale,
// naive scale and status. The new observations do not add
// out-of-sample errors, since the fits at the origins they would
// complete are not kept; calibrate again (Calibrated.Fit, which a
// RefreshPolicy's refit decision calls for) to measure the errors on the
// longer series. The bands of the refreshed fit are those of the
// refreshed inner model's point forecasts and spread with the stored
// errors.
//
// Special cases: an inner model that cannot refresh gives an error
// wrapping almanac.ErrNotRefreshable; the inner model's errors are
// passed on.
func (f *CalibratedFit) Refresh(newValues []float64) (almanac.Fitted, error) {
	if f == nil || f.inner == nil {
		return nil, fmt.Errorf("accuracy: calibrated: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	inner, err := almanac.Refresh(f.inner, newValues)
	if err != nil {
		return nil, fmt.Errorf("accuracy: calibrated refresh: %w", err)
	}
	cp := *f
	cp.inner = inner
	return &cp, nil
}
