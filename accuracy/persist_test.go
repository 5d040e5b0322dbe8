package accuracy_test

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/persisttest"
	"github.com/almanac-go/almanac/smoothing"
)

// paintSales is invented demo data: monthly paint sales of a fictional
// hardware store.
func paintSales(n int) almanac.Series {
	v := make([]float64, n)
	for i := range v {
		v[i] = 80 + 0.8*float64(i) + 12*math.Sin(2*math.Pi*float64(i)/12) + 4*math.Sin(float64(i*i%31))
	}
	return almanac.Series{Key: "store-1/paint", Start: time.Date(2019, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

func TestSavedNaive2(t *testing.T) {
	y := paintSales(48)
	for _, m := range []accuracy.Naive2{{}, {Period: 1}, {Period: 4}} {
		f, err := m.Fit(context.Background(), y)
		if err != nil {
			t.Fatal(err)
		}
		persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 13})
	}
	f, _ := accuracy.Naive2{}.Fit(context.Background(), y)
	persisttest.CheckTampered(t, f, persisttest.Tampers{
		"period 0":      func(b map[string]any) { b["period"] = 0 },
		"missing value": func(b map[string]any) { persisttest.Values(b, "series", "values")[3] = nil },
		"one value":     func(b map[string]any) { b["series"].(map[string]any)["values"] = []any{4} },
	})
}

// TestRefreshCombination checks a combination of models from different
// packages: saved and loaded bit-identically, refreshed through its
// members with a missing value, and the refreshed point forecasts equal
// the combination of the members refitted with fixed parameters.
func TestRefreshCombination(t *testing.T) {
	all := paintSales(60)
	all.Values[55] = math.NaN()
	head := all.Head(48)
	comb := almanac.Combination{Members: []almanac.Model{
		smoothing.Spec{Trend: smoothing.DampedTrend, Season: smoothing.AdditiveSeason},
		arima.Spec{P: 1, D: 1, SD: 1, SQ: 1},
	}, Rule: almanac.CombineWeighted, Weights: []float64{2, 1}, Paths: 200}
	fit, err := comb.Fit(context.Background(), head)
	if err != nil {
		t.Fatal(err)
	}
	persisttest.CheckRoundTrip(t, fit, persisttest.Options{H: 12})
	r, err := almanac.Refresh(fit, all.Values[48:])
	if err != nil {
		t.Fatal(err)
	}
	loaded := persisttest.CheckRoundTrip(t, r, persisttest.Options{H: 12})
	members := fit.(*almanac.CombinationFit).Members()
	ets := members[0].Fitted.(*smoothing.Fitted)
	ar := members[1].Fitted.(*arima.Fitted)
	etsNew, err := ets.Update(all.Values[48:])
	if err != nil {
		t.Fatal(err)
	}
	arNew, err := ar.Update(all.Values[48:])
	if err != nil {
		t.Fatal(err)
	}
	fe, _ := etsNew.Forecast(12)
	fa, _ := arNew.Forecast(12)
	fr, err := loaded.Forecast(12, 80)
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, 12)
	for i := range want {
		want[i] = members[0].Weight*fe.Mean[i] + members[1].Weight*fa.Mean[i]
	}
	persisttest.Close(t, "combined point forecasts", fr.Mean, want, 1e-12)
	d, err := almanac.RefreshPolicy{}.Decide(r, 12)
	if err != nil || !d.Refit {
		t.Fatalf("after 12 new observations the default policy should refit: %+v, %v", d, err)
	}
}
