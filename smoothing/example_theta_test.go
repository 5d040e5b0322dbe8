package smoothing_test

import (
	"context"
	"fmt"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// A regional ferry operator forecasts monthly ticket sales (thousands; an
// invented series with a summer peak and slow growth) with the classic
// Theta method. The seasonal test finds the summer pattern, so the series
// is adjusted before forecasting and the forecasts are reseasonalised.
func ExampleTheta() {
	sales := []float64{
		41, 45, 49, 60, 65, 82, 90, 93, 69, 58, 44, 45,
		44, 43, 55, 60, 73, 83, 99, 93, 77, 58, 49, 44,
		47, 49, 54, 66, 74, 91, 101, 103, 78, 65, 50, 50,
		46, 52, 60, 66, 80, 93, 110, 104, 85, 65, 55, 50,
	}
	y := almanac.Series{
		Key:    "ferry-tickets",
		Start:  time.Date(2021, 1, 1, 0, 0, 0, 0, time.UTC),
		Freq:   calendar.Monthly,
		Values: sales,
	}
	fit, err := smoothing.Theta{}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	th := fit.(*smoothing.ThetaFit)
	fmt.Printf("%v: seasonally adjusted %v, alpha %.3f, drift %.3f per month\n", th, th.Adjusted, th.Alpha, th.Drift)
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for h := range fc.Mean {
		fmt.Printf("%s: %.3f [%.3f, %.3f]\n", fc.Time(h).Format("2006-01"), fc.Mean[h], fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h])
	}
	// Output:
	// Theta: seasonally adjusted true, alpha 0.293, drift 0.145 per month
	// 2025-01: 50.117 [48.176, 52.058]
	// 2025-02: 52.308 [50.201, 54.416]
	// 2025-03: 61.282 [58.722, 63.841]
}
