package smoothing

import (
	"math"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestLogSum: the running-product accumulator of the likelihood equals
// the plain sum of math.Log values (the definition), including values so
// large or small that a naive product would overflow or underflow.
func TestLogSum(t *testing.T) {
	for _, tc := range []struct {
		name string
		v    []float64
	}{
		{"empty", nil},
		{"near one", []float64{0.9, 1.1, 1.05, 0.97, 1.3, 0.8}},
		{"overflowing product", repeat(1e10, 200)},
		{"underflowing product", repeat(1e-10, 200)},
		{"extremes", []float64{1e300, 1e-300, 2, 1e200, 3e-250, 5e307, 4.9e-324, 0.5}},
		{"mixed ranges", append(repeat(3e100, 40), repeat(2e-90, 45)...)},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var s logSum
			want := 0.0
			for _, v := range tc.v {
				s.push(v)
				want += math.Log(v)
			}
			got := s.value()
			if math.IsInf(got, 0) || math.IsNaN(got) {
				t.Fatalf("logSum = %v", got)
			}
			// Rounding of n products against n logarithms: 1e-12 relative
			// plus 1e-12 absolute is far above either.
			numtest.Scalar(t, "Σ log v", got, want, 1e-12, 1e-12)
		})
	}
}

func repeat(v float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = v
	}
	return out
}
