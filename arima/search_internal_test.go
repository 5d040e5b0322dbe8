package arima

import (
	"math"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestMinRootModulus checks the root screen of Search on polynomials
// whose roots are known in closed form (elementary algebra).
func TestMinRootModulus(t *testing.T) {
	tests := []struct {
		name string
		c    []float64 // 1 + c₁z + c₂z² + …
		want float64
	}{
		{"1 − 0.5z: root 2", []float64{-0.5}, 2},
		{"1 + 0.25z²: roots ±2i", []float64{0, 0.25}, 2},
		{"(1 − z)(1 − 0.5z): roots 1 and 2", []float64{-1.5, 0.5}, 1},
		{"1 + 0.4z (MA): root −2.5", []float64{0.4}, 2.5},
		{"trailing zero ignored", []float64{-0.5, 0}, 2},
		{"constant polynomial", nil, math.Inf(1)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			numtest.Scalar(t, "min |root|", minRootModulus(tc.c), tc.want, 0, 1e-12)
		})
	}
}

func TestCoefOf(t *testing.T) {
	tests := []struct {
		name, coef, prefix string
		want               bool
	}{
		{"ma1", "ma1", "ma", true},
		{"ma12", "ma12", "ma", true},
		{"market is a regressor", "market", "ma", false},
		{"ma alone", "ma", "ma", false},
		{"sma1 is not ma", "sma1", "ma", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := coefOf(tc.coef, tc.prefix); got != tc.want {
				t.Errorf("coefOf(%q, %q) = %v", tc.coef, tc.prefix, got)
			}
		})
	}
}
