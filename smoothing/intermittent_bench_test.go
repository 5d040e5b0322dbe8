package smoothing_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/smoothing"
)

// BenchmarkIntermittentFit fits Croston, SBA and TSB, with fixed and
// estimated constants, on intermittent series of n periods (demand in
// about one period of three).
func BenchmarkIntermittentFit(b *testing.B) {
	models := []struct {
		name  string
		model almanac.Model
	}{
		{"croston", smoothing.Croston{}},
		{"croston-estimated", smoothing.Croston{EstimateAlpha: true}},
		{"sba-estimated", smoothing.Croston{Variant: smoothing.CrostonSBA, EstimateAlpha: true}},
		{"tsb", smoothing.TSB{}},
		{"tsb-estimated", smoothing.TSB{Estimate: true}},
	}
	for _, n := range []int{100, 1000, 10000} {
		y := weekly(demandSeries(n))
		for _, m := range models {
			b.Run(fmt.Sprintf("%s/n=%d", m.name, n), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if _, err := m.model.Fit(context.Background(), y); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
