package stl

import (
	"fmt"
	"testing"
)

func BenchmarkDecompose(b *testing.B) {
	y := loadInput(b, "stl_co2_swin7")
	n := len(y)
	for _, robust := range []bool{false, true} {
		b.Run(fmt.Sprintf("n=%d/robust=%v", n, robust), func(b *testing.B) {
			p := Defaults(n, 12, 7, false, robust)
			s, tr, r, w := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
			var ws Workspace
			b.ReportAllocs()
			for b.Loop() {
				if err := ws.DecomposeTo(s, tr, r, w, y, p); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
