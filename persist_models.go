package almanac

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
)

// Kinds of the fitted models of this package in saved documents.
const (
	kindBenchmark   = "almanac.benchmark"
	kindBoxCox      = "almanac.boxcox"
	kindCombination = "almanac.combination"
)

func init() {
	Register(kindBenchmark, 1, loadBenchmark)
	Register(kindBoxCox, 1, loadBoxCox)
	Register(kindCombination, 1, loadCombination)
}

var (
	_ Storable = (*BenchmarkFit)(nil)
	_ Storable = (*BoxCoxFit)(nil)
	_ Storable = (*CombinationFit)(nil)
)

// errUnfitted is the error of saving a fitted type's zero value.
var errUnfitted = fmt.Errorf("%w: use the value returned by Fit", ErrNotFitted)

// benchmarkBody is the saved form of a BenchmarkFit: the method and the
// data; the loader fits the method again (it estimates nothing that the
// data do not fix in closed form).
type benchmarkBody struct {
	Method string       `json:"method"` // naive, seasonal naive, drift, mean
	Period int          `json:"period"`
	Series StoredSeries `json:"series"`
}

// StoredKind implements Storable.
func (f *BenchmarkFit) StoredKind() (string, int) { return kindBenchmark, 1 }

// StoredBody implements Storable.
func (f *BenchmarkFit) StoredBody() ([]byte, error) {
	if f == nil || f.series.Len() == 0 {
		return nil, errUnfitted
	}
	return json.Marshal(benchmarkBody{Method: f.kind.name(), Period: f.period, Series: StoreSeries(f.series)})
}

func loadBenchmark(_ int, body []byte) (Fitted, error) {
	var b benchmarkBody
	if err := DecodeBody(body, &b); err != nil {
		return nil, err
	}
	kind := benchKind(-1)
	for _, k := range []benchKind{kindNaive, kindSeasonalNaive, kindDrift, kindMean} {
		if k.name() == b.Method {
			kind = k
		}
	}
	if kind < 0 {
		return nil, fmt.Errorf("unknown benchmark method %q", b.Method)
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if kind != kindSeasonalNaive && b.Period != 1 {
		return nil, fmt.Errorf("period %d for method %s (want 1)", b.Period, b.Method)
	}
	return fitBenchmark(context.Background(), y, kind, b.Period)
}

// boxCoxBody is the saved form of a BoxCoxFit: λ, the data and the inner
// model as a nested document.
type boxCoxBody struct {
	Lambda    float64         `json:"lambda"`
	Estimated bool            `json:"estimated"`
	Bias      bool            `json:"bias_adjust"`
	Series    StoredSeries    `json:"series"`
	Inner     json.RawMessage `json:"inner"`
}

// StoredKind implements Storable.
func (f *BoxCoxFit) StoredKind() (string, int) { return kindBoxCox, 1 }

// StoredBody implements Storable; the inner model must be Storable too.
func (f *BoxCoxFit) StoredBody() ([]byte, error) {
	if f == nil || f.inner == nil {
		return nil, errUnfitted
	}
	inner, err := MarshalModel(f.inner)
	if err != nil {
		return nil, err
	}
	return json.Marshal(boxCoxBody{Lambda: f.lambda, Estimated: f.estimated, Bias: f.bias, Series: StoreSeries(f.y), Inner: inner})
}

func loadBoxCox(_ int, body []byte) (Fitted, error) {
	var b boxCoxBody
	if err := DecodeBody(body, &b); err != nil {
		return nil, err
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if err := checkLambda(b.Lambda); err != nil {
		return nil, err
	}
	if err := checkBoxCoxDomain(y.Values, b.Lambda); err != nil {
		return nil, err
	}
	inner, err := UnmarshalModel(b.Inner)
	if err != nil {
		return nil, fmt.Errorf("inner model: %w", err)
	}
	if err := sameAxis(y, inner); err != nil {
		return nil, err
	}
	return newBoxCoxFit(y, b.Lambda, b.Estimated, b.Bias, inner)
}

// sameAxis checks that a nested model was fitted on as many observations
// as the wrapper's series.
func sameAxis(y Series, inner Fitted) error {
	if n := len(inner.FittedValues()); n != y.Len() {
		return fmt.Errorf("%w: the inner model %s has %d observations, the series %d", ErrLength, inner, n, y.Len())
	}
	return nil
}

// combinationBody is the saved form of a CombinationFit.
type combinationBody struct {
	Rule      string          `json:"rule"`
	Members   []storedMember  `json:"members"`
	Failures  []storedFailure `json:"failures,omitempty"`
	Weighting string          `json:"weighting,omitempty"`
	Series    StoredSeries    `json:"series"`
	Paths     int             `json:"paths"`
	Seed      uint64          `json:"seed"`
}

type storedMember struct {
	Index  int             `json:"index"`
	Weight float64         `json:"weight"`
	MSE    StoredValues    `json:"mse"` // one value, null when NaN
	Model  json.RawMessage `json:"model"`
}

type storedFailure struct {
	Index int    `json:"index"`
	Model string `json:"model"`
	Error string `json:"error"`
}

// StoredKind implements Storable.
func (f *CombinationFit) StoredKind() (string, int) { return kindCombination, 1 }

// StoredBody implements Storable; every member must be Storable. A
// failure is kept as its member, index and message (the error's chain is
// not: a loaded failure's Err is a plain error with the same text).
func (f *CombinationFit) StoredBody() ([]byte, error) {
	if f == nil || len(f.members) == 0 {
		return nil, errUnfitted
	}
	b := combinationBody{Rule: f.rule.String(), Weighting: f.weighting, Series: StoreSeries(f.y), Paths: f.paths, Seed: f.seed}
	for _, m := range f.members {
		doc, err := MarshalModel(m.Fitted)
		if err != nil {
			return nil, fmt.Errorf("member %d: %w", m.Index, err)
		}
		b.Members = append(b.Members, storedMember{Index: m.Index, Weight: m.Weight, MSE: StoredValues{m.MSE}, Model: doc})
	}
	for _, fl := range f.failures {
		b.Failures = append(b.Failures, storedFailure{Index: fl.Index, Model: fl.Model, Error: fl.Err.Error()})
	}
	return json.Marshal(b)
}

// maxStoredPaths bounds the number of sample paths a loaded model may
// draw per forecast, so a tampered document cannot make Forecast
// exhaust memory.
const maxStoredPaths = 1 << 20

func loadCombination(_ int, body []byte) (Fitted, error) {
	var b combinationBody
	if err := DecodeBody(body, &b); err != nil {
		return nil, err
	}
	rule := CombineRule(-1)
	for _, r := range []CombineRule{CombineMean, CombineMedian, CombineWeighted, CombineInverseError} {
		if r.String() == b.Rule {
			rule = r
		}
	}
	if rule < 0 {
		return nil, fmt.Errorf("unknown rule %q", b.Rule)
	}
	y, err := b.Series.Series()
	if err != nil {
		return nil, err
	}
	if b.Paths < 1 || b.Paths > maxStoredPaths {
		return nil, fmt.Errorf("%d sample paths (need 1 to %d)", b.Paths, maxStoredPaths)
	}
	if len(b.Members) == 0 {
		return nil, errors.New("no members")
	}
	f := &CombinationFit{rule: rule, weighting: b.Weighting, y: y, paths: b.Paths, seed: b.Seed}
	last := -1
	for k, m := range b.Members {
		if m.Index <= last {
			return nil, fmt.Errorf("member %d: index %d not above the previous one", k, m.Index)
		}
		last = m.Index
		if !(m.Weight >= 0 && m.Weight <= 1) {
			return nil, fmt.Errorf("member %d: weight %v outside [0, 1]", k, m.Weight)
		}
		if len(m.MSE) != 1 || m.MSE[0] < 0 || math.IsInf(m.MSE[0], 0) {
			return nil, fmt.Errorf("member %d: mean squared error %v (want one value ≥ 0, or null)", k, []float64(m.MSE))
		}
		fit, err := UnmarshalModel(m.Model)
		if err != nil {
			return nil, fmt.Errorf("member %d: %w", k, err)
		}
		if err := sameAxis(y, fit); err != nil {
			return nil, fmt.Errorf("member %d: %w", k, err)
		}
		f.members = append(f.members, CombinedMember{Index: m.Index, Fitted: fit, Weight: m.Weight, MSE: m.MSE[0]})
	}
	for k, fl := range b.Failures {
		if fl.Index < 0 {
			return nil, fmt.Errorf("failure %d: index %d", k, fl.Index)
		}
		f.failures = append(f.failures, MemberFailure{Index: fl.Index, Model: fl.Model, Err: errors.New(fl.Error)})
	}
	f.combineInSample()
	return f, nil
}
