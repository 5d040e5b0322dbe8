package reconcile_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// fakeFit is a stand-in Fitted holding given residuals.
type fakeFit struct{ resid []float64 }

func (f fakeFit) Forecast(int, ...float64) (almanac.Forecast, error) { return almanac.Forecast{}, nil }
func (f fakeFit) FittedValues() []float64                            { return nil }
func (f fakeFit) Residuals() []float64                               { return f.resid }
func (f fakeFit) String() string                                     { return "fake" }

func TestColumnHelpers(t *testing.T) {
	h := testHierarchy(t, 2) // total, r0, r0-s0, r0-s1
	t0 := time.Date(2026, time.January, 1, 0, 0, 0, 0, time.UTC)
	series := []almanac.Series{
		{Key: "total", Start: t0, Freq: calendar.Monthly, Values: []float64{3, 5, 7}},
		{Key: "r0", Start: t0, Freq: calendar.Monthly, Values: []float64{3, 5, 7}},
		{Key: "a", Start: t0, Freq: calendar.Monthly, Values: []float64{1, 2, 3}},
		{Key: "b", Start: t0, Freq: calendar.Monthly, Values: []float64{2, 3, 4}},
	}
	hist, err := reconcile.HistoryMatrix(h, series)
	if err != nil {
		t.Fatal(err)
	}
	if !mat.Equal(hist, mat.NewDense(3, 4, []float64{3, 3, 1, 2, 5, 5, 2, 3, 7, 7, 3, 4})) {
		t.Errorf("history %v", mat.Formatted(hist))
	}
	fits := []almanac.Fitted{
		fakeFit{[]float64{math.NaN(), 1, -1}}, fakeFit{[]float64{math.NaN(), 2, 0}},
		fakeFit{[]float64{math.NaN(), 1, 1}}, fakeFit{[]float64{math.NaN(), -1, 2}},
	}
	res, err := reconcile.ResidualMatrix(h, fits)
	if err != nil {
		t.Fatal(err)
	}
	// The NaN row is dropped: two complete rows remain.
	est, err := reconcile.EstimateCovariance(h, res, reconcile.Shrinkage)
	if err != nil {
		t.Fatal(err)
	}
	if est.Rows != 2 {
		t.Errorf("rows used %d, want 2", est.Rows)
	}
	tests := []struct {
		name string
		err  error
		want error
	}{
		{"too few series", func() error { _, err := reconcile.HistoryMatrix(h, series[:3]); return err }(), almanac.ErrLength},
		{"unequal lengths", func() error {
			s := append([]almanac.Series(nil), series...)
			s[2].Values = s[2].Values[:2]
			_, err := reconcile.HistoryMatrix(h, s)
			return err
		}(), reconcile.ErrDimension},
		{"nil fit", func() error { _, err := reconcile.ResidualMatrix(h, make([]almanac.Fitted, 4)); return err }(), almanac.ErrInvalid},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if !errors.Is(tt.err, tt.want) {
				t.Errorf("error %v, want %v", tt.err, tt.want)
			}
		})
	}
}

// The named functions are the same computations as Reconcile with the
// corresponding Spec.
func TestNamedFunctions(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	h := testHierarchy(t, 3, 2)
	base := coherentData(h, 4, 5, rng)
	resid := randomResiduals(h, 30, rng)
	hist := coherentData(h, 20, 0, rng)
	type call func() (*mat.Dense, error)
	tests := []struct {
		name string
		fn   call
		spec reconcile.Spec
	}{
		{"BottomUp", func() (*mat.Dense, error) { return reconcile.BottomUp(h, base) }, reconcile.Spec{Method: reconcile.MethodBottomUp}},
		{"TopDown", func() (*mat.Dense, error) {
			return reconcile.TopDown(h, base, reconcile.ProportionsOfHistoricalAverages, hist)
		}, reconcile.Spec{Method: reconcile.MethodTopDown, Disaggregation: reconcile.ProportionsOfHistoricalAverages, History: hist}},
		{"MiddleOut", func() (*mat.Dense, error) { return reconcile.MiddleOut(h, 1, base, reconcile.DisaggregationAuto, nil) }, reconcile.Spec{Method: reconcile.MethodMiddleOut, Level: 1}},
		{"OLS", func() (*mat.Dense, error) { return reconcile.OLS(h, base) }, reconcile.Spec{Method: reconcile.MethodOLS}},
		{"WLSStructural", func() (*mat.Dense, error) { return reconcile.WLSStructural(h, base) }, reconcile.Spec{Method: reconcile.MethodWLSStructural}},
		{"WLSVariance", func() (*mat.Dense, error) { return reconcile.WLSVariance(h, base, resid) }, reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid}},
		{"MinT sample", func() (*mat.Dense, error) { return reconcile.MinT(h, base, resid, reconcile.SampleCovariance) }, reconcile.Spec{Method: reconcile.MethodMinTSample, Residuals: resid}},
		{"MinT auto", func() (*mat.Dense, error) { return reconcile.MinT(h, base, resid, reconcile.CovarianceAuto) }, reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}},
		{"MinT diagonal", func() (*mat.Dense, error) { return reconcile.MinT(h, base, resid, reconcile.DiagonalVariance) }, reconcile.Spec{Method: reconcile.MethodWLSVariance, Residuals: resid}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := tt.fn()
			if err != nil {
				t.Fatal(err)
			}
			want, err := reconcile.Reconcile(h, base, tt.spec)
			if err != nil {
				t.Fatal(err)
			}
			if !mat.Equal(got, want) {
				t.Error("differs from Reconcile with the same Spec")
			}
		})
	}
	if _, err := reconcile.MinT(h, base, resid, reconcile.Covariance(17)); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("unknown covariance: %v", err)
	}
	if _, err := reconcile.TopDown(nil, base, 0, nil); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("nil hierarchy: %v", err)
	}
}

// A one-node hierarchy is its own bottom series: every method returns the
// base forecasts.
func TestSingleNode(t *testing.T) {
	h, err := reconcile.NewHierarchy(reconcile.Link{Name: "only"})
	if err != nil {
		t.Fatal(err)
	}
	base := mat.NewDense(2, 1, []float64{4, 5})
	for _, m := range []reconcile.Method{reconcile.MethodBottomUp, reconcile.MethodTopDown, reconcile.MethodOLS, reconcile.MethodWLSStructural} {
		got, err := reconcile.Reconcile(h, base, reconcile.Spec{Method: m})
		if err != nil {
			t.Fatalf("%v: %v", m, err)
		}
		if !mat.Equal(got, base) {
			t.Errorf("%v: %v", m, mat.Formatted(got))
		}
	}
}
