package calendar

import (
	"fmt"
	"math"
	"time"
)

// Column is one named regressor over a Grid: Len() values, history then
// future. It has the same fields as a regression column of the arima
// package, so arima.Regressor(col) converts it (after Grid.Split).
type Column struct {
	Name   string
	Values []float64
}

// Holidays returns, per period, the number of distinct calendar days in
// the period that are holidays of cal (two holidays on one date count
// once). For daily data this is a 0/1 indicator; for weekly data 0..7,
// for monthly data the holiday days of the month. Holidays on a weekend
// count too; use WorkingDays for the days lost to work. For sub-daily
// frequencies the value is 1 when the period's date is a holiday.
//
// Special cases: an invalid grid or calendar gives its Validate error; a
// grid reaching before 1584 with an Easter rule in cal gives an error
// wrapping ErrYear.
func (g Grid) Holidays(cal Calendar) ([]float64, error) {
	l, mark, err := g.holidayDays(cal)
	if err != nil {
		return nil, err
	}
	return l.count(mark, func(_ int64, v byte) bool { return v != 0 }), nil
}

// HolidayColumns returns one column per holiday name of cal, in order of
// first appearance, with the number of days of that holiday per period
// (see Holidays). Holidays sharing a name share a column.
//
// Special cases: an invalid grid or calendar gives its Validate error; a
// grid reaching before 1584 with an Easter rule in cal gives an error
// wrapping ErrYear.
func (g Grid) HolidayColumns(cal Calendar) ([]Column, error) {
	l, err := g.layout()
	if err != nil {
		return nil, err
	}
	if err := cal.Validate(); err != nil {
		return nil, err
	}
	lo, hi := l.span()
	var cols []Column
	index := map[string]int{}
	group := make([]int, len(cal.Holidays))
	for i, h := range cal.Holidays {
		j, ok := index[h.Name]
		if !ok {
			j = len(cols)
			index[h.Name] = j
			cols = append(cols, Column{Name: h.Name})
		}
		group[i] = j
	}
	if hi < lo {
		for j := range cols {
			cols[j].Values = []float64{}
		}
		return cols, nil
	}
	if err := cal.checkYears(lo); err != nil {
		return nil, err
	}
	marks := make([][]byte, len(cols))
	for j := range marks {
		marks[j] = make([]byte, hi-lo+1)
	}
	cal.each(lo, hi, func(hol int, d int64) { marks[group[hol]][d-lo] = 1 })
	for j := range cols {
		cols[j].Values = l.count(marks[j], func(_ int64, v byte) bool { return v != 0 })
	}
	return cols, nil
}

// Weekdays returns seven columns, Monday through Sunday (named "Monday",
// …), with the number of each day of the week per period: trading-day
// counts. For daily data they are 0/1 day-of-week indicators (which sum
// to one, so use at most six of them beside a mean); for monthly data a
// month of 31 days has three of three weekdays and four of the rest.
//
// Special cases: an invalid grid gives its Validate error.
func (g Grid) Weekdays() ([]Column, error) {
	l, err := g.layout()
	if err != nil {
		return nil, err
	}
	cols := make([]Column, 7)
	for k := range cols {
		cols[k] = Column{Name: time.Weekday((k + 1) % 7).String(), Values: make([]float64, g.Len())}
	}
	if l.sub {
		for i, d := range l.bounds {
			cols[(int(weekdayOf(d))+6)%7].Values[i] = 1 // Monday first
		}
		return cols, nil
	}
	for i := range len(l.bounds) - 1 {
		lo, hi := l.bounds[i], l.bounds[i+1]
		// Whole weeks add one of each day; the rest is counted.
		if full := (hi - lo) / 7; full > 0 {
			for k := range cols {
				cols[k].Values[i] = float64(full)
			}
			lo += 7 * full
		}
		for d := lo; d < hi; d++ {
			cols[(int(weekdayOf(d))+6)%7].Values[i]++
		}
	}
	return cols, nil
}

// WorkingDays returns, per period, the number of days that are neither
// on cal's weekend nor holidays of cal (a holiday on a weekend day is
// not counted twice). For sub-daily frequencies the value is 1 when the
// period's date is a working day.
//
// Special cases: an invalid grid or calendar gives its Validate error; a
// grid reaching before 1584 with an Easter rule in cal gives an error
// wrapping ErrYear.
func (g Grid) WorkingDays(cal Calendar) ([]float64, error) {
	l, mark, err := g.holidayDays(cal)
	if err != nil {
		return nil, err
	}
	wk := cal.weekendMask()
	return l.count(mark, func(d int64, v byte) bool { return v == 0 && wk&(1<<weekdayOf(d)) == 0 }), nil
}

// weekdayOf returns the day of the week of civil day d (day 0,
// 1970-01-01, was a Thursday).
func weekdayOf(d int64) time.Weekday { return time.Weekday(((d+4)%7 + 7) % 7) }

// holidayDays returns the grid's layout and a mark per covered day
// (1 = holiday of cal).
func (g Grid) holidayDays(cal Calendar) (layout, []byte, error) {
	l, err := g.layout()
	if err != nil {
		return l, nil, err
	}
	if err := cal.Validate(); err != nil {
		return l, nil, err
	}
	lo, hi := l.span()
	if hi < lo {
		return l, nil, nil
	}
	if err := cal.checkYears(lo); err != nil {
		return l, nil, err
	}
	mark := make([]byte, hi-lo+1)
	cal.each(lo, hi, func(_ int, d int64) { mark[d-lo] = 1 })
	return l, mark, nil
}

// count returns, per period, the number of covered days d for which
// keep(d, mark[d−lo]) holds (mark may be nil: all zero).
func (l layout) count(mark []byte, keep func(d int64, v byte) bool) []float64 {
	lo, _ := l.span()
	at := func(d int64) byte {
		if mark == nil {
			return 0
		}
		return mark[d-lo]
	}
	if l.sub {
		out := make([]float64, len(l.bounds))
		for i, d := range l.bounds {
			if keep(d, at(d)) {
				out[i] = 1
			}
		}
		return out
	}
	out := make([]float64, max(len(l.bounds)-1, 0))
	for i := range out {
		n := 0
		for d := l.bounds[i]; d < l.bounds[i+1]; d++ {
			if keep(d, at(d)) {
				n++
			}
		}
		out[i] = float64(n)
	}
	return out
}

// Pulse returns 1 in the period containing at and 0 elsewhere: a one-off
// event.
//
// Special cases: an invalid grid gives its Validate error; at outside
// the grid gives an error wrapping ErrOutside.
func (g Grid) Pulse(at time.Time) ([]float64, error) {
	k, err := g.Locate(at)
	if err != nil {
		return nil, err
	}
	out := make([]float64, g.Len())
	out[k] = 1
	return out, nil
}

// Step returns 0 before the period containing from and 1 from it on: a
// permanent level shift.
//
// Special cases: as Pulse.
func (g Grid) Step(from time.Time) ([]float64, error) {
	k, err := g.Locate(from)
	if err != nil {
		return nil, err
	}
	out := make([]float64, g.Len())
	for i := k; i < len(out); i++ {
		out[i] = 1
	}
	return out, nil
}

// Shift returns 1 from the period containing from through the period
// containing through (both included) and 0 elsewhere: a temporary level
// shift such as a shutdown or a reclassification that later reverts.
// through may lie beyond the grid (the shift lasts past the horizon).
//
// Special cases: an invalid grid gives its Validate error; from outside
// the grid gives an error wrapping ErrOutside; through before from one
// wrapping ErrSpan.
func (g Grid) Shift(from, through time.Time) ([]float64, error) {
	k0, k1, err := g.interval(from, through, g.Len()-1)
	if err != nil {
		return nil, err
	}
	out := make([]float64, g.Len())
	for i := k0; i <= k1; i++ {
		out[i] = 1
	}
	return out, nil
}

// interval locates from and through; through after the grid gives
// k1 = past (the caller's choice of "beyond the last period").
func (g Grid) interval(from, through time.Time, past int) (k0, k1 int, err error) {
	if k0, err = g.Locate(from); err != nil {
		return 0, 0, err
	}
	before := through.Before(from)
	if !g.isSub() {
		before = civilDays(through) < civilDays(from)
	}
	if before {
		return 0, 0, fmt.Errorf("calendar: %w: %v before %v", ErrSpan, through, from)
	}
	if k1, err = g.Locate(through); err != nil {
		k1 = past // after the grid, as through is not before from
	}
	return k0, k1, nil
}

// Ramp returns a linear change from the period k0 containing from: 0 up
// to and including period k0, then i − k0 in period i, held at k1 − k0
// from the period k1 containing until on. A zero until (or one beyond
// the grid) means no cap inside the grid. The coefficient of a ramp is
// the change per period.
//
// Special cases: an invalid grid gives its Validate error; from outside
// the grid gives an error wrapping ErrOutside; a non-zero until before
// from one wrapping ErrSpan.
func (g Grid) Ramp(from, until time.Time) ([]float64, error) {
	var k0, k1 int
	var err error
	if until.IsZero() {
		k0, err = g.Locate(from)
		k1 = math.MaxInt
	} else {
		k0, k1, err = g.interval(from, until, math.MaxInt)
	}
	if err != nil {
		return nil, err
	}
	out := make([]float64, g.Len())
	for i := k0 + 1; i < len(out); i++ {
		out[i] = float64(min(i, k1) - k0)
	}
	return out, nil
}

// Decay returns a pulse at the period k containing at that dies away
// geometrically: 0 before k, rate^(i−k) in period i ≥ k (1 at k). rate
// near 0 gives almost a pulse, near 1 almost a step.
//
// Special cases: an invalid grid gives its Validate error; at outside
// the grid gives an error wrapping ErrOutside; rate outside the open
// interval (0, 1) (or NaN) one wrapping ErrRate.
func (g Grid) Decay(at time.Time, rate float64) ([]float64, error) {
	if !(rate > 0 && rate < 1) {
		return nil, fmt.Errorf("calendar: %w: %v (need 0 < rate < 1)", ErrRate, rate)
	}
	k, err := g.Locate(at)
	if err != nil {
		return nil, err
	}
	out := make([]float64, g.Len())
	v := 1.0
	for i := k; i < len(out); i++ {
		out[i] = v
		v *= rate
	}
	return out, nil
}

// Split cuts columns built on g into the history part (the first N values
// of each, as columns sharing the input's storage) and the future part
// (future[j] holds the H values of cols[j]), the two shapes a regression
// with ARIMA errors takes for fitting and for forecasting.
//
// Special cases: an invalid grid gives its Validate error; a column
// whose length is not Len(), with an empty or repeated name, or with a
// NaN or infinite value gives an error wrapping ErrColumn.
func (g Grid) Split(cols ...Column) (history []Column, future [][]float64, err error) {
	if err := g.Validate(); err != nil {
		return nil, nil, err
	}
	seen := make(map[string]bool, len(cols))
	history = make([]Column, len(cols))
	future = make([][]float64, len(cols))
	for j, c := range cols {
		if c.Name == "" {
			return nil, nil, fmt.Errorf("calendar: %w: column %d has no name", ErrColumn, j)
		}
		if seen[c.Name] {
			return nil, nil, fmt.Errorf("calendar: %w: name %q repeated", ErrColumn, c.Name)
		}
		seen[c.Name] = true
		if len(c.Values) != g.Len() {
			return nil, nil, fmt.Errorf("calendar: %w: %q has %d values, the grid %d (N %d + H %d)", ErrColumn, c.Name, len(c.Values), g.Len(), g.N, g.H)
		}
		for i, v := range c.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, nil, fmt.Errorf("calendar: %w: %q value %d is %v", ErrColumn, c.Name, i, v)
			}
		}
		history[j] = Column{Name: c.Name, Values: c.Values[:g.N:g.N]}
		future[j] = c.Values[g.N:len(c.Values):len(c.Values)]
	}
	return history, future, nil
}
