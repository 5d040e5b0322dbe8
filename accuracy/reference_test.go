package accuracy_test

import (
	"context"
	"fmt"
	"maps"
	"slices"
	"strconv"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/internal/seasonal"
)

// TestReference is the one data-driven reference test of the package: it
// runs every fixture in testdata/reference (copied unchanged from the
// shared reference set, plus the extra fixtures written by
// ../decompose/testdata/refgen/extra_fixtures.R: a weekly series of R
// frequency 52 and series without dates) and dispatches on its kind. A
// kind without a handler fails. Tolerances come from each fixture only
// (a key naming an object applies to everything inside it).
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"accuracy_measures": checkMeasures,
		"acf_pacf":          checkACF,
		"portmanteau":       checkPortmanteau,
		// Naive2's seasonal indices come from a classical multiplicative
		// decomposition (internal/seasonal); checked against R's
		// decompose, additive or multiplicative.
		"classical_decomposition": checkClassical,
	})
}

// tol returns the fixture's tolerance for the quantity at path below
// expect: the entry for the path, its parents, or "*" (reftest.ToleranceAt;
// a fixture without any fails). An informative-only entry is not a
// pass/fail criterion; the caller skips the comparison.
func tol(t *testing.T, f *reftest.Fixture, path string) (abs, rel float64, compare bool) {
	t.Helper()
	tl := f.ToleranceAt(t, path)
	if tl.Informative {
		t.Logf("%s: %v; not compared", path, tl)
		return 0, 0, false
	}
	return tl.Abs, tl.Rel, true
}

// checkMeasures: kind accuracy_measures. Reference: numpy/scipy evaluating
// the published definitions stated in each fixture's spec.formulas (M3
// sMAPE, Makridakis & Hibon 2000; MASE, Hyndman & Koehler 2006; RMSSE, M5;
// interval score, Gneiting & Raftery 2007; MSIS, M4; CRPS of a normal,
// Gneiting et al. 2005) on M3 series.
func checkMeasures(t *testing.T, f *reftest.Fixture) {
	ins := f.Floats(t, "spec.insample")
	act := f.Floats(t, "spec.actual")
	fc := f.Floats(t, "spec.forecast")
	m := int(f.Float(t, "spec.m"))
	level := f.Float(t, "spec.level")
	lo := f.Floats(t, "spec.lower")
	hi := f.Floats(t, "spec.upper")
	sd := f.Floats(t, "spec.sd")

	point := []struct {
		key string
		fn  func() (float64, error)
	}{
		{"me", func() (float64, error) { return accuracy.ME(act, fc) }},
		{"mae", func() (float64, error) { return accuracy.MAE(act, fc) }},
		{"mse", func() (float64, error) { return accuracy.MSE(act, fc) }},
		{"rmse", func() (float64, error) { return accuracy.RMSE(act, fc) }},
		{"mape", func() (float64, error) { return accuracy.MAPE(act, fc) }},
		{"smape", func() (float64, error) { return accuracy.SMAPE(act, fc) }},
		{"mdae", func() (float64, error) { return accuracy.MdAE(act, fc) }},
		{"mase", func() (float64, error) { return accuracy.MASE(act, fc, ins, m) }},
		{"rmsse", func() (float64, error) { return accuracy.RMSSE(act, fc, ins, m) }},
		{"coverage", func() (float64, error) { return accuracy.Coverage(act, lo, hi) }},
		{"interval_score", func() (float64, error) { return accuracy.IntervalScore(act, lo, hi, level) }},
		{"msis", func() (float64, error) { return accuracy.MSIS(act, lo, hi, level, ins, m) }},
		{"crps_normal", func() (float64, error) { return accuracy.CRPSNormal(act, fc, sd) }},
	}
	for _, p := range point {
		got, err := p.fn()
		if err != nil {
			t.Errorf("%s: %v", p.key, err)
			continue
		}
		if abs, rel, ok := tol(t, f, p.key); ok {
			numtest.Scalar(t, p.key, got, f.Float(t, "expect."+p.key), abs, rel)
		}
	}

	// The quantile levels ("0.1", ...) contain dots, so these maps are
	// read whole rather than through dotted paths.
	pins := floatMap(t, f, "expect.pinball")
	qs, _ := f.Get("spec.quantiles")
	qmap, _ := qs.(map[string]any)
	if len(pins) == 0 {
		t.Fatalf("%s: no expect.pinball", f.Case)
	}
	keys := slices.Sorted(maps.Keys(pins))
	for _, key := range keys {
		tau, err := strconv.ParseFloat(key, 64)
		if err != nil {
			t.Fatalf("pinball level %q: %v", key, err)
		}
		raw, _ := qmap[key].([]any)
		if len(raw) != len(act) {
			t.Fatalf("spec.quantiles[%q]: %d values, want %d", key, len(raw), len(act))
		}
		q := make([]float64, len(raw))
		for i, e := range raw {
			q[i] = e.(float64)
		}
		got, err := accuracy.Pinball(act, q, tau)
		if err != nil {
			t.Errorf("pinball %s: %v", key, err)
			continue
		}
		if abs, rel, ok := tol(t, f, "pinball"); ok {
			numtest.Scalar(t, "pinball "+key, got, pins[key], abs, rel)
		}
	}
}

func floatMap(t *testing.T, f *reftest.Fixture, path string) map[string]float64 {
	t.Helper()
	v, _ := f.Get(path)
	m, _ := v.(map[string]any)
	out := make(map[string]float64, len(m))
	for k, e := range m {
		x, ok := e.(float64)
		if !ok {
			t.Fatalf("%s: %s[%q] is %T, not a number", f.Case, path, k, e)
		}
		out[k] = x
	}
	return out
}

// checkACF: kind acf_pacf. Reference: R stats::acf (correlation and
// covariance) and stats::pacf, as named in the fixture's call. The lags
// are plain counts whatever the series' frequency (shared reference
// README).
func checkACF(t *testing.T, f *reftest.Fixture) {
	x := f.Floats(t, "input")
	maxLag := int(f.Float(t, "spec.lag_max"))
	if v, ok := f.Get("spec.demean"); ok && v != true {
		t.Fatalf("spec.demean = %v: the package's ACF always subtracts the mean, as R's acf does by default", v)
	}

	acf, err := accuracy.ACF(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	if abs, rel, ok := tol(t, f, "acf.values"); ok {
		numtest.Slice(t, "acf", acf.Values, f.Floats(t, "expect.acf.values"), abs, rel)
	}
	checkLags(t, "acf lags", acf.Lags, f.Floats(t, "expect.acf.lags"))

	acov, err := accuracy.Autocovariances(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	if abs, rel, ok := tol(t, f, "acov.values"); ok {
		numtest.Slice(t, "acov", acov, f.Floats(t, "expect.acov.values"), abs, rel)
	}

	pacf, err := accuracy.PACF(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	if abs, rel, ok := tol(t, f, "pacf.values"); ok {
		numtest.Slice(t, "pacf", pacf.Values, f.Floats(t, "expect.pacf.values"), abs, rel)
	}
	checkLags(t, "pacf lags", pacf.Lags, f.Floats(t, "expect.pacf.lags"))
}

func checkLags(t *testing.T, name string, got []int, want []float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Errorf("%s: %d lags, want %d", name, len(got), len(want))
		return
	}
	for i := range got {
		if float64(got[i]) != want[i] {
			t.Errorf("%s[%d] = %d, want %v", name, i, got[i], want[i])
		}
	}
}

// checkPortmanteau: kind portmanteau. Reference: R stats::Box.test on the
// stored residuals, one result per (type, lag, fitdf), as in the call.
func checkPortmanteau(t *testing.T, f *reftest.Fixture) {
	x := f.Floats(t, "input")
	v, _ := f.Get("expect.results")
	results, _ := v.([]any)
	if len(results) == 0 {
		t.Fatalf("%s: no expect.results", f.Case)
	}
	for i := range results {
		p := fmt.Sprintf("expect.results.%d.", i)
		kind := f.String(p + "type")
		lag := int(f.Float(t, p+"lag"))
		fitdf := int(f.Float(t, p+"fitdf"))
		t.Run(fmt.Sprintf("%s_lag%d_fitdf%d", kind, lag, fitdf), func(t *testing.T) {
			var got accuracy.Portmanteau
			var err error
			switch kind {
			case "Ljung-Box":
				got, err = accuracy.LjungBox(x, lag, fitdf)
			case "Box-Pierce":
				got, err = accuracy.BoxPierce(x, lag, fitdf)
			default:
				t.Fatalf("unknown test type %q", kind)
			}
			if err != nil {
				t.Fatal(err)
			}
			if got.Kind.String() != kind {
				t.Errorf("kind %v, want %s", got.Kind, kind)
			}
			if float64(got.DF) != f.Float(t, p+"df") {
				t.Errorf("df %d, want %v", got.DF, f.Float(t, p+"df"))
			}
			if abs, rel, ok := tol(t, f, "statistic"); ok {
				numtest.Scalar(t, "statistic", got.Statistic, f.Float(t, p+"statistic"), abs, rel)
			}
			if abs, rel, ok := tol(t, f, "p_value"); ok {
				numtest.Scalar(t, "p_value", got.PValue, f.Float(t, p+"p_value"), abs, rel)
			}
		})
	}
}

// checkClassical: kind classical_decomposition. Reference: R
// stats::decompose(x, type), additive or multiplicative, any frequency
// (the period is spec.period). The decomposition is the one Naive2
// divides by (internal/seasonal, the M4 competition's benchmark:
// classical multiplicative decomposition when the series passes the 90%
// seasonality test); for a multiplicative fixture on which Naive2's test
// finds seasonality, Naive2's indices are checked against R's figure too.
func checkClassical(t *testing.T, f *reftest.Fixture) {
	typ := f.String("spec.type")
	if typ != "additive" && typ != "multiplicative" {
		t.Fatalf("spec.type %q", typ)
	}
	m := int(f.Float(t, "spec.period"))
	x := f.Floats(t, "input")
	r, err := seasonal.Classical(x, m, typ == "multiplicative")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		got  []float64
	}{{"trend", r.Trend}, {"seasonal", r.Seasonal}, {"figure", r.Figure}, {"random", r.Remainder}} {
		if abs, rel, ok := tol(t, f, c.name); ok {
			numtest.Slice(t, c.name, c.got, f.Floats(t, "expect."+c.name), abs, rel)
		}
	}
	if typ != "multiplicative" {
		return
	}
	// The dates do not matter to Naive2 with an explicit period.
	y := almanac.Series{Key: f.Case, Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Daily, Values: x}
	fit, err := accuracy.Naive2{Period: m}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	n2 := fit.(*accuracy.Naive2Fit)
	if !n2.Seasonal() {
		t.Logf("%s: Naive2's seasonality test finds no seasonality; its indices are not used", f.Case)
		return
	}
	if abs, rel, ok := tol(t, f, "figure"); ok {
		numtest.Slice(t, "Naive2 seasonal indices", n2.Indices(), f.Floats(t, "expect.figure"), abs, rel)
	}
}
