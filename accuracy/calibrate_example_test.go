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

// Calibrated bands for a small catalogue: quarterly sales of 30 invented
// hardware stores, each fitted with the drift method wrapped in
// Calibrated; PoolCalibration then gives every store the scale-free
// errors of all the stores, and the bands and the year's total come from
// them. The stores' growth is slowing, which the drift method does not
// know: its forecasts run high, and its own bands are centred on them.
// The calibrated bands learn from the out-of-sample errors that the
// outcomes fall lower, and sit lower.
func ExampleCalibrated() {
	var stores []almanac.Series
	for k := range 30 {
		v := make([]float64, 40)
		for i := range v {
			// A trend that bends down and a wobble that differs by store.
			t := float64(i)
			v[i] = 200 + float64(k) + 3*t - 0.04*t*t + float64(k%5+2)*math.Sin(1.3*t+float64(k))
		}
		stores = append(stores, almanac.Series{Key: fmt.Sprintf("store %02d", k), Start: time.Date(2015, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v})
	}
	spec := accuracy.Calibrated{Model: almanac.Drift{}, Horizon: 4}
	ctx := context.Background()
	results, err := almanac.BatchFit(ctx, spec, stores, almanac.BatchOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	results, err = accuracy.PoolCalibration(results, accuracy.PoolOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fit := results[0].Fitted.(*accuracy.CalibratedFit)
	st := fit.Status()
	fmt.Printf("%s: %d origins of its own, %d trajectories pooled, bands from %v\n", fit, st.Own, st.Pooled, st.Source)

	fc, err := fit.Forecast(4, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	raw, _ := fit.Inner().Forecast(4, 80)
	for h := range 4 {
		fmt.Printf("%s %.3f  calibrated [%.3f, %.3f]  model's own [%.3f, %.3f]\n", fc.Time(h).Format("2006-01"), fc.Mean[h],
			fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h], raw.Intervals[0].Lower[h], raw.Intervals[0].Upper[h])
	}
	// The year's total from the calibrated sample paths.
	var totals []float64
	for _, p := range fc.SamplePaths() {
		totals = append(totals, p[0]+p[1]+p[2]+p[3])
	}
	band, _ := (almanac.Forecast{Mean: []float64{0}, Dist: &almanac.Sample{Paths: columns(totals)}}).Quantile(0.9)
	fmt.Printf("year's total: 90%% quantile %.3f\n", band[0])
	// Output:
	// calibrated(Drift): 9 origins of its own, 270 trajectories pooled, bands from pooled errors
	// 2025-01 258.464  calibrated [255.262, 260.376]  model's own [255.933, 260.994]
	// 2025-04 259.925  calibrated [254.139, 262.342]  model's own [256.302, 263.548]
	// 2025-07 261.387  calibrated [255.171, 263.415]  model's own [256.896, 265.877]
	// 2025-10 262.848  calibrated [256.578, 262.261]  model's own [257.602, 268.095]
	// year's total: 90% quantile 1046.248
}
