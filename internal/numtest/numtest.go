package numtest

import (
	"math"
	"testing"
)

// Close reports whether got is within abs + rel·|want| of want. Two NaNs
// are close; NaN and a number are not.
func Close(got, want, abs, rel float64) bool {
	if math.IsNaN(want) || math.IsNaN(got) {
		return math.IsNaN(want) && math.IsNaN(got)
	}
	if math.IsInf(want, 0) || math.IsInf(got, 0) {
		return got == want
	}
	return math.Abs(got-want) <= abs+rel*math.Abs(want)
}

// Scalar fails t when got is not Close to want.
func Scalar(t testing.TB, name string, got, want, abs, rel float64) {
	t.Helper()
	if !Close(got, want, abs, rel) {
		t.Errorf("%s = %.17g, want %.17g (|diff| %.3g > abs %g + rel %g)", name, got, want, math.Abs(got-want), abs, rel)
	}
}

// Slice fails t when the lengths differ or any element is not Close. It
// reports at most five mismatches and the largest difference.
func Slice(t testing.TB, name string, got, want []float64, abs, rel float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s: len %d, want %d", name, len(got), len(want))
		return
	}
	bad, worst, worstAt := 0, 0.0, -1
	for i := range want {
		if !Close(got[i], want[i], abs, rel) {
			if bad < 5 {
				t.Errorf("%s[%d] = %.17g, want %.17g", name, i, got[i], want[i])
			}
			bad++
		}
		if d := math.Abs(got[i] - want[i]); d > worst {
			worst, worstAt = d, i
		}
	}
	if bad > 0 {
		t.Errorf("%s: %d of %d values outside abs %g + rel %g; largest |diff| %.3g at %d", name, bad, len(want), abs, rel, worst, worstAt)
	}
}
