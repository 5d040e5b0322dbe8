package arima_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
)

// gardenOrders invents six years of monthly orders at a garden-supply
// wholesaler: growth, a spring peak and autocorrelated noise (a demo
// scenario, not real data).
func gardenOrders() almanac.Series {
	src := rand.New(rand.NewPCG(2024, 7))
	v := make([]float64, 72)
	noise := 0.0
	for t := range v {
		noise = 0.5*noise + src.NormFloat64()*0.03
		season := 0.25 * math.Sin(2*math.Pi*float64(t%12-2)/12)
		v[t] = math.Exp(6 + 0.01*float64(t) + season + noise)
	}
	return almanac.Series{Key: "garden orders", Start: time.Date(2019, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// The airline model on the log of a monthly series: the seasonal period
// comes from the series' frequency, estimation is CSS then exact ML.
func ExampleSpec() {
	y := gardenOrders()
	for i, v := range y.Values {
		y.Values[i] = math.Log(v)
	}
	fit, err := arima.Spec{D: 1, Q: 1, SD: 1, SQ: 1}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(fit)
	// Standard errors to two decimals: sma1 is close to −1, where the
	// third decimal of its standard error moves with the optimiser's
	// stopping point.
	for _, c := range fit.(*arima.Fitted).Coef() {
		fmt.Printf("%s %.3f (se %.2f)\n", c.Name, c.Value, c.StdErr)
	}
	fc, err := fit.Forecast(3, 95)
	if err != nil {
		fmt.Println(err)
		return
	}
	for h := range fc.Mean {
		fmt.Printf("%s %.0f [%.0f, %.0f]\n", fc.Time(h).Format("2006-01"), math.Exp(fc.Mean[h]),
			math.Exp(fc.Intervals[0].Lower[h]), math.Exp(fc.Intervals[0].Upper[h]))
	}
	// Output:
	// ARIMA(0,1,1)×(0,1,1)_12
	// ma1 -0.911 (se 0.11)
	// sma1 -0.896 (se 0.61)
	// 2025-01 653 [607, 702]
	// 2025-02 732 [681, 787]
	// 2025-03 840 [781, 903]
}

// Regression with ARIMA errors: monthly sales of a bakery chain with a
// promotion flag; forecasts need the planned promotions.
func ExampleSpec_regressors() {
	src := rand.New(rand.NewPCG(11, 3))
	n := 60
	sales := make([]float64, n)
	promo := make([]float64, n)
	e := 0.0
	for t := range sales {
		if t%7 == 3 {
			promo[t] = 1
		}
		e = 0.6*e + src.NormFloat64()*4
		sales[t] = 200 + 35*promo[t] + e
	}
	y := almanac.Series{Key: "bakery sales", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: sales}
	spec := arima.Spec{P: 1, Regressors: []arima.Regressor{{Name: "promotion", Values: promo}}}
	fm, err := spec.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fit := fm.(*arima.Fitted)
	fmt.Println(fit)
	for _, c := range fit.Coef() {
		fmt.Printf("%s %.3f\n", c.Name, c.Value)
	}
	// Plain Forecast refuses: the future promotions are needed.
	_, err = fit.Forecast(3)
	fmt.Println(errors.Is(err, arima.ErrNeedRegressors))
	fc, err := fit.ForecastWith(3, [][]float64{{0, 1, 0}}, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for h := range fc.Mean {
		fmt.Printf("step %d: %.3f\n", h+1, fc.Mean[h])
	}
	// Output:
	// ARIMA(1,0,0) + mean + regressors(promotion)
	// ar1 0.570
	// mean 199.932
	// promotion 33.706
	// true
	// step 1: 201.511
	// step 2: 234.538
	// step 3: 200.445
}

// Sample paths for a simulation-based plan: how often do the next three
// months' garden orders exceed 2 150 units in total?
func ExampleFitted_Simulate() {
	y := gardenOrders()
	fit, err := arima.Spec{P: 1, Q: 1, SD: 1}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	paths, err := fit.(*arima.Fitted).Simulate(3, 10000, rand.NewPCG(1, 2))
	if err != nil {
		fmt.Println(err)
		return
	}
	over := 0
	for _, p := range paths {
		if p[0]+p[1]+p[2] > 2150 {
			over++
		}
	}
	fmt.Println(fit)
	fc, _ := fit.Forecast(3)
	fmt.Printf("mean total %.0f\n", fc.Mean[0]+fc.Mean[1]+fc.Mean[2])
	fmt.Printf("P(total > 2150) ≈ %.2f\n", float64(over)/float64(len(paths)))
	// Output:
	// ARIMA(1,0,1)×(0,1,0)_12
	// mean total 2092
	// P(total > 2150) ≈ 0.25
}
