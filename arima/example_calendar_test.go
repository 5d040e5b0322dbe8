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

// weeklyShop is invented weekly sales of a fictional hardware store: an
// annual cycle of 365.25/7 weeks, −80 per holiday day, AR(1) noise, and
// from the week of 4 March 2024 a level 120 lower (a competitor opened).
func weeklyShop(region calendar.Calendar) almanac.Series {
	start := time.Date(2021, time.January, 4, 0, 0, 0, 0, time.UTC)
	g := calendar.Grid{Start: start, Freq: calendar.Weekly, N: 208}
	hol, _ := g.Holidays(region)
	rng := rand.New(rand.NewPCG(42, 1))
	v := make([]float64, g.N)
	e := 0.0
	for i := range v {
		e = 0.5*e + 20*rng.NormFloat64()
		x := 2 * math.Pi * float64(i) / (365.25 / 7)
		v[i] = 900 + 100*math.Sin(x) - 80*hol[i] + e
		if !g.Time(i).Before(time.Date(2024, time.March, 4, 0, 0, 0, 0, time.UTC)) {
			v[i] -= 120
		}
	}
	return almanac.Series{Key: "shop", Start: start, Freq: calendar.Weekly, Values: v}
}

var region = calendar.Calendar{Holidays: []calendar.Holiday{
	{Name: "Year Start", Rule: calendar.FixedDate{Month: time.January, Day: 1, Observed: calendar.NearestWeekday}},
	{Name: "Spring Friday", Rule: calendar.EasterOffset{Days: -2}},
	{Name: "Midwinter", Rule: calendar.FixedDate{Month: time.December, Day: 25, Observed: calendar.NearestWeekday}},
}}

// A regression with ARIMA errors whose regressors are rules: the fitted
// model builds their future values itself, so Forecast needs nothing
// more.
func ExampleSpec_calendar() {
	y := weeklyShop(region)
	spec := arima.Spec{P: 1, Calendar: calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: region},
		calendar.Event{Name: "competitor", Shape: calendar.Step, From: time.Date(2024, time.March, 4, 0, 0, 0, 0, time.UTC)},
		calendar.Cycle{Period: 365.25 / 7, Harmonics: 1, Name: "year"},
	}}}
	fit, err := spec.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range fit.(*arima.Fitted).Coef() {
		if c.Name == "holidays" || c.Name == "competitor" {
			fmt.Printf("%-10s %9.3f ± %.3f\n", c.Name, c.Value, c.StdErr)
		}
	}
	fc, err := fit.Forecast(52, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("52 weeks from %s\n", fc.Start.Format("2006-01-02"))
	// Output:
	// holidays     -78.569 ± 6.161
	// competitor  -122.567 ± 7.043
	// 52 weeks from 2024-12-30
}

// Interventions found automatically: the competitor's opening shows as a
// level shift at its week.
func ExampleDetection() {
	y := weeklyShop(region)
	d := arima.Detection{Orders: &arima.Spec{P: 1, Calendar: calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: region},
		calendar.Cycle{Period: 365.25 / 7, Harmonics: 1, Name: "year"},
	}}}}
	fit, err := d.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	r := fit.(*arima.DetectionResult)
	fmt.Printf("critical value %.3f\n", r.Critical)
	for _, iv := range r.Found {
		fmt.Printf("%s %s %.3f ± %.3f\n", iv.Kind, iv.At.Format("2006-01-02"), iv.Size, iv.StdErr)
	}
	// Output:
	// critical value 3.635
	// LS 2024-03-04 -122.567 ± 7.043
}

// Dynamic harmonic regression chooses the periods from the frequency and
// the harmonics by AICc.
func ExampleHarmonicRegression() {
	y := weeklyShop(region)
	m := arima.HarmonicRegression{Calendar: calendar.Design{Effects: []calendar.Effect{
		calendar.HolidayCount{Calendar: region},
		calendar.Event{Name: "competitor", Shape: calendar.Step, From: time.Date(2024, time.March, 4, 0, 0, 0, 0, time.UTC)},
	}}}
	fit, err := m.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	h := fit.(*arima.HarmonicFit)
	fmt.Printf("periods %.3f, harmonics %v\n", h.Periods, h.Harmonics)
	fc, err := h.Forecast(13, 95)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d weeks ahead\n", fc.Horizon())
	// Output:
	// periods [52.179], harmonics [1]
	// 13 weeks ahead
}
