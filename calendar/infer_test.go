package calendar_test

import (
	"errors"
	"testing"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

func TestInfer(t *testing.T) {
	d := func(y int, m time.Month, day, h, min int) time.Time {
		return time.Date(y, m, day, h, min, 0, 0, time.UTC)
	}
	tests := []struct {
		name   string
		groups [][]time.Time
		want   calendar.Frequency
		err    bool
	}{
		{"monthly", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 2, 1, 0, 0), d(2024, 4, 1, 0, 0)}}, calendar.Monthly, false},
		{"quarterly", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 7, 1, 0, 0), d(2024, 4, 1, 0, 0)}}, calendar.Every(1, calendar.Quarter), false},
		{"yearly across groups", [][]time.Time{{d(2020, 1, 1, 0, 0), d(2022, 1, 1, 0, 0)}, {d(2021, 6, 1, 0, 0), d(2024, 6, 1, 0, 0)}}, calendar.Every(1, calendar.Year), false},
		{"every two months", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 3, 1, 0, 0), d(2024, 7, 1, 0, 0)}}, calendar.Every(2, calendar.Month), false},
		{"weekly", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 1, 15, 0, 0), d(2024, 1, 8, 0, 0)}}, calendar.Every(1, calendar.Week), false},
		{"daily", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 1, 4, 0, 0), d(2024, 1, 2, 0, 0)}}, calendar.Every(1, calendar.Day), false},
		{"hourly", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 1, 1, 3, 0), d(2024, 1, 1, 1, 0)}}, calendar.Every(1, calendar.Hour), false},
		{"quarter hours", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 1, 1, 0, 45), d(2024, 1, 1, 0, 15)}}, calendar.Every(15, calendar.Minute), false},
		{"duplicates ignored", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 1, 1, 0, 0), d(2024, 2, 1, 0, 0)}}, calendar.Monthly, false},
		{"single times only", [][]time.Time{{d(2024, 1, 1, 0, 0)}, {d(2025, 1, 1, 0, 0)}}, calendar.Frequency{}, true},
		{"no groups", nil, calendar.Frequency{}, true},
		{"empty group", [][]time.Time{{}}, calendar.Frequency{}, true},
		{"seconds apart", [][]time.Time{{d(2024, 1, 1, 0, 0), d(2024, 1, 1, 0, 0).Add(30 * time.Second)}}, calendar.Frequency{}, true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := calendar.Infer(tt.groups...)
			if tt.err {
				if !errors.Is(err, calendar.ErrFrequency) {
					t.Fatalf("Infer = %v, %v; want an error wrapping ErrFrequency", got, err)
				}
				return
			}
			if err != nil || got != tt.want {
				t.Fatalf("Infer = %v, %v; want %v", got, err, tt.want)
			}
		})
	}
}
