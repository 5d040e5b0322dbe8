package decompose_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
)

// ferryPassengers is invented demo data: monthly passengers (thousands)
// of an imaginary island ferry, six years from January 2020, with summer
// peaks, slow growth and a little noise.
func ferryPassengers() almanac.Series {
	r := rand.New(rand.NewPCG(2020, 1))
	v := make([]float64, 72)
	for i := range v {
		season := 12 * math.Sin(2*math.Pi*float64(i-3)/12)
		v[i] = 100 + 0.5*float64(i) + season + r.NormFloat64()
	}
	return almanac.Series{Key: "ferry", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

func ExampleSTL() {
	y := ferryPassengers()
	d, err := decompose.STL{SeasonalWindow: 13, Robust: true}.Decompose(y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("trend %.3f → %.3f\n", d.Trend[0], d.Trend[71])
	fmt.Printf("July effect %.3f, January effect %.3f\n", d.Seasonal[66], d.Seasonal[60])
	s := d.Settings[0]
	fmt.Printf("spans used: seasonal %d, trend %d, low-pass %d\n", s.SeasonalWindow, s.TrendWindow, s.LowPassWindow)
	st, _ := d.Strength()
	fmt.Printf("strength: trend %.3f, seasonal %.3f\n", st.Trend, st.Seasonal[0])
	// Output:
	// trend 99.867 → 135.521
	// July effect 11.413, January effect -12.128
	// spans used: seasonal 13, trend 21, low-pass 13
	// strength: trend 0.991, seasonal 0.986
}

// gridLoad is invented demo data: hourly electricity load (MW) of an
// imaginary town over four weeks, with a daily and a weekly cycle.
func gridLoad() almanac.Series {
	r := rand.New(rand.NewPCG(24, 168))
	v := make([]float64, 24*7*4)
	for i := range v {
		daily := 8 * math.Sin(2*math.Pi*float64(i-6)/24)
		weekly := 0.0
		if day := (i / 24) % 7; day >= 5 {
			weekly = -6 // quieter weekends
		}
		v[i] = 60 + daily + weekly + 0.5*r.NormFloat64()
	}
	return almanac.Series{Key: "town load", Start: time.Date(2026, 3, 2, 0, 0, 0, 0, time.UTC), Freq: calendar.Hourly, Values: v}
}

func ExampleMSTL() {
	y := gridLoad()
	d, err := decompose.MSTL{}.Decompose(y) // periods 24 and 168 from the hourly frequency
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("periods:", d.Periods)
	// Wednesday of the third week at 18:00 vs Saturday at 18:00.
	wed, sat := 24*(14+2)+18, 24*(14+5)+18
	fmt.Printf("daily effect at 18:00 %.3f\n", d.Seasonals[0][wed])
	fmt.Printf("weekly effect Wednesday %.3f, Saturday %.3f\n", d.Seasonals[1][wed], d.Seasonals[1][sat])
	// Output:
	// periods: [24 168]
	// daily effect at 18:00 -0.306
	// weekly effect Wednesday 1.865, Saturday -4.166
}

func ExampleClassical() {
	y := ferryPassengers()
	d, err := decompose.Classical{Multiplicative: true}.Decompose(y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("trend undefined at the ends: %v %v\n", math.IsNaN(d.Trend[5]), math.IsNaN(d.Trend[6]))
	for m, f := range d.Figure[:3] {
		fmt.Printf("%s factor %.3f\n", time.Month(m+1), f)
	}
	// Output:
	// trend undefined at the ends: true false
	// January factor 0.897
	// February factor 0.914
	// March factor 0.952
}

func ExampleRepair_Fill() {
	y := ferryPassengers()
	y.Values[30] = math.NaN() // a lost report
	// Three months of a dry-dock closure: a replacement boat carried a
	// fifth of the usual traffic.
	shutdown := []int{40, 41, 42}
	for _, i := range shutdown {
		y.Values[i] *= 0.2
	}
	filled, changes, err := decompose.Repair{Disrupted: shutdown}.Fill(y)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range changes {
		fmt.Printf("%s %-9s %8.3f → %.3f\n", c.Time.Format("2006-01"), c.Reason, c.Old, c.New)
	}
	fmt.Printf("observed values untouched: %v\n", filled.Values[29] == y.Values[29])
	// Output:
	// 2022-07 missing        NaN → 126.834
	// 2023-05 disrupted   25.370 → 125.805
	// 2023-06 disrupted   25.971 → 130.838
	// 2023-07 disrupted   26.508 → 132.467
	// observed values untouched: true
}

func ExampleScreen_Apply() {
	y := ferryPassengers()
	y.Values[50] += 40 // a one-off festival crowd
	// Six years of monthly data leave a remainder with few degrees of
	// freedom, so the fence is widened from the default 3 IQR to 5.
	_, changes, err := decompose.Screen{K: 5}.Apply(y)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range changes {
		fmt.Printf("%s %s %.3f → %.3f\n", c.Time.Format("2006-01"), c.Reason, c.Old, c.New)
	}
	// Output:
	// 2024-03 outlier 159.689 → 119.031
}

func ExampleForecaster() {
	y := ferryPassengers()
	m := decompose.Forecaster{Model: almanac.Drift{}, Method: decompose.STL{SeasonalWindow: 13}}
	fit, err := m.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, err := fit.Forecast(6, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(fit)
	for k := range fc.Mean {
		fmt.Printf("%s %.3f [%.3f, %.3f]\n", fc.Time(k).Format("2006-01"), fc.Mean[k], fc.Intervals[0].Lower[k], fc.Intervals[0].Upper[k])
	}
	// Output:
	// STL+Drift
	// 2026-01 123.711 [121.920, 125.502]
	// 2026-02 126.197 [123.646, 128.747]
	// 2026-03 131.052 [127.906, 134.197]
	// 2026-04 137.396 [133.740, 141.053]
	// 2026-05 144.405 [140.290, 148.520]
	// 2026-06 148.864 [144.326, 153.401]
}
