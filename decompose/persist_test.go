package decompose_test

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/persisttest"
	"github.com/almanac-go/almanac/smoothing"
)

// lumber is invented demo data: monthly lumber sales of a fictional
// hardware chain, positive, seasonal.
func lumber(n int) almanac.Series {
	v := make([]float64, n)
	for i := range v {
		v[i] = (300 + 2*float64(i)) * (1 + 0.2*math.Sin(2*math.Pi*float64(i)/12)) * (1 + 0.02*math.Cos(float64(i*i)))
	}
	return almanac.Series{Key: "chain/lumber", Start: time.Date(2018, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

func TestSavedForecasterRoundTrip(t *testing.T) {
	y := lumber(60)
	for _, tc := range []struct {
		name string
		m    decompose.Forecaster
	}{
		{"STL with drift", decompose.Forecaster{Model: almanac.Drift{}}},
		{"robust STL with ETS", decompose.Forecaster{Model: smoothing.Spec{Trend: smoothing.DampedTrend}, Method: decompose.STL{Robust: true}}},
		{"MSTL with theta", decompose.Forecaster{Model: smoothing.Theta{}, Method: decompose.MSTL{Periods: []float64{6, 12}}}},
		{"multiplicative classical with box-cox", decompose.Forecaster{Model: almanac.BoxCox{Model: almanac.Naive{}}, Method: decompose.Classical{Multiplicative: true}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f, err := tc.m.Fit(context.Background(), y)
			if err != nil {
				t.Fatal(err)
			}
			g := persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 15})
			d, e := f.(*decompose.ForecasterFit).Decomposition(), g.(*decompose.ForecasterFit).Decomposition()
			persisttest.Same(t, "trend", e.Trend, d.Trend)
			persisttest.Same(t, "remainder", e.Remainder, d.Remainder)
			if len(e.Settings) != len(d.Settings) || (len(d.Settings) > 0 && e.Settings[0] != d.Settings[0]) {
				t.Errorf("settings %v, want %v", e.Settings, d.Settings)
			}
		})
	}
}

func TestSavedForecasterTampered(t *testing.T) {
	f, err := decompose.Forecaster{Model: almanac.Drift{}, Method: decompose.Classical{Multiplicative: true}}.Fit(context.Background(), lumber(48))
	if err != nil {
		t.Fatal(err)
	}
	persisttest.CheckTampered(t, f, persisttest.Tampers{
		"negative seasonal factor": func(b map[string]any) {
			s := b["seasonals"].([]any)[0].([]any)
			s[len(s)-1] = -0.5
		},
		"seasonal missing at the end": func(b map[string]any) {
			s := b["seasonals"].([]any)[0].([]any)
			s[len(s)-2] = nil
		},
		"period beyond the data": func(b map[string]any) { b["periods"] = []any{1000} },
		"short trend":            func(b map[string]any) { b["trend"] = b["trend"].([]any)[:3] },
		"no seasonal component":  func(b map[string]any) { b["seasonals"] = []any{} },
		"inner of another length": func(b map[string]any) {
			b["series"].(map[string]any)["values"] = persisttest.Values(b, "series", "values")[:40]
		},
		"inner not a model": func(b map[string]any) { b["inner"] = map[string]any{"almanac": "x"} },
		"method name empty": func(b map[string]any) { b["method"] = "" },
	})
}
