package almanac_test

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// A combination of three benchmark methods on the invented watering-can
// sales; any Model can be a member (smoothing.Select, arima.Search,
// smoothing.Theta, ...). The member that cannot be fitted (a seasonal
// naive method with a period longer than the series) is left out and
// reported.
func ExampleCombination() {
	y := almanac.Series{Key: "cans", Start: time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: cans}
	spec := almanac.Combination{Members: []almanac.Model{
		almanac.SeasonalNaive{},
		almanac.Drift{},
		almanac.SeasonalNaive{Period: 52},
		almanac.Naive{},
	}}
	fit, err := spec.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(fit)
	for _, m := range fit.(*almanac.CombinationFit).Failures() {
		fmt.Printf("left out: member %d (%s), too short: %v\n", m.Index, m.Model, errors.Is(m.Err, almanac.ErrTooShort))
	}
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for h := range fc.Horizon() {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", fc.Time(h).Format("2006-01"), fc.Mean[h], fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h])
	}
	// Output:
	// mean(SeasonalNaive(12), Drift, Naive)
	// left out: member 2 (almanac.SeasonalNaive), too short: true
	// 2025-01 53.884 [36.439, 69.473]
	// 2025-02 55.101 [32.895, 76.435]
	// 2025-03 61.319 [34.929, 87.126]
}
