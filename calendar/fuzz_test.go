package calendar_test

import (
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// FuzzGrid builds every regressor on arbitrary small grids and event
// dates and checks the invariants that hold whatever the input: either an
// error wrapping one of the package's sentinels, or Len() finite values;
// holiday and working days never exceed the days of the period; the
// seven weekday counts add up to the period's length in days.
func FuzzGrid(f *testing.F) {
	f.Add(int64(19000), 3, 1, 40, 5, 0, int64(10), int64(30), 0.5)
	f.Add(int64(-3000), 5, 1, 24, 12, 1, int64(400), int64(-20), 0.9)
	f.Add(int64(20500), 1, 7, 100, 0, 0, int64(2), int64(3), 1.5)
	f.Add(int64(20000), 4, 2, 0, 0, 1, int64(0), int64(0), 0.1)
	f.Add(int64(-140000), 6, 1, 10, 3, 0, int64(0), int64(700), 0.3)
	sentinels := []error{calendar.ErrFrequency, calendar.ErrGrid, calendar.ErrOutside, calendar.ErrSpan, calendar.ErrRate, calendar.ErrYear, calendar.ErrNotAligned}
	f.Fuzz(func(t *testing.T, startDay int64, unit, mult, n, h, stamp int, ev1, ev2 int64, rate float64) {
		if n > 2000 || h > 500 || n < -5 || h < -5 || startDay < -200000 || startDay > 200000 || ev1 < -5000 || ev1 > 5000 || ev2 < -5000 || ev2 > 5000 || mult > 50 {
			return
		}
		start := time.Unix(startDay*86400, 0).UTC()
		g := calendar.Grid{Start: start, Freq: calendar.Every(mult, calendar.Unit(unit)), N: n, H: h, Stamp: calendar.Stamp(stamp)}
		cal := calendar.Calendar{Holidays: []calendar.Holiday{
			{Name: "a", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.NearestWeekday}},
			{Name: "b", Rule: calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: calendar.Last}},
			{Name: "c", Rule: calendar.EasterOffset{Days: 1}},
			{Name: "d", Rule: calendar.Span{First: start.AddDate(0, 0, 3), Last: start.AddDate(0, 0, 9)}},
		}}
		check := func(name string, v []float64, err error) {
			t.Helper()
			if err != nil {
				for _, s := range sentinels {
					if errors.Is(err, s) {
						return
					}
				}
				t.Fatalf("%s: error %v wraps no sentinel", name, err)
			}
			if len(v) != g.Len() {
				t.Fatalf("%s: %d values, want %d", name, len(v), g.Len())
			}
			for i, x := range v {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					t.Fatalf("%s[%d] = %v", name, i, x)
				}
			}
		}
		e1, e2 := start.AddDate(0, 0, int(ev1)), start.AddDate(0, 0, int(ev2))
		hol, err := g.Holidays(cal)
		check("Holidays", hol, err)
		work, err := g.WorkingDays(cal)
		check("WorkingDays", work, err)
		v, err := g.Pulse(e1)
		check("Pulse", v, err)
		v, err = g.Step(e1)
		check("Step", v, err)
		v, err = g.Shift(e1, e2)
		check("Shift", v, err)
		v, err = g.Ramp(e1, e2)
		check("Ramp", v, err)
		v, err = g.Decay(e1, rate)
		check("Decay", v, err)
		days, err := g.Weekdays()
		if err != nil {
			return
		}
		isSub := g.Freq.Unit == calendar.Minute || g.Freq.Unit == calendar.Hour
		for i := range g.Len() {
			total := 0.0
			for k := range days {
				total += days[k].Values[i]
			}
			if isSub {
				if total != 1 {
					t.Fatalf("period %d: weekday indicators sum to %v", i, total)
				}
				continue
			}
			if hol != nil && hol[i] > total {
				t.Fatalf("period %d: %v holiday days of %v", i, hol[i], total)
			}
			if work != nil && work[i] > total {
				t.Fatalf("period %d: %v working days of %v", i, work[i], total)
			}
		}
	})
}
