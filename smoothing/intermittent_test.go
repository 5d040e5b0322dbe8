package smoothing_test

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/smoothing"
)

func weekly(v []float64) almanac.Series {
	return almanac.Series{Key: "sku", Start: start2000, Freq: calendar.Weekly, Values: v}
}

func fitIntermittent(t *testing.T, m almanac.Model, y almanac.Series) *smoothing.IntermittentFit {
	t.Helper()
	f, err := m.Fit(context.Background(), y)
	if err != nil {
		t.Fatalf("Fit: %v", err)
	}
	return f.(*smoothing.IntermittentFit)
}

// handSeries is the small series of the hand-computed examples below.
var handSeries = []float64{0, 0, 4, 0, 2, 0, 0, 6}

// TestIntermittentWorkedExamples checks Croston, SBA and TSB against
// recursions written out by hand (every step below; arithmetic checked
// with a calculator, no program of ours involved).
//
// Croston, α = 0.5, y = 0 0 4 0 2 0 0 6 (periods 0..7):
//
//	first demand k = 2: z = 4, p = k+1 = 3, q = 1
//	t=3: forecast 4/3 = 1.333333;  y=0 → q = 2
//	t=4: forecast 4/3 = 1.333333;  y=2 → z = 4 + 0.5(2−4) = 3,
//	                                      p = 3 + 0.5(2−3) = 2.5, q = 1
//	t=5: forecast 3/2.5 = 1.2;     y=0 → q = 2
//	t=6: forecast 1.2;             y=0 → q = 3
//	t=7: forecast 1.2;             y=6 → z = 3 + 0.5(6−3) = 4.5,
//	                                      p = 2.5 + 0.5(3−2.5) = 2.75
//	final forecast 4.5/2.75 = 1.636364 (= 18/11)
//
// SBA multiplies every forecast by 1 − α/2 = 0.75: 1, 1, 0.9, 0.9, 0.9 and
// final 1.227273 (= 27/22).
//
// TSB, α = 0.5, β = 0.2, same series:
//
//	k = 2: z = 4, π = 1/3
//	t=3: forecast π·z = 4/3 = 1.333333;  y=0 → π = 0.8·(1/3) = 0.266667
//	t=4: forecast 0.266667·4 = 1.066667; y=2 → π = 0.266667 + 0.2(1 − 0.266667) = 0.413333,
//	                                            z = 3
//	t=5: forecast 0.413333·3 = 1.24;     y=0 → π = 0.330667
//	t=6: forecast 0.330667·3 = 0.992;    y=0 → π = 0.264533
//	t=7: forecast 0.264533·3 = 0.7936;   y=6 → π = 0.264533 + 0.2(0.735467) = 0.411627,
//	                                            z = 4.5
//	final forecast 0.411627·4.5 = 1.852320
func TestIntermittentWorkedExamples(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name   string
		model  almanac.Model
		fitted []float64
		rate   float64
		size   float64
		str    string
	}{
		{"croston", smoothing.Croston{Alpha: 0.5},
			[]float64{nan, nan, nan, 4.0 / 3, 4.0 / 3, 1.2, 1.2, 1.2}, 18.0 / 11, 4.5, "Croston"},
		{"sba", smoothing.Croston{Alpha: 0.5, Variant: smoothing.CrostonSBA},
			[]float64{nan, nan, nan, 1, 1, 0.9, 0.9, 0.9}, 27.0 / 22, 4.5, "SBA"},
		{"tsb", smoothing.TSB{Alpha: 0.5, Beta: 0.2},
			[]float64{nan, nan, nan, 4.0 / 3, 16.0 / 15, 1.24, 0.992, 0.7936}, 1.85232, 4.5, "TSB"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := fitIntermittent(t, c.model, weekly(handSeries))
			numtest.Slice(t, "fitted", f.FittedValues(), c.fitted, 1e-12, 1e-12)
			numtest.Scalar(t, "rate", f.Rate, c.rate, 1e-12, 1e-12)
			numtest.Scalar(t, "size", f.Size, c.size, 1e-12, 1e-12)
			if f.FirstDemand != 2 {
				t.Errorf("FirstDemand = %d, want 2", f.FirstDemand)
			}
			fc, err := f.Forecast(4)
			if err != nil {
				t.Fatal(err)
			}
			for h := range 4 {
				numtest.Scalar(t, "forecast", fc.Mean[h], c.rate, 1e-12, 1e-12)
			}
			if fc.Dist != nil {
				t.Error("forecast carries a distribution")
			}
			res := f.Residuals()
			for i := range res {
				numtest.Scalar(t, "residual", res[i], handSeries[i]-c.fitted[i], 1e-12, 1e-12)
			}
			if got := f.String(); got != c.str {
				t.Errorf("String() = %q, want %q", got, c.str)
			}
		})
	}
}

// TestIntermittentNISTNoZeros: with demand in every period Croston's
// interval stays 1 and TSB's probability stays 1, so both reduce to
// simple exponential smoothing of the sizes started at the first value.
// That reproduces the NIST/SEMATECH e-Handbook single-smoothing example
// (section 6.4.3.1–2, published.md): one-step forecasts S2..S12
// (computed, 4 decimals) and the next forecast 71.50 (printed, 2
// decimals), α = 0.1.
func TestIntermittentNISTNoZeros(t *testing.T) {
	y := []float64{71, 70, 69, 68, 64, 65, 72, 78, 75, 75, 75, 70}
	s := []float64{71, 70.9, 70.71, 70.439, 69.7951, 69.3156, 69.5840, 70.4256, 70.8831, 71.2948, 71.6653}
	for _, c := range []struct {
		name  string
		model almanac.Model
	}{
		{"croston", smoothing.Croston{Alpha: 0.1}},
		{"croston default alpha", smoothing.Croston{}},
		{"tsb", smoothing.TSB{Alpha: 0.1, Beta: 0.3}},
	} {
		t.Run(c.name, func(t *testing.T) {
			f := fitIntermittent(t, c.model, weekly(y))
			// Fitted values exist from period 1 (the states start at the
			// first demand, period 0). Tolerance: half a unit of the 4th
			// decimal.
			numtest.Slice(t, "S2..S12", f.FittedValues()[1:], s, 5e-5, 0)
			numtest.Scalar(t, "next forecast", f.Rate, 71.50, 0.005, 0)
		})
	}
}

// TestIntermittentEstimate checks the estimated constants against an
// exhaustive scan of the in-sample MSE (property: the estimate must be
// at least as good as every point of a fine grid, up to the grid's
// resolution).
func TestIntermittentEstimate(t *testing.T) {
	y := demandSeries(200)
	mse := func(m almanac.Model) float64 {
		return fitIntermittent(t, m, weekly(y)).MSE
	}
	t.Run("croston", func(t *testing.T) {
		for _, v := range []smoothing.CrostonVariant{smoothing.CrostonClassic, smoothing.CrostonSBA} {
			f := fitIntermittent(t, smoothing.Croston{Variant: v, EstimateAlpha: true}, weekly(y))
			if !f.Estimated || f.NumParams() != 1 {
				t.Errorf("Estimated = %v, NumParams = %d", f.Estimated, f.NumParams())
			}
			for a := 0.01; a <= 1; a += 0.005 {
				if g := mse(smoothing.Croston{Variant: v, Alpha: a}); g < f.MSE*(1-1e-9) {
					t.Errorf("%v: MSE %v at α = %.3f below the estimate's %v at α = %v", v, g, a, f.MSE, f.Alpha)
				}
			}
		}
	})
	t.Run("tsb", func(t *testing.T) {
		f := fitIntermittent(t, smoothing.TSB{Estimate: true}, weekly(y))
		if !f.Estimated || f.NumParams() != 2 {
			t.Errorf("Estimated = %v, NumParams = %d", f.Estimated, f.NumParams())
		}
		for a := 0.01; a <= 1; a += 0.03 {
			for b := 0.01; b <= 1; b += 0.03 {
				if g := mse(smoothing.TSB{Alpha: a, Beta: b}); g < f.MSE*(1-1e-9) {
					t.Errorf("MSE %v at α = %.2f, β = %.2f below the estimate's %v at (%v, %v)", g, a, b, f.MSE, f.Alpha, f.Beta)
				}
			}
		}
	})
}

// demandSeries is a deterministic intermittent pattern for property
// checks and benchmarks (invented; no reference value depends on it):
// demand in roughly one period of three, sizes 1..9.
func demandSeries(n int) []float64 {
	y := make([]float64, n)
	state := uint32(12345)
	for i := range y {
		state = state*1664525 + 1013904223 // LCG (Numerical Recipes constants)
		if state>>16%3 == 0 {
			y[i] = float64(1 + (state>>8)%9)
		}
	}
	return y
}

// TestIntermittentScaleInvariance: forecasts of c·y are c times those of
// y (DESIGN.md), fixed and estimated constants.
func TestIntermittentScaleInvariance(t *testing.T) {
	y := demandSeries(120)
	models := []struct {
		name  string
		model almanac.Model
	}{
		{"croston", smoothing.Croston{}},
		{"sba estimated", smoothing.Croston{Variant: smoothing.CrostonSBA, EstimateAlpha: true}},
		{"tsb", smoothing.TSB{Alpha: 0.2, Beta: 0.05}},
		{"tsb estimated", smoothing.TSB{Estimate: true}},
	}
	for _, m := range models {
		base := fitIntermittent(t, m.model, weekly(y)).Rate
		for _, c := range []float64{1e-6, 1e-3, 1e3, 1e6} {
			t.Run(m.name+"/"+formatG(c), func(t *testing.T) {
				v := make([]float64, len(y))
				for i := range v {
					v[i] = c * y[i]
				}
				numtest.Scalar(t, "rate", fitIntermittent(t, m.model, weekly(v)).Rate/c, base, 0, 1e-7)
			})
		}
	}
}

func TestIntermittentNoDemand(t *testing.T) {
	zeros := make([]float64, 10)
	for _, m := range []almanac.Model{smoothing.Croston{}, smoothing.Croston{EstimateAlpha: true}, smoothing.TSB{}, smoothing.TSB{Estimate: true}} {
		f := fitIntermittent(t, m, weekly(zeros))
		fc, err := f.Forecast(3)
		if err != nil {
			t.Fatal(err)
		}
		for h := range 3 {
			if fc.Mean[h] != 0 {
				t.Errorf("%v: forecast %v, want 0 for a series without demand", f, fc.Mean[h])
			}
		}
		for i, v := range f.FittedValues() {
			if v != 0 || f.Residuals()[i] != 0 {
				t.Errorf("%v: fitted %v residual %v at %d, want 0", f, v, f.Residuals()[i], i)
			}
		}
		if f.FirstDemand != -1 {
			t.Errorf("FirstDemand = %d, want -1", f.FirstDemand)
		}
	}
}

func TestIntermittentBadInput(t *testing.T) {
	neg := append([]float64(nil), handSeries...)
	neg[4] = -2
	nan := append([]float64(nil), handSeries...)
	nan[4] = math.NaN()
	inf := append([]float64(nil), handSeries...)
	inf[4] = math.Inf(1)
	cases := []struct {
		name  string
		model almanac.Model
		y     almanac.Series
		want  error
	}{
		{"croston/empty", smoothing.Croston{}, weekly(nil), almanac.ErrEmpty},
		{"croston/negative", smoothing.Croston{}, weekly(neg), almanac.ErrNonPositive},
		{"croston/missing", smoothing.Croston{}, weekly(nan), almanac.ErrMissing},
		{"croston/infinite", smoothing.Croston{}, weekly(inf), almanac.ErrNonFinite},
		{"croston/alpha above 1", smoothing.Croston{Alpha: 1.2}, weekly(handSeries), almanac.ErrInvalid},
		{"croston/alpha NaN", smoothing.Croston{Alpha: math.NaN()}, weekly(handSeries), almanac.ErrInvalid},
		{"croston/alpha and estimate", smoothing.Croston{Alpha: 0.2, EstimateAlpha: true}, weekly(handSeries), almanac.ErrInvalid},
		{"croston/unknown variant", smoothing.Croston{Variant: 5}, weekly(handSeries), almanac.ErrInvalid},
		{"croston/estimate, demand at the end", smoothing.Croston{EstimateAlpha: true}, weekly([]float64{0, 0, 0, 3, 0}), almanac.ErrTooShort},
		{"tsb/negative", smoothing.TSB{}, weekly(neg), almanac.ErrNonPositive},
		{"tsb/missing", smoothing.TSB{}, weekly(nan), almanac.ErrMissing},
		{"tsb/beta negative", smoothing.TSB{Beta: -0.1}, weekly(handSeries), almanac.ErrInvalid},
		{"tsb/beta and estimate", smoothing.TSB{Beta: 0.1, Estimate: true}, weekly(handSeries), almanac.ErrInvalid},
		{"tsb/estimate, demand at the end", smoothing.TSB{Estimate: true}, weekly([]float64{0, 0, 0, 3}), almanac.ErrTooShort},
		{"croston/squares overflow", smoothing.Croston{}, weekly([]float64{0, 1e300, 0, 0, 1e200}), almanac.ErrNotFitted},
		{"tsb/squares overflow", smoothing.TSB{Estimate: true}, weekly([]float64{0, 1e300, 0, 0, 1e200}), almanac.ErrNotFitted},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.model.Fit(context.Background(), c.y)
			if !errors.Is(err, c.want) {
				t.Fatalf("error %v, want one wrapping %v", err, c.want)
			}
			if !strings.HasPrefix(err.Error(), "smoothing: ") {
				t.Errorf("message %q does not start with the package name", err)
			}
		})
	}
	// The index of the offending value is reported.
	_, err := smoothing.Croston{}.Fit(context.Background(), weekly(neg))
	var se *almanac.SeriesError
	if !errors.As(err, &se) || se.Index != 4 {
		t.Errorf("negative value: %v, want a SeriesError at index 4", err)
	}
	// Forecast arguments.
	f := fitIntermittent(t, smoothing.Croston{}, weekly(handSeries))
	if _, err := f.Forecast(3, 90); err != nil {
		t.Errorf("level 90: %v", err)
	}
	if _, err := (smoothing.Croston{Paths: -1}).Fit(context.Background(), weekly(handSeries)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("Paths -1: %v, want ErrInvalid", err)
	}
	if _, err := f.Forecast(3, 150); !errors.Is(err, almanac.ErrLevel) {
		t.Errorf("level 150: %v, want ErrLevel", err)
	}
	if _, err := f.Forecast(0); !errors.Is(err, almanac.ErrHorizon) {
		t.Errorf("h = 0: %v, want ErrHorizon", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := (smoothing.TSB{}).Fit(ctx, weekly(handSeries)); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: %v", err)
	}
	// An IntermittentFit not returned by Fit.
	for _, z := range []*smoothing.IntermittentFit{{}, nil} {
		if _, err := z.Forecast(3); !errors.Is(err, almanac.ErrNotFitted) {
			t.Errorf("IntermittentFit %p: Forecast: %v, want ErrNotFitted", z, err)
		}
	}
}

func TestCrostonVariantString(t *testing.T) {
	for _, c := range []struct {
		v    smoothing.CrostonVariant
		want string
	}{{smoothing.CrostonClassic, "classic"}, {smoothing.CrostonSBA, "SBA"}, {4, "CrostonVariant(4)"}} {
		if got := c.v.String(); got != c.want {
			t.Errorf("String() = %q, want %q", got, c.want)
		}
	}
}

// TestIntermittentNumParams: fixed constants count as no estimated
// parameter (the initial states follow a rule).
func TestIntermittentNumParams(t *testing.T) {
	f := fitIntermittent(t, smoothing.Croston{}, weekly(handSeries))
	var pc almanac.ParamCounter = f
	if pc.NumParams() != 0 {
		t.Errorf("NumParams = %d, want 0", pc.NumParams())
	}
}
