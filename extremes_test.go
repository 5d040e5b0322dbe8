package almanac_test

import (
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/proptest"
	"gonum.org/v1/gonum/stat/distuv"
)

// rootModels are every model of the root package, with the options that
// change how they compute.
func rootModels() []almanac.Model {
	return []almanac.Model{
		almanac.Naive{}, almanac.SeasonalNaive{}, almanac.Drift{}, almanac.Mean{},
		almanac.BoxCox{Model: almanac.Drift{}},
		almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaMaxLikelihood, BiasAdjust: true},
		almanac.BoxCox{Model: almanac.SeasonalNaive{}, Method: almanac.LambdaFixed, Lambda: 0},
		almanac.BoxCox{Model: almanac.Mean{}, Method: almanac.LambdaFixed, Lambda: -0.5, BiasAdjust: true},
		almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: 0.5},
		// 50 coupled paths instead of the default 1000 keep the check quick.
		almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Drift{}, almanac.SeasonalNaive{}}, Paths: 50},
		almanac.Combination{Members: []almanac.Model{almanac.Mean{}, almanac.Drift{}}, Rule: almanac.CombineInverseError, Paths: 50},
		almanac.Combination{Members: []almanac.Model{almanac.Naive{}, almanac.Mean{}, almanac.Drift{}}, Rule: almanac.CombineMedian, Paths: 50},
	}
}

// TestExtremeScales is the shared property check (issue 11, item 3) run
// over every model of the root package (the combination of models
// included): on series from 1e−300 to 1e300,
// at ±1e308, with a single 1e308 spike, and with tiny and huge values
// mixed, fitting, forecasting, quantiles and simulation give finite
// numbers or an error wrapping a sentinel; never a panic, never NaN or
// ±Inf with a nil error.
func TestExtremeScales(t *testing.T) {
	for _, c := range proptest.Cases(24, 4) {
		y := quarterly(c.Name, c.Values...)
		for _, m := range rootModels() {
			t.Run(c.Name+"/"+modelName(m), func(t *testing.T) {
				proptest.CheckModel(t, m, y, 12)
			})
		}
	}
}

func modelName(m almanac.Model) string {
	if b, ok := m.(almanac.BoxCox); ok {
		return "BoxCox(" + modelName(b.Model) + "," + b.Method.String() + "," + ftoa(b.Lambda) + ")"
	}
	switch m.(type) {
	case almanac.Naive:
		return "Naive"
	case almanac.SeasonalNaive:
		return "SeasonalNaive"
	case almanac.Drift:
		return "Drift"
	case almanac.Mean:
		return "Mean"
	case almanac.Combination:
		return "Combination"
	}
	return "model"
}

// TestExtremeReproducers are the cases of issue 11 with known answers.
func TestExtremeReproducers(t *testing.T) {
	t.Run("mean of three values of 9e307", func(t *testing.T) {
		// The sum overflowed: mean +Inf and interval [NaN, +Inf]. The
		// mean is 9e307 and the standard deviation 0.
		f, err := almanac.Mean{}.Fit(ctx, quarterly("big", 9e307, 9e307, 9e307))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := f.Forecast(2, 95)
		if err != nil {
			t.Fatal(err)
		}
		for h := range 2 {
			if fc.Mean[h] != 9e307 || fc.Intervals[0].Lower[h] != 9e307 || fc.Intervals[0].Upper[h] != 9e307 {
				t.Errorf("step %d: mean %v, interval [%v, %v]; want 9e307 throughout", h+1, fc.Mean[h], fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h])
			}
		}
	})
	t.Run("drift between -1e308 and 1e308", func(t *testing.T) {
		// The slope (1e308 − (−1e308))/2 = 1e308 is representable; its
		// numerator is not.
		f, err := almanac.Drift{}.Fit(ctx, quarterly("span", -1e308, 0, 1e308))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := f.Forecast(1)
		if err == nil {
			t.Fatalf("forecast 2e308 returned as %v with no error", fc.Mean)
		}
		if !errors.Is(err, almanac.ErrNonFinite) {
			t.Fatalf("err = %v, want ErrNonFinite", err)
		}
		fit := f.(*almanac.BenchmarkFit)
		if s := fit.Sigma(); s != 0 {
			t.Errorf("sigma %v, want 0 (both steps are exactly 1e308)", s)
		}
	})
	t.Run("naive bands beyond the range", func(t *testing.T) {
		// σ̂ of alternating ±1e308 is 2e308: not representable.
		_, err := almanac.Naive{}.Fit(ctx, quarterly("alt", 1e308, -1e308, 1e308, -1e308))
		if !errors.Is(err, almanac.ErrNonFinite) {
			t.Fatalf("err = %v, want ErrNonFinite", err)
		}
	})
}

// TestPowerOfTwoScaleExact: the benchmarks compute on the data times a
// power of two, so scaling the data by 2^j scales every forecast and
// bound exactly (the DESIGN's scale invariance, exact for these factors).
func TestPowerOfTwoScaleExact(t *testing.T) {
	y := demoSeries(30)
	for _, m := range []almanac.Model{almanac.Naive{}, almanac.SeasonalNaive{}, almanac.Drift{}, almanac.Mean{}} {
		f0, err := m.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		fc0, err := f0.Forecast(8, 90)
		if err != nil {
			t.Fatal(err)
		}
		for _, j := range []int{-1000, -3, 5, 1000} {
			yj := y.Clone()
			for i, v := range yj.Values {
				yj.Values[i] = math.Ldexp(v, j)
			}
			f, err := m.Fit(ctx, yj)
			if err != nil {
				t.Fatalf("%s 2^%d: %v", modelName(m), j, err)
			}
			fc, err := f.Forecast(8, 90)
			if err != nil {
				t.Fatalf("%s 2^%d: %v", modelName(m), j, err)
			}
			for h := range fc.Mean {
				if fc.Mean[h] != math.Ldexp(fc0.Mean[h], j) || fc.Intervals[0].Upper[h] != math.Ldexp(fc0.Intervals[0].Upper[h], j) {
					t.Fatalf("%s 2^%d step %d: %v, want %v", modelName(m), j, h+1, fc.Mean[h], math.Ldexp(fc0.Mean[h], j))
				}
			}
		}
	}
}

// TestForecastRefusesNonFinite: NewForecast is where every model's
// forecast is assembled, so it refuses NaN or ±Inf in the point
// forecasts and in the bounds it computes (issue 11, item 3).
func TestForecastRefusesNonFinite(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name   string
		mean   []float64
		dist   almanac.Distribution
		levels []float64
	}{
		{"NaN point forecast", []float64{1, nan}, nil, nil},
		{"infinite point forecast", []float64{inf}, nil, nil},
		{"bound beyond the range", []float64{1e308}, &almanac.Normal{Mean: []float64{1e308}, SD: []float64{1e308}}, []float64{95}},
		{"NaN standard deviation", []float64{1}, &almanac.Normal{Mean: []float64{1}, SD: []float64{nan}}, []float64{80}},
		{"step without a finite draw", []float64{1, 2}, &almanac.Sample{Paths: [][]float64{{1, nan}, {2, nan}}}, []float64{80}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, tt.mean, tt.dist, tt.levels...)
			if !errors.Is(err, almanac.ErrNonFinite) {
				t.Fatalf("err = %v, want ErrNonFinite", err)
			}
		})
	}
	t.Run("quantile far in a tail", func(t *testing.T) {
		fc, err := almanac.NewForecast(utc(2024, 1, 1), calendar.Monthly, []float64{1e308}, &almanac.Normal{Mean: []float64{1e308}, SD: []float64{2e307}})
		if err != nil {
			t.Fatal(err)
		}
		if _, err := fc.Quantile(1 - 1e-12); !errors.Is(err, almanac.ErrNonFinite) {
			t.Errorf("err = %v, want ErrNonFinite", err)
		}
	})
}

// TestQuantilesNearTheLimit: a normal quantile whose sd·z term overflows
// while the quantile does not, and sample draws of opposite sign near
// the limit, give the representable answer.
func TestQuantilesNearTheLimit(t *testing.T) {
	d := &almanac.Normal{Mean: []float64{-1.5e308}, SD: []float64{1e308}}
	// −1.5e308 + 1e308·Φ⁻¹(0.99) = −1.5e308 + 2.326e308 ≈ 8.26e307,
	// although 1e308·Φ⁻¹(0.99) alone overflows.
	if !math.IsInf(1e308*distuv.UnitNormal.Quantile(0.99), 0) {
		t.Fatal("test premise: sd·z should overflow")
	}
	q := d.Quantile(0, 0.99)
	if math.IsInf(q, 0) || math.IsNaN(q) || math.Abs(q-8.26e307) > 1e306 {
		t.Errorf("normal quantile %v, want about 8.26e307", q)
	}
	s := &almanac.Sample{Paths: [][]float64{{-1.7e308}, {1.7e308}}}
	if m := s.Quantile(0, 0.5); m != 0 {
		t.Errorf("sample median of ±1.7e308 = %v, want 0", m)
	}
}
