package reconcile_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/reconcile"
	"gonum.org/v1/gonum/mat"
)

// An invented bakery chain: two regions with two shops each. Node order
// is total, north, south, then the four shops.
func bakery() *reconcile.Hierarchy {
	h, err := reconcile.HierarchyFromPaths([]string{
		"chain/north/harbour",
		"chain/north/old-town",
		"chain/south/station",
		"chain/south/campus",
	}, "/")
	if err != nil {
		panic(err)
	}
	return h
}

func ExampleHierarchyFromPaths() {
	h := bakery()
	fmt.Println(h.Names())
	fmt.Println(mat.Formatted(h.Summing()))
	// Output:
	// [chain chain/north chain/south chain/north/harbour chain/north/old-town chain/south/station chain/south/campus]
	// ⎡1  1  1  1⎤
	// ⎢1  1  0  0⎥
	// ⎢0  0  1  1⎥
	// ⎢1  0  0  0⎥
	// ⎢0  1  0  0⎥
	// ⎢0  0  1  0⎥
	// ⎣0  0  0  1⎦
}

func ExampleNewGrouped() {
	g, err := reconcile.NewGrouped([]string{"region", "family"}, [][]string{
		{"north", "bread"}, {"north", "cake"},
		{"south", "bread"}, {"south", "cake"},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(g.Names())
	// Output:
	// [total region=north region=south family=bread family=cake north|bread north|cake south|bread south|cake]
}

func ExampleBottomUp() {
	h := bakery()
	// Two months of base forecasts (loaves per day), one column per node.
	base := mat.NewDense(2, 7, []float64{
		1000, 560, 430, 300, 250, 240, 200,
		1010, 570, 420, 310, 255, 230, 195,
	})
	rec, err := reconcile.BottomUp(h, base)
	if err != nil {
		fmt.Println(err)
		return
	}
	for t := 0; t < 2; t++ {
		fmt.Printf("month %d: chain %.3f north %.3f south %.3f\n", t+1, rec.At(t, 0), rec.At(t, 1), rec.At(t, 2))
	}
	// Output:
	// month 1: chain 990.000 north 550.000 south 440.000
	// month 2: chain 990.000 north 565.000 south 425.000
}

func ExampleMinT() {
	h := bakery()
	base := mat.NewDense(1, 7, []float64{1000, 560, 430, 300, 250, 240, 200})
	// In-sample one-step errors of the base models, one column per node.
	resid := mat.NewDense(6, 7, []float64{
		12, 8, 5, 4, 3, 2, 4,
		-9, -4, -6, -3, -2, -4, -1,
		15, 9, 4, 5, 5, 1, 2,
		-11, -7, -3, -2, -4, -2, -2,
		6, 2, 5, 0, 1, 3, 1,
		-8, -5, -2, -3, -1, -1, -2,
	})
	rec, err := reconcile.MinT(h, base, resid, reconcile.Shrinkage)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range h.Names() {
		fmt.Printf("%-22s %9.3f -> %9.3f\n", name, base.At(0, i), rec.At(0, i))
	}
	// Output:
	// chain                   1000.000 ->   985.640
	// chain/north              560.000 ->   550.224
	// chain/south              430.000 ->   435.416
	// chain/north/harbour      300.000 ->   300.253
	// chain/north/old-town     250.000 ->   249.970
	// chain/south/station      240.000 ->   239.467
	// chain/south/campus       200.000 ->   195.949
}

func ExampleForecasts() {
	h := bakery()
	start := time.Date(2027, time.March, 1, 0, 0, 0, 0, time.UTC)
	means := []float64{1000, 560, 430, 300, 250, 240, 200}
	sds := []float64{40, 25, 20, 15, 12, 12, 10}
	fcs := make([]almanac.Forecast, len(means))
	for i := range fcs {
		f, err := almanac.NewForecast(start, calendar.Monthly, []float64{means[i]},
			&almanac.Normal{Mean: []float64{means[i]}, SD: []float64{sds[i]}})
		if err != nil {
			fmt.Println(err)
			return
		}
		fcs[i] = f
	}
	// In-sample one-step errors of the base models: they say how the
	// nodes' errors move together (here the shops err in step).
	resid := mat.NewDense(6, 7, []float64{
		12, 8, 5, 4, 3, 2, 4,
		-9, -4, -6, -3, -2, -4, -1,
		15, 9, 4, 5, 5, 1, 2,
		-11, -7, -3, -2, -4, -2, -2,
		6, 2, 5, 0, 1, 3, 1,
		-8, -5, -2, -3, -1, -1, -2,
	})
	rec, err := reconcile.Forecasts(h, fcs, reconcile.Spec{Method: reconcile.MethodWLSStructural, Residuals: resid}, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range h.Names()[:3] {
		iv := rec[i].Intervals[0]
		fmt.Printf("%-12s %.3f [%.3f, %.3f]\n", name, rec[i].Mean[0], iv.Lower[0], iv.Upper[0])
	}
	// Output:
	// chain        993.333 [940.664, 1046.002]
	// chain/north  556.667 [525.541, 587.792]
	// chain/south  436.667 [412.717, 460.617]
}

// Reconciled forecasts with joint sample paths straight from a batch of
// fitted models: an invented bakery chain's daily loaves over 60 days,
// whose four shops share the weather (a common shock each day).
func ExampleFromBatch() {
	h := bakery()
	rng := rand.New(rand.NewPCG(2027, 3))
	level := []float64{300, 250, 240, 200}
	shops := make([][]float64, 4)
	for day := 0; day < 60; day++ {
		weather := rng.NormFloat64()
		for j := range shops {
			level[j] += 6*weather + 3*rng.NormFloat64()
			shops[j] = append(shops[j], level[j])
		}
	}
	start := time.Date(2027, time.March, 1, 0, 0, 0, 0, time.UTC)
	var series []almanac.Series
	for i, name := range h.Names() {
		vals := make([]float64, 60)
		for _, j := range h.Bottoms(i) {
			for d, v := range shops[j] {
				vals[d] += v
			}
		}
		series = append(series, almanac.Series{Key: name, Start: start, Freq: calendar.Daily, Values: vals})
	}
	results, err := almanac.BatchFit(context.Background(), almanac.Naive{}, series, almanac.BatchOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	// The default: MinT (shrinkage) with joint paths from the residuals.
	joint, err := reconcile.FromBatch(context.Background(), h, results, 7, reconcile.Spec{Seed: 1}, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	// For comparison only: each node's paths drawn on their own.
	indep, err := reconcile.FromBatch(context.Background(), h, results, 7, reconcile.Spec{Seed: 1, Draw: reconcile.IndependentPaths}, 80)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, fc := range []almanac.Forecast{joint[0], indep[0]} {
		iv := fc.Intervals[0]
		fmt.Printf("chain, day 7: %.3f, 80%% band [%.3f, %.3f]\n", fc.Mean[6], iv.Lower[6], iv.Upper[6])
	}
	// Output:
	// chain, day 7: 1075.633, 80% band [998.756, 1156.641]
	// chain, day 7: 1075.633, 80% band [1044.212, 1105.084]
}

func ExampleNewHierarchy() {
	h, err := reconcile.NewHierarchy(
		reconcile.Link{Name: "chain"},
		reconcile.Link{Name: "north", Parent: "chain"},
		reconcile.Link{Name: "south", Parent: "chain"},
		reconcile.Link{Name: "harbour", Parent: "north"},
		reconcile.Link{Name: "old-town", Parent: "north"},
		reconcile.Link{Name: "station", Parent: "south"},
	)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range h.Names() {
		fmt.Printf("%-8s level %d bottoms %v\n", name, h.Level(i), h.Bottoms(i))
	}
	// Output:
	// chain    level 0 bottoms [0 1 2]
	// north    level 1 bottoms [0 1]
	// south    level 1 bottoms [2]
	// harbour  level 2 bottoms [0]
	// old-town level 2 bottoms [1]
	// station  level 2 bottoms [2]
}

func ExampleTopDown() {
	h := bakery()
	base := mat.NewDense(1, 7, []float64{1000, 560, 430, 300, 250, 240, 200})
	// Forecast proportions: north gets 560/(560+430) of the chain's 1000,
	// harbour 300/(300+250) of that, and so on.
	rec, err := reconcile.TopDown(h, base, reconcile.ForecastProportions, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range h.Names() {
		fmt.Printf("%-22s %.3f\n", name, rec.At(0, i))
	}
	// Output:
	// chain                  1000.000
	// chain/north            565.657
	// chain/south            434.343
	// chain/north/harbour    308.540
	// chain/north/old-town   257.117
	// chain/south/station    236.915
	// chain/south/campus     197.429
}

func ExampleMiddleOut() {
	h := bakery()
	base := mat.NewDense(1, 7, []float64{1000, 560, 430, 300, 250, 240, 200})
	// Three months of history of every node, for historical proportions.
	history := mat.NewDense(3, 7, []float64{
		950, 530, 420, 290, 240, 230, 190,
		980, 545, 435, 295, 250, 240, 195,
		990, 550, 440, 300, 250, 235, 205,
	})
	rec, err := reconcile.MiddleOut(h, 1, base, reconcile.ProportionsOfHistoricalAverages, history)
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range h.Names() {
		fmt.Printf("%-22s %.3f\n", name, rec.At(0, i))
	}
	// Output:
	// chain                  990.000
	// chain/north            560.000
	// chain/south            430.000
	// chain/north/harbour    304.985
	// chain/north/old-town   255.015
	// chain/south/station    234.093
	// chain/south/campus     195.907
}

func ExampleReconcile_nonNegative() {
	h := bakery()
	// The campus shop is closed for the holidays; its base model still
	// forecasts a small negative number.
	base := mat.NewDense(1, 7, []float64{700, 540, 150, 290, 245, 160, -8})
	resid := mat.NewDense(6, 7, []float64{
		12, 8, 5, 4, 3, 2, 4,
		-9, -4, -6, -3, -2, -4, -1,
		15, 9, 4, 5, 5, 1, 2,
		-11, -7, -3, -2, -4, -2, -2,
		6, 2, 5, 0, 1, 3, 1,
		-8, -5, -2, -3, -1, -1, -2,
	})
	rec, err := reconcile.Reconcile(h, base, reconcile.Spec{
		Method:      reconcile.MethodMinTShrink,
		Residuals:   resid,
		NonNegative: true,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, name := range h.Names() {
		fmt.Printf("%-22s %.3f\n", name, rec.At(0, i))
	}
	// Output:
	// chain                  724.291
	// chain/north            557.422
	// chain/south            166.869
	// chain/north/harbour    302.072
	// chain/north/old-town   255.350
	// chain/south/station    166.869
	// chain/south/campus     0.000
}

func ExampleEstimateCovariance() {
	h := bakery()
	resid := mat.NewDense(6, 7, []float64{
		12, 8, 5, 4, 3, 2, 4,
		-9, -4, -6, -3, -2, -4, -1,
		15, 9, 4, 5, 5, 1, 2,
		-11, -7, -3, -2, -4, -2, -2,
		6, 2, 5, 0, 1, 3, 1,
		-8, -5, -2, -3, -1, -1, -2,
	})
	est, err := reconcile.EstimateCovariance(h, resid, reconcile.Shrinkage)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("lambda %.3f from %d rows; var(chain) %.3f cov(chain, north) %.3f\n",
		est.Lambda, est.Rows, est.W.At(0, 0), est.W.At(0, 1))
	// Output:
	// lambda 0.092 from 6 rows; var(chain) 111.833 cov(chain, north) 59.934
}
