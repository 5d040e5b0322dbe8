package almanac_test

import (
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestReference runs every fixture in testdata/reference (copied unchanged
// from the shared reference set; source and call are logged per case).
func TestReference(t *testing.T) {
	reftest.Run(t, "testdata/reference", map[string]reftest.Handler{
		"boxcox": checkBoxCoxFixture,
	})
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
	// The default search interval [-1, 2] contains scipy's maximiser too.
	lamDef, err := almanac.LambdaML(x, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "lambda_mle (default interval)", lamDef, lamRef, lamAbs, lamRel)
}
