package almanac_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"gonum.org/v1/gonum/stat/distuv"
)

// airPassengers returns the AirPassengers data from the scipy Box-Cox
// fixture (Box, Jenkins & Reinsel, Series G).
func airPassengers(t testing.TB) []float64 {
	t.Helper()
	f, err := reftest.Load("testdata/reference/boxcox_airpassengers.json")
	if err != nil {
		t.Fatal(err)
	}
	return f.Floats(t, "input")
}

// powerSeries builds k subseries of length 4 with means m_h = 10·1.3^h
// and standard deviations exactly proportional to m_h^(1−λ0): y = m_h +
// 0.1·10^λ0·m_h^(1−λ0)·p with a fixed zero-mean pattern p. Guerrero's criterion —
// the coefficient of variation of s_h/m_h^(1−λ) — is then exactly zero at
// λ = λ0 (s_h/m_h^(1−λ0) is constant), so the method must return λ0.
func powerSeries(lambda0 float64, k int) []float64 {
	p := []float64{-1.5, 0.5, 1.5, -0.5}
	var y []float64
	for h := range k {
		m := 10 * math.Pow(1.3, float64(h))
		for _, q := range p {
			y = append(y, m+0.1*m*math.Pow(m/10, -lambda0)*q)
		}
	}
	return y
}

// TestLambdaGuerreroHandChecked checks Guerrero's method (Guerrero 1993,
// J. Forecasting 12:37–48) on series whose variance-stabilising power is
// known by construction: sd ∝ level → λ = 0 (log), sd ∝ √level → λ = 0.5,
// constant sd → λ = 1.
func TestLambdaGuerreroHandChecked(t *testing.T) {
	for _, tt := range []struct {
		name   string
		lambda float64
	}{{"sd proportional to level", 0}, {"sd proportional to sqrt level", 0.5}, {"constant sd", 1}, {"sd grows faster than level", -0.5}} {
		t.Run(tt.name, func(t *testing.T) {
			got, err := almanac.LambdaGuerrero(powerSeries(tt.lambda, 10), 4, -1, 2)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Scalar(t, "lambda", got, tt.lambda, 1e-6, 0)
		})
	}
}

// TestLambdaGuerreroAirPassengers: a widely used implementation of
// Guerrero's method gives λ ≈ −0.2947 for AirPassengers with subseries of
// 12 and bounds [−1, 2] (recalled from memory; checked loosely).
func TestLambdaGuerreroAirPassengers(t *testing.T) {
	got, err := almanac.LambdaGuerrero(airPassengers(t), 12, -1, 2)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "lambda", got, -0.2947, 1e-3, 0)
}

func TestLambdaErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name string
		fn   func() error
		want error
	}{
		{"guerrero negative", func() error { _, err := almanac.LambdaGuerrero([]float64{1, 2, -3, 4, 5, 6}, 2, 0, 0); return err }, almanac.ErrNonPositive},
		{"guerrero zero", func() error { _, err := almanac.LambdaGuerrero([]float64{1, 2, 0, 4, 5, 6}, 2, 0, 0); return err }, almanac.ErrNonPositive},
		{"guerrero inf", func() error { _, err := almanac.LambdaGuerrero([]float64{1, 2, inf, 4}, 2, 0, 0); return err }, almanac.ErrNonFinite},
		{"guerrero one subseries", func() error { _, err := almanac.LambdaGuerrero([]float64{1, 2, 3}, 2, 0, 0); return err }, almanac.ErrTooShort},
		{"guerrero empty", func() error { _, err := almanac.LambdaGuerrero(nil, 2, 0, 0); return err }, almanac.ErrTooShort},
		{"guerrero all missing", func() error { _, err := almanac.LambdaGuerrero([]float64{nan, nan, nan, nan}, 2, 0, 0); return err }, almanac.ErrTooShort},
		{"guerrero constant", func() error { _, err := almanac.LambdaGuerrero([]float64{3, 3, 3, 3, 3, 3}, 2, 0, 0); return err }, almanac.ErrConstant},
		{"guerrero reversed bounds", func() error { _, err := almanac.LambdaGuerrero([]float64{1, 2, 3, 4}, 2, 2, -1); return err }, almanac.ErrInvalid},
		{"ml constant", func() error { _, err := almanac.LambdaML([]float64{2, 2, 2}, 0, 0); return err }, almanac.ErrConstant},
		{"ml one value", func() error { _, err := almanac.LambdaML([]float64{2, nan}, 0, 0); return err }, almanac.ErrTooShort},
		{"ml non-positive", func() error { _, err := almanac.LambdaML([]float64{2, 0, 3}, 0, 0); return err }, almanac.ErrNonPositive},
		{"ml infinite bound", func() error { _, err := almanac.LambdaML([]float64{2, 1, 3}, -inf, 1); return err }, almanac.ErrInvalid},
		{"llf NaN lambda", func() error { _, err := almanac.BoxCoxLLF([]float64{2, 1, 3}, nan); return err }, almanac.ErrInvalid},
		{"llf inf value", func() error { _, err := almanac.BoxCoxLLF([]float64{2, inf, 3}, 1); return err }, almanac.ErrNonFinite},
		{"transform negative", func() error { _, err := almanac.BoxCoxTransform(nil, []float64{2, -1}, 0.5); return err }, almanac.ErrNonPositive},
		{"transform zero at lambda 0", func() error { _, err := almanac.BoxCoxTransform(nil, []float64{2, 0}, 0); return err }, almanac.ErrNonPositive},
		{"transform inf", func() error { _, err := almanac.BoxCoxTransform(nil, []float64{inf}, 1); return err }, almanac.ErrNonFinite},
		{"transform dst length", func() error { _, err := almanac.BoxCoxTransform(make([]float64, 1), []float64{1, 2}, 1); return err }, almanac.ErrLength},
		{"inverse dst length", func() error { _, err := almanac.BoxCoxInverse(make([]float64, 3), []float64{1, 2}, 1); return err }, almanac.ErrLength},
		{"inverse inf lambda", func() error { _, err := almanac.BoxCoxInverse(nil, []float64{1, 2}, inf); return err }, almanac.ErrInvalid},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if err := tt.fn(); !errors.Is(err, tt.want) {
				t.Errorf("err = %v, want %v", err, tt.want)
			}
		})
	}
}

func TestBoxCoxTransformEdges(t *testing.T) {
	nan := math.NaN()
	z, err := almanac.BoxCoxTransform(nil, []float64{nan, 0, 1, 4}, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	// (y^0.5 − 1)/0.5: NaN, −2, 0, 2 (arithmetic).
	numtest.Slice(t, "transform", z, []float64{nan, -2, 0, 2}, 1e-15, 0)
	// Outside the range of the transform the inverse is the nearest end:
	// λ = 0.5, z = −3 < −1/λ → 0; λ = −0.5, z = 3 > −1/λ → +Inf.
	lo, _ := almanac.BoxCoxInverse(nil, []float64{-3, -2}, 0.5)
	numtest.Slice(t, "inverse below range", lo, []float64{0, 0}, 0, 0)
	hi, _ := almanac.BoxCoxInverse(nil, []float64{3}, -0.5)
	if !math.IsInf(hi[0], 1) {
		t.Errorf("inverse above range = %v, want +Inf", hi[0])
	}
	// In place.
	y := []float64{1, 2, 3}
	if _, err := almanac.BoxCoxTransform(y, y, 0); err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "in place", y, []float64{0, math.Log(2), math.Log(3)}, 0, 0)
}

// TestBoxCoxAllocs: the likelihood and Guerrero's criterion do not
// allocate per evaluation (they are the objectives of the λ searches).
func TestBoxCoxAllocs(t *testing.T) {
	y := airPassengers(t)
	if a := testing.AllocsPerRun(100, func() { _, _ = almanac.BoxCoxLLF(y, 0.3) }); a != 0 {
		t.Errorf("BoxCoxLLF allocates %v per call", a)
	}
	logs := make([]float64, len(y))
	for i, v := range y {
		logs[i] = math.Log(v)
	}
	obj := almanac.MLObjective(logs)
	if a := testing.AllocsPerRun(100, func() { _ = obj(0.3) }); a != 0 {
		t.Errorf("LambdaML objective allocates %v per call", a)
	}
	if got, want := obj(0.3), mustLLF(t, y, 0.3); math.Abs(got-want) > 1e-9*math.Abs(want) {
		t.Errorf("objective from logs %v, BoxCoxLLF %v", got, want)
	}
	cv, err := almanac.GuerreroObjective(y, 12)
	if err != nil {
		t.Fatal(err)
	}
	if a := testing.AllocsPerRun(100, func() { _ = cv(0.3) }); a != 0 {
		t.Errorf("Guerrero objective allocates %v per call", a)
	}
}

// constInner is a test model whose forecast is a fixed sample of paths
// on the transformed scale (to check bias adjustment with a Sample).
type constInner struct{ paths [][]float64 }

type constInnerFit struct {
	y     almanac.Series
	paths [][]float64
}

func (m constInner) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	return constInnerFit{y: y, paths: m.paths}, nil
}
func (f constInnerFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	mean := make([]float64, h)
	for i := range mean {
		for _, p := range f.paths {
			mean[i] += p[i] / float64(len(f.paths))
		}
	}
	return almanac.NewForecast(f.y.Time(f.y.Len()), f.y.Freq, mean, &almanac.Sample{Paths: f.paths}, levels...)
}
func (f constInnerFit) FittedValues() []float64 { return make([]float64, f.y.Len()) }
func (f constInnerFit) Residuals() []float64    { return f.y.Slice() }
func (f constInnerFit) String() string          { return "Const" }

// shortInner is a faulty test model whose FittedValues miss the last
// observation (BoxCox used to panic with index out of range on it).
type shortInner struct{}

type shortInnerFit struct{ constInnerFit }

func (shortInner) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	return shortInnerFit{constInnerFit{y: y}}, nil
}
func (f shortInnerFit) FittedValues() []float64 { return make([]float64, f.y.Len()-1) }

// shortDistInner is a faulty test model whose Forecast, built by hand,
// carries a normal distribution with no standard deviations (bias
// adjustment used to panic with index out of range on it).
type shortDistInner struct{}

type shortDistFit struct{ constInnerFit }

func (shortDistInner) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	return shortDistFit{constInnerFit{y: y}}, nil
}
func (f shortDistFit) Forecast(h int, _ ...float64) (almanac.Forecast, error) {
	return almanac.Forecast{Mean: make([]float64, h), Dist: &almanac.Normal{Mean: make([]float64, h)}}, nil
}

func TestBoxCoxBiasShortDistribution(t *testing.T) {
	f, err := almanac.BoxCox{Model: shortDistInner{}, Method: almanac.LambdaFixed, BiasAdjust: true}.Fit(ctx, monthly("d", 4, 5, 6))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.Forecast(3); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("err = %v, want ErrLength", err)
	}
}

func TestBoxCoxModel(t *testing.T) {
	y := monthly("air", airPassengers(t)...)
	t.Run("log naive", func(t *testing.T) {
		m := almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed}
		f, err := m.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		if f.String() != "BoxCox[0](Naive)" {
			t.Errorf("String() = %q", f.String())
		}
		if k := f.(almanac.ParamCounter).NumParams(); k != 0 {
			t.Errorf("NumParams = %d, want 0 for a fixed lambda", k)
		}
		inner, err := almanac.Naive{}.Fit(ctx, monthly("log", logs(y.Values)...))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := f.Forecast(3, 80)
		if err != nil {
			t.Fatal(err)
		}
		ic, _ := inner.Forecast(3, 80)
		for i := range 3 {
			// Median = exp(log-scale point), bounds = exp(log-scale bounds).
			numtest.Scalar(t, "median", fc.Mean[i], math.Exp(ic.Mean[i]), 0, 1e-12)
			numtest.Scalar(t, "lower", fc.Intervals[0].Lower[i], math.Exp(ic.Intervals[0].Lower[i]), 0, 1e-12)
			numtest.Scalar(t, "upper", fc.Intervals[0].Upper[i], math.Exp(ic.Intervals[0].Upper[i]), 0, 1e-12)
		}
		q, err := fc.Quantile(0.5)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Slice(t, "quantile 0.5", q, fc.Mean, 0, 1e-12)
		// Fitted values back on the original scale; residuals on the log
		// scale.
		numtest.Slice(t, "fitted", f.FittedValues()[1:], y.Values[:y.Len()-1], 0, 1e-12)
		numtest.Slice(t, "residuals", f.Residuals(), inner.Residuals(), 0, 0)
		paths, err := f.(almanac.Simulator).Simulate(4, 50, rand.NewPCG(3, 4))
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range paths {
			for _, v := range p {
				if !(v > 0) {
					t.Fatalf("back-transformed path value %v not positive", v)
				}
			}
		}
	})
	t.Run("bias adjusted normal", func(t *testing.T) {
		for _, lam := range []float64{0, 0.3, -0.4} {
			m := almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: lam, BiasAdjust: true}
			f, err := m.Fit(ctx, y)
			if err != nil {
				t.Fatal(err)
			}
			fc, err := f.Forecast(4)
			if err != nil {
				t.Fatal(err)
			}
			ic, _ := f.(*almanac.BoxCoxFit).Inner().Forecast(4)
			sd := ic.Dist.(*almanac.Normal).SD
			for i := range 4 {
				// FPP 3rd ed. §5.6 (common practice):
				// inv(μ)·(1 + σ²(1−λ)/(2(λμ+1)²)).
				mu := ic.Mean[i]
				med, _ := almanac.BoxCoxInverse(nil, []float64{mu}, lam)
				want := med[0] * (1 + sd[i]*sd[i]*(1-lam)/(2*(lam*mu+1)*(lam*mu+1)))
				numtest.Scalar(t, "bias-adjusted mean", fc.Mean[i], want, 0, 1e-12)
				if !(fc.Mean[i] > med[0]) {
					t.Errorf("λ %v: mean %v not above median %v", lam, fc.Mean[i], med[0])
				}
			}
		}
	})
	t.Run("bias adjusted log-normal is the exact mean to second order", func(t *testing.T) {
		// For a log-normal the exact mean is exp(μ + σ²/2); the
		// adjustment exp(μ)(1 + σ²/2) agrees to O(σ⁴) (series of exp).
		f, err := almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, BiasAdjust: true}.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		fc, _ := f.Forecast(1)
		ic, _ := f.(*almanac.BoxCoxFit).Inner().Forecast(1)
		s := ic.Dist.(*almanac.Normal).SD[0]
		numtest.Scalar(t, "mean", fc.Mean[0], math.Exp(ic.Mean[0]+s*s/2), 0, s*s*s*s)
	})
	t.Run("bias adjusted sample", func(t *testing.T) {
		paths := [][]float64{{0, 1}, {1, 2}, {2, 3}}
		f, err := almanac.BoxCox{Model: constInner{paths}, Method: almanac.LambdaFixed, BiasAdjust: true}.Fit(ctx, monthly("s", 1, 2, 3))
		if err != nil {
			t.Fatal(err)
		}
		fc, err := f.Forecast(2, 50)
		if err != nil {
			t.Fatal(err)
		}
		e := math.Exp
		numtest.Slice(t, "mean of exp(paths)", fc.Mean, []float64{(e(0) + e(1) + e(2)) / 3, (e(1) + e(2) + e(3)) / 3}, 0, 1e-15)
		// Type 7 quantiles of 3 paths: the median is the middle path.
		numtest.Slice(t, "median", fc.Intervals[0].Lower, []float64{e(0.5), e(1.5)}, 0, 1e-15)
		if _, err := f.(almanac.Simulator).Simulate(2, 2, rand.NewPCG(1, 1)); !errors.Is(err, almanac.ErrInvalid) {
			t.Errorf("Simulate with a non-simulating inner model: %v", err)
		}
	})
	t.Run("auto lambda", func(t *testing.T) {
		f, err := almanac.BoxCox{Model: almanac.SeasonalNaive{}}.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		bf := f.(*almanac.BoxCoxFit)
		want, _ := almanac.LambdaGuerrero(y.Values, 12, 0, 0)
		if bf.Lambda() != want {
			t.Errorf("Lambda = %v, want Guerrero's %v", bf.Lambda(), want)
		}
		if k := bf.NumParams(); k != 1 {
			t.Errorf("NumParams = %d, want 1 (λ estimated)", k)
		}
		ml, err := almanac.BoxCox{Model: almanac.SeasonalNaive{}, Method: almanac.LambdaMaxLikelihood}.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		wantML, _ := almanac.LambdaML(y.Values, 0, 0)
		if got := ml.(*almanac.BoxCoxFit).Lambda(); got != wantML {
			t.Errorf("ML lambda = %v, want %v", got, wantML)
		}
	})
	t.Run("lambda one is a shift", func(t *testing.T) {
		f, err := almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: 1}.Fit(ctx, y)
		if err != nil {
			t.Fatal(err)
		}
		g, _ := almanac.Drift{}.Fit(ctx, y)
		fc, _ := f.Forecast(5, 90)
		gc, _ := g.Forecast(5, 90)
		numtest.Slice(t, "mean", fc.Mean, gc.Mean, 1e-9, 1e-12)
		numtest.Slice(t, "lower", fc.Intervals[0].Lower, gc.Intervals[0].Lower, 1e-9, 1e-12)
	})
	t.Run("bad input", func(t *testing.T) {
		nan := math.NaN()
		tests := []struct {
			name string
			m    almanac.BoxCox
			y    almanac.Series
			want error
		}{
			{"nil model", almanac.BoxCox{}, y, almanac.ErrInvalid},
			{"unknown method", almanac.BoxCox{Model: almanac.Naive{}, Method: 7}, y, almanac.ErrInvalid},
			{"negative period", almanac.BoxCox{Model: almanac.Naive{}, Period: -12}, y, almanac.ErrInvalid},
			{"NaN lambda", almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, Lambda: nan}, y, almanac.ErrInvalid},
			{"zero with log", almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed}, monthly("z", 1, 0, 2), almanac.ErrNonPositive},
			{"negative with sqrt", almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, Lambda: 0.5}, monthly("z", 1, -1, 2), almanac.ErrNonPositive},
			{"negative with auto", almanac.BoxCox{Model: almanac.Naive{}}, monthly("z", 1, -1, 2, 3), almanac.ErrNonPositive},
			{"empty", almanac.BoxCox{Model: almanac.Naive{}}, monthly("e"), almanac.ErrEmpty},
			{"all missing", almanac.BoxCox{Model: almanac.Naive{}}, monthly("m", nan, nan), almanac.ErrAllMissing},
			{"constant auto", almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaMaxLikelihood}, monthly("c", 4, 4, 4, 4), almanac.ErrConstant},
			{"inner too short", almanac.BoxCox{Model: almanac.Drift{}, Method: almanac.LambdaFixed}, monthly("s", 4, 5), almanac.ErrTooShort},
			{"inner fitted values too few", almanac.BoxCox{Model: shortInner{}, Method: almanac.LambdaFixed}, monthly("f", 4, 5, 6), almanac.ErrLength},
		}
		for _, tt := range tests {
			t.Run(tt.name, func(t *testing.T) {
				if _, err := tt.m.Fit(ctx, tt.y); !errors.Is(err, tt.want) {
					t.Errorf("err = %v, want %v", err, tt.want)
				}
			})
		}
	})
}

func logs(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = math.Log(x)
	}
	return out
}

func TestLambdaMethodString(t *testing.T) {
	for _, tt := range []struct {
		m    almanac.LambdaMethod
		want string
	}{{almanac.LambdaByGuerrero, "guerrero"}, {almanac.LambdaMaxLikelihood, "max-likelihood"}, {almanac.LambdaFixed, "fixed"}, {almanac.LambdaMethod(9), "LambdaMethod(9)"}} {
		t.Run(tt.want, func(t *testing.T) {
			if got := tt.m.String(); got != tt.want {
				t.Errorf("String() = %q, want %q", got, tt.want)
			}
		})
	}
}

func mustLLF(t *testing.T, y []float64, lambda float64) float64 {
	t.Helper()
	v, err := almanac.BoxCoxLLF(y, lambda)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// TestBoxCoxResponseResiduals: the response residuals are y minus the
// back-transformed fitted values, whatever the scale of Residuals.
func TestBoxCoxResponseResiduals(t *testing.T) {
	y := almanac.Series{Key: "r", Start: time.Date(2020, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly,
		Values: []float64{12, 15, 14, 18, 21, 19, 25, 28, 26, 31, 35, 33}}
	f, err := almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, Lambda: 0}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	fv := f.FittedValues()
	got := almanac.ResponseResiduals(f)
	for i, v := range y.Values {
		want := v - fv[i]
		if !(math.IsNaN(want) && math.IsNaN(got[i])) && got[i] != want {
			t.Errorf("response residual %d = %v, want %v", i, got[i], want)
		}
	}
	// Naive on the log scale: fitted value i is y[i-1], so residual 1 is 3.
	if got[1] != 3 {
		t.Errorf("response residual 1 = %v, want 3 (15 − 12)", got[1])
	}
}

// TestBoxCoxM3FiniteBands (issue 11, item 3): BoxCox{Model: Drift{}} with
// λ by Guerrero gave upper bounds of +Inf on ordinary M3 series (N847 and
// N1782 already at 80% from step 3 to 5): Guerrero chose λ between −0.73
// and −1 and the drift forecast on the transformed scale reached −1/λ,
// the image of +∞. With the default interval [0, 2] and, when negative
// powers are asked for, bands conditioned on the range of the transform
// (power-normal), every band is finite and ordered. Data: M3 competition
// (Makridakis & Hibon 2000), training parts, forecast horizons of the
// competition.
func TestBoxCoxM3FiniteBands(t *testing.T) {
	cases := []struct {
		file, id string
		freq     calendar.Frequency
	}{
		{"m3_quarterly.csv", "N847", calendar.Quarterly},
		{"m3_quarterly.csv", "N1300", calendar.Quarterly},
		{"m3_quarterly.csv", "N696", calendar.Quarterly},
		{"m3_monthly.csv", "N1782", calendar.Monthly},
	}
	loaded := map[string][]m3data.Series{}
	for _, c := range cases {
		if loaded[c.file] == nil {
			loaded[c.file] = m3data.Load(t, c.file)
		}
		var s m3data.Series
		for _, x := range loaded[c.file] {
			if x.ID == c.id {
				s = x
			}
		}
		if s.ID == "" {
			t.Fatalf("%s not in %s", c.id, c.file)
		}
		y := almanac.Series{Key: c.id, Start: time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC), Freq: c.freq, Values: s.Train}
		for _, m := range []almanac.BoxCox{
			{Model: almanac.Drift{}},
			{Model: almanac.Drift{}, Lower: -1, Upper: 2},
			{Model: almanac.Drift{}, Method: almanac.LambdaFixed, Lambda: -1},
		} {
			t.Run(fmt.Sprintf("%s/lower=%v/%v", c.id, m.Lower, m.Method), func(t *testing.T) {
				f, err := m.Fit(ctx, y)
				if err != nil {
					t.Fatal(err)
				}
				lam := f.(*almanac.BoxCoxFit).Lambda()
				if m.Lower == 0 && m.Method == almanac.LambdaByGuerrero && lam < 0 {
					t.Errorf("default λ %v outside [0, 2]", lam)
				}
				fc, err := f.Forecast(len(s.Test), 80, 95)
				if err != nil {
					t.Fatal(err)
				}
				for h := range fc.Mean {
					lo80, hi80 := fc.Intervals[0].Lower[h], fc.Intervals[0].Upper[h]
					lo95, hi95 := fc.Intervals[1].Lower[h], fc.Intervals[1].Upper[h]
					if !(0 <= lo95 && lo95 <= lo80 && lo80 <= fc.Mean[h] && fc.Mean[h] <= hi80 && hi80 <= hi95 && !math.IsInf(hi95, 0)) {
						t.Fatalf("λ %.4g step %d: 95%% [%v, %v], 80%% [%v, %v], median %v", lam, h+1, lo95, hi95, lo80, hi80, fc.Mean[h])
					}
				}
			})
		}
	}
}

// TestBoxCoxPowerNormal checks the back-transformed distribution for
// λ < 0 against its definition: the inner normal N(μ, σ²) conditioned on
// z < −1/λ (Freeman & Modarres 2006, the power-normal distribution;
// recalled from memory), so P(Y ≤ q_p) = Φ((t(q_p) − μ)/σ) / Φ(b) = p with
// t the transform and b = (−1/λ − μ)/σ. The inner model is Mean on
// invented data transformed with λ = −1, whose forecast is N(μ, σ²)
// with σ large against the distance to −1/λ = 1.
func TestBoxCoxPowerNormal(t *testing.T) {
	y := monthly("pn", 2, 9, 3, 40, 5, 1.5, 80, 2.5, 6, 200, 3, 12)
	lam := -1.0
	f, err := almanac.BoxCox{Model: almanac.Mean{}, Method: almanac.LambdaFixed, Lambda: lam}.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	in, err := f.(*almanac.BoxCoxFit).Inner().Forecast(1)
	if err != nil {
		t.Fatal(err)
	}
	mu, sd := in.Mean[0], in.Dist.(*almanac.Normal).SD[0]
	phiB := distuv.UnitNormal.CDF((-1/lam - mu) / sd)
	if phiB > 0.99 {
		t.Fatalf("test data too tame: Φ(b) = %v", phiB)
	}
	fc, err := f.Forecast(1, 50, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []float64{0.025, 0.1, 0.25, 0.5, 0.75, 0.9, 0.975} {
		q, err := fc.Quantile(p)
		if err != nil {
			t.Fatal(err)
		}
		z, err := almanac.BoxCoxTransform(nil, q, lam)
		if err != nil {
			t.Fatal(err)
		}
		got := distuv.UnitNormal.CDF((z[0]-mu)/sd) / phiB
		numtest.Scalar(t, fmt.Sprintf("P(Y ≤ q_%v)", p), got, p, 1e-9, 0)
	}
	numtest.Scalar(t, "median", fc.Mean[0], mustQuantile(t, fc, 0.5)[0], 0, 1e-15)
	// Simulated paths beyond −1/λ are drawn again: every value finite and
	// positive, and the same source gives the same paths.
	sim := f.(almanac.Simulator)
	a, err := sim.Simulate(3, 200, rand.NewPCG(5, 6))
	if err != nil {
		t.Fatal(err)
	}
	b, _ := sim.Simulate(3, 200, rand.NewPCG(5, 6))
	for i := range a {
		for h, v := range a[i] {
			if !(v > 0) || math.IsInf(v, 0) || v != b[i][h] {
				t.Fatalf("path %d step %d: %v (again %v)", i, h, v, b[i][h])
			}
		}
	}
}

func mustQuantile(t *testing.T, fc almanac.Forecast, p float64) []float64 {
	t.Helper()
	q, err := fc.Quantile(p)
	if err != nil {
		t.Fatal(err)
	}
	return q
}

// TestBoxCoxOverflow: a transform beyond the float64 range is an error,
// not an Inf handed to the inner model.
func TestBoxCoxOverflow(t *testing.T) {
	_, err := almanac.BoxCox{Model: almanac.Naive{}, Method: almanac.LambdaFixed, Lambda: 2}.Fit(ctx, monthly("big", 1e200, 2e200, 3e200))
	if !errors.Is(err, almanac.ErrNonFinite) {
		t.Fatalf("err = %v, want ErrNonFinite", err)
	}
	if _, err := almanac.BoxCoxTransform(nil, []float64{1e-300}, -2); !errors.Is(err, almanac.ErrNonFinite) {
		t.Fatalf("transform of 1e-300 with λ = −2: err = %v, want ErrNonFinite", err)
	}
	// λ by maximum likelihood on data near the float64 limit: the
	// likelihood is scale-free, so the same λ as for the data / 1e300.
	v := []float64{3, 5, 4, 8, 6, 9, 7, 12, 10, 15}
	big := make([]float64, len(v))
	for i, x := range v {
		big[i] = x * 1e300
	}
	l1, err := almanac.LambdaML(v, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	l2, err := almanac.LambdaML(big, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "lambda of scaled data", l2, l1, 1e-6, 0)
	g1, _ := almanac.LambdaGuerrero(v, 2, 0, 0)
	g2, err := almanac.LambdaGuerrero(big, 2, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "Guerrero lambda of scaled data", g2, g1, 1e-6, 0)
}
