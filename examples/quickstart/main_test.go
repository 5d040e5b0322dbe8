package main

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/reconcile"
)

// testOptions is a small version of the program's run: two categories of
// three lines each (one of them, the sprinkler, has the gap), fewer
// sample paths and one backtest origin fewer than the program, so that
// the test stays quick under -race. The program's defaults do the full
// job (defaultOptions).
func testOptions(dir string) options {
	return options{
		Paths: 200, Origins: 2, Categories: []string{"irrigation", "furniture"}, LinesPerCategory: 3,
		ReviewDir: dir,
	}
}

// TestQuickstart runs the demo on a subset of the data and checks what it
// promises: every node is forecast by the automatic forecaster with bands
// calibrated on pooled errors; the reconciled forecasts add up (products
// to categories to the total) for the point forecasts and every sample
// path, and are non-negative, both for the plan and at each backtest
// origin; the backtest's counts agree with a recomputation from the
// sample paths and the data; the printed report shows them and names
// every series; and the review page is written, well-formed, with a row
// and a chart for every node.
func TestQuickstart(t *testing.T) {
	var out bytes.Buffer
	dir := t.TempDir()
	opt := testOptions(dir)
	p, err := run(context.Background(), &out, opt)
	if err != nil {
		t.Fatal(err)
	}
	st := p.structure
	n, m := st.Len(), st.NumBottom()
	if m != 6 || n != 9 {
		t.Fatalf("structure of %d nodes and %d product lines, want 9 and 6", n, m)
	}
	t.Run("plan", func(t *testing.T) {
		if len(p.fits) != n {
			t.Fatalf("%d fits for %d nodes", len(p.fits), n)
		}
		for i, r := range p.fits {
			pf, ok := r.Fitted.(*accuracy.PilotFit)
			if r.Err != nil || !ok {
				t.Fatalf("%s: fit %T, error %v; want an accuracy.PilotFit", p.nodes[i].Key, r.Fitted, r.Err)
			}
			rep := pf.Report()
			if !rep.Calibrated || rep.Calibration.Source != accuracy.BandsFromPooledErrors {
				t.Errorf("%s: calibrated %v, bands from %v; want bands from the pooled errors", p.nodes[i].Key, rep.Calibrated, rep.Calibration.Source)
			}
		}
		checkCoherent(t, p, p.forecasts, opt.Paths)
		if got, want := p.forecasts[0].Start, p.nodes[0].Time(p.nodes[0].Len()); !got.Equal(want) {
			t.Errorf("plan starts %v, want %v", got, want)
		}
	})
	t.Run("backtest", func(t *testing.T) {
		checkBacktest(t, p, opt, out.String())
	})
	t.Run("report", func(t *testing.T) {
		text := out.String()
		for _, want := range []string{"repaired  irrigation/sprinkler", "Do the plan's bands hold?", "Plan for 2026", "All products, month by month", "Review page"} {
			if !strings.Contains(text, want) {
				t.Errorf("output lacks %q", want)
			}
		}
		// Every series has a line in the plan.
		_, planText, _ := strings.Cut(text, "Plan for 2026")
		for _, y := range p.nodes {
			if !strings.Contains(planText, shortName(label(y.Key))) {
				t.Errorf("plan lacks %s", y.Key)
			}
		}
	})
	t.Run("against benchmarks", func(t *testing.T) {
		// The per-series backtest replays the plan's own forecasts.
		if len(p.scored.Failed) > 0 || len(p.scored.Series) != n {
			t.Fatalf("%d series scored, failures %v", len(p.scored.Series), p.scored.Failed)
		}
		for i, c := range p.scored.Series {
			r, ok := c.Run(planCandidate)
			if !ok || len(r.Forecasts) != len(p.check.origins) {
				t.Fatalf("%s: no run of the plan at every origin", p.nodes[i].Key)
			}
			for o, f := range r.Forecasts {
				if !r.Done[o] || !slices.Equal(f.Mean, p.check.origins[o].forecasts[i].Mean) {
					t.Errorf("%s origin %d: scored %v, the plan forecast %v", p.nodes[i].Key, o, f.Mean, p.check.origins[o].forecasts[i].Mean)
				}
			}
			if _, ok := c.Run("seasonal naive"); !ok {
				t.Errorf("%s: no seasonal naive benchmark", p.nodes[i].Key)
			}
		}
	})
	t.Run("review", func(t *testing.T) {
		checkReviewPage(t, filepath.Join(dir, "review.html"), p)
	})
}

// checkCoherent checks that every node's forecast is the sum of its
// product lines' forecasts, point by point and path by path, never
// negative, with paths sample paths.
func checkCoherent(t *testing.T, p *plan, fcs []almanac.Forecast, paths int) {
	t.Helper()
	st := p.structure
	n, m := st.Len(), st.NumBottom()
	if len(fcs) != n {
		t.Fatalf("%d forecasts for %d nodes", len(fcs), n)
	}
	for i := range n {
		bottoms := st.Bottoms(i)
		f := fcs[i]
		if len(f.Mean) != horizon {
			t.Fatalf("%s: %d steps, want %d", p.nodes[i].Key, len(f.Mean), horizon)
		}
		for h := range f.Mean {
			sum := 0.0
			for _, j := range bottoms {
				sum += fcs[n-m+j].Mean[h]
			}
			if math.Abs(sum-f.Mean[h]) > 1e-6*math.Max(1, math.Abs(sum)) {
				t.Errorf("%s step %d: forecast %v, its products add to %v", p.nodes[i].Key, h, f.Mean[h], sum)
			}
			if f.Mean[h] < 0 {
				t.Errorf("%s step %d: negative forecast %v", p.nodes[i].Key, h, f.Mean[h])
			}
		}
		ps := f.SamplePaths()
		if len(ps) != paths {
			t.Fatalf("%s: %d sample paths, want %d", p.nodes[i].Key, len(ps), paths)
		}
		for k := range ps {
			for h := range ps[k] {
				sum := 0.0
				for _, j := range bottoms {
					sum += fcs[n-m+j].SamplePaths()[k][h]
				}
				if math.Abs(sum-ps[k][h]) > 1e-6*math.Max(1, math.Abs(sum)) {
					t.Fatalf("%s path %d step %d: %v, its products add to %v", p.nodes[i].Key, k, h, ps[k][h], sum)
				}
				if ps[k][h] < -1e-9*math.Max(1, math.Abs(f.Mean[h])) {
					t.Fatalf("%s path %d step %d: negative value %v", p.nodes[i].Key, k, h, ps[k][h])
				}
			}
		}
	}
}

// checkBacktest recomputes the backtest's scores from the data and the
// reconciled sample paths: the origins are Decembers, one year apart,
// ending a year before the data; each origin's forecasts are coherent;
// the bands of annual totals and of months are the 10% and 90% quantiles
// of the paths (type 7, recomputed here); and the per-level counts and
// the printed table agree with these.
func checkBacktest(t *testing.T, p *plan, opt options, text string) {
	t.Helper()
	c := p.check
	st := p.structure
	n := p.nodes[0].Len()
	if len(c.origins) != opt.Origins {
		t.Fatalf("%d origins, want %d", len(c.origins), opt.Origins)
	}
	type tally struct {
		years, yearsIn, months, monthsIn int
		absPct, signedPct, naivePct      float64
	}
	levels := make([]tally, st.NumLevels()+1)
	for k, o := range c.origins {
		end := n - horizon*(opt.Origins-k)
		if want := p.nodes[0].Time(end - 1); !o.origin.Equal(want) || o.origin.Month() != 12 {
			t.Errorf("origin %d is %v, want %v (a December)", k, o.origin, want)
		}
		checkCoherent(t, p, o.forecasts, opt.Paths)
		for i, y := range p.nodes {
			f := o.forecasts[i]
			if !f.Start.Equal(y.Time(end)) {
				t.Errorf("origin %v, %s: forecast starts %v", o.origin, y.Key, f.Start)
			}
			future := y.Values[end : end+horizon]
			total := 0.0
			for _, v := range future {
				total += v
			}
			sums := make([]float64, len(f.SamplePaths()))
			monthsIn := 0
			for h, v := range future {
				col := make([]float64, len(sums))
				for k, path := range f.SamplePaths() {
					col[k] = path[h]
					sums[k] += path[h]
				}
				if lo, hi := quantile7(col, 0.1), quantile7(col, 0.9); v >= lo && v <= hi {
					monthsIn++
				}
			}
			lo, hi := quantile7(sums, 0.1), quantile7(sums, 0.9)
			if !close(o.lo[i], lo) || !close(o.hi[i], hi) || !close(o.total[i], total) {
				t.Errorf("origin %v, %s: annual %v in [%v, %v], recomputed %v in [%v, %v]", o.origin, y.Key, o.total[i], o.lo[i], o.hi[i], total, lo, hi)
			}
			in := total >= lo && total <= hi
			if o.inside[i] != in || o.months[i] != monthsIn {
				t.Errorf("origin %v, %s: inside %v, %d months; recomputed %v, %d", o.origin, y.Key, o.inside[i], o.months[i], in, monthsIn)
			}
			fc := 0.0
			for _, v := range f.Mean {
				fc += v
			}
			lastYear := 0.0
			for _, v := range y.Values[end-12 : end] {
				lastYear += v
			}
			for _, lv := range []int{st.Level(i), st.NumLevels()} {
				levels[lv].years++
				levels[lv].absPct += 100 * math.Abs(fc-total) / total / float64(opt.Origins*len(levelNodes(st, lv)))
				levels[lv].signedPct += 100 * (fc - total) / total / float64(opt.Origins*len(levelNodes(st, lv)))
				levels[lv].naivePct += 100 * math.Abs(lastYear-total) / total / float64(opt.Origins*len(levelNodes(st, lv)))
				levels[lv].months += horizon
				levels[lv].monthsIn += monthsIn
				if in {
					levels[lv].yearsIn++
				}
			}
		}
	}
	if len(c.levels) != len(levels) {
		t.Fatalf("%d level scores, want %d", len(c.levels), len(levels))
	}
	_, table, _ := strings.Cut(text, "Do the plan's bands hold?")
	for lv, want := range levels {
		s := c.levels[lv]
		if s.years != want.years || s.yearsInside != want.yearsIn || s.months != want.months || s.monthsInside != want.monthsIn {
			t.Errorf("%s: %d of %d years, %d of %d months; recomputed %d of %d, %d of %d",
				s.name, s.yearsInside, s.years, s.monthsInside, s.months, want.yearsIn, want.years, want.monthsIn, want.months)
		}
		if !closeTo(s.pctErr, want.absPct, 1e-9) || !closeTo(s.bias, want.signedPct, 1e-9) || !closeTo(s.naivePctErr, want.naivePct, 1e-9) {
			t.Errorf("%s: annual totals off by %v%% (signed %v%%), as a year before %v%%; recomputed %v%%, %v%%, %v%%",
				s.name, s.pctErr, s.bias, s.naivePctErr, want.absPct, want.signedPct, want.naivePct)
		}
		row := fmt.Sprintf("%d of %d (%.0f%%)", want.yearsIn, want.years, 100*float64(want.yearsIn)/float64(want.years))
		if !slices.ContainsFunc(strings.Split(table, "\n"), func(l string) bool {
			return strings.Contains(l, s.name) && strings.Contains(l, row)
		}) {
			t.Errorf("the printed table has no line for %s with %q", s.name, row)
		}
	}
}

// quantile7 is the p-quantile of xs by linear interpolation between order
// statistics (Hyndman & Fan 1996, type 7; common practice), computed here
// independently of the library.
func quantile7(xs []float64, p float64) float64 {
	s := slices.Clone(xs)
	slices.Sort(s)
	pos := p * float64(len(s)-1)
	i := int(pos)
	if i+1 >= len(s) {
		return s[len(s)-1]
	}
	return s[i] + (pos-float64(i))*(s[i+1]-s[i])
}

func close(a, b float64) bool { return closeTo(a, b, 1e-9) }

func closeTo(a, b, tol float64) bool { return math.Abs(a-b) <= tol*math.Max(1, math.Abs(b)) }

// levelNodes returns the nodes of level lv, or every node for lv =
// NumLevels (the "every series" row).
func levelNodes(st reconcile.Structure, lv int) []int {
	if lv < st.NumLevels() {
		return st.LevelNodes(lv)
	}
	all := make([]int, st.Len())
	for i := range all {
		all[i] = i
	}
	return all
}

// TestQuickstartCompare runs the comparison of the plan's way with the
// models' own bands and with independent paths (flag -compare) on a
// small subset: its table has a row per way, and the plan's row repeats
// the counts of the plan's own backtest.
func TestQuickstartCompare(t *testing.T) {
	var out bytes.Buffer
	opt := options{Paths: 100, Origins: 1, Categories: []string{"tools"}, LinesPerCategory: 2, ReviewDir: t.TempDir(), Compare: true}
	p, err := run(context.Background(), &out, opt)
	if err != nil {
		t.Fatal(err)
	}
	_, table, ok := strings.Cut(out.String(), "The same backtest made other ways")
	if !ok {
		t.Fatalf("no comparison in the output:\n%s", out.String())
	}
	rows := strings.Split(table, "\n")
	if len(rows) < 5 {
		t.Fatalf("comparison table too short:\n%s", table)
	}
	for k, name := range []string{"the plan (calibrated, joint paths)", "models' own bands, joint paths", "calibrated bands, independent paths"} {
		if !strings.Contains(rows[2+k], name) {
			t.Errorf("row %d is %q, want one for %s", k, rows[2+k], name)
		}
	}
	for _, s := range p.check.levels {
		if c := share(s.yearsInside, s.years); !strings.Contains(rows[2], c) {
			t.Errorf("the plan's row %q lacks %s's %s", rows[2], s.name, c)
		}
	}
}

// TestQuickstartOptions checks that options the data cannot support are
// refused with an error wrapping the library's sentinel, before anything
// is fitted.
func TestQuickstartOptions(t *testing.T) {
	for _, tc := range []struct {
		name string
		opt  options
		want error
	}{
		{"no origins", options{Paths: 100, Origins: 0}, almanac.ErrInvalid},
		{"origins beyond the data", options{Paths: 100, Origins: 5}, almanac.ErrTooShort},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tc.opt.ReviewDir = t.TempDir()
			_, err := run(context.Background(), io.Discard, tc.opt)
			if !errors.Is(err, tc.want) {
				t.Errorf("error %v, want one wrapping %v", err, tc.want)
			}
		})
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
	rows, charts, filled, untested := 0, 0, 0, 0
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
				if strings.Contains(a.Value, "untested") {
					untested++
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
	if untested > 0 {
		t.Errorf("review page: %d series marked as having no backtest", untested)
	}
}
