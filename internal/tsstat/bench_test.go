package tsstat

import (
	"math"
	"strconv"
	"testing"
)

func BenchmarkPACF(b *testing.B) {
	for _, n := range []int{100, 1000} {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Sin(float64(i)/3) + float64(i%7)
		}
		b.Run("n="+strconv.Itoa(n)+"/lags=24", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				PACF(x, 24)
			}
		})
	}
}
