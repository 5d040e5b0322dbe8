package calendar_test

import (
	"errors"
	"math"
	"testing"
	"time"
	_ "time/tzdata" // DST tests need America/New_York on any machine

	"github.com/almanac-go/almanac/calendar"
)

func date(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

func TestFrequencyAdd(t *testing.T) {
	ny, err := time.LoadLocation("America/New_York")
	if err != nil {
		t.Fatal(err)
	}
	at := func(y int, m time.Month, d, hh, mm int, loc *time.Location) time.Time {
		return time.Date(y, m, d, hh, mm, 0, 0, loc)
	}
	// Expected dates are calendar facts (Gregorian month lengths, leap
	// years; the 2024 US DST change on March 10 at 02:00 local time, as
	// in the IANA time-zone database) — common practice.
	tests := []struct {
		name string
		f    calendar.Frequency
		t    time.Time
		n    int
		want time.Time
	}{
		{"monthly end clamps in leap year", calendar.Monthly, date(2024, 1, 31), 1, date(2024, 2, 29)},
		{"monthly end clamps in common year", calendar.Monthly, date(2023, 1, 31), 1, date(2023, 2, 28)},
		{"monthly keeps the day two months on", calendar.Monthly, date(2023, 1, 31), 2, date(2023, 3, 31)},
		{"monthly negative step clamps", calendar.Monthly, date(2024, 3, 31), -1, date(2024, 2, 29)},
		{"monthly negative across year", calendar.Monthly, date(2024, 1, 15), -13, date(2022, 12, 15)},
		{"quarterly", calendar.Quarterly, date(2023, 11, 30), 1, date(2024, 2, 29)},
		{"yearly from leap day", calendar.Yearly, date(2024, 2, 29), 1, date(2025, 2, 28)},
		{"yearly negative", calendar.Yearly, date(2024, 6, 1), -3, date(2021, 6, 1)},
		{"every 2 months", calendar.Every(2, calendar.Month), date(2024, 1, 1), 6, date(2025, 1, 1)},
		{"weekly", calendar.Weekly, date(2024, 12, 30), 1, date(2025, 1, 6)},
		{"daily negative", calendar.Daily, date(2024, 3, 1), -1, date(2024, 2, 29)},
		{"15 minutes", calendar.Every(15, calendar.Minute), at(2024, 5, 1, 23, 30, time.UTC), 3, at(2024, 5, 2, 0, 15, time.UTC)},
		{"15 minutes negative", calendar.Every(15, calendar.Minute), at(2024, 5, 2, 0, 15, time.UTC), -3, at(2024, 5, 1, 23, 30, time.UTC)},
		{"N zero reads as one", calendar.Frequency{Unit: calendar.Month}, date(2024, 1, 1), 1, date(2024, 2, 1)},
		// Daily steps keep the clock time across the spring-forward day
		// (23 hours elapse).
		{"daily across DST", calendar.Daily, at(2024, 3, 9, 12, 0, ny), 1, at(2024, 3, 10, 12, 0, ny)},
		// Hourly steps are elapsed time: 01:00 EST + 1 h = 03:00 EDT.
		{"hourly across DST", calendar.Hourly, at(2024, 3, 10, 1, 0, ny), 1, at(2024, 3, 10, 3, 0, ny)},
		{"invalid frequency leaves t", calendar.Frequency{}, date(2024, 1, 1), 5, date(2024, 1, 1)},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if got := tt.f.Add(tt.t, tt.n); !got.Equal(tt.want) {
				t.Errorf("%v.Add(%v, %d) = %v, want %v", tt.f, tt.t, tt.n, got, tt.want)
			}
		})
	}
	if d := calendar.Daily.Add(at(2024, 3, 9, 12, 0, ny), 1).Sub(at(2024, 3, 9, 12, 0, ny)); d != 23*time.Hour {
		t.Errorf("daily step across spring-forward lasted %v, want 23h", d)
	}
}

func TestFrequencyBetween(t *testing.T) {
	ny, err := time.LoadLocation("America/New_York")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name    string
		f       calendar.Frequency
		a, b    time.Time
		want    int
		wantErr error
	}{
		{"monthly", calendar.Monthly, date(2020, 1, 1), date(2021, 3, 1), 14, nil},
		{"monthly backwards", calendar.Monthly, date(2021, 3, 1), date(2020, 1, 1), -14, nil},
		{"month ends from the 31st", calendar.Monthly, date(2023, 1, 31), date(2023, 4, 30), 3, nil},
		{"month end not aligned", calendar.Monthly, date(2023, 2, 28), date(2023, 3, 31), 0, calendar.ErrNotAligned},
		{"quarterly", calendar.Quarterly, date(2020, 1, 1), date(2022, 7, 1), 10, nil},
		{"quarterly off grid", calendar.Quarterly, date(2020, 1, 1), date(2020, 2, 1), 0, calendar.ErrNotAligned},
		{"weekly", calendar.Weekly, date(2024, 1, 1), date(2024, 12, 30), 52, nil},
		{"daily across DST", calendar.Daily, time.Date(2024, 3, 9, 0, 0, 0, 0, ny), time.Date(2024, 3, 11, 0, 0, 0, 0, ny), 2, nil},
		{"15 minutes", calendar.Every(15, calendar.Minute), date(2024, 1, 1), date(2024, 1, 2), 96, nil},
		{"15 minutes off grid", calendar.Every(15, calendar.Minute), date(2024, 1, 1), date(2024, 1, 1).Add(10 * time.Minute), 0, calendar.ErrNotAligned},
		{"hourly backwards", calendar.Hourly, date(2024, 1, 2), date(2024, 1, 1), -24, nil},
		{"yearly", calendar.Yearly, date(1949, 1, 1), date(1960, 1, 1), 11, nil},
		{"invalid frequency", calendar.Frequency{Unit: calendar.Unit(42)}, date(2024, 1, 1), date(2024, 1, 1), 0, calendar.ErrFrequency},
		{"minutes far apart saturate Sub", calendar.Every(1, calendar.Minute), date(1, 1, 1), date(9999, 1, 1).Add(time.Minute), 0, calendar.ErrNotAligned},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := tt.f.Between(tt.a, tt.b)
			if tt.wantErr != nil {
				if !errors.Is(err, tt.wantErr) {
					t.Fatalf("err = %v, want %v", err, tt.wantErr)
				}
				return
			}
			if err != nil || got != tt.want {
				t.Fatalf("Between = %d, %v; want %d", got, err, tt.want)
			}
		})
	}
}

// TestAddBetweenRoundTrip: Between(a, Add(a, n)) = n for every frequency
// and a range of n (a property of the pair, not a reference check).
func TestAddBetweenRoundTrip(t *testing.T) {
	starts := []time.Time{date(2024, 1, 31), date(2023, 2, 28), date(2020, 2, 29), time.Date(2024, 3, 9, 13, 45, 0, 0, time.UTC)}
	freqs := []calendar.Frequency{calendar.Every(15, calendar.Minute), calendar.Hourly, calendar.Daily, calendar.Weekly, calendar.Monthly, calendar.Quarterly, calendar.Yearly, calendar.Every(3, calendar.Day)}
	for _, f := range freqs {
		t.Run(f.String(), func(t *testing.T) {
			for _, a := range starts {
				for n := -40; n <= 40; n++ {
					b := f.Add(a, n)
					// From a month end only forward steps stay on the
					// grid of a (Jan 31 − 1 month = Dec 31, but Feb 29 −
					// 1 month = Jan 29): check from the earlier time.
					from, to, want := a, b, n
					if n < 0 {
						from, to, want = b, f.Add(b, -n), -n
					}
					got, err := f.Between(from, to)
					if err != nil || got != want {
						t.Fatalf("Between(%v, %v) = %d, %v; want %d", from, to, got, err, want)
					}
				}
			}
		})
	}
}

func TestSeasonalPeriods(t *testing.T) {
	// Natural cycles: 12 months and 4 quarters a year, 7 days a week,
	// 24 hours a day, 168 hours a week, a mean Julian year of 365.25 days
	// (so weekly data cycle every 365.25/7 ≈ 52.18 weeks) — DESIGN.md and
	// common practice.
	tests := []struct {
		name   string
		f      calendar.Frequency
		want   []float64
		period int
	}{
		{"monthly", calendar.Monthly, []float64{12}, 12},
		{"quarterly", calendar.Quarterly, []float64{4}, 4},
		{"weekly", calendar.Weekly, []float64{365.25 / 7}, 52},
		{"daily", calendar.Daily, []float64{7, 365.25}, 7},
		{"hourly", calendar.Hourly, []float64{24, 168}, 24},
		{"15 minutes", calendar.Every(15, calendar.Minute), []float64{96, 672}, 96},
		{"every 2 months", calendar.Every(2, calendar.Month), []float64{6}, 6},
		{"every 2 days", calendar.Every(2, calendar.Day), []float64{3.5, 182.625}, 4},
		{"every 6 months", calendar.Every(6, calendar.Month), []float64{2}, 2},
		{"yearly", calendar.Yearly, nil, 1},
		{"every 4 days: 7/4 < 2 left out", calendar.Every(4, calendar.Day), []float64{365.25 / 4}, 91},
		{"invalid", calendar.Frequency{}, nil, 1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := tt.f.SeasonalPeriods()
			if len(got) != len(tt.want) {
				t.Fatalf("SeasonalPeriods = %v, want %v", got, tt.want)
			}
			for i := range got {
				if math.Abs(got[i]-tt.want[i]) > 1e-12 {
					t.Errorf("SeasonalPeriods[%d] = %v, want %v", i, got[i], tt.want[i])
				}
			}
			if p := tt.f.Period(); p != tt.period {
				t.Errorf("Period = %d, want %d", p, tt.period)
			}
		})
	}
}

func TestValidateAndString(t *testing.T) {
	tests := []struct {
		name    string
		f       calendar.Frequency
		str     string
		wantErr bool
	}{
		{"monthly", calendar.Monthly, "monthly", false},
		{"daily", calendar.Daily, "daily", false},
		{"hourly", calendar.Hourly, "hourly", false},
		{"quarterly", calendar.Quarterly, "quarterly", false},
		{"15 minutes", calendar.Every(15, calendar.Minute), "every 15 minutes", false},
		{"zero multiple", calendar.Frequency{Unit: calendar.Week}, "weekly", false},
		{"unset", calendar.Frequency{}, "Frequency{unset, 0}", true},
		{"unknown unit", calendar.Frequency{Unit: calendar.Unit(99), N: 1}, "Frequency{Unit(99), 1}", true},
		{"negative multiple", calendar.Frequency{Unit: calendar.Day, N: -2}, "Frequency{day, -2}", true},
		// A period longer than a time.Duration used to wrap to a zero
		// step and panic (divide by zero) in Between and Grid.Locate.
		{"minute multiple overflows", calendar.Every(1<<53, calendar.Minute), "Frequency{minute, 9007199254740992}", true},
		{"hour multiple overflows", calendar.Every(1<<51, calendar.Hour), "Frequency{hour, 2251799813685248}", true},
		{"longest minute multiple", calendar.Every(153722867, calendar.Minute), "every 153722867 minutes", false},
		{"year multiple overflows", calendar.Every(1<<62, calendar.Year), "Frequency{year, 4611686018427387904}", true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			err := tt.f.Validate()
			if tt.wantErr != (err != nil) {
				t.Fatalf("Validate() = %v, wantErr %v", err, tt.wantErr)
			}
			if err != nil && !errors.Is(err, calendar.ErrFrequency) {
				t.Errorf("error %v does not wrap ErrFrequency", err)
			}
			if s := tt.f.String(); s != tt.str {
				t.Errorf("String() = %q, want %q", s, tt.str)
			}
		})
	}
	if !calendar.Every(1, calendar.Month).Equal(calendar.Frequency{Unit: calendar.Month}) {
		t.Error("N = 0 and N = 1 should be Equal")
	}
}
