package calendar_test

import (
	"errors"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

// TestHasWeek53Published checks the years with 53 ISO weeks in 2000–2040
// against the published list in shared/reference/published.md ("Calendar
// facts": 2004, 2009, 2015, 2020, 2026, 2032, 2037).
func TestHasWeek53Published(t *testing.T) {
	published := []int{2004, 2009, 2015, 2020, 2026, 2032, 2037}
	var got []int
	for y := 2000; y <= 2040; y++ {
		if calendar.HasWeek53(y) {
			got = append(got, y)
		}
		want := 52
		if slices.Contains(published, y) {
			want = 53
		}
		if w := calendar.WeeksInISOYear(y); w != want {
			t.Errorf("WeeksInISOYear(%d) = %d, want %d", y, w, want)
		}
	}
	if !slices.Equal(got, published) {
		t.Errorf("53-week years 2000–2040 = %v, published list %v", got, published)
	}
}

// TestHasWeek53AgainstStdlib cross-checks ISO 8601's rule (a year starts
// on Thursday, or is a leap year starting on Wednesday) with an
// independent implementation, Go's time.Time.ISOWeek: December 28 is
// always in the last week of its ISO year. Gregorian years 1583–4099.
func TestHasWeek53AgainstStdlib(t *testing.T) {
	for y := 1583; y <= 4099; y++ {
		_, w := time.Date(y, time.December, 28, 0, 0, 0, 0, time.UTC).ISOWeek()
		if got := calendar.WeeksInISOYear(y); got != w {
			t.Fatalf("WeeksInISOYear(%d) = %d, time.ISOWeek says %d", y, got, w)
		}
	}
}

func TestISOWeek(t *testing.T) {
	// Examples of ISO 8601 week dates (recalled from memory; each is also
	// confirmed by Go's time.Time.ISOWeek inside ISOWeek).
	tests := []struct {
		name     string
		t        time.Time
		year, wk int
	}{
		{"2008-12-29 is 2009-W01", date(2008, 12, 29), 2009, 1},
		{"2010-01-03 is 2009-W53", date(2010, 1, 3), 2009, 53},
		{"2021-01-01 is 2020-W53", date(2021, 1, 1), 2020, 53},
		{"2024-12-30 is 2025-W01", date(2024, 12, 30), 2025, 1},
		{"2026-12-31 is 2026-W53", date(2026, 12, 31), 2026, 53},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			y, w := calendar.ISOWeek(tt.t)
			if y != tt.year || w != tt.wk {
				t.Errorf("ISOWeek = %d-W%02d, want %d-W%02d", y, w, tt.year, tt.wk)
			}
		})
	}
}

// TestISOWeekStart: every week of 1990–2050 starts on a Monday that
// ISOWeek maps back to the same week, and consecutive weeks are 7 days
// apart (properties of ISO 8601 week dates).
func TestISOWeekStart(t *testing.T) {
	var prev time.Time
	for y := 1990; y <= 2050; y++ {
		for w := 1; w <= calendar.WeeksInISOYear(y); w++ {
			s, err := calendar.ISOWeekStart(y, w, nil)
			if err != nil {
				t.Fatal(err)
			}
			if s.Weekday() != time.Monday {
				t.Fatalf("week %d-W%02d starts on %v", y, w, s.Weekday())
			}
			if gy, gw := s.ISOWeek(); gy != y || gw != w {
				t.Fatalf("ISOWeekStart(%d, %d) = %v, which is %d-W%02d", y, w, s, gy, gw)
			}
			if !prev.IsZero() && s.Sub(prev) != 7*24*time.Hour {
				t.Fatalf("week %d-W%02d starts %v after the previous", y, w, s.Sub(prev))
			}
			prev = s
		}
	}
	for _, tt := range []struct {
		name string
		y, w int
	}{{"week 0", 2024, 0}, {"week 53 of a 52-week year", 2024, 53}, {"negative", 2020, -1}} {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := calendar.ISOWeekStart(tt.y, tt.w, nil); !errors.Is(err, calendar.ErrWeek) {
				t.Errorf("err = %v, want ErrWeek", err)
			}
		})
	}
}
