package almanac

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"sync"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// documentTag is the value of the "almanac" member that marks a JSON
// object as a saved fitted model.
const documentTag = "fitted-model"

// Storable is implemented by fitted models that can be saved as a
// document (see SaveModel). Every built-in fitted model implements it; a
// user's own model takes part by implementing it and registering a
// loader for its kind with Register.
type Storable interface {
	Fitted
	// StoredKind returns the registered kind of the document, e.g.
	// "smoothing.ets", and the version of the body it writes.
	StoredKind() (kind string, version int)
	// StoredBody returns the kind's own JSON body: what the loader needs
	// to rebuild the fitted model (usually the specification, the
	// estimated parameters and initial states, and the data).
	StoredBody() ([]byte, error)
}

// Loader rebuilds a fitted model from the JSON body of a document of its
// kind written with the given version (1 ≤ version ≤ the version the
// kind was registered with). It must validate everything it reads and
// return an error (wrapped by LoadModel in ErrDecode) for a body it
// cannot use, never panic.
type Loader func(version int, body []byte) (Fitted, error)

type registered struct {
	version int
	load    Loader
}

var (
	registryMu sync.RWMutex
	registry   = map[string]registered{}
)

// Register makes documents of kind loadable by LoadModel and
// UnmarshalModel: load rebuilds a fitted model from bodies of versions 1
// through version. Model packages call it from an init function (the
// pattern of image.RegisterFormat and database/sql.Register), so a
// program that imports package smoothing can load every smoothing model;
// the root package loads what it knows itself and never imports the model
// packages.
//
// Register panics when kind is empty, version < 1, load is nil, or kind
// is registered twice: these are programming errors at start-up, like a
// duplicate driver name in database/sql.
func Register(kind string, version int, load Loader) {
	if kind == "" || version < 1 || load == nil {
		panic("almanac: Register: empty kind, version below 1 or nil loader")
	}
	registryMu.Lock()
	defer registryMu.Unlock()
	if _, dup := registry[kind]; dup {
		panic("almanac: Register called twice for kind " + strconv.Quote(kind))
	}
	registry[kind] = registered{version: version, load: load}
}

// RegisteredKinds returns the kinds that LoadModel can decode, sorted.
func RegisteredKinds() []string {
	registryMu.RLock()
	defer registryMu.RUnlock()
	out := make([]string, 0, len(registry))
	for k := range registry {
		out = append(out, k)
	}
	slices.Sort(out)
	return out
}

// document is the envelope of a saved model.
type document struct {
	Almanac string          `json:"almanac"`
	Kind    string          `json:"kind"`
	Version int             `json:"version"`
	Model   string          `json:"model"`
	Body    json.RawMessage `json:"body"`
}

// MarshalModel returns f as a saved-model document (see SaveModel).
//
// Special cases: a model that does not implement Storable gives an error
// wrapping ErrInvalid; the model's own encoding errors are passed on.
func MarshalModel(f Fitted) ([]byte, error) {
	s, ok := f.(Storable)
	if !ok || f == nil {
		return nil, fmt.Errorf("almanac: save: %w: %T cannot be saved (it does not implement almanac.Storable)", ErrInvalid, f)
	}
	kind, version := s.StoredKind()
	body, err := s.StoredBody()
	if err != nil {
		return nil, fmt.Errorf("almanac: save %s: %w", kind, err)
	}
	if kind == "" || version < 1 {
		return nil, fmt.Errorf("almanac: save: %w: %T gives kind %q, version %d", ErrInvalid, f, kind, version)
	}
	var buf bytes.Buffer
	if err := json.Compact(&buf, body); err != nil {
		return nil, fmt.Errorf("almanac: save %s: %w: the body is not JSON: %v", kind, ErrInvalid, err)
	}
	return json.Marshal(document{Almanac: documentTag, Kind: kind, Version: version, Model: f.String(), Body: buf.Bytes()})
}

// maxDocument bounds the size of a document LoadModel reads (256 MiB).
const maxDocument = 256 << 20

// UnmarshalModel rebuilds the fitted model saved in data by MarshalModel
// or SaveModel.
//
// Special cases: anything that is not a document this program can load
// gives an error wrapping ErrDecode: not JSON or truncated, not a saved
// model, a kind nobody registered (import the package that registers it),
// a version newer than the registered one, a body the kind's loader
// rejects (values outside their valid region, wrong lengths, ...), or a
// rebuilt model whose String differs from the one recorded.
func UnmarshalModel(data []byte) (Fitted, error) {
	var doc document
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&doc); err != nil {
		return nil, fmt.Errorf("almanac: load: %w: %v", ErrDecode, err)
	}
	if dec.More() {
		return nil, fmt.Errorf("almanac: load: %w: data after the document", ErrDecode)
	}
	if doc.Almanac != documentTag {
		return nil, fmt.Errorf("almanac: load: %w: not a saved model (the \"almanac\" member is %q, want %q)", ErrDecode, doc.Almanac, documentTag)
	}
	registryMu.RLock()
	reg, ok := registry[doc.Kind]
	registryMu.RUnlock()
	if !ok {
		return nil, fmt.Errorf("almanac: load: %w: unknown kind %q (no package registered it; kinds known: %v)", ErrDecode, doc.Kind, RegisteredKinds())
	}
	switch {
	case doc.Version < 1:
		return nil, fmt.Errorf("almanac: load %s: %w: version %d", doc.Kind, ErrDecode, doc.Version)
	case doc.Version > reg.version:
		return nil, fmt.Errorf("almanac: load %s: %w: document version %d is newer than this program reads (up to %d); upgrade almanac", doc.Kind, ErrDecode, doc.Version, reg.version)
	}
	if len(doc.Body) == 0 || string(doc.Body) == "null" {
		return nil, fmt.Errorf("almanac: load %s: %w: no body", doc.Kind, ErrDecode)
	}
	f, err := safeLoad(reg.load, doc.Version, doc.Body)
	if err != nil {
		return nil, fmt.Errorf("almanac: load %s: %w: %w", doc.Kind, ErrDecode, err)
	}
	if f == nil {
		return nil, fmt.Errorf("almanac: load %s: %w: the loader returned no model", doc.Kind, ErrDecode)
	}
	if got := f.String(); got != doc.Model {
		return nil, fmt.Errorf("almanac: load %s: %w: the document describes %q but its body gives %q", doc.Kind, ErrDecode, doc.Model, got)
	}
	return f, nil
}

// safeLoad calls load, turning a panic into an error: a loader must not
// panic, but a bug in one should not take a service down with it.
func safeLoad(load Loader, version int, body []byte) (f Fitted, err error) {
	defer func() {
		if r := recover(); r != nil {
			f, err = nil, fmt.Errorf("the loader panicked: %v", r)
		}
	}()
	return load(version, body)
}

// SaveModel writes f to w as a versioned JSON document:
//
//	{"almanac":"fitted-model","kind":"smoothing.ets","version":1,"model":"ETS(M,Ad,M)","body":{...}}
//
// kind names the model family and version the layout of its body; model
// is the fitted model's String, checked again on loading. The body holds
// what the kind's loader needs to rebuild the model: in general the
// specification, the estimated parameters and initial states, and the
// data, from which the loader re-runs the model's own deterministic
// filter at the stored parameters. So a loaded model forecasts
// bit-identically to the saved one (point forecasts, bands, quantiles,
// and Simulate with the same source), and saving it again gives the same
// document. Wrappers (Box-Cox, combinations, decomposition-based
// forecasting, ...) hold their inner models as nested documents.
//
// Numbers are written in the shortest form that reads back to the same
// float64. JSON has no NaN: a missing observation in a stored series is
// written as null, and a value that is not finite elsewhere in a body
// makes the document invalid.
//
// Special cases: as MarshalModel; a write error is returned as is.
func SaveModel(w io.Writer, f Fitted) error {
	b, err := MarshalModel(f)
	if err != nil {
		return err
	}
	_, err = w.Write(b)
	return err
}

// LoadModel reads one document written by SaveModel from r (at most 256
// MiB) and rebuilds the fitted model; see UnmarshalModel for the errors.
// The package that registers the document's kind must be imported (for
// example with import _ "github.com/almanac-go/almanac/smoothing").
func LoadModel(r io.Reader) (Fitted, error) {
	b, err := io.ReadAll(io.LimitReader(r, maxDocument+1))
	if err != nil {
		return nil, fmt.Errorf("almanac: load: %w", err)
	}
	if len(b) > maxDocument {
		return nil, fmt.Errorf("almanac: load: %w: document larger than %d bytes", ErrDecode, maxDocument)
	}
	return UnmarshalModel(b)
}

// DecodeBody decodes a document body into v, rejecting unknown members,
// trailing data and a body that is not an object. Loaders use it so that
// a misspelt or tampered member is an error, not a silent zero.
func DecodeBody(body []byte, v any) error {
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return err
	}
	if dec.More() {
		return errors.New("data after the body")
	}
	return nil
}

// StoredValues is a []float64 that encodes NaN (a missing observation) as
// JSON null. Decoding rejects anything but numbers and null, so "NaN" or
// "Inf" written as strings, and numbers beyond the float64 range, are
// errors.
type StoredValues []float64

// MarshalJSON implements json.Marshaler: null for NaN; ±Inf is an error
// wrapping ErrNonFinite.
func (v StoredValues) MarshalJSON() ([]byte, error) {
	if v == nil {
		return []byte("[]"), nil
	}
	b := make([]byte, 0, 2+len(v)*20)
	b = append(b, '[')
	for i, x := range v {
		if i > 0 {
			b = append(b, ',')
		}
		switch {
		case math.IsNaN(x):
			b = append(b, "null"...)
		case math.IsInf(x, 0):
			return nil, fmt.Errorf("almanac: %w: value %d is %v", ErrNonFinite, i, x)
		default:
			b = appendFloat(b, x)
		}
	}
	return append(b, ']'), nil
}

// appendFloat writes x exactly as encoding/json writes a float64: the
// shortest form that reads back to the same bits, in plain notation for
// magnitudes in [1e-6, 1e21) and exponent notation otherwise, with a
// one-digit negative exponent written without its leading zero. It
// allocates nothing (json.Marshal allocates per value, which dominated
// the cost of saving large documents).
func appendFloat(b []byte, x float64) []byte {
	format := byte('f')
	if a := math.Abs(x); a != 0 && (a < 1e-6 || a >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, x, format, -1, 64)
	if format == 'e' {
		// e-07 → e-7, as encoding/json does.
		if n := len(b); n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b
}

// UnmarshalJSON implements json.Unmarshaler: null becomes NaN. It accepts
// exactly what decoding into []*float64 with encoding/json accepts (a
// JSON array of numbers and nulls; a number beyond the float64 range is
// an error), without allocating per element.
func (v *StoredValues) UnmarshalJSON(data []byte) error {
	if !json.Valid(data) {
		return fmt.Errorf("almanac: stored values: %w", errInvalidJSON)
	}
	data = bytes.TrimSpace(data)
	if string(data) == "null" { // a no-op, as encoding/json's convention asks
		return nil
	}
	if len(data) < 2 || data[0] != '[' || data[len(data)-1] != ']' {
		return fmt.Errorf("almanac: stored values: %w", errNotNumberArray)
	}
	body := bytes.TrimSpace(data[1 : len(data)-1])
	if len(body) == 0 {
		*v = StoredValues{}
		return nil
	}
	out := make([]float64, 0, bytes.Count(body, []byte{','})+1)
	for len(body) > 0 {
		elem := body
		if i := bytes.IndexByte(body, ','); i >= 0 {
			elem, body = body[:i], body[i+1:]
		} else {
			body = nil
		}
		elem = bytes.TrimSpace(elem)
		if string(elem) == "null" {
			out = append(out, math.NaN())
			continue
		}
		// The document is valid JSON, so an element that starts like a
		// number is a JSON number; anything else (a string, an object,
		// an array, true, false) is not a value.
		if len(elem) == 0 || !(elem[0] == '-' || elem[0] >= '0' && elem[0] <= '9') {
			return fmt.Errorf("almanac: stored values: %w", errNotNumberArray)
		}
		x, err := strconv.ParseFloat(string(elem), 64)
		if err != nil {
			return fmt.Errorf("almanac: stored values: %w: %s", errNotNumberArray, err)
		}
		out = append(out, x)
	}
	*v = out
	return nil
}

var (
	errInvalidJSON    = errors.New("invalid JSON")
	errNotNumberArray = errors.New("not an array of numbers and nulls within the float64 range")
)

// StoredSeries is the form of a Series inside a document: key, start
// (RFC 3339 with its offset; the time zone's name is not kept, so keep
// series in UTC or a fixed zone), frequency as unit name and multiple,
// and values with null for missing ones.
type StoredSeries struct {
	Key    string       `json:"key"`
	Start  time.Time    `json:"start"`
	Unit   string       `json:"unit"`
	Every  int          `json:"every"`
	Values StoredValues `json:"values"`
}

// StoreSeries returns y in its stored form (values copied).
func StoreSeries(y Series) StoredSeries {
	return StoredSeries{Key: y.Key, Start: y.Start, Unit: y.Freq.Unit.String(), Every: y.Freq.N, Values: slices.Clone(y.Values)}
}

// Series returns the stored series, validated as by Series.Validate (an
// unknown unit gives an error wrapping ErrFrequency).
func (s StoredSeries) Series() (Series, error) {
	unit := calendar.UnitUnset
	for u := calendar.Minute; u <= calendar.Year; u++ {
		if u.String() == s.Unit {
			unit = u
		}
	}
	if unit == calendar.UnitUnset {
		return Series{}, fmt.Errorf("almanac: stored series %q: %w: unit %q", s.Key, ErrFrequency, s.Unit)
	}
	y := Series{Key: s.Key, Start: s.Start, Freq: calendar.Frequency{Unit: unit, N: s.Every}, Values: slices.Clone([]float64(s.Values))}
	if err := y.Validate(); err != nil {
		return Series{}, err
	}
	return y, nil
}

// CheckFinite returns an error wrapping ErrDecode when a value a loader
// read is NaN or ±Inf (named by what).
func CheckFinite(what string, v ...float64) error {
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			if len(v) == 1 {
				return fmt.Errorf("%w: %s is %v", ErrDecode, what, x)
			}
			return fmt.Errorf("%w: %s[%d] is %v", ErrDecode, what, i, x)
		}
	}
	return nil
}
