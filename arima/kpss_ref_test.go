package arima

import (
	"strconv"
	"strings"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// The "kpss" fixtures (testdata/reference/kpss_*.json, copied unchanged
// from ../shared/reference/tests/) are checked by the package's one
// data-driven reference test in reference_test.go; this file registers
// their handler.
func init() { handlers["kpss"] = checkKPSS }

// checkKPSS compares KPSS with statsmodels 0.13.5
// statsmodels.tsa.stattools.kpss(y, regression, nlags), one entry of
// expect.results per (regression, nlags) call, at the fixture's
// tolerances: statistic and p-value to 1e-10 relative, lags exactly,
// critical values exactly (they are the printed table of Kwiatkowski et
// al. 1992), and the statsmodels clipping warning present exactly when
// our Clipped field says the p-value was clipped, on the same side.
func checkKPSS(t *testing.T, f *reftest.Fixture) {
	y := f.Floats(t, "input")
	statAbs, statRel, ok := f.Tol("statistic")
	if !ok {
		t.Fatal("fixture has no tolerance for statistic")
	}
	pAbs, pRel, ok := f.Tol("p_value")
	if !ok {
		t.Fatal("fixture has no tolerance for p_value")
	}
	lagAbs, _, _ := f.Tol("lags")
	res, _ := f.Get("expect.results")
	list, _ := res.([]any)
	if len(list) == 0 {
		t.Fatal("fixture has no expect.results")
	}
	for i := range list {
		base := "expect.results." + strconv.Itoa(i)
		entry, _ := f.Get(base)
		for key := range entry.(map[string]any) {
			if strings.HasSuffix(key, "_arg") && key != "nlags_arg" && key != "regression_arg" {
				t.Fatalf("%s.%s: an explicit kpss argument this test does not know", base, key)
			}
		}
		reg := f.String(base + ".regression")
		if reg == "" {
			reg = f.String(base + ".regression_arg")
		}
		call := f.String(base + ".call")
		t.Run(call, func(t *testing.T) {
			var spec KPSSSpec
			switch reg {
			case "c":
				spec.Null = LevelStationary
			case "ct":
				spec.Null = TrendStationary
			default:
				t.Fatalf("unknown regression %q", reg)
			}
			arg, ok := f.Get(base + ".nlags_arg")
			if !ok {
				arg = "auto" // statsmodels 0.13.5's default nlags
				if v, ok := f.Get(base + ".nlags"); ok {
					arg = v
				}
			}
			switch a := arg.(type) {
			case string:
				switch a {
				case "legacy":
					spec.LagRule = LagLong
				case "auto":
					spec.LagRule = LagDataDependent
				default:
					t.Fatalf("unknown nlags %q", a)
				}
			case float64:
				spec.LagRule, spec.Lags = LagFixed, int(a)
			default:
				t.Fatalf("nlags_arg is %T", arg)
			}
			got, err := KPSS(y, spec)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Scalar(t, "statistic", got.Statistic, f.Float(t, base+".statistic"), statAbs, statRel)
			numtest.Scalar(t, "lags", float64(got.Lags), f.Float(t, base+".lags"), lagAbs, 0)
			numtest.Scalar(t, "p_value", got.PValue, f.Float(t, base+".p_value"), pAbs, pRel)
			// The key "2.5%" holds a dot, so the crit object is read whole
			// rather than through a dotted path.
			critAny, _ := f.Get(base + ".crit")
			crit, _ := critAny.(map[string]any)
			for j, key := range []string{"10%", "5%", "2.5%", "1%"} {
				want, ok := crit[key].(float64)
				if !ok {
					t.Fatalf("crit[%q] missing", key)
				}
				numtest.Scalar(t, "crit "+key, got.Critical[j].Value, want, 0, 0)
			}
			warns, _ := f.Get(base + ".warnings")
			wl, _ := warns.([]any)
			want := NotClipped
			if len(wl) > 0 {
				w, _ := wl[0].(string)
				switch {
				case strings.Contains(w, "greater"):
					want = ClippedAbove
				case strings.Contains(w, "smaller"):
					want = ClippedBelow
				default:
					t.Fatalf("unrecognised warning %q", w)
				}
			}
			if got.Clipped != want {
				t.Errorf("Clipped = %v, statsmodels warnings %q", got.Clipped, wl)
			}
		})
	}
}
