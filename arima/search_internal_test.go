package arima

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/calendar"
	"github.com/almanac-go/almanac/internal/m3data"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/reftest"
)

// TestMinRootModulus checks the root screen of Search on polynomials
// whose roots are known in closed form (elementary algebra).
func TestMinRootModulus(t *testing.T) {
	tests := []struct {
		name string
		c    []float64 // 1 + c₁z + c₂z² + …
		want float64
	}{
		{"1 − 0.5z: root 2", []float64{-0.5}, 2},
		{"1 + 0.25z²: roots ±2i", []float64{0, 0.25}, 2},
		{"(1 − z)(1 − 0.5z): roots 1 and 2", []float64{-1.5, 0.5}, 1},
		{"1 + 0.4z (MA): root −2.5", []float64{0.4}, 2.5},
		{"trailing zero ignored", []float64{-0.5, 0}, 2},
		{"constant polynomial", nil, math.Inf(1)},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			numtest.Scalar(t, "min |root|", minRootModulus(tc.c), tc.want, 0, 1e-12)
		})
	}
}

// TestSearchStoppingRules checks the looser stopping rules a Search
// ranks its candidates with (searchOpt, confirmMargin) on four R datasets
// (the inputs of the reference fixtures), stepwise and exhaustive: the
// search chooses the same model, with the same fit, as when every
// candidate is fitted with the full rules of Spec.Fit; and for every
// candidate the criterion of the looser fit is never below that of the
// full fit (the looser run stops earlier on the same path) and less than
// confirmMargin above it. Both sides are our own fits: this is an
// internal consistency check, not a reference.
func TestSearchStoppingRules(t *testing.T) {
	for _, file := range []string{"airpassengers_log_airline.json", "usaccdeaths_airline.json", "lh_ar1.json", "nile_arima111.json"} {
		for _, s := range []Search{{}, {Exhaustive: true, MaxP: 2, MaxQ: 2, MaxSP: 1, MaxSQ: 1, Workers: 1}} {
			t.Run(fmt.Sprintf("%s/exhaustive=%v", file, s.Exhaustive), func(t *testing.T) {
				f, err := reftest.Load("testdata/reference/" + file)
				if err != nil {
					t.Fatal(err)
				}
				y := fixtureSeries(t, f)
				r, err := s.search(context.Background(), y)
				if err != nil {
					t.Fatal(err)
				}
				saved := searchOpt
				searchOpt = fullOpt
				rf, err := s.search(context.Background(), y)
				searchOpt = saved
				if err != nil {
					t.Fatal(err)
				}
				if r.Model.String() != rf.Model.String() || math.Float64bits(r.Model.AICc()) != math.Float64bits(rf.Model.AICc()) {
					t.Errorf("chose %s (AICc %.8f); with the full rules %s (AICc %.8f)", r.Model, r.Model.AICc(), rf.Model, rf.Model.AICc())
				}
				if s.Exhaustive {
					return
				}
				checked := 0
				for _, c := range r.Candidates {
					loose, err1 := c.Spec.fitWith(context.Background(), y, searchOpt)
					full, err2 := c.Spec.fitWith(context.Background(), y, fullOpt)
					if err1 != nil || err2 != nil {
						if (err1 == nil) != (err2 == nil) {
							t.Errorf("%s: error %v with searchOpt, %v with fullOpt", c.Spec, err1, err2)
						}
						continue
					}
					a, b := loose.AICc(), full.AICc()
					if math.IsInf(a, 0) && math.IsInf(b, 0) {
						continue
					}
					checked++
					if b > a+1e-9*math.Abs(a) || a-b >= confirmMargin {
						t.Errorf("%s: AICc %.8f with searchOpt, %.8f with fullOpt", c.Spec, a, b)
					}
				}
				if checked == 0 {
					t.Fatal("no candidate compared")
				}
			})
		}
	}
}

// TestNearUnitRoot checks the root screen of Search on fitted models
// whose ARMA coefficients are fixed, so that the roots are known in
// closed form (elementary algebra): 1 − φz has the root 1/φ, 1 + θz the
// root −1/θ, and a seasonal factor 1 + Θz^s roots of modulus |Θ|^(−1/s).
// The bar is 1.001 (Hyndman & Khandakar 2008).
func TestNearUnitRoot(t *testing.T) {
	_, lh := fixtureData(t, "lh_ar1")
	tests := []struct {
		name   string
		spec   Spec
		reject bool
	}{
		{"AR root 1.0005", Spec{P: 1, Fixed: map[string]float64{"ar1": 0.9995}}, true},
		{"AR root 1.0101", Spec{P: 1, Fixed: map[string]float64{"ar1": 0.99}}, false},
		{"MA root 1.0005", Spec{Q: 1, Fixed: map[string]float64{"ma1": -0.9995}}, true},
		{"MA root 1.0101", Spec{Q: 1, Fixed: map[string]float64{"ma1": -0.99}}, false},
		{"seasonal MA roots 1.00025", Spec{SQ: 1, Period: 4, Fixed: map[string]float64{"sma1": -0.999}}, true},
		{"seasonal MA roots 1.0025", Spec{SQ: 1, Period: 4, Fixed: map[string]float64{"sma1": -0.99}}, false},
		{"seasonal AR roots 1.00025", Spec{SP: 1, Period: 4, Fixed: map[string]float64{"sar1": 0.999}}, true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f := mustFit(t, tc.spec, lh)
			err := nearUnitRoot(f)
			if got := errors.Is(err, ErrNearUnitRoot); got != tc.reject {
				t.Errorf("nearUnitRoot = %v, want rejection %v", err, tc.reject)
			}
		})
	}
}

// TestStagedConfirm checks that the stepwise search, which continues a
// candidate's looser run under the full stopping rules when it is to be
// confirmed (evaluateConfirmed, optSettings.then), records the same
// candidates, bit for bit, and chooses the same model as fitting each
// candidate with the looser rules and refitting the confirmed ones with
// the full rules from the start (separateConfirm). Inputs: four R
// datasets of the reference fixtures and every 400th M3 monthly series
// (Makridakis & Hibon 2000), ranked by the exact likelihood and by CSS;
// one fixture with the package's own minimiser. Both sides are our own
// fits: an internal consistency check.
func TestStagedConfirm(t *testing.T) {
	var ys []almanac.Series
	for _, file := range []string{"airpassengers_log_airline.json", "usaccdeaths_airline.json", "lh_ar1.json", "nile_arima111.json"} {
		f, err := reftest.Load("testdata/reference/" + file)
		if err != nil {
			t.Fatal(err)
		}
		ys = append(ys, fixtureSeries(t, f))
	}
	for i, s := range m3data.Load(t, "m3_monthly.csv") {
		if i%400 == 0 {
			ys = append(ys, almanac.Series{Key: s.ID, Start: time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC), Freq: calendar.Monthly, Values: s.Train})
		}
	}
	record := func(r *SearchResult) string {
		var b strings.Builder
		for _, c := range r.Candidates {
			fmt.Fprintf(&b, "%s %x %x %v\n", c, math.Float64bits(c.Score), math.Float64bits(c.LogLik), c.Err)
		}
		fmt.Fprintf(&b, "chosen %d %s %x", r.Chosen, r.Model, math.Float64bits(r.Model.AICc()))
		return b.String()
	}
	for i, y := range ys {
		for _, s := range []Search{{}, {Likelihood: LikelihoodCSS}} {
			gonum := i != 0 || s.Likelihood != LikelihoodAuto
			t.Run(fmt.Sprintf("%s/%v/gonum=%v", y.Key, s.Likelihood, gonum), func(t *testing.T) {
				saved := useGonum
				useGonum = gonum
				defer func() { useGonum = saved }()
				staged, err := s.search(context.Background(), y)
				if err != nil {
					t.Fatal(err)
				}
				separateConfirm = true
				separate, err := s.search(context.Background(), y)
				separateConfirm = false
				if err != nil {
					t.Fatal(err)
				}
				if a, b := record(staged), record(separate); a != b {
					t.Errorf("staged run:\n%s\nseparate fits:\n%s", a, b)
				}
			})
		}
	}
}
