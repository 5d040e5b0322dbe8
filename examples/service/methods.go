package main

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/smoothing"
)

// DefaultMethod is the method of a fit request that names none: the
// automatic forecaster.
const DefaultMethod = "pilot"

// methodOptions are the options of a fit request beyond the method. They
// apply to methods whose bands come from sample paths (pilot).
type methodOptions struct {
	// Seed seeds the sample paths behind the bands.
	Seed uint64 `json:"seed,omitempty"`
	// Paths is the number of sample paths; 0 means the method's default.
	Paths int `json:"paths,omitempty"`
	// PlainBands switches off the calibration of the automatic
	// forecaster's bands (they are then its route's own).
	PlainBands bool `json:"plain_bands,omitempty"`
}

// method is a named way of fitting a series.
type method struct {
	about   string
	paths   bool // takes Seed, Paths and PlainBands
	model   func(o methodOptions) almanac.Model
	compare bool // may take part in a backtest (benchmarks always do)
}

// methods are the named methods of the service.
var methods = map[string]method{
	"pilot": {about: "automatic forecaster: route chosen from the data, calibrated bands (accuracy.Pilot)", paths: true, compare: true,
		model: func(o methodOptions) almanac.Model {
			return accuracy.Pilot{Seed: o.Seed, Paths: o.Paths, Uncalibrated: o.PlainBands}
		}},
	"ets": {about: "exponential smoothing, state space form chosen by AICc (smoothing.Select)", compare: true,
		model: func(methodOptions) almanac.Model { return smoothing.Select{Workers: 1} }},
	"arima": {about: "ARIMA with orders chosen by a stepwise search (arima.Search)", compare: true,
		model: func(methodOptions) almanac.Model { return arima.Search{} }},
	"theta": {about: "the Theta method with seasonal adjustment when needed (smoothing.Theta)", compare: true,
		model: func(methodOptions) almanac.Model { return smoothing.Theta{} }},
	"naive": {about: "last observed value (almanac.Naive)",
		model: func(methodOptions) almanac.Model { return almanac.Naive{} }},
	"seasonal-naive": {about: "value of the same season a cycle earlier (almanac.SeasonalNaive)",
		model: func(methodOptions) almanac.Model { return almanac.SeasonalNaive{} }},
}

// methodNames returns the method names, sorted.
func methodNames() []string {
	out := make([]string, 0, len(methods))
	for k := range methods {
		out = append(out, k)
	}
	slices.Sort(out)
	return out
}

// lookupMethod returns the method name ("" means DefaultMethod) with the
// options checked.
func lookupMethod(name string, o methodOptions) (string, method, error) {
	if name == "" {
		name = DefaultMethod
	}
	m, ok := methods[name]
	if !ok {
		return "", method{}, &fieldError{Field: "method", Err: fmt.Errorf("%w: unknown method %q (methods: %s)", ErrRequest, name, strings.Join(methodNames(), ", "))}
	}
	if !m.paths && (o.Seed != 0 || o.Paths != 0 || o.PlainBands) {
		return "", method{}, &fieldError{Field: "seed", Err: fmt.Errorf("%w: method %q takes no seed, paths or plain_bands", ErrRequest, name)}
	}
	if o.Paths < 0 || o.Paths > maxPaths {
		return "", method{}, &fieldError{Field: "paths", Err: fmt.Errorf("%w: paths %d outside [0, %d]", ErrRequest, o.Paths, maxPaths)}
	}
	return name, m, nil
}

// maxPaths bounds the sample paths a request may ask for.
const maxPaths = 20000

// recipe is the body of a model stored in FormRecipe: how to fit it again.
type recipe struct {
	Method  string               `json:"method"`
	Options methodOptions        `json:"options"`
	Series  almanac.StoredSeries `json:"series"`
}

// fitted is a model fitted by the service and ready to store.
type fitted struct {
	fit  almanac.Fitted
	form string
	body []byte
}

// fitWith fits y by the named method and encodes the fit for storing: as
// a saved-model document when the fitted type can be saved, else as a
// recipe. The fit honours ctx.
func fitWith(ctx context.Context, name string, o methodOptions, y almanac.Series) (fitted, error) {
	name, m, err := lookupMethod(name, o)
	if err != nil {
		return fitted{}, err
	}
	fit, err := m.model(o).Fit(ctx, y)
	if err != nil {
		return fitted{}, fmt.Errorf("service: fit %s to %q: %w", name, y.Key, err)
	}
	if err := ctx.Err(); err != nil { // finished, but nobody is waiting
		return fitted{}, fmt.Errorf("service: fit %s to %q: %w", name, y.Key, err)
	}
	return encodeFit(fit, name, o, y)
}

// encodeFit returns fit in the form it is stored in.
func encodeFit(fit almanac.Fitted, name string, o methodOptions, y almanac.Series) (fitted, error) {
	doc, err := almanac.MarshalModel(fit)
	switch {
	case err == nil:
		return fitted{fit: fit, form: FormDocument, body: doc}, nil
	case errors.Is(err, almanac.ErrInvalid):
		// Not Storable: keep what fits it again.
		body, err := json.Marshal(recipe{Method: name, Options: o, Series: almanac.StoreSeries(y)})
		if err != nil {
			return fitted{}, fmt.Errorf("service: store %s fit of %q: %w", name, y.Key, err)
		}
		return fitted{fit: fit, form: FormRecipe, body: body}, nil
	}
	return fitted{}, fmt.Errorf("service: save %s fit of %q: %w", name, y.Key, err)
}

// loadFit rebuilds a stored model: from its document, or by fitting its
// recipe again (which honours ctx). A stored model that cannot be rebuilt
// gives an error wrapping ErrStore (and the library's error).
func loadFit(ctx context.Context, rec ModelRecord) (almanac.Fitted, error) {
	f, err := rebuild(ctx, rec)
	if err != nil && ctx.Err() == nil {
		return nil, fmt.Errorf("%w: %w", ErrStore, err)
	}
	return f, err
}

func rebuild(ctx context.Context, rec ModelRecord) (almanac.Fitted, error) {
	switch rec.Form {
	case FormDocument:
		f, err := almanac.UnmarshalModel(rec.Body)
		if err != nil {
			return nil, fmt.Errorf("service: model %d: %w", rec.ID, err)
		}
		return f, nil
	case FormRecipe:
		var rc recipe
		if err := almanac.DecodeBody(rec.Body, &rc); err != nil {
			return nil, fmt.Errorf("service: model %d: %w: recipe: %v", rec.ID, almanac.ErrDecode, err)
		}
		y, err := rc.Series.Series()
		if err != nil {
			return nil, fmt.Errorf("service: model %d: %w: recipe: %w", rec.ID, almanac.ErrDecode, err)
		}
		_, m, err := lookupMethod(rc.Method, rc.Options)
		if err != nil {
			return nil, fmt.Errorf("service: model %d: %w: recipe: %w", rec.ID, almanac.ErrDecode, err)
		}
		f, err := m.model(rc.Options).Fit(ctx, y)
		if err != nil {
			return nil, fmt.Errorf("service: model %d: refit recipe: %w", rec.ID, err)
		}
		if f.String() != rec.Label {
			return nil, fmt.Errorf("service: model %d: %w: the recipe fits %q, stored as %q", rec.ID, almanac.ErrDecode, f.String(), rec.Label)
		}
		return f, nil
	}
	return nil, fmt.Errorf("service: model %d: %w: unknown form %q", rec.ID, almanac.ErrDecode, rec.Form)
}

// digest identifies the first n observations of y with its start and
// frequency: a model fitted to them can be refreshed with the values that
// follow only while the digest of the stored series' first n is the same.
func digest(y almanac.Series, n int) string {
	h := sha256.New()
	fmt.Fprintf(h, "%s|%s|%d|%d|", y.Start.UTC().Format("2006-01-02T15:04:05.999999999Z07:00"), y.Freq.Unit, max(y.Freq.N, 1), n)
	var b [8]byte
	for _, x := range y.Values[:n] {
		binary.LittleEndian.PutUint64(b[:], math.Float64bits(x))
		h.Write(b[:])
	}
	return hex.EncodeToString(h.Sum(nil)[:16])
}
