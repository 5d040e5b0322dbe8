package main

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// The invented scenario: Gullwater Ferries, four routes in two regions.
// Every name, date and number below is made up for the demo.

func day(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

var (
	// firstWeek and lastWeek are the Mondays of the first and the last
	// week of history (ISO weeks 2021-W09 and 2026-W09).
	firstWeek = day(2021, time.March, 1)
	lastWeek  = day(2026, time.February, 23)
)

// Region calendars. Both regions keep a Saturday–Sunday weekend.
var (
	northreach = calendar.Calendar{Holidays: []calendar.Holiday{
		{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.NearestWeekday}},
		{Name: "Spring Friday", Rule: calendar.EasterOffset{Days: -2}},
		{Name: "Spring Monday", Rule: calendar.EasterOffset{Days: 1}},
		{Name: "Founders' Day", Rule: calendar.FixedDate{Month: time.June, Day: 14, Observed: calendar.FollowingMonday}},
		{Name: "Harvest Monday", Rule: calendar.NthWeekday{Month: time.September, Weekday: time.Monday, N: 1}},
		// A one-off: two days off for the opening of the Skerry bridge.
		{Name: "Bridge Days", Rule: calendar.Span{First: day(2023, time.May, 15), Last: day(2023, time.May, 16)}},
		{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 25, Observed: calendar.NearestWeekday}},
		{Name: "Second Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 26, Observed: calendar.FollowingMonday}},
	}}
	southholm = calendar.Calendar{Holidays: []calendar.Holiday{
		{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.FollowingMonday}},
		{Name: "Lantern Friday", Rule: calendar.EasterOffset{Days: -2}},
		{Name: "Tide Thursday", Rule: calendar.EasterOffset{Days: 39}},
		{Name: "Boat Day", Rule: calendar.NthWeekday{Month: time.May, Weekday: time.Monday, N: calendar.Last}},
		{Name: "Islands Day", Rule: calendar.FixedDate{Month: time.August, Day: 9, Observed: calendar.NearestWeekday}},
		{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 25, Observed: calendar.NearestWeekday}},
	}}
)

// eventKind is the shape of a one-off event's effect.
type eventKind int

const (
	// pulse: the event lasts the one week containing its date.
	pulse eventKind = iota + 1
	// shift: a level shift from the week containing From through the
	// week containing Through, then back to normal.
	shift
)

func (k eventKind) String() string {
	switch k {
	case pulse:
		return "one week"
	case shift:
		return "temporary shift"
	}
	return fmt.Sprintf("eventKind(%d)", int(k))
}

// event is a one-off happening that moves a route's boardings.
type event struct {
	Name    string
	Kind    eventKind
	From    time.Time
	Through time.Time // last day of a shift; ignored for a pulse
}

// rule returns the event as a regressor rule on the time axis.
func (e event) rule() calendar.Event {
	if e.Kind == pulse {
		return calendar.Event{Name: e.Name, Shape: calendar.Pulse, From: e.From}
	}
	return calendar.Event{Name: e.Name, Shape: calendar.Shift, From: e.From, Through: e.Through}
}

// region is one of the operator's two regions: its holiday calendar and
// the one-off events that happened there. Every route of a region is
// modelled with all of the region's events; where an event did not touch
// a route its estimated effect should come out near zero.
type region struct {
	Name   string
	Tag    string // one-letter tag used in the plan
	Cal    calendar.Calendar
	Events []event
}

var (
	gullPoint = event{Name: "Gull Point counted under N2", Kind: shift, From: day(2024, time.March, 4), Through: day(2024, time.July, 28)}
	quayWorks = event{Name: "Tidewater quay works", Kind: shift, From: day(2023, time.October, 2), Through: day(2023, time.November, 5)}
	lanterns  = event{Name: "lantern festival", Kind: pulse, From: day(2024, time.August, 14)}
)

// regions returns the scenario's two regions.
func regions() []region {
	return []region{
		{Name: "Northreach", Tag: "N", Cal: northreach, Events: []event{gullPoint}},
		{Name: "Southholm", Tag: "S", Cal: southholm, Events: []event{quayWorks, lanterns}},
	}
}

// route is one series of the scenario, with the effects planted in it.
type route struct {
	Key, Name  string
	Region     int     // index in regions()
	Unit       string  // unit the data arrive in
	UnitFactor float64 // planted, unknown to the program: delivered = boardings × UnitFactor

	// Planted in boardings per week; used only by the generator and the
	// test.
	base, growth, amplitude float64 // level in March 2021, growth per year, annual swing
	peak                    int     // day of the year of the summer peak
	holidayEffect           float64 // per holiday day in the week
	eventEffect             map[string]float64
	noise                   float64 // sd of the AR(1) innovations
}

// routes returns the scenario's four routes.
func routes() []route {
	return []route{
		{Key: "N1", Name: "Harbour Loop", Region: 0, Unit: "boardings", UnitFactor: 1,
			base: 5200, growth: 0.03, amplitude: 900, peak: 196, holidayEffect: -260, noise: 170,
			eventEffect: map[string]float64{gullPoint.Name: -450}},
		{Key: "N2", Name: "Skerry Run", Region: 0, Unit: "boardings", UnitFactor: 1,
			base: 1800, growth: 0.05, amplitude: 1100, peak: 206, holidayEffect: 210, noise: 120,
			eventEffect: map[string]float64{gullPoint.Name: 450}},
		{Key: "S1", Name: "Tidewater Crossing", Region: 1, Unit: "boardings", UnitFactor: 1,
			base: 3900, growth: 0.02, amplitude: 500, peak: 213, holidayEffect: -190, noise: 150,
			eventEffect: map[string]float64{quayWorks.Name: -2600}},
		{Key: "S2", Name: "Lantern Bay", Region: 1, Unit: "seat-km", UnitFactor: 7.4,
			base: 1500, growth: 0.04, amplitude: 800, peak: 201, holidayEffect: 160, noise: 110,
			eventEffect: map[string]float64{lanterns.Name: 1400}},
	}
}

// generate makes the invented weekly history of every route: a growing
// level, a smooth summer season, holiday days, the route's events and
// AR(1) noise, from a fixed seed, so every run sees the same data. The
// holiday days are counted day by day with Calendar.IsHoliday, a different
// path from the Grid.Holidays regressor the model uses.
func generate(regs []region, rs []route) ([]almanac.Series, error) {
	n, err := calendar.Weekly.Between(firstWeek, lastWeek)
	if err != nil {
		return nil, fmt.Errorf("weekly: history span: %w", err)
	}
	n++
	out := make([]almanac.Series, len(rs))
	for r, rt := range rs {
		if rt.Region < 0 || rt.Region >= len(regs) {
			return nil, errors.New("weekly: scenario: route in an unknown region")
		}
		reg := regs[rt.Region]
		rng := rand.New(rand.NewPCG(20261201, uint64(r)))
		vals := make([]float64, n)
		ar := 0.0
		for i := range n {
			monday := calendar.Weekly.Add(firstWeek, i)
			years := float64(i) / (365.25 / 7)
			mid := monday.AddDate(0, 0, 3)
			phase := 2 * math.Pi * float64(mid.YearDay()-rt.peak) / 365.25
			v := rt.base*(1+rt.growth*years) + rt.amplitude*(0.75*math.Cos(phase)+0.25*math.Cos(2*phase))
			hol := 0
			for d := range 7 {
				if reg.Cal.IsHoliday(monday.AddDate(0, 0, d)) {
					hol++
				}
			}
			v += rt.holidayEffect * float64(hol)
			sunday := monday.AddDate(0, 0, 6)
			for _, e := range reg.Events {
				last := e.Through
				if e.Kind == pulse {
					last = e.From
				}
				if !sunday.Before(e.From) && !monday.After(last) {
					v += rt.eventEffect[e.Name] // zero where not planted
				}
			}
			ar = 0.5*ar + rt.noise*rng.NormFloat64()
			v = math.Max(0, math.Round(v+ar)) // whole boardings
			vals[i] = math.Round(10*v*rt.UnitFactor) / 10
		}
		out[r] = almanac.Series{Key: rt.Key, Start: firstWeek, Freq: calendar.Weekly, Values: vals}
	}
	return out, nil
}
