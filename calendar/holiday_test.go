package calendar_test

import (
	"errors"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// TestEasterPublished checks Easter Sunday against the dates listed in
// /work/shared/reference/published.md, "Calendar facts" (Meeus,
// Astronomical Algorithms): 2008-03-23, 2011-04-24, 2019-04-21,
// 2024-03-31, 2025-04-20, 2026-04-05, and the extremes 22 March (1818,
// 2285) and 25 April (1943, 2038).
func TestEasterPublished(t *testing.T) {
	tests := []struct {
		name string
		year int
		want time.Time
	}{
		{"2008", 2008, date(2008, time.March, 23)},
		{"2011", 2011, date(2011, time.April, 24)},
		{"2019", 2019, date(2019, time.April, 21)},
		{"2024", 2024, date(2024, time.March, 31)},
		{"2025", 2025, date(2025, time.April, 20)},
		{"2026", 2026, date(2026, time.April, 5)},
		{"earliest 1818", 1818, date(1818, time.March, 22)},
		{"earliest 2285", 2285, date(2285, time.March, 22)},
		{"latest 1943", 1943, date(1943, time.April, 25)},
		{"latest 2038", 2038, date(2038, time.April, 25)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := calendar.Easter(tt.year)
			if err != nil {
				t.Fatal(err)
			}
			if !got.Equal(tt.want) {
				t.Errorf("Easter(%d) = %s, want %s", tt.year, got.Format(time.DateOnly), tt.want.Format(time.DateOnly))
			}
		})
	}
}

// gaussEaster is Gauss's Easter formula with Lichtenberg's corrections
// (H. Lichtenberg 1997, "Zur Interpretation der Gaußschen Osterformel und
// ihrer Ausnahmeregeln", Historia Mathematica 24; recalled from memory),
// written independently of Meeus's algorithm. It returns the day of
// March (32 = April 1).
func gaussEaster(y int) int {
	k := y / 100
	m := 15 + (3*k+3)/4 - (8*k+13)/25
	s := 2 - (3*k+3)/4
	a := y % 19
	d := (19*a + m) % 30
	r := (d + a/11) / 29
	og := 21 + d - r
	sz := 7 - (y+y/4+s)%7
	oe := 7 - (og-sz)%7
	return og + oe
}

// TestEasterAgainstGauss compares the two algorithms over 1583–4099 (the
// range published.md names) with time.Time values, checking also that
// every date is a Sunday within 22 March..25 April, and over a whole
// 5,700,000-year cycle of the Gregorian computus (published.md) in
// integers. Both extremes must actually occur in 1583–4099.
func TestEasterAgainstGauss(t *testing.T) {
	sawEarliest, sawLatest := false, false
	for y := 1583; y <= 4099; y++ {
		got, err := calendar.Easter(y)
		if err != nil {
			t.Fatal(err)
		}
		want := date(y, time.March, 1).AddDate(0, 0, gaussEaster(y)-1)
		if !got.Equal(want) {
			t.Fatalf("Easter(%d) = %s, Gauss/Lichtenberg %s", y, got.Format(time.DateOnly), want.Format(time.DateOnly))
		}
		if got.Weekday() != time.Sunday {
			t.Fatalf("Easter(%d) = %s is a %v", y, got.Format(time.DateOnly), got.Weekday())
		}
		if got.Before(date(y, time.March, 22)) || got.After(date(y, time.April, 25)) {
			t.Fatalf("Easter(%d) = %s outside 22 March..25 April", y, got.Format(time.DateOnly))
		}
		sawEarliest = sawEarliest || got.Equal(date(y, time.March, 22))
		sawLatest = sawLatest || got.Equal(date(y, time.April, 25))
	}
	if !sawEarliest || !sawLatest {
		t.Errorf("extremes seen: 22 March %v, 25 April %v", sawEarliest, sawLatest)
	}
	if testing.Short() {
		return
	}
	for y := 1583; y < 1583+5_700_000; y++ {
		m, d := calendar.EasterMonthDay(y)
		if got, want := (m-3)*31+d, gaussEaster(y); got != want {
			t.Fatalf("year %d: Meeus %d-%02d, Gauss/Lichtenberg day-of-March %d", y, m, d, want)
		}
	}
}

func TestEasterBeforeGregorian(t *testing.T) {
	if _, err := calendar.Easter(1582); !errors.Is(err, calendar.ErrYear) {
		t.Errorf("Easter(1582) err = %v, want ErrYear", err)
	}
	if got := (calendar.EasterOffset{Days: -2}).Dates(1500); got != nil {
		t.Errorf("EasterOffset before 1583 = %v, want nil", got)
	}
}

func TestEasterOffset(t *testing.T) {
	// Easter 2025 is 20 April (published.md): −2 is Friday 18 April, +1
	// Monday 21 April, +49 Sunday 8 June (20 April + 10 days = 30 April,
	// + 39 = 8 June).
	tests := []struct {
		name string
		days int
		want time.Time
	}{
		{"Friday before", -2, date(2025, time.April, 18)},
		{"Monday after", 1, date(2025, time.April, 21)},
		{"seventh Sunday after", 49, date(2025, time.June, 8)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := calendar.EasterOffset{Days: tt.days}.Dates(2025)
			if len(got) != 1 || !got[0].Equal(tt.want) {
				t.Errorf("got %v, want %s", got, tt.want.Format(time.DateOnly))
			}
		})
	}
}

// TestNthWeekday uses hand-worked dates. Anchors (weekday of the 1st,
// asserted from the standard library below): 2024-11-01 Friday,
// 2025-05-01 Thursday, 2025-09-01 Monday, 2024-02-01 Thursday,
// 2026-03-01 Sunday, 2026-01-01 Thursday.
func TestNthWeekday(t *testing.T) {
	anchors := map[time.Time]time.Weekday{
		date(2024, time.November, 1):  time.Friday,
		date(2025, time.May, 1):       time.Thursday,
		date(2025, time.September, 1): time.Monday,
		date(2024, time.February, 1):  time.Thursday,
		date(2026, time.March, 1):     time.Sunday,
		date(2026, time.January, 1):   time.Thursday,
	}
	for d, wd := range anchors {
		if d.Weekday() != wd {
			t.Fatalf("anchor %s is a %v, not %v", d.Format(time.DateOnly), d.Weekday(), wd)
		}
	}
	tests := []struct {
		name   string
		rule   calendar.NthWeekday
		year   int
		want   time.Time // zero: no such day
		reason string
	}{
		{"4th Thursday Nov 2024", calendar.NthWeekday{Month: time.November, Weekday: time.Thursday, N: 4}, 2024,
			date(2024, time.November, 28), "Nov 1 Fri: Thursdays 7, 14, 21, 28"},
		{"last Monday May 2025", calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: calendar.Last}, 2025,
			date(2025, time.May, 26), "May 1 Thu: Mondays 5, 12, 19, 26; May 31 is a Saturday"},
		{"1st Monday Sep 2025", calendar.NthWeekday{Month: time.September, Weekday: time.Monday, N: 1}, 2025,
			date(2025, time.September, 1), "Sep 1 is itself a Monday"},
		{"5th Friday Feb 2024 missing", calendar.NthWeekday{Month: time.February, Weekday: time.Friday, N: 5}, 2024,
			time.Time{}, "Feb 1 Thu: Fridays 2, 9, 16, 23 only"},
		{"5th Thursday Feb 2024", calendar.NthWeekday{Month: time.February, Weekday: time.Thursday, N: 5}, 2024,
			date(2024, time.February, 29), "Thursdays 1, 8, 15, 22, 29 (leap year)"},
		{"last Thursday Feb 2024", calendar.NthWeekday{Month: time.February, Weekday: time.Thursday, N: -1}, 2024,
			date(2024, time.February, 29), "as above, counted from the end"},
		{"2nd-last Sunday Mar 2026", calendar.NthWeekday{Month: time.March, Weekday: time.Sunday, N: -2}, 2026,
			date(2026, time.March, 22), "Mar 1 Sun: Sundays 1, 8, 15, 22, 29"},
		{"5th-last Sunday Mar 2026", calendar.NthWeekday{Month: time.March, Weekday: time.Sunday, N: -5}, 2026,
			date(2026, time.March, 1), "the first of five"},
		{"3rd Monday Jan 2026", calendar.NthWeekday{Month: time.January, Weekday: time.Monday, N: 3}, 2026,
			date(2026, time.January, 19), "Jan 1 Thu: Mondays 5, 12, 19"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := tt.rule.Dates(tt.year)
			if tt.want.IsZero() {
				if got != nil {
					t.Errorf("got %v, want none (%s)", got, tt.reason)
				}
				return
			}
			if len(got) != 1 || !got[0].Equal(tt.want) {
				t.Errorf("got %v, want %s (%s)", got, tt.want.Format(time.DateOnly), tt.reason)
			}
		})
	}
}

// TestObservance: weekend shifting of fixed dates, Saturday → Friday and
// Sunday → Monday for NearestWeekday, both → Monday for FollowingMonday
// (common practice). Weekdays from the standard library: 2022-01-01
// Saturday, 2023-01-01 Sunday, 2021-12-25 Saturday, 2023-12-25 Monday.
func TestObservance(t *testing.T) {
	tests := []struct {
		name  string
		month time.Month
		day   int
		year  int
		obs   calendar.Observance
		want  time.Time
	}{
		{"Sat on the day", time.January, 1, 2022, calendar.OnTheDay, date(2022, time.January, 1)},
		{"Sat nearest into previous year", time.January, 1, 2022, calendar.NearestWeekday, date(2021, time.December, 31)},
		{"Sat following Monday", time.January, 1, 2022, calendar.FollowingMonday, date(2022, time.January, 3)},
		{"Sun nearest", time.January, 1, 2023, calendar.NearestWeekday, date(2023, time.January, 2)},
		{"Sun following Monday", time.January, 1, 2023, calendar.FollowingMonday, date(2023, time.January, 2)},
		{"Sat nearest Dec 25", time.December, 25, 2021, calendar.NearestWeekday, date(2021, time.December, 24)},
		{"Sat following Dec 25", time.December, 25, 2021, calendar.FollowingMonday, date(2021, time.December, 27)},
		{"Mon unchanged", time.December, 25, 2023, calendar.NearestWeekday, date(2023, time.December, 25)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := calendar.FixedDate{Month: tt.month, Day: tt.day, Observed: tt.obs}.Dates(tt.year)
			if len(got) != 1 || !got[0].Equal(tt.want) {
				t.Errorf("got %v, want %s", got, tt.want.Format(time.DateOnly))
			}
		})
	}
	if got := (calendar.FixedDate{Month: time.February, Day: 29}).Dates(2025); got != nil {
		t.Errorf("Feb 29 in 2025 = %v, want none", got)
	}
	for o, want := range map[calendar.Observance]string{calendar.OnTheDay: "on the day", calendar.NearestWeekday: "nearest weekday", 7: "Observance(7)"} {
		if o.String() != want {
			t.Errorf("%d.String() = %q, want %q", int(o), o.String(), want)
		}
	}
}

func TestSpanDates(t *testing.T) {
	s := calendar.Span{First: date(2025, time.December, 30), Last: date(2026, time.January, 2)}
	if got := s.Dates(2025); len(got) != 2 || !got[0].Equal(date(2025, time.December, 30)) || !got[1].Equal(date(2025, time.December, 31)) {
		t.Errorf("2025 part = %v", got)
	}
	if got := s.Dates(2026); len(got) != 2 || !got[1].Equal(date(2026, time.January, 2)) {
		t.Errorf("2026 part = %v", got)
	}
	if got := s.Dates(2024); got != nil {
		t.Errorf("2024 part = %v, want none", got)
	}
}

func TestRuleErrors(t *testing.T) {
	tests := []struct {
		name string
		rule calendar.Rule
		want error
	}{
		{"month 0", calendar.FixedDate{Month: 0, Day: 1}, calendar.ErrRule},
		{"month 13", calendar.FixedDate{Month: 13, Day: 1}, calendar.ErrRule},
		{"day 0", calendar.FixedDate{Month: time.March, Day: 0}, calendar.ErrRule},
		{"April 31", calendar.FixedDate{Month: time.April, Day: 31}, calendar.ErrRule},
		{"February 30", calendar.FixedDate{Month: time.February, Day: 30}, calendar.ErrRule},
		{"unknown observance", calendar.FixedDate{Month: time.March, Day: 1, Observed: 9}, calendar.ErrRule},
		{"nth 0", calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: 0}, calendar.ErrRule},
		{"nth 6", calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: 6}, calendar.ErrRule},
		{"nth -6", calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: -6}, calendar.ErrRule},
		{"weekday 7", calendar.NthWeekday{Month: time.May, Weekday: 7, N: 1}, calendar.ErrRule},
		{"nth month 0", calendar.NthWeekday{Month: 0, Weekday: time.Monday, N: 1}, calendar.ErrRule},
		{"Easter offset 400", calendar.EasterOffset{Days: 400}, calendar.ErrRule},
		{"empty span", calendar.Span{First: date(2025, time.May, 2), Last: date(2025, time.May, 1)}, calendar.ErrSpan},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if err := tt.rule.Validate(); !errors.Is(err, tt.want) {
				t.Errorf("Validate() = %v, want %v", err, tt.want)
			}
			if got := tt.rule.Dates(2025); got != nil {
				t.Errorf("Dates of an invalid rule = %v, want nil", got)
			}
			cal := calendar.Calendar{Holidays: []calendar.Holiday{{Name: "x", Rule: tt.rule}}}
			if _, err := cal.Occurrences(date(2025, 1, 1), date(2025, 12, 31)); !errors.Is(err, tt.want) {
				t.Errorf("Occurrences err = %v, want %v", err, tt.want)
			}
		})
	}
}

func TestCalendarErrors(t *testing.T) {
	ok := calendar.FixedDate{Month: time.May, Day: 1}
	tests := []struct {
		name string
		cal  calendar.Calendar
	}{
		{"no name", calendar.Calendar{Holidays: []calendar.Holiday{{Rule: ok}}}},
		{"no rule", calendar.Calendar{Holidays: []calendar.Holiday{{Name: "a"}}}},
		// A typed nil pointer used to panic in Validate (nil dereference).
		{"nil fixed-date pointer", calendar.Calendar{Holidays: []calendar.Holiday{{Name: "a", Rule: (*calendar.FixedDate)(nil)}}}},
		{"nil Easter pointer", calendar.Calendar{Holidays: []calendar.Holiday{{Name: "a", Rule: (*calendar.EasterOffset)(nil)}}}},
		{"weekend day 8", calendar.Calendar{Weekend: []time.Weekday{8}}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if err := tt.cal.Validate(); !errors.Is(err, calendar.ErrRule) {
				t.Errorf("Validate() = %v, want ErrRule", err)
			}
		})
	}
	if _, err := (calendar.Calendar{}).Occurrences(date(2025, 2, 1), date(2025, 1, 1)); !errors.Is(err, calendar.ErrSpan) {
		t.Errorf("reversed range: %v, want ErrSpan", err)
	}
}

// TestOccurrences lists an invented calendar over a year end: New Year
// 2022 (a Saturday, stdlib) observed on Friday 2021-12-31 belongs to the
// 2022 rule but falls in the range; New Year 2021 (a Friday) does not.
func TestOccurrences(t *testing.T) {
	cal := calendar.Calendar{Holidays: []calendar.Holiday{
		{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.NearestWeekday}},
		{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 31}},
		{Name: "Frost Fair", Rule: calendar.Span{First: date(2022, time.January, 10), Last: date(2022, time.January, 11)}},
	}}
	got, err := cal.Occurrences(date(2021, time.December, 1), date(2022, time.January, 31))
	if err != nil {
		t.Fatal(err)
	}
	want := []calendar.Occurrence{
		{date(2021, time.December, 31), "Year Start"},
		{date(2021, time.December, 31), "Midwinter"},
		{date(2022, time.January, 10), "Frost Fair"},
		{date(2022, time.January, 11), "Frost Fair"},
	}
	if len(got) != len(want) {
		t.Fatalf("got %v, want %v", got, want)
	}
	for i := range want {
		if !got[i].Date.Equal(want[i].Date) || got[i].Name != want[i].Name {
			t.Errorf("occurrence %d = %v, want %v", i, got[i], want[i])
		}
	}
	if !cal.IsHoliday(time.Date(2022, time.January, 10, 15, 0, 0, 0, time.UTC)) || cal.IsHoliday(date(2022, time.January, 1)) {
		t.Error("IsHoliday: want Jan 10 (span) yes, Jan 1 2022 (moved to Dec 31) no")
	}
}
