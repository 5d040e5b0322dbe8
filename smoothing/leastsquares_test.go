package smoothing

import (
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestInitialStatesLeastSquares: with the smoothing parameters fixed, the
// one-step errors of an additive-error linear model are affine in the
// initial states, so their maximum-likelihood estimate is the
// least-squares solution (Hyndman, Koehler, Ord & Snyder 2008, ch. 5).
// The optimiser must find it; the reference is a direct 2×2 normal-equation
// solve built from three filter runs.
func TestInitialStatesLeastSquares(t *testing.T) {
	y := airPassengers(t).Head(48)
	f := form{trend: AdditiveTrend, m: 1}
	p := Params{Alpha: 0.3, Beta: 0.05, Phi: 1}
	res := func(l0, b0 float64) []float64 {
		r := make([]float64, y.Len())
		f.filter(y.Values, p, l0, b0, make([]float64, 1), 0, &trace{resid: r})
		return r
	}
	r0, r1, r2 := res(0, 0), res(1, 0), res(0, 1)
	var a11, a12, a22, c1, c2 float64
	for i := range r0 {
		x1, x2 := r1[i]-r0[i], r2[i]-r0[i]
		a11 += x1 * x1
		a12 += x1 * x2
		a22 += x2 * x2
		c1 -= x1 * r0[i]
		c2 -= x2 * r0[i]
	}
	det := a11*a22 - a12*a12
	l0 := (c1*a22 - c2*a12) / det
	b0 := (a11*c2 - a12*c1) / det
	fit, err := Spec{Trend: AdditiveTrend, Alpha: Value(0.3), Beta: Value(0.05)}.fit(ctx, y)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "initial level", fit.InitLevel, l0, 0, 1e-6)
	numtest.Scalar(t, "initial trend", fit.InitTrend, b0, 1e-6, 1e-4)
}
