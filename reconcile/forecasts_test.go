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

var start = time.Date(2027, time.January, 1, 0, 0, 0, 0, time.UTC)

func normalForecasts(t *testing.T, base *mat.Dense, sd func(node, step int) float64) []almanac.Forecast {
	t.Helper()
	h, n := base.Dims()
	out := make([]almanac.Forecast, n)
	for i := range out {
		mean := mat.Col(nil, i, base)
		sds := make([]float64, h)
		for k := range sds {
			sds[k] = sd(i, k)
		}
		f, err := almanac.NewForecast(start, calendar.Monthly, mean, &almanac.Normal{Mean: mean, SD: sds})
		if err != nil {
			t.Fatal(err)
		}
		out[i] = f
	}
	return out
}

// Gaussian bottom-up with IndependentPaths: the total of independent
// normal bottom forecasts has variance equal to the sum of their variances
// (common practice: variance of a sum of independent variables).
func TestForecastsGaussianBottomUp(t *testing.T) {
	h := testHierarchy(t, 2, 2)
	rng := rand.New(rand.NewPCG(31, 32))
	base := coherentData(h, 4, 5, rng)
	fcs := normalForecasts(t, base, func(i, k int) float64 { return float64(1 + i + k) })
	got, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Method: reconcile.MethodBottomUp, Draw: reconcile.IndependentPaths}, 80, 95)
	if err != nil {
		t.Fatal(err)
	}
	for k := 0; k < 4; k++ {
		var v float64
		for i := 3; i < 7; i++ {
			v += float64((1 + i + k) * (1 + i + k))
		}
		sd := got[0].Dist.(*almanac.Normal).SD[k]
		if math.Abs(sd-math.Sqrt(v)) > 1e-12*sd {
			t.Errorf("step %d: total sd %v, want %v", k, sd, math.Sqrt(v))
		}
		// Region r0 = r0-s0 + r0-s1 (nodes 3 and 4).
		want := math.Sqrt(float64((4+k)*(4+k) + (5+k)*(5+k)))
		if sd := got[1].Dist.(*almanac.Normal).SD[k]; math.Abs(sd-want) > 1e-12*want {
			t.Errorf("step %d: region sd %v, want %v", k, sd, want)
		}
	}
	if len(got[0].Intervals) != 2 || got[0].Intervals[1].Level != 95 {
		t.Errorf("intervals %+v", got[0].Intervals)
	}
}

// Gaussian MinT: reconciled variances equal diag(S G Σ G' S') with
// Σ = D R D, computed here through BottomMap and ReconciledCovariance.
func TestForecastsGaussianMinT(t *testing.T) {
	h := testHierarchy(t, 3, 2)
	n := h.Len()
	rng := rand.New(rand.NewPCG(33, 34))
	base := coherentData(h, 3, 5, rng)
	resid := randomResiduals(h, 40, rng)
	sdOf := func(i, k int) float64 { return 2 + 0.5*float64(i) + float64(k) }
	fcs := normalForecasts(t, base, sdOf)
	spec := reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid}
	got, err := reconcile.Forecasts(h, fcs, spec, 90)
	if err != nil {
		t.Fatal(err)
	}
	means, err := reconcile.Reconcile(h, base, spec)
	if err != nil {
		t.Fatal(err)
	}
	g, err := reconcile.BottomMap(h, spec)
	if err != nil {
		t.Fatal(err)
	}
	est, err := reconcile.EstimateCovariance(h, resid, reconcile.Shrinkage)
	if err != nil {
		t.Fatal(err)
	}
	for k := 0; k < 3; k++ {
		sigma := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			for j := i; j < n; j++ {
				r := est.W.At(i, j) / math.Sqrt(est.W.At(i, i)*est.W.At(j, j))
				sigma.SetSym(i, j, r*sdOf(i, k)*sdOf(j, k))
			}
		}
		v, err := reconcile.ReconciledCovariance(h, g, sigma)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < n; i++ {
			d := got[i].Dist.(*almanac.Normal)
			if want := math.Sqrt(v.At(i, i)); math.Abs(d.SD[k]-want) > 1e-10*want {
				t.Errorf("node %d step %d: sd %v, want %v", i, k, d.SD[k], want)
			}
			if math.Abs(got[i].Mean[k]-means.At(k, i)) > 1e-12*math.Abs(means.At(k, i)) {
				t.Errorf("node %d step %d: mean %v, want %v", i, k, got[i].Mean[k], means.At(k, i))
			}
		}
	}
}

// Sample paths taken as given (IndependentPaths): each path is reconciled
// with the same map as the means (Panagiotelis et al. 2023), so every
// reconciled path is coherent and equals Reconcile applied to that path.
func TestForecastsSamplePaths(t *testing.T) {
	h := testHierarchy(t, 2, 3)
	n := h.Len()
	rng := rand.New(rand.NewPCG(35, 36))
	const steps, npaths = 3, 50
	base := coherentData(h, steps, 4, rng)
	resid := randomResiduals(h, 30, rng)
	fcs := make([]almanac.Forecast, n)
	for i := range fcs {
		paths := make([][]float64, npaths)
		for p := range paths {
			paths[p] = make([]float64, steps)
			for k := range paths[p] {
				paths[p][k] = base.At(k, i) + float64(1+h.Level(i))*rng.NormFloat64()
			}
		}
		f, err := almanac.NewForecast(start, calendar.Monthly, mat.Col(nil, i, base), &almanac.Sample{Paths: paths})
		if err != nil {
			t.Fatal(err)
		}
		fcs[i] = f
	}
	for _, tt := range []struct {
		name string
		spec reconcile.Spec
	}{
		{"MinT shrink", reconcile.Spec{Residuals: resid, Draw: reconcile.IndependentPaths}},
		{"top-down forecast proportions", reconcile.Spec{Method: reconcile.MethodTopDown, Draw: reconcile.IndependentPaths}},
		{"WLS structural non-negative", reconcile.Spec{Method: reconcile.MethodWLSStructural, NonNegative: true, Draw: reconcile.IndependentPaths}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			got, err := reconcile.Forecasts(h, fcs, tt.spec, 80)
			if err != nil {
				t.Fatal(err)
			}
			for p := 0; p < npaths; p++ {
				path := mat.NewDense(steps, n, nil)
				rec := mat.NewDense(steps, n, nil)
				for i := 0; i < n; i++ {
					path.SetCol(i, fcs[i].SamplePaths()[p])
					rec.SetCol(i, got[i].SamplePaths()[p])
				}
				if d := maxIncoherence(h, rec); d > 1e-9 {
					t.Fatalf("path %d incoherent (%.3g)", p, d)
				}
				if tt.spec.Method == reconcile.MethodTopDown {
					continue // the split of a path uses the means' proportions
				}
				want, err := reconcile.Reconcile(h, path, tt.spec)
				if err != nil {
					t.Fatal(err)
				}
				if !mat.EqualApprox(rec, want, 1e-9) {
					t.Fatalf("path %d differs from reconciling it alone", p)
				}
			}
			lo, hi, err := got[0].Bounds(80)
			if err != nil {
				t.Fatal(err)
			}
			for k := range lo {
				if !(lo[k] <= hi[k]) {
					t.Errorf("step %d: bounds %v > %v", k, lo[k], hi[k])
				}
			}
		})
	}
}

func TestForecastsErrors(t *testing.T) {
	h := testHierarchy(t, 2)
	rng := rand.New(rand.NewPCG(37, 38))
	base := coherentData(h, 2, 1, rng)
	normals := normalForecasts(t, base, func(int, int) float64 { return 1 })
	pointOnly := make([]almanac.Forecast, len(normals))
	for i, f := range normals {
		pointOnly[i] = almanac.Forecast{Start: f.Start, Freq: f.Freq, Mean: f.Mean}
	}
	shifted := append([]almanac.Forecast(nil), normals...)
	shifted[1].Start = start.AddDate(0, 1, 0)
	quarterly := append([]almanac.Forecast(nil), normals...)
	quarterly[2].Freq = calendar.Quarterly
	typedNil := append([]almanac.Forecast(nil), normals...)
	typedNil[0].Dist = (*almanac.Normal)(nil)
	short := append([]almanac.Forecast(nil), normals...)
	short[1].Mean = short[1].Mean[:1]
	tests := []struct {
		name   string
		fcs    []almanac.Forecast
		spec   reconcile.Spec
		levels []float64
		want   []error
	}{
		{"wrong count", normals[:2], reconcile.Spec{}, nil, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"levels without distributions", pointOnly, reconcile.Spec{}, []float64{80}, []error{almanac.ErrNoDistribution}},
		{"bad level", normals, reconcile.Spec{}, []float64{0}, []error{almanac.ErrLevel}},
		{"different start", shifted, reconcile.Spec{}, nil, []error{almanac.ErrInvalid}},
		{"different frequency", quarterly, reconcile.Spec{}, nil, []error{almanac.ErrFrequency}},
		{"different horizon", short, reconcile.Spec{}, nil, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"empty forecasts", []almanac.Forecast{{}, {}, {}, {}}, reconcile.Spec{}, nil, []error{almanac.ErrHorizon}},
		{"typed nil distribution", typedNil, reconcile.Spec{}, []float64{80}, []error{almanac.ErrNoDistribution}},
		{"non-negative Gaussian", normals, reconcile.Spec{NonNegative: true}, []float64{80}, []error{almanac.ErrInvalid}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			_, err := reconcile.Forecasts(h, tt.fcs, tt.spec, tt.levels...)
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range tt.want {
				if !errors.Is(err, w) {
					t.Errorf("error %q does not wrap %v", err, w)
				}
			}
		})
	}
	// Point forecasts alone reconcile fine without levels.
	got, err := reconcile.Forecasts(h, pointOnly, reconcile.Spec{Method: reconcile.MethodOLS})
	if err != nil {
		t.Fatal(err)
	}
	if got[0].Dist != nil {
		t.Error("distribution made up for point forecasts")
	}
}
