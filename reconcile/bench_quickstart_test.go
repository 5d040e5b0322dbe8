package reconcile_test

import (
	"context"
	"os"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// BenchmarkQuickstartMinT: MinT with the shrinkage covariance and the
// non-negativity constraint, as the quickstart reconciles its plan, on
// the quickstart's invented hierarchy (examples/quickstart/data: 32
// product lines in 4 categories and the total, 37 nodes), 12 steps of
// seasonal naive base forecasts and their in-sample residuals. The speed
// program's workload mint-quickstart times the same.
func BenchmarkQuickstartMinT(b *testing.B) {
	fh, err := os.Open("../examples/quickstart/data/garden_supplies.csv")
	if err != nil {
		b.Skip("quickstart data not found:", err)
	}
	defer fh.Close()
	lines, err := almanac.ReadCSV(fh, almanac.CSVOptions{
		KeyColumn: "product", TimeColumn: "month", ValueColumn: "units",
		Layouts: []string{"2006-01"}, Freq: calendar.Monthly,
	})
	if err != nil {
		b.Fatal(err)
	}
	paths := make([]string, len(lines))
	byPath := map[string]almanac.Series{}
	for i, y := range lines {
		if y.Missing() > 0 {
			if y, _, err = (decompose.Repair{}).Fill(y); err != nil {
				b.Fatal(err)
			}
		}
		paths[i] = "total/" + y.Key
		byPath[paths[i]] = y
	}
	h, err := reconcile.HierarchyFromPaths(paths, "/")
	if err != nil {
		b.Fatal(err)
	}
	names := h.Names()
	m := h.NumBottom()
	const steps = 12
	fits := make([]almanac.Fitted, len(names))
	base := mat.NewDense(steps, len(names), nil)
	for i, name := range names {
		vals := make([]float64, lines[0].Len())
		for _, j := range h.Bottoms(i) {
			for t, v := range byPath[names[len(names)-m+j]].Values {
				vals[t] += v
			}
		}
		y := almanac.Series{Key: strings.TrimPrefix(name, "total/"), Start: lines[0].Start, Freq: calendar.Monthly, Values: vals}
		if fits[i], err = (almanac.SeasonalNaive{}).Fit(context.Background(), y); err != nil {
			b.Fatal(err)
		}
		fc, err := fits[i].Forecast(steps)
		if err != nil {
			b.Fatal(err)
		}
		base.SetCol(i, fc.Mean)
	}
	resid, err := reconcile.ResidualMatrix(h, fits)
	if err != nil {
		b.Fatal(err)
	}
	spec := reconcile.Spec{Method: reconcile.MethodMinTShrink, Residuals: resid, NonNegative: true}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := reconcile.Reconcile(h, base, spec); err != nil {
			b.Fatal(err)
		}
	}
}
