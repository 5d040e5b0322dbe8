package smoothing

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// Kinds of this package's fitted models in saved documents (see
// almanac.SaveModel).
const (
	kindETS          = "smoothing.ets"
	kindHoltWinters  = "smoothing.holt-winters"
	kindTheta        = "smoothing.theta"
	kindIntermittent = "smoothing.intermittent"
)

func init() {
	almanac.Register(kindETS, 1, loadETS)
	almanac.Register(kindHoltWinters, 1, loadHoltWinters)
	almanac.Register(kindTheta, 1, loadTheta)
	almanac.Register(kindIntermittent, 1, loadIntermittent)
}

var (
	_ almanac.Storable = (*Fitted)(nil)
	_ almanac.Storable = (*HoltWintersFit)(nil)
	_ almanac.Storable = (*ThetaFit)(nil)
	_ almanac.Storable = (*IntermittentFit)(nil)
)

// maxStoredPaths bounds Paths in a loaded document, so a tampered one
// cannot make Forecast exhaust memory.
const maxStoredPaths = 1 << 20

// etsBody is the saved form of an ETS fit: the specification (with its
// fixed values), the parameters, the internal frame y = s0·(c + d·z) in
// which the states live, the initial states in that frame, the number of
// observations the parameters were estimated on, and the data. The
// loader runs the filter from the initial states over the estimation
// sample exactly as Fit did and over the rest as Update did, so the
// loaded model is bit-identical to the saved one.
type etsBody struct {
	Error       string               `json:"error"`
	Trend       string               `json:"trend"`
	Season      string               `json:"season"`
	Period      int                  `json:"period"`
	Bounds      string               `json:"bounds"`
	Fixed       etsFixed             `json:"fixed"`
	Seed        uint64               `json:"seed"`
	Paths       int                  `json:"paths"`
	Params      Params               `json:"params"`
	Frame       [3]float64           `json:"frame"`
	Level0      float64              `json:"level0"`
	Trend0      float64              `json:"trend0"`
	Season0     []float64            `json:"season0"`
	EstimatedOn int                  `json:"estimated_on"`
	DF          int                  `json:"df"`
	Free        int                  `json:"free"`
	Converged   bool                 `json:"converged"`
	Series      almanac.StoredSeries `json:"series"`
}

// etsFixed are the values a Spec fixed (null: estimated).
type etsFixed struct {
	Alpha     *float64  `json:"alpha"`
	Beta      *float64  `json:"beta"`
	Gamma     *float64  `json:"gamma"`
	Phi       *float64  `json:"phi"`
	InitLevel *float64  `json:"init_level"`
	InitTrend *float64  `json:"init_trend"`
	InitSeas  []float64 `json:"init_season"`
}

// StoredKind implements almanac.Storable.
func (m *Fitted) StoredKind() (string, int) { return kindETS, 1 }

// StoredBody implements almanac.Storable.
func (m *Fitted) StoredBody() ([]byte, error) {
	if err := m.usable(); err != nil {
		return nil, err
	}
	s := m.spec
	b := etsBody{
		Error: s.Error.String(), Trend: s.Trend.String(), Season: s.Season.String(), Period: m.f.m,
		Bounds: s.Bounds.String(), Seed: s.Seed, Paths: s.Paths,
		Fixed:  etsFixed{Alpha: s.Alpha, Beta: s.Beta, Gamma: s.Gamma, Phi: s.Phi, InitLevel: s.InitLevel, InitTrend: s.InitTrend, InitSeas: s.InitSeason},
		Params: m.Params, Frame: [3]float64{m.tf.s0, m.tf.c, m.tf.d}, Level0: m.level[0],
		EstimatedOn: m.nfit, DF: m.DF, Free: m.free, Converged: m.Converged,
		Series: almanac.StoreSeries(m.series),
	}
	if m.trend != nil {
		b.Trend0 = m.trend[0]
	}
	if m.seas != nil {
		b.Season0 = m.seas[:m.f.m]
	}
	return json.Marshal(b)
}

// parseEnum returns the value of T whose String is name.
func parseEnum[T ~int](name string, values ...T) (T, error) {
	for _, v := range values {
		if fmt.Sprint(v) == name {
			return v, nil
		}
	}
	return 0, fmt.Errorf("unknown value %q", name)
}

func loadETS(_ int, body []byte) (almanac.Fitted, error) {
	var b etsBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	var s Spec
	var err error
	if s.Error, err = parseEnum(b.Error, AdditiveError, MultiplicativeError); err != nil {
		return nil, fmt.Errorf("error form: %w", err)
	}
	if s.Trend, err = parseEnum(b.Trend, NoTrend, AdditiveTrend, DampedTrend, MultiplicativeTrend, DampedMultiplicativeTrend); err != nil {
		return nil, fmt.Errorf("trend form: %w", err)
	}
	if s.Season, err = parseEnum(b.Season, NoSeason, AdditiveSeason, MultiplicativeSeason); err != nil {
		return nil, fmt.Errorf("season form: %w", err)
	}
	if s.Bounds, err = parseEnum(b.Bounds, UsualBounds, AdmissibleBounds, UsualAdmissibleBounds); err != nil {
		return nil, fmt.Errorf("bounds: %w", err)
	}
	s.Period, s.Seed, s.Paths = b.Period, b.Seed, b.Paths
	s.Alpha, s.Beta, s.Gamma, s.Phi = b.Fixed.Alpha, b.Fixed.Beta, b.Fixed.Gamma, b.Fixed.Phi
	s.InitLevel, s.InitTrend, s.InitSeason = b.Fixed.InitLevel, b.Fixed.InitTrend, b.Fixed.InitSeas
	if err := s.check(); err != nil {
		return nil, err
	}
	if s.Paths > maxStoredPaths {
		return nil, fmt.Errorf("%d sample paths (at most %d)", s.Paths, maxStoredPaths)
	}
	f := form{err: s.Error, trend: s.Trend, season: s.Season, m: 1}
	if s.Season != NoSeason {
		if b.Period < 2 || b.Period > MaxPeriod {
			return nil, fmt.Errorf("seasonal period %d outside 2..%d", b.Period, MaxPeriod)
		}
		f.m = b.Period
	} else if b.Period != 1 {
		return nil, fmt.Errorf("period %d without a season (want 1)", b.Period)
	}
	if s.InitSeason != nil && len(s.InitSeason) != f.m {
		return nil, fmt.Errorf("%w: %d fixed initial seasonal states for period %d", almanac.ErrLength, len(s.InitSeason), f.m)
	}
	// The parameters: finite, within the widest region the package
	// estimates in (AdmissibleBounds' box), zero for absent components.
	p := b.Params
	if err := almanac.CheckFinite("parameter", p.Alpha, p.Beta, p.Gamma, p.Phi); err != nil {
		return nil, err
	}
	switch {
	case !(p.Alpha >= 0 && p.Alpha <= 2):
		return nil, fmt.Errorf("%w: alpha %v outside [0, 2]", ErrNotAdmissible, p.Alpha)
	case s.Trend == NoTrend && p.Beta != 0, s.Trend != NoTrend && !(p.Beta >= 0 && p.Beta <= 4):
		return nil, fmt.Errorf("%w: beta %v for trend %v", ErrNotAdmissible, p.Beta, s.Trend)
	case s.Season == NoSeason && p.Gamma != 0, s.Season != NoSeason && !(p.Gamma >= 0 && p.Gamma <= 2):
		return nil, fmt.Errorf("%w: gamma %v for season %v", ErrNotAdmissible, p.Gamma, s.Season)
	case !s.Trend.damped() && p.Phi != 1, s.Trend.damped() && !(p.Phi > 0 && p.Phi <= 1):
		return nil, fmt.Errorf("%w: phi %v for trend %v", ErrNotAdmissible, p.Phi, s.Trend)
	}
	tf := scaling{s0: b.Frame[0], c: b.Frame[1], d: b.Frame[2]}
	if err := almanac.CheckFinite("frame", b.Frame[:]...); err != nil {
		return nil, err
	}
	if !(tf.s0 > 0) || !(tf.d > 0) {
		return nil, fmt.Errorf("frame %v: scale and spread must be positive", b.Frame)
	}
	if err := almanac.CheckFinite("initial state", b.Level0, b.Trend0); err != nil {
		return nil, err
	}
	if err := almanac.CheckFinite("initial seasonal state", b.Season0...); err != nil {
		return nil, err
	}
	switch {
	case s.Trend == NoTrend && b.Trend0 != 0:
		return nil, fmt.Errorf("initial trend %v without a trend", b.Trend0)
	case s.Trend.multiplicative() && !(b.Trend0 > 0):
		return nil, fmt.Errorf("%w: initial growth rate %v", almanac.ErrNonPositive, b.Trend0)
	case s.Season == NoSeason && b.Season0 != nil:
		return nil, fmt.Errorf("%d seasonal states without a season", len(b.Season0))
	case s.Season != NoSeason && len(b.Season0) != f.m:
		return nil, fmt.Errorf("%w: %d initial seasonal states for period %d", almanac.ErrLength, len(b.Season0), f.m)
	}
	for i, v := range b.Season0 {
		if s.Season == MultiplicativeSeason && !(v > 0) {
			return nil, fmt.Errorf("%w: initial seasonal factor %d is %v", almanac.ErrNonPositive, i, v)
		}
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	n0 := b.EstimatedOn
	if n0 < 1 || n0 > y.Len() {
		return nil, fmt.Errorf("estimated on %d observations of %d", n0, y.Len())
	}
	head := y.Head(n0)
	if err := head.CheckComplete(); err != nil {
		return nil, fmt.Errorf("the estimation sample: %w", err)
	}
	if s.multiplicativeParts() {
		if err := y.CheckPositive(); err != nil {
			return nil, fmt.Errorf("%v has multiplicative components: %w", s, err)
		}
	}
	if b.Free < 0 || b.DF < b.Free+1 || b.DF > b.Free+2 || b.Free > 5+MaxPeriod {
		return nil, fmt.Errorf("%d free parameters and %d degrees of freedom", b.Free, b.DF)
	}
	z := make([]float64, n0)
	for i, v := range head.Values {
		z[i] = tf.toZ(v)
	}
	if err := almanac.CheckFinite("internal value", z...); err != nil {
		return nil, err
	}
	var s0 []float64
	if s.Season != NoSeason {
		s0 = append([]float64(nil), b.Season0...)
	}
	s.Period = f.m
	out, err := newFitted(s, f, head, tf, z, p, b.Level0, b.Trend0, s0)
	if err != nil {
		return nil, err
	}
	out.Converged, out.free, out.DF = b.Converged, b.Free, b.DF
	out.setCriteria()
	if n0 < y.Len() {
		return out.Update(y.Values[n0:])
	}
	return out, nil
}

// holtWintersBody is the saved form of a Holt-Winters fit: the
// constants used (the start values are recomputed from the data, as Fit
// computes them) and the data.
type holtWintersBody struct {
	Alpha          float64              `json:"alpha"`
	Beta           float64              `json:"beta"`
	Gamma          float64              `json:"gamma"`
	Multiplicative bool                 `json:"multiplicative"`
	Estimated      bool                 `json:"estimated"`
	Period         int                  `json:"period"`
	Series         almanac.StoredSeries `json:"series"`
}

// StoredKind implements almanac.Storable.
func (f *HoltWintersFit) StoredKind() (string, int) { return kindHoltWinters, 1 }

// StoredBody implements almanac.Storable.
func (f *HoltWintersFit) StoredBody() ([]byte, error) {
	if err := f.usable(); err != nil {
		return nil, err
	}
	return json.Marshal(holtWintersBody{Alpha: f.spec.Alpha, Beta: f.spec.Beta, Gamma: f.spec.Gamma,
		Multiplicative: f.spec.Multiplicative, Estimated: f.spec.Estimate, Period: f.m, Series: almanac.StoreSeries(f.y)})
}

func loadHoltWinters(_ int, body []byte) (almanac.Fitted, error) {
	var b holtWintersBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if b.Period < 2 {
		return nil, fmt.Errorf("period %d", b.Period)
	}
	h := HoltWinters{Alpha: b.Alpha, Beta: b.Beta, Gamma: b.Gamma, Multiplicative: b.Multiplicative, Period: b.Period}
	out, err := h.fit(context.Background(), y)
	if err != nil {
		return nil, err
	}
	out.spec.Estimate = b.Estimated
	return out, nil
}

// thetaBody is the saved form of a Theta fit: θ, the smoothing parameter
// and whether it was estimated, the period, whether the series was
// seasonally adjusted, and the data.
type thetaBody struct {
	Theta     float64              `json:"theta"`
	Alpha     float64              `json:"alpha"`
	Estimated bool                 `json:"alpha_estimated"`
	Period    int                  `json:"period"`
	Adjusted  bool                 `json:"adjusted"`
	Series    almanac.StoredSeries `json:"series"`
}

// StoredKind implements almanac.Storable.
func (f *ThetaFit) StoredKind() (string, int) { return kindTheta, 1 }

// StoredBody implements almanac.Storable.
func (f *ThetaFit) StoredBody() ([]byte, error) {
	if err := f.usable(); err != nil {
		return nil, err
	}
	return json.Marshal(thetaBody{Theta: f.Theta, Alpha: f.Alpha, Estimated: f.AlphaEstimated, Period: f.Period, Adjusted: f.Adjusted, Series: almanac.StoreSeries(f.y)})
}

func loadTheta(_ int, body []byte) (almanac.Fitted, error) {
	var b thetaBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if b.Period < 1 {
		return nil, fmt.Errorf("period %d", b.Period)
	}
	if b.Alpha == 0 {
		return nil, errors.New("alpha 0")
	}
	s := Theta{Period: b.Period, Theta: b.Theta, Alpha: b.Alpha, Adjust: AdjustNever}
	if b.Adjusted {
		s.Adjust = AdjustAlways
	}
	fit, err := s.Fit(context.Background(), y)
	if err != nil {
		return nil, err
	}
	out := fit.(*ThetaFit)
	out.AlphaEstimated = b.Estimated
	return out, nil
}

// intermittentBody is the saved form of a Croston, SBA or TSB fit.
type intermittentBody struct {
	Method    string               `json:"method"`
	Alpha     float64              `json:"alpha"`
	Beta      float64              `json:"beta"`
	Estimated bool                 `json:"estimated"`
	Seed      uint64               `json:"seed"`
	Paths     int                  `json:"paths"`
	Series    almanac.StoredSeries `json:"series"`
}

// StoredKind implements almanac.Storable.
func (f *IntermittentFit) StoredKind() (string, int) { return kindIntermittent, 1 }

// StoredBody implements almanac.Storable.
func (f *IntermittentFit) StoredBody() ([]byte, error) {
	if f == nil || f.fitted == nil {
		return nil, fmt.Errorf("smoothing: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	return json.Marshal(intermittentBody{Method: f.Method, Alpha: f.Alpha, Beta: f.Beta, Estimated: f.Estimated, Seed: f.seed, Paths: f.paths, Series: almanac.StoreSeries(f.y)})
}

func loadIntermittent(_ int, body []byte) (almanac.Fitted, error) {
	var b intermittentBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if b.Paths > maxStoredPaths {
		return nil, fmt.Errorf("%d sample paths (at most %d)", b.Paths, maxStoredPaths)
	}
	if math.IsNaN(b.Alpha) || b.Alpha == 0 {
		return nil, fmt.Errorf("alpha %v", b.Alpha)
	}
	var m almanac.Model
	switch b.Method {
	case "Croston", "SBA":
		v := CrostonClassic
		if b.Method == "SBA" {
			v = CrostonSBA
		}
		if b.Beta != 0 {
			return nil, fmt.Errorf("beta %v for %s", b.Beta, b.Method)
		}
		m = Croston{Variant: v, Alpha: b.Alpha, Seed: b.Seed, Paths: b.Paths}
	case "TSB":
		if b.Beta == 0 {
			return nil, errors.New("beta 0 for TSB")
		}
		m = TSB{Alpha: b.Alpha, Beta: b.Beta, Seed: b.Seed, Paths: b.Paths}
	default:
		return nil, fmt.Errorf("unknown method %q", b.Method)
	}
	fit, err := m.Fit(context.Background(), y)
	if err != nil {
		return nil, err
	}
	out := fit.(*IntermittentFit)
	out.Estimated = b.Estimated
	return out, nil
}
