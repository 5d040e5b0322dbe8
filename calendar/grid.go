package calendar

import (
	"fmt"
	"math"
	"sort"
	"time"
)

// Grid is the time axis of a regular series and its forecast period:
// N observations at Start, Freq.Add(Start, 1), …, followed by H future
// periods. Regressors built on a Grid have N+H values, history first, so
// that one call serves both the fit and the forecast. Example:
//
//	g := calendar.Grid{Start: first, Freq: calendar.Weekly, N: 156, H: 13}
//
// Period i is stamped with t_i = Freq.Add(Start, i). With the zero
// Stamp (StampStart) it covers the times from t_i up to (not including)
// t_{i+1}; with StampEnd it covers the times after t_{i−1} up to and
// including t_i. For daily and longer frequencies the periods are read
// as whole calendar dates in Start's location: a weekly period stamped
// on a Monday covers that Monday through Sunday (an ISO week, also across
// a year end), and so does one stamped on the Sunday with StampEnd; a
// monthly period stamped on the 1st is the calendar month, and so is one
// stamped on the last day with StampEnd, provided Start is a 31st (or a
// 31st-clamped month end such as 30 April for Start = 31 March) since
// Add keeps Start's day of month. For sub-daily frequencies a period
// belongs to the calendar date of its stamp.
//
// A Grid is a plain value, safe for concurrent use.
type Grid struct {
	Start time.Time
	Freq  Frequency
	N     int // observations, ≥ 0
	H     int // forecast periods, ≥ 0
	// Stamp says whether each time starts (zero value) or ends its
	// period.
	Stamp Stamp
}

// Stamp says where in its period an observation's time lies. Programs
// should not rely on the numeric values.
type Stamp int

const (
	// StampStart: each time is the first instant (or day) of its period.
	StampStart Stamp = iota
	// StampEnd: each time is the last instant (or day) of its period, as
	// with weeks ending on Sunday or month-end dates.
	StampEnd
)

// String returns "start", "end", or "Stamp(n)" for an unknown value.
func (s Stamp) String() string {
	switch s {
	case StampStart:
		return "start"
	case StampEnd:
		return "end"
	}
	return fmt.Sprintf("Stamp(%d)", int(s))
}

// Len returns N + H, the length of every regressor built on g.
func (g Grid) Len() int { return g.N + g.H }

// Time returns the start of period i (i may be outside 0..Len()−1).
func (g Grid) Time(i int) time.Time { return g.Freq.Add(g.Start, i) }

// Validate returns an error wrapping ErrFrequency for an invalid
// frequency and one wrapping ErrGrid for N < 0, H < 0, an N + H that
// overflows int, or an unknown Stamp.
func (g Grid) Validate() error {
	if err := g.Freq.Validate(); err != nil {
		return err
	}
	if g.Stamp != StampStart && g.Stamp != StampEnd {
		return fmt.Errorf("calendar: %w: %v", ErrGrid, g.Stamp)
	}
	if g.N < 0 || g.H < 0 {
		return fmt.Errorf("calendar: %w: N %d, H %d (need ≥ 0)", ErrGrid, g.N, g.H)
	}
	if g.N > math.MaxInt-g.H {
		return fmt.Errorf("calendar: %w: N %d + H %d overflows", ErrGrid, g.N, g.H)
	}
	return nil
}

// Index returns i such that Time(i) equals t exactly.
//
// Special cases: an invalid grid gives its Validate error; a t that is
// not a whole number of periods from Start gives an error wrapping
// ErrNotAligned; an aligned t outside 0..Len()−1 gives an error wrapping
// ErrOutside.
func (g Grid) Index(t time.Time) (int, error) {
	if err := g.Validate(); err != nil {
		return 0, err
	}
	i, err := g.Freq.Between(g.Start, t)
	if err != nil {
		return 0, err
	}
	if i < 0 || i >= g.Len() {
		return 0, g.outside(t)
	}
	return i, nil
}

// Locate returns the period that contains t (see Grid for what a period
// covers): for daily and longer frequencies the period whose calendar
// dates include t's date, for sub-daily ones the period whose interval
// includes the instant t. t need not be aligned.
//
// Special cases: an invalid grid gives its Validate error; t before the
// first period or after the last gives an error wrapping ErrOutside.
func (g Grid) Locate(t time.Time) (int, error) {
	if err := g.Validate(); err != nil {
		return 0, err
	}
	if u := g.Freq.Unit; u == Day || u == Week {
		// Fixed-length periods in calendar days: no layout needed.
		step := int64(g.Freq.mult())
		if u == Week {
			step *= 7
		}
		b0 := civilDays(g.Start)
		if g.Stamp == StampEnd {
			b0 += 1 - step
		}
		off := civilDays(t) - b0
		if off < 0 || off/step >= int64(g.Len()) {
			return 0, g.outside(t)
		}
		return int(off / step), nil
	}
	l, err := g.layout()
	if err != nil {
		return 0, err
	}
	return l.locate(g, t)
}

func (g Grid) outside(t time.Time) error {
	return fmt.Errorf("calendar: %w: %v is outside the %d periods of the %v grid from %v", ErrOutside, t, g.Len(), g.Freq, g.Start)
}

// layout holds the periods of a grid in calendar days. For daily and
// longer frequencies bounds has Len()+1 entries, period i covering days
// bounds[i] ≤ d < bounds[i+1]; for sub-daily ones it has Len() entries,
// the calendar day of each period's start.
type layout struct {
	sub    bool
	bounds []int64
}

func (g Grid) isSub() bool { return g.Freq.Unit == Minute || g.Freq.Unit == Hour }

func (g Grid) layout() (layout, error) {
	if err := g.Validate(); err != nil {
		return layout{}, err
	}
	m := g.Len()
	if g.isSub() {
		b := make([]int64, m)
		for i := range b {
			b[i] = civilDays(g.Time(i))
		}
		return layout{sub: true, bounds: b}, nil
	}
	b := make([]int64, m+1)
	switch g.Freq.Unit {
	case Day, Week:
		step := int64(g.Freq.mult())
		if g.Freq.Unit == Week {
			step *= 7
		}
		b0 := civilDays(g.Start)
		if g.Stamp == StampEnd {
			b0 += 1 - step
		}
		for i := range b {
			b[i] = b0 + int64(i)*step
		}
	default:
		off := 0
		if g.Stamp == StampEnd {
			off = -1
		}
		for i := range b {
			b[i] = civilDays(g.Time(i + off))
			if off != 0 {
				b[i]++
			}
		}
	}
	return layout{bounds: b}, nil
}

// span returns the first and last calendar day covered (hi < lo when
// the grid is empty).
func (l layout) span() (lo, hi int64) {
	if len(l.bounds) == 0 {
		return 0, -1
	}
	if l.sub {
		return l.bounds[0], l.bounds[len(l.bounds)-1]
	}
	return l.bounds[0], l.bounds[len(l.bounds)-1] - 1
}

func (l layout) locate(g Grid, t time.Time) (int, error) {
	m := g.Len()
	if m == 0 {
		return 0, g.outside(t)
	}
	if l.sub {
		d := t.Sub(g.Start)
		step := g.Freq.duration()
		if g.Stamp == StampEnd {
			// (t_{i−1}, t_i] ↦ i.
			d += step - 1
		}
		if d < 0 {
			return 0, g.outside(t)
		}
		i := d / step
		if i >= time.Duration(m) {
			return 0, g.outside(t)
		}
		return int(i), nil
	}
	d := civilDays(t)
	if d < l.bounds[0] || d >= l.bounds[m] {
		return 0, g.outside(t)
	}
	// First boundary beyond d, minus one.
	return sort.Search(m+1, func(i int) bool { return l.bounds[i] > d }) - 1, nil
}
