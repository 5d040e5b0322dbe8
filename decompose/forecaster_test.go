package decompose_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/decompose"
)

// TestForecasterComposition: the forecast is the inner model's forecast
// of the adjusted series plus (times) the last seasonal cycle, with the
// inner intervals moved the same way; checked for STL + Naive, classical
// multiplicative + Drift and MSTL + Mean on real data (R datasets co2 and
// AirPassengers, weekly Mauna Loa CO2).
func TestForecasterComposition(t *testing.T) {
	ctx := context.Background()
	week, _, err := decompose.Repair{}.Fill(co2Weekly(t))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name   string
		f      decompose.Forecaster
		y      almanac.Series
		prefix string
	}{
		{"stl naive", decompose.Forecaster{Model: almanac.Naive{}}, fixtureInput(t, "stl_co2_swin7"), "STL+Naive"},
		{"classical multiplicative drift", decompose.Forecaster{Model: almanac.Drift{}, Method: decompose.Classical{Multiplicative: true}}, fixtureInput(t, "decompose_airpassengers_multiplicative"), "Classical+Drift"},
		{"mstl mean", decompose.Forecaster{Model: almanac.Mean{}, Method: decompose.MSTL{Periods: []float64{13, 52}}}, week, "MSTL+Mean"},
	} {
		t.Run(c.name, func(t *testing.T) {
			fit, err := c.f.Fit(ctx, c.y)
			if err != nil {
				t.Fatal(err)
			}
			if fit.String() != c.prefix {
				t.Errorf("String() = %q, want %q", fit.String(), c.prefix)
			}
			ff := fit.(*decompose.ForecasterFit)
			d := ff.Decomposition()
			inner, err := c.f.Model.Fit(ctx, d.Adjusted())
			if err != nil {
				t.Fatal(err)
			}
			const h = 60
			want, err := inner.Forecast(h, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			got, err := fit.Forecast(h, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			if !got.Start.Equal(c.y.Time(c.y.Len())) {
				t.Errorf("start %v, want %v", got.Start, c.y.Time(c.y.Len()))
			}
			n := c.y.Len()
			for k := 0; k < h; k++ {
				s := 0.0
				if d.Multiplicative {
					s = 1
				}
				for j, comp := range d.Seasonals {
					p := d.Periods[j]
					v := comp[n-p+k%p]
					if d.Multiplicative {
						s *= v
					} else {
						s += v
					}
				}
				move := func(x float64) float64 {
					if d.Multiplicative {
						return x * s
					}
					return x + s
				}
				if got.Mean[k] != move(want.Mean[k]) {
					t.Fatalf("step %d: mean %v, want %v", k, got.Mean[k], move(want.Mean[k]))
				}
				for l := range want.Intervals {
					if got.Intervals[l].Lower[k] != move(want.Intervals[l].Lower[k]) || got.Intervals[l].Upper[k] != move(want.Intervals[l].Upper[k]) {
						t.Fatalf("step %d level %v: interval moved wrongly", k, want.Intervals[l].Level)
					}
				}
				q, err := got.Quantile(0.9)
				if err != nil {
					t.Fatal(err)
				}
				wq, _ := want.Quantile(0.9)
				if math.Abs(q[k]-move(wq[k])) > 1e-12*math.Abs(q[k]) {
					t.Fatalf("step %d: quantile %v, want %v", k, q[k], move(wq[k]))
				}
			}
			fv, res := fit.FittedValues(), fit.Residuals()
			for i := range fv {
				if !math.IsNaN(fv[i]) && math.Abs(c.y.Values[i]-fv[i]-res[i]) > 1e-12*math.Abs(c.y.Values[i]) {
					t.Fatalf("residual %d is not y − fitted", i)
				}
			}
		})
	}
}

func TestForecasterSimulate(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	fit, err := decompose.Forecaster{Model: almanac.Naive{}}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	sim := fit.(almanac.Simulator)
	a, err := sim.Simulate(12, 50, rand.NewPCG(1, 2))
	if err != nil {
		t.Fatal(err)
	}
	b, err := sim.Simulate(12, 50, rand.NewPCG(1, 2))
	if err != nil {
		t.Fatal(err)
	}
	if len(a) != 50 || len(a[0]) != 12 {
		t.Fatalf("shape %d×%d", len(a), len(a[0]))
	}
	for i := range a {
		for k := range a[i] {
			if a[i][k] != b[i][k] {
				t.Fatal("same source state gave different paths")
			}
		}
	}
}

func TestForecasterErrors(t *testing.T) {
	ctx := context.Background()
	y := fixtureInput(t, "stl_co2_swin7")
	gappy := y.Clone()
	gappy.Values[10] = math.NaN()
	if _, err := (decompose.Forecaster{}).Fit(ctx, y); !errors.Is(err, almanac.ErrInvalid) {
		t.Errorf("nil model: %v", err)
	}
	if _, err := (decompose.Forecaster{Model: almanac.Naive{}}).Fit(ctx, gappy); !errors.Is(err, almanac.ErrMissing) {
		t.Errorf("NaN: %v", err)
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := (decompose.Forecaster{Model: almanac.Naive{}}).Fit(cancelled, y); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
	fit, err := decompose.Forecaster{Model: almanac.Naive{}}.Fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := fit.Forecast(0); !errors.Is(err, almanac.ErrHorizon) {
		t.Errorf("h = 0: %v", err)
	}
	if _, err := fit.Forecast(3, 100); !errors.Is(err, almanac.ErrLevel) {
		t.Errorf("level 100: %v", err)
	}
}

// badModel is a caller's model that returns slices of the wrong length.
type badModel struct{ short bool }

type badFit struct {
	n     int
	short bool
}

func (m badModel) Fit(_ context.Context, y almanac.Series) (almanac.Fitted, error) {
	return badFit{n: y.Len(), short: m.short}, nil
}

func (f badFit) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	return almanac.Forecast{Mean: make([]float64, h+1)}, nil
}

func (f badFit) FittedValues() []float64 {
	if f.short {
		return make([]float64, f.n-1)
	}
	return make([]float64, f.n)
}
func (f badFit) Residuals() []float64 { return make([]float64, f.n) }
func (f badFit) String() string       { return "Bad" }

// TestForecasterBadInnerModel: a caller's model returning slices of the
// wrong length gives an error wrapping almanac.ErrLength, not a panic.
func TestForecasterBadInnerModel(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	if _, err := (decompose.Forecaster{Model: badModel{short: true}}).Fit(context.Background(), y); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("short fitted values: %v", err)
	}
	fit, err := decompose.Forecaster{Model: badModel{}}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := fit.Forecast(5); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("long forecast: %v", err)
	}
}

// badMethod is a caller's decomposition method with a malformed result.
type badMethod struct{}

func (badMethod) Decompose(y almanac.Series) (*decompose.Decomposition, error) {
	return &decompose.Decomposition{Series: y, Seasonal: make([]float64, y.Len()), Seasonals: [][]float64{make([]float64, 3)}, Periods: []int{12}}, nil
}

func TestForecasterBadMethod(t *testing.T) {
	y := fixtureInput(t, "stl_co2_swin7")
	if _, err := (decompose.Forecaster{Model: almanac.Naive{}, Method: badMethod{}}).Fit(context.Background(), y); !errors.Is(err, almanac.ErrLength) {
		t.Errorf("malformed decomposition: %v", err)
	}
}

// TestForecasterBatch: the forecaster works with almanac.BatchFit, with
// bit-identical forecasts for 1 and 4 workers, and reports a gappy
// series as an error wrapping almanac.ErrMissing without stopping others.
func TestForecasterBatch(t *testing.T) {
	gappy := fixtureInput(t, "stl_nottem_periodic")
	gappy.Values[7] = math.NaN()
	ys := []almanac.Series{fixtureInput(t, "stl_co2_swin7"), gappy, fixtureInput(t, "stl_ukgas_swin9_sdeg1"), fixtureInput(t, "decompose_airpassengers_multiplicative")}
	m := decompose.Forecaster{Model: almanac.Drift{}, Method: decompose.STL{Robust: true}}
	var means [2][][]float64
	for k, workers := range []int{1, 4} {
		res, err := almanac.BatchFit(context.Background(), m, ys, almanac.BatchOptions{Workers: workers})
		if err != nil {
			t.Fatal(err)
		}
		for i, r := range res {
			if i == 1 {
				if !errors.Is(r.Err, almanac.ErrMissing) {
					t.Fatalf("gappy series: %v", r.Err)
				}
				means[k] = append(means[k], nil)
				continue
			}
			if r.Err != nil {
				t.Fatal(r.Err)
			}
			fc, err := r.Fitted.Forecast(8)
			if err != nil {
				t.Fatal(err)
			}
			means[k] = append(means[k], fc.Mean)
		}
	}
	for i := range means[0] {
		for h := range means[0][i] {
			if math.Float64bits(means[0][i][h]) != math.Float64bits(means[1][i][h]) {
				t.Fatalf("series %d step %d differs between 1 and 4 workers", i, h)
			}
		}
	}
}
