package smoothing_test

import (
	"context"
	"errors"
	"math"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/persisttest"
	"github.com/almanac-go/almanac/smoothing"
)

// quarterlySales is invented demo data: quarterly sales of a fictional
// garden centre, positive, with trend and season.
func quarterlySales(n int) almanac.Series {
	v := make([]float64, n)
	for i := range v {
		season := []float64{0.8, 1.25, 1.1, 0.85}[i%4]
		v[i] = (200 + 3*float64(i)) * season * (1 + 0.03*math.Sin(float64(i*i)))
	}
	return almanac.Series{Key: "garden/seeds", Start: time.Date(2015, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
}

// allForms lists every ETS form of the taxonomy.
func allForms() []smoothing.Spec {
	var out []smoothing.Spec
	for _, e := range []smoothing.ErrorType{smoothing.AdditiveError, smoothing.MultiplicativeError} {
		for _, tr := range []smoothing.TrendType{smoothing.NoTrend, smoothing.AdditiveTrend, smoothing.DampedTrend, smoothing.MultiplicativeTrend, smoothing.DampedMultiplicativeTrend} {
			for _, s := range []smoothing.SeasonType{smoothing.NoSeason, smoothing.AdditiveSeason, smoothing.MultiplicativeSeason} {
				out = append(out, smoothing.Spec{Error: e, Trend: tr, Season: s, Seed: 5, Paths: 300})
			}
		}
	}
	return out
}

func fitOrSkip(t *testing.T, m almanac.Model, y almanac.Series) almanac.Fitted {
	t.Helper()
	f, err := m.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("Fit: %v", err)
	}
	return f
}

func TestSavedETSRoundTrip(t *testing.T) {
	y := quarterlySales(36)
	for _, sp := range allForms() {
		t.Run(sp.String(), func(t *testing.T) {
			f := fitOrSkip(t, sp, y)
			persisttest.CheckRoundTrip(t, f, persisttest.Options{H: 9})
			// A refreshed model, with a missing value, saves and loads
			// bit-identically too.
			g, err := f.(*smoothing.Fitted).Update([]float64{y.Values[2] * 1.3, math.NaN(), y.Values[4] * 1.4})
			if err != nil {
				t.Fatal(err)
			}
			persisttest.CheckRoundTrip(t, g, persisttest.Options{H: 9})
		})
	}
}

func TestSavedSmoothingRoundTrip(t *testing.T) {
	y := quarterlySales(36)
	demand := y.Clone()
	for i := range demand.Values {
		if i%3 != 0 {
			demand.Values[i] = 0
		}
	}
	zero := y.Clone()
	clear(zero.Values)
	cases := []struct {
		name  string
		model almanac.Model
		y     almanac.Series
	}{
		{"select", smoothing.Select{}, y},
		{"ets with fixed values", smoothing.Spec{Trend: smoothing.DampedTrend, Season: smoothing.AdditiveSeason, Alpha: smoothing.Value(0.3), Phi: smoothing.Value(0.9), InitSeason: []float64{-40, 50, 20, -30}}, y},
		{"ets admissible bounds", smoothing.Spec{Trend: smoothing.AdditiveTrend, Bounds: smoothing.AdmissibleBounds}, y},
		{"ets constant series", smoothing.Spec{}, almanac.Series{Key: "c", Start: y.Start, Freq: y.Freq, Values: []float64{5, 5, 5, 5, 5, 5}}},
		{"holt-winters additive", smoothing.HoltWinters{Alpha: 0.3, Beta: 0.1, Gamma: 0.2}, y},
		{"holt-winters multiplicative estimated", smoothing.HoltWinters{Multiplicative: true, Estimate: true}, y},
		{"theta", smoothing.Theta{}, y},
		{"theta fixed alpha unadjusted", smoothing.Theta{Alpha: 0.4, Adjust: smoothing.AdjustNever, Theta: 3}, y},
		{"theta adjusted", smoothing.Theta{Adjust: smoothing.AdjustAlways}, y},
		{"croston", smoothing.Croston{Seed: 3, Paths: 200}, demand},
		{"sba estimated", smoothing.Croston{Variant: smoothing.CrostonSBA, EstimateAlpha: true, Paths: 100}, demand},
		{"tsb estimated", smoothing.TSB{Estimate: true, Paths: 100}, demand},
		{"tsb no demand", smoothing.TSB{Paths: 100}, zero},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			persisttest.CheckRoundTrip(t, fitOrSkip(t, tc.model, tc.y), persisttest.Options{H: 7})
		})
	}
}

func setBody(key string, v any) func(map[string]any) {
	return func(b map[string]any) { b[key] = v }
}

func TestSavedSmoothingTampered(t *testing.T) {
	y := quarterlySales(36)
	ets := fitOrSkip(t, smoothing.Spec{Error: smoothing.MultiplicativeError, Trend: smoothing.DampedMultiplicativeTrend, Season: smoothing.MultiplicativeSeason}, y)
	persisttest.CheckTampered(t, ets, persisttest.Tampers{
		"alpha above its bound": func(b map[string]any) { b["params"].(map[string]any)["Alpha"] = 2.5 },
		"negative beta":         func(b map[string]any) { b["params"].(map[string]any)["Beta"] = -0.1 },
		"phi above 1":           func(b map[string]any) { b["params"].(map[string]any)["Phi"] = 1.2 },
		"alpha as a string":     func(b map[string]any) { b["params"].(map[string]any)["Alpha"] = "NaN" },
		"unknown form":          setBody("trend", "Q"),
		"form changed":          setBody("season", "A"),
		"period too long":       setBody("period", 400),
		"too few seasonal states": func(b map[string]any) {
			b["season0"] = b["season0"].([]any)[:3]
		},
		"negative seasonal factor": func(b map[string]any) { b["season0"].([]any)[1] = -1.0 },
		"zero growth rate":         setBody("trend0", 0),
		"zero frame scale":         setBody("frame", []any{0, 0, 1}),
		"negative spread":          setBody("frame", []any{1, 0, -1}),
		"non-positive data":        func(b map[string]any) { persisttest.Values(b, "series", "values")[4] = -3.0 },
		"missing value in the estimation sample": func(b map[string]any) {
			persisttest.Values(b, "series", "values")[4] = nil
		},
		"estimated on more than the data": setBody("estimated_on", 37),
		"estimated on nothing":            setBody("estimated_on", 0),
		"negative degrees of freedom":     setBody("df", -3),
		"huge path count":                 setBody("paths", 1e9),
		"unknown member":                  setBody("variance", 1),
	})
	persisttest.CheckTampered(t, fitOrSkip(t, smoothing.HoltWinters{Alpha: 0.3, Beta: 0.1, Gamma: 0.2}, y), persisttest.Tampers{
		"alpha above 1": setBody("alpha", 1.5),
		"period 1":      setBody("period", 1),
		"too short": func(b map[string]any) {
			b["series"].(map[string]any)["values"] = persisttest.Values(b, "series", "values")[:5]
		},
	})
	persisttest.CheckTampered(t, fitOrSkip(t, smoothing.Theta{}, y), persisttest.Tampers{
		"theta below 1":   setBody("theta", 0.5),
		"alpha zero":      setBody("alpha", 0),
		"alpha above 1":   setBody("alpha", 1.5),
		"missing value":   func(b map[string]any) { persisttest.Values(b, "series", "values")[4] = nil },
		"negative period": setBody("period", -4),
	})
	persisttest.CheckTampered(t, fitOrSkip(t, smoothing.TSB{}, y), persisttest.Tampers{
		"unknown method":   setBody("method", "SES"),
		"beta for croston": setBody("method", "Croston"),
		"negative demand":  func(b map[string]any) { persisttest.Values(b, "series", "values")[4] = -1.0 },
		"negative paths":   setBody("paths", -1),
	})
}

// fixedRefit fits spec with every parameter and initial state fixed at
// the values of f: what a refresh must equal.
func fixedRefit(t *testing.T, f *smoothing.Fitted, y almanac.Series) *smoothing.Fitted {
	t.Helper()
	s := f.Spec()
	p := f.Params
	s.Alpha, s.InitLevel = smoothing.Value(p.Alpha), smoothing.Value(f.InitLevel)
	if s.Trend != smoothing.NoTrend {
		s.Beta, s.InitTrend = smoothing.Value(p.Beta), smoothing.Value(f.InitTrend)
	}
	if s.Trend == smoothing.DampedTrend || s.Trend == smoothing.DampedMultiplicativeTrend {
		s.Phi = smoothing.Value(p.Phi)
	}
	if s.Season != smoothing.NoSeason {
		s.Gamma, s.InitSeason = smoothing.Value(p.Gamma), slices.Clone(f.InitSeason)
	}
	g, err := s.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("fixed refit: %v", err)
	}
	return g.(*smoothing.Fitted)
}

func closeStates(t *testing.T, got, want smoothing.States, tol float64) {
	t.Helper()
	persisttest.Close(t, "level", got.Level, want.Level, tol)
	persisttest.Close(t, "trend", got.Trend, want.Trend, tol)
	persisttest.Close(t, "season", got.Season, want.Season, tol)
}

// TestRefreshETS checks, for every ETS form, that Update (and Refresh)
// with new observations equals a fit of the whole series with the
// parameters and initial states fixed at the estimates, to 1e-12.
func TestRefreshETS(t *testing.T) {
	all := quarterlySales(40)
	head, newV := all.Head(30), all.Values[30:]
	for _, sp := range allForms() {
		t.Run(sp.String(), func(t *testing.T) {
			f := fitOrSkip(t, sp, head).(*smoothing.Fitted)
			r, err := almanac.Refresh(f, newV)
			if err != nil {
				t.Fatal(err)
			}
			got := r.(*smoothing.Fitted)
			want := fixedRefit(t, f, all)
			closeStates(t, got.States(), want.States(), 1e-12)
			persisttest.Close(t, "fitted values", got.FittedValues(), want.FittedValues(), 1e-12)
			if math.Abs(got.Sigma2-want.Sigma2) > 1e-12*want.Sigma2 || math.Abs(got.LogLik-want.LogLik) > 1e-12*math.Abs(want.LogLik) {
				t.Errorf("sigma2 %v loglik %v, refit %v %v", got.Sigma2, got.LogLik, want.Sigma2, want.LogLik)
			}
			fg, err := got.Forecast(8, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			fw, _ := want.Forecast(8, 80, 95)
			persisttest.Close(t, "point forecasts", fg.Mean, fw.Mean, 1e-12)
			if got.IntervalMethod() != smoothing.Simulated {
				persisttest.Close(t, "upper bounds", fg.Intervals[1].Upper, fw.Intervals[1].Upper, 1e-12)
			}
			// One value at a time gives the same model, bit for bit.
			step := f
			for _, v := range newV {
				if step, err = step.Update([]float64{v}); err != nil {
					t.Fatal(err)
				}
			}
			persisttest.Same(t, "stepwise level", step.States().Level, got.States().Level)
			if step.Sigma2 != got.Sigma2 {
				t.Errorf("stepwise sigma2 %v, at once %v", step.Sigma2, got.Sigma2)
			}
		})
	}
}

// TestRefreshETSMissing checks the missing-value convention: a missing
// observation leaves the states where an observation equal to its
// one-step prediction (a zero innovation) would, and is left out of σ².
func TestRefreshETSMissing(t *testing.T) {
	all := quarterlySales(40)
	head := all.Head(30)
	newV := slices.Clone(all.Values[30:])
	newV[2], newV[3], newV[7] = math.NaN(), math.NaN(), math.NaN()
	for _, sp := range allForms() {
		t.Run(sp.String(), func(t *testing.T) {
			f := fitOrSkip(t, sp, head).(*smoothing.Fitted)
			got, err := f.Update(newV)
			if err != nil {
				t.Fatal(err)
			}
			fv := got.FittedValues()
			filled := all.Clone()
			copy(filled.Values[30:], newV)
			for i, v := range filled.Values {
				if math.IsNaN(v) {
					filled.Values[i] = fv[i]
					if !math.IsNaN(got.Residuals()[i]) {
						t.Fatalf("residual %d of a missing value is %v", i, got.Residuals()[i])
					}
				}
			}
			want := fixedRefit(t, f, filled)
			closeStates(t, got.States(), want.States(), 1e-12)
			fg, err := got.Forecast(8)
			if err != nil {
				t.Fatal(err)
			}
			fw, _ := want.Forecast(8)
			persisttest.Close(t, "point forecasts", fg.Mean, fw.Mean, 1e-12)
			// σ² over the 37 observed values: the refit's sum of squares
			// (three zero innovations) over 37 instead of 40.
			if w := want.Sigma2 * 40 / 37; math.Abs(got.Sigma2-w) > 1e-12*w {
				t.Errorf("sigma2 %v, want %v", got.Sigma2, w)
			}
			if _, err := got.Forecast(8, 80); err != nil {
				t.Fatalf("bands after missing values: %v", err)
			}
		})
	}
}

func TestRefreshETSBadInput(t *testing.T) {
	y := quarterlySales(30)
	mult := fitOrSkip(t, smoothing.Spec{Error: smoothing.MultiplicativeError}, y).(*smoothing.Fitted)
	add := fitOrSkip(t, smoothing.Spec{}, y).(*smoothing.Fitted)
	for _, tc := range []struct {
		name string
		f    *smoothing.Fitted
		v    []float64
		want error
	}{
		{"infinite", add, []float64{1, math.Inf(1)}, almanac.ErrNonFinite},
		{"negative for multiplicative", mult, []float64{5, -1}, almanac.ErrNonPositive},
		{"zero for multiplicative", mult, []float64{0}, almanac.ErrNonPositive},
		{"zero value", &smoothing.Fitted{}, []float64{1}, almanac.ErrNotFitted},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := tc.f.Update(tc.v); !errors.Is(err, tc.want) {
				t.Fatalf("got %v, want %v", err, tc.want)
			}
		})
	}
	// No new values: the same model.
	g, err := add.Update(nil)
	if err != nil {
		t.Fatal(err)
	}
	persisttest.Same(t, "fitted values", g.FittedValues(), add.FittedValues())
}
