package stl

import "errors"

// Sentinel errors of the stl package. Callers outside internal/ wrap them
// in the module's own sentinels.
var (
	// ErrPeriod: a period below 2.
	ErrPeriod = errors.New("period must be at least 2")
	// ErrTooShort: no more than two full periods of data.
	ErrTooShort = errors.New("series too short")
	// ErrParams: a window, degree, jump or iteration count out of range.
	ErrParams = errors.New("invalid parameters")
	// ErrNonFinite: a NaN or infinite value in the data.
	ErrNonFinite = errors.New("non-finite value")
	// ErrLength: an output buffer of the wrong length.
	ErrLength = errors.New("mismatched lengths")
	// ErrOverflow: a component is not representable in float64 (finite
	// data whose trend, seasonal or remainder lies beyond ±1.8e308).
	ErrOverflow = errors.New("component overflows float64")
)
