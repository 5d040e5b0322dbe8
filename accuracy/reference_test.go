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
)

// TestReference is the one data-driven reference test of the package: it
// runs every fixture in testdata/reference (copied unchanged from the
// shared reference set) and dispatches on its kind. A kind without a
// handler fails.
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"accuracy_measures": checkMeasures,
		"acf_pacf":          checkACF,
		"portmanteau":       checkPortmanteau,
		// Naive2's seasonal indices come from a classical multiplicative
		// decomposition; checked against R's decompose.
		"classical_decomposition": checkNaive2Indices,
	})
}

// tol returns the fixture's tolerance for key, falling back to "*"; a
// fixture without either fails (no silent default).
func tol(t *testing.T, f *reftest.Fixture, key string) (abs, rel float64) {
	t.Helper()
	if a, r, ok := f.Tol(key); ok {
		return a, r
	}
	if a, r, ok := f.Tol("*"); ok {
		return a, r
	}
	t.Fatalf("%s: no tolerance for %q", f.Case, key)
	return 0, 0
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
		abs, rel := tol(t, f, p.key)
		numtest.Scalar(t, p.key, got, f.Float(t, "expect."+p.key), abs, rel)
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
		abs, rel := tol(t, f, "pinball")
		numtest.Scalar(t, "pinball "+key, got, pins[key], abs, rel)
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
// covariance) and stats::pacf, as named in the fixture's call.
func checkACF(t *testing.T, f *reftest.Fixture) {
	x := f.Floats(t, "input")
	maxLag := int(f.Float(t, "spec.lag_max"))

	acf, err := accuracy.ACF(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	abs, rel := tol(t, f, "acf")
	numtest.Slice(t, "acf", acf.Values, f.Floats(t, "expect.acf.values"), abs, rel)
	checkLags(t, "acf lags", acf.Lags, f.Floats(t, "expect.acf.lags"))

	acov, err := accuracy.Autocovariances(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	abs, rel = tol(t, f, "acov")
	numtest.Slice(t, "acov", acov, f.Floats(t, "expect.acov.values"), abs, rel)

	pacf, err := accuracy.PACF(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	abs, rel = tol(t, f, "pacf")
	numtest.Slice(t, "pacf", pacf.Values, f.Floats(t, "expect.pacf.values"), abs, rel)
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
			abs, rel := tol(t, f, "statistic")
			numtest.Scalar(t, "statistic", got.Statistic, f.Float(t, p+"statistic"), abs, rel)
			abs, rel = tol(t, f, "p_value")
			numtest.Scalar(t, "p_value", got.PValue, f.Float(t, p+"p_value"), abs, rel)
		})
	}
}

// checkNaive2Indices: kind classical_decomposition (multiplicative only).
// Reference: R stats::decompose(x, type = "multiplicative"), whose figure
// is the seasonal index set that Naive2 divides by (M4 competition's
// benchmark: classical multiplicative decomposition when the series passes
// the 90% seasonality test).
func checkNaive2Indices(t *testing.T, f *reftest.Fixture) {
	if typ := f.String("spec.type"); typ != "multiplicative" {
		t.Fatalf("%s: Naive2 uses multiplicative decomposition only, fixture has %q", f.Case, typ)
	}
	m := int(f.Float(t, "spec.period"))
	y := almanac.Series{Key: f.Case, Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: f.Floats(t, "input")}
	fit, err := accuracy.Naive2{Period: m}.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	n2 := fit.(*accuracy.Naive2Fit)
	if !n2.Seasonal() {
		t.Fatalf("%s: Naive2 found no seasonality", f.Case)
	}
	abs, rel := tol(t, f, "figure")
	numtest.Slice(t, "seasonal indices", n2.Indices(), f.Floats(t, "expect.figure"), abs, rel)
}
