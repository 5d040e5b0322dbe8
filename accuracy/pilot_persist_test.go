package accuracy_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
	"github.com/almanac-go/almanac/internal/persisttest"
	"github.com/almanac-go/almanac/smoothing"
)

// pilotRouteCases are series of known structure for each of Pilot's
// routes and fallbacks (invented data, and one M3 monthly series).
func pilotRouteCases(t *testing.T) []struct {
	name  string
	y     almanac.Series
	route accuracy.Route
	h     int
} {
	t.Helper()
	m3 := m3data.Load(t, "m3_monthly.csv")[700]
	weekly, _ := inventedWeekly(3*52+10, 0, 11)
	r := rand.New(rand.NewPCG(5, 5))
	intermittent := make([]float64, 96)
	for i := range intermittent {
		if r.Float64() > math.Exp(-0.3) {
			intermittent[i] = 1 + float64(r.IntN(3))
		}
	}
	gappy := make([]float64, 60)
	for i := range gappy {
		gappy[i] = 100 + 20*math.Sin(2*math.Pi*float64(i)/12) + float64(i%5)
	}
	gappy[0], gappy[20], gappy[21], gappy[40] = math.NaN(), math.NaN(), math.NaN(), math.NaN()
	shortWeekly, _ := inventedWeekly(70, 0, 2)
	monthly := func(key string, v ...float64) almanac.Series {
		return almanac.Series{Key: key, Start: date(2020, 1, 1), Freq: calendar.Monthly, Values: v}
	}
	return []struct {
		name  string
		y     almanac.Series
		route accuracy.Route
		h     int
	}{
		{"monthly combination (M3 " + m3.ID + ")", almanac.Series{Key: m3.ID, Start: date(1990, 1, 1), Freq: calendar.Monthly, Values: m3.Train}, accuracy.RouteCombination, 18},
		{"weekly", weekly, accuracy.RouteWeekly, 13},
		{"daily", inventedCycles(calendar.Daily, 120, 1), accuracy.RouteMultiSeasonal, 14},
		{"hourly", inventedCycles(calendar.Hourly, 24*10, 4), accuracy.RouteMultiSeasonal, 24},
		{"intermittent", monthly("parts", intermittent...), accuracy.RouteIntermittent, 12},
		{"gaps repaired", monthly("gappy", gappy...), accuracy.RouteCombination, 12},
		{"fallback: weekly too short", shortWeekly, accuracy.RouteCombination, 8},
		{"fallback: naive", monthly("two", 3, 5), accuracy.RouteBenchmark, 4},
		{"fallback: last value", monthly("one", math.NaN(), 42), accuracy.RouteBenchmark, 4},
	}
}

// TestSavedPilot: a Pilot fit of every route saves and loads back to a
// fit that forecasts, bands and simulates bit-identically (checked by
// internal/persisttest) and reports the same route, members, fallbacks,
// repairs and calibration, calibrated (the default: the route's model
// nested in an accuracy.CalibratedFit) and uncalibrated.
func TestSavedPilot(t *testing.T) {
	ctx := context.Background()
	for _, tc := range pilotRouteCases(t) {
		for _, p := range []accuracy.Pilot{{Uncalibrated: true, Seed: 3, Paths: 300}, {Seed: 3, Paths: 300}} {
			name := tc.name
			if p.Uncalibrated {
				name += ", uncalibrated"
			}
			t.Run(name, func(t *testing.T) {
				fit, err := p.Fit(ctx, tc.y)
				if err != nil {
					t.Fatal(err)
				}
				f := fit.(*accuracy.PilotFit)
				if rep := f.Report(); rep.Route != tc.route {
					t.Fatalf("route %v, want %v (%+v)", rep.Route, tc.route, rep)
				}
				g := persisttest.CheckRoundTrip(t, f, persisttest.Options{H: tc.h})
				want, got := f.Report(), g.(*accuracy.PilotFit).Report()
				if got.Route != want.Route || !slices.Equal(got.Periods, want.Periods) || !slices.Equal(got.Members, want.Members) ||
					!slices.Equal(got.Dropped, want.Dropped) || !slices.Equal(got.Fallbacks, want.Fallbacks) ||
					got.Trimmed != want.Trimmed || got.Demand != want.Demand || got.NonNegative != want.NonNegative ||
					got.Calibrated != want.Calibrated || got.Calibration != want.Calibration || len(got.Repairs) != len(want.Repairs) {
					t.Errorf("report after loading:\n got %+v\nwant %+v", got, want)
				}
				for i := range want.Repairs {
					if got.Repairs[i].Index != want.Repairs[i].Index || math.Float64bits(got.Repairs[i].New) != math.Float64bits(want.Repairs[i].New) {
						t.Errorf("repair %d: got %+v, want %+v", i, got.Repairs[i], want.Repairs[i])
					}
				}
			})
		}
	}
}

// TestSavedPilotTampered: documents changed out of their valid region
// fail to load with an error wrapping almanac.ErrDecode.
func TestSavedPilotTampered(t *testing.T) {
	ctx := context.Background()
	cases := pilotRouteCases(t)
	gappy := cases[5].y
	fit, err := accuracy.Pilot{Uncalibrated: true, Paths: 100}.Fit(ctx, gappy)
	if err != nil {
		t.Fatal(err)
	}
	persisttest.CheckTampered(t, fit, persisttest.Tampers{
		"unknown route":            func(b map[string]any) { b["route"] = "hunch" },
		"no paths":                 func(b map[string]any) { b["paths"] = 0 },
		"too many paths":           func(b map[string]any) { b["paths"] = 1 << 40 },
		"period below one":         func(b map[string]any) { b["periods"] = []any{0.5} },
		"period beyond the series": func(b map[string]any) { b["periods"] = []any{1e6} },
		"no route model":           func(b map[string]any) { delete(b, "inner") },
		"route model not a model":  func(b map[string]any) { b["inner"] = map[string]any{"almanac": "fitted-model"} },
		"gaps not repaired":        func(b map[string]any) { delete(b, "repaired") },
		"another leading gap":      func(b map[string]any) { persisttest.Values(b, "series", "values")[1] = nil },
		"series shortened": func(b map[string]any) {
			s := b["series"].(map[string]any)
			s["values"] = persisttest.Values(b, "series", "values")[:50]
		},
		"unknown member": func(b map[string]any) { b["hunch"] = 1 },
	})
	complete, err := accuracy.Pilot{Uncalibrated: true, Paths: 100}.Fit(ctx, cases[0].y)
	if err != nil {
		t.Fatal(err)
	}
	persisttest.CheckTampered(t, complete, persisttest.Tampers{
		"repaired without gaps": func(b map[string]any) { b["repaired"] = true },
	})
	one, err := accuracy.Pilot{}.Fit(ctx, cases[8].y)
	if err != nil {
		t.Fatal(err)
	}
	persisttest.CheckTampered(t, one, persisttest.Tampers{
		"last value of nothing": func(b map[string]any) {
			inner := b["inner"].(map[string]any)["body"].(map[string]any)["series"].(map[string]any)
			inner["values"] = []any{nil, nil}
		},
	})
	if _, err := almanac.MarshalModel(&accuracy.PilotFit{}); !errors.Is(err, almanac.ErrNotFitted) {
		t.Errorf("saving the zero PilotFit: %v, want an error wrapping ErrNotFitted", err)
	}
}

// TestRefreshPilot: a route whose models all refresh (here one ETS model)
// refreshes through them: the point forecasts equal those of the model
// updated with the new values (smoothing.Fitted.Update, a missing value
// included), and the refreshed fit saves and loads bit-identically with
// its repairs. Pilot's own routes hold models that do not refresh
// (Theta, Croston/SBA, the benchmarks), so refreshing them is an error
// wrapping almanac.ErrNotRefreshable.
func TestRefreshPilot(t *testing.T) {
	ctx := context.Background()
	all := paintSales(60)
	head := all.Head(48)
	ets, err := smoothing.Spec{Trend: smoothing.DampedTrend, Season: smoothing.AdditiveSeason}.Fit(ctx, head)
	if err != nil {
		t.Fatal(err)
	}
	f := accuracy.PilotFitAround(head, ets, accuracy.RouteCombination)
	next := slices.Clone(all.Values[48:])
	next[3] = math.NaN()
	r, err := almanac.Refresh(f, next)
	if err != nil {
		t.Fatal(err)
	}
	want, err := ets.(*smoothing.Fitted).Update(next)
	if err != nil {
		t.Fatal(err)
	}
	fw, _ := want.Forecast(12)
	fr, err := r.Forecast(12, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	persisttest.Same(t, "refreshed point forecasts", fr.Mean, fw.Mean)
	if rep := r.(*accuracy.PilotFit).Report(); rep.Route != accuracy.RouteCombination || len(r.FittedValues()) != 60 {
		t.Errorf("refreshed report %+v, %d fitted values", rep, len(r.FittedValues()))
	}
	persisttest.CheckRoundTrip(t, r, persisttest.Options{H: 12})
	persisttest.CheckTampered(t, r, persisttest.Tampers{
		"refreshed beyond the series": func(b map[string]any) { b["refreshed"] = 60 },
	})
	if _, err := almanac.Refresh(f, []float64{1, math.Inf(1)}); !errors.Is(err, almanac.ErrNonFinite) {
		t.Errorf("an infinite new value: %v", err)
	}

	gappy := paintSales(48)
	gappy.Values[10] = math.NaN()
	for _, p := range []accuracy.Pilot{{}, {Uncalibrated: true}} {
		fit, err := p.Fit(ctx, gappy)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := almanac.Refresh(fit, all.Values[48:50]); !errors.Is(err, almanac.ErrNotRefreshable) {
			t.Errorf("refreshing %s: %v, want an error wrapping ErrNotRefreshable", fit, err)
		}
	}
}

// TestSavedPooledPilots: fits whose bands draw on errors pooled across a
// batch (PoolPilots) save and load bit-identically, pool included, and
// report the pooled calibration after loading.
func TestSavedPooledPilots(t *testing.T) {
	ctx := context.Background()
	var ys []almanac.Series
	for i := range 10 {
		r := rand.New(rand.NewPCG(uint64(i), 9))
		v := make([]float64, 30)
		x := 50.0
		for k := range v {
			x += 0.5 + 2*r.NormFloat64()
			v[k] = x
		}
		ys = append(ys, almanac.Series{Key: "y" + string(rune('a'+i)), Start: date(1995, 1, 1), Freq: calendar.Yearly, Values: v})
	}
	res, err := almanac.BatchFit(ctx, accuracy.Pilot{Paths: 200}, ys, almanac.BatchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	pooled, err := accuracy.PoolPilots(res, accuracy.PoolOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range pooled[:3] {
		f := r.Fitted.(*accuracy.PilotFit)
		if f.Report().Calibration.Source != accuracy.BandsFromPooledErrors {
			t.Fatalf("%s: %+v", r.Key, f.Report().Calibration)
		}
		g := persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 6})
		if got, want := g.(*accuracy.PilotFit).Report().Calibration, f.Report().Calibration; got != want {
			t.Errorf("%s: calibration after loading %+v, want %+v", r.Key, got, want)
		}
	}
}
