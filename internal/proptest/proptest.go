package proptest

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime/debug"
	"testing"

	"github.com/almanac-go/almanac"
)

// Case is a series of values at an extreme scale.
type Case struct {
	Name   string
	Values []float64
}

// pattern is an ordinary positive series of period m in [8, 14].
func pattern(n, m int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = 10 + 2*math.Sin(2*math.Pi*float64(i%max(m, 1))/float64(max(m, 1))) + 0.05*float64(i) + 0.3*math.Cos(1.3*float64(i*i))
	}
	return v
}

// Cases returns series of n values with a seasonal pattern of period m
// (m ≤ 1: none) at extreme scales. Every value is finite.
func Cases(n, m int) []Case {
	base := pattern(n, m)
	scaled := func(c float64) []float64 {
		v := make([]float64, n)
		for i, x := range base {
			v[i] = x * c
		}
		return v
	}
	fill := func(f func(i int) float64) []float64 {
		v := make([]float64, n)
		for i := range v {
			v[i] = f(i)
		}
		return v
	}
	return []Case{
		{"scale 1e-300", scaled(1e-300)},
		{"scale 1e300", scaled(1e300)},
		{"scale 1e307", scaled(1e307)},
		{"subnormal", scaled(1e-315)},
		{"all 1e308", fill(func(int) float64 { return 1e308 })},
		{"near the float64 limit", fill(func(i int) float64 { return math.MaxFloat64 * (0.9 + 0.01*float64(i%7)) })},
		{"alternating ±1e308", fill(func(i int) float64 { return 1e308 * float64(1-2*(i%2)) })},
		{"one 1e308 spike", fill(func(i int) float64 {
			if i == n/2 {
				return 1e308
			}
			return base[i]
		})},
		{"one -1e308 spike", fill(func(i int) float64 {
			if i == n/3 {
				return -1e308
			}
			return base[i]
		})},
		{"tiny and huge mixed", fill(func(i int) float64 { return []float64{1e-300, 1e300, 3, 2e300, 5e-310}[i%5] })},
		{"huge with small wiggle", fill(func(i int) float64 { return 1e308 + 1e292*base[i] })},
	}
}

// Sentinels are the root package's sentinel errors.
var Sentinels = []error{
	almanac.ErrEmpty, almanac.ErrTooShort, almanac.ErrAllMissing, almanac.ErrMissing,
	almanac.ErrNonFinite, almanac.ErrConstant, almanac.ErrNonPositive, almanac.ErrLength,
	almanac.ErrFrequency, almanac.ErrLevel, almanac.ErrHorizon, almanac.ErrNoDistribution,
	almanac.ErrInvalid, almanac.ErrNotFitted,
}

// CheckErr fails t unless err wraps a root sentinel or one of extra.
func CheckErr(t testing.TB, what string, err error, extra ...error) {
	t.Helper()
	for _, s := range append(append([]error(nil), Sentinels...), extra...) {
		if errors.Is(err, s) {
			return
		}
	}
	t.Errorf("%s: error %q wraps no sentinel", what, err)
}

// Finite fails t when x holds NaN or ±Inf.
func Finite(t testing.TB, what string, x []float64) {
	t.Helper()
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Errorf("%s[%d] = %v with a nil error", what, i, v)
			return
		}
	}
}

// NoInf fails t when x holds ±Inf (NaN is allowed: a value the method
// documents as undefined).
func NoInf(t testing.TB, what string, x []float64) {
	t.Helper()
	for i, v := range x {
		if math.IsInf(v, 0) {
			t.Errorf("%s[%d] = %v with a nil error", what, i, v)
			return
		}
	}
}

// Safely runs f and turns a panic into a test failure with its stack.
func Safely(t testing.TB, what string, f func()) {
	t.Helper()
	defer func() {
		if r := recover(); r != nil {
			t.Errorf("%s panicked: %v\n%s", what, r, debug.Stack())
		}
	}()
	f()
}

// CheckModel fits m to y and forecasts h steps with 80% and 95% bands,
// reads the 0.01 and 0.99 quantiles and, when the fit can simulate, draws
// a few sample paths. Each step either fails with an error wrapping a
// sentinel (root or extra) or gives finite numbers; fitted values and
// residuals may hold NaN but never ±Inf. It returns whether the model
// fitted.
func CheckModel(t testing.TB, m almanac.Model, y almanac.Series, h int, extra ...error) (fitted bool) {
	t.Helper()
	Safely(t, fmt.Sprintf("%T on %s", m, y.Key), func() {
		fit, err := m.Fit(t.Context(), y)
		if err != nil {
			CheckErr(t, "Fit", err, extra...)
			return
		}
		fitted = true
		fv, res := fit.FittedValues(), fit.Residuals()
		NoInf(t, "FittedValues", fv)
		NoInf(t, "Residuals", res)
		fc, err := fit.Forecast(h, 80, 95)
		if err != nil {
			CheckErr(t, "Forecast", err, extra...)
		} else {
			Finite(t, "Mean", fc.Mean)
			for _, iv := range fc.Intervals {
				Finite(t, fmt.Sprintf("%v%% lower", iv.Level), iv.Lower)
				Finite(t, fmt.Sprintf("%v%% upper", iv.Level), iv.Upper)
			}
			for _, p := range []float64{0.01, 0.99} {
				q, err := fc.Quantile(p)
				if err != nil {
					CheckErr(t, "Quantile", err, append(extra, almanac.ErrNoDistribution)...)
					continue
				}
				Finite(t, fmt.Sprintf("quantile %v", p), q)
			}
		}
		if sim, ok := fit.(almanac.Simulator); ok {
			paths, err := sim.Simulate(h, 5, rand.NewPCG(1, 2))
			if err != nil {
				CheckErr(t, "Simulate", err, extra...)
				return
			}
			for i, p := range paths {
				Finite(t, fmt.Sprintf("path %d", i), p)
			}
		}
	})
	return fitted
}
