package numtest

import (
	"math"
	"testing"
)

func TestClose(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name      string
		got, want float64
		abs, rel  float64
		close     bool
	}{
		{"equal", 1, 1, 0, 0, true},
		{"within abs", 1.05, 1, 0.1, 0, true},
		{"outside abs", 1.2, 1, 0.1, 0, false},
		{"within rel", 101, 100, 0, 0.02, true},
		{"outside rel", 103, 100, 0, 0.02, false},
		{"abs plus rel", 103, 100, 1, 0.02, true},
		{"both NaN", nan, nan, 0, 0, true},
		{"NaN got", nan, 1, 1, 1, false},
		{"NaN want", 1, nan, 1, 1, false},
		{"same infinity", inf, inf, 0, 0, true},
		{"opposite infinities", inf, -inf, 1, 1, false},
		{"infinity and number", inf, 1e308, 1, 1, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := Close(tc.got, tc.want, tc.abs, tc.rel); got != tc.close {
				t.Errorf("Close(%v, %v, %v, %v) = %v, want %v", tc.got, tc.want, tc.abs, tc.rel, got, tc.close)
			}
		})
	}
}
