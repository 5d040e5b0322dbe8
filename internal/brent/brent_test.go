package brent

import (
	"math"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestMinimize checks the minimiser on functions with known minima
// (calculus): (x − 0.3)², x⁴ − 3x (minimum at (3/4)^(1/3)), and a
// minimum on the boundary.
func TestMinimize(t *testing.T) {
	tests := []struct {
		name  string
		f     func(float64) float64
		a, b  float64
		wantX float64
	}{
		{"parabola", func(x float64) float64 { return (x - 0.3) * (x - 0.3) }, -2, 2, 0.3},
		{"quartic", func(x float64) float64 { return x*x*x*x - 3*x }, -1, 3, math.Cbrt(0.75)},
		{"boundary", func(x float64) float64 { return x }, -1, 2, -1},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			x, _ := Minimize(tt.f, tt.a, tt.b, 1e-10, 500)
			// Documented accuracy: 2(1.5e-8·|x| + tol/3).
			numtest.Scalar(t, "xmin", x, tt.wantX, 1e-10, 3e-8)
		})
	}
}

// TestMinimizeNaN: NaN values count as +Inf, so the search stays where f
// is defined: f is NaN right of 1 and (x − 2)² elsewhere, so the minimum
// over [−1, 3] is at the edge of the defined part, x = 1.
func TestMinimizeNaN(t *testing.T) {
	f := func(x float64) float64 {
		if x > 1 {
			return math.NaN()
		}
		return (x - 2) * (x - 2)
	}
	x, fx := Minimize(f, -1, 3, 1e-10, 500)
	numtest.Scalar(t, "xmin", x, 1, 1e-7, 0)
	if math.IsNaN(fx) {
		t.Error("minimum value is NaN")
	}
}

// TestMinimizeNaNAtStart: the first evaluation point a + 0.382(b − a) =
// 0.528 lies where f is NaN (left of 1); it too must count as +Inf, so the
// search reaches the minimum of (x − 2)² at 2 (calculus).
func TestMinimizeNaNAtStart(t *testing.T) {
	f := func(x float64) float64 {
		if x < 1 {
			return math.NaN()
		}
		return (x - 2) * (x - 2)
	}
	x, fx := Minimize(f, -1, 3, 1e-10, 500)
	numtest.Scalar(t, "xmin", x, 2, 1e-10, 3e-8)
	if math.IsNaN(fx) {
		t.Error("minimum value is NaN")
	}
}
