package calendar_test

import (
	"fmt"
	"time"

	"github.com/almanac-go/almanac/calendar"
)

func ExampleFrequency_Add() {
	start := time.Date(2025, time.January, 31, 0, 0, 0, 0, time.UTC)
	for i := range 4 {
		fmt.Println(calendar.Monthly.Add(start, i).Format("2006-01-02"))
	}
	n, err := calendar.Monthly.Between(start, time.Date(2025, time.April, 30, 0, 0, 0, 0, time.UTC))
	fmt.Println(n, err)
	// Output:
	// 2025-01-31
	// 2025-02-28
	// 2025-03-31
	// 2025-04-30
	// 3 <nil>
}

func ExampleFrequency_SeasonalPeriods() {
	for _, f := range []calendar.Frequency{calendar.Monthly, calendar.Weekly, calendar.Daily, calendar.Every(15, calendar.Minute)} {
		fmt.Printf("%s: %.3f (period %d)\n", f, f.SeasonalPeriods(), f.Period())
	}
	// Output:
	// monthly: [12.000] (period 12)
	// weekly: [52.179] (period 52)
	// daily: [7.000 365.250] (period 7)
	// every 15 minutes: [96.000 672.000] (period 96)
}

func ExampleHasWeek53() {
	for y := 2024; y <= 2027; y++ {
		fmt.Println(y, calendar.WeeksInISOYear(y))
	}
	y, w := calendar.ISOWeek(time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC))
	fmt.Printf("2027-01-01 is in %d-W%02d\n", y, w)
	// Output:
	// 2024 52
	// 2025 52
	// 2026 53
	// 2027 52
	// 2027-01-01 is in 2026-W53
}

func ExampleFourier() {
	// Two harmonics of a yearly cycle in monthly data, first three months.
	cols, err := calendar.Fourier(3, 12, 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	for t := range 3 {
		fmt.Printf("t=%d: %6.3f %6.3f %6.3f %6.3f\n", t+1, cols[0][t], cols[1][t], cols[2][t], cols[3][t])
	}
	// Output:
	// t=1:  0.500  0.866  0.866  0.500
	// t=2:  0.866  0.500  0.866 -0.500
	// t=3:  1.000  0.000  0.000 -1.000
}
