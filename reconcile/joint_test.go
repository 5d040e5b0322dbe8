package reconcile_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// correlatedWalks simulates a hierarchy total → r0 (s0, s1), r1 (s0)
// whose three bottom series are random walks with Gaussian innovations of
// covariance sigma, and returns one series per node (aggregates are the
// sums) and the structure.
func correlatedWalks(t *testing.T, sigma *mat.SymDense, T int, seed uint64) (*reconcile.Hierarchy, []almanac.Series) {
	t.Helper()
	h := testHierarchy(t, 2, 1) // total, r0, r1, r0-s0, r0-s1, r1-s0
	var chol mat.Cholesky
	if !chol.Factorize(sigma) {
		t.Fatal("sigma not positive definite")
	}
	var l mat.TriDense
	chol.LTo(&l)
	rng := rand.New(rand.NewPCG(seed, 1))
	m := h.NumBottom()
	bottom := make([][]float64, m)
	level := []float64{500, 400, 300}
	u := make([]float64, m)
	for tt := 0; tt < T; tt++ {
		for j := range u {
			u[j] = rng.NormFloat64()
		}
		for j := 0; j < m; j++ {
			var e float64
			for k := 0; k <= j; k++ {
				e += l.At(j, k) * u[k]
			}
			level[j] += e
			bottom[j] = append(bottom[j], level[j])
		}
	}
	st := time.Date(2020, time.January, 1, 0, 0, 0, 0, time.UTC)
	series := make([]almanac.Series, h.Len())
	for i, name := range h.Names() {
		vals := make([]float64, T)
		for _, j := range h.Bottoms(i) {
			for tt, v := range bottom[j] {
				vals[tt] += v
			}
		}
		series[i] = almanac.Series{Key: name, Start: st, Freq: calendar.Daily, Values: vals}
	}
	return h, series
}

func fitAll(t testing.TB, m almanac.Model, series []almanac.Series) []almanac.Fitted {
	t.Helper()
	results, err := almanac.BatchFit(context.Background(), m, series, almanac.BatchOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	fits := make([]almanac.Fitted, len(results))
	for i, r := range results {
		if r.Err != nil {
			t.Fatal(r.Err)
		}
		fits[i] = r.Fitted
	}
	return fits
}

// pathVariance returns the sample variance over the paths of step k
// (k < h) or, for k = h, of the sum over all h steps.
func pathVariance(paths [][]float64, k int) float64 {
	xs := make([]float64, len(paths))
	for p, path := range paths {
		if k < len(path) {
			xs[p] = path[k]
			continue
		}
		for _, v := range path {
			xs[p] += v
		}
	}
	var mean float64
	for _, x := range xs {
		mean += x
	}
	mean /= float64(len(xs))
	var ss float64
	for _, x := range xs {
		ss += (x - mean) * (x - mean)
	}
	return ss / float64(len(xs)-1)
}

// The joint paths carry the correlation between series, so the total's
// variance matches the one of the simulation; independent draws visibly
// understate it (issue 10; Panagiotelis, Gamakumara, Athanasopoulos &
// Hyndman 2023).
//
// Three bottom random walks with innovation covariance Σ (standard
// deviations 2, 3, 1.5; correlations 0.7, 0.5, 0.6), 1500 observations,
// naive base models. For random walks the k-step forecast error of a
// series is the sum of k innovations (common practice), so the total's
// error has variance k·1'Σ1 = 32.05 k, and the sum of its errors over h
// steps has variance 1'Σ1 · h(h+1)(2h+1)/6. With independent draws the
// total would have k·trace(Σ) = 15.25 k: under half.
//
// Tolerance: four standard errors of a variance estimate, from the
// 2000 paths (relative √(2/1999)) and from the 1500 innovations the
// covariance is learnt from (relative √(2/1500)), combined: 19%.
func TestJointPathsTotalVariance(t *testing.T) {
	sd := []float64{2, 3, 1.5}
	corr := [][]float64{{1, 0.7, 0.5}, {0.7, 1, 0.6}, {0.5, 0.6, 1}}
	sigma := mat.NewSymDense(3, nil)
	var ones float64 // 1'Σ1
	var trace float64
	for i := 0; i < 3; i++ {
		for j := i; j < 3; j++ {
			sigma.SetSym(i, j, corr[i][j]*sd[i]*sd[j])
		}
		trace += sd[i] * sd[i]
	}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			ones += sigma.At(i, j)
		}
	}
	const T, hz, np = 1500, 12, 2000
	h, series := correlatedWalks(t, sigma, T, 91)
	fits := fitAll(t, almanac.Naive{}, series)
	tol := 4 * math.Sqrt(2.0/(np-1)+2.0/T)
	sumFactor := float64(hz*(hz+1)*(2*hz+1)) / 6
	for _, tt := range []struct {
		name string
		spec reconcile.Spec
	}{
		{"bottom-up, joint bootstrap", reconcile.Spec{Method: reconcile.MethodBottomUp}},
		{"bottom-up, joint Gaussian", reconcile.Spec{Method: reconcile.MethodBottomUp, Draw: reconcile.JointGaussian}},
		{"MinT shrink, joint bootstrap", reconcile.Spec{}},
		{"WLS variance, joint Gaussian", reconcile.Spec{Method: reconcile.MethodWLSVariance, Draw: reconcile.JointGaussian}},
		{"WLS structural, joint bootstrap, non-negative", reconcile.Spec{Method: reconcile.MethodWLSStructural, NonNegative: true}},
	} {
		t.Run(tt.name, func(t *testing.T) {
			spec := tt.spec
			spec.Paths, spec.Seed = np, 7
			rec, err := reconcile.FromFits(context.Background(), h, fits, hz, spec, 80)
			if err != nil {
				t.Fatal(err)
			}
			total := rec[0].SamplePaths()
			for _, k := range []int{0, 5, hz - 1} {
				want := float64(k+1) * ones
				if got := pathVariance(total, k); math.Abs(got/want-1) > tol {
					t.Errorf("step %d: total variance %.2f, want %.2f (±%.0f%%)", k+1, got, want, 100*tol)
				}
			}
			want := sumFactor * ones
			got := pathVariance(total, hz)
			if math.Abs(got/want-1) > tol {
				t.Errorf("sum over %d steps: total variance %.1f, want %.1f (±%.0f%%)", hz, got, want, 100*tol)
			}
			t.Logf("total's variance / the simulation's: step 1 %.3f, step %d %.3f, sum over the horizon %.3f",
				pathVariance(total, 0)/ones, hz, pathVariance(total, hz-1)/(hz*ones), got/want)
			// Each shop keeps its own spread.
			for j := 0; j < 3; j++ {
				want := float64(hz) * sd[j] * sd[j]
				if got := pathVariance(rec[3+j].SamplePaths(), hz-1); math.Abs(got/want-1) > tol {
					t.Errorf("shop %d at step %d: variance %.2f, want %.2f", j, hz, got, want)
				}
			}
			// Every reconciled path is coherent.
			for p := 0; p < np; p += 97 {
				path := mat.NewDense(hz, h.Len(), nil)
				for i := range rec {
					path.SetCol(i, rec[i].SamplePaths()[p])
				}
				if d := maxIncoherence(h, path); d > 1e-9 {
					t.Fatalf("path %d incoherent (%.3g)", p, d)
				}
			}
		})
	}
	// Independent draws understate the total's spread: their variance is
	// about trace(Σ)/1'Σ1 = 0.48 of the truth, outside the joint draws'
	// tolerance.
	rec, err := reconcile.FromFits(context.Background(), h, fits, hz, reconcile.Spec{Method: reconcile.MethodBottomUp, Draw: reconcile.IndependentPaths, Paths: np, Seed: 7}, 80)
	if err != nil {
		t.Fatal(err)
	}
	got := pathVariance(rec[0].SamplePaths(), hz-1)
	want := float64(hz) * ones
	if got > (1-tol)*want {
		t.Errorf("independent draws: total variance %.1f, want well below %.1f", got, want)
	}
	if math.Abs(got/(float64(hz)*trace)-1) > tol {
		t.Errorf("independent draws: total variance %.1f, want about %.1f (sum of the shops' variances)", got, float64(hz)*trace)
	}
	t.Logf("total's variance at step %d: truth %.1f, independent draws %.1f", hz, want, got)
}

// Forecasts makes joint paths from base forecasts carrying sample paths,
// as many as Spec.Paths asks (default: the most any node carries), and
// the bootstrap's innovations repeat the residuals' time points jointly.
func TestForecastsJointFromSamples(t *testing.T) {
	sigma := mat.NewSymDense(3, []float64{4, 4.2, 1.5, 4.2, 9, 2.7, 1.5, 2.7, 2.25})
	h, series := correlatedWalks(t, sigma, 200, 93)
	fits := fitAll(t, almanac.Naive{}, series)
	resid, err := reconcile.ResidualMatrix(h, fits)
	if err != nil {
		t.Fatal(err)
	}
	fcs := make([]almanac.Forecast, h.Len())
	for i, f := range fits {
		point, err := f.Forecast(3)
		if err != nil {
			t.Fatal(err)
		}
		paths, err := f.(almanac.Simulator).Simulate(3, 50+10*i, rand.NewPCG(uint64(i), 1))
		if err != nil {
			t.Fatal(err)
		}
		fcs[i], err = almanac.NewForecast(point.Start, point.Freq, point.Mean, &almanac.Sample{Paths: paths})
		if err != nil {
			t.Fatal(err)
		}
	}
	for _, tt := range []struct {
		paths, want int
	}{{0, 100}, {37, 37}} {
		rec, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: resid, Paths: tt.paths}, 90)
		if err != nil {
			t.Fatal(err)
		}
		for i := range rec {
			if got := len(rec[i].SamplePaths()); got != tt.want {
				t.Errorf("Paths %d: node %d has %d paths, want %d", tt.paths, i, got, tt.want)
			}
		}
	}
	// Different path counts cannot be taken as given.
	if _, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: resid, Draw: reconcile.IndependentPaths}, 90); !errors.Is(err, reconcile.ErrDimension) {
		t.Errorf("independent paths of different counts: error %v, want ErrDimension", err)
	}
}

// Determinism: the same seed gives bit-identical forecasts, also when run
// from several goroutines at once; another seed gives other paths.
func TestJointPathsDeterminism(t *testing.T) {
	sigma := mat.NewSymDense(3, []float64{4, 4.2, 1.5, 4.2, 9, 2.7, 1.5, 2.7, 2.25})
	h, series := correlatedWalks(t, sigma, 120, 95)
	fits := fitAll(t, almanac.Naive{}, series)
	for _, draw := range []reconcile.Draw{reconcile.JointBootstrap, reconcile.JointGaussian, reconcile.IndependentPaths} {
		t.Run(draw.String(), func(t *testing.T) {
			spec := reconcile.Spec{Draw: draw, Paths: 200, Seed: 11}
			want, err := reconcile.FromFits(context.Background(), h, fits, 6, spec, 80)
			if err != nil {
				t.Fatal(err)
			}
			var wg sync.WaitGroup
			got := make([][]almanac.Forecast, 4)
			errs := make([]error, 4)
			for k := range got {
				wg.Go(func() { got[k], errs[k] = reconcile.FromFits(context.Background(), h, fits, 6, spec, 80) })
			}
			wg.Wait()
			for k := range got {
				if errs[k] != nil {
					t.Fatal(errs[k])
				}
				if !sameForecasts(got[k], want) {
					t.Fatalf("goroutine %d: forecasts differ", k)
				}
			}
			spec.Seed = 12
			other, err := reconcile.FromFits(context.Background(), h, fits, 6, spec, 80)
			if err != nil {
				t.Fatal(err)
			}
			if sameForecasts(other, want) {
				t.Error("another seed gave the same paths")
			}
		})
	}
}

func sameForecasts(a, b []almanac.Forecast) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		pa, pb := a[i].SamplePaths(), b[i].SamplePaths()
		if len(pa) != len(pb) {
			return false
		}
		for k := range pa {
			for s := range pa[k] {
				if math.Float64bits(pa[k][s]) != math.Float64bits(pb[k][s]) {
					return false
				}
			}
		}
	}
	return true
}

// pointOnly is a fitted model that can give point forecasts only.
type pointOnly struct{ almanac.Fitted }

func (p pointOnly) Forecast(h int, levels ...float64) (almanac.Forecast, error) {
	f, err := p.Fitted.Forecast(h)
	if err != nil {
		return f, err
	}
	return almanac.Forecast{Start: f.Start, Freq: f.Freq, Mean: f.Mean}, nil
}

// residualsOf overrides a fitted model's residuals (the model still
// simulates).
type residualsOf struct {
	almanac.Fitted
	r []float64
}

func (f residualsOf) Residuals() []float64 { return f.r }

func (f residualsOf) Simulate(h, n int, src rand.Source) ([][]float64, error) {
	return f.Fitted.(almanac.Simulator).Simulate(h, n, src)
}

func TestFromFitsErrors(t *testing.T) {
	sigma := mat.NewSymDense(3, []float64{4, 4.2, 1.5, 4.2, 9, 2.7, 1.5, 2.7, 2.25})
	h, series := correlatedWalks(t, sigma, 40, 97)
	fits := fitAll(t, almanac.Naive{}, series)
	with := func(i int, f almanac.Fitted) []almanac.Fitted {
		out := append([]almanac.Fitted(nil), fits...)
		out[i] = f
		return out
	}
	short := series[4]
	short.Values = short.Values[:30]
	shortFit := fitAll(t, almanac.Naive{}, []almanac.Series{short})[0]
	nan := make([]float64, 40)
	for i := range nan {
		nan[i] = math.NaN()
	}
	// Residuals missing at all but 8 time points: too few in common.
	sparse := make([]float64, 40)
	for i := range sparse {
		sparse[i] = math.NaN()
		if i%5 == 0 {
			sparse[i] = float64(i%3) - 1
		}
	}
	constant := make([]float64, 40) // a node whose residuals are all zero
	cancelled, cancel := context.WithCancel(context.Background())
	cancel()
	ctx := context.Background()
	tests := []struct {
		name   string
		ctx    context.Context
		fits   []almanac.Fitted
		h      int
		spec   reconcile.Spec
		levels []float64
		want   []error
	}{
		{"too few fits", ctx, fits[:5], 4, reconcile.Spec{}, nil, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"nil fit", ctx, with(2, nil), 4, reconcile.Spec{}, nil, []error{almanac.ErrInvalid}},
		{"residual series of different lengths", ctx, with(4, shortFit), 4, reconcile.Spec{}, nil, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"no residuals", ctx, with(0, residualsOf{fits[0], nil}), 4, reconcile.Spec{}, nil, []error{almanac.ErrEmpty}},
		{"no residuals for one node", ctx, with(1, residualsOf{fits[1], nil}), 4, reconcile.Spec{}, nil, []error{reconcile.ErrDimension, almanac.ErrLength}},
		{"residuals all missing", ctx, with(1, residualsOf{fits[1], nan}), 4, reconcile.Spec{}, nil, []error{almanac.ErrAllMissing}},
		{"too few common time points", ctx, with(3, residualsOf{fits[3], sparse}), 4, reconcile.Spec{Method: reconcile.MethodBottomUp}, nil, []error{almanac.ErrTooShort}},
		{"residuals that do not vary, Gaussian draws", ctx, with(3, residualsOf{fits[3], constant}), 4, reconcile.Spec{Method: reconcile.MethodOLS, Draw: reconcile.JointGaussian}, nil, []error{reconcile.ErrSingular}},
		{"model without paths", ctx, with(5, pointOnly{fits[5]}), 4, reconcile.Spec{}, nil, []error{almanac.ErrNoDistribution}},
		{"bad horizon", ctx, fits, 0, reconcile.Spec{}, nil, []error{almanac.ErrHorizon}},
		{"bad level", ctx, fits, 4, reconcile.Spec{}, []float64{100}, []error{almanac.ErrLevel}},
		{"negative path count", ctx, fits, 4, reconcile.Spec{Paths: -1}, nil, []error{almanac.ErrInvalid}},
		{"unknown draw", ctx, fits, 4, reconcile.Spec{Draw: reconcile.Draw(9)}, nil, []error{almanac.ErrInvalid}},
		{"cancelled", cancelled, fits, 4, reconcile.Spec{}, nil, []error{context.Canceled}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got, err := reconcile.FromFits(tt.ctx, h, tt.fits, tt.h, tt.spec, tt.levels...)
			if err == nil {
				t.Fatalf("no error; %d forecasts", len(got))
			}
			for _, w := range tt.want {
				if !errors.Is(err, w) {
					t.Errorf("error %q does not wrap %v", err, w)
				}
			}
		})
	}
	t.Run("residuals that do not vary, bootstrap", func(t *testing.T) {
		// The node is drawn independently of the others and keeps the
		// spread of its own paths.
		rec, err := reconcile.FromFits(ctx, h, with(3, residualsOf{fits[3], constant}), 4, reconcile.Spec{Method: reconcile.MethodOLS, Paths: 2000}, 80)
		if err != nil {
			t.Fatal(err)
		}
		lo, hi, err := rec[3].Bounds(80)
		if err != nil {
			t.Fatal(err)
		}
		if !(hi[3] > lo[3]) {
			t.Errorf("band [%v, %v] without spread", lo[3], hi[3])
		}
	})
	t.Run("bottom-up with independent paths needs no residuals", func(t *testing.T) {
		if _, err := reconcile.FromFits(ctx, h, with(3, residualsOf{fits[3], sparse}), 4, reconcile.Spec{Method: reconcile.MethodBottomUp, Draw: reconcile.IndependentPaths}, 80); err != nil {
			t.Error(err)
		}
	})
}

func TestFromBatch(t *testing.T) {
	sigma := mat.NewSymDense(3, []float64{4, 4.2, 1.5, 4.2, 9, 2.7, 1.5, 2.7, 2.25})
	h, series := correlatedWalks(t, sigma, 60, 99)
	results, err := almanac.BatchFit(context.Background(), almanac.Naive{}, series, almanac.BatchOptions{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	fits := make([]almanac.Fitted, len(results))
	for i, r := range results {
		fits[i] = r.Fitted
	}
	spec := reconcile.Spec{Paths: 100, Seed: 3}
	want, err := reconcile.FromFits(context.Background(), h, fits, 5, spec, 80)
	if err != nil {
		t.Fatal(err)
	}
	got, err := reconcile.FromBatch(context.Background(), h, results, 5, spec, 80)
	if err != nil {
		t.Fatal(err)
	}
	if !sameForecasts(got, want) {
		t.Error("FromBatch differs from FromFits on the same fits")
	}
	failed := append([]almanac.BatchResult(nil), results...)
	cause := fmt.Errorf("optimiser gave up: %w", almanac.ErrNotFitted)
	failed[4] = almanac.BatchResult{Key: failed[4].Key, Err: cause}
	_, err = reconcile.FromBatch(context.Background(), h, failed, 5, spec)
	if !errors.Is(err, almanac.ErrNotFitted) || !errors.Is(err, cause) {
		t.Errorf("failed result: error %v, want one wrapping ErrNotFitted and the cause", err)
	}
	failed[4] = almanac.BatchResult{Key: failed[4].Key}
	if _, err = reconcile.FromBatch(context.Background(), h, failed, 5, spec); !errors.Is(err, almanac.ErrNotFitted) {
		t.Errorf("result without a fit: error %v, want ErrNotFitted", err)
	}
	if _, err = reconcile.FromBatch(context.Background(), h, results[1:], 5, spec); !errors.Is(err, reconcile.ErrDimension) {
		t.Errorf("too few results: error %v, want ErrDimension", err)
	}
}

// Distributions without residuals: joint draws need them (a clear error),
// IndependentPaths does not.
func TestForecastsNeedResidualsForJoint(t *testing.T) {
	h := testHierarchy(t, 2)
	rng := rand.New(rand.NewPCG(101, 102))
	base := coherentData(h, 2, 1, rng)
	normals := normalForecasts(t, base, func(int, int) float64 { return 1 })
	samples := make([]almanac.Forecast, len(normals))
	for i, f := range normals {
		paths := make([][]float64, 20)
		for p := range paths {
			paths[p] = []float64{f.Mean[0] + rng.NormFloat64(), f.Mean[1] + rng.NormFloat64()}
		}
		samples[i] = almanac.Forecast{Start: f.Start, Freq: f.Freq, Mean: f.Mean, Dist: &almanac.Sample{Paths: paths}}
	}
	for name, fcs := range map[string][]almanac.Forecast{"Gaussian": normals, "sample paths": samples} {
		t.Run(name, func(t *testing.T) {
			for _, draw := range []reconcile.Draw{reconcile.DrawAuto, reconcile.JointBootstrap, reconcile.JointGaussian} {
				if _, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Method: reconcile.MethodOLS, Draw: draw}, 80); !errors.Is(err, almanac.ErrEmpty) {
					t.Errorf("%v without residuals: error %v, want ErrEmpty", draw, err)
				}
			}
			if _, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Method: reconcile.MethodOLS, Draw: reconcile.IndependentPaths}, 80); err != nil {
				t.Errorf("independent: %v", err)
			}
		})
	}
}
