//go:build ignore

// Generate regenerates garden_supplies.csv: invented demo data for the
// quickstart.
//
// A made-up regional distributor of garden supplies with 32 monthly
// product lines in four categories (units sold, January 2019 to December
// 2025), with category-specific spring/summer peaks, per-line growth,
// multiplicative noise, one low-volume line and a two-month gap in one
// line (a warehouse system outage). Nothing here is real data. Run from
// this directory: go run generate.go
package main

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
)

func main() {
	rng := rand.New(rand.NewPCG(20261201, 0))
	uniform := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	cats := []struct {
		name  string
		items []string
		peak  int     // month of peak, 0 = January
		amp   float64 // strength of the season
	}{
		{"seeds", []string{"tomato", "lettuce", "sunflower", "wildflower", "herb-mix", "bean", "pumpkin", "carrot"}, 3, 0.9},
		{"tools", []string{"trowel", "pruner", "rake", "spade", "hoe", "gloves", "kneeler", "shears"}, 4, 0.5},
		{"irrigation", []string{"hose-15m", "hose-30m", "sprinkler", "drip-kit", "timer", "watering-can", "butt-200l", "nozzle"}, 6, 0.8},
		{"furniture", []string{"bench", "parasol", "lounger", "bistro-set", "planter-l", "planter-s", "trellis", "firepit"}, 5, 0.7},
	}
	const n = 84 // months from January 2019
	f, err := os.Create("garden_supplies.csv")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "product,month,units")
	for _, c := range cats {
		for _, it := range c.items {
			base := uniform(40, 400)
			growth := uniform(-0.004, 0.012)
			a := c.amp * uniform(0.7, 1.2)
			p := c.peak + []int{-1, 0, 0, 1}[rng.IntN(4)]
			noise := uniform(0.06, 0.15)
			for t := range n {
				y, m := 2019+t/12, t%12
				season := math.Exp(a * math.Cos(2*math.Pi*float64(m-p)/12))
				level := base * math.Exp(growth*float64(t))
				v := level * season * math.Exp(noise*rng.NormFloat64())
				if it == "firepit" { // a low-volume line
					v = math.Max(0, math.Round(v/25+1.5*rng.NormFloat64()))
				}
				s := fmt.Sprint(int(math.Round(v)))
				if it == "sprinkler" && y == 2023 && (m == 5 || m == 6) { // outage: June and July 2023
					s = ""
				}
				fmt.Fprintf(w, "%s/%s,%d-%02d,%s\n", c.name, it, y, m+1, s)
			}
		}
	}
	if err := w.Flush(); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	if err := f.Close(); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
