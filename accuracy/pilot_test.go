package accuracy_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
)

func fitPilot(t *testing.T, y almanac.Series) *accuracy.PilotFit {
	t.Helper()
	f, err := accuracy.Pilot{}.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("%s: %v", y.Key, err)
	}
	return f.(*accuracy.PilotFit)
}

// checkForecast checks what every Pilot forecast must satisfy: finite
// points, 95% bands around 80% bands, non-negative when the data are.
func checkForecast(t *testing.T, f *accuracy.PilotFit, h int) almanac.Forecast {
	t.Helper()
	fc, err := f.Forecast(h, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	if len(fc.Mean) != h {
		t.Fatalf("%d forecasts for %d steps", len(fc.Mean), h)
	}
	for j := range h {
		m := fc.Mean[j]
		l80, u80 := fc.Intervals[0].Lower[j], fc.Intervals[0].Upper[j]
		l95, u95 := fc.Intervals[1].Lower[j], fc.Intervals[1].Upper[j]
		for _, v := range []float64{m, l80, u80, l95, u95} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("step %d: non-finite %v", j+1, v)
			}
		}
		if !(l95 <= l80 && l80 <= u80 && u80 <= u95) {
			t.Errorf("step %d: bands not nested: 95%% [%v, %v], 80%% [%v, %v]", j+1, l95, u95, l80, u80)
		}
		if f.Report().NonNegative && (m < 0 || l95 < 0) {
			t.Errorf("step %d: non-negative data, forecast %v, lower band %v", j+1, m, l95)
		}
	}
	return fc
}

func mae(a, f []float64) float64 {
	s := 0.0
	for i := range a {
		s += math.Abs(a[i] - f[i])
	}
	return s / float64(len(a))
}

func date(y int, m time.Month, d int) time.Time { return time.Date(y, m, d, 0, 0, 0, 0, time.UTC) }

// inventedWeekly is an invented weekly series with known structure: a
// yearly cycle on the 365.25-day year (two harmonics), a holiday effect
// in the weeks holding Christmas (−35%) and Good Friday (+20%), which
// move between weeks from year to year, a slow trend and 2% noise. The
// last h weeks are returned as the test part.
func inventedWeekly(n, h int, seed uint64) (almanac.Series, []float64) {
	r := rand.New(rand.NewPCG(seed, 1))
	start := date(2014, time.January, 6) // a Monday
	v := make([]float64, n+h)
	for k := range v {
		t := start.AddDate(0, 0, 7*k)
		th := 2 * math.Pi * t.Sub(date(2000, 1, 1)).Hours() / 24 / 365.25
		x := 0.25*math.Sin(th) + 0.1*math.Cos(2*th) + 0.0005*float64(k) + 0.02*r.NormFloat64()
		for d := range 7 {
			day := t.AddDate(0, 0, d)
			if day.Month() == time.December && day.Day() == 25 {
				x -= 0.35
			}
			if e, _ := calendar.Easter(day.Year()); day.Equal(e.AddDate(0, 0, -2)) {
				x += 0.2
			}
		}
		v[k] = 1000 * math.Exp(x)
	}
	return almanac.Series{Key: "weekly", Start: start, Freq: calendar.Weekly, Values: v[:n]}, v[n:]
}

// TestPilotWeekly: a weekly series with a 365.25/7-week cycle and moving
// holidays goes the weekly route and forecasts the next quarter better
// than the naive method; a series of little more than a year is too short
// for the cycle and gets the non-seasonal combination, with the reason.
func TestPilotWeekly(t *testing.T) {
	y, test := inventedWeekly(4*52, 13, 1)
	f := fitPilot(t, y)
	rep := f.Report()
	if rep.Route != accuracy.RouteWeekly || len(rep.Members) != 3 || !strings.Contains(rep.Members[2], "harmonics(52.18") {
		t.Fatalf("report %+v", rep)
	}
	fc := checkForecast(t, f, 13)
	nv, _ := almanac.Naive{}.Fit(context.Background(), y)
	nfc, _ := nv.Forecast(13)
	if a, b := mae(test, fc.Mean), mae(test, nfc.Mean); !(a < 0.8*b) {
		t.Errorf("weekly route MAE %.2f, naive %.2f", a, b)
	}

	short, _ := inventedWeekly(70, 13, 2)
	rep = fitPilot(t, short).Report()
	if rep.Route != accuracy.RouteCombination || len(rep.Periods) != 0 || len(rep.Fallbacks) != 1 || !strings.Contains(rep.Fallbacks[0], "weekly") {
		t.Errorf("short weekly series: %+v", rep)
	}
}

// inventedCycles is an invented series sum of daily and weekly shapes,
// for the daily and hourly routes.
func inventedCycles(freq calendar.Frequency, n int, seed uint64) almanac.Series {
	r := rand.New(rand.NewPCG(seed, 2))
	start := date(2021, time.March, 1)
	v := make([]float64, n)
	for k := range v {
		t := freq.Add(start, k)
		x := 100.0
		if freq == calendar.Hourly {
			x += 30 * math.Sin(2*math.Pi*float64(t.Hour())/24)
		}
		if wd := t.Weekday(); wd == time.Saturday || wd == time.Sunday {
			x -= 25
		}
		v[k] = x + 0.05*float64(k) + 3*r.NormFloat64()
	}
	return almanac.Series{Key: freq.String(), Start: start, Freq: freq, Values: v}
}

func TestPilotMultiSeasonal(t *testing.T) {
	tests := []struct {
		name    string
		y       almanac.Series
		periods []float64
	}{
		{"daily, one year", inventedCycles(calendar.Daily, 400, 1), []float64{7}},
		{"daily, three years", inventedCycles(calendar.Daily, 3*365, 2), []float64{7, 365.25}},
		{"hourly, five weeks", inventedCycles(calendar.Hourly, 24*35, 3), []float64{24, 168}},
		{"hourly, ten days", inventedCycles(calendar.Hourly, 24*10, 4), []float64{24}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			// The route is under test here, so its bands are left
			// uncalibrated (five refits fewer); TestSavedPilot fits these
			// routes calibrated.
			fit, err := accuracy.Pilot{Uncalibrated: true}.Fit(context.Background(), tc.y)
			if err != nil {
				t.Fatal(err)
			}
			f := fit.(*accuracy.PilotFit)
			rep := f.Report()
			if rep.Route != accuracy.RouteMultiSeasonal || !slices.Equal(rep.Periods, tc.periods) {
				t.Fatalf("report %+v, want periods %v", rep, tc.periods)
			}
			h := 2 * int(math.Round(tc.periods[0]))
			fc := checkForecast(t, f, h)
			// The weekend dip must be in the forecast: compare the
			// forecast on a weekend step with one on a weekday.
			var we, wd []float64
			for j := range h {
				if d := fc.Time(j).Weekday(); d == time.Saturday || d == time.Sunday {
					we = append(we, fc.Mean[j])
				} else {
					wd = append(wd, fc.Mean[j])
				}
			}
			if len(we) > 0 && len(wd) > 0 && !(mean(wd)-mean(we) > 15) {
				t.Errorf("weekday mean %.1f, weekend %.1f: the weekly cycle is lost", mean(wd), mean(we))
			}
		})
	}
}

func mean(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}

// TestPilotIntermittent: Poisson demand with mean 0.3 a period
// (ADI ≈ 1/(1 − e^−0.3) ≈ 3.9, far above 1.32) goes the intermittent
// route; bands are never below zero and the point forecast is SBA's.
func TestPilotIntermittent(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	v := make([]float64, 120)
	for i := range v {
		if r.Float64() > math.Exp(-0.3) { // a demand with probability 1 − e^−0.3
			v[i] = 1 + float64(r.IntN(3))
		}
	}
	y := almanac.Series{Key: "parts", Start: date(2010, 1, 1), Freq: calendar.Monthly, Values: v}
	f := fitPilot(t, y)
	rep := f.Report()
	if rep.Route != accuracy.RouteIntermittent || !rep.Demand.Intermittent() || rep.Members[0] != "SBA" {
		t.Fatalf("report %+v", rep)
	}
	fc := checkForecast(t, f, 12)
	if fc.Intervals[1].Lower[0] != 0 || !(fc.Intervals[1].Upper[0] >= 1) {
		t.Errorf("95%% band [%v, %v]", fc.Intervals[1].Lower[0], fc.Intervals[1].Upper[0])
	}
}

// TestClassifyDemand checks the quadrants of Syntetos, Boylan & Croston
// (2005) with cut-offs ADI 1.32 and CV² 0.49.
func TestClassifyDemand(t *testing.T) {
	tests := []struct {
		name string
		y    []float64
		want accuracy.DemandClass
		adi  float64
	}{
		{"smooth", []float64{5, 6, 5, 6, 5, 6}, accuracy.DemandSmooth, 1},
		{"erratic", []float64{1, 10, 1, 10, 1, 10}, accuracy.DemandErratic, 1},
		{"intermittent", []float64{0, 5, 0, 6, 0, 5}, accuracy.DemandIntermittent, 2},
		{"lumpy", []float64{0, 1, 0, 10, 0, 1}, accuracy.DemandLumpy, 2},
		{"missing values left out", []float64{0, math.NaN(), 5, 0, 6, 0, 5}, accuracy.DemandIntermittent, 2},
		{"negative", []float64{1, -1, 2}, accuracy.DemandUnclassified, math.NaN()},
		{"no demand", []float64{0, 0, 0}, accuracy.DemandUnclassified, math.NaN()},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c, adi, _ := accuracy.ClassifyDemand(tc.y)
			if c != tc.want || !(adi == tc.adi || math.IsNaN(adi) && math.IsNaN(tc.adi)) {
				t.Errorf("got %v (ADI %v), want %v (ADI %v)", c, adi, tc.want, tc.adi)
			}
		})
	}
}

// TestPilotM3 runs two M3 series of each of the yearly, quarterly and
// monthly categories (Makridakis & Hibon 2000): each gets the
// combination route with the category's period and finite, nested bands.
// Accuracy on M3 is measured on the whole data set by the evaluation
// program, not here.
func TestPilotM3(t *testing.T) {
	for _, c := range []struct {
		file   string
		freq   calendar.Frequency
		period float64
	}{
		{"m3_yearly.csv", calendar.Yearly, 0},
		{"m3_quarterly.csv", calendar.Quarterly, 4},
		{"m3_monthly.csv", calendar.Monthly, 12},
	} {
		ss := m3data.Load(t, c.file)
		for _, s := range []m3data.Series{ss[0], ss[len(ss)/2]} {
			t.Run(s.ID, func(t *testing.T) {
				y := almanac.Series{Key: s.ID, Start: date(1990, 1, 1), Freq: c.freq, Values: s.Train}
				f := fitPilot(t, y)
				rep := f.Report()
				if rep.Route != accuracy.RouteCombination || len(rep.Members) != 3 {
					t.Errorf("report %+v", rep)
				}
				if c.period > 0 && !slices.Equal(rep.Periods, []float64{c.period}) {
					t.Errorf("periods %v, want [%v]", rep.Periods, c.period)
				}
				checkForecast(t, f, len(s.Test))
			})
		}
	}
}

// TestPilotGapsAndShortSeries covers the repairs and the fallback chain.
func TestPilotGapsAndShortSeries(t *testing.T) {
	ctx := context.Background()
	monthly := func(v ...float64) almanac.Series {
		return almanac.Series{Key: "m", Start: date(2020, 1, 1), Freq: calendar.Monthly, Values: v}
	}
	seasonal := make([]float64, 60)
	for i := range seasonal {
		seasonal[i] = 100 + 20*math.Sin(2*math.Pi*float64(i)/12) + float64(i%5)
	}
	gappy := slices.Clone(seasonal)
	gappy[0], gappy[1], gappy[20], gappy[21], gappy[40] = math.NaN(), math.NaN(), math.NaN(), math.NaN(), math.NaN()

	t.Run("gaps repaired and listed", func(t *testing.T) {
		f := fitPilot(t, monthly(gappy...))
		rep := f.Report()
		if rep.Trimmed != 2 || len(rep.Repairs) != 3 || rep.Route != accuracy.RouteCombination {
			t.Fatalf("report %+v", rep)
		}
		for i, c := range rep.Repairs {
			if want := []int{18, 19, 38}[i]; c.Index != want {
				t.Errorf("repair %d at index %d of the trimmed series, want %d", i, c.Index, want)
			}
		}
		fv := f.FittedValues()
		if len(fv) != 60 || !math.IsNaN(fv[0]) || !math.IsNaN(fv[1]) {
			t.Errorf("fitted values of the trimmed start: %v", fv[:3])
		}
		checkForecast(t, f, 12)
	})
	t.Run("one observation", func(t *testing.T) {
		f := fitPilot(t, monthly(math.NaN(), 42))
		rep := f.Report()
		if rep.Route != accuracy.RouteBenchmark || rep.Members[0] != "last value" || len(rep.Fallbacks) == 0 {
			t.Fatalf("report %+v", rep)
		}
		fc := checkForecast(t, f, 3)
		if fc.Mean[2] != 42 || fc.Intervals[1].Lower[2] != 42 {
			t.Errorf("forecast %v, band %v", fc.Mean, fc.Intervals[1])
		}
	})
	t.Run("two observations", func(t *testing.T) {
		rep := fitPilot(t, monthly(3, 5)).Report()
		if rep.Route != accuracy.RouteBenchmark || rep.Members[0] != "Naive" {
			t.Fatalf("report %+v", rep)
		}
	})
	t.Run("constant", func(t *testing.T) {
		f := fitPilot(t, monthly(7, 7, 7, 7, 7, 7, 7, 7, 7, 7))
		if fc := checkForecast(t, f, 4); fc.Mean[3] != 7 {
			t.Errorf("forecast %v", fc.Mean)
		}
	})
	t.Run("falling towards zero", func(t *testing.T) {
		v := make([]float64, 40)
		for i := range v {
			v[i] = math.Max(0, 40-float64(i)+3*math.Sin(float64(i)))
		}
		checkForecast(t, fitPilot(t, almanac.Series{Key: "f", Start: date(1980, 1, 1), Freq: calendar.Yearly, Values: v}), 10)
	})
	bad := []struct {
		name string
		y    almanac.Series
		p    accuracy.Pilot
		want error
	}{
		{"empty", monthly(), accuracy.Pilot{}, almanac.ErrEmpty},
		{"all missing", monthly(math.NaN(), math.NaN()), accuracy.Pilot{}, almanac.ErrAllMissing},
		{"infinite", monthly(1, math.Inf(1), 2), accuracy.Pilot{}, almanac.ErrNonFinite},
		{"no frequency", almanac.Series{Values: []float64{1, 2, 3}}, accuracy.Pilot{}, almanac.ErrFrequency},
		{"negative paths", monthly(1, 2, 3), accuracy.Pilot{Paths: -1}, almanac.ErrInvalid},
	}
	for _, tc := range bad {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := tc.p.Fit(ctx, tc.y); !errors.Is(err, tc.want) {
				t.Errorf("err = %v, want %v", err, tc.want)
			}
		})
	}
	t.Run("bad horizon and level", func(t *testing.T) {
		f := fitPilot(t, monthly(seasonal...))
		if _, err := f.Forecast(0); !errors.Is(err, almanac.ErrHorizon) {
			t.Errorf("h = 0: %v", err)
		}
		if _, err := f.Forecast(3, 100); !errors.Is(err, almanac.ErrLevel) {
			t.Errorf("level 100: %v", err)
		}
	})
	t.Run("near the float64 limit", func(t *testing.T) {
		v := slices.Clone(seasonal)
		for i := range v {
			v[i] *= 1e305
		}
		f, err := accuracy.Pilot{}.Fit(ctx, monthly(v...))
		if err != nil {
			if !errors.Is(err, almanac.ErrNotFitted) {
				t.Fatalf("err = %v", err)
			}
			return
		}
		if _, err := f.Forecast(6, 80); err == nil {
			checkForecast(t, f.(*accuracy.PilotFit), 6)
		}
	})
}

// TestPilotDeterministic: the same series gives bit-identical forecasts
// in a batch fitted with one worker or four.
func TestPilotDeterministic(t *testing.T) {
	var ys []almanac.Series
	for i := range 4 {
		y, _ := inventedWeekly(110+10*i, 0, uint64(i))
		if i%2 == 1 {
			y = inventedCycles(calendar.Daily, 60+10*i, uint64(i))
		}
		ys = append(ys, y)
	}
	ctx := context.Background()
	a, err := almanac.BatchFit(ctx, accuracy.Pilot{}, ys, almanac.BatchOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := almanac.BatchFit(ctx, accuracy.Pilot{}, ys, almanac.BatchOptions{Workers: 4})
	if err != nil {
		t.Fatal(err)
	}
	fa := almanac.ForecastAll(a, 8, 80)
	fb := almanac.ForecastAll(b, 8, 80)
	for i := range fa {
		if fa[i].Err != nil || fb[i].Err != nil {
			t.Fatalf("%s: %v / %v", ys[i].Key, fa[i].Err, fb[i].Err)
		}
		for j := range 8 {
			for _, pair := range [][2]float64{{fa[i].Forecast.Mean[j], fb[i].Forecast.Mean[j]}, {fa[i].Forecast.Intervals[0].Lower[j], fb[i].Forecast.Intervals[0].Lower[j]}} {
				if math.Float64bits(pair[0]) != math.Float64bits(pair[1]) {
					t.Fatalf("series %d step %d: %v vs %v", i, j, pair[0], pair[1])
				}
			}
		}
	}
}

// brokenFit forecasts NaN, as a model whose forecast overflows would.
type brokenFit struct{ almanac.Fitted }

func (brokenFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	return almanac.Forecast{Mean: []float64{math.NaN()}}, nil
}
func (brokenFit) String() string { return "broken" }

// TestPilotBackup: when the route's forecast is not usable, the forecast
// (and the sample paths) come from the benchmark kept at fit time.
func TestPilotBackup(t *testing.T) {
	y := almanac.Series{Key: "b", Start: date(2020, 1, 1), Freq: calendar.Yearly, Values: []float64{3, 4, 6, 5, 7}}
	nv, err := almanac.Naive{}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	f := accuracy.PilotFitWith(y, brokenFit{nv}, nv)
	fc, err := f.Forecast(3, 80)
	if err != nil {
		t.Fatal(err)
	}
	if fc.Mean[2] != 7 || !(fc.Intervals[0].Lower[2] < 7) {
		t.Errorf("forecast %v, band %v", fc.Mean, fc.Intervals[0])
	}
	paths, err := f.Simulate(3, 10, rand.NewPCG(1, 2))
	if err != nil || len(paths) != 10 {
		t.Errorf("paths %d, err %v", len(paths), err)
	}
}

// TestPilotCyclicCounts: hourly counts that vanish every night are
// intermittent by ADI but follow the day; they go the multi-seasonal
// route, and the report says why.
func TestPilotCyclicCounts(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 9))
	v := make([]float64, 24*21)
	for i := range v {
		if h := i % 24; h >= 8 && h < 18 && r.Float64() < 0.6 {
			v[i] = float64(1 + r.IntN(4))
		}
	}
	y := almanac.Series{Key: "trips", Start: date(2022, 5, 2), Freq: calendar.Hourly, Values: v}
	f := fitPilot(t, y)
	rep := f.Report()
	if !rep.Demand.Intermittent() || rep.Route != accuracy.RouteMultiSeasonal || len(rep.Fallbacks) == 0 || !strings.Contains(rep.Fallbacks[0], "cycle") {
		t.Fatalf("report %+v", rep)
	}
	fc := checkForecast(t, f, 24)
	if night, day := mean(fc.Mean[0:8]), mean(fc.Mean[8:18]); !(day > night+0.5) {
		t.Errorf("forecast at night %.2f, by day %.2f: the daily cycle is lost", night, day)
	}
}

// TestPilotFortnightly: data every two weeks has a yearly cycle of
// 365.25/14 ≈ 26.09 observations; it takes the weekly route at that
// period.
func TestPilotFortnightly(t *testing.T) {
	w, _ := inventedWeekly(8*52, 0, 3)
	v := make([]float64, 0, len(w.Values)/2)
	for i := 0; i+1 < len(w.Values); i += 2 {
		v = append(v, w.Values[i]+w.Values[i+1])
	}
	y := almanac.Series{Key: "fortnightly", Start: w.Start, Freq: calendar.Every(2, calendar.Week), Values: v}
	f := fitPilot(t, y)
	rep := f.Report()
	if rep.Route != accuracy.RouteWeekly || len(rep.Periods) != 1 || math.Abs(rep.Periods[0]-365.25/14) > 1e-12 {
		t.Fatalf("report %+v", rep)
	}
	checkForecast(t, f, 6)
}

// TestPoolPilots: short invented yearly series have too few errors of
// their own to calibrate their bands; pooled across the batch they share
// the errors of all the fits of their frequency and route. Results that
// failed or hold another model pass through; a wrong number of group
// labels is an error.
func TestPoolPilots(t *testing.T) {
	ctx := context.Background()
	var ys []almanac.Series
	for i := range 12 {
		r := rand.New(rand.NewPCG(uint64(i), 7))
		v := make([]float64, 30)
		x := 100.0
		for k := range v {
			x += 1 + 3*r.NormFloat64()
			v[k] = x
		}
		ys = append(ys, almanac.Series{Key: fmt.Sprint("y", i), Start: date(1990, 1, 1), Freq: calendar.Yearly, Values: v})
	}
	res, err := almanac.BatchFit(ctx, accuracy.Pilot{}, ys, almanac.BatchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	own := 0
	for _, r := range res {
		rep := r.Fitted.(*accuracy.PilotFit).Report()
		if !rep.Calibrated || rep.Calibration.Source != accuracy.BandsFromModel {
			t.Fatalf("%s alone: %+v", r.Key, rep.Calibration)
		}
		own += rep.Calibration.Own
	}
	res = append(res, almanac.BatchResult{Key: "failed", Err: almanac.ErrTooShort})
	nv, _ := almanac.Naive{}.Fit(ctx, ys[0])
	res = append(res, almanac.BatchResult{Key: "naive", Fitted: nv})
	pooled, err := accuracy.PoolPilots(res, accuracy.PoolOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range pooled[:len(ys)] {
		rep := r.Fitted.(*accuracy.PilotFit).Report()
		if rep.Calibration.Source != accuracy.BandsFromPooledErrors || rep.Calibration.Pooled != own {
			t.Errorf("%s pooled: %+v, want %d pooled trajectories", r.Key, rep.Calibration, own)
		}
		if res[i].Fitted.(*accuracy.PilotFit).Report().Calibration.Source != accuracy.BandsFromModel {
			t.Errorf("%s: the input was modified", r.Key)
		}
		checkForecast(t, r.Fitted.(*accuracy.PilotFit), 6)
	}
	if pooled[len(ys)].Err == nil || pooled[len(ys)+1].Fitted != nv {
		t.Error("failed and foreign results must pass through unchanged")
	}
	if _, err := accuracy.PoolPilots(res, accuracy.PoolOptions{Groups: []string{"a"}}); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("wrong group count: %v", err)
	}
	// Uncalibrated fits pass through too.
	raw, _ := almanac.BatchFit(ctx, accuracy.Pilot{Uncalibrated: true}, ys[:2], almanac.BatchOptions{})
	p2, err := accuracy.PoolPilots(raw, accuracy.PoolOptions{})
	if err != nil || p2[0].Fitted != raw[0].Fitted || raw[0].Fitted.(*accuracy.PilotFit).Report().Calibrated {
		t.Errorf("uncalibrated: %v", err)
	}
}
