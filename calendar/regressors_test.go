package calendar_test

import (
	"errors"
	"math"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

func fixed(name string, m time.Month, d int) calendar.Holiday {
	return calendar.Holiday{Name: name, Rule: calendar.FixedDate{Month: m, Day: d}}
}

func equalSlice(t *testing.T, what string, got, want []float64) {
	t.Helper()
	if !slices.Equal(got, want) {
		t.Errorf("%s = %v, want %v", what, got, want)
	}
}

// TestTradingDaysMonthly: hand-counted weekdays. January 2024 starts on a
// Monday and has 31 days: 5 Mondays, Tuesdays, Wednesdays, 4 of the
// rest, 23 Monday–Friday days. February 2024 starts on a Thursday and has
// 29 days: four full weeks plus a fifth Thursday (the 29th), 21
// Monday–Friday days (recalled fact, verified by this count). March 2024
// starts on a Friday: 5 Fridays, Saturdays, Sundays, 4 of the rest, 21
// Monday–Friday days. (Weekdays of the 1sts asserted from the standard
// library.)
func TestTradingDaysMonthly(t *testing.T) {
	for d, wd := range map[time.Time]time.Weekday{
		date(2024, time.January, 1): time.Monday, date(2024, time.February, 1): time.Thursday, date(2024, time.March, 1): time.Friday,
	} {
		if d.Weekday() != wd {
			t.Fatalf("anchor %v is a %v", d, d.Weekday())
		}
	}
	g := calendar.Grid{Start: date(2024, time.January, 1), Freq: calendar.Monthly, N: 2, H: 1}
	cols, err := g.Weekdays()
	if err != nil {
		t.Fatal(err)
	}
	want := map[string][]float64{
		"Monday": {5, 4, 4}, "Tuesday": {5, 4, 4}, "Wednesday": {5, 4, 4}, "Thursday": {4, 5, 4},
		"Friday": {4, 4, 5}, "Saturday": {4, 4, 5}, "Sunday": {4, 4, 5},
	}
	names := []string{"Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"}
	for k, c := range cols {
		if c.Name != names[k] {
			t.Errorf("column %d is %q, want %q", k, c.Name, names[k])
		}
		equalSlice(t, c.Name, c.Values, want[c.Name])
	}
	work, err := g.WorkingDays(calendar.Calendar{})
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "working days", work, []float64{23, 21, 21})

	// A holiday on Thursday 29 February removes a working day; one on
	// Saturday 2 March is a holiday day but not a lost working day.
	cal := calendar.Calendar{Holidays: []calendar.Holiday{fixed("Leap Day", time.February, 29), fixed("Spring Fair", time.March, 2)}}
	work, err = g.WorkingDays(cal)
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "working days with holidays", work, []float64{23, 20, 21})
	hol, err := g.Holidays(cal)
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "holiday days", hol, []float64{0, 1, 1})

	// A Friday–Saturday weekend: January 2024 has 4 Fridays and 4
	// Saturdays, so 31 − 8 = 23 working days; February 4 + 4 → 21;
	// March 5 + 5 → 21.
	fs := calendar.Calendar{Weekend: []time.Weekday{time.Friday, time.Saturday}}
	work, err = g.WorkingDays(fs)
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "Fri–Sat weekend", work, []float64{23, 21, 21})
}

// TestWeekdaysBruteForce compares the weekday counts of monthly,
// quarterly and weekly grids over 2000–2030 with a day-by-day count using
// the standard library's time.Weekday.
func TestWeekdaysBruteForce(t *testing.T) {
	tests := []struct {
		name string
		g    calendar.Grid
	}{
		{"monthly", calendar.Grid{Start: date(2000, time.January, 1), Freq: calendar.Monthly, N: 12 * 31}},
		{"quarterly", calendar.Grid{Start: date(2000, time.January, 1), Freq: calendar.Quarterly, N: 4 * 31}},
		{"weekly Wednesday", calendar.Grid{Start: date(2000, time.January, 5), Freq: calendar.Weekly, N: 52 * 31}},
		{"month ends", calendar.Grid{Start: date(2000, time.January, 31), Freq: calendar.Monthly, N: 12 * 31, Stamp: calendar.StampEnd}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			cols, err := tt.g.Weekdays()
			if err != nil {
				t.Fatal(err)
			}
			for i := range tt.g.Len() {
				var first, end time.Time
				if tt.g.Stamp == calendar.StampEnd {
					first, end = tt.g.Time(i-1).AddDate(0, 0, 1), tt.g.Time(i).AddDate(0, 0, 1)
				} else {
					first, end = tt.g.Time(i), tt.g.Time(i+1)
				}
				var n [7]float64
				for d := first; d.Before(end); d = d.AddDate(0, 0, 1) {
					n[d.Weekday()]++
				}
				for k := range 7 {
					if got := cols[k].Values[i]; got != n[(k+1)%7] {
						t.Fatalf("period %d (%s): %s = %v, counted %v", i, first.Format(time.DateOnly), cols[k].Name, got, n[(k+1)%7])
					}
				}
			}
		})
	}
}

// TestHolidaysISOWeekYearEnd: weeks crossing a year end. 2026-12-28 is a
// Monday and starts ISO week 2026-W53 (2026 has 53 weeks, published.md),
// which runs to Sunday 2027-01-03. Holidays: 25 and 26 December (a Friday
// and a Saturday in 2026), 31 December (Thursday, as a one-day span) and
// 1 January (Friday, 2027).
func TestHolidaysISOWeekYearEnd(t *testing.T) {
	if y, w := calendar.ISOWeek(date(2026, time.December, 28)); y != 2026 || w != 53 {
		t.Fatalf("2026-12-28 in %d-W%d", y, w)
	}
	if y, w := calendar.ISOWeek(date(2027, time.January, 3)); y != 2026 || w != 53 {
		t.Fatalf("2027-01-03 in %d-W%d", y, w)
	}
	if date(2026, time.December, 25).Weekday() != time.Friday {
		t.Fatal("anchor: 2026-12-25 is not a Friday")
	}
	cal := calendar.Calendar{Holidays: []calendar.Holiday{
		fixed("Hearth Day", time.December, 25), fixed("Hearth Day", time.December, 26),
		{Name: "Ledger Close", Rule: calendar.Span{First: date(2026, time.December, 31), Last: date(2026, time.December, 31)}},
		fixed("Year Start", time.January, 1),
	}}
	for _, tt := range []struct {
		name string
		g    calendar.Grid
	}{
		{"Monday stamps", calendar.Grid{Start: date(2026, time.December, 21), Freq: calendar.Weekly, N: 2, H: 1}},
		{"Sunday end stamps", calendar.Grid{Start: date(2026, time.December, 27), Freq: calendar.Weekly, N: 2, H: 1, Stamp: calendar.StampEnd}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			hol, err := tt.g.Holidays(cal)
			if err != nil {
				t.Fatal(err)
			}
			// W52: 25, 26 Dec; W53: 31 Dec, 1 Jan; 2027-W01: none.
			equalSlice(t, "holiday days", hol, []float64{2, 2, 0})
			work, err := tt.g.WorkingDays(cal)
			if err != nil {
				t.Fatal(err)
			}
			// W52: Mon–Fri minus Friday 25th; the 26th is a Saturday.
			// W53: Mon–Fri minus Thursday 31st and Friday 1st.
			equalSlice(t, "working days", work, []float64{4, 3, 5})
			cols, err := tt.g.HolidayColumns(cal)
			if err != nil {
				t.Fatal(err)
			}
			if len(cols) != 3 || cols[0].Name != "Hearth Day" || cols[1].Name != "Ledger Close" || cols[2].Name != "Year Start" {
				t.Fatalf("columns %v", cols)
			}
			equalSlice(t, "Hearth Day", cols[0].Values, []float64{2, 0, 0})
			equalSlice(t, "Ledger Close", cols[1].Values, []float64{0, 1, 0})
			equalSlice(t, "Year Start", cols[2].Values, []float64{0, 1, 0})
		})
	}
}

// TestHolidaysDaily: for daily data the column is the 0/1 indicator of
// Calendar.IsHoliday (a consistency check between two paths of this
// package over ten years, not an outside reference), with an Easter
// holiday included.
func TestHolidaysDaily(t *testing.T) {
	cal := calendar.Calendar{Holidays: []calendar.Holiday{
		{Name: "Spring Rest", Rule: calendar.EasterOffset{Days: 1}},
		{Name: "Founders", Rule: calendar.NthWeekday{Month: time.October, Weekday: time.Monday, N: 2}},
		{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.FollowingMonday}},
	}}
	g := calendar.Grid{Start: date(2016, time.January, 1), Freq: calendar.Daily, N: 3653}
	hol, err := g.Holidays(cal)
	if err != nil {
		t.Fatal(err)
	}
	total := 0.0
	for i, v := range hol {
		want := 0.0
		if cal.IsHoliday(g.Time(i)) {
			want = 1
		}
		if v != want {
			t.Fatalf("%s: %v, want %v", g.Time(i).Format(time.DateOnly), v, want)
		}
		total += v
	}
	// Three holidays a year, never on the same date, 2016–2025.
	if total != 30 {
		t.Errorf("%v holiday days in ten years, want 30", total)
	}
	// Easter 2024 is 31 March (published.md): Monday 1 April 2024.
	i, err := g.Index(date(2024, time.April, 1))
	if err != nil {
		t.Fatal(err)
	}
	if hol[i] != 1 {
		t.Error("2024-04-01 not marked")
	}
}

func TestHolidaysHourly(t *testing.T) {
	g := calendar.Grid{Start: time.Date(2025, time.December, 24, 22, 0, 0, 0, time.UTC), Freq: calendar.Hourly, N: 4}
	hol, err := g.Holidays(calendar.Calendar{Holidays: []calendar.Holiday{fixed("Hearth Day", time.December, 25)}})
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "hourly", hol, []float64{0, 0, 1, 1})
}

// TestMonthEndAlignment: a month-end series from 31 January 2024 steps
// to 29 February, 31 March, 30 April (Frequency.Add clamps); with
// StampEnd each period is its calendar month.
func TestMonthEndAlignment(t *testing.T) {
	g := calendar.Grid{Start: date(2024, time.January, 31), Freq: calendar.Monthly, N: 3, H: 1, Stamp: calendar.StampEnd}
	for i, want := range []time.Time{date(2024, time.January, 31), date(2024, time.February, 29), date(2024, time.March, 31), date(2024, time.April, 30)} {
		if !g.Time(i).Equal(want) {
			t.Errorf("Time(%d) = %v, want %v", i, g.Time(i), want)
		}
		if k, err := g.Index(want); err != nil || k != i {
			t.Errorf("Index(%v) = %d, %v", want, k, err)
		}
		if k, err := g.Locate(want.AddDate(0, 0, -want.Day()+1)); err != nil || k != i {
			t.Errorf("Locate(first of month %d) = %d, %v", i, k, err)
		}
	}
	if _, err := g.Index(date(2024, time.February, 15)); !errors.Is(err, calendar.ErrNotAligned) {
		t.Errorf("Index(mid-month) err = %v, want ErrNotAligned", err)
	}
	if _, err := g.Index(date(2024, time.May, 31)); !errors.Is(err, calendar.ErrOutside) {
		t.Errorf("Index(after) err = %v, want ErrOutside", err)
	}
	work, err := g.WorkingDays(calendar.Calendar{})
	if err != nil {
		t.Fatal(err)
	}
	// Jan 23, Feb 21, Mar 21 (TestTradingDaysMonthly); April 2024 starts on
	// a Monday and has 30 days: 5 Mondays and Tuesdays, 22 working days.
	equalSlice(t, "working days", work, []float64{23, 21, 21, 22})
}

func TestEvents(t *testing.T) {
	d := func(day int) time.Time { return date(2025, time.January, day) }
	g := calendar.Grid{Start: d(1), Freq: calendar.Daily, N: 6, H: 2}
	w := calendar.Grid{Start: d(6), Freq: calendar.Weekly, N: 4, H: 2} // 2025-01-06 is a Monday
	must := func(v []float64, err error) []float64 {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	tests := []struct {
		name string
		got  []float64
		want []float64
	}{
		{"pulse", must(g.Pulse(d(3))), []float64{0, 0, 1, 0, 0, 0, 0, 0}},
		{"pulse in horizon", must(g.Pulse(d(8))), []float64{0, 0, 0, 0, 0, 0, 0, 1}},
		{"step", must(g.Step(d(5))), []float64{0, 0, 0, 0, 1, 1, 1, 1}},
		{"shift", must(g.Shift(d(3), d(4))), []float64{0, 0, 1, 1, 0, 0, 0, 0}},
		{"shift one day", must(g.Shift(d(3), d(3))), []float64{0, 0, 1, 0, 0, 0, 0, 0}},
		{"shift past horizon", must(g.Shift(d(6), d(30))), []float64{0, 0, 0, 0, 0, 1, 1, 1}},
		{"ramp", must(g.Ramp(d(3), time.Time{})), []float64{0, 0, 0, 1, 2, 3, 4, 5}},
		{"ramp capped", must(g.Ramp(d(3), d(6))), []float64{0, 0, 0, 1, 2, 3, 3, 3}},
		{"ramp cap beyond", must(g.Ramp(d(3), d(30))), []float64{0, 0, 0, 1, 2, 3, 4, 5}},
		{"decay", must(g.Decay(d(2), 0.5)), []float64{0, 1, 0.5, 0.25, 0.125, 0.0625, 0.03125, 0.015625}},
		// Weekly periods 6–12, 13–19, 20–26, 27 Jan–2 Feb, 3–9, 10–16 Feb.
		{"weekly pulse midweek", must(w.Pulse(d(15))), []float64{0, 1, 0, 0, 0, 0}},
		{"weekly shutdown", must(w.Shift(d(22), date(2025, time.February, 4))), []float64{0, 0, 1, 1, 1, 0}},
		{"weekly step on Sunday", must(w.Step(d(26))), []float64{0, 0, 1, 1, 1, 1}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) { equalSlice(t, tt.name, tt.got, tt.want) })
	}
}

func TestGridErrors(t *testing.T) {
	ok := calendar.Grid{Start: date(2025, time.January, 1), Freq: calendar.Daily, N: 10, H: 5}
	jan := func(day int) time.Time { return date(2025, time.January, day) }
	bad := []struct {
		name string
		g    calendar.Grid
		want error
	}{
		{"unset frequency", calendar.Grid{Start: jan(1), N: 3}, calendar.ErrFrequency},
		{"negative multiple", calendar.Grid{Start: jan(1), Freq: calendar.Every(-1, calendar.Day), N: 3}, calendar.ErrFrequency},
		{"negative n", calendar.Grid{Start: jan(1), Freq: calendar.Daily, N: -1}, calendar.ErrGrid},
		{"negative h", calendar.Grid{Start: jan(1), Freq: calendar.Daily, N: 3, H: -2}, calendar.ErrGrid},
		{"unknown stamp", calendar.Grid{Start: jan(1), Freq: calendar.Daily, N: 3, Stamp: 5}, calendar.ErrGrid},
		// N + H wrapped to a negative length and panicked in make.
		{"length overflows", calendar.Grid{Start: jan(1), Freq: calendar.Daily, N: math.MaxInt, H: 1}, calendar.ErrGrid},
	}
	for _, tt := range bad {
		t.Run(tt.name, func(t *testing.T) {
			calls := map[string]error{}
			_, calls["Holidays"] = tt.g.Holidays(calendar.Calendar{})
			_, calls["HolidayColumns"] = tt.g.HolidayColumns(calendar.Calendar{})
			_, calls["Weekdays"] = tt.g.Weekdays()
			_, calls["WorkingDays"] = tt.g.WorkingDays(calendar.Calendar{})
			_, calls["Pulse"] = tt.g.Pulse(jan(2))
			_, calls["Step"] = tt.g.Step(jan(2))
			_, calls["Shift"] = tt.g.Shift(jan(2), jan(3))
			_, calls["Ramp"] = tt.g.Ramp(jan(2), time.Time{})
			_, calls["Decay"] = tt.g.Decay(jan(2), 0.5)
			_, _, calls["Split"] = tt.g.Split()
			_, calls["Index"] = tt.g.Index(jan(2))
			_, calls["Locate"] = tt.g.Locate(jan(2))
			for name, err := range calls {
				if !errors.Is(err, tt.want) {
					t.Errorf("%s: err = %v, want %v", name, err, tt.want)
				}
			}
		})
	}
	events := []struct {
		name string
		err  error
		want error
	}{
		{"pulse before", second(ok.Pulse(date(2024, time.December, 31))), calendar.ErrOutside},
		{"pulse after horizon", second(ok.Pulse(jan(16))), calendar.ErrOutside},
		{"step after", second(ok.Step(jan(20))), calendar.ErrOutside},
		{"shift from before", second(ok.Shift(date(2024, time.December, 1), jan(3))), calendar.ErrOutside},
		{"shift reversed", second(ok.Shift(jan(5), jan(4))), calendar.ErrSpan},
		{"ramp reversed", second(ok.Ramp(jan(5), jan(4))), calendar.ErrSpan},
		{"decay rate 0", second(ok.Decay(jan(2), 0)), calendar.ErrRate},
		{"decay rate 1", second(ok.Decay(jan(2), 1)), calendar.ErrRate},
		{"decay rate NaN", second(ok.Decay(jan(2), math.NaN())), calendar.ErrRate},
		{"decay rate negative", second(ok.Decay(jan(2), -0.5)), calendar.ErrRate},
		{"empty grid", second(calendar.Grid{Start: jan(1), Freq: calendar.Daily}.Pulse(jan(1))), calendar.ErrOutside},
		{"hourly before", second(calendar.Grid{Start: time.Date(2025, 1, 1, 5, 0, 0, 0, time.UTC), Freq: calendar.Hourly, N: 3}.Pulse(jan(1))), calendar.ErrOutside},
		{"invalid calendar", second(ok.Holidays(calendar.Calendar{Holidays: []calendar.Holiday{{Name: "x", Rule: calendar.FixedDate{Month: time.April, Day: 31}}}})), calendar.ErrRule},
		{"invalid calendar columns", second(ok.HolidayColumns(calendar.Calendar{Weekend: []time.Weekday{-1}})), calendar.ErrRule},
		{"invalid calendar working", second(ok.WorkingDays(calendar.Calendar{Holidays: []calendar.Holiday{{Name: "x", Rule: calendar.NthWeekday{Month: 1, N: 0}}}})), calendar.ErrRule},
	}
	for _, tt := range events {
		t.Run(tt.name, func(t *testing.T) {
			if !errors.Is(tt.err, tt.want) {
				t.Errorf("err = %v, want %v", tt.err, tt.want)
			}
		})
	}
}

func second[T any](_ T, err error) error { return err }

func TestHourlyLocate(t *testing.T) {
	start := time.Date(2025, time.March, 1, 0, 0, 0, 0, time.UTC)
	for _, tt := range []struct {
		name  string
		stamp calendar.Stamp
		at    time.Time
		want  int
	}{
		{"start stamp on the hour", calendar.StampStart, start.Add(2 * time.Hour), 2},
		{"start stamp inside", calendar.StampStart, start.Add(2*time.Hour + 59*time.Minute), 2},
		{"end stamp on the hour", calendar.StampEnd, start.Add(2 * time.Hour), 2},
		{"end stamp inside", calendar.StampEnd, start.Add(time.Hour + time.Minute), 2},
		{"end stamp first period", calendar.StampEnd, start.Add(-30 * time.Minute), 0},
	} {
		t.Run(tt.name, func(t *testing.T) {
			g := calendar.Grid{Start: start, Freq: calendar.Hourly, N: 5, Stamp: tt.stamp}
			k, err := g.Locate(tt.at)
			if err != nil || k != tt.want {
				t.Errorf("Locate = %d, %v, want %d", k, err, tt.want)
			}
		})
	}
}

func TestSplit(t *testing.T) {
	g := calendar.Grid{Start: date(2025, time.January, 1), Freq: calendar.Daily, N: 3, H: 2}
	a := calendar.Column{Name: "a", Values: []float64{1, 2, 3, 4, 5}}
	b := calendar.Column{Name: "b", Values: []float64{6, 7, 8, 9, 10}}
	hist, fut, err := g.Split(a, b)
	if err != nil {
		t.Fatal(err)
	}
	if len(hist) != 2 || hist[0].Name != "a" || hist[1].Name != "b" {
		t.Fatalf("history %v", hist)
	}
	equalSlice(t, "history a", hist[0].Values, []float64{1, 2, 3})
	equalSlice(t, "history b", hist[1].Values, []float64{6, 7, 8})
	equalSlice(t, "future a", fut[0], []float64{4, 5})
	equalSlice(t, "future b", fut[1], []float64{9, 10})
	if cap(hist[0].Values) != 3 {
		t.Error("history capacity lets an append overwrite the future")
	}
	errs := []struct {
		name string
		cols []calendar.Column
	}{
		{"short", []calendar.Column{{Name: "a", Values: []float64{1, 2, 3, 4}}}},
		{"long", []calendar.Column{{Name: "a", Values: make([]float64, 6)}}},
		{"no name", []calendar.Column{{Values: make([]float64, 5)}}},
		{"repeated", []calendar.Column{a, a}},
		{"NaN", []calendar.Column{{Name: "a", Values: []float64{1, math.NaN(), 3, 4, 5}}}},
		{"Inf in future", []calendar.Column{{Name: "a", Values: []float64{1, 2, 3, 4, math.Inf(-1)}}}},
	}
	for _, tt := range errs {
		t.Run(tt.name, func(t *testing.T) {
			if _, _, err := g.Split(tt.cols...); !errors.Is(err, calendar.ErrColumn) {
				t.Errorf("err = %v, want ErrColumn", err)
			}
		})
	}
}

func TestStampString(t *testing.T) {
	for s, want := range map[calendar.Stamp]string{calendar.StampStart: "start", calendar.StampEnd: "end", 3: "Stamp(3)"} {
		if s.String() != want {
			t.Errorf("%d: %q, want %q", int(s), s.String(), want)
		}
	}
}

// TestEmptyAndSubDaily: an empty grid gives empty columns; hourly
// weekday indicators follow the date of each hour (2025-03-02 is a Sunday,
// standard library).
func TestEmptyAndSubDaily(t *testing.T) {
	for _, f := range []calendar.Frequency{calendar.Hourly, calendar.Daily, calendar.Weekly, calendar.Monthly} {
		g := calendar.Grid{Start: date(2025, time.March, 1), Freq: f}
		hol, err := g.Holidays(calendar.Calendar{Holidays: []calendar.Holiday{fixed("a", time.March, 1)}})
		if err != nil || len(hol) != 0 {
			t.Errorf("%v Holidays = %v, %v", f, hol, err)
		}
		cols, err := g.HolidayColumns(calendar.Calendar{Holidays: []calendar.Holiday{fixed("a", time.March, 1)}})
		if err != nil || len(cols) != 1 || len(cols[0].Values) != 0 {
			t.Errorf("%v HolidayColumns = %v, %v", f, cols, err)
		}
		work, err := g.WorkingDays(calendar.Calendar{})
		if err != nil || len(work) != 0 {
			t.Errorf("%v WorkingDays = %v, %v", f, work, err)
		}
		days, err := g.Weekdays()
		if err != nil || len(days) != 7 || len(days[0].Values) != 0 {
			t.Errorf("%v Weekdays = %v, %v", f, days, err)
		}
	}
	if date(2025, time.March, 2).Weekday() != time.Sunday {
		t.Fatal("anchor: 2025-03-02 is not a Sunday")
	}
	g := calendar.Grid{Start: time.Date(2025, time.March, 2, 22, 0, 0, 0, time.UTC), Freq: calendar.Every(2, calendar.Hour), N: 3}
	days, err := g.Weekdays()
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "Sunday", days[6].Values, []float64{1, 0, 0})
	equalSlice(t, "Monday", days[0].Values, []float64{0, 1, 1})
	work, err := g.WorkingDays(calendar.Calendar{})
	if err != nil {
		t.Fatal(err)
	}
	equalSlice(t, "hourly working", work, []float64{0, 1, 1})
}

func TestEasterBefore1584(t *testing.T) {
	cal := calendar.Calendar{Holidays: []calendar.Holiday{{Name: "Lantern Friday", Rule: calendar.EasterOffset{Days: -2}}}}
	g := calendar.Grid{Start: date(1580, time.January, 1), Freq: calendar.Monthly, N: 60}
	if _, err := g.Holidays(cal); !errors.Is(err, calendar.ErrYear) {
		t.Errorf("Holidays err = %v, want ErrYear", err)
	}
	if _, err := g.WorkingDays(cal); !errors.Is(err, calendar.ErrYear) {
		t.Errorf("WorkingDays err = %v, want ErrYear", err)
	}
	if _, err := g.HolidayColumns(cal); !errors.Is(err, calendar.ErrYear) {
		t.Errorf("HolidayColumns err = %v, want ErrYear", err)
	}
	if _, err := cal.Occurrences(date(1583, time.June, 1), date(1590, time.June, 1)); !errors.Is(err, calendar.ErrYear) {
		t.Errorf("Occurrences err = %v, want ErrYear", err)
	}
	if _, err := cal.Occurrences(date(1584, time.January, 1), date(1590, time.June, 1)); err != nil {
		t.Errorf("Occurrences from 1584: %v", err)
	}
}

// TestLocateBruteForce: every day of several grids maps to the period
// whose dates (stepped with Frequency.Add, day by day with time.AddDate)
// contain it, and every period time maps back through Index.
func TestLocateBruteForce(t *testing.T) {
	tests := []struct {
		name string
		g    calendar.Grid
	}{
		{"monthly start", calendar.Grid{Start: date(2023, time.November, 1), Freq: calendar.Monthly, N: 20, H: 6}},
		{"monthly end", calendar.Grid{Start: date(2023, time.November, 30), Freq: calendar.Monthly, N: 20, H: 6, Stamp: calendar.StampEnd}},
		{"quarterly end", calendar.Grid{Start: date(2023, time.December, 31), Freq: calendar.Quarterly, N: 8, H: 4, Stamp: calendar.StampEnd}},
		{"weekly Thursday", calendar.Grid{Start: date(2023, time.December, 28), Freq: calendar.Weekly, N: 60, H: 8}},
		{"weekly Sunday end", calendar.Grid{Start: date(2023, time.December, 31), Freq: calendar.Weekly, N: 60, H: 8, Stamp: calendar.StampEnd}},
		{"every 3 days", calendar.Grid{Start: date(2024, time.February, 27), Freq: calendar.Every(3, calendar.Day), N: 50, H: 5}},
		{"yearly", calendar.Grid{Start: date(2020, time.January, 1), Freq: calendar.Yearly, N: 4, H: 1}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			g := tt.g
			for i := range g.Len() {
				if k, err := g.Index(g.Time(i)); err != nil || k != i {
					t.Fatalf("Index(Time(%d)) = %d, %v", i, k, err)
				}
				first, end := g.Time(i), g.Time(i+1)
				if g.Stamp == calendar.StampEnd {
					first, end = g.Time(i-1).AddDate(0, 0, 1), g.Time(i).AddDate(0, 0, 1)
				}
				for d := first; d.Before(end); d = d.AddDate(0, 0, 1) {
					if k, err := g.Locate(d.Add(13 * time.Hour)); err != nil || k != i {
						t.Fatalf("Locate(%s) = %d, %v, want %d", d.Format(time.DateOnly), k, err, i)
					}
				}
				if i == 0 {
					if _, err := g.Locate(first.AddDate(0, 0, -1)); !errors.Is(err, calendar.ErrOutside) {
						t.Errorf("day before the grid: %v", err)
					}
				}
				if i == g.Len()-1 {
					if _, err := g.Locate(end); !errors.Is(err, calendar.ErrOutside) {
						t.Errorf("day after the grid: %v", err)
					}
				}
			}
		})
	}
}
