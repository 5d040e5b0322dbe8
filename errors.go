package almanac

import (
	"errors"
	"fmt"

	"github.com/almanac-go/almanac/calendar"
)

// Sentinel errors. Every error returned by this module for bad input wraps
// one of these (or a package's own sentinel), so callers can test with
// errors.Is. Messages start with the package name.
var (
	// ErrEmpty: a series or slice with no observations.
	ErrEmpty = errors.New("empty series")
	// ErrTooShort: too few observations for what was asked.
	ErrTooShort = errors.New("series too short")
	// ErrAllMissing: every observation is NaN.
	ErrAllMissing = errors.New("all observations missing")
	// ErrMissing: a method that needs complete data was given NaN.
	ErrMissing = errors.New("missing values not allowed")
	// ErrNonFinite: an infinite value where only finite values or NaN
	// (missing) are allowed.
	ErrNonFinite = errors.New("non-finite value")
	// ErrConstant: the series is constant where variation is needed.
	ErrConstant = errors.New("constant series")
	// ErrNonPositive: a value ≤ 0 where a positive one is needed (e.g.
	// multiplicative components, Box-Cox with λ ≤ 0).
	ErrNonPositive = errors.New("non-positive value")
	// ErrLength: slices whose lengths must agree do not.
	ErrLength = errors.New("mismatched lengths")
	// ErrFrequency: an unset or unknown frequency (same value as
	// calendar.ErrFrequency).
	ErrFrequency = calendar.ErrFrequency
	// ErrLevel: a prediction-interval level outside (0, 100) or a
	// probability outside (0, 1).
	ErrLevel = errors.New("invalid level")
	// ErrHorizon: a forecast horizon below 1.
	ErrHorizon = errors.New("invalid horizon")
	// ErrNoDistribution: a quantile was asked of a forecast that carries
	// no distribution.
	ErrNoDistribution = errors.New("forecast has no distribution")
	// ErrInvalid: a model specification or option is invalid.
	ErrInvalid = errors.New("invalid specification")
	// ErrNotFitted: a model could not be fitted (the optimiser failed,
	// the likelihood is not finite anywhere, and so on).
	ErrNotFitted = errors.New("model could not be fitted")
	// ErrDecode: a saved-model document that cannot be loaded (not a
	// document, truncated, an unknown kind or a newer version, values
	// outside their valid region).
	ErrDecode = errors.New("cannot decode saved model")
	// ErrNotRefreshable: a fitted model that cannot take new
	// observations without a refit.
	ErrNotRefreshable = errors.New("model cannot be refreshed")
)

// SeriesError is a problem located at one observation of one series. It
// unwraps to its sentinel.
type SeriesError struct {
	Key   string // series key, may be empty
	Index int    // 0-based observation index, -1 when not about one value
	Err   error  // sentinel, e.g. ErrNonFinite
}

// Error returns "almanac: series KEY: MESSAGE", with " at index I" when
// the error is about one observation.
func (e *SeriesError) Error() string {
	key := e.Key
	if key == "" {
		key = "(no key)"
	}
	if e.Index < 0 {
		return fmt.Sprintf("almanac: series %s: %v", key, e.Err)
	}
	return fmt.Sprintf("almanac: series %s: %v at index %d", key, e.Err, e.Index)
}

// Unwrap returns the sentinel, for errors.Is.
func (e *SeriesError) Unwrap() error { return e.Err }

// Errors of the CSV reader, carried inside a *CSVError that names the line
// and column.
var (
	// ErrCSVSyntax: the input is not well-formed CSV (quotes, field count).
	ErrCSVSyntax = errors.New("malformed csv")
	// ErrCSVHeader: a required column is missing from the header, or named twice.
	ErrCSVHeader = errors.New("bad csv header")
	// ErrCSVValue: a value cell is neither a number nor a missing-value token.
	ErrCSVValue = errors.New("bad value")
	// ErrCSVTime: a time cell matches none of the layouts.
	ErrCSVTime = errors.New("bad time")
	// ErrCSVDuplicate: two rows of one series at the same time.
	ErrCSVDuplicate = errors.New("duplicate time")
	// ErrCSVOrder: a row of a series is earlier than the row before it.
	ErrCSVOrder = errors.New("rows out of time order")
	// ErrCSVGap: consecutive rows of a series skip periods and gap
	// filling was not asked for.
	ErrCSVGap = errors.New("gap in series")
	// ErrCSVIrregular: a time is not a whole number of periods from the
	// series' first time.
	ErrCSVIrregular = errors.New("irregular time")
)

// CSVError is a problem at one line of CSV input. It unwraps to an error
// that wraps one of the ErrCSV… sentinels (and ErrNonFinite for an
// infinite value, ErrEmpty for input without data rows).
type CSVError struct {
	Line   int    // 1-based line number in the input; 0 when not about one line
	Column string // column name from the header, or "" when not about one cell
	Err    error
}

// Error returns "almanac: csv line L, column "C": MESSAGE", leaving out
// the line or the column when not known.
func (e *CSVError) Error() string {
	switch {
	case e.Line > 0 && e.Column != "":
		return fmt.Sprintf("almanac: csv line %d, column %q: %v", e.Line, e.Column, e.Err)
	case e.Line > 0:
		return fmt.Sprintf("almanac: csv line %d: %v", e.Line, e.Err)
	}
	return fmt.Sprintf("almanac: csv: %v", e.Err)
}

// Unwrap returns the wrapped error, for errors.Is and errors.As.
func (e *CSVError) Unwrap() error { return e.Err }

// PanicError is a panic recovered from a model inside BatchFit: the
// series, the value passed to panic and the stack of the panicking
// goroutine at that moment, so that the failure can be reported to the
// model's authors. It unwraps to ErrNotFitted, and to the panic value
// too when that is an error (a runtime.Error for an index out of range,
// for example).
type PanicError struct {
	Key   string // key of the series being fitted
	Value any    // the value passed to panic
	Stack []byte // runtime/debug.Stack() of the panicking goroutine
}

// Error returns "almanac: batch: series KEY: model could not be fitted:
// model panicked: VALUE". The stack is in the Stack field, not in the
// message.
func (e *PanicError) Error() string {
	return fmt.Sprintf("almanac: batch: series %q: %v: model panicked: %v", e.Key, ErrNotFitted, e.Value)
}

// Unwrap returns ErrNotFitted, and the panic value when it is an error.
func (e *PanicError) Unwrap() []error {
	if err, ok := e.Value.(error); ok {
		return []error{ErrNotFitted, err}
	}
	return []error{ErrNotFitted}
}
