package calendar_test

import (
	"errors"
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// TestEventColumns: the profile of each shape on a ten-week grid plus
// three future weeks, with the event inside, across the edges and wholly
// outside the grid (hand-written expectations).
func TestEventColumns(t *testing.T) {
	// Ten weeks from Monday 6 January 2025 plus three future weeks.
	g := calendar.Grid{Start: date(2025, time.January, 6), Freq: calendar.Weekly, N: 10, H: 3}
	r := 0.5
	tests := []struct {
		name string
		e    calendar.Event
		want []float64 // padded with zeros to 13
	}{
		{"pulse inside", calendar.Event{Name: "x", From: date(2025, time.January, 15)}, []float64{0, 1}}, // a Wednesday of the second week
		{"pulse in the future", calendar.Event{Name: "x", From: date(2025, time.March, 27)}, []float64{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 0}},
		{"pulse before the grid", calendar.Event{Name: "x", From: date(2024, time.June, 3)}, nil},
		{"pulse after the horizon", calendar.Event{Name: "x", From: date(2025, time.April, 7)}, nil},
		{"step before the grid", calendar.Event{Name: "x", Shape: calendar.Step, From: date(2024, time.June, 3)}, []float64{1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1}},
		{"step inside", calendar.Event{Name: "x", Shape: calendar.Step, From: date(2025, time.March, 2)}, []float64{0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1}}, // a Sunday: the week of 24 February
		{"shift before the grid", calendar.Event{Name: "x", Shape: calendar.Shift, From: date(2024, time.June, 3), Through: date(2024, time.July, 1)}, nil},
		{"shift into the grid", calendar.Event{Name: "x", Shape: calendar.Shift, From: date(2024, time.December, 2), Through: date(2025, time.January, 15)}, []float64{1, 1}},
		{"shift past the horizon", calendar.Event{Name: "x", Shape: calendar.Shift, From: date(2025, time.March, 19), Through: date(2025, time.June, 1)}, []float64{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1}},
		{"ramp capped", calendar.Event{Name: "x", Shape: calendar.Ramp, From: date(2025, time.January, 6), Through: date(2025, time.January, 27)}, []float64{0, 1, 2, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3}},
		{"ramp from before the grid", calendar.Event{Name: "x", Shape: calendar.Ramp, From: date(2024, time.December, 23)}, []float64{2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14}},
		{"decay inside", calendar.Event{Name: "x", Shape: calendar.Decay, From: date(2025, time.March, 3), Rate: r}, []float64{0, 0, 0, 0, 0, 0, 0, 0, 1, 0.5, 0.25, 0.125, 0.0625}},
		{"decay from before the grid", calendar.Event{Name: "x", Shape: calendar.Decay, From: date(2024, time.December, 30), Rate: r}, []float64{0.5, 0.25, 0.125, 0.0625, 0.03125, 0.015625, 0.0078125, 0.00390625, 0.001953125, 0.0009765625, 0.00048828125, 0.000244140625, 0.0001220703125}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			cols, err := tt.e.Columns(g)
			if err != nil {
				t.Fatal(err)
			}
			if len(cols) != 1 || cols[0].Name != "x" {
				t.Fatalf("columns %v", cols)
			}
			want := make([]float64, g.Len())
			copy(want, tt.want)
			equalSlice(t, "column", cols[0].Values, want)
		})
	}
}

// TestEventDefaultRate: a Decay without a rate decays at 0.7 (Chen & Liu
// 1993, recalled from memory).
func TestEventDefaultRate(t *testing.T) {
	g := calendar.Grid{Start: date(2025, time.January, 6), Freq: calendar.Weekly, N: 3}
	cols, err := calendar.Event{Name: "tc", Shape: calendar.Decay, From: date(2025, time.January, 6)}.Columns(g)
	if err != nil {
		t.Fatal(err)
	}
	r := 0.7
	equalSlice(t, "decay", cols[0].Values, []float64{1, r, r * r})
}

// TestEventBadInput: events that can never be built.
func TestEventBadInput(t *testing.T) {
	g := calendar.Grid{Start: date(2025, time.January, 6), Freq: calendar.Weekly, N: 3}
	d := date(2025, time.January, 13)
	tests := []struct {
		name string
		e    calendar.Event
		want error
	}{
		{"no name", calendar.Event{From: d}, calendar.ErrColumn},
		{"unknown shape", calendar.Event{Name: "x", Shape: calendar.Shape(9), From: d}, calendar.ErrColumn},
		{"shift without end", calendar.Event{Name: "x", Shape: calendar.Shift, From: d}, calendar.ErrSpan},
		{"end before start", calendar.Event{Name: "x", Shape: calendar.Shift, From: d, Through: d.AddDate(0, 0, -1)}, calendar.ErrSpan},
		{"rate 1", calendar.Event{Name: "x", Shape: calendar.Decay, From: d, Rate: 1}, calendar.ErrRate},
		{"rate NaN", calendar.Event{Name: "x", Shape: calendar.Decay, From: d, Rate: math.NaN()}, calendar.ErrRate},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := tt.e.Columns(g); !errors.Is(err, tt.want) {
				t.Errorf("got %v, want %v", err, tt.want)
			}
		})
	}
}

// TestEventMatchesGrid: inside the grid an Event marks the same periods
// as Grid.Pulse, Step, Shift, Ramp and Decay (which locate with
// Grid.Locate), for every frequency and stamp; outside it extends them.
func TestEventMatchesGrid(t *testing.T) {
	grids := []calendar.Grid{
		{Start: date(2024, time.January, 1), Freq: calendar.Daily, N: 40, H: 5},
		{Start: date(2024, time.January, 7), Freq: calendar.Weekly, N: 30, H: 4, Stamp: calendar.StampEnd},
		{Start: date(2024, time.January, 1), Freq: calendar.Weekly, N: 30, H: 4},
		{Start: date(2023, time.January, 31), Freq: calendar.Monthly, N: 24, H: 6, Stamp: calendar.StampEnd},
		{Start: date(2023, time.January, 1), Freq: calendar.Quarterly, N: 12, H: 2},
		{Start: time.Date(2024, time.March, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, N: 200, H: 24},
		{Start: time.Date(2024, time.March, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, N: 200, H: 24, Stamp: calendar.StampEnd},
	}
	for _, g := range grids {
		t.Run(fmt.Sprintf("%v %v", g.Freq, g.Stamp), func(t *testing.T) {
			last := g.Time(g.Len() - 1)
			span := last.Sub(g.Start)
			for k := 1; k < 20; k++ {
				from := g.Start.Add(span * time.Duration(k) / 23).Add(37 * time.Minute)
				through := from.Add(span / 7)
				checks := []struct {
					e    calendar.Event
					grid func() ([]float64, error)
				}{
					{calendar.Event{Name: "p", From: from}, func() ([]float64, error) { return g.Pulse(from) }},
					{calendar.Event{Name: "s", Shape: calendar.Step, From: from}, func() ([]float64, error) { return g.Step(from) }},
					{calendar.Event{Name: "sh", Shape: calendar.Shift, From: from, Through: through}, func() ([]float64, error) { return g.Shift(from, through) }},
					{calendar.Event{Name: "r", Shape: calendar.Ramp, From: from, Through: through}, func() ([]float64, error) { return g.Ramp(from, through) }},
					{calendar.Event{Name: "d", Shape: calendar.Decay, From: from, Rate: 0.6}, func() ([]float64, error) { return g.Decay(from, 0.6) }},
				}
				for _, c := range checks {
					want, err := c.grid()
					if err != nil {
						t.Fatal(err)
					}
					got, err := c.e.Columns(g)
					if err != nil {
						t.Fatal(err)
					}
					equalSlice(t, c.e.Shape.String()+" "+from.String(), got[0].Values, want)
				}
			}
		})
	}
}

// TestCycleAnchored: a Cycle on a window of a series has the values of
// the whole series' Cycle at the same times, whatever the window's
// start, and on a grid starting a whole number t0 of periods after
// CycleOrigin it equals FourierFrom(t0, …) (the anchored and the
// series-relative form of the same Fourier terms).
func TestCycleAnchored(t *testing.T) {
	tests := []struct {
		name string
		g    calendar.Grid
		c    calendar.Cycle
	}{
		{"weekly year", calendar.Grid{Start: date(2021, time.March, 1), Freq: calendar.Weekly, N: 260, H: 13}, calendar.Cycle{Period: 365.25 / 7, Harmonics: 5}},
		{"daily week", calendar.Grid{Start: date(2023, time.March, 1), Freq: calendar.Daily, N: 100, H: 14}, calendar.Cycle{Period: 7, Harmonics: 3}},
		{"hourly week", calendar.Grid{Start: time.Date(2024, time.May, 6, 5, 0, 0, 0, time.UTC), Freq: calendar.Hourly, N: 500, H: 48}, calendar.Cycle{Period: 168, Harmonics: 4}},
		{"monthly year", calendar.Grid{Start: date(1995, time.July, 1), Freq: calendar.Monthly, N: 80, H: 12}, calendar.Cycle{Period: 12, Harmonics: 6}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			whole, err := tt.c.Columns(tt.g)
			if err != nil {
				t.Fatal(err)
			}
			for _, off := range []int{1, 17, tt.g.N - 3} {
				w := tt.g
				w.Start, w.N = tt.g.Time(off), tt.g.N-off
				part, err := tt.c.Columns(w)
				if err != nil {
					t.Fatal(err)
				}
				for j := range whole {
					if part[j].Name != whole[j].Name {
						t.Fatalf("column %d named %q, want %q", j, part[j].Name, whole[j].Name)
					}
					for i, v := range part[j].Values {
						if math.Abs(v-whole[j].Values[off+i]) > 1e-9 {
							t.Fatalf("%s at %d from offset %d: %v, whole series %v", part[j].Name, i, off, v, whole[j].Values[off+i])
						}
					}
				}
			}
			// Against FourierFrom on a grid aligned with the origin.
			var t0 int
			switch tt.g.Freq.Unit {
			case calendar.Month:
				t0 = 7 // months after January 2000
			default:
				t0 = 9
			}
			g := tt.g
			origin := calendar.CycleOrigin
			if tt.g.Freq.Unit == calendar.Month {
				origin = date(2000, time.January, 1)
			}
			g.Start = tt.g.Freq.Add(origin, t0)
			got, err := tt.c.Columns(g)
			if err != nil {
				t.Fatal(err)
			}
			want, err := calendar.FourierFrom(t0, g.Len(), tt.c.Period, tt.c.Harmonics)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(want) {
				t.Fatalf("%d columns, FourierFrom %d", len(got), len(want))
			}
			for j := range want {
				for i := range want[j] {
					if math.Abs(got[j].Values[i]-want[j][i]) > 1e-9 {
						t.Fatalf("%s at %d: %v, FourierFrom %v", got[j].Name, i, got[j].Values[i], want[j][i])
					}
				}
			}
		})
	}
}

// TestCycleNames: sin/cos pairs, the last sine left out when 2K = period.
func TestCycleNames(t *testing.T) {
	g := calendar.Grid{Start: date(2024, time.January, 1), Freq: calendar.Daily, N: 10}
	cols, err := calendar.Cycle{Period: 4, Harmonics: 2}.Columns(g)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, c := range cols {
		names = append(names, c.Name)
	}
	if got, want := fmt.Sprint(names), "[cycle 4 sin1 cycle 4 cos1 cycle 4 cos2]"; got != want {
		t.Errorf("names %s, want %s", got, want)
	}
	for _, c := range []calendar.Cycle{{Period: 2, Harmonics: 1}, {Period: 10, Harmonics: 0}, {Period: 10, Harmonics: 6}, {Period: math.Inf(1), Harmonics: 1}, {Period: math.NaN(), Harmonics: 1}} {
		if _, err := c.Columns(g); !errors.Is(err, calendar.ErrFourier) {
			t.Errorf("%+v: %v, want ErrFourier", c, err)
		}
	}
}

// TestDesignBuild: columns of all effects in order; bad designs are
// reported, never a panic.
func TestDesignBuild(t *testing.T) {
	cal := calendar.Calendar{Holidays: []calendar.Holiday{fixed("Year Start", time.January, 1)}}
	d := calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: cal},
		calendar.WorkingDayCount{Calendar: cal},
		calendar.WeekdayCounts{Prefix: "days"},
		calendar.Event{Name: "works", Shape: calendar.Shift, From: date(2024, time.January, 8), Through: date(2024, time.January, 21)},
		calendar.Cycle{Period: 365.25 / 7, Harmonics: 1},
	}}
	cols, err := d.Build(date(2024, time.January, 1), calendar.Weekly, 5, 2)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, c := range cols {
		names = append(names, c.Name)
	}
	if got, want := fmt.Sprint(names), "[holidays working days days Monday days Tuesday days Wednesday days Thursday days Friday days Saturday works cycle 52.18 sin1 cycle 52.18 cos1]"; got != want {
		t.Errorf("names %s\nwant %s", got, want)
	}
	equalSlice(t, "holidays", cols[0].Values, []float64{1, 0, 0, 0, 0, 0, 0})
	equalSlice(t, "working days", cols[1].Values, []float64{4, 5, 5, 5, 5, 5, 5})
	equalSlice(t, "works", cols[8].Values, []float64{0, 1, 1, 0, 0, 0, 0})

	bad := []struct {
		name string
		d    calendar.Design
		want error
	}{
		{"nil effect", calendar.Design{Effects: []calendar.Effect{nil}}, calendar.ErrColumn},
		{"repeated name", calendar.Design{Effects: []calendar.Effect{calendar.HolidayCount{Calendar: cal}, calendar.HolidayCount{Calendar: cal}}}, calendar.ErrColumn},
		{"bad stamp", calendar.Design{Stamp: calendar.Stamp(7)}, calendar.ErrGrid},
		{"bad event", calendar.Design{Effects: []calendar.Effect{calendar.Event{Name: "x", Shape: calendar.Decay, Rate: 2}}}, calendar.ErrRate},
	}
	for _, tt := range bad {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := tt.d.Build(date(2024, time.January, 1), calendar.Weekly, 5, 2); !errors.Is(err, tt.want) {
				t.Errorf("got %v, want %v", err, tt.want)
			}
		})
	}
}

func ExampleDesign() {
	region := calendar.Calendar{Holidays: []calendar.Holiday{
		{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1}},
	}}
	d := calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: region},
		calendar.Event{Name: "strike", Shape: calendar.Decay, From: time.Date(2025, time.January, 13, 0, 0, 0, 0, time.UTC)},
		calendar.Cycle{Period: 365.25 / 7, Harmonics: 1},
	}}
	// Four weeks of history from Monday 30 December 2024 and two ahead.
	cols, err := d.Build(time.Date(2024, time.December, 30, 0, 0, 0, 0, time.UTC), calendar.Weekly, 4, 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range cols {
		fmt.Printf("%-16s", c.Name)
		for _, v := range c.Values {
			fmt.Printf(" %6.3f", v)
		}
		fmt.Println()
	}
	// Output:
	// holidays          1.000  0.000  0.000  0.000  0.000  0.000
	// strike            0.000  0.000  1.000  0.700  0.490  0.343
	// cycle 52.18 sin1 -0.056  0.064  0.184  0.301  0.413  0.519
	// cycle 52.18 cos1  0.998  0.998  0.983  0.954  0.911  0.855
}
