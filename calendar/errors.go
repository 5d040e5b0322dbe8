package calendar

import "errors"

// Sentinel errors; every error returned by this package wraps one of them.
var (
	// ErrFrequency reports an unset or invalid frequency.
	ErrFrequency = errors.New("invalid frequency")
	// ErrNotAligned reports a time that does not fall a whole number of
	// periods from a reference time.
	ErrNotAligned = errors.New("time not aligned to frequency")
	// ErrWeek reports an ISO week number outside 1..WeeksInISOYear(year).
	ErrWeek = errors.New("invalid ISO week")
	// ErrFourier reports invalid arguments to Fourier.
	ErrFourier = errors.New("invalid Fourier terms")
)
