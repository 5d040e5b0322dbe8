package trigg

import (
	"math"
	"testing"
)

// TestSignal checks the result and what Result reports; the values are
// worked by hand from the definition in the package documentation (the
// public checks, with the simulated 95% limit, are accuracy's
// TestTriggSignal and TestTriggLimit).
func TestSignal(t *testing.T) {
	inf := math.Inf(1)
	nan := math.NaN()
	tests := []struct {
		name  string
		errs  []float64
		alpha float64
		want  float64 // NaN when there is no signal
		res   Result
	}{
		// M_0 = mean(1, 1) = 1 (⌈1/0.5⌉ = 2); E = 0.5, −0.25, 0.875,
		// 0.4375, 1.71875; M = 1, 1, 1.5, 0.75, 1.875: T = 11/12.
		{"hand computed", []float64{1, -1, 2, 0, 3}, 0.5, 11.0 / 12, Result{Observed: 5}},
		{"missing passed over", []float64{nan, 1, -1, nan, 2, 0, 3}, 0.5, 11.0 / 12, Result{Observed: 5}},
		// One error c: M_0 = |c|, E = α·c, so T = α·sign(c).
		{"one error", []float64{-4}, 0.25, -0.25, Result{Observed: 1}},
		{"bad alpha", []float64{1}, 1, nan, Result{Problem: BadAlpha}},
		{"NaN alpha", []float64{1}, nan, nan, Result{Problem: BadAlpha}},
		{"empty", nil, 0.1, nan, Result{Problem: Empty}},
		{"infinite", []float64{1, nan, 2, -inf, 3}, 0.1, nan, Result{Problem: NonFinite, Index: 3, Observed: 2}},
		{"all missing", []float64{nan, nan}, 0.1, nan, Result{Problem: AllMissing}},
		{"all zero", []float64{0, nan, 0}, 0.1, nan, Result{Problem: AllZero, Observed: 2}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, res := Signal(tc.errs, tc.alpha)
			if res != tc.res {
				t.Fatalf("result %+v, want %+v", res, tc.res)
			}
			if math.IsNaN(tc.want) != math.IsNaN(got) || math.Abs(got-tc.want) > 1e-15 {
				t.Fatalf("signal %v, want %v", got, tc.want)
			}
		})
	}
}

// TestSignalAllocs: Signal allocates nothing.
func TestSignalAllocs(t *testing.T) {
	errs := []float64{1, -2, math.NaN(), 3, 0.5}
	if n := testing.AllocsPerRun(100, func() { Signal(errs, 0.1) }); n != 0 {
		t.Errorf("%v allocations per call", n)
	}
}
