package brent

import (
	"math"
	"testing"
)

// BenchmarkMinimize: a smooth one-parameter objective of the kind the
// Box-Cox and smoothing searches minimise, to the tolerance they use.
func BenchmarkMinimize(b *testing.B) {
	f := func(x float64) float64 { return math.Exp(x) - 2*x }
	b.ReportAllocs()
	for b.Loop() {
		Minimize(f, -1, 2, 1e-10, 500)
	}
}
