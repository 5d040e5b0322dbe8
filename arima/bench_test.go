package arima

import (
	"context"
	"fmt"
	"math"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/reftest"
)

// logAirPassengers returns log(AirPassengers), Box & Jenkins' Series G,
// from the reference fixture's input (R's log of the R dataset).
func logAirPassengers(tb testing.TB) almanac.Series {
	tb.Helper()
	f, err := reftest.Load("testdata/reference/airpassengers_log_airline.json")
	if err != nil {
		tb.Fatal(err)
	}
	return almanac.Series{Key: "log air passengers", Start: time.Date(1949, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: f.Floats(tb, "input")}
}

var airline = Spec{D: 1, Q: 1, SD: 1, SQ: 1}

// BenchmarkFitAirline fits the airline model to log air passengers (144
// monthly values) by ML, by CSS then ML and by CSS, and by CSS then ML
// with the standard errors (computed on first use, a Hessian).
func BenchmarkFitAirline(b *testing.B) {
	y := logAirPassengers(b)
	b.Run("CSS-ML+SE", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			f, err := airline.Fit(context.Background(), y)
			if err != nil {
				b.Fatal(err)
			}
			f.(*Fitted).Coef()
		}
	})
	for _, m := range []Method{ML, CSSThenML, CSS} {
		s := airline
		s.Method = m
		b.Run(m.String(), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := s.Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkFitSizes fits an ARIMA(1,1,1) with drift (CSS then ML) to
// series of growing length built from log air passengers.
func BenchmarkFitSizes(b *testing.B) {
	base := logAirPassengers(b)
	for _, n := range []int{144, 1440, 14400} {
		vals := make([]float64, n)
		for i := range vals {
			vals[i] = base.Values[i%144] + 0.5*math.Floor(float64(i)/144)
		}
		y := base
		y.Values = vals
		s := Spec{P: 1, D: 1, Q: 1, Constant: ConstantInclude}
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := s.Fit(context.Background(), y); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// mlObjectiveOf prepares the ML objective of spec on y at its starting
// point, as Fit does.
func mlObjectiveOf(tb testing.TB, s Spec, y almanac.Series) (func([]float64) float64, []float64) {
	tb.Helper()
	lay, err := s.resolve(y)
	if err != nil {
		tb.Fatal(err)
	}
	pr := newProblem(lay, y.Slice(), nil, s.Fixed, s.Prior)
	x0 := make([]float64, len(pr.free))
	for i := range x0 {
		x0[i] = -0.3
	}
	return func(x []float64) float64 { return pr.mlObjective(x, true) }, x0
}

// BenchmarkLikelihood evaluates the exact likelihood of the airline model
// (27 states) and of an ARMA(2,1) with seasonal AR on series of growing
// length.
func BenchmarkLikelihood(b *testing.B) {
	base := logAirPassengers(b)
	for _, tc := range []struct {
		name string
		spec Spec
	}{
		{"airline", airline},
		{"ARIMA(2,0,1)×(1,0,0)_12", Spec{P: 2, Q: 1, SP: 1, Constant: ConstantNone, Method: ML}},
	} {
		for _, n := range []int{144, 576} {
			vals := make([]float64, n)
			for i := range vals {
				vals[i] = base.Values[i%144] + 0.1*math.Floor(float64(i)/144)
			}
			y := base
			y.Values = vals
			f, x0 := mlObjectiveOf(b, tc.spec, y)
			b.Run(fmt.Sprintf("%s/n=%d", tc.name, n), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					f(x0)
				}
			})
		}
	}
}

// BenchmarkOptimizer compares the package's quasi-Newton minimiser with
// gonum's optimize.BFGS (useGonum) on the airline fit of log air
// passengers (CSS then ML, and ML from zero), on the default stepwise
// Search of that series, and on the longest fit of BenchmarkFitSizes.
func BenchmarkOptimizer(b *testing.B) {
	y := logAirPassengers(b)
	mlSpec := airline
	mlSpec.Method = ML
	// The long series of BenchmarkFitSizes.
	long := y
	long.Values = make([]float64, 14400)
	for i := range long.Values {
		long.Values[i] = y.Values[i%144] + 0.5*math.Floor(float64(i)/144)
	}
	drift := Spec{P: 1, D: 1, Q: 1, Constant: ConstantInclude}
	for _, opt := range []struct {
		name  string
		gonum bool
	}{{"quasiNewton", false}, {"gonum-BFGS", true}} {
		for _, m := range []struct {
			name string
			fit  func() error
		}{
			{"airline-CSS-ML", func() error { _, err := airline.Fit(context.Background(), y); return err }},
			{"airline-ML", func() error { _, err := mlSpec.Fit(context.Background(), y); return err }},
			{"search", func() error { _, err := (Search{}).Fit(context.Background(), y); return err }},
			{"ARIMA(1,1,1)-drift-n=14400", func() error { _, err := drift.Fit(context.Background(), long); return err }},
		} {
			b.Run(opt.name+"/"+m.name, func(b *testing.B) {
				defer func(old bool) { useGonum = old }(useGonum)
				useGonum = opt.gonum
				b.ReportAllocs()
				for b.Loop() {
					if err := m.fit(); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
