package main

import (
	"bytes"
	"context"
	"math"
	"strings"
	"testing"
)

// TestQuickstart runs the whole demo and checks what it promises: every
// node has a forecast, the reconciled forecasts add up (products to
// categories to the total) for the point forecasts and every sample path,
// they are non-negative, and the printed plan names every product line.
func TestQuickstart(t *testing.T) {
	var out bytes.Buffer
	p, err := run(context.Background(), &out)
	if err != nil {
		t.Fatal(err)
	}
	st := p.structure
	if got, want := len(p.forecasts), st.Len(); got != want {
		t.Fatalf("%d forecasts for %d nodes", got, want)
	}
	m := st.NumBottom()
	n := st.Len()
	for i := range n {
		bottoms := st.Bottoms(i)
		f := p.forecasts[i]
		for h := range f.Mean {
			sum := 0.0
			for _, j := range bottoms {
				sum += p.forecasts[n-m+j].Mean[h]
			}
			if math.Abs(sum-f.Mean[h]) > 1e-6*math.Max(1, math.Abs(sum)) {
				t.Errorf("%s step %d: forecast %v, its products add to %v", p.nodes[i].Key, h, f.Mean[h], sum)
			}
			if f.Mean[h] < 0 {
				t.Errorf("%s step %d: negative forecast %v", p.nodes[i].Key, h, f.Mean[h])
			}
		}
		paths := f.SamplePaths()
		if len(paths) != nPaths {
			t.Fatalf("%s: %d sample paths, want %d", p.nodes[i].Key, len(paths), nPaths)
		}
		for k := range paths {
			for h := range paths[k] {
				sum := 0.0
				for _, j := range bottoms {
					sum += p.forecasts[n-m+j].SamplePaths()[k][h]
				}
				if math.Abs(sum-paths[k][h]) > 1e-6*math.Max(1, math.Abs(sum)) {
					t.Fatalf("%s path %d step %d: %v, its products add to %v", p.nodes[i].Key, k, h, paths[k][h], sum)
				}
			}
		}
	}
	text := out.String()
	for _, want := range []string{"repaired", "Backtest over all", "Plan for 2026", "sprinkler", "firepit", "All products, month by month"} {
		if !strings.Contains(text, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	for i, c := range p.chosen {
		if c == "" {
			t.Errorf("%s: no method chosen", p.nodes[i].Key)
		}
	}
}
