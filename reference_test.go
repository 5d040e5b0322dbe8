package almanac_test

import (
	"context"
	"math"
	"strconv"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestReference runs every fixture in testdata/reference (copied unchanged
// from the shared reference set; source and call are logged per case).
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"boxcox":            checkBoxCoxFixture,
		"accuracy_measures": checkBenchmarkForecastFixture,
	})
}

// checkBenchmarkForecastFixture checks the benchmark forecasts stored as
// inputs of an accuracy fixture (M3 open data; forecasts, standard
// deviations, 95% bounds and quantiles computed with numpy/scipy by the
// fixture generator: "seasonal naive (m > 1) or naive from the in-sample
// part; sd from the RMS of in-sample lag-m differences times sqrt(number
// of seasons ahead)"). That is our SeasonalNaive / Naive with σ̂² = Σe²/R,
// K = 0. The error measures themselves belong to the accuracy package.
func checkBenchmarkForecastFixture(t *testing.T, f *reftest.Fixture) {
	abs, rel, ok := f.Tol("*")
	if !ok {
		t.Fatal("fixture has no tolerance")
	}
	insample := f.Floats(t, "spec.insample")
	m := int(f.Float(t, "spec.m"))
	level := f.Float(t, "spec.level")
	want := f.Floats(t, "spec.forecast")
	h := len(want)
	freq := calendar.Monthly
	var model almanac.Model = almanac.SeasonalNaive{Period: m}
	if m == 1 {
		freq, model = calendar.Yearly, almanac.Naive{}
	}
	y := almanac.Series{Key: f.Case, Start: time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC), Freq: freq, Values: insample}
	fit, err := model.Fit(context.Background(), y)
	if err != nil {
		t.Fatal(err)
	}
	fc, err := fit.Forecast(h, level)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "forecast", fc.Mean, want, abs, rel)
	numtest.Slice(t, "sd", fc.Dist.(*almanac.Normal).SD, f.Floats(t, "spec.sd"), abs, rel)
	lo, hi, err := fc.Bounds(level)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "lower", lo, f.Floats(t, "spec.lower"), abs, rel)
	numtest.Slice(t, "upper", hi, f.Floats(t, "spec.upper"), abs, rel)
	for _, p := range []string{"0.1", "0.5", "0.9"} {
		prob, _ := strconv.ParseFloat(p, 64)
		q, err := fc.Quantile(prob)
		if err != nil {
			t.Fatal(err)
		}
		v, _ := f.Get("spec.quantiles")
		arr := v.(map[string]any)[p].([]any)
		wantQ := make([]float64, len(arr))
		for i, x := range arr {
			wantQ[i] = x.(float64)
		}
		numtest.Slice(t, "quantile "+p, q, wantQ, abs, rel)
	}
}

// checkBoxCoxFixture checks the transform and the log-likelihood against
// scipy 1.10.1 (scipy.stats.boxcox, scipy.stats.boxcox_llf) on the grid
// and at scipy's lambda, and our maximum-likelihood lambda against
// scipy.stats.boxcox_normmax(method="mle") as a bar on the log-likelihood.
func checkBoxCoxFixture(t *testing.T, f *reftest.Fixture) {
	x := f.Floats(t, "input")
	grid, ok := f.Get("expect.grid")
	if !ok {
		t.Fatal("fixture has no expect.grid")
	}
	llfAbs, llfRel, ok := f.Tol("grid.llf")
	if !ok {
		t.Fatal("fixture has no tolerance for grid.llf")
	}
	trAbs, trRel, ok := f.Tol("transformed")
	if !ok {
		t.Fatal("fixture has no tolerance for transformed")
	}
	n := len(grid.([]any))
	if n == 0 {
		t.Fatal("empty grid")
	}
	for i := range n {
		p := "expect.grid." + itoa(i)
		lam := f.Float(t, p+".lambda")
		// scipy.stats.boxcox_llf(lambda, x)
		llf, err := almanac.BoxCoxLLF(x, lam)
		if err != nil {
			t.Fatalf("BoxCoxLLF(%v): %v", lam, err)
		}
		numtest.Scalar(t, "llf at lambda "+ftoa(lam), llf, f.Float(t, p+".llf"), llfAbs, llfRel)
		// scipy.stats.boxcox(x, lmbda=lambda)
		z, err := almanac.BoxCoxTransform(nil, x, lam)
		if err != nil {
			t.Fatalf("BoxCoxTransform(%v): %v", lam, err)
		}
		numtest.Slice(t, "transform at lambda "+ftoa(lam), z, f.Floats(t, p+".transformed"), trAbs, trRel)
		// The inverse must give the data back (identity, not a reference value).
		back, err := almanac.BoxCoxInverse(nil, z, lam)
		if err != nil {
			t.Fatal(err)
		}
		numtest.Slice(t, "inverse at lambda "+ftoa(lam), back, x, 0, 1e-12)
	}

	// At scipy's own maximiser: transform and llf.
	lamRef := f.Float(t, "expect.lambda_mle")
	llfRef := f.Float(t, "expect.llf_at_lambda_mle")
	z, err := almanac.BoxCoxTransform(nil, x, lamRef)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Slice(t, "transform at scipy's lambda_mle", z, f.Floats(t, "expect.transformed_at_lambda_mle"), trAbs, trRel)
	llf, err := almanac.BoxCoxLLF(x, lamRef)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "llf at scipy's lambda_mle", llf, llfRef, llfAbs, llfRel)

	// Our maximiser: bar "go_llf >= expect - 1e-9 * abs(expect)" (fixture
	// tolerance llf_at_lambda_mle), and lambda within the fixture's
	// lambda_mle tolerance.
	lam, err := almanac.LambdaML(x, -2, 2) // scipy's bracket (-2, 2)
	if err != nil {
		t.Fatal(err)
	}
	got, err := almanac.BoxCoxLLF(x, lam)
	if err != nil {
		t.Fatal(err)
	}
	if got < llfRef-1e-9*math.Abs(llfRef) {
		t.Errorf("llf at our lambda %.17g = %.17g, below the bar %.17g (scipy's maximum)", lam, got, llfRef)
	}
	lamAbs, lamRel, ok := f.Tol("lambda_mle")
	if !ok {
		t.Fatal("fixture has no tolerance for lambda_mle")
	}
	numtest.Scalar(t, "lambda_mle", lam, lamRef, lamAbs, lamRel)
	// The default search interval [0, 2] contains scipy's maximiser too.
	lamDef, err := almanac.LambdaML(x, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "lambda_mle (default interval)", lamDef, lamRef, lamAbs, lamRel)
}
