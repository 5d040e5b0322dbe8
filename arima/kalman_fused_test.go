package arima

import (
	"math"
	"math/rand/v2"
	"testing"
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
