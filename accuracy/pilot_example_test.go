package accuracy_test

import (
	"context"
	"fmt"
	"math"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
)

// A fictional chain of hardware stores forecasts monthly sales of garden
// hoses at one store (invented figures, with two months missing from the
// till system). Pilot chooses the route, fills the gaps and reports what
// it did.
func ExamplePilot() {
	season := []float64{-30, -25, 0, 25, 40, 45, 35, 20, 0, -15, -25, -35}
	v := make([]float64, 60)
	for i := range v {
		v[i] = 120 + 0.5*float64(i) + season[i%12] + float64((i*7)%5)
	}
	v[17], v[41] = math.NaN(), math.NaN()
	y := almanac.Series{Key: "hoses/store 12", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}

	fit, err := accuracy.Pilot{}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	rep := fit.(*accuracy.PilotFit).Report()
	fmt.Println("route:", rep.Route, rep.Periods)
	fmt.Println("models:", len(rep.Members), "filled:", len(rep.Repairs))
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for j := range fc.Mean {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", fc.Time(j).Format("2006-01"), fc.Mean[j], fc.Intervals[0].Lower[j], fc.Intervals[0].Upper[j])
	}
	// Output:
	// route: combination [12]
	// models: 3 filled: 2
	// 2025-01 122.321 [120.187, 124.588]
	// 2025-02 128.113 [125.550, 130.768]
	// 2025-03 154.668 [151.341, 159.315]
}
