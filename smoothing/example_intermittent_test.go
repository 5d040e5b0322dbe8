package smoothing_test

import (
	"context"
	"fmt"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// A workshop keeps a rarely used pump seal in stock; weekly demand (an
// invented series) is mostly zero. Croston's method, its Syntetos–Boylan
// correction and TSB each give a demand rate per week.
func ExampleCroston() {
	y := almanac.Series{
		Key:    "pump-seal",
		Start:  time.Date(2025, 1, 6, 0, 0, 0, 0, time.UTC),
		Freq:   calendar.Weekly,
		Values: []float64{0, 0, 2, 0, 0, 0, 1, 0, 3, 0, 0, 0, 0, 2, 0, 1, 0, 0, 0, 4, 0, 0, 1, 0},
	}
	for _, m := range []almanac.Model{
		smoothing.Croston{},
		smoothing.Croston{Variant: smoothing.CrostonSBA},
		smoothing.TSB{Alpha: 0.1, Beta: 0.1},
	} {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			fmt.Println(err)
			return
		}
		fc, err := fit.Forecast(4)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("%-8v %.3f per week, %.3f over the next 4 weeks\n", fit, fc.Mean[0], 4*fc.Mean[0])
	}
	// A 90% band for next week's demand, from paths of the fitted
	// process (never below zero).
	fit, _ := smoothing.Croston{Seed: 7}.Fit(context.Background(), y)
	fc, err := fit.Forecast(4, 90)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("90%% band for next week: [%.3f, %.3f]\n", fc.Intervals[0].Lower[0], fc.Intervals[0].Upper[0])
	// Output:
	// Croston  0.637 per week, 2.548 over the next 4 weeks
	// SBA      0.605 per week, 2.421 over the next 4 weeks
	// TSB      0.616 per week, 2.465 over the next 4 weeks
	// 90% band for next week: [0.000, 3.345]
}

// TSB with both constants estimated by minimum in-sample squared error.
func ExampleTSB() {
	y := almanac.Series{
		Key:    "filter-cartridge",
		Start:  time.Date(2025, 1, 6, 0, 0, 0, 0, time.UTC),
		Freq:   calendar.Weekly,
		Values: []float64{3, 0, 0, 2, 0, 4, 0, 0, 0, 3, 0, 2, 0, 0, 5, 0, 0, 0, 0, 2, 0, 0, 0, 0, 0, 1},
	}
	fit, err := smoothing.TSB{Estimate: true}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	f := fit.(*smoothing.IntermittentFit)
	fmt.Printf("alpha %.3f beta %.3f: probability %.3f, size %.3f, rate %.3f\n", f.Alpha, f.Beta, f.Probability, f.Size, f.Rate)
	// Output:
	// alpha 0.010 beta 0.216: probability 0.298, size 2.980, rate 0.887
}
