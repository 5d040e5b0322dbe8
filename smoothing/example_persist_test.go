package smoothing_test

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// An ETS model fitted once, saved, loaded in a later run and refreshed
// with two new quarters, one of them not yet reported (NaN).
func ExampleFitted_Refresh() {
	y := almanac.Series{Key: "garden/seeds", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly,
		Values: []float64{160, 250, 221, 170, 171, 262, 233, 180, 183, 275, 244, 190, 192, 288, 257, 199}}
	fit, err := smoothing.Spec{Error: smoothing.MultiplicativeError, Season: smoothing.MultiplicativeSeason}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	var saved bytes.Buffer
	if err := almanac.SaveModel(&saved, fit); err != nil {
		fmt.Println(err)
		return
	}
	loaded, err := almanac.LoadModel(&saved)
	if err != nil {
		fmt.Println(err)
		return
	}
	fresh, err := almanac.Refresh(loaded, []float64{204, math.NaN()})
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, _ := fresh.Forecast(2)
	fmt.Println(fresh, fc.Start.Format("2006-01"))
	fmt.Printf("%.3f %.3f\n", fc.Mean[0], fc.Mean[1])
	// Output:
	// ETS(M,N,M) 2024-07
	// 268.998 205.360
}
