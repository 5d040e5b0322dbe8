package arima

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestFusedUpdateBitIdentical: the one-pass update and prediction of the
// ARMA filter (updatePredictARMA) gives the same likelihood, bit for bit,
// as the update followed by predictARMA, at random parameter values, for
// dense and sparse (seasonal) AR and MA polynomials, with and without
// missing values. Both are our code: this checks the rewrite, not the
// likelihood (the reference test does that against R).
func TestFusedUpdateBitIdentical(t *testing.T) {
	base := logAirPassengers(t)
	gappy := base
	gappy.Values = append([]float64(nil), base.Values...)
	for _, i := range []int{5, 40, 41, 100, 143} {
		gappy.Values[i] = math.NaN()
	}
	src := rand.New(rand.NewPCG(1, 2))
	for _, tc := range []struct {
		name string
		spec Spec
	}{
		{"(0,1,1)(1,1,2)", Spec{Q: 1, D: 1, SP: 1, SD: 1, SQ: 2, Constant: ConstantNone}},
		{"(2,1,2)(1,1,1)", Spec{P: 2, Q: 2, D: 1, SP: 1, SD: 1, SQ: 1, Constant: ConstantNone}},
		{"airline", airline},
		{"(2,0,1)(1,0,0)", Spec{P: 2, Q: 1, SP: 1, Constant: ConstantNone}},
		{"(3,0,2)", Spec{P: 3, Q: 2, Constant: ConstantNone}},
		{"(1,0,3)(0,0,1) gaps", Spec{P: 1, Q: 3, SQ: 1, Constant: ConstantNone}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			y := base
			if tc.spec.D+tc.spec.SD == 0 && tc.name != "(3,0,2)" {
				y = gappy
			}
			f, x := mlObjectiveOf(t, tc.spec, y)
			defer func() { separateUpdate = false }()
			for range 50 {
				for i := range x {
					x[i] = src.NormFloat64()
				}
				separateUpdate = true
				a := f(x)
				separateUpdate = false
				b := f(x)
				if math.Float64bits(a) != math.Float64bits(b) {
					t.Fatalf("at %v: %v separately, %v fused", x, a, b)
				}
			}
		})
	}
}

// TestChandrasekhar: the Chandrasekhar recursions (filterChandrasekhar,
// used for likelihood evaluations of models without differencing and,
// under DiffusePrior, with it) give the likelihood sums of the
// covariance recursion to 1e-10 relative, at random parameter values,
// for dense and sparse (seasonal) AR and MA polynomials, near the
// non-invertible boundary and with a slowly converging gain. Both are
// our code: this checks the rewrite (the reference test checks the
// likelihood against R).
func TestChandrasekhar(t *testing.T) {
	y := logAirPassengers(t)
	src := rand.New(rand.NewPCG(3, 4))
	for _, tc := range []struct {
		name string
		spec Spec
		near bool // parameters pushed towards the boundary
	}{
		{"(2,0,1)(1,0,0)", Spec{P: 2, Q: 1, SP: 1, Constant: ConstantNone}, false},
		{"(3,0,2)", Spec{P: 3, Q: 2, Constant: ConstantNone}, false},
		{"(1,0,3)(0,0,1) near", Spec{P: 1, Q: 3, SQ: 1, Constant: ConstantNone}, true},
		{"airline diffuse", Spec{D: 1, Q: 1, SD: 1, SQ: 1, Prior: DiffusePrior}, false},
		{"airline diffuse near", Spec{D: 1, Q: 1, SD: 1, SQ: 1, Prior: DiffusePrior}, true},
		{"(2,1,2)(1,1,1) diffuse", Spec{P: 2, Q: 2, D: 1, SP: 1, SD: 1, SQ: 1, Prior: DiffusePrior}, false},
		{"(1,0,1)(2,1,0) diffuse", Spec{P: 1, Q: 1, SP: 2, SD: 1, Prior: DiffusePrior}, false},
		// Non-zero φ at lags 12 and 24 only (state 24): the steps that
		// skip the zero φ stretch by stretch (sparseMinRun), with a φ
		// inside the state and one in its last element.
		{"(0,0,1)(2,0,0) stretches", Spec{Q: 1, SP: 2, Constant: ConstantNone}, false},
		{"(0,0,1)(2,0,0) stretches near", Spec{Q: 1, SP: 2, Constant: ConstantNone}, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			f, x := mlObjectiveOf(t, tc.spec, y)
			defer func() { noChandrasekhar = false }()
			for range 50 {
				for i := range x {
					x[i] = src.NormFloat64()
					if tc.near {
						x[i] = 3 * math.Copysign(1, x[i])
					}
				}
				noChandrasekhar = true
				a := f(x)
				noChandrasekhar = false
				b := f(x)
				if !(math.Abs(a-b) <= 1e-10*math.Abs(a)) {
					t.Fatalf("at %v: %.15g by the covariance recursion, %.15g by Chandrasekhar's", x, a, b)
				}
			}
		})
	}
}

// TestSteadyState: switching to the fixed gain once the predicted
// covariance has converged (filter, steadyTol) leaves the likelihood
// sums, the residuals and the final filtered state of the covariance
// recursion unchanged to 1e-10 relative, on a long invented series with
// a daily cycle (period 24, 960 values) and on log air passengers, for
// models with and without differencing (finite prior, residuals wanted,
// so the covariance recursion runs).
func TestSteadyState(t *testing.T) {
	src := rand.New(rand.NewPCG(5, 6))
	long := make([]float64, 960)
	noise := 0.0
	for i := range long {
		noise = 0.6*noise + src.NormFloat64()
		long[i] = 50 + 10*math.Sin(2*math.Pi*float64(i%24)/24) + noise + 0.01*float64(i)
	}
	air := logAirPassengers(t).Values
	for _, tc := range []struct {
		name string
		y    []float64
		lay  *layout
		coef []float64
		// steady: the gain converges within the series (the seasonal MA
		// of the airline model converges too slowly for 144 values)
		steady bool
	}{
		{"(1,0,1)(0,1,1)_24", long, newLayout(1, 0, 1, 0, 1, 1, 24, false, false, nil), []float64{0.6, -0.2, -0.3}, true},
		{"(2,0,0)(1,0,0)_24", long, newLayout(2, 0, 0, 1, 0, 0, 24, false, false, nil), []float64{0.5, 0.1, 0.6}, true},
		{"airline", air, newLayout(0, 1, 1, 0, 1, 1, 12, false, false, nil), []float64{-0.4, -0.55}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pr := newProblem(tc.lay, tc.y, nil, nil, FinitePrior)
			defer func() { noSteadyState = false }()
			r1 := make([]float64, len(tc.y))
			noSteadyState = true
			a, _ := pr.likelihood(tc.coef, r1)
			s1 := append([]float64(nil), pr.kal.a...)
			p1 := append([]float64(nil), pr.kal.pm...)
			noSteadyState = false
			r2 := make([]float64, len(tc.y))
			b, _ := pr.likelihood(tc.coef, r2)
			if a.nu != b.nu {
				t.Fatalf("nu %d vs %d", a.nu, b.nu)
			}
			if (pr.kal.steadyFrom >= 0) != tc.steady {
				t.Fatalf("fixed gain from %d, want steady %v", pr.kal.steadyFrom, tc.steady)
			}
			t.Logf("fixed gain from observation %d of %d", pr.kal.steadyFrom, len(tc.y))
			numtest.Scalar(t, "ssq", b.ssq, a.ssq, 0, 1e-10)
			numtest.Scalar(t, "sumlog", b.sumlog, a.sumlog, 1e-10, 1e-10)
			numtest.Slice(t, "residuals", r2, r1, 1e-10, 1e-10)
			numtest.Slice(t, "state", pr.kal.a, s1, 1e-10, 1e-10)
			numtest.Slice(t, "covariance", pr.kal.pm, p1, 1e-10, 1e-10)
		})
	}
}
