package accuracy_test

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"slices"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/internal/persisttest"
	"github.com/almanac-go/almanac/smoothing"
)

// calibratedFits returns calibrated fits whose bands come from each
// source: their own errors (an ETS and an ARIMA model, by spread and by
// naive scale, censored at zero), the model's own bands (too few
// errors), and a pool larger than Paths (the saved document holds the
// subsample drawn from). The data are invented (paintSales).
func calibratedFits(t *testing.T) map[string]*accuracy.CalibratedFit {
	t.Helper()
	ctx := context.Background()
	y := paintSales(72)
	out := map[string]*accuracy.CalibratedFit{}
	fit := func(name string, c accuracy.Calibrated, y almanac.Series) {
		f, err := c.Fit(ctx, y)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		out[name] = f.(*accuracy.CalibratedFit)
	}
	ets := smoothing.Spec{Trend: smoothing.DampedTrend, Season: smoothing.AdditiveSeason}
	fit("own errors, ETS", accuracy.Calibrated{Model: ets, Horizon: 6, Origins: 8, MinErrors: 5, Paths: 6, Seed: 3}, y)
	fit("own errors, ARIMA, naive scale, non-negative", accuracy.Calibrated{Model: arima.Spec{P: 1, D: 1, SD: 1}, Horizon: 4,
		Origins: 6, MinErrors: 4, Scale: accuracy.ScaleByNaive, NonNegative: true, Pooling: accuracy.PoolNever}, y)
	fit("model bands", accuracy.Calibrated{Model: almanac.Naive{}, Origins: 3}, y)
	fit("model bands, strict", accuracy.Calibrated{Model: almanac.Naive{}, Origins: 3, Strict: true}, y)

	res := calibratedBatch(t, accuracy.Calibrated{Model: almanac.SeasonalNaive{}, Horizon: 5, Origins: 6, MinErrors: 8, Paths: 11, Seed: 9}, 5, 40, 4)
	res, err := accuracy.PoolCalibration(res, accuracy.PoolOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out["pooled, subsampled"] = res[2].Fitted.(*accuracy.CalibratedFit)
	return out
}

// calibratedBatch fits spec to k invented series (paintSales) of n,
// n + step, ... observations.
func calibratedBatch(t *testing.T, spec accuracy.Calibrated, k, n, step int) []almanac.BatchResult {
	t.Helper()
	ys := make([]almanac.Series, k)
	for i := range ys {
		ys[i] = paintSales(n + step*i)
		ys[i].Key = fmt.Sprint("store-", i)
	}
	res, err := almanac.BatchFit(context.Background(), spec, ys, almanac.BatchOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestSavedCalibrated: a calibrated fit saves and loads bit-identically
// (point forecasts, bands, quantiles and Simulate from the same source,
// beyond the calibrated horizon too), with the same status, own
// trajectories and document on a second save, whatever its bands come
// from.
func TestSavedCalibrated(t *testing.T) {
	fits := calibratedFits(t)
	wantSource := map[string]accuracy.BandSource{
		"own errors, ETS": accuracy.BandsFromOwnErrors, "own errors, ARIMA, naive scale, non-negative": accuracy.BandsFromOwnErrors,
		"model bands": accuracy.BandsFromModel, "model bands, strict": accuracy.BandsFromModel,
		"pooled, subsampled": accuracy.BandsFromPooledErrors,
	}
	for name, f := range fits {
		t.Run(name, func(t *testing.T) {
			st := f.Status()
			if st.Source != wantSource[name] {
				t.Fatalf("bands from %v, want %v (status %+v)", st.Source, wantSource[name], st)
			}
			if name == "pooled, subsampled" && st.Pooled <= 11 {
				t.Fatalf("a pool of %d does not exceed Paths (11)", st.Pooled)
			}
			for _, h := range []int{1, st.Horizon, st.Horizon + 7} {
				g := persisttest.CheckRoundTrip(t, f, persisttest.Options{H: h, Levels: []float64{50, 80, 95}})
				gf := g.(*accuracy.CalibratedFit)
				if gf.Status() != st {
					t.Errorf("status: loaded %+v, saved %+v", gf.Status(), st)
				}
				if !slices.EqualFunc(gf.Trajectories(), f.Trajectories(), slices.Equal) {
					t.Error("own trajectories differ after loading")
				}
			}
		})
	}
}

// TestSavedCalibratedSubsample: the document of a fit drawing from a
// pool larger than Paths holds Paths pooled trajectories, not the pool.
func TestSavedCalibratedSubsample(t *testing.T) {
	f := calibratedFits(t)["pooled, subsampled"]
	doc, err := almanac.MarshalModel(f)
	if err != nil {
		t.Fatal(err)
	}
	var env struct {
		Body struct {
			PoolSize int         `json:"pool_size"`
			Drawn    [][]float64 `json:"pool_drawn"`
		} `json:"body"`
	}
	if err := json.Unmarshal(doc, &env); err != nil {
		t.Fatal(err)
	}
	if env.Body.PoolSize != f.Status().Pooled || len(env.Body.Drawn) != 11 {
		t.Fatalf("pool of %d stored with %d trajectories, want %d and 11", env.Body.PoolSize, len(env.Body.Drawn), f.Status().Pooled)
	}
	// Forecast's paths are exactly the stored trajectories on the
	// model's points and scales: Paths of them.
	fc, err := f.Forecast(5, 80)
	if err != nil {
		t.Fatal(err)
	}
	if n := len(fc.SamplePaths()); n != 11 {
		t.Fatalf("%d sample paths, want 11", n)
	}
}

func TestSavedCalibratedTampered(t *testing.T) {
	fits := calibratedFits(t)
	set := func(key string, v any) func(map[string]any) {
		return func(b map[string]any) { b[key] = v }
	}
	persisttest.CheckTampered(t, fits["own errors, ETS"], persisttest.Tampers{
		"horizon 0":                             set("horizon", 0),
		"horizon above the most":                set("horizon", almanac.MaxHorizon+1),
		"unknown error scale":                   set("error_scale", "by guess"),
		"unknown pooling rule":                  set("pooling", "pool sometimes"),
		"unknown band source":                   set("bands_from", "elsewhere"),
		"band source not implied by the counts": set("bands_from", accuracy.BandsFromModel.String()),
		"negative naive scale":                  set("naive_scale", []any{-1}),
		"two naive scales":                      set("naive_scale", []any{1, 2}),
		"min errors 0":                          set("min_errors", 0),
		"no paths":                              set("paths", 0),
		"too many paths":                        set("paths", 1<<21),
		"more failed than laid out":             set("failed", 100),
		"negative rolled":                       set("rolled", -1),
		"more trajectories than origins":        set("origins", 2),
		"negative pool size":                    set("pool_size", -3),
		"pool stored for own errors":            set("pool_drawn", []any{[]any{1, 2, 3, 4, 5, 6}}),
		"short trajectory":                      func(b map[string]any) { b["own"].([]any)[2] = []any{1, 2} },
		"missing error":                         func(b map[string]any) { b["own"].([]any)[0].([]any)[1] = nil },
		"string error":                          func(b map[string]any) { b["own"].([]any)[0].([]any)[1] = "NaN" },
		"unknown unit":                          set("unit", "fortnight"),
		"negative multiple":                     set("every", -1),
		"inner model not a document":            set("inner", map[string]any{"x": 1}),
		"inner model tampered": func(b map[string]any) {
			b["inner"].(map[string]any)["model"] = "ETS(Z,Z,Z)"
		},
		"unknown member": set("seasonality", 12),
	})
	persisttest.CheckTampered(t, fits["pooled, subsampled"], persisttest.Tampers{
		"pool dropped": func(b map[string]any) { delete(b, "pool_drawn") },
		"pooled trajectory dropped": func(b map[string]any) {
			b["pool_drawn"] = b["pool_drawn"].([]any)[1:]
		},
		"pool larger than stated": set("pool_size", 3),
		"pooled trajectory too long": func(b map[string]any) {
			b["pool_drawn"].([]any)[0] = []any{1, 2, 3, 4, 5, 6}
		},
	})
}

// TestSavedCalibratedErrors: what cannot be saved gives an error, never
// a panic.
func TestSavedCalibratedErrors(t *testing.T) {
	if _, err := almanac.MarshalModel(&accuracy.CalibratedFit{}); !errors.Is(err, almanac.ErrNotFitted) {
		t.Errorf("zero value: %v, want an error wrapping ErrNotFitted", err)
	}
	if _, err := (&accuracy.CalibratedFit{}).Refresh([]float64{1}); !errors.Is(err, almanac.ErrNotFitted) {
		t.Errorf("refreshing the zero value: %v, want an error wrapping ErrNotFitted", err)
	}
	// narrowNaive's fits do not implement almanac.Storable.
	f, err := accuracy.Calibrated{Model: narrowNaive{Shrink: 0.5}, Origins: 3}.Fit(context.Background(), paintSales(40))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := almanac.MarshalModel(f); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("inner model that cannot be saved: %v, want an error wrapping ErrInvalid", err)
	}
}

// TestRefreshCalibrated: refreshing a calibrated fit refreshes its inner
// model and keeps the calibration as measured: the refreshed fit's point
// forecasts are those of the inner model refreshed on its own, its
// status and error trajectories are unchanged, and it saves and loads
// bit-identically. An inner model that cannot refresh gives an
// error wrapping ErrNotRefreshable.
func TestRefreshCalibrated(t *testing.T) {
	ctx := context.Background()
	all := paintSales(84)
	all.Values[78] = math.NaN()
	head := all.Head(72)
	for _, name := range []string{"own errors, ETS", "own errors, ARIMA, naive scale, non-negative"} {
		t.Run(name, func(t *testing.T) {
			f := calibratedFits(t)[name]
			r, err := almanac.Refresh(f, all.Values[72:])
			if err != nil {
				t.Fatal(err)
			}
			rf := r.(*accuracy.CalibratedFit)
			if rf.Status() != f.Status() || !slices.EqualFunc(rf.Trajectories(), f.Trajectories(), slices.Equal) {
				t.Fatalf("refresh changed the calibration: %+v, was %+v", rf.Status(), f.Status())
			}
			inner, err := almanac.Refresh(f.Inner(), all.Values[72:])
			if err != nil {
				t.Fatal(err)
			}
			h := f.Status().Horizon
			want, err := inner.Forecast(h)
			if err != nil {
				t.Fatal(err)
			}
			got, err := rf.Forecast(h, 80)
			if err != nil {
				t.Fatal(err)
			}
			for s := range h {
				w := want.Mean[s]
				if name != "own errors, ETS" {
					w = max(w, 0) // NonNegative
				}
				if got.Mean[s] != w {
					t.Fatalf("step %d: point forecast %v, the refreshed inner model's %v", s+1, got.Mean[s], w)
				}
			}
			if !got.Start.Equal(want.Start) {
				t.Errorf("forecast starts at %v, want %v", got.Start, want.Start)
			}
			if fits := len(rf.FittedValues()); fits != all.Len() {
				t.Errorf("%d fitted values after the refresh, want %d", fits, all.Len())
			}
			persisttest.CheckRoundTrip(t, r, persisttest.Options{H: h})
		})
	}
	f, err := accuracy.Calibrated{Model: narrowNaive{Shrink: 0.5}, Origins: 3}.Fit(ctx, head)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := almanac.Refresh(f, []float64{1}); !errors.Is(err, almanac.ErrNotRefreshable) {
		t.Errorf("inner model that cannot refresh: %v, want an error wrapping ErrNotRefreshable", err)
	}
}

// TestSavedCalibratedPoolsAgain: loaded fits keep what PoolCalibration
// needs (their own trajectories, horizon, scale and frequency), so a
// batch of loaded fits pools to the same bands as the batch that was
// saved.
func TestSavedCalibratedPoolsAgain(t *testing.T) {
	res := calibratedBatch(t, accuracy.Calibrated{Model: almanac.Drift{}, Horizon: 3, Origins: 5, MinErrors: 12, Paths: 9, Seed: 4}, 4, 44, 3)
	loaded := make([]almanac.BatchResult, len(res))
	for i, r := range res {
		if r.Err != nil {
			t.Fatal(r.Err)
		}
		doc, err := almanac.MarshalModel(r.Fitted)
		if err != nil {
			t.Fatal(err)
		}
		g, err := almanac.UnmarshalModel(doc)
		if err != nil {
			t.Fatal(err)
		}
		loaded[i] = almanac.BatchResult{Key: r.Key, Fitted: g}
	}
	want, err := accuracy.PoolCalibration(res, accuracy.PoolOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got, err := accuracy.PoolCalibration(loaded, accuracy.PoolOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if st := want[i].Fitted.(*accuracy.CalibratedFit).Status(); st.Source != accuracy.BandsFromPooledErrors || st.Pooled != 20 {
			t.Fatalf("series %d: status %+v, want bands from a pool of 20", i, st)
		}
		persisttest.CheckRoundTrip(t, want[i].Fitted, persisttest.Options{H: 4})
		fw, err := want[i].Fitted.Forecast(4, 80)
		if err != nil {
			t.Fatal(err)
		}
		fg, err := got[i].Fitted.Forecast(4, 80)
		if err != nil {
			t.Fatal(err)
		}
		persisttest.SameForecast(t, fg, fw)
	}
}
