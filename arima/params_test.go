package arima

import (
	"math"
	"math/cmplx"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestExpand checks the multiplied-out seasonal polynomials against the
// rule in the reference README (R's convention): with period s,
// phi[(j+1)s−1] += sar_j, phi[(j+1)s+i] −= ar_i sar_j, and likewise for
// theta with a plus sign. (1 − 0.5B)(1 − 0.3B⁴) = 1 − 0.5B − 0.3B⁴ + 0.15B⁵
// and (1 + 0.4B)(1 + 0.6B⁴) = 1 + 0.4B + 0.6B⁴ + 0.24B⁵ (algebra).
func TestExpand(t *testing.T) {
	l := newLayout(1, 0, 1, 1, 0, 1, 4, false, false, nil)
	phi := make([]float64, 5)
	theta := make([]float64, 5)
	l.expand([]float64{0.5, 0.4, 0.3, 0.6}, phi, theta)
	numtest.Slice(t, "phi", phi, []float64{0.5, 0, 0, 0.3, -0.15}, 1e-15, 0)
	numtest.Slice(t, "theta", theta, []float64{0.4, 0, 0, 0.6, 0.24}, 1e-15, 0)
	// (1−B)(1−B⁴) = 1 − B − B⁴ + B⁵: y_t = y_{t−1} + y_{t−4} − y_{t−5} + w_t.
	l = newLayout(0, 1, 0, 0, 1, 0, 4, false, false, nil)
	numtest.Slice(t, "delta", l.delta(), []float64{1, 0, 0, 1, -1}, 0, 0)
}

// TestPACFMap checks the stationarity transform: an AR(1) coefficient is
// tanh of its parameter, an AR(2) follows the Durbin–Levinson step
// φ₁ = r₁(1 − r₂), φ₂ = r₂ (Monahan 1984), and the inverse recovers the
// parameters.
func TestPACFMap(t *testing.T) {
	raw := []float64{0.7, -0.4}
	got := make([]float64, 2)
	pacfToAR(got, raw, make([]float64, 2))
	r1, r2 := math.Tanh(0.7), math.Tanh(-0.4)
	numtest.Slice(t, "AR(2)", got, []float64{r1 * (1 - r2), r2}, 1e-15, 0)
	back := make([]float64, 2)
	if !arToPACF(back, got) {
		t.Fatal("stationary AR reported non-stationary")
	}
	numtest.Slice(t, "inverse", back, raw, 1e-12, 0)
	if arToPACF(back, []float64{1.2, 0.1}) {
		t.Error("non-stationary AR(2) (φ₁ + φ₂ > 1) accepted")
	}
	if !arStationary(got) || arStationary([]float64{0.5, 0.6}) {
		t.Error("arStationary wrong")
	}
}

// TestMAInvert: a root inside the unit circle is replaced by its
// reciprocal. (1 + 2B)(1 + 0.5B) = 1 + 2.5B + B² becomes
// (1 + 0.5B)² = 1 + B + 0.25B²; 1 + 2B becomes 1 + 0.5B (algebra).
func TestMAInvert(t *testing.T) {
	for _, tc := range []struct {
		name    string
		in, out []float64
	}{
		{"MA(1)", []float64{2}, []float64{0.5}},
		{"MA(2) one root inside", []float64{2.5, 1}, []float64{1, 0.25}},
		{"already invertible", []float64{0.3, 0.1}, []float64{0.3, 0.1}},
		{"trailing zero kept", []float64{2, 0}, []float64{0.5, 0}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := maInvert(tc.in)
			numtest.Slice(t, "ma", got, tc.out, 1e-12, 0)
			if !invertible(got) {
				t.Errorf("%v not invertible", got)
			}
		})
	}
}

// TestStationaryCov: for an AR(1) the stationary variance is 1/(1 − φ²)
// and for an MA(1) the state covariance of Harvey's form is
// [[1 + θ², θ], [θ, θ²]] (Harvey 1989, §3.3; textbook results).
func TestStationaryCov(t *testing.T) {
	var k kalman
	k.resize(1, 0, nil)
	k.setARMA([]float64{0.6}, nil)
	if !k.init() {
		t.Fatal("AR(1) reported non-stationary")
	}
	numtest.Scalar(t, "AR(1) variance", k.pnew[0], 1/(1-0.36), 1e-14, 0)
	k.resize(0, 1, nil)
	k.setARMA(nil, []float64{0.4})
	k.init()
	numtest.Slice(t, "MA(1) state covariance", k.pnew[:4], []float64{1.16, 0.4, 0.4, 0.16}, 1e-14, 0)
	k.resize(1, 0, nil)
	k.setARMA([]float64{1}, nil)
	if k.init() {
		t.Error("unit root accepted as stationary")
	}
}

// TestStationaryCovSolvesLyapunov: Q0 satisfies its defining equation
// Q0 = T Q0 T' + R R' for seasonal ARMA models with AR and MA parts
// (where the first-row construction and the recursion both matter).
func TestStationaryCovSolvesLyapunov(t *testing.T) {
	for _, tc := range []struct {
		name string
		lay  *layout
		coef []float64
	}{
		{"ARMA(2,1)×(1,0)_12", newLayout(2, 0, 1, 1, 0, 0, 12, false, false, nil), []float64{0.5, -0.3, 0.4, 0.6}},
		{"ARMA(1,2)×(1,1)_4", newLayout(1, 0, 2, 1, 0, 1, 4, false, false, nil), []float64{-0.7, 0.2, 0.3, 0.5, -0.4}},
		{"AR(3)", newLayout(3, 0, 0, 0, 0, 0, 0, false, false, nil), []float64{0.6448, -0.0634, -0.2198}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			pf, qf := tc.lay.fullLengths()
			phi, theta := make([]float64, pf), make([]float64, qf)
			tc.lay.expand(tc.coef, phi, theta)
			var k kalman
			k.resize(pf, qf, nil)
			k.setARMA(phi, theta)
			if !k.init() {
				t.Fatal("stationary model reported non-stationary")
			}
			r := k.r
			q0 := append([]float64(nil), k.pnew[:r*r]...)
			// One prediction step from Q0 must return Q0.
			copy(k.pm, q0)
			k.predict()
			numtest.Slice(t, "T Q0 T' + R R' − Q0", k.pnew[:r*r], q0, 1e-12, 1e-12)
		})
	}
}

// invertible reports whether 1 + Σ ma_i z^i has no root inside the unit
// circle.
func invertible(ma []float64) bool {
	for _, z := range polyRoots(ma) {
		if cmplx.Abs(z) < 1 {
			return false
		}
	}
	return true
}
