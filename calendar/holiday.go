package calendar

import (
	"fmt"
	"time"
)

// Rule says on which calendar dates a holiday falls in a year. Dates
// returns them at 00:00 UTC in ascending order; a rule may give no date
// in some years (a fifth Monday that does not exist, a span in another
// year) and, after observance shifting, a date just outside the year
// (January 1 on a Saturday observed on December 31 before). Validate
// reports a rule that can never be evaluated; Dates of an invalid rule
// returns nil.
//
// FixedDate, NthWeekday, EasterOffset and Span implement Rule. All are
// plain values, safe for concurrent use.
type Rule interface {
	Dates(year int) []time.Time
	Validate() error
}

var (
	_ Rule = FixedDate{}
	_ Rule = NthWeekday{}
	_ Rule = EasterOffset{}
	_ Rule = Span{}
)

// Observance says how a fixed-date holiday that falls on a weekend is
// moved to a working day. The zero value keeps the date. Saturday and
// Sunday are the weekend for this purpose, whatever a Calendar's
// Weekend says. Programs should not rely on the numeric values.
type Observance int

const (
	// OnTheDay keeps the date, weekend or not.
	OnTheDay Observance = iota
	// NearestWeekday moves a Saturday to the Friday before and a Sunday
	// to the Monday after (common practice for public holidays; the
	// Friday may fall in the previous year).
	NearestWeekday
	// FollowingMonday moves a Saturday or a Sunday to the Monday after
	// (common practice).
	FollowingMonday
)

var observanceNames = [...]string{"on the day", "nearest weekday", "following Monday"}

// String returns a short English description of the observance, or
// "Observance(n)" for an unknown value.
func (o Observance) String() string {
	if o >= 0 && int(o) < len(observanceNames) {
		return observanceNames[o]
	}
	return fmt.Sprintf("Observance(%d)", int(o))
}

func (o Observance) shift(t time.Time) time.Time {
	switch o {
	case NearestWeekday:
		switch t.Weekday() {
		case time.Saturday:
			return t.AddDate(0, 0, -1)
		case time.Sunday:
			return t.AddDate(0, 0, 1)
		}
	case FollowingMonday:
		switch t.Weekday() {
		case time.Saturday:
			return t.AddDate(0, 0, 2)
		case time.Sunday:
			return t.AddDate(0, 0, 1)
		}
	}
	return t
}

func day(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

// FixedDate is a holiday on the same month and day every year, e.g.
// FixedDate{Month: time.May, Day: 14, Observed: NearestWeekday}.
// February 29 occurs in leap years only.
type FixedDate struct {
	Month    time.Month
	Day      int // 1..31, at most the month's length in a leap year
	Observed Observance
}

// Validate returns an error wrapping ErrRule for a month outside 1..12,
// a day outside the month (February allows 29) or an unknown
// observance.
func (r FixedDate) Validate() error {
	if r.Month < time.January || r.Month > time.December {
		return fmt.Errorf("calendar: %w: month %d", ErrRule, int(r.Month))
	}
	if last := daysIn(2000, r.Month); r.Day < 1 || r.Day > last {
		return fmt.Errorf("calendar: %w: day %d of %v (1..%d)", ErrRule, r.Day, r.Month, last)
	}
	if r.Observed < OnTheDay || r.Observed > FollowingMonday {
		return fmt.Errorf("calendar: %w: observance %v", ErrRule, r.Observed)
	}
	return nil
}

// Dates returns the (observed) date of the holiday in year, or nil for
// February 29 in a common year.
func (r FixedDate) Dates(year int) []time.Time {
	if r.Validate() != nil || r.Day > daysIn(year, r.Month) {
		return nil
	}
	return []time.Time{r.Observed.shift(day(year, r.Month, r.Day))}
}

// Last is the N of NthWeekday for the last such weekday of the month.
const Last = -1

// NthWeekday is the N-th given weekday of a month: N = 1..5 counts from
// the start of the month, N = −1..−5 from its end (Last = −1), e.g.
// NthWeekday{Month: time.September, Weekday: time.Monday, N: 1} or
// NthWeekday{Month: time.May, Weekday: time.Monday, N: Last}.
type NthWeekday struct {
	Month   time.Month
	Weekday time.Weekday
	N       int
}

// Validate returns an error wrapping ErrRule for a month outside 1..12,
// a weekday outside Sunday..Saturday, or N of 0 or beyond ±5.
func (r NthWeekday) Validate() error {
	if r.Month < time.January || r.Month > time.December {
		return fmt.Errorf("calendar: %w: month %d", ErrRule, int(r.Month))
	}
	if r.Weekday < time.Sunday || r.Weekday > time.Saturday {
		return fmt.Errorf("calendar: %w: weekday %d", ErrRule, int(r.Weekday))
	}
	if r.N == 0 || r.N > 5 || r.N < -5 {
		return fmt.Errorf("calendar: %w: nth weekday %d (1..5 from the start, -1..-5 from the end)", ErrRule, r.N)
	}
	return nil
}

// Dates returns the date in year, or nil when the month has no such
// weekday (a fifth Friday in a month with four).
func (r NthWeekday) Dates(year int) []time.Time {
	if r.Validate() != nil {
		return nil
	}
	var d int
	if r.N > 0 {
		first := day(year, r.Month, 1).Weekday()
		d = 1 + (int(r.Weekday)-int(first)+7)%7 + 7*(r.N-1)
	} else {
		n := daysIn(year, r.Month)
		lastWd := day(year, r.Month, n).Weekday()
		d = n - (int(lastWd)-int(r.Weekday)+7)%7 + 7*(r.N+1)
	}
	if d < 1 || d > daysIn(year, r.Month) {
		return nil
	}
	return []time.Time{day(year, r.Month, d)}
}

// EasterOffset is a holiday a fixed number of days from Gregorian Easter
// Sunday: Days = 0 is Easter Sunday itself, −2 the Friday before, 1 the
// Monday after, 49 the seventh Sunday after.
type EasterOffset struct {
	Days int
}

// Validate returns an error wrapping ErrRule when |Days| > 300 (an
// offset that large is a typing error; it would also leave the year).
func (r EasterOffset) Validate() error {
	if r.Days < -300 || r.Days > 300 {
		return fmt.Errorf("calendar: %w: Easter offset of %d days", ErrRule, r.Days)
	}
	return nil
}

// Dates returns Easter Sunday of year shifted by Days, or nil before
// 1583 (see Easter).
func (r EasterOffset) Dates(year int) []time.Time {
	if r.Validate() != nil {
		return nil
	}
	e, err := Easter(year)
	if err != nil {
		return nil
	}
	return []time.Time{e.AddDate(0, 0, r.Days)}
}

// Easter returns Gregorian Easter Sunday of year at 00:00 UTC, by the
// anonymous algorithm published by Meeus (Astronomical Algorithms, 2nd
// ed. 1998, ch. 8), which is exact for every Gregorian year.
//
// Special cases: a year before 1583 (the first full Gregorian year)
// gives an error wrapping ErrYear.
func Easter(year int) (time.Time, error) {
	if year < 1583 {
		return time.Time{}, fmt.Errorf("calendar: %w: Gregorian Easter for %d (need 1583 or later)", ErrYear, year)
	}
	m, d := easterMonthDay(year)
	return day(year, time.Month(m), d), nil
}

// easterMonthDay is Meeus's anonymous Gregorian algorithm, variable
// names as published; year ≥ 1583.
func easterMonthDay(year int) (month, dom int) {
	a := year % 19
	b := year / 100
	c := year % 100
	d := b / 4
	e := b % 4
	f := (b + 8) / 25
	g := (b - f + 1) / 3
	h := (19*a + b - d - g + 15) % 30
	i := c / 4
	k := c % 4
	l := (32 + 2*e + 2*i - h - k) % 7
	m := (a + 11*h + 22*l) / 451
	n := h + l - 7*m + 114
	return n / 31, n%31 + 1
}

// Span is a holiday on every day from First through Last (calendar
// dates, both included), e.g. a one-off closure or a multi-day festival
// in one particular year. Only the dates are used; clock and location
// are ignored.
type Span struct {
	First, Last time.Time
}

// Validate returns an error wrapping ErrSpan when Last is before First.
func (r Span) Validate() error {
	if civilDays(r.Last) < civilDays(r.First) {
		return fmt.Errorf("calendar: %w: %s..%s", ErrSpan, r.First.Format(time.DateOnly), r.Last.Format(time.DateOnly))
	}
	return nil
}

// Dates returns the days of the span that fall in year.
func (r Span) Dates(year int) []time.Time {
	if r.Validate() != nil {
		return nil
	}
	lo, hi := civilDays(r.First), civilDays(r.Last)
	y0, y1 := civilDays(day(year, time.January, 1)), civilDays(day(year, time.December, 31))
	lo, hi = max(lo, y0), min(hi, y1)
	if hi < lo {
		return nil
	}
	out := make([]time.Time, 0, hi-lo+1)
	for d := lo; d <= hi; d++ {
		out = append(out, fromCivil(d))
	}
	return out
}

// fromCivil is the inverse of civilDays, at 00:00 UTC.
func fromCivil(d int64) time.Time { return time.Unix(d*86400, 0).UTC() }
