package almanac

import (
	"fmt"
	"math"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// Series is a regularly spaced time series. Values[i] is observed at
// Freq.Add(Start, i); NaN marks a missing observation. ±Inf is never
// valid.
//
// A Series is a plain value: methods never modify the receiver, and the
// sub-series returned by Head, Tail and Window share Values with it (use
// Clone for an independent copy). Concurrent reads are safe.
type Series struct {
	Key    string             // identifies the series, e.g. a product code
	Start  time.Time          // time of Values[0]
	Freq   calendar.Frequency // spacing of the observations
	Values []float64          // observations; NaN = missing
}

// NewSeries returns a Series holding a copy of values, validated.
func NewSeries(key string, start time.Time, freq calendar.Frequency, values []float64) (Series, error) {
	s := Series{Key: key, Start: start, Freq: freq, Values: append([]float64(nil), values...)}
	if err := s.Validate(); err != nil {
		return Series{}, err
	}
	return s, nil
}

// Len returns the number of observations, missing ones included.
func (s Series) Len() int { return len(s.Values) }

// Validate checks that the series can be used by a model: a valid
// frequency, at least one observation, no ±Inf, and at least one value
// that is not missing. The error wraps ErrFrequency, ErrEmpty,
// ErrNonFinite (as a *SeriesError with the index) or ErrAllMissing.
// Validate does not reject constant series or missing values; models
// that cannot handle them say so themselves.
func (s Series) Validate() error {
	if err := s.Freq.Validate(); err != nil {
		return fmt.Errorf("almanac: series %q: %w", s.Key, err)
	}
	if len(s.Values) == 0 {
		return &SeriesError{Key: s.Key, Index: -1, Err: ErrEmpty}
	}
	observed := 0
	for i, v := range s.Values {
		if math.IsInf(v, 0) {
			return &SeriesError{Key: s.Key, Index: i, Err: ErrNonFinite}
		}
		if !math.IsNaN(v) {
			observed++
		}
	}
	if observed == 0 {
		return &SeriesError{Key: s.Key, Index: -1, Err: ErrAllMissing}
	}
	return nil
}

// Time returns the time of observation i (i may be negative or ≥ Len to
// step outside the sample).
func (s Series) Time(i int) time.Time { return s.Freq.Add(s.Start, i) }

// End returns the time of the last observation (Start for an empty series).
func (s Series) End() time.Time {
	if len(s.Values) == 0 {
		return s.Start
	}
	return s.Time(len(s.Values) - 1)
}

// Index returns the position of time t in the series. t need not lie in
// [Start, End]: the result may be negative or ≥ Len. It returns an error
// wrapping calendar.ErrNotAligned when t is not a whole number of
// periods from Start.
func (s Series) Index(t time.Time) (int, error) {
	i, err := s.Freq.Between(s.Start, t)
	if err != nil {
		return 0, fmt.Errorf("almanac: series %q: %w", s.Key, err)
	}
	return i, nil
}

// Window returns observations [i, j) as a series starting at Time(i).
// Indices are clamped to [0, Len]; j < i gives an empty series.
func (s Series) Window(i, j int) Series {
	n := len(s.Values)
	i = min(max(i, 0), n)
	j = min(max(j, i), n)
	return Series{Key: s.Key, Start: s.Time(i), Freq: s.Freq, Values: s.Values[i:j:j]}
}

// Head returns the first n observations (all of them when n ≥ Len).
func (s Series) Head(n int) Series { return s.Window(0, n) }

// Tail returns the last n observations (all of them when n ≥ Len).
func (s Series) Tail(n int) Series { return s.Window(len(s.Values)-n, len(s.Values)) }

// Split returns the first Len−test observations as train and the last
// test observations as test. It returns an error wrapping ErrTooShort
// unless 0 < test < Len.
func (s Series) Split(test int) (train, hold Series, err error) {
	if test <= 0 || test >= len(s.Values) {
		return Series{}, Series{}, fmt.Errorf("almanac: series %q: %w: cannot hold out %d of %d observations", s.Key, ErrTooShort, test, len(s.Values))
	}
	k := len(s.Values) - test
	return s.Window(0, k), s.Window(k, len(s.Values)), nil
}

// Missing returns the number of NaN observations.
func (s Series) Missing() int {
	c := 0
	for _, v := range s.Values {
		if math.IsNaN(v) {
			c++
		}
	}
	return c
}

// Slice returns a copy of the values.
func (s Series) Slice() []float64 { return append([]float64(nil), s.Values...) }

// Clone returns a deep copy of s.
func (s Series) Clone() Series {
	s.Values = s.Slice()
	return s
}

// Period returns the series' primary integer seasonal period, from Freq
// (monthly 12, quarterly 4, weekly 52, daily 7, hourly 24, yearly 1).
func (s Series) Period() int { return s.Freq.Period() }

// CheckComplete returns an error wrapping ErrMissing (as a *SeriesError
// with the index of the first NaN) when any value is missing. Models that
// need complete data call it after Validate.
func (s Series) CheckComplete() error {
	for i, v := range s.Values {
		if math.IsNaN(v) {
			return &SeriesError{Key: s.Key, Index: i, Err: ErrMissing}
		}
	}
	return nil
}

// CheckPositive returns an error wrapping ErrNonPositive (as a
// *SeriesError with the index of the first offending value) when any
// observed value is ≤ 0.
func (s Series) CheckPositive() error {
	for i, v := range s.Values {
		if v <= 0 {
			return &SeriesError{Key: s.Key, Index: i, Err: ErrNonPositive}
		}
	}
	return nil
}

// IsConstant reports whether all observed values are equal.
func (s Series) IsConstant() bool {
	first := math.NaN()
	for _, v := range s.Values {
		if math.IsNaN(v) {
			continue
		}
		if math.IsNaN(first) {
			first = v
		} else if v != first {
			return false
		}
	}
	return true
}
