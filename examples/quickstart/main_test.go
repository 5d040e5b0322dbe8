package main

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestQuickstart runs the whole demo and checks what it promises: every
// node has a forecast, the reconciled forecasts add up (products to
// categories to the total) for the point forecasts and every sample path,
// they are non-negative, the printed plan names every product line, and
// the review page is written, well-formed, with a row and a chart for
// every node.
func TestQuickstart(t *testing.T) {
	var out bytes.Buffer
	dir := t.TempDir()
	p, err := run(context.Background(), &out, dir)
	if err != nil {
		t.Fatal(err)
	}
	checkReviewPage(t, filepath.Join(dir, "review.html"), p)
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
	for _, want := range []string{"repaired", "Backtest over all", "Plan for 2026", "sprinkler", "firepit", "All products, month by month", "Review page"} {
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

// checkReviewPage parses the review page as XML (it is written to be
// well-formed) and counts its summary rows and charts.
func checkReviewPage(t *testing.T, path string, p *plan) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("review page: %v", err)
	}
	defer f.Close()
	d := xml.NewDecoder(f)
	rows, charts, filled := 0, 0, 0
	for {
		tok, err := d.Token()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("review page %s is not well-formed: %v", path, err)
		}
		el, ok := tok.(xml.StartElement)
		if !ok {
			continue
		}
		for _, a := range el.Attr {
			switch {
			case el.Name.Local == "tr" && a.Name.Local == "data-flags":
				rows++
				if strings.Contains(a.Value, "filled") {
					filled++
				}
			case el.Name.Local == "svg" && a.Name.Local == "class" && a.Value == "chart":
				charts++
			}
		}
	}
	if n := len(p.nodes); rows != n || charts != n {
		t.Errorf("review page: %d rows and %d charts for %d series", rows, charts, n)
	}
	if filled == 0 {
		t.Error("review page: no series is marked as having filled values")
	}
}
