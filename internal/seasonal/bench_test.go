package seasonal

import (
	"math"
	"strconv"
	"testing"
)

func BenchmarkClassical(b *testing.B) {
	for _, n := range []int{120, 1200} {
		y := make([]float64, n)
		for i := range y {
			y[i] = 100 + float64(i)/10 + 10*math.Sin(2*math.Pi*float64(i)/12)
		}
		b.Run("n="+strconv.Itoa(n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Classical(y, 12, false); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run("IsSeasonal/n="+strconv.Itoa(n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				IsSeasonal(y, 12, 1.645)
			}
		})
	}
}
