package nightly

import (
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

func TestParseValue(t *testing.T) {
	for _, tc := range []struct {
		in     string
		want   float64
		reason string
	}{
		{"12.5", 12.5, ""},
		{" -3e2 ", -300, ""},
		{"0.1", 0.1, ""},
		{"", math.NaN(), ""},
		{"na", math.NaN(), ""},
		{"N/A", math.NaN(), ""},
		{"NaN", math.NaN(), ""},
		{"null", math.NaN(), ""},
		{"12..5", 0, ReasonBadValue},
		{"0x1p3", 0, ReasonBadValue},
		{"1_000", 0, ReasonBadValue},
		{"1e", 0, ReasonBadValue},
		{"twelve", 0, ReasonBadValue},
		{"+Inf", 0, ReasonNonFinite},
		{"-infinity", 0, ReasonNonFinite},
		{"1e400", 0, ReasonNonFinite},
	} {
		t.Run(tc.in, func(t *testing.T) {
			v, reason, err := parseValue(tc.in)
			if reason != tc.reason || (err != nil) != (tc.reason != "") {
				t.Fatalf("parseValue(%q) = %v, %q, %v; want reason %q", tc.in, v, reason, err, tc.reason)
			}
			if tc.reason == "" && !(v == tc.want || math.IsNaN(v) && math.IsNaN(tc.want)) {
				t.Errorf("parseValue(%q) = %v, want %v", tc.in, v, tc.want)
			}
		})
	}
}

// TestInferFrequency checks the per-series rule against the frequencies
// almanac.ReadCSV documents for whole files (CSVOptions.Freq).
func TestInferFrequency(t *testing.T) {
	d := func(y int, m time.Month, day int) time.Time { return time.Date(y, m, day, 0, 0, 0, 0, time.UTC) }
	for _, tc := range []struct {
		name  string
		times []time.Time
		want  calendar.Frequency
		ok    bool
	}{
		{"monthly with a gap", []time.Time{d(2024, 1, 1), d(2024, 2, 1), d(2024, 5, 1)}, calendar.Monthly, true},
		{"quarterly", []time.Time{d(2024, 1, 1), d(2024, 4, 1), d(2024, 10, 1)}, calendar.Quarterly, true},
		{"yearly", []time.Time{d(2020, 1, 1), d(2021, 1, 1)}, calendar.Yearly, true},
		{"weekly", []time.Time{d(2024, 1, 1), d(2024, 1, 8), d(2024, 1, 22)}, calendar.Weekly, true},
		{"daily", []time.Time{d(2024, 1, 1), d(2024, 1, 2)}, calendar.Daily, true},
		{"15 minutes", []time.Time{d(2024, 1, 1), d(2024, 1, 1).Add(15 * time.Minute)}, calendar.Every(15, calendar.Minute), true},
		{"one time", []time.Time{d(2024, 1, 1)}, calendar.Frequency{}, false},
		{"seconds", []time.Time{d(2024, 1, 1), d(2024, 1, 1).Add(time.Second)}, calendar.Frequency{}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, err := inferFrequency(tc.times)
			if (err == nil) != tc.ok || tc.ok && !got.Equal(tc.want) {
				t.Errorf("inferFrequency = %v, %v; want %v (ok %v)", got, err, tc.want, tc.ok)
			}
		})
	}
}
