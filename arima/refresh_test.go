package arima_test

import (
	"context"
	"errors"
	"math"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/persisttest"
)

// footfall is invented demo data: monthly visitors of a fictional
// hardware store, with trend, season, a promotion effect and noise from
// a fixed recursion (no random source needed).
func footfall(n int, missing ...int) (almanac.Series, []float64) {
	v := make([]float64, n)
	promo := make([]float64, n)
	e := 0.0
	for i := range v {
		e = 0.6*e + math.Sin(float64(i*i%97))*8
		if i%7 == 3 || i%11 == 5 {
			promo[i] = 1
		}
		v[i] = 500 + 2.5*float64(i) + 60*math.Sin(2*math.Pi*float64(i)/12) + 35*promo[i] + e
	}
	for _, i := range missing {
		v[i] = math.NaN()
	}
	return almanac.Series{Key: "store-2/visitors", Start: time.Date(2016, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}, promo
}

var promoEvent = calendar.Design{Effects: []calendar.Effect{
	calendar.Event{Name: "reopening", Shape: calendar.Step, From: time.Date(2018, 6, 1, 0, 0, 0, 0, time.UTC)},
	calendar.Event{Name: "flood", Shape: calendar.Decay, From: time.Date(2019, 2, 1, 0, 0, 0, 0, time.UTC), Rate: 0.5},
	calendar.HolidayCount{Calendar: calendar.Calendar{Holidays: []calendar.Holiday{
		{Name: "spring fair", Rule: calendar.EasterOffset{Days: 1}},
		{Name: "founders day", Rule: calendar.FixedDate{Month: time.May, Day: 14, Observed: calendar.NearestWeekday}},
		{Name: "harvest", Rule: calendar.NthWeekday{Month: time.October, Weekday: time.Monday, N: 2}},
		{Name: "closure", Rule: calendar.Span{First: time.Date(2017, 3, 6, 0, 0, 0, 0, time.UTC), Last: time.Date(2017, 3, 9, 0, 0, 0, 0, time.UTC)}},
	}}},
	calendar.Cycle{Period: 6, Harmonics: 1},
}}

// dayCounts are calendar rules counting days, for a model without
// differencing (differenced, the day counts are collinear).
var (
	dayCounts = calendar.Design{Stamp: calendar.StampStart, Effects: []calendar.Effect{
		calendar.WorkingDayCount{Name: "open days", Calendar: calendar.Calendar{Weekend: []time.Weekday{time.Sunday}}},
	}}
	weekdays = calendar.Design{Stamp: calendar.StampEnd, Effects: []calendar.Effect{calendar.WeekdayCounts{Prefix: "n"}}}
)

type arimaCase struct {
	name  string
	spec  arima.Spec
	promo bool // the spec has the promo regressor
}

func arimaCases() []arimaCase {
	return []arimaCase{
		{name: "ARMA(1,1) with mean", spec: arima.Spec{P: 1, Q: 1}},
		{name: "ARIMA(2,1,0) with drift", spec: arima.Spec{P: 2, D: 1, Constant: arima.ConstantInclude}},
		{name: "airline", spec: arima.Spec{Q: 1, D: 1, SD: 1, SQ: 1}},
		{name: "seasonal AR with differencing", spec: arima.Spec{P: 1, D: 1, SP: 1, Q: 1}},
		{name: "ML", spec: arima.Spec{P: 1, Q: 1, D: 1, Method: arima.ML}},
		{name: "diffuse prior", spec: arima.Spec{Q: 1, D: 1, SD: 1, Prior: arima.DiffusePrior}},
		{name: "regressor", spec: arima.Spec{P: 1, D: 1, SQ: 1, SD: 1}, promo: true},
		{name: "calendar rules", spec: arima.Spec{P: 1, Q: 1, D: 1, Calendar: promoEvent}},
		{name: "working days", spec: arima.Spec{P: 1, Calendar: dayCounts}},
		{name: "weekday counts", spec: arima.Spec{P: 1, Calendar: weekdays}},
		{name: "regressor, calendar and fixed coefficient", spec: arima.Spec{P: 1, Constant: arima.ConstantInclude, D: 1, Calendar: promoEvent, Fixed: map[string]float64{"ar1": 0.2}}, promo: true},
	}
}

func (c arimaCase) withPromo(promo []float64) arima.Spec {
	s := c.spec
	if c.promo {
		s.Regressors = []arima.Regressor{{Name: "promo", Values: promo}}
	}
	return s
}

func fitArima(t *testing.T, s arima.Spec, y almanac.Series) *arima.Fitted {
	t.Helper()
	f, err := s.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("Fit(%v): %v", s, err)
	}
	return f.(*arima.Fitted)
}

// allFixed returns s with every coefficient of f fixed at its value.
func allFixed(s arima.Spec, f *arima.Fitted) arima.Spec {
	s.Fixed = map[string]float64{}
	for _, c := range f.Coef() {
		s.Fixed[c.Name] = c.Value
	}
	return s
}

// TestRefreshARIMA checks that Update with new observations (some
// missing) equals a fit of the whole series with every coefficient fixed
// at the estimates, to 1e-12: residuals, σ², log-likelihood, forecasts
// and bands.
func TestRefreshARIMA(t *testing.T) {
	for _, gaps := range []struct {
		name    string
		missing []int
	}{{"complete", nil}, {"missing values", []int{20, 61, 66, 67}}} {
		all, promo := footfall(72, gaps.missing...)
		head := all.Head(60)
		for _, tc := range arimaCases() {
			t.Run(gaps.name+"/"+tc.name, func(t *testing.T) {
				f := fitArima(t, tc.withPromo(promo[:60]), head)
				var got *arima.Fitted
				var err error
				if tc.promo {
					got, err = f.UpdateWith(all.Values[60:], [][]float64{promo[60:]})
				} else {
					var r almanac.Fitted
					r, err = almanac.Refresh(f, all.Values[60:])
					got, _ = r.(*arima.Fitted)
				}
				if err != nil {
					t.Fatal(err)
				}
				want := fitArima(t, allFixed(tc.withPromo(promo), f), all)
				persisttest.Close(t, "residuals", got.Residuals(), want.Residuals(), 1e-12)
				persisttest.Close(t, "fitted values", got.FittedValues(), want.FittedValues(), 1e-12)
				persisttest.Close(t, "sigma2", []float64{got.Sigma2(), got.LogLik()}, []float64{want.Sigma2(), want.LogLik()}, 1e-12)
				if got.NumObs() != want.NumObs() || got.NumParams() != f.NumParams() {
					t.Errorf("observations %d (refit %d), parameters %d (fit %d)", got.NumObs(), want.NumObs(), got.NumParams(), f.NumParams())
				}
				fut := func(m *arima.Fitted) (almanac.Forecast, error) {
					if tc.promo {
						return m.ForecastWith(6, [][]float64{{1, 0, 0, 1, 0, 1}}, 80, 95)
					}
					return m.Forecast(6, 80, 95)
				}
				fg, err := fut(got)
				if err != nil {
					t.Fatal(err)
				}
				fw, _ := fut(want)
				persisttest.Close(t, "point forecasts", fg.Mean, fw.Mean, 1e-12)
				persisttest.Close(t, "upper bounds", fg.Intervals[1].Upper, fw.Intervals[1].Upper, 1e-12)
				if !fg.Start.Equal(fw.Start) {
					t.Errorf("forecast start %v, want %v", fg.Start, fw.Start)
				}
			})
		}
	}
}

func TestRefreshARIMABadInput(t *testing.T) {
	y, promo := footfall(60)
	plain := fitArima(t, arima.Spec{P: 1, D: 1}, y)
	withReg := fitArima(t, arima.Spec{P: 1, Regressors: []arima.Regressor{{Name: "promo", Values: promo}}}, y)
	css := fitArima(t, arima.Spec{P: 1, D: 1, Method: arima.CSS}, y)
	for _, tc := range []struct {
		name string
		call func() error
		want error
	}{
		{"infinite value", func() error { _, err := plain.Update([]float64{1, math.Inf(-1)}); return err }, almanac.ErrNonFinite},
		{"regressors needed", func() error { _, err := withReg.Update([]float64{1}); return err }, arima.ErrNeedRegressors},
		{"regressor too short", func() error { _, err := withReg.UpdateWith([]float64{1, 2}, [][]float64{{1}}); return err }, arima.ErrNeedRegressors},
		{"regressor NaN", func() error { _, err := withReg.UpdateWith([]float64{1}, [][]float64{{math.NaN()}}); return err }, arima.ErrNeedRegressors},
		{"extra regressor", func() error { _, err := plain.UpdateWith([]float64{1}, [][]float64{{1}}); return err }, arima.ErrNeedRegressors},
		{"CSS fit", func() error { _, err := css.Update([]float64{1}); return err }, almanac.ErrNotRefreshable},
		{"zero value", func() error { _, err := (&arima.Fitted{}).Update([]float64{1}); return err }, almanac.ErrNotFitted},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if err := tc.call(); !errors.Is(err, tc.want) {
				t.Fatalf("got %v, want %v", err, tc.want)
			}
		})
	}
	// Nothing new: the same forecasts.
	g, err := plain.Update(nil)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := g.Forecast(3, 80)
	b, _ := plain.Forecast(3, 80)
	persisttest.SameForecast(t, a, b)
	// Stepwise and at once agree bit for bit.
	all, _ := footfall(70, 64)
	step := plain
	for _, v := range all.Values[60:] {
		if step, err = step.Update([]float64{v}); err != nil {
			t.Fatal(err)
		}
	}
	once, err := plain.Update(slices.Clone(all.Values[60:]))
	if err != nil {
		t.Fatal(err)
	}
	persisttest.Same(t, "residuals", step.Residuals(), once.Residuals())
	if step.Sigma2() != once.Sigma2() || step.LogLik() != once.LogLik() {
		t.Errorf("stepwise σ² %v, log-likelihood %v; at once %v, %v", step.Sigma2(), step.LogLik(), once.Sigma2(), once.LogLik())
	}
}
