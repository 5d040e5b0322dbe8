package calendar

import (
	"fmt"
	"math"
	"time"
)

// Unit is the base unit of a Frequency. The zero Unit is unset.
// Programs should not rely on the numeric values of the constants.
type Unit int

// Units of a Frequency.
const (
	UnitUnset Unit = iota
	Minute
	Hour
	Day
	Week
	Month
	Quarter
	Year
)

var unitNames = [...]string{"unset", "minute", "hour", "day", "week", "month", "quarter", "year"}

// String returns the lower-case English name of the unit, or "Unit(n)"
// for a value outside the defined set.
func (u Unit) String() string {
	if u >= 0 && int(u) < len(unitNames) {
		return unitNames[u]
	}
	return fmt.Sprintf("Unit(%d)", int(u))
}

// Frequency is the spacing of a regular series: N consecutive Units.
// N = 0 is read as 1, so Frequency{Unit: Month} is monthly.
// Frequency is comparable; use Equal to treat N = 0 and N = 1 alike.
type Frequency struct {
	Unit Unit
	N    int
}

// The common frequencies.
var (
	Hourly    = Frequency{Unit: Hour, N: 1}
	Daily     = Frequency{Unit: Day, N: 1}
	Weekly    = Frequency{Unit: Week, N: 1}
	Monthly   = Frequency{Unit: Month, N: 1}
	Quarterly = Frequency{Unit: Quarter, N: 1}
	Yearly    = Frequency{Unit: Year, N: 1}
)

// Every returns the frequency of n units, e.g. Every(15, Minute).
func Every(n int, u Unit) Frequency { return Frequency{Unit: u, N: n} }

func (f Frequency) mult() int {
	if f.N == 0 {
		return 1
	}
	return f.N
}

// Equal reports whether f and g describe the same spacing.
func (f Frequency) Equal(g Frequency) bool { return f.Unit == g.Unit && f.mult() == g.mult() }

// Validate returns an error wrapping ErrFrequency when the unit is unset or
// unknown, the multiple is negative, or one period is too long to
// represent: longer than a time.Duration (about 292 years) for minutes,
// hours, days and weeks, or a multiple above math.MaxInt/12 for months,
// quarters and years.
func (f Frequency) Validate() error {
	if f.Unit <= UnitUnset || f.Unit > Year {
		return fmt.Errorf("calendar: %w: unit %v", ErrFrequency, f.Unit)
	}
	if f.N < 0 {
		return fmt.Errorf("calendar: %w: negative multiple %d", ErrFrequency, f.N)
	}
	if f.N > maxMultiple[f.Unit] {
		return fmt.Errorf("calendar: %w: multiple %d of %v is too long a period (at most %d)", ErrFrequency, f.N, f.Unit, maxMultiple[f.Unit])
	}
	return nil
}

// maxMultiple is the largest N per unit whose period fits: in a
// time.Duration for the fixed-length units (a larger one would wrap, and
// a wrapped step of zero would divide by zero in Between), and in an int
// count of months for the calendar units.
var maxMultiple = [...]int{
	Minute:  int(math.MaxInt64 / int64(time.Minute)),
	Hour:    int(math.MaxInt64 / int64(time.Hour)),
	Day:     int(math.MaxInt64 / int64(24*time.Hour)),
	Week:    int(math.MaxInt64 / int64(7*24*time.Hour)),
	Month:   math.MaxInt / 12,
	Quarter: math.MaxInt / 12,
	Year:    math.MaxInt / 12,
}

// String returns "monthly", "weekly", ... for a multiple of one, and
// "every 15 minutes" style text otherwise.
func (f Frequency) String() string {
	if f.Validate() != nil {
		return fmt.Sprintf("Frequency{%v, %d}", f.Unit, f.N)
	}
	if f.mult() == 1 {
		switch f.Unit {
		case Day:
			return "daily"
		default:
			return f.Unit.String() + "ly"
		}
	}
	return fmt.Sprintf("every %d %vs", f.mult(), f.Unit)
}

// duration returns the fixed length of a sub-weekly frequency, or 0 for
// calendar units (month, quarter, year).
func (f Frequency) duration() time.Duration {
	switch f.Unit {
	case Minute:
		return time.Duration(f.mult()) * time.Minute
	case Hour:
		return time.Duration(f.mult()) * time.Hour
	case Day:
		return time.Duration(f.mult()) * 24 * time.Hour
	case Week:
		return time.Duration(f.mult()) * 7 * 24 * time.Hour
	}
	return 0
}

// months returns the number of months in one period of a calendar
// frequency, or 0 for a fixed-length one.
func (f Frequency) months() int {
	switch f.Unit {
	case Month:
		return f.mult()
	case Quarter:
		return 3 * f.mult()
	case Year:
		return 12 * f.mult()
	}
	return 0
}

// Add returns t stepped by n periods (n may be negative). Days and weeks
// step by calendar days (time.AddDate) so that daylight-saving changes do
// not shift the clock time; months, quarters and years step by calendar
// months from t, clamped to the last day of the month when t's day does
// not exist there (January 31 + 1 month = February 28 or 29).
// An invalid frequency returns t unchanged.
func (f Frequency) Add(t time.Time, n int) time.Time {
	if f.Validate() != nil {
		return t
	}
	switch f.Unit {
	case Minute, Hour:
		return t.Add(time.Duration(n) * f.duration())
	case Day:
		return t.AddDate(0, 0, n*f.mult())
	case Week:
		return t.AddDate(0, 0, 7*n*f.mult())
	}
	return addMonthsClamped(t, n*f.months())
}

// addMonthsClamped adds m calendar months to t, keeping the day of month
// where it exists and clamping to the month's last day otherwise.
func addMonthsClamped(t time.Time, m int) time.Time {
	y, mo, d := t.Date()
	hh, mm, ss := t.Clock()
	total := int(mo) - 1 + m
	ny := y + floorDiv(total, 12)
	nm := time.Month(floorMod(total, 12) + 1)
	if last := daysIn(ny, nm); d > last {
		d = last
	}
	return time.Date(ny, nm, d, hh, mm, ss, t.Nanosecond(), t.Location())
}

func daysIn(y int, m time.Month) int {
	return time.Date(y, m+1, 0, 0, 0, 0, 0, time.UTC).Day()
}

func floorDiv(a, b int) int {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

func floorMod(a, b int) int { return a - b*floorDiv(a, b) }

// Between returns the number of whole periods from a to b (negative when b
// is before a). It returns an error wrapping ErrNotAligned when b is not
// exactly a whole number of periods from a (as stepped by Add), and one
// wrapping ErrFrequency for an invalid frequency.
func (f Frequency) Between(a, b time.Time) (int, error) {
	if err := f.Validate(); err != nil {
		return 0, err
	}
	var n int
	switch f.Unit {
	case Minute, Hour:
		d := b.Sub(a)
		step := f.duration()
		if d%step != 0 {
			return 0, fmt.Errorf("calendar: %w: %v is not a whole number of %v periods from %v", ErrNotAligned, b, f, a)
		}
		// Sub saturates beyond about 292 years; the check below
		// catches that.
		n = int(d / step)
	case Day, Week:
		days := civilDays(b) - civilDays(a)
		per := f.mult()
		if f.Unit == Week {
			per *= 7
		}
		n = int(math.Floor(float64(days) / float64(per)))
	default:
		ya, ma, _ := a.Date()
		yb, mb, _ := b.Date()
		months := (yb-ya)*12 + int(mb) - int(ma)
		n = floorDiv(months, f.months())
	}
	if !f.Add(a, n).Equal(b) {
		return 0, fmt.Errorf("calendar: %w: %v is not a whole number of %v periods from %v", ErrNotAligned, b, f, a)
	}
	return n, nil
}

// civilDays returns the day number of t's calendar date (in t's location).
func civilDays(t time.Time) int64 {
	y, m, d := t.Date()
	return time.Date(y, m, d, 0, 0, 0, 0, time.UTC).Unix() / 86400
}

// SeasonalPeriods returns the natural seasonal cycles of the frequency,
// in observations, shortest first: monthly {12}, quarterly {4}, weekly
// {365.25/7}, daily {7, 365.25}, hourly {24, 168}, minutes {per day, per
// week}, each divided by the multiple N; yearly data and an invalid
// frequency have none. Periods of less than two observations are left
// out.
func (f Frequency) SeasonalPeriods() []float64 {
	if f.Validate() != nil {
		return nil
	}
	k := float64(f.mult())
	var base []float64
	switch f.Unit {
	case Minute:
		base = []float64{24 * 60, 7 * 24 * 60}
	case Hour:
		base = []float64{24, 168}
	case Day:
		base = []float64{7, 365.25}
	case Week:
		base = []float64{365.25 / 7}
	case Month:
		base = []float64{12}
	case Quarter:
		base = []float64{4}
	}
	var out []float64
	for _, p := range base {
		if q := p / k; q >= 2 {
			out = append(out, q)
		}
	}
	return out
}

// Period returns the primary seasonal period rounded to whole
// observations (monthly 12, quarterly 4, weekly 52, daily 7, hourly 24),
// or 1 when the frequency has no seasonal cycle (yearly) or is invalid.
func (f Frequency) Period() int {
	ps := f.SeasonalPeriods()
	if len(ps) == 0 {
		return 1
	}
	return int(math.Round(ps[0]))
}
