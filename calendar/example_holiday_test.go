package calendar_test

import (
	"fmt"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// valley is the public-holiday calendar of an invented region, the Vell
// Valley.
var valley = calendar.Calendar{Holidays: []calendar.Holiday{
	{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.NearestWeekday}},
	{Name: "Thaw Day", Rule: calendar.NthWeekday{Month: time.March, Weekday: time.Monday, N: 1}},
	{Name: "Lantern Friday", Rule: calendar.EasterOffset{Days: -2}},
	{Name: "Lantern Monday", Rule: calendar.EasterOffset{Days: 1}},
	{Name: "Charter Day", Rule: calendar.FixedDate{Month: time.July, Day: 12, Observed: calendar.FollowingMonday}},
	{Name: "Harvest Thursday", Rule: calendar.NthWeekday{Month: time.October, Weekday: time.Thursday, N: calendar.Last}},
	{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 25, Observed: calendar.NearestWeekday}},
	{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 26, Observed: calendar.FollowingMonday}},
}}

func ExampleCalendar_Occurrences() {
	occ, err := valley.Occurrences(time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC), time.Date(2027, time.December, 31, 0, 0, 0, 0, time.UTC))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, o := range occ {
		fmt.Println(o.Date.Format("Mon 2006-01-02"), o.Name)
	}
	// Output:
	// Fri 2027-01-01 Year Start
	// Mon 2027-03-01 Thaw Day
	// Fri 2027-03-26 Lantern Friday
	// Mon 2027-03-29 Lantern Monday
	// Mon 2027-07-12 Charter Day
	// Thu 2027-10-28 Harvest Thursday
	// Fri 2027-12-24 Midwinter
	// Mon 2027-12-27 Midwinter
	// Fri 2027-12-31 Year Start
}

func ExampleEaster() {
	for _, y := range []int{2025, 2026, 2027} {
		e, err := calendar.Easter(y)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Println(e.Format(time.DateOnly))
	}
	_, err := calendar.Easter(1500)
	fmt.Println(err)
	// Output:
	// 2025-04-20
	// 2026-04-05
	// 2027-03-28
	// calendar: year out of range: Gregorian Easter for 1500 (need 1583 or later)
}

func ExampleNthWeekday() {
	rule := calendar.NthWeekday{Month: time.October, Weekday: time.Thursday, N: calendar.Last}
	for y := 2025; y <= 2027; y++ {
		fmt.Println(rule.Dates(y)[0].Format(time.DateOnly))
	}
	// Output:
	// 2025-10-30
	// 2026-10-29
	// 2027-10-28
}

// A weekly series of ferry passengers in the Vell Valley, three years of
// weeks starting on Monday (2024-01-01 to 2026-12-27), with a 13-week
// forecast: holiday days per week, a six-week closure of the harbour for
// repairs in 2025 (a temporary level shift) and a regatta planned for
// February 2027 (a pulse in the forecast period). Split gives the history
// columns for fitting and the future values for forecasting.
func ExampleGrid() {
	g := calendar.Grid{Start: time.Date(2024, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Weekly, N: 156, H: 13}
	hol, err := g.Holidays(valley)
	if err != nil {
		fmt.Println(err)
		return
	}
	closure, err := g.Shift(time.Date(2025, time.February, 3, 0, 0, 0, 0, time.UTC), time.Date(2025, time.March, 16, 0, 0, 0, 0, time.UTC))
	if err != nil {
		fmt.Println(err)
		return
	}
	regatta, err := g.Pulse(time.Date(2027, time.February, 17, 0, 0, 0, 0, time.UTC))
	if err != nil {
		fmt.Println(err)
		return
	}
	history, future, err := g.Split(
		calendar.Column{Name: "holidays", Values: hol},
		calendar.Column{Name: "closure", Values: closure},
		calendar.Column{Name: "regatta", Values: regatta},
	)
	if err != nil {
		fmt.Println(err)
		return
	}
	for j, c := range history {
		sum, fsum := 0.0, 0.0
		for _, v := range c.Values {
			sum += v
		}
		for _, v := range future[j] {
			fsum += v
		}
		fmt.Printf("%-8s history %3d values, sum %.3f; future %2d values, sum %.3f\n", c.Name, len(c.Values), sum, len(future[j]), fsum)
	}
	// The last history weeks and the first future ones: Midwinter 2026
	// falls on Friday 25 December and Saturday 26 December, the latter
	// observed on Monday 28 December, in the week of Year Start.
	for i := 154; i <= 157; i++ {
		fmt.Printf("%s %.3f\n", g.Time(i).Format(time.DateOnly), hol[i])
	}
	// Output:
	// holidays history 156 values, sum 23.000; future 13 values, sum 4.000
	// closure  history 156 values, sum 6.000; future 13 values, sum 0.000
	// regatta  history 156 values, sum 0.000; future 13 values, sum 1.000
	// 2026-12-14 0.000
	// 2026-12-21 1.000
	// 2026-12-28 2.000
	// 2027-01-04 0.000
}

// Trading days of a monthly series: working days per month under the
// Vell Valley calendar, and the number of Saturdays.
func ExampleGrid_WorkingDays() {
	g := calendar.Grid{Start: time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, N: 4}
	work, err := g.WorkingDays(valley)
	if err != nil {
		fmt.Println(err)
		return
	}
	days, err := g.Weekdays()
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range g.Len() {
		fmt.Printf("%s working %.3f, Saturdays %.3f\n", g.Time(i).Format("2006-01"), work[i], days[5].Values[i])
	}
	// Output:
	// 2027-01 working 20.000, Saturdays 5.000
	// 2027-02 working 20.000, Saturdays 4.000
	// 2027-03 working 20.000, Saturdays 4.000
	// 2027-04 working 22.000, Saturdays 4.000
}

// A promotion whose effect dies away: 1 in the week of the launch, then
// 0.6, 0.36, … in the following weeks; and a price change phased in over
// four weeks.
func ExampleGrid_Decay() {
	g := calendar.Grid{Start: time.Date(2026, time.March, 2, 0, 0, 0, 0, time.UTC), Freq: calendar.Weekly, N: 6, H: 2}
	promo, err := g.Decay(time.Date(2026, time.March, 18, 0, 0, 0, 0, time.UTC), 0.6)
	if err != nil {
		fmt.Println(err)
		return
	}
	price, err := g.Ramp(time.Date(2026, time.March, 9, 0, 0, 0, 0, time.UTC), time.Date(2026, time.April, 6, 0, 0, 0, 0, time.UTC))
	if err != nil {
		fmt.Println(err)
		return
	}
	for i := range g.Len() {
		fmt.Printf("%s %.3f %.3f\n", g.Time(i).Format(time.DateOnly), promo[i], price[i])
	}
	// Output:
	// 2026-03-02 0.000 0.000
	// 2026-03-09 0.000 0.000
	// 2026-03-16 1.000 1.000
	// 2026-03-23 0.600 2.000
	// 2026-03-30 0.360 3.000
	// 2026-04-06 0.216 4.000
	// 2026-04-13 0.130 4.000
	// 2026-04-20 0.078 4.000
}

// A fixed-date holiday moved off the weekend: 12 July falls on a
// Saturday in 2025 and on a Sunday in 2026.
func ExampleFixedDate() {
	for _, obs := range []calendar.Observance{calendar.OnTheDay, calendar.NearestWeekday, calendar.FollowingMonday} {
		rule := calendar.FixedDate{Month: time.July, Day: 12, Observed: obs}
		fmt.Printf("%-16s %s %s\n", obs, rule.Dates(2025)[0].Format("Mon 01-02"), rule.Dates(2026)[0].Format("Mon 01-02"))
	}
	// Output:
	// on the day       Sat 07-12 Sun 07-12
	// nearest weekday  Fri 07-11 Mon 07-13
	// following Monday Mon 07-14 Mon 07-13
}
