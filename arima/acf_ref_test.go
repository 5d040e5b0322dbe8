package arima

import (
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/internal/tsstat"
)

// The "acf_pacf" fixtures (testdata/reference/acf_*.json, copied unchanged
// from ../shared/reference/tests/) check the public ACF and PACF helpers;
// the package's one data-driven test in reference_test.go runs them.
func init() { handlers["acf_pacf"] = checkACFPACF }

// checkACFPACF compares ACF and PACF with R 4.2.2 stats::acf(x, lag.max)
// and stats::pacf(x, lag.max) at the fixture's tolerances (acf 1e-13
// absolute, pacf 1e-11 absolute), lags included, and the autocovariances
// that ACF divides by their lag-0 value (internal/tsstat.Autocov) with
// acf(x, lag.max, type = "covariance") at 1e-12 relative.
func checkACFPACF(t *testing.T, f *reftest.Fixture) {
	x := f.Floats(t, "input")
	maxLag := int(f.Float(t, "spec.lag_max"))
	acf, err := ACF(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	pacf, err := PACF(x, maxLag)
	if err != nil {
		t.Fatal(err)
	}
	acov := tsstat.Autocov(make([]float64, maxLag+1), x, maxLag)
	abs, rel, ok := f.Tol("acov")
	if !ok {
		t.Fatal("no tolerance for acov")
	}
	numtest.Slice(t, "acov", acov, f.Floats(t, "expect.acov.values"), abs, rel)
	for _, c := range []struct {
		key string
		got Correlogram
	}{{"acf", acf}, {"pacf", pacf}} {
		abs, rel, ok := f.Tol(c.key)
		if !ok {
			t.Fatalf("no tolerance for %s", c.key)
		}
		lags := make([]float64, len(c.got.Lags))
		for i, l := range c.got.Lags {
			lags[i] = float64(l)
		}
		numtest.Slice(t, c.key+" lags", lags, f.Floats(t, "expect."+c.key+".lags"), 0, 0)
		numtest.Slice(t, c.key, c.got.Values, f.Floats(t, "expect."+c.key+".values"), abs, rel)
	}
}
