package accuracy_test

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
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

// A calibrated fit saved at the end of a nightly run, loaded the next day
// and refreshed with the quarter that has come in: the inner ETS model takes
// the new value without re-estimation, and the bands keep the errors
// measured at the fit (calibrate again, with Fit, when a refit is due).
// The store's data are invented.
func ExampleCalibratedFit_Refresh() {
	v := make([]float64, 41)
	for i := range v {
		t := float64(i)
		v[i] = 150 + 2*t + 4*math.Sin(1.1*t)
	}
	y := almanac.Series{Key: "store 07", Start: time.Date(2016, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v[:40]}
	fit, err := accuracy.Calibrated{Model: smoothing.Spec{Trend: smoothing.AdditiveTrend}, Horizon: 4, Origins: 12, MinTrain: 12, MinErrors: 10}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	var doc bytes.Buffer
	if err := almanac.SaveModel(&doc, fit); err != nil {
		fmt.Println(err)
		return
	}
	loaded, err := almanac.LoadModel(&doc)
	if err != nil {
		fmt.Println(err)
		return
	}
	fresh, err := almanac.Refresh(loaded, v[40:])
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, err := fresh.Forecast(2, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(fresh, fresh.(*accuracy.CalibratedFit).Status().Source)
	for h := range 2 {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", fc.Time(h).Format("2006-01"), fc.Mean[h], fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h])
	}
	// Output:
	// calibrated(ETS(A,A,N)) own errors
	// 2026-04 231.470 [227.917, 235.429]
	// 2026-07 233.446 [229.910, 237.415]
}
