package arima

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/almanac-go/almanac"
	"gonum.org/v1/gonum/mat"
)

// Kinds of this package's fitted models in saved documents (see
// almanac.SaveModel).
const (
	kindARIMA     = "arima.model"
	kindHarmonic  = "arima.harmonic"
	kindDetection = "arima.detection"
)

func init() {
	almanac.Register(kindARIMA, 1, func(_ int, body []byte) (almanac.Fitted, error) { return loadFitted(body) })
	almanac.Register(kindHarmonic, 1, loadHarmonic)
	almanac.Register(kindDetection, 1, loadDetection)
}

var (
	_ almanac.Storable = (*Fitted)(nil)
	_ almanac.Storable = (*HarmonicFit)(nil)
	_ almanac.Storable = (*DetectionResult)(nil)
)

// arimaBody is the saved form of a Fitted: the specification (orders,
// constant, methods, prior, the caller's fixed coefficients, the
// regressors' values over the whole series and the calendar rules), every
// coefficient with whether it was estimated, the number of observations
// the coefficients were estimated on, the coefficient covariance, and the
// data. The loader runs the model's own likelihood filter with every
// coefficient fixed over the estimation sample, as the fit did at its
// estimate, and Update over the observations added since, so the loaded
// model is bit-identical to the saved one. The record of a Search
// (SearchResult) is not kept.
type arimaBody struct {
	Orders      [6]int               `json:"orders"` // p, d, q, P, D, Q
	Period      int                  `json:"period"`
	Constant    string               `json:"constant"`
	Method      string               `json:"method"`
	MethodUsed  string               `json:"method_used"`
	Prior       string               `json:"prior"`
	Fixed       map[string]float64   `json:"fixed,omitempty"`
	Regressors  []storedRegressor    `json:"regressors,omitempty"`
	Calendar    *storedDesign        `json:"calendar,omitempty"`
	Coef        []storedCoef         `json:"coef"`
	Converged   bool                 `json:"converged"`
	Cov         []float64            `json:"cov,omitempty"` // k×k, row by row, in the fit's internal units
	CovScale    []float64            `json:"cov_scale,omitempty"`
	EstimatedOn int                  `json:"estimated_on"`
	Series      almanac.StoredSeries `json:"series"`
}

type storedRegressor struct {
	Name   string    `json:"name"`
	Values []float64 `json:"values"`
}

type storedCoef struct {
	Name      string  `json:"name"`
	Value     float64 `json:"value"`
	Estimated bool    `json:"estimated"`
}

// StoredKind implements almanac.Storable.
func (f *Fitted) StoredKind() (string, int) { return kindARIMA, 1 }

// StoredBody implements almanac.Storable. It computes the coefficient
// covariance first when it has not been asked for (a numerical Hessian,
// about the cost of a small fit), so that Coef gives the same standard
// errors after loading.
//
// Special cases: a calendar effect or holiday rule of a type outside
// package calendar gives an error wrapping almanac.ErrInvalid.
func (f *Fitted) StoredBody() ([]byte, error) {
	b, err := f.storedBody()
	if err != nil {
		return nil, err
	}
	return json.Marshal(b)
}

func (f *Fitted) storedBody() (*arimaBody, error) {
	if f == nil || f.lay == nil || f.n == 0 {
		return nil, fmt.Errorf("arima: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	s := f.spec
	cal, err := storeDesign(s.Calendar)
	if err != nil {
		return nil, err
	}
	b := &arimaBody{
		Orders: [6]int{s.P, s.D, s.Q, s.SP, s.SD, s.SQ}, Period: s.Period, Constant: s.Constant.String(),
		Method: s.Method.String(), MethodUsed: f.method.String(), Prior: s.Prior.String(), Fixed: s.Fixed,
		Calendar: cal, Converged: f.converged, EstimatedOn: f.nfit,
		Series: almanac.StoreSeries(almanac.Series{Key: f.key, Start: f.start, Freq: f.freq, Values: f.y}),
	}
	// The caller's regressors follow mean and drift in x.
	off := 0
	if f.lay.mean {
		off++
	}
	if f.lay.drift {
		off++
	}
	for j, r := range s.Regressors {
		b.Regressors = append(b.Regressors, storedRegressor{Name: r.Name, Values: f.x[off+j]})
	}
	free := make([]bool, len(f.coef))
	for _, i := range f.free {
		free[i] = true
	}
	for i, name := range f.lay.names {
		b.Coef = append(b.Coef, storedCoef{Name: name, Value: f.coef[i], Estimated: free[i]})
	}
	if cov := f.covariance(); cov != nil {
		k := cov.SymmetricDim()
		for i := range k {
			for j := range k {
				b.Cov = append(b.Cov, cov.At(i, j))
			}
		}
		b.CovScale = f.covScale
	}
	return b, nil
}

func loadFitted(body []byte) (*Fitted, error) {
	var b arimaBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	return b.load()
}

func enumOf[T fmt.Stringer](name string, values ...T) (T, error) {
	for _, v := range values {
		if v.String() == name {
			return v, nil
		}
	}
	var zero T
	return zero, fmt.Errorf("unknown value %q", name)
}

func (b *arimaBody) load() (*Fitted, error) {
	s := Spec{P: b.Orders[0], D: b.Orders[1], Q: b.Orders[2], SP: b.Orders[3], SD: b.Orders[4], SQ: b.Orders[5], Period: b.Period, Fixed: b.Fixed}
	var err error
	if s.Constant, err = enumOf(b.Constant, ConstantAuto, ConstantNone, ConstantInclude); err != nil {
		return nil, fmt.Errorf("constant: %w", err)
	}
	if s.Method, err = enumOf(b.Method, CSSThenML, ML, CSS); err != nil {
		return nil, fmt.Errorf("method: %w", err)
	}
	used, err := enumOf(b.MethodUsed, CSSThenML, ML, CSS)
	if err != nil {
		return nil, fmt.Errorf("method used: %w", err)
	}
	if (used == CSS) != (s.Method == CSS) {
		return nil, fmt.Errorf("method %v used for a %v specification", used, s.Method)
	}
	if s.Prior, err = enumOf(b.Prior, FinitePrior, DiffusePrior); err != nil {
		return nil, fmt.Errorf("prior: %w", err)
	}
	if s.Calendar, err = loadDesign(b.Calendar); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	n0, n := b.EstimatedOn, y.Len()
	if n0 < 1 || n0 > n {
		return nil, fmt.Errorf("estimated on %d observations of %d", n0, n)
	}
	if used == CSS && n0 != n {
		return nil, errors.New("a CSS fit cannot have observations added after the estimation")
	}
	for _, r := range b.Regressors {
		if len(r.Values) != n {
			return nil, fmt.Errorf("%w: regressor %q has %d values, the series %d", almanac.ErrLength, r.Name, len(r.Values), n)
		}
		if err := almanac.CheckFinite("regressor "+r.Name, r.Values...); err != nil {
			return nil, err
		}
		s.Regressors = append(s.Regressors, Regressor{Name: r.Name, Values: r.Values[:n0:n0]})
	}
	// Every coefficient fixed at its stored value.
	fixed := make(map[string]float64, len(b.Coef))
	var free []int
	for i, c := range b.Coef {
		if err := almanac.CheckFinite("coefficient "+c.Name, c.Value); err != nil {
			return nil, err
		}
		if _, dup := fixed[c.Name]; dup {
			return nil, fmt.Errorf("coefficient %q twice", c.Name)
		}
		fixed[c.Name] = c.Value
		if c.Estimated {
			free = append(free, i)
		}
	}
	all := s
	all.Fixed = fixed
	// The stored coefficients must be the model's, every one, before
	// anything runs: a fit with some left free would estimate them.
	probe := all
	if len(probe.Calendar.Effects) > 0 {
		if probe.Regressors, probe.Fixed, _, err = expandCalendar(probe.Calendar, probe.Regressors, probe.Fixed, y.Head(n0)); err != nil {
			return nil, err
		}
	}
	lay, err := probe.resolve(y.Head(n0))
	if err != nil {
		return nil, err
	}
	if !slices.Equal(lay.names, names(b.Coef)) {
		return nil, fmt.Errorf("coefficients %v, the model has %v", names(b.Coef), lay.names)
	}
	f, err := all.fit(context.Background(), y.Head(n0))
	if err != nil {
		return nil, err
	}
	for name, v := range b.Fixed {
		if err := almanac.CheckFinite("fixed "+name, v); err != nil {
			return nil, err
		}
		have, ok := fixed[name]
		if !ok && slices.Contains(f.timedDropped(), name) {
			continue // a calendar column left out of the fit
		}
		if !ok || have != v {
			return nil, fmt.Errorf("fixed coefficient %q is %v, the model's %v", name, v, have)
		}
	}
	if !slices.Equal(f.lay.names, names(b.Coef)) {
		return nil, fmt.Errorf("coefficients %v, the model has %v", names(b.Coef), f.lay.names)
	}
	for i, c := range b.Coef {
		if f.coef[i] != c.Value {
			return nil, fmt.Errorf("coefficient %q does not round-trip (%v, stored %v)", c.Name, f.coef[i], c.Value)
		}
	}
	for _, i := range free {
		if _, ok := b.Fixed[b.Coef[i].Name]; ok {
			return nil, fmt.Errorf("coefficient %q is both fixed and estimated", b.Coef[i].Name)
		}
	}
	f.spec, f.free, f.converged, f.method = s, free, b.Converged, used
	f.covFn, f.cov, f.covScale = nil, nil, make([]float64, len(free))
	for i := range f.covScale {
		f.covScale[i] = 1
	}
	if b.Cov != nil {
		k := len(free)
		if len(b.Cov) != k*k || len(b.CovScale) != k {
			return nil, fmt.Errorf("%w: covariance of %d values and %d scales for %d estimated coefficients", almanac.ErrLength, len(b.Cov), len(b.CovScale), k)
		}
		if err := almanac.CheckFinite("covariance", b.Cov...); err != nil {
			return nil, err
		}
		if err := almanac.CheckFinite("covariance scale", b.CovScale...); err != nil {
			return nil, err
		}
		cov := mat.NewSymDense(k, nil)
		for i := range k {
			if !(b.Cov[i*k+i] >= 0) {
				return nil, fmt.Errorf("negative variance %v of coefficient %d", b.Cov[i*k+i], i)
			}
			for j := range k {
				if b.Cov[i*k+j] != b.Cov[j*k+i] {
					return nil, errors.New("the covariance is not symmetric")
				}
				cov.SetSym(i, j, b.Cov[i*k+j])
			}
		}
		f.cov, f.covScale = cov, slices.Clone(b.CovScale)
	}
	f.covOnce.Do(func() {})
	if n0 == n {
		return f, nil
	}
	newX := make([][]float64, len(b.Regressors))
	for j, r := range b.Regressors {
		newX[j] = r.Values[n0:]
	}
	g, err := f.UpdateWith(y.Values[n0:], newX)
	if err != nil {
		return nil, err
	}
	// The regressors as given, over the whole series.
	for j := range g.spec.Regressors {
		g.spec.Regressors[j].Values = b.Regressors[j].Values
	}
	return g, nil
}

func names(cs []storedCoef) []string {
	out := make([]string, len(cs))
	for i, c := range cs {
		out[i] = c.Name
	}
	return out
}

// harmonicBody is the saved form of a HarmonicFit: the regression with
// ARIMA errors and the choice of harmonics.
type harmonicBody struct {
	Model     arimaBody      `json:"model"`
	Periods   []float64      `json:"periods"`
	Harmonics []int          `json:"harmonics"`
	Screened  []storedScreen `json:"screened,omitempty"`
}

type storedScreen struct {
	Harmonics []int                `json:"harmonics"`
	AICc      almanac.StoredValues `json:"aicc"` // one value; null for +Inf or NaN
}

// StoredKind implements almanac.Storable.
func (h *HarmonicFit) StoredKind() (string, int) { return kindHarmonic, 1 }

// StoredBody implements almanac.Storable.
func (h *HarmonicFit) StoredBody() ([]byte, error) {
	if h == nil || h.Fitted == nil {
		return nil, fmt.Errorf("arima: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	m, err := h.Fitted.storedBody()
	if err != nil {
		return nil, err
	}
	b := harmonicBody{Model: *m, Periods: h.Periods, Harmonics: h.Harmonics}
	for _, s := range h.Screened {
		a := s.AICc
		if math.IsInf(a, 0) {
			a = math.NaN()
		}
		b.Screened = append(b.Screened, storedScreen{Harmonics: s.Harmonics, AICc: almanac.StoredValues{a}})
	}
	return json.Marshal(b)
}

func loadHarmonic(_ int, body []byte) (almanac.Fitted, error) {
	var b harmonicBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	if len(b.Periods) != len(b.Harmonics) || len(b.Periods) == 0 {
		return nil, fmt.Errorf("%w: %d periods and %d harmonics", almanac.ErrLength, len(b.Periods), len(b.Harmonics))
	}
	if err := almanac.CheckFinite("period", b.Periods...); err != nil {
		return nil, err
	}
	for i, k := range b.Harmonics {
		if k < 0 || float64(2*k) > b.Periods[i] {
			return nil, fmt.Errorf("%d harmonics for period %v", k, b.Periods[i])
		}
	}
	f, err := b.Model.load()
	if err != nil {
		return nil, err
	}
	h := &HarmonicFit{Fitted: f, Periods: b.Periods, Harmonics: b.Harmonics}
	for _, s := range b.Screened {
		if len(s.AICc) != 1 {
			return nil, errors.New("a screened AICc needs one value")
		}
		a := s.AICc[0]
		if math.IsNaN(a) {
			a = math.Inf(1)
		}
		h.Screened = append(h.Screened, HarmonicScore{Harmonics: s.Harmonics, AICc: a})
	}
	if h.fourierColumns() > len(f.lay.regNames) {
		return nil, errors.New("more Fourier terms than regressors")
	}
	return h, nil
}

// detectionBody is the saved form of a DetectionResult: the final model
// (whose calendar holds the interventions as events), the interventions
// found, and the base model before any was added.
type detectionBody struct {
	Model    arimaBody            `json:"model"`
	Found    []storedIntervention `json:"found"`
	Critical float64              `json:"critical"`
	Rounds   int                  `json:"rounds"`
	Base     *arimaBody           `json:"base,omitempty"`
}

type storedIntervention struct {
	Name  string               `json:"name"`
	Kind  string               `json:"kind"`
	Index int                  `json:"index"`
	At    string               `json:"at"`
	Stats almanac.StoredValues `json:"stats"` // size, standard error, t; null for NaN
	Rate  float64              `json:"rate"`
}

// StoredKind implements almanac.Storable.
func (d *DetectionResult) StoredKind() (string, int) { return kindDetection, 1 }

// StoredBody implements almanac.Storable.
func (d *DetectionResult) StoredBody() ([]byte, error) {
	if d == nil || d.Fitted == nil {
		return nil, fmt.Errorf("arima: %w: use the value returned by Fit", almanac.ErrNotFitted)
	}
	m, err := d.Fitted.storedBody()
	if err != nil {
		return nil, err
	}
	b := detectionBody{Model: *m, Critical: d.Critical, Rounds: d.Rounds, Found: []storedIntervention{}}
	if d.Base != nil {
		if b.Base, err = d.Base.storedBody(); err != nil {
			return nil, err
		}
	}
	for _, iv := range d.Found {
		b.Found = append(b.Found, storedIntervention{Name: iv.Name, Kind: iv.Kind.String(), Index: iv.Index, At: iv.At.Format(timeLayout),
			Stats: almanac.StoredValues{iv.Size, iv.StdErr, iv.T}, Rate: iv.Rate})
	}
	return json.Marshal(b)
}

const timeLayout = "2006-01-02T15:04:05.999999999Z07:00"

func loadDetection(_ int, body []byte) (almanac.Fitted, error) {
	var b detectionBody
	if err := almanac.DecodeBody(body, &b); err != nil {
		return nil, err
	}
	if err := almanac.CheckFinite("critical value", b.Critical); err != nil {
		return nil, err
	}
	if b.Critical < 0 || b.Rounds < 0 {
		return nil, fmt.Errorf("critical value %v, %d rounds", b.Critical, b.Rounds)
	}
	f, err := b.Model.load()
	if err != nil {
		return nil, err
	}
	d := &DetectionResult{Fitted: f, Critical: b.Critical, Rounds: b.Rounds}
	if b.Base != nil {
		if d.Base, err = b.Base.load(); err != nil {
			return nil, fmt.Errorf("base model: %w", err)
		}
	}
	for _, s := range b.Found {
		kind, err := enumOf(s.Kind, AdditiveOutlier, LevelShift, TemporaryChange)
		if err != nil {
			return nil, fmt.Errorf("intervention %q: %w", s.Name, err)
		}
		at, err := parseTime(s.At)
		if err != nil {
			return nil, fmt.Errorf("intervention %q: %w", s.Name, err)
		}
		if len(s.Stats) != 3 || s.Index < 0 || s.Index >= f.n {
			return nil, fmt.Errorf("intervention %q: index %d, %d statistics", s.Name, s.Index, len(s.Stats))
		}
		d.Found = append(d.Found, Intervention{Name: s.Name, Kind: kind, Index: s.Index, At: at, Size: s.Stats[0], StdErr: s.Stats[1], T: s.Stats[2], Rate: s.Rate})
	}
	return d, nil
}

func parseTime(s string) (time.Time, error) { return time.Parse(timeLayout, s) }
