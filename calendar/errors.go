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
	// ErrRule reports an invalid holiday rule or calendar: a month or
	// day out of range, an nth weekday of 0 or beyond ±5, an unknown
	// observance, a nil rule, an unnamed holiday or an invalid weekend
	// day.
	ErrRule = errors.New("invalid holiday rule")
	// ErrYear reports a year outside the range a rule is defined for
	// (Gregorian Easter before 1583).
	ErrYear = errors.New("year out of range")
	// ErrSpan reports an empty span: an end before its start.
	ErrSpan = errors.New("empty span")
	// ErrGrid reports an invalid time grid: a negative number of
	// observations or horizon.
	ErrGrid = errors.New("invalid grid")
	// ErrOutside reports an event date outside the time grid.
	ErrOutside = errors.New("date outside the grid")
	// ErrRate reports a decay rate outside (0, 1).
	ErrRate = errors.New("invalid decay rate")
	// ErrColumn reports a regressor column that cannot be split into
	// history and future: wrong length, empty or repeated name, or a
	// non-finite value.
	ErrColumn = errors.New("invalid regressor column")
)
