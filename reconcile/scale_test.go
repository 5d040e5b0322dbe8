package reconcile_test

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// Regression (issue 11, item 3): base forecasts near 1e308 gave +Inf
// aggregates with a nil error. A total that is itself beyond the float64
// range must be an error wrapping almanac.ErrNonFinite; a representable
// answer must come out although the intermediate sums are not
// representable.
func TestHugeBaseForecasts(t *testing.T) {
	h := testHierarchy(t, 3, 3) // total, r0, r1, 3 + 3 shops
	// Coherent values whose total is 1.5e308: every method keeps coherent
	// forecasts unchanged (projection property), so the answer is known.
	b := []float64{3e307, 2e307, 2.5e307, 2.5e307, 3e307, 2e307}
	coherent := mat.NewDense(1, 9, nil)
	var bottoms mat.Dense
	bottoms.Mul(h.Summing(), mat.NewVecDense(6, b))
	coherent.SetRow(0, bottoms.RawMatrix().Data)
	// Inconsistent base forecasts near the limit: whether the reconciled
	// total is representable depends on the method; the answer is known
	// from the same reconciliation of the base divided by 2^20 (exact).
	tooBig := mat.NewDense(1, 9, []float64{1.7e308, 1.1e308, 1.1e308, 9e307, 9e307, 9e307, 9e307, 9e307, 9e307})
	var small mat.Dense
	small.Scale(math.Ldexp(1, -20), tooBig)
	resid := randomResiduals(h, 30, rand.New(rand.NewPCG(81, 82)))
	for _, tt := range allSpecs(resid, nil) {
		if tt.spec.Disaggregation == reconcile.AverageHistoricalProportions || tt.spec.Disaggregation == reconcile.ProportionsOfHistoricalAverages {
			continue // no history at this scale; covered by TestExtremeScales
		}
		t.Run(tt.name, func(t *testing.T) {
			got, err := reconcile.Reconcile(h, coherent, tt.spec)
			if err != nil {
				t.Fatalf("representable answer: %v", err)
			}
			for i := 0; i < 9; i++ {
				if g, w := got.At(0, i), coherent.At(0, i); math.Abs(g-w) > 1e-12*math.Abs(w) {
					t.Errorf("node %s: %v, want %v", h.Names()[i], g, w)
				}
			}
			want, err := reconcile.Reconcile(h, &small, tt.spec)
			if err != nil {
				t.Fatal(err)
			}
			representable := true
			for _, v := range want.RawMatrix().Data {
				representable = representable && !math.IsInf(math.Ldexp(v, 20), 0)
			}
			got, err = reconcile.Reconcile(h, tooBig, tt.spec)
			switch {
			case representable && err != nil:
				t.Errorf("representable answer: %v", err)
			case representable:
				for i, v := range got.RawMatrix().Data {
					if w := math.Ldexp(want.RawMatrix().Data[i], 20); v != w {
						t.Errorf("node %s: %v, want %v", h.Names()[i], v, w)
					}
				}
			case !errors.Is(err, almanac.ErrNonFinite):
				t.Errorf("answer beyond the float64 range: error %v, want ErrNonFinite", err)
			}
			if tt.spec.Method == reconcile.MethodBottomUp && representable {
				t.Error("the bottom-up total 5.4e308 came out representable")
			}
		})
	}
}

// Property at extreme scales, over every method (DESIGN.md "Numbers":
// scale invariance): reconciling c·ŷ with residuals c·E and history c·Y
// gives c times the result at c = 1, for c from 1e-300 to the largest
// factor whose answer is representable; one step beyond, the answer is
// not representable and the error wraps almanac.ErrNonFinite. The
// residuals' scale alone never matters (W enters only up to a factor).
func TestExtremeScales(t *testing.T) {
	rng := rand.New(rand.NewPCG(83, 84))
	h := testHierarchy(t, 3, 4, 2)
	resid := randomResiduals(h, 30, rng)
	hist := coherentData(h, 30, 0, rng)
	base := coherentData(h, 4, 8, rng)
	scaled := func(c float64, m *mat.Dense) *mat.Dense {
		var out mat.Dense
		out.Scale(c, m)
		return &out
	}
	for _, tt := range allSpecs(resid, hist) {
		want, err := reconcile.Reconcile(h, base, tt.spec)
		if err != nil {
			t.Fatal(err)
		}
		maxAbs := 0.0
		for _, v := range want.RawMatrix().Data {
			maxAbs = math.Max(maxAbs, math.Abs(v))
		}
		// The largest c for which the inputs and the answer are
		// representable.
		inMax := maxAbs
		for _, m := range []*mat.Dense{base, hist} {
			for _, v := range m.RawMatrix().Data {
				inMax = math.Max(inMax, math.Abs(v))
			}
		}
		fits := 0.999 * (math.MaxFloat64 / inMax)
		for _, c := range []float64{1e-300, 1e-150, 1e150, 1e300, fits} {
			t.Run(fmt.Sprintf("%s/c=%.3g", tt.name, c), func(t *testing.T) {
				spec := tt.spec
				if spec.Residuals != nil {
					spec.Residuals = scaled(c, resid)
				}
				if spec.History != nil {
					spec.History = scaled(c, hist)
				}
				got, err := reconcile.Reconcile(h, scaled(c, base), spec)
				if err != nil {
					t.Fatal(err)
				}
				r, k := got.Dims()
				for i := 0; i < r; i++ {
					for j := 0; j < k; j++ {
						w := c * want.At(i, j)
						if d := math.Abs(got.At(i, j) - w); d > 1e-12*c*maxAbs {
							t.Fatalf("[%d,%d] = %v, want %v", i, j, got.At(i, j), w)
						}
					}
				}
			})
		}
		if tt.spec.Method == reconcile.MethodTopDown || tt.spec.Method == reconcile.MethodMiddleOut {
			continue // the largest value is a base forecast kept as given
		}
		t.Run(tt.name+"/beyond", func(t *testing.T) {
			c := 1.01 * (math.MaxFloat64 / maxAbs)
			spec := tt.spec
			if spec.Residuals != nil {
				spec.Residuals = scaled(c, resid)
			}
			if spec.History != nil {
				spec.History = scaled(c, hist)
			}
			_, err := reconcile.Reconcile(h, scaled(c, base), spec)
			if !errors.Is(err, almanac.ErrNonFinite) {
				t.Errorf("answer beyond the float64 range: error %v, want ErrNonFinite", err)
			}
		})
		if tt.spec.Residuals != nil {
			t.Run(tt.name+"/residuals only", func(t *testing.T) {
				for _, c := range []float64{1e-300, 1e300} {
					spec := tt.spec
					spec.Residuals = scaled(c, resid)
					got, err := reconcile.Reconcile(h, base, spec)
					if err != nil {
						t.Fatal(err)
					}
					if !mat.EqualApprox(got, want, 1e-12*maxAbs) {
						t.Errorf("c = %g: residuals' unit changed the result", c)
					}
				}
			})
		}
	}
}

// Powers of two are exact: reconciling 2^k·ŷ gives bit for bit 2^k times
// the result, up to the float64 limit (scale.go).
func TestPowerOfTwoScalesExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(85, 86))
	h := testHierarchy(t, 2, 3)
	resid := randomResiduals(h, 30, rng)
	base := coherentData(h, 3, 5, rng)
	spec := reconcile.Spec{Residuals: resid}
	want, err := reconcile.Reconcile(h, base, spec)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []int{-900, -40, 40, 1000} {
		var b, e mat.Dense
		b.Scale(math.Ldexp(1, k), base)
		e.Scale(math.Ldexp(1, k), resid)
		got, err := reconcile.Reconcile(h, &b, reconcile.Spec{Residuals: &e})
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range got.RawMatrix().Data {
			if w := math.Ldexp(want.RawMatrix().Data[i], k); v != w {
				t.Fatalf("k = %d: %v, want %v exactly", k, v, w)
			}
		}
	}
}

// Distributions near the limit: Gaussian and sample-path forecasts give
// finite bands or an error wrapping almanac.ErrNonFinite, never ±Inf or
// NaN with a nil error. Covariances follow the same rule.
func TestExtremeDistributions(t *testing.T) {
	rng := rand.New(rand.NewPCG(87, 88))
	h := testHierarchy(t, 2, 2)
	n := h.Len()
	resid := randomResiduals(h, 40, rng)
	base := coherentData(h, 2, 3, rng)
	for _, c := range []float64{1e-300, 1e300, 5e305} {
		t.Run(fmt.Sprintf("Gaussian c=%g", c), func(t *testing.T) {
			var b, e mat.Dense
			b.Scale(c, base)
			e.Scale(c, resid)
			fcs := normalForecasts(t, &b, func(i, k int) float64 { return c * float64(1+i) })
			got, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: &e}, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			one := normalForecasts(t, base, func(i, k int) float64 { return float64(1 + i) })
			ref, err := reconcile.Forecasts(h, one, reconcile.Spec{Residuals: resid}, 80, 95)
			if err != nil {
				t.Fatal(err)
			}
			for i := range got {
				for k := range got[i].Mean {
					w := c * ref[i].Intervals[1].Upper[k]
					if g := got[i].Intervals[1].Upper[k]; math.Abs(g-w) > 1e-12*math.Abs(w) {
						t.Errorf("node %d step %d: upper %v, want %v", i, k, g, w)
					}
				}
			}
		})
	}
	t.Run("Gaussian band beyond the range", func(t *testing.T) {
		fcs := normalForecasts(t, mat.NewDense(1, n, []float64{1.6e308, 8e307, 8e307, 4e307, 4e307, 4e307, 4e307}), func(i, k int) float64 { return 3e307 })
		_, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Residuals: resid}, 95)
		if !errors.Is(err, almanac.ErrNonFinite) {
			t.Errorf("error %v, want ErrNonFinite", err)
		}
	})
	t.Run("sample paths near the limit", func(t *testing.T) {
		fcs := make([]almanac.Forecast, n)
		for i := range fcs {
			mean := []float64{base.At(0, i) * 1e305}
			paths := make([][]float64, 30)
			for p := range paths {
				paths[p] = []float64{mean[0] * (1 + 0.1*rng.NormFloat64())}
			}
			f, err := almanac.NewForecast(start, calendar.Monthly, mean, &almanac.Sample{Paths: paths})
			if err != nil {
				t.Fatal(err)
			}
			fcs[i] = f
		}
		got, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Method: reconcile.MethodOLS, Draw: reconcile.IndependentPaths}, 80)
		if err != nil {
			t.Fatal(err)
		}
		for i := range got {
			if lo, hi := got[i].Intervals[0].Lower[0], got[i].Intervals[0].Upper[0]; math.IsInf(lo, 0) || math.IsInf(hi, 0) || !(lo <= hi) {
				t.Errorf("node %d: band [%v, %v]", i, lo, hi)
			}
		}
	})
	t.Run("covariance beyond the range", func(t *testing.T) {
		var e mat.Dense
		e.Scale(1e200, resid)
		if _, err := reconcile.EstimateCovariance(h, &e, reconcile.Shrinkage); !errors.Is(err, almanac.ErrNonFinite) {
			t.Errorf("EstimateCovariance: error %v, want ErrNonFinite", err)
		}
		// The reconciliation itself does not need W in the residuals' unit.
		if _, err := reconcile.Reconcile(h, base, reconcile.Spec{Residuals: &e}); err != nil {
			t.Errorf("Reconcile: %v", err)
		}
		// Bottom-up: the total's variance is the sum of the four shops'
		// variances, 4e308.
		g, err := reconcile.BottomMap(h, reconcile.Spec{Method: reconcile.MethodBottomUp})
		if err != nil {
			t.Fatal(err)
		}
		w := mat.NewSymDense(n, nil)
		for i := 0; i < n; i++ {
			w.SetSym(i, i, 1e308)
		}
		if _, err := reconcile.ReconciledCovariance(h, g, w); !errors.Is(err, almanac.ErrNonFinite) {
			t.Errorf("ReconciledCovariance: error %v, want ErrNonFinite", err)
		}
		w.ScaleSym(1e-16, w)
		v, err := reconcile.ReconciledCovariance(h, g, w)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; i < n; i++ {
			if x := v.At(i, i); math.IsInf(x, 0) || !(x > 0) {
				t.Errorf("variance of node %d: %v", i, x)
			}
		}
	})
}

// The joint draws at extreme scales: base paths, point forecasts and
// residuals multiplied by c give c times the reconciled paths (the draws
// are the same; only rounding differs).
func TestJointPathsExtremeScales(t *testing.T) {
	sigma := mat.NewSymDense(3, []float64{4, 4.2, 1.5, 4.2, 9, 2.7, 1.5, 2.7, 2.25})
	h, series := correlatedWalks(t, sigma, 80, 89)
	fits := fitAll(t, almanac.Naive{}, series)
	resid, err := reconcile.ResidualMatrix(h, fits)
	if err != nil {
		t.Fatal(err)
	}
	n := h.Len()
	unit := make([]almanac.Forecast, n)
	for i, f := range fits {
		point, err := f.Forecast(4)
		if err != nil {
			t.Fatal(err)
		}
		paths, err := f.(almanac.Simulator).Simulate(4, 300, rand.NewPCG(uint64(i), 5))
		if err != nil {
			t.Fatal(err)
		}
		unit[i] = almanac.Forecast{Start: point.Start, Freq: point.Freq, Mean: point.Mean, Dist: &almanac.Sample{Paths: paths}}
	}
	for _, draw := range []reconcile.Draw{reconcile.JointBootstrap, reconcile.JointGaussian} {
		want, err := reconcile.Forecasts(h, unit, reconcile.Spec{Residuals: resid, Draw: draw}, 80)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []float64{1e-300, 1e300} {
			t.Run(fmt.Sprintf("%v/c=%g", draw, c), func(t *testing.T) {
				scaled := make([]almanac.Forecast, n)
				for i, f := range unit {
					mean := make([]float64, len(f.Mean))
					for k, v := range f.Mean {
						mean[k] = c * v
					}
					var paths [][]float64
					for _, p := range f.SamplePaths() {
						q := make([]float64, len(p))
						for k, v := range p {
							q[k] = c * v
						}
						paths = append(paths, q)
					}
					scaled[i] = almanac.Forecast{Start: f.Start, Freq: f.Freq, Mean: mean, Dist: &almanac.Sample{Paths: paths}}
				}
				var r mat.Dense
				r.Scale(c, resid)
				got, err := reconcile.Forecasts(h, scaled, reconcile.Spec{Residuals: &r, Draw: draw}, 80)
				if err != nil {
					t.Fatal(err)
				}
				for i := range got {
					wp, gp := want[i].SamplePaths(), got[i].SamplePaths()
					for k := range wp {
						for s, w := range wp[k] {
							if d := math.Abs(gp[k][s] - c*w); d > 1e-9*c*math.Abs(w) {
								t.Fatalf("node %d path %d step %d: %v, want %v", i, k, s, gp[k][s], c*w)
							}
						}
					}
				}
			})
		}
	}
}
