package arima_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
)

// guestNights is an invented scenario: monthly overnight stays at a small
// lakeside guest house over eight years, growing slowly, busy in summer,
// with irregular noise. The numbers are generated, not observed.
func guestNights() almanac.Series {
	src := rand.New(rand.NewPCG(2024, 7))
	v := make([]float64, 96)
	level := 300.0
	for t := range v {
		level += 1.2 + 4*src.NormFloat64()
		season := 90 * math.Sin(2*math.Pi*float64(t%12-3)/12)
		v[t] = math.Round(level + season + 10*src.NormFloat64())
	}
	return almanac.Series{Key: "guest nights", Start: time.Date(2017, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

// ExampleSearch chooses the orders of a seasonal ARIMA model for a monthly
// series and forecasts the next quarter with 80% intervals.
func ExampleSearch() {
	y := guestNights()
	fit, err := arima.Search{}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Search.Fit returns the chosen model as a *arima.Fitted, like
	// Spec.Fit; the record of the search comes with it.
	model := fit.(*arima.Fitted)
	fmt.Println("chosen:", model)
	fmt.Printf("candidates tried: %d, AICc %.1f\n", len(model.SearchResult().Candidates), model.AICc())
	fc, err := fit.Forecast(3, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	lo, hi, _ := fc.Bounds(80)
	for h := range fc.Mean {
		fmt.Printf("%s  %.0f  [%.0f, %.0f]\n", fc.Time(h).Format("2006-01"), fc.Mean[h], lo[h], hi[h])
	}
	// Output:
	// chosen: ARIMA(1,0,1)×(2,1,0)_12
	// candidates tried: 38, AICc 696.7
	// 2025-01  265  [247, 282]
	// 2025-02  283  [264, 301]
	// 2025-03  302  [283, 321]
}

// ExampleSearch_Compare searches the whole bounded grid in parallel,
// ranks by BIC, and lists the three best candidates.
func ExampleSearch_Compare() {
	y := guestNights()
	s := arima.Search{Exhaustive: true, Workers: 2, Criterion: arima.BIC, MaxP: 1, MaxQ: 1, MaxSP: 1, MaxSQ: 1}
	res, err := s.Compare(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("chosen:", res.Model)
	fmt.Println("grid size:", len(res.Candidates))
	for _, i := range res.Ranked()[:3] {
		c := res.Candidates[i]
		fmt.Printf("%-36s BIC %.1f\n", c, c.Score)
	}
	// Output:
	// chosen: ARIMA(1,0,1)×(1,1,0)_12
	// grid size: 32
	// ARIMA(1,0,1)×(1,1,0)_12              BIC 711.5
	// ARIMA(1,0,1)×(1,1,0)_12 + drift      BIC 715.6
	// ARIMA(1,0,0)×(0,1,1)_12              BIC 722.2
}

// ExampleSearch_regressors chooses the ARIMA errors of a regression on a
// promotion indicator (invented weekly-sales scenario: a shop runs a
// promotion now and then, which lifts sales by about 40 units) and
// forecasts with the promotions planned for the next four weeks.
func ExampleSearch_regressors() {
	src := rand.New(rand.NewPCG(2, 1))
	n := 80
	promo := make([]float64, n)
	sales := make([]float64, n)
	noise := 0.0
	for t := range sales {
		if t%10 == 3 || t%17 == 8 {
			promo[t] = 1
		}
		noise = 0.5*noise + 8*src.NormFloat64()
		sales[t] = math.Round(200 + 40*promo[t] + noise)
	}
	y := almanac.Series{Key: "shop sales", Start: time.Date(2024, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Weekly, Values: sales}
	s := arima.Search{Regressors: []arima.Regressor{{Name: "promotion", Values: promo}}}
	fit, err := s.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	res := fit.(*arima.Fitted)
	fmt.Println("chosen:", res)
	for _, c := range res.Coef() {
		if c.Name == "promotion" {
			fmt.Printf("promotion effect %.1f (s.e. %.1f)\n", c.Value, c.StdErr)
		}
	}
	fc, err := res.ForecastWith(4, [][]float64{{0, 1, 0, 0}}, 90)
	if err != nil {
		fmt.Println(err)
		return
	}
	for h, m := range fc.Mean {
		fmt.Printf("week %d: %.0f\n", h+1, m)
	}
	// Output:
	// chosen: ARIMA(1,0,0) + mean + regressors(promotion)
	// promotion effect 39.8 (s.e. 2.3)
	// week 1: 203
	// week 2: 241
	// week 3: 201
	// week 4: 201
}

// ExampleKPSS tests a series for level and for trend stationarity, then
// chooses the orders of ordinary and seasonal differencing.
func ExampleKPSS() {
	y := guestNights().Values
	r, err := arima.KPSS(y, arima.KPSSSpec{})
	if err != nil {
		fmt.Println(err)
		return
	}
	reject, _ := r.Reject(0.05)
	fmt.Printf("level: statistic %.3f, %d lags, p-value %.3f (%v), reject at 5%%: %v\n", r.Statistic, r.Lags, r.PValue, r.Clipped, reject)
	r, err = arima.KPSS(y, arima.KPSSSpec{Null: arima.TrendStationary, LagRule: arima.LagFixed, Lags: 4})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("trend: statistic %.3f, %d lags, p-value %.3f (%v)\n", r.Statistic, r.Lags, r.PValue, r.Clipped)
	d, err := arima.Differences(y, arima.DifferencesSpec{})
	if err != nil {
		fmt.Println(err)
		return
	}
	D, err := arima.SeasonalDifferences(y, 12, arima.SeasonalDifferencesSpec{})
	if err != nil {
		fmt.Println(err)
		return
	}
	f, _ := arima.SeasonalStrength(y, 12, 0)
	fmt.Printf("d = %d, D = %d (seasonal strength %.3f)\n", d, D, f)
	// Output:
	// level: statistic 0.405, 2 lags, p-value 0.075 (not clipped), reject at 5%: false
	// trend: statistic 0.022, 4 lags, p-value 0.100 (true p-value is larger)
	// d = 0, D = 1 (seasonal strength 0.981)
}
