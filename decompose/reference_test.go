package decompose_test

import (
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/decompose"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestReference is the package's one data-driven reference test. It runs
// every fixture in testdata/reference (copied unchanged from the shared
// reference set), dispatched on kind:
//
//   - stl: R 4.2.2 stats::stl (the Fortran of Cleveland et al. 1990), with
//     R's default jumps and with all jumps 1; seasonal, trend, remainder
//     and weights within the fixture's tolerance and within 1e-8 absolute.
//   - classical_decomposition: R 4.2.2 stats::decompose, additive and
//     multiplicative; trend, seasonal, figure and random within the
//     fixture's tolerance and within 1e-8 absolute.
//
// A fixture of any other kind fails.
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"stl":                     checkSTL,
		"classical_decomposition": checkClassical,
	})
}

// fixtureSeries builds the Series of a fixture's input with R's tsp start.
func fixtureSeries(t *testing.T, f *reftest.Fixture) almanac.Series {
	t.Helper()
	freq := int(f.Float(t, "dataset.frequency"))
	year := int(f.Float(t, "dataset.start.0"))
	pos := int(f.Float(t, "dataset.start.1"))
	var fr calendar.Frequency
	var month time.Month
	switch freq {
	case 12:
		fr, month = calendar.Monthly, time.Month(pos)
	case 4:
		fr, month = calendar.Quarterly, time.Month(3*(pos-1)+1)
	default:
		t.Fatalf("fixture frequency %d not handled", freq)
	}
	return almanac.Series{Key: f.Case, Start: time.Date(year, month, 1, 0, 0, 0, 0, time.UTC), Freq: fr, Values: f.Floats(t, "input")}
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

func checkSTL(t *testing.T, f *reftest.Fixture) {
	y := fixtureSeries(t, f)
	spec := decompose.STL{
		Period:         int(f.Float(t, "spec.period")),
		Periodic:       specBool(f, "periodic"),
		Robust:         specBool(f, "robust"),
		SeasonalDegree: degree(f.Float(t, "spec.s_degree")),
	}
	if !spec.Periodic {
		spec.SeasonalWindow = int(f.Float(t, "spec.s_window_arg"))
	}
	if f.String("spec.jumps") == "all 1" {
		spec.SeasonalJump, spec.TrendJump, spec.LowPassJump = 1, 1, 1
	}
	// Everything else is left to our defaults, which must reproduce the
	// parameters R reported (fit$win, fit$deg, fit$jump, fit$inner,
	// fit$outer).
	d, err := spec.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	got := d.Settings[0]
	want := decompose.STL{
		Period: spec.Period, SeasonalWindow: int(f.Float(t, "spec.s_window")), Periodic: spec.Periodic,
		SeasonalDegree: degree(f.Float(t, "spec.s_degree")), TrendWindow: int(f.Float(t, "spec.t_window")),
		TrendDegree: degree(f.Float(t, "spec.t_degree")), LowPassWindow: int(f.Float(t, "spec.l_window")),
		LowPassDegree: degree(f.Float(t, "spec.l_degree")), SeasonalJump: int(f.Float(t, "spec.s_jump")),
		TrendJump: int(f.Float(t, "spec.t_jump")), LowPassJump: int(f.Float(t, "spec.l_jump")),
		Robust: spec.Robust, Inner: int(f.Float(t, "spec.inner")), Outer: int(f.Float(t, "spec.outer")),
	}
	if got != want {
		t.Errorf("settings used:\n got %+v\nR used %+v", got, want)
	}
	compare(t, f, map[string][]float64{"seasonal": d.Seasonal, "trend": d.Trend, "remainder": d.Remainder, "weights": d.Weights})
}

func checkClassical(t *testing.T, f *reftest.Fixture) {
	y := fixtureSeries(t, f)
	c := decompose.Classical{Period: int(f.Float(t, "spec.period")), Multiplicative: f.String("spec.type") == "multiplicative"}
	d, err := c.Decompose(y)
	if err != nil {
		t.Fatal(err)
	}
	compare(t, f, map[string][]float64{"trend": d.Trend, "seasonal": d.Seasonal, "figure": d.Figure, "random": d.Remainder})
}

func compare(t *testing.T, f *reftest.Fixture, got map[string][]float64) {
	t.Helper()
	for _, name := range []string{"seasonal", "trend", "remainder", "weights", "figure", "random"} {
		g, ok := got[name]
		if !ok {
			continue
		}
		want := f.Floats(t, "expect."+name)
		abs, rel, ok := f.Tol(name)
		if !ok {
			t.Fatalf("fixture has no tolerance for %s", name)
		}
		numtest.Slice(t, name, g, want, abs, rel)
		numtest.Slice(t, name+" (1e-8 absolute)", g, want, 1e-8, 0)
	}
}
