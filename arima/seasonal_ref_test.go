package arima

import (
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// The "stl" fixture here (testdata/reference/stl_co2_swin7.json, copied
// unchanged from ../shared/reference/decompose/) checks SeasonalStrength
// end to end: the package's one data-driven test in reference_test.go
// runs it.
func init() { handlers["stl"] = checkStrengthFromSTL }

// checkStrengthFromSTL computes the seasonal strength
// F_s = max(0, 1 − Var(R)/Var(S+R)) (Wang, Smith & Hyndman 2006) from the
// seasonal and remainder components printed by R 4.2.2 stats::stl in the
// fixture, and compares SeasonalStrength on the fixture's input with it.
// Only fixtures made with the settings SeasonalStrength uses (non-robust,
// not periodic, seasonal degree 0, R's default jumps, trend and low-pass
// spans) can be checked; any other fails loudly rather than being skipped.
// Tolerance 1e-8 relative: the fixture's components agree with R to 1e-9,
// and F_s is a ratio of their variances.
func checkStrengthFromSTL(t *testing.T, f *reftest.Fixture) {
	if f.String("spec.jumps") != "R defaults: ceiling(window/10)" {
		t.Fatalf("fixture jumps %q: SeasonalStrength uses R's default jumps", f.String("spec.jumps"))
	}
	robust, _ := f.Get("spec.robust")
	periodic, _ := f.Get("spec.periodic")
	if robust != false || periodic != false || f.Float(t, "spec.s_degree") != 0 {
		t.Fatalf("fixture is robust=%v periodic=%v s_degree=%v: SeasonalStrength uses a non-robust, non-periodic fit of seasonal degree 0", robust, periodic, f.Float(t, "spec.s_degree"))
	}
	x := f.Floats(t, "input")
	period := int(f.Float(t, "spec.period"))
	span := int(f.Float(t, "spec.s_window"))
	s := f.Floats(t, "expect.seasonal")
	r := f.Floats(t, "expect.remainder")
	sr := make([]float64, len(s))
	for i := range s {
		sr[i] = s[i] + r[i]
	}
	want := max(0, 1-selVariance(r)/selVariance(sr))
	got, err := SeasonalStrength(x, period, span)
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "seasonal strength", got, want, 0, 1e-8)
}
