package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"net/http"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/examples/charts"
	"github.com/almanac-go/almanac/smoothing"
)

// fieldError locates a problem of a request at a JSON field (a path such
// as "series[2].values[7]") or a line of CSV input.
type fieldError struct {
	Field string
	Line  int
	Err   error
}

func (e *fieldError) Error() string {
	switch {
	case e.Field != "" && e.Line > 0:
		return fmt.Sprintf("line %d, %s: %v", e.Line, e.Field, e.Err)
	case e.Line > 0:
		return fmt.Sprintf("line %d: %v", e.Line, e.Err)
	case e.Field != "":
		return fmt.Sprintf("%s: %v", e.Field, e.Err)
	}
	return e.Err.Error()
}

func (e *fieldError) Unwrap() error { return e.Err }

// problem is the JSON body of every error response:
//
//	{"problem": {"status": 400, "kind": "invalid-input", "detail": "...", "field": "series[0].values[3]"}}
type problem struct {
	Status int    `json:"status"`
	Kind   string `json:"kind"`
	Detail string `json:"detail"`
	Field  string `json:"field,omitempty"`
	Line   int    `json:"line,omitempty"`
}

// Kinds of problems, with their status codes (see statusOf).
const (
	kindInvalid   = "invalid-input"  // 400
	kindNotFound  = "not-found"      // 404
	kindMethod    = "wrong-method"   // 405
	kindConflict  = "conflict"       // 409
	kindTooLarge  = "body-too-large" // 413
	kindCannotFit = "cannot-fit"     // 422
	kindDeadline  = "deadline"       // 503
	kindStore     = "store"          // 500
	kindInternal  = "internal"       // 500
)

// Sentinels of bad input, answered with 400.
var badInput = []error{
	ErrRequest, almanac.ErrEmpty, almanac.ErrAllMissing, almanac.ErrNonFinite,
	almanac.ErrLength, almanac.ErrFrequency, almanac.ErrLevel, almanac.ErrHorizon, almanac.ErrInvalid,
	almanac.ErrDecode, almanac.ErrCSVSyntax, almanac.ErrCSVHeader, almanac.ErrCSVValue, almanac.ErrCSVTime,
	almanac.ErrCSVDuplicate, almanac.ErrCSVOrder, almanac.ErrCSVGap, almanac.ErrCSVIrregular,
	charts.ErrFormat, arima.ErrNeedRegressors,
}

// Sentinels of data a method cannot fit or forecast, answered with 422.
var cannotFit = []error{
	almanac.ErrNotFitted, almanac.ErrTooShort, almanac.ErrMissing, almanac.ErrConstant, almanac.ErrNonPositive,
	almanac.ErrNoDistribution, almanac.ErrNotRefreshable, smoothing.ErrNoCandidate, smoothing.ErrPeriodTooLong,
	smoothing.ErrNotAdmissible, arima.ErrCollinear, arima.ErrNonStationary, arima.ErrNearUnitRoot,
	accuracy.ErrBacktest, accuracy.ErrUndefined, charts.ErrDraw,
}

func isAny(err error, targets []error) bool {
	for _, t := range targets {
		if errors.Is(err, t) {
			return true
		}
	}
	return false
}

// statusOf maps an error to a status code and a kind, by errors.Is on the
// sentinels: the request's deadline or cancellation first (a fit that
// stopped for it fails with its error), then the size limit, unknown ids,
// conflicts, the store (a stored model that cannot be loaded included),
// data no method can fit, and bad input.
func statusOf(err error) (int, string) {
	var tooLarge *http.MaxBytesError
	switch {
	case errors.Is(err, context.DeadlineExceeded), errors.Is(err, context.Canceled):
		return http.StatusServiceUnavailable, kindDeadline
	case errors.As(err, &tooLarge):
		return http.StatusRequestEntityTooLarge, kindTooLarge
	case errors.Is(err, ErrNotFound):
		return http.StatusNotFound, kindNotFound
	case errors.Is(err, ErrConflict):
		return http.StatusConflict, kindConflict
	case errors.Is(err, ErrStore):
		// Before the data sentinels: a stored model that no longer loads
		// is the service's problem, not the client's.
		return http.StatusInternalServerError, kindStore
	case isAny(err, cannotFit):
		return http.StatusUnprocessableEntity, kindCannotFit
	case isAny(err, badInput):
		return http.StatusBadRequest, kindInvalid
	}
	return http.StatusInternalServerError, kindInternal
}

// writeProblem answers with the problem err describes.
func writeProblem(w http.ResponseWriter, err error) {
	status, kind := statusOf(err)
	p := problem{Status: status, Kind: kind, Detail: err.Error()}
	var fe *fieldError
	var ce *almanac.CSVError
	var se *almanac.SeriesError
	switch {
	case errors.As(err, &fe):
		p.Field, p.Line = fe.Field, fe.Line
	case errors.As(err, &ce):
		p.Field, p.Line = ce.Column, ce.Line
	case errors.As(err, &se) && se.Index >= 0:
		p.Field = fmt.Sprintf("values[%d]", se.Index)
	}
	writeJSON(w, status, map[string]problem{"problem": p})
}

// writeJSON answers with v as JSON.
func writeJSON(w http.ResponseWriter, status int, v any) {
	b, err := json.Marshal(v)
	if err != nil {
		status = http.StatusInternalServerError
		b, _ = json.Marshal(map[string]problem{"problem": {Status: status, Kind: kindInternal, Detail: "service: encode response: " + err.Error()}})
	}
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("X-Content-Type-Options", "nosniff")
	w.WriteHeader(status)
	w.Write(append(b, '\n'))
}

// num is a float64 written as JSON null when it is NaN or ±Inf (a score
// that is undefined for the data).
type num float64

func (x num) MarshalJSON() ([]byte, error) {
	if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
		return []byte("null"), nil
	}
	return json.Marshal(float64(x))
}
