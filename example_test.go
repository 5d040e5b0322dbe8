package almanac_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"strings"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
)

// The data in these examples are invented: monthly sales of watering cans
// at a garden centre.
var cans = []float64{42, 45, 61, 78, 96, 110, 118, 104, 80, 62, 48, 51,
	47, 50, 68, 86, 104, 121, 127, 115, 88, 66, 52, 57}

func ExampleSeries() {
	y, err := almanac.NewSeries("cans", time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC), calendar.Monthly, cans)
	if err != nil {
		fmt.Println(err)
		return
	}
	train, test, err := y.Split(6)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(y.Len(), y.Period(), y.End().Format("2006-01"))
	fmt.Println(train.Len(), test.Start.Format("2006-01"), test.Values)

	bad := almanac.Series{Key: "broken", Start: y.Start, Freq: calendar.Monthly, Values: []float64{1, math.Inf(1)}}
	fmt.Println(bad.Validate())
	// Output:
	// 24 12 2024-12
	// 18 2024-07 [127 115 88 66 52 57]
	// almanac: series broken: non-finite value at index 1
}

func ExampleForecast() {
	y := almanac.Series{Key: "cans", Start: time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: cans}
	fit, err := almanac.SeasonalNaive{}.Fit(context.Background(), y)
	if err != nil {
		fmt.Println(err)
		return
	}
	fc, err := fit.Forecast(3, 80, 95)
	if err != nil {
		fmt.Println(err)
		return
	}
	lo, hi, _ := fc.Bounds(95)
	q90, _ := fc.Quantile(0.9)
	fmt.Println(fit)
	for h := range fc.Horizon() {
		fmt.Printf("%s %.3f [%.3f, %.3f] q90 %.3f\n", fc.Time(h).Format("2006-01"), fc.Mean[h], lo[h], hi[h], q90[h])
	}
	// Output:
	// SeasonalNaive(12)
	// 2025-01 47.000 [32.224, 61.776] q90 56.661
	// 2025-02 50.000 [35.224, 64.776] q90 59.661
	// 2025-03 68.000 [53.224, 82.776] q90 77.661
}

// movingAverage is a user-written model: the forecast is the mean of the
// last K observed values, with normal intervals from the in-sample
// one-step errors. It needs only the documentation of Model, Fitted and
// NewForecast.
type movingAverage struct{ K int }

type movingAverageFit struct {
	y      almanac.Series
	level  float64
	sigma  float64
	fitted []float64
	k      int
}

func (m movingAverage) Fit(ctx context.Context, y almanac.Series) (almanac.Fitted, error) {
	if err := y.Validate(); err != nil {
		return nil, err
	}
	if err := y.CheckComplete(); err != nil {
		return nil, err
	}
	if m.K < 1 {
		return nil, fmt.Errorf("movingaverage: %w: K = %d", almanac.ErrInvalid, m.K)
	}
	if y.Len() <= m.K+1 {
		return nil, fmt.Errorf("movingaverage: %w: need more than %d values", almanac.ErrTooShort, m.K+1)
	}
	f := &movingAverageFit{y: y, k: m.K, fitted: make([]float64, y.Len())}
	ss, n := 0.0, 0
	for t := range y.Values {
		if t < m.K {
			f.fitted[t] = math.NaN()
			continue
		}
		sum := 0.0
		for _, v := range y.Values[t-m.K : t] {
			sum += v
		}
		f.fitted[t] = sum / float64(m.K)
		e := y.Values[t] - f.fitted[t]
		ss += e * e
		n++
	}
	for _, v := range y.Values[y.Len()-m.K:] {
		f.level += v / float64(m.K)
	}
	f.sigma = math.Sqrt(ss / float64(n))
	return f, nil
}

func (f *movingAverageFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	if err := almanac.CheckHorizon(h); err != nil {
		return almanac.Forecast{}, err
	}
	mean, sd := make([]float64, h), make([]float64, h)
	for i := range mean {
		mean[i], sd[i] = f.level, f.sigma
	}
	return almanac.NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, &almanac.Normal{Mean: mean, SD: sd}, levels...)
}

func (f *movingAverageFit) FittedValues() []float64 { return append([]float64(nil), f.fitted...) }

func (f *movingAverageFit) Residuals() []float64 {
	r := make([]float64, len(f.fitted))
	for i, v := range f.y.Values {
		r[i] = v - f.fitted[i]
	}
	return r
}

func (f *movingAverageFit) String() string { return fmt.Sprintf("MovingAverage(%d)", f.k) }

// Example_customModel writes a model of one's own and uses it like a
// built-in one, here with BatchFit.
func Example_customModel() {
	y := almanac.Series{Key: "cans", Start: time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: cans}
	res, err := almanac.BatchFit(context.Background(), movingAverage{K: 3}, []almanac.Series{y, y.Head(3)}, almanac.BatchOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range almanac.ForecastAll(res, 2, 80) {
		if f.Err != nil {
			fmt.Println("error:", f.Err)
			continue
		}
		fmt.Printf("%.3f [%.3f, %.3f]\n", f.Forecast.Mean[0], f.Forecast.Intervals[0].Lower[0], f.Forecast.Intervals[0].Upper[0])
	}
	// Output:
	// 58.333 [22.589, 94.078]
	// error: movingaverage: series too short: need more than 4 values
}

func ExampleBatchFit() {
	start := time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC)
	ys := []almanac.Series{
		{Key: "cans", Start: start, Freq: calendar.Monthly, Values: cans},
		{Key: "gloves", Start: start, Freq: calendar.Monthly, Values: []float64{20, 22, 25, 31, 30, 28, 27, 26, 24, 22, 21, 23, 22, 25, 27, 33}},
		{Key: "new line", Start: start, Freq: calendar.Monthly, Values: []float64{5}},
	}
	res, err := almanac.BatchFit(context.Background(), almanac.Drift{}, ys, almanac.BatchOptions{Workers: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range almanac.ForecastAll(res, 1, 95) {
		if f.Err != nil {
			fmt.Printf("%s: %v\n", f.Key, f.Err)
			continue
		}
		fmt.Printf("%s: %.3f\n", f.Key, f.Forecast.Mean[0])
	}
	// Output:
	// cans: 57.652
	// gloves: 33.867
	// new line: almanac: drift: series too short: 1 observed values, need at least 3
}

func ExampleReadCSV() {
	// Rows may come in any order; "rakes" has a single observation, too
	// few for the naive method, and is reported in the forecast file.
	in := `series,period,value
cans,2024-02,50
gloves,2024-01,22
cans,2024-01,47
rakes,2024-03,5
gloves,2024-02,NA
cans,2024-03,68
gloves,2024-03,27
`
	ys, err := almanac.ReadCSV(strings.NewReader(in), almanac.CSVOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, y := range ys {
		fmt.Println(y.Key, y.Freq, y.Values)
	}
	res, _ := almanac.BatchFit(context.Background(), almanac.Naive{}, ys, almanac.BatchOptions{})
	if err := almanac.WriteForecastCSV(os.Stdout, almanac.ForecastAll(res, 2, 80), almanac.CSVOptions{Digits: 6}); err != nil {
		fmt.Println(err)
	}

	_, err = almanac.ReadCSV(strings.NewReader("series,period,value\ncans,2024-01-01,47\ncans,2024-01-01,48\n"), almanac.CSVOptions{Freq: calendar.Monthly})
	fmt.Println(err)
	// Output:
	// cans monthly [47 50 68]
	// gloves monthly [22 NaN 27]
	// rakes monthly [5]
	// series,period,step,point,band80_low,band80_high,status,reason
	// cans,2024-04,1,68,51.4635,84.5365,ok,
	// cans,2024-05,2,68,44.6139,91.3861,ok,
	// gloves,2024-04,1,27,22.469,31.531,ok,
	// gloves,2024-05,2,27,20.5922,33.4078,ok,
	// rakes,,,NaN,NaN,NaN,failed,"almanac: naive: series too short: 1 observed values, need at least 2"
	// almanac: csv line 3, column "period": duplicate time: series "cans": 2024-01-01 00:00:00 +0000 UTC already given on line 2
}

func ExampleBoxCox() {
	y := almanac.Series{Key: "cans", Start: time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: cans}
	for _, m := range []almanac.BoxCox{
		{Model: almanac.SeasonalNaive{}, Method: almanac.LambdaFixed},                   // log, median forecast
		{Model: almanac.SeasonalNaive{}, Method: almanac.LambdaFixed, BiasAdjust: true}, // log, mean forecast
		{Model: almanac.SeasonalNaive{}},                                                // λ by Guerrero's method
	} {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			fmt.Println(err)
			return
		}
		fc, _ := fit.Forecast(1, 95)
		fmt.Printf("%s: %.3f [%.3f, %.3f]\n", fit, fc.Mean[0], fc.Intervals[0].Lower[0], fc.Intervals[0].Upper[0])
	}
	// Output:
	// BoxCox[0](SeasonalNaive(12)): 47.000 [39.030, 56.598]
	// BoxCox[0](SeasonalNaive(12)): 47.211 [39.030, 56.598]
	// BoxCox[0.1552](SeasonalNaive(12)): 47.000 [38.420, 57.146]
}

func ExampleNaive() {
	y := almanac.Series{Key: "cans", Start: time.Date(2023, time.January, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: cans}
	for _, m := range []almanac.Model{almanac.Naive{}, almanac.SeasonalNaive{}, almanac.Drift{}, almanac.Mean{}} {
		fit, err := m.Fit(context.Background(), y)
		if err != nil {
			fmt.Println(err)
			return
		}
		fc, err := fit.Forecast(2, 95)
		if err != nil {
			fmt.Println(err)
			return
		}
		iv := fc.Intervals[0]
		fmt.Printf("%-18s h=1 %7.3f [%7.3f, %7.3f]  h=2 %7.3f [%7.3f, %7.3f]\n", fit,
			fc.Mean[0], iv.Lower[0], iv.Upper[0], fc.Mean[1], iv.Lower[1], iv.Upper[1])
	}
	// Output:
	// Naive              h=1  57.000 [ 27.138,  86.862]  h=2  57.000 [ 14.769,  99.231]
	// SeasonalNaive(12)  h=1  47.000 [ 32.224,  61.776]  h=2  50.000 [ 35.224,  64.776]
	// Drift              h=1  57.652 [ 26.491,  88.813]  h=2  58.304 [ 13.327, 103.281]
	// Mean               h=1  78.167 [ 22.594, 133.740]  h=2  78.167 [ 22.594, 133.740]
}

func ExampleLambdaGuerrero() {
	lam, err := almanac.LambdaGuerrero(cans, 12, 0, 0) // default search interval [0, 2]
	if err != nil {
		fmt.Println(err)
		return
	}
	z, err := almanac.BoxCoxTransform(nil, cans[:3], lam)
	if err != nil {
		fmt.Println(err)
		return
	}
	back, _ := almanac.BoxCoxInverse(nil, z, lam)
	fmt.Printf("lambda %.3f\n", lam)
	fmt.Printf("transformed %.3f\n", z)
	fmt.Printf("back %.3f\n", back)
	_, err = almanac.BoxCoxTransform(nil, []float64{3, 0}, 0)
	fmt.Println(err)
	// Output:
	// lambda 0.155
	// transformed [5.066 5.189 5.752]
	// back [42.000 45.000 61.000]
	// almanac: box-cox: non-positive value: y[1] = 0 with lambda 0 (need y > 0, or y ≥ 0 when lambda > 0)
}

func ExampleLambdaML() {
	// Negative powers are searched only when asked for: the default
	// interval [0, 2] stops at the log transform.
	lam, err := almanac.LambdaML(cans, -1, 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	def, _ := almanac.LambdaML(cans, 0, 0)
	llf, _ := almanac.BoxCoxLLF(cans, lam)
	llfLog, _ := almanac.BoxCoxLLF(cans, 0)
	fmt.Printf("lambda %.3f, log-likelihood %.3f (%.3f for the log transform)\n", lam, llf, llfLog)
	fmt.Printf("in the default interval: lambda %.3f\n", def)
	_, err = almanac.LambdaML([]float64{5, 5, 5}, 0, 0)
	fmt.Println(err)
	// Output:
	// lambda -0.053, log-likelihood -78.166 (-78.169 for the log transform)
	// in the default interval: lambda 0.000
	// almanac: box-cox: constant series: no lambda can be estimated
}

func ExampleWriteSeriesCSV() {
	y := almanac.Series{Key: "cans", Start: time.Date(2024, time.October, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: []float64{62, math.NaN(), 51.5}}
	if err := almanac.WriteSeriesCSV(os.Stdout, []almanac.Series{y}, almanac.CSVOptions{ValueColumn: "units"}); err != nil {
		fmt.Println(err)
	}
	// Output:
	// series,period,units
	// cans,2024-10,62
	// cans,2024-11,NaN
	// cans,2024-12,51.5
}
