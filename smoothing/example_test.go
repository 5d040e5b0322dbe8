package smoothing_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/smoothing"
)

// bookings is an invented demo series: monthly room bookings of a
// fictional lakeside guesthouse over four years, growing, with a summer
// peak, and some noise from a fixed seed.
func bookings() almanac.Series {
	rng := rand.New(rand.NewPCG(2024, 1))
	v := make([]float64, 48)
	for t := range v {
		season := 1 + 0.35*math.Sin(2*math.Pi*float64(t-3)/12)
		v[t] = math.Round((300 + 4*float64(t)) * season * (1 + 0.04*rng.NormFloat64()))
	}
	return almanac.Series{Key: "guesthouse", Start: time.Date(2021, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// Fit one model of the taxonomy and forecast with 80% intervals.
func ExampleSpec() {
	spec := smoothing.Spec{
		Error:  smoothing.MultiplicativeError,
		Trend:  smoothing.DampedTrend,
		Season: smoothing.MultiplicativeSeason,
	}
	fit, err := spec.Fit(context.Background(), bookings())
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(fit)
	for h := range fc.Mean {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", fc.Time(h).Format("2006-01"), fc.Mean[h], fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h])
	}
	// Output:
	// ETS(M,Ad,M)
	// 2025-01 322.184 [308.263, 336.105]
	// 2025-02 334.475 [320.005, 348.945]
	// 2025-03 406.175 [388.555, 423.794]
}

// Fix some parameters and estimate the rest.
func ExampleSpec_fixed() {
	spec := smoothing.Spec{
		Trend: smoothing.AdditiveTrend,
		Alpha: smoothing.Value(0.3),
		Beta:  smoothing.Value(0.05),
	}
	fit, err := spec.Fit(context.Background(), bookings())
	if err != nil {
		fmt.Println(err)
		return
	}
	m := fit.(*smoothing.Fitted)
	fmt.Printf("%v alpha=%.3f beta=%.3f level0=%.3f\n", m, m.Params.Alpha, m.Params.Beta, m.InitLevel)
	// Output:
	// ETS(A,A,N) alpha=0.300 beta=0.050 level0=251.119
}

// Let Select choose the model by AICc.
func ExampleSelect() {
	fit, err := smoothing.Select{}.Fit(context.Background(), bookings())
	if err != nil {
		fmt.Println(err)
		return
	}
	m := fit.(*smoothing.Fitted)
	fmt.Printf("%v AICc %.3f\n", m, m.AICc)
	fc, _ := m.Forecast(2, 95)
	for h := range fc.Mean {
		fmt.Printf("%.3f [%.3f, %.3f]\n", fc.Mean[h], fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h])
	}
	// Output:
	// ETS(M,Ad,M) AICc 444.510
	// 322.184 [300.894, 343.474]
	// 334.475 [312.345, 356.605]
}

// Classical Holt-Winters with fixed constants.
func ExampleHoltWinters() {
	fit, err := smoothing.HoltWinters{Alpha: 0.4, Beta: 0.05, Gamma: 0.3, Multiplicative: true}.Fit(context.Background(), bookings())
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, _ := fit.Forecast(2, 95)
	fmt.Println(fit)
	fmt.Printf("%.3f %.3f\n", fc.Mean[0], fc.Mean[1])
	// Output:
	// Holt-Winters(multiplicative)
	// 313.301 334.264
}

// Append new observations without re-estimating.
func ExampleFitted_Update() {
	y := bookings()
	fit, err := smoothing.Spec{Season: smoothing.MultiplicativeSeason, Error: smoothing.MultiplicativeError}.Fit(context.Background(), y.Head(44))
	if err != nil {
		fmt.Println(err)
		return
	}
	up, err := fit.(*smoothing.Fitted).Update(y.Values[44:])
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, _ := up.Forecast(1)
	fmt.Printf("%s %.3f\n", fc.Start.Format("2006-01"), fc.Mean[0])
	// Output:
	// 2025-01 307.616
}

// List every candidate Select tried, with its criterion value; here the
// undamped trend is admitted too.
func ExampleSelect_Compare() {
	cands, best, err := smoothing.Select{Errors: []smoothing.ErrorType{smoothing.MultiplicativeError}, Seasons: []smoothing.SeasonType{smoothing.MultiplicativeSeason}, UndampedTrends: true}.Compare(context.Background(), bookings())
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, c := range cands {
		mark := ""
		if i == best {
			mark = " <- chosen"
		}
		fmt.Printf("%v AICc %.3f%s\n", c.Spec, c.Score, mark)
	}
	// Output:
	// ETS(M,N,M) AICc 451.390
	// ETS(M,A,M) AICc 431.617 <- chosen
	// ETS(M,Ad,M) AICc 444.510
}

// Draw reproducible sample paths from a fitted model.
func ExampleFitted_Simulate() {
	fit, err := smoothing.Spec{Error: smoothing.MultiplicativeError, Trend: smoothing.AdditiveTrend, Season: smoothing.MultiplicativeSeason}.Fit(context.Background(), bookings())
	if err != nil {
		fmt.Println(err)
		return
	}
	paths, err := fit.(*smoothing.Fitted).Simulate(3, 2, rand.NewPCG(1, 2))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range paths {
		fmt.Printf("%.3f %.3f %.3f\n", p[0], p[1], p[2])
	}
	// Output:
	// 327.280 336.957 410.981
	// 312.192 332.003 369.384
}
