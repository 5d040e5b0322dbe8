package accuracy_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
)

// A small bakery compares last quarter's order forecasts with what was
// ordered (invented figures).
func ExampleMASE() {
	history := []float64{120, 132, 128, 141, 150, 146, 158, 163} // weekly orders so far
	actual := []float64{170, 166, 181}
	forecast := []float64{165, 168, 172}

	mae, _ := accuracy.MAE(actual, forecast)
	smape, _ := accuracy.SMAPE(actual, forecast)
	mase, _ := accuracy.MASE(actual, forecast, history, 1)
	bias, _ := accuracy.ME(actual, forecast)
	fmt.Printf("MAE %.3f  sMAPE %.3f%%  MASE %.3f  bias %.3f\n", mae, smape, mase, bias)

	// A zero in the actual values makes MAPE undefined: an error, not a number.
	_, err := accuracy.MAPE([]float64{0, 4}, []float64{1, 5})
	fmt.Println(err)
	// Output:
	// MAE 5.333  sMAPE 3.094%  MASE 0.633  bias 4.000
	// accuracy: MAPE: measure undefined for this data: actual value 0 at index 0
}

// Scoring prediction intervals, quantiles and a normal forecast
// distribution (invented figures).
func ExampleIntervalScore() {
	actual := []float64{52, 61, 47}
	lower := []float64{45, 50, 49} // 90% intervals
	upper := []float64{60, 65, 63}
	cover, _ := accuracy.Coverage(actual, lower, upper)
	score, _ := accuracy.IntervalScore(actual, lower, upper, 90)
	fmt.Printf("coverage %.3f  interval score %.3f\n", cover, score)

	q90 := []float64{58, 63, 60}
	pin, _ := accuracy.Pinball(actual, q90, 0.9)
	crps, _ := accuracy.CRPSNormal(actual, []float64{52.5, 57.5, 56}, []float64{4.5, 4.5, 4.3})
	fmt.Printf("pinball(0.9) %.3f  CRPS %.3f\n", pin, crps)
	// Output:
	// coverage 0.667  interval score 28.000
	// pinball(0.9) 0.700  CRPS 3.263
}

// citySeries is an invented monthly series of bus-pass sales in a small
// city: a slow trend, a summer dip and a September peak.
func citySeries() almanac.Series {
	season := []float64{0, -10, 5, 8, 2, -25, -40, -30, 45, 20, 10, 15}
	v := make([]float64, 84)
	for i := range v {
		v[i] = 400 + 1.5*float64(i) + season[i%12] + 6*math.Sin(float64(i)*1.7)
	}
	return almanac.Series{Key: "bus passes", Start: time.Date(2018, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// Residual diagnostics of a fitted model: are the one-step errors white
// noise?
func ExampleResiduals_Diagnose() {
	y := citySeries()
	fit, err := almanac.SeasonalNaive{}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	d, err := accuracy.Residuals{Period: 12}.Diagnose(fit)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d residuals, mean %.3f, ACF bound ±%.3f\n", d.N, d.Mean, d.ACF.Bound)
	fmt.Printf("%v: Q = %.3f on %d df, p = %.3f\n", d.LjungBox.Kind, d.LjungBox.Statistic, d.LjungBox.DF, d.LjungBox.PValue)
	fmt.Println("significant ACF lags:", d.ACF.Significant())
	// Output:
	// 72 residuals, mean 18.021, ACF bound ±0.231
	// Ljung-Box: Q = 433.723 on 14 df, p = 0.000
	// significant ACF lags: [2 3 4 5 6 7 8 9 11 13 15 16 17 18]
}

// A rolling-origin backtest of a model against the naive and seasonal
// naive benchmarks.
func ExampleBacktest_Run() {
	y := citySeries()
	bt := accuracy.Backtest{Horizon: 6, Origins: 12, Levels: []float64{80}}
	c, err := bt.Run(context.Background(), y,
		accuracy.Candidate{Name: "drift", Model: almanac.Drift{}},
	)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range c.Runs {
		iv, _ := r.Overall.Interval(80)
		fmt.Printf("%-15s MASE %.3f  vs %s %.3f  80%% coverage %.3f\n", r.Name, r.Overall.MASE, c.Baseline, r.Relative.MASE, iv.Coverage)
	}
	// Output:
	// drift           MASE 1.615  vs seasonal naive 1.608  80% coverage 0.944
	// naive           MASE 1.573  vs seasonal naive 1.567  80% coverage 0.944
	// seasonal naive  MASE 1.004  vs seasonal naive 1.000  80% coverage 0.722
}

// The comparison as a table for the terminal (its layout is not a stable
// API).
func ExampleComparison_WriteText() {
	bt := accuracy.Backtest{Horizon: 3, Origins: 6, Levels: []float64{80}}
	c, err := bt.Run(context.Background(), citySeries())
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := c.WriteText(os.Stdout); err != nil {
		fmt.Println(err)
	}
	// Output:
	// backtest of bus passes: 6 origins, 3 steps ahead each, expanding window, errors scaled by lag-12 naive
	//
	//                                                   naive   seasonal naive
	//                                                               (baseline)
	// bias (mean error)                                 7.889           18.323
	// mean absolute error                              35.547           18.323
	// root mean squared error                          42.055           19.263
	// median absolute error                            30.717           17.940
	// mean absolute % error                             6.738            3.581
	// symmetric % error (M3)                            6.889            3.654
	// scaled abs error (MASE)                           1.972            1.018
	// scaled sq error (RMSSE)                           2.215            1.016
	// tracking signal (a)                               3.995           18.000
	// CRPS                                             24.039           11.462
	// 3-step total: mean abs error                    105.089           54.968
	// 3-step total: scaled abs error                    1.943            1.018
	// 80% band, each step: inside                       0.833            0.722
	// 80% band, each step: interval score             139.704           53.646
	// 80% band, each step: scaled (MSIS)                7.754            2.979
	// 80% band, 3-step total: inside                    0.667            0.000
	// 80% band, 3-step total: scaled (MSIS)             6.116            3.812
	//
	// ratio to seasonal naive, the baseline (below 1 is better):
	//   absolute error                                  1.940            1.000
	//   squared error (root)                            2.183            1.000
	//   symmetric % error                               1.885            1.000
	//   scaled abs error                                1.938            1.000
	//   CRPS                                            2.097            1.000
	//
	// scaled abs error by step ahead:
	//   step 1                                          1.360            0.929
	//   step 2                                          2.112            1.073
	//   step 3                                          2.445            1.051
	//
	// lowest scaled abs error: seasonal naive
	//
	// (a) tracking signal = sum of the errors / mean absolute error (the cumulative form, Brown 1959, of the signal Trigg 1964 smooths): near 0 the forecasts are unbiased; beyond about +4 they run persistently low, below -4 persistently high
}

// A batch backtest over a small product range, with the M4 competition's
// Naive2 benchmark added and OWA against it (invented figures). A pass
// launched ten months ago cannot hold eight origins: it is left out and
// the averages cover the other two.
func ExampleBacktest_RunBatch() {
	bus := citySeries()
	ferry := citySeries()
	ferry.Key = "ferry passes"
	ferry.Values = append([]float64(nil), ferry.Values...)
	for i := range ferry.Values {
		ferry.Values[i] = 0.4*ferry.Values[i] + 3*float64(i%5)
	}
	tram := bus.Tail(10)
	tram.Key = "tram passes"
	bt := accuracy.Backtest{
		Horizon: 6,
		Origins: 8,
		Benchmarks: []accuracy.Candidate{
			{Name: accuracy.NaiveName, Model: almanac.Naive{}},
			{Name: accuracy.SeasonalNaiveName, Model: almanac.SeasonalNaive{}},
			{Name: accuracy.Naive2Name, Model: accuracy.Naive2{}},
		},
	}
	b, err := bt.RunBatch(context.Background(), []almanac.Series{bus, ferry, tram},
		accuracy.Candidate{Name: "drift", Model: almanac.Drift{}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range b.Failed {
		fmt.Printf("left out: %s (too short: %t)\n", f.Key, errors.Is(f.Err, almanac.ErrTooShort))
	}
	fmt.Printf("averaged over %d of %d series\n", b.Scored(), len(b.Series))
	for i, name := range b.Names {
		owa, _ := b.OWA(name, accuracy.Naive2Name)
		fmt.Printf("%-15s sMAPE %.3f  MASE %.3f  OWA %.3f\n", name, b.Mean[i].SMAPE, b.Mean[i].MASE, owa)
	}
	// Output:
	// left out: tram passes (too short: true)
	// averaged over 2 of 3 series
	// drift           sMAPE 4.365  MASE 1.145  OWA 1.869
	// naive           sMAPE 4.311  MASE 1.126  OWA 1.842
	// seasonal naive  sMAPE 4.155  MASE 1.032  OWA 1.730
	// naive2          sMAPE 2.406  MASE 0.595  OWA 1.000
}

// Naive2, the seasonally adjusted naive benchmark, on the invented
// bus-pass series, and the OWA of a forecast against it.
func ExampleNaive2() {
	y := citySeries()
	train, test, err := y.Split(12) // hold out the last year
	if err != nil {
		fmt.Println(err)
		return
	}
	fit, err := accuracy.Naive2{}.Fit(context.Background(), train)
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, err := fit.Forecast(12, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: first forecasts %.3f %.3f %.3f\n", fit, fc.Mean[0], fc.Mean[1], fc.Mean[2])

	sn, err := almanac.SeasonalNaive{}.Fit(context.Background(), train)
	if err != nil {
		fmt.Println(err)
		return
	}
	other, _ := sn.Forecast(12)
	smape2, _ := accuracy.SMAPE(test.Values, fc.Mean)
	mase2, _ := accuracy.MASE(test.Values, fc.Mean, train.Values, 12)
	smape, _ := accuracy.SMAPE(test.Values, other.Mean)
	mase, _ := accuracy.MASE(test.Values, other.Mean, train.Values, 12)
	owa, _ := accuracy.OWA(smape, mase, smape2, mase2)
	fmt.Printf("seasonal naive OWA against Naive2: %.3f\n", owa)
	// Output:
	// Naive2(12): first forecasts 511.859 499.021 514.762
	// seasonal naive OWA against Naive2: 2.236
}
