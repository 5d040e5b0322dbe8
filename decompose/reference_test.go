package decompose_test

import (
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestReference is the package's one data-driven reference test. It runs
// every fixture in testdata/reference (the shared reference set, copied
// unchanged, and the extra fixtures written by
// testdata/refgen/extra_fixtures.R), dispatched on kind:
//
//   - stl: R 4.2.2 stats::stl (the Fortran of Cleveland et al. 1990).
//     The call's explicit arguments (every spec key ending in _arg,
//     s.degree and the jumps) are passed, everything else is left to our
//     defaults, which must resolve to the parameters R reports; seasonal,
//     trend, remainder and weights within the fixture's tolerances.
//   - classical_decomposition: R 4.2.2 stats::decompose, additive and
//     multiplicative; trend, seasonal, figure and random within the
//     fixture's tolerances.
//
// Any R frequency and a series without dates (start c(1, 1)) are
// accepted: the period comes from spec.period and the dates are used only
// to build the Series. A fixture of any other kind fails.
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"stl":                     checkSTL,
		"classical_decomposition": checkClassical,
	})
}

// fixtureSeries builds the Series of a fixture's input. R's tsp start
// (year or cycle, position) becomes a date for the frequencies that have a
// calendar form here (1, 2, 3, 4, 6, 12 and 52 per year); any other
// frequency, and a series without dates, gets daily steps from
// 2000-01-01: the checks take the period from spec.period and never use
// the dates.
func fixtureSeries(t *testing.T, f *reftest.Fixture) almanac.Series {
	t.Helper()
	y := almanac.Series{Key: f.Case, Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Daily, Values: f.Floats(t, "input")}
	v, _ := f.Get("dataset.frequency")
	freq, ok := v.(float64)
	if !ok || !f.Has("dataset.start.0") || !f.Has("dataset.start.1") {
		return y // a frequency given by name, or no start: no dates needed
	}
	year, pos := int(f.Float(t, "dataset.start.0")), int(f.Float(t, "dataset.start.1"))
	switch freq {
	case 1, 2, 3, 4, 6, 12:
		months := 12 / int(freq)
		y.Freq = calendar.Every(months, calendar.Month)
		y.Start = time.Date(year, time.Month(1+(pos-1)*months), 1, 0, 0, 0, 0, time.UTC)
	case 52:
		y.Freq = calendar.Weekly
		y.Start = time.Date(year, time.January, 1, 0, 0, 0, 0, time.UTC).AddDate(0, 0, 7*(pos-1))
	}
	return y
}

func specBool(f *reftest.Fixture, key string) bool {
	v, _ := f.Get("spec." + key)
	b, _ := v.(bool)
	return b
}

func degree(d float64) decompose.Degree {
	if d == 0 {
		return decompose.Constant
	}
	return decompose.Linear
}

// oddAtLeast3 is what the authors' Fortran does to every span (README of
// the shared reference: "Inside the Fortran every span is raised to at
// least 3 and to the next odd number; the values in spec are R's"), so
// R's reported spans are compared after the same step.
func oddAtLeast3(w int) int {
	w = max(w, 3)
	if w%2 == 0 {
		w++
	}
	return w
}

// stlArgs applies the call's explicit arguments, the spec keys ending in
// _arg (R's argument name with dots as underscores), to spec. An argument
// this test does not know fails: it would otherwise be silently left to
// our default.
func stlArgs(t *testing.T, f *reftest.Fixture, spec *decompose.STL) {
	t.Helper()
	v, _ := f.Get("spec")
	m, _ := v.(map[string]any)
	for key, raw := range m {
		if !strings.HasSuffix(key, "_arg") {
			continue
		}
		arg := strings.TrimSuffix(key, "_arg")
		if arg == "s_window" {
			if s, ok := raw.(string); ok {
				if s != "periodic" {
					t.Fatalf("s_window_arg %q", s)
				}
				spec.Periodic = true
				continue
			}
		}
		if arg == "robust" {
			b, ok := raw.(bool)
			if !ok {
				t.Fatalf("robust_arg %v is not a boolean", raw)
			}
			spec.Robust = b
			continue
		}
		x, ok := raw.(float64)
		if !ok {
			t.Fatalf("spec.%s = %v is not a number", key, raw)
		}
		n := int(x)
		switch arg {
		case "s_window":
			spec.SeasonalWindow = n
		case "t_window":
			spec.TrendWindow = n
		case "l_window":
			spec.LowPassWindow = n
		case "s_degree":
			spec.SeasonalDegree = degree(x)
		case "t_degree":
			spec.TrendDegree = degree(x)
		case "l_degree":
			spec.LowPassDegree = degree(x)
		case "s_jump":
			spec.SeasonalJump = n
		case "t_jump":
			spec.TrendJump = n
		case "l_jump":
			spec.LowPassJump = n
		case "inner":
			spec.Inner = n
		case "outer":
			spec.Outer = n
		default:
			t.Fatalf("fixture passes %s = %v to stl; this test does not know how to pass it", strings.ReplaceAll(arg, "_", "."), raw)
		}
	}
}

func checkSTL(t *testing.T, f *reftest.Fixture) {
	y := fixtureSeries(t, f)
	spec := decompose.STL{
		Period:   int(f.Float(t, "spec.period")),
		Periodic: specBool(f, "periodic"),
		Robust:   specBool(f, "robust"),
		// The shared fixtures pass s.degree without an s_degree_arg key;
		// R's resolved value is the argument (its default is 0).
		SeasonalDegree: degree(f.Float(t, "spec.s_degree")),
	}
	if f.String("spec.jumps") == "all 1" {
		spec.SeasonalJump, spec.TrendJump, spec.LowPassJump = 1, 1, 1
	}
	stlArgs(t, f, &spec)
	// Everything else is left to our defaults, which must reproduce the
	// parameters R reported (fit$win, fit$deg, fit$jump, fit$inner,
	// fit$outer).
	d, err := spec.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	got := d.Settings[0]
	outer := int(f.Float(t, "spec.outer"))
	want := decompose.STL{
		Period: spec.Period, SeasonalWindow: oddAtLeast3(int(f.Float(t, "spec.s_window"))), Periodic: spec.Periodic,
		SeasonalDegree: degree(f.Float(t, "spec.s_degree")), TrendWindow: oddAtLeast3(int(f.Float(t, "spec.t_window"))),
		TrendDegree: degree(f.Float(t, "spec.t_degree")), LowPassWindow: oddAtLeast3(int(f.Float(t, "spec.l_window"))),
		LowPassDegree: degree(f.Float(t, "spec.l_degree")), SeasonalJump: int(f.Float(t, "spec.s_jump")),
		TrendJump: int(f.Float(t, "spec.t_jump")), LowPassJump: int(f.Float(t, "spec.l_jump")),
		// R runs robustness passes whenever outer > 0.
		Robust: outer > 0, Inner: int(f.Float(t, "spec.inner")), Outer: outer,
	}
	if got != want {
		t.Errorf("settings used:\n got %+v\nR used %+v", got, want)
	}
	compare(t, f, map[string][]float64{"seasonal": d.Seasonal, "trend": d.Trend, "remainder": d.Remainder, "weights": d.Weights})
}

func checkClassical(t *testing.T, f *reftest.Fixture) {
	y := fixtureSeries(t, f)
	typ := f.String("spec.type")
	if typ != "additive" && typ != "multiplicative" {
		t.Fatalf("spec.type %q", typ)
	}
	c := decompose.Classical{Period: int(f.Float(t, "spec.period")), Multiplicative: typ == "multiplicative"}
	d, err := c.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	compare(t, f, map[string][]float64{"trend": d.Trend, "seasonal": d.Seasonal, "figure": d.Figure, "random": d.Remainder})
}

// compare checks every expected component against ours with the
// fixture's own tolerance for it.
func compare(t *testing.T, f *reftest.Fixture, got map[string][]float64) {
	t.Helper()
	for _, name := range []string{"seasonal", "trend", "remainder", "weights", "figure", "random"} {
		g, ok := got[name]
		if !ok {
			continue
		}
		if !f.Has("expect." + name) {
			t.Errorf("fixture has no expect.%s", name)
			continue
		}
		want := f.Floats(t, "expect."+name)
		tol := f.ToleranceAt(t, name)
		if tol.Informative {
			t.Logf("%s: %v; not compared", name, tol)
			continue
		}
		numtest.Slice(t, fmt.Sprintf("%s (%v)", name, tol), g, want, tol.Abs, tol.Rel)
	}
}
