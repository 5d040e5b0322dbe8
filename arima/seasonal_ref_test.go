package arima

import (
	"math"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
	"github.com/almanac-go/almanac/internal/stl"
)

// The "stl" fixture here (testdata/reference/stl_co2_swin7.json, copied
// unchanged from ../shared/reference/decompose/) checks SeasonalStrength
// end to end: the package's one data-driven test in reference_test.go
// runs it.
func init() { handlers["stl"] = checkStrengthFromSTL }

// checkStrengthFromSTL checks the seasonal strength
// F_s = max(0, 1 − Var(R)/Var(S+R)) (Wang, Smith & Hyndman 2006) against
// the same formula applied to the seasonal and remainder components that
// R 4.2.2 stats::stl printed in the fixture (the call is in the fixture).
//
// Any stl fixture is accepted: the decomposition is run with the
// parameters R used (spec: windows, degrees, jumps, inner and outer
// passes, periodic), which are what the call's explicit arguments
// (spec.*_arg) and R's defaults give. When those are the settings
// SeasonalStrength uses (R's defaults for a non-robust, non-periodic fit
// with the given s.window and no other explicit argument), the public
// SeasonalStrength is checked as well.
//
// Tolerance: derived from the fixture's component tolerances (each
// component within abs·max|x| + rel·|value|, the fixture's rule): a
// perturbation of at most δ per value moves a variance V by at most
// 2√V·δ' + δ'² with δ' = δ·√(n/(n−1)), and F_s = 1 − a/b by at most
// Δa/b + a·Δb/b² to first order; twice that bound is used.
func checkStrengthFromSTL(t *testing.T, f *reftest.Fixture) {
	x := f.Floats(t, "input")
	sp, _ := f.Get("spec")
	spec := sp.(map[string]any)
	num := func(key string) int { return int(f.Float(t, "spec."+key)) }
	periodic, _ := spec["periodic"].(bool)
	robust, _ := spec["robust"].(bool)
	p := stl.Params{
		Period: num("period"), Periodic: periodic,
		SWindow: num("s_window"), SDegree: num("s_degree"), SJump: num("s_jump"),
		TWindow: num("t_window"), TDegree: num("t_degree"), TJump: num("t_jump"),
		LWindow: num("l_window"), LDegree: num("l_degree"), LJump: num("l_jump"),
		Inner: num("inner"), Outer: num("outer"),
	}
	for key := range spec {
		if strings.HasSuffix(key, "_arg") && key != "s_window_arg" && key != "t_window_arg" && key != "s_degree_arg" && key != "robust_arg" {
			t.Fatalf("spec.%s: an explicit stl argument this test does not know", key)
		}
	}
	s := f.Floats(t, "expect.seasonal")
	r := f.Floats(t, "expect.remainder")
	want, err := strengthOf(append([]float64(nil), s...), r)
	if err != nil {
		t.Fatal(err)
	}
	got, err := strengthWith(x, p)
	if err != nil {
		t.Fatal(err)
	}
	tolF := strengthTol(t, f, x, s, r)
	t.Logf("F_s %.12f (R components %.12f), tolerance %.3g", got, want, tolF)
	numtest.Scalar(t, "seasonal strength (R's settings)", got, want, tolF, 0)

	// The public function uses R's defaults for a non-robust fit with the
	// given seasonal span: check it when the fixture was made that way.
	sw, swNumeric := spec["s_window_arg"].(float64)
	_, tw := spec["t_window_arg"]
	_, sd := spec["s_degree_arg"]
	if !swNumeric || tw || sd || robust || periodic {
		t.Logf("fixture settings differ from SeasonalStrength's; only the strength at R's settings is checked")
		return
	}
	if def := stl.Defaults(len(x), p.Period, int(sw), false, false); def != p {
		t.Fatalf("fixture parameters %+v differ from R's defaults %+v for s.window = %v", p, def, sw)
	}
	pub, err := SeasonalStrength(x, p.Period, int(sw))
	if err != nil {
		t.Fatal(err)
	}
	numtest.Scalar(t, "SeasonalStrength", pub, want, tolF, 0)
}

// strengthTol is the tolerance on F_s implied by the fixture's
// tolerances on the seasonal and remainder components (see
// checkStrengthFromSTL).
func strengthTol(t *testing.T, f *reftest.Fixture, x, s, r []float64) float64 {
	maxX := 0.0
	for _, v := range x {
		maxX = math.Max(maxX, math.Abs(v))
	}
	delta := func(key string, v []float64) float64 {
		a, rel, ok := f.Tol(key)
		if !ok {
			t.Fatalf("fixture has no tolerance for %q", key)
		}
		d := 0.0
		for _, x := range v {
			d = math.Max(d, a*maxX+rel*math.Abs(x))
		}
		return d
	}
	n := float64(len(r))
	dr := delta("remainder", r) * math.Sqrt(n/(n-1))
	sr := make([]float64, len(s))
	for i := range s {
		sr[i] = s[i] + r[i]
	}
	dsr := (delta("seasonal", s) + delta("remainder", r)) * math.Sqrt(n/(n-1))
	a, b := selVariance(r), selVariance(sr)
	da := 2*math.Sqrt(a)*dr + dr*dr
	db := 2*math.Sqrt(b)*dsr + dsr*dsr
	return 2 * (da/b + a*db/(b*b))
}
