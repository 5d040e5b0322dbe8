package accuracy_test

import (
	"context"
	"errors"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/smoothing"
)

// FuzzLoadModel feeds the saved-model decoder with mutations of
// documents of every model package (this test package imports them all,
// so every kind is registered): no input may panic, every failure must
// wrap almanac.ErrDecode, and whatever loads must save, load again to
// the same model and forecast without NaN or ±Inf behind a nil error.
func FuzzLoadModel(f *testing.F) {
	y := paintSales(40)
	y.Values[30] = math.NaN()
	complete := paintSales(40)
	models := []struct {
		m almanac.Model
		y almanac.Series
	}{
		{smoothing.Spec{Error: smoothing.MultiplicativeError, Trend: smoothing.DampedTrend, Season: smoothing.MultiplicativeSeason}, complete},
		{smoothing.Theta{}, complete},
		{smoothing.Croston{}, complete},
		{smoothing.HoltWinters{Alpha: 0.2, Beta: 0.1, Gamma: 0.1}, complete},
		{arima.Spec{P: 1, D: 1, SQ: 1, SD: 1}, y},
		{arima.Spec{P: 1, Calendar: calendar.Design{Effects: []calendar.Effect{
			calendar.Event{Name: "move", Shape: calendar.Step, From: time.Date(2020, 5, 1, 0, 0, 0, 0, time.UTC)},
			calendar.HolidayCount{Calendar: calendar.Calendar{Holidays: []calendar.Holiday{{Name: "fair", Rule: calendar.EasterOffset{Days: 1}}}}},
		}}}, y},
		{decompose.Forecaster{Model: almanac.Drift{}}, complete},
		{accuracy.Naive2{}, complete},
		{almanac.Combination{Members: []almanac.Model{almanac.Naive{}, smoothing.Spec{}}, Paths: 20}, complete},
		{accuracy.Calibrated{Model: smoothing.Spec{}, Horizon: 3, Origins: 6, MinErrors: 4, Paths: 5}, complete},
	}
	for _, tc := range models {
		fit, err := tc.m.Fit(context.Background(), tc.y)
		if err != nil {
			f.Fatal(err)
		}
		if r, ok := fit.(almanac.Refresher); ok {
			if g, err := r.Refresh([]float64{90, math.NaN()}); err == nil {
				fit = g
			}
		}
		doc, err := almanac.MarshalModel(fit)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(doc)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := almanac.UnmarshalModel(data)
		if err != nil {
			if !errors.Is(err, almanac.ErrDecode) {
				t.Fatalf("error not wrapping ErrDecode: %v", err)
			}
			return
		}
		doc, err := almanac.MarshalModel(g)
		if err != nil {
			t.Fatalf("a loaded model does not save: %v", err)
		}
		h, err := almanac.UnmarshalModel(doc)
		if err != nil {
			t.Fatalf("a saved loaded model does not load: %v", err)
		}
		if h.String() != g.String() {
			t.Fatalf("%s became %s", g, h)
		}
		fc, err := g.Forecast(3, 80)
		if err != nil {
			return
		}
		for _, v := range append(append(fc.Mean, fc.Intervals[0].Lower...), fc.Intervals[0].Upper...) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("forecast %v with a nil error", fc)
			}
		}
	})
}
