package almanac_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
)

var ctx = context.Background()

func monthly(key string, v ...float64) almanac.Series {
	return almanac.Series{Key: key, Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: v}
}

func quarterly(key string, v ...float64) almanac.Series {
	return almanac.Series{Key: key, Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Quarterly, Values: v}
}

// demoSeries is invented data (a trend, a quarterly pattern and a
// deterministic wiggle) used for property tests only.
func demoSeries(n int) almanac.Series {
	v := make([]float64, n)
	for i := range v {
		v[i] = 100 + 0.8*float64(i) + 10*math.Sin(2*math.Pi*float64(i)/4) + 3*math.Cos(1.7*float64(i)*float64(i))
	}
	return quarterly("demo", v...)
}

func sdOf(t *testing.T, fc almanac.Forecast) []float64 {
	t.Helper()
	d, ok := fc.Dist.(*almanac.Normal)
	if !ok {
		t.Fatalf("distribution %T, want *almanac.Normal", fc.Dist)
	}
	return d.SD
}

// TestBenchmarkClosedForms checks the point forecasts and standard
// deviations on hand-checkable data against the closed forms of
// Hyndman & Athanasopoulos, FPP 3rd ed., §5.5, Table 5.2 (recalled from
// memory; the drift variance h(1 + h/(T−1)) is derived in benchmark.go),
// with σ̂² = Σe²/(R − K).
func TestBenchmarkClosedForms(t *testing.T) {
	y := quarterly("hand", 1, 3, 2, 5, 4, 6)
	// Naive: residuals 2, −1, 3, −1, 2 → Σe² = 19, R = 5, K = 0.
	sNaive := math.Sqrt(19.0 / 5)
	// Drift: d = (6 − 1)/5 = 1; residuals 1, −2, 2, −2, 1 → Σe² = 14,
	// R = 5, K = 1.
	sDrift := math.Sqrt(14.0 / 4)
	// Mean: 21/6 = 3.5; sample sd with n − 1: Σ(y−3.5)² = 17.5 → 3.5.
	sMean := math.Sqrt(17.5 / 5)
	// Seasonal naive, m = 4: residuals 4−1 = 3, 6−3 = 3 → Σe² = 18, R = 2.
	sSeas := math.Sqrt(18.0 / 2)
	tests := []struct {
		name     string
		model    almanac.Model
		str      string
		params   int
		wantMean []float64
		wantSD   []float64
	}{
		{"naive", almanac.Naive{}, "Naive", 0,
			[]float64{6, 6, 6},
			[]float64{sNaive, sNaive * math.Sqrt(2), sNaive * math.Sqrt(3)}},
		{"drift", almanac.Drift{}, "Drift", 1,
			[]float64{7, 8, 9},
			[]float64{sDrift * math.Sqrt(1*(1+1.0/5)), sDrift * math.Sqrt(2*(1+2.0/5)), sDrift * math.Sqrt(3*(1+3.0/5))}},
		{"mean", almanac.Mean{}, "Mean", 1,
			[]float64{3.5, 3.5, 3.5},
			[]float64{sMean * math.Sqrt(1+1.0/6), sMean * math.Sqrt(1+1.0/6), sMean * math.Sqrt(1+1.0/6)}},
		// Last year: 2, 5, 4, 6 at positions 2, 3, 0, 1 → forecasts for
		// positions 2, 3, 0, 1, 2 are 2, 5, 4, 6, 2; k = ⌊(h−1)/4⌋.
		{"seasonal naive from frequency", almanac.SeasonalNaive{}, "SeasonalNaive(4)", 0,
			[]float64{2, 5, 4, 6, 2},
			[]float64{sSeas, sSeas, sSeas, sSeas, sSeas * math.Sqrt(2)}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, err := tt.model.Fit(ctx, y)
			if err != nil {
				t.Fatal(err)
			}
			if f.String() != tt.str {
				t.Errorf("String() = %q, want %q", f.String(), tt.str)
			}
			if k := f.(almanac.ParamCounter).NumParams(); k != tt.params {
				t.Errorf("NumParams = %d, want %d", k, tt.params)
			}
			fc, err := f.Forecast(len(tt.wantMean), 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Slice(t, "mean", fc.Mean, tt.wantMean, 1e-12, 1e-12)
			numtest.Slice(t, "sd", sdOf(t, fc), tt.wantSD, 1e-12, 1e-12)
			// 95% bound = mean ± 1.959963984540054 sd (the standard normal
			// 0.975 quantile, scipy.stats.norm.ppf(0.975), printed in
			// standard tables as 1.96; recalled from memory). Same
			// tolerance as TestForecastNormal: rounding only.
			_, hi, err := fc.Bounds(95)
			if err != nil {
				t.Fatal(err)
			}
			for i := range hi {
				numtest.Scalar(t, "upper95", hi[i], tt.wantMean[i]+1.959963984540054*tt.wantSD[i], 1e-12, 1e-12)
			}
			if !fc.Start.Equal(y.Time(y.Len())) || !fc.Freq.Equal(y.Freq) {
				t.Errorf("forecast starts %v %v, want %v %v", fc.Start, fc.Freq, y.Time(y.Len()), y.Freq)
			}
		})
	}
}

func TestBenchmarkFittedValues(t *testing.T) {
	nan := math.NaN()
	y := quarterly("hand", 1, 3, 2, 5, 4, 6)
	tests := []struct {
		name   string
		model  almanac.Model
		fitted []float64
	}{
		{"naive", almanac.Naive{}, []float64{nan, 1, 3, 2, 5, 4}},
		{"drift", almanac.Drift{}, []float64{nan, 2, 4, 3, 6, 5}},
		{"mean", almanac.Mean{}, []float64{3.5, 3.5, 3.5, 3.5, 3.5, 3.5}},
		{"seasonal naive", almanac.SeasonalNaive{Period: 4}, []float64{nan, nan, nan, nan, 1, 3}},
		{"seasonal naive period 2", almanac.SeasonalNaive{Period: 2}, []float64{nan, nan, 1, 3, 2, 5}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, err := tt.model.Fit(ctx, y)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Slice(t, "fitted", f.FittedValues(), tt.fitted, 0, 0)
			res := f.Residuals()
			for i := range res {
				numtest.Scalar(t, "residual", res[i], y.Values[i]-tt.fitted[i], 1e-12, 0)
			}
		})
	}
}

// TestBenchmarkMissing checks the documented handling of NaN.
func TestBenchmarkMissing(t *testing.T) {
	nan := math.NaN()
	t.Run("naive forecasts from the last observed value", func(t *testing.T) {
		y := quarterly("gap", 1, 3, nan, 5, 4, nan)
		f, err := almanac.Naive{}.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		fc, err := f.Forecast(2)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Slice(t, "mean", fc.Mean, []float64{4, 4}, 0, 0)
		// Residuals 3−1 (1 step), 5−3 (2 steps), 4−5 (1 step):
		// σ̂² = (4 + 4/2 + 1)/3; last value 2 and 3 steps before the
		// forecast steps.
		s := math.Sqrt(7.0 / 3)
		numtest.Slice(t, "sd", sdOf(t, fc), []float64{s * math.Sqrt(2), s * math.Sqrt(3)}, 1e-12, 1e-12)
		numtest.Slice(t, "fitted", f.FittedValues(), []float64{nan, 1, 3, 3, 5, 4}, 0, 0)
	})
	t.Run("drift with a trailing gap", func(t *testing.T) {
		f, err := almanac.Drift{}.Fit(ctx, quarterly("gap", 1, 3, 4, nan))
		if err != nil {
			t.Fatal(err)
		}
		fc, _ := f.Forecast(1)
		// d = (4 − 1)/2 = 1.5; residuals ±0.5 → σ̂² = 0.5/(2 − 1); the
		// first forecast step is j = 2 steps after the last observation:
		// mean 4 + 2·1.5 = 7, variance σ̂²·j(1 + j/(L − F)) = 0.5·2·2.
		numtest.Scalar(t, "mean", fc.Mean[0], 7, 1e-12, 0)
		numtest.Scalar(t, "sd", sdOf(t, fc)[0], math.Sqrt(2), 1e-12, 1e-12)
	})
	t.Run("mean ignores NaN", func(t *testing.T) {
		f, err := almanac.Mean{}.Fit(ctx, quarterly("gap", 2, nan, 4, nan))
		if err != nil {
			t.Fatal(err)
		}
		fc, _ := f.Forecast(1)
		numtest.Scalar(t, "mean", fc.Mean[0], 3, 0, 0)
		numtest.Scalar(t, "sd", sdOf(t, fc)[0], math.Sqrt(2)*math.Sqrt(1.5), 1e-12, 1e-12)
	})
	t.Run("seasonal naive uses the last observed value of the season", func(t *testing.T) {
		f, err := almanac.SeasonalNaive{Period: 2}.Fit(ctx, quarterly("gap", 1, 2, 3, 4, nan, 6))
		if err != nil {
			t.Fatal(err)
		}
		fc, _ := f.Forecast(4)
		numtest.Slice(t, "mean", fc.Mean, []float64{3, 6, 3, 6}, 0, 0)
		// Residuals 2 (1 season), 2 (1 season), 6−4 = 2 (1 season):
		// σ̂ = 2. Step 1 (index 6) is 2 seasons from index 2.
		numtest.Slice(t, "sd", sdOf(t, fc), []float64{2 * math.Sqrt(2), 2, 2 * math.Sqrt(3), 2 * math.Sqrt(2)}, 1e-12, 1e-12)
	})
	t.Run("seasonal naive with an unobserved season", func(t *testing.T) {
		_, err := almanac.SeasonalNaive{Period: 2}.Fit(ctx, quarterly("gap", 1, nan, 3, nan, 5))
		if !errors.Is(err, almanac.ErrMissing) {
			t.Errorf("err = %v, want ErrMissing", err)
		}
	})
}

// TestBenchmarkBadInput: every bad input gives an error wrapping its
// sentinel, never a panic.
func TestBenchmarkBadInput(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	models := map[string]almanac.Model{
		"naive": almanac.Naive{}, "seasonal naive": almanac.SeasonalNaive{}, "drift": almanac.Drift{}, "mean": almanac.Mean{},
	}
	tests := []struct {
		name string
		y    almanac.Series
		want error
	}{
		{"empty", monthly("e"), almanac.ErrEmpty},
		{"all missing", monthly("m", nan, nan, nan), almanac.ErrAllMissing},
		{"infinite", monthly("i", 1, inf, 3), almanac.ErrNonFinite},
		{"one value", monthly("s", 5), almanac.ErrTooShort},
		{"unknown frequency", almanac.Series{Key: "f", Values: []float64{1, 2, 3}}, almanac.ErrFrequency},
	}
	for mname, m := range models {
		for _, tt := range tests {
			t.Run(mname+"/"+tt.name, func(t *testing.T) {
				_, err := m.Fit(ctx, tt.y)
				if !errors.Is(err, tt.want) {
					t.Errorf("err = %v, want %v", err, tt.want)
				}
			})
		}
	}
	extra := []struct {
		name  string
		model almanac.Model
		y     almanac.Series
		want  error
	}{
		{"negative period", almanac.SeasonalNaive{Period: -1}, monthly("p", 1, 2, 3), almanac.ErrInvalid},
		{"shorter than a period", almanac.SeasonalNaive{}, monthly("p", 1, 2, 3), almanac.ErrTooShort},
		{"drift with two values", almanac.Drift{}, monthly("d", 1, 2), almanac.ErrTooShort},
	}
	for _, tt := range extra {
		t.Run(tt.name, func(t *testing.T) {
			if _, err := tt.model.Fit(ctx, tt.y); !errors.Is(err, tt.want) {
				t.Errorf("err = %v, want %v", err, tt.want)
			}
		})
	}
	f, err := almanac.Naive{}.Fit(ctx, monthly("ok", 1, 2, 4))
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []struct {
		name   string
		h      int
		levels []float64
		want   error
	}{
		{"h zero", 0, nil, almanac.ErrHorizon},
		{"h negative", -3, nil, almanac.ErrHorizon},
		{"level 100", 2, []float64{100}, almanac.ErrLevel},
		{"level 0", 2, []float64{0}, almanac.ErrLevel},
		{"level as fraction is fine but level -5 is not", 2, []float64{0.95, -5}, almanac.ErrLevel},
		{"level NaN", 2, []float64{nan}, almanac.ErrLevel},
	} {
		t.Run("forecast/"+tt.name, func(t *testing.T) {
			if _, err := f.Forecast(tt.h, tt.levels...); !errors.Is(err, tt.want) {
				t.Errorf("err = %v, want %v", err, tt.want)
			}
		})
	}
	if _, err := (almanac.Naive{}).Fit(ctx, monthly("c", 3, 3, 3)); err != nil {
		t.Errorf("a constant series is a valid input for a benchmark: %v", err)
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := (almanac.Mean{}).Fit(cancelled, monthly("x", 1, 2)); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled ctx: err = %v", err)
	}
}

// checkModelProperties runs the invariants DESIGN.md asks of every model
// on one series: scale invariance of forecasts and bounds for c from 1e-6
// to 1e6, 80% intervals inside 95% ones, and intervals that do not
// narrow with the horizon (widen strictly when strict is set).
func checkModelProperties(t *testing.T, m almanac.Model, y almanac.Series, strict bool) {
	t.Helper()
	const h = 10
	base, err := m.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	fb, err := base.Forecast(h, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []float64{1e-6, 1e-3, 0.5, 1, 7, 1e3, 1e6} {
		ys := y.Clone()
		for i := range ys.Values {
			ys.Values[i] *= c
		}
		fs, err := m.Fit(ctx, ys)
		if err != nil {
			t.Fatal(err)
		}
		fc, err := fs.Forecast(h, 80, 95)
		if err != nil {
			t.Fatal(err)
		}
		for i := range h {
			numtest.Scalar(t, "scaled mean", fc.Mean[i], c*fb.Mean[i], 0, 1e-9)
			for j := range fc.Intervals {
				numtest.Scalar(t, "scaled lower", fc.Intervals[j].Lower[i], c*fb.Intervals[j].Lower[i], 0, 1e-9)
				numtest.Scalar(t, "scaled upper", fc.Intervals[j].Upper[i], c*fb.Intervals[j].Upper[i], 0, 1e-9)
			}
		}
	}
	lo80, hi80 := fb.Intervals[0].Lower, fb.Intervals[0].Upper
	lo95, hi95 := fb.Intervals[1].Lower, fb.Intervals[1].Upper
	for i := range h {
		if !(lo95[i] <= lo80[i] && lo80[i] <= fb.Mean[i] && fb.Mean[i] <= hi80[i] && hi80[i] <= hi95[i]) {
			t.Errorf("step %d: intervals not nested: 95 [%v, %v], 80 [%v, %v], mean %v", i+1, lo95[i], hi95[i], lo80[i], hi80[i], fb.Mean[i])
		}
		if i > 0 {
			w, wPrev := hi95[i]-lo95[i], hi95[i-1]-lo95[i-1]
			// Widths are differences of bounds around different means:
			// allow rounding of 1e-12 relative.
			if w < wPrev*(1-1e-12) || (strict && w <= wPrev) {
				t.Errorf("step %d: width %v after %v", i+1, w, wPrev)
			}
		}
	}
}

func TestBenchmarkProperties(t *testing.T) {
	y := demoSeries(40)
	t.Run("naive", func(t *testing.T) { checkModelProperties(t, almanac.Naive{}, y, true) })
	t.Run("drift", func(t *testing.T) { checkModelProperties(t, almanac.Drift{}, y, true) })
	t.Run("mean", func(t *testing.T) { checkModelProperties(t, almanac.Mean{}, y, false) })
	t.Run("seasonal naive", func(t *testing.T) { checkModelProperties(t, almanac.SeasonalNaive{}, y, false) })
	t.Run("box-cox naive", func(t *testing.T) {
		checkModelProperties(t, almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, Lambda: 0}, y, true)
	})
}

// TestBenchmarkSimulate: the spread of simulated paths of Naive and
// SeasonalNaive matches the closed-form quantiles (they have no estimated
// parameter, so the two describe the same distribution), paths are
// reproducible from the seed, and bad arguments are errors.
func TestBenchmarkSimulate(t *testing.T) {
	y := demoSeries(40)
	for _, m := range []almanac.Model{almanac.Naive{}, almanac.SeasonalNaive{}} {
		f, err := m.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		t.Run(f.String(), func(t *testing.T) {
			const h, n = 6, 20000
			paths, err := f.(almanac.Simulator).Simulate(h, n, rand.NewPCG(1, 2))
			if err != nil {
				t.Fatal(err)
			}
			again, _ := f.(almanac.Simulator).Simulate(h, n, rand.NewPCG(1, 2))
			if !slices.EqualFunc(paths, again, slices.Equal[[]float64]) {
				t.Error("same seed gave different paths")
			}
			fc, _ := f.Forecast(h)
			sim, err := almanac.NewForecast(fc.Start, fc.Freq, fc.Mean, &almanac.Sample{Paths: paths})
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range []float64{0.1, 0.5, 0.9} {
				qs, _ := sim.Quantile(p)
				qn, _ := fc.Quantile(p)
				sd := sdOf(t, fc)
				for i := range h {
					// Monte Carlo error of a quantile with 20000 draws is
					// about 0.01 sd; allow 0.05 sd.
					if math.Abs(qs[i]-qn[i]) > 0.05*sd[i] {
						t.Errorf("p %v step %d: simulated %v, closed form %v (sd %v)", p, i+1, qs[i], qn[i], sd[i])
					}
				}
			}
			if _, err := f.(almanac.Simulator).Simulate(0, 5, rand.NewPCG(1, 2)); !errors.Is(err, almanac.ErrHorizon) {
				t.Errorf("h = 0: %v", err)
			}
			if _, err := f.(almanac.Simulator).Simulate(3, 0, rand.NewPCG(1, 2)); !errors.Is(err, almanac.ErrInvalid) {
				t.Errorf("n = 0: %v", err)
			}
			if _, err := f.(almanac.Simulator).Simulate(3, 2, nil); !errors.Is(err, almanac.ErrInvalid) {
				t.Errorf("nil source: %v", err)
			}
		})
	}
}
