package arima_test

import (
	"context"
	"fmt"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
)

// Monthly visitors of a fictional store: the model is estimated once and
// then advanced month by month without re-estimation.
func ExampleFitted_Update() {
	y := almanac.Series{Key: "store-2/visitors", Start: time.Date(2022, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly,
		Values: []float64{512, 530, 541, 537, 556, 571, 566, 580, 597, 590, 611, 623, 618, 634, 649, 641, 660, 672, 669, 688}}
	fit, err := arima.Spec{P: 1, D: 1, Constant: arima.ConstantInclude}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	next, err := fit.(*arima.Fitted).Update([]float64{701, 694})
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, _ := next.Forecast(1, 80)
	fmt.Println(next, fc.Start.Format("2006-01"))
	fmt.Printf("%.3f [%.3f, %.3f]\n", fc.Mean[0], fc.Intervals[0].Lower[0], fc.Intervals[0].Upper[0])
	// Output:
	// ARIMA(1,1,0) + drift 2023-11
	// 710.954 [699.198, 722.709]
}
