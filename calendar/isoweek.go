package calendar

import (
	"fmt"
	"time"
)

// ISOWeek returns the ISO 8601 week-numbering year and week (1..53) of
// t's calendar date in t's location. The week-numbering year differs from
// the calendar year for a few days around January 1 (2021-01-01 is in
// week 53 of 2020).
func ISOWeek(t time.Time) (year, week int) { return t.ISOWeek() }

// HasWeek53 reports whether ISO week-numbering year y has 53 weeks. ISO
// 8601's rule: a year has 53 weeks exactly when it starts on a Thursday,
// or is a leap year that starts on a Wednesday (equivalently, when
// December 31 falls on a Thursday, or on a Friday in a leap year).
func HasWeek53(y int) bool {
	jan1 := time.Date(y, time.January, 1, 0, 0, 0, 0, time.UTC).Weekday()
	return jan1 == time.Thursday || (jan1 == time.Wednesday && isLeap(y))
}

// WeeksInISOYear returns 52 or 53, the number of weeks of ISO
// week-numbering year y.
func WeeksInISOYear(y int) int {
	if HasWeek53(y) {
		return 53
	}
	return 52
}

func isLeap(y int) bool { return y%4 == 0 && (y%100 != 0 || y%400 == 0) }

// ISOWeekStart returns the Monday (00:00 in loc) that starts week w of ISO
// week-numbering year y. Week 1 is the week containing January 4. loc nil
// means UTC.
//
// Special cases: w outside 1..WeeksInISOYear(y) gives an error wrapping
// ErrWeek.
func ISOWeekStart(y, w int, loc *time.Location) (time.Time, error) {
	if w < 1 || w > WeeksInISOYear(y) {
		return time.Time{}, fmt.Errorf("calendar: %w: week %d of %d (that year has %d weeks)", ErrWeek, w, y, WeeksInISOYear(y))
	}
	if loc == nil {
		loc = time.UTC
	}
	jan4 := time.Date(y, time.January, 4, 0, 0, 0, 0, loc)
	back := (int(jan4.Weekday()) + 6) % 7 // days since Monday
	return jan4.AddDate(0, 0, -back+7*(w-1)), nil
}
