package arima_test

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/internal/numtest"
)

func diffLog(y []float64) []float64 {
	out := make([]float64, len(y)-1)
	for i := range out {
		out[i] = math.Log(y[i+1]) - math.Log(y[i])
	}
	return out
}

func logOf(y []float64) []float64 {
	out := make([]float64, len(y))
	for i, v := range y {
		out[i] = math.Log(v)
	}
	return out
}

// TestKPSSReject checks the short lag rule and the decision rule against
// the statsmodels 0.13.5 statistics of the kpss fixtures
// (testdata/reference/kpss_*.json) and the KPSS (1992) table
// (published.md). The short rule ⌊4 (n/100)^(1/4)⌋ gives 4 lags for Nile
// (n = 100) and diff log AirPassengers (n = 143) and 3 for lh (n = 48),
// the lags of fixture entries: Nile nlags=4 has statistic 0.965 > 0.739
// (rejected even at 1%); lh 'auto' used 3 lags, statistic 0.294 < 0.347
// (not rejected at 10%); diff log AirPassengers nlags=4 has 0.0282.
func TestKPSSReject(t *testing.T) {
	tests := []struct {
		name     string
		y        []float64
		alpha    float64
		wantLags int
		wantStat float64
		want     bool
	}{
		{"Nile at 1%", selNile, 0.01, 4, 0.9654349077526598, true},
		{"Nile at 5%", selNile, 0.05, 4, 0.9654349077526598, true},
		{"lh at 10%", selLH, 0.10, 3, 0.2938157272834688, false},
		{"diff log AirPassengers at 10%", diffLog(selAirPassengers), 0.10, 4, 0.028204527446464924, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := arima.KPSS(tc.y, arima.KPSSSpec{LagRule: arima.LagShort})
			if err != nil {
				t.Fatal(err)
			}
			if r.Lags != tc.wantLags {
				t.Errorf("short-rule lags %d, want %d", r.Lags, tc.wantLags)
			}
			numtest.Scalar(t, "statistic", r.Statistic, tc.wantStat, 0, 1e-10)
			got, err := r.Reject(tc.alpha)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("Reject(%g) = %v with statistic %.4f", tc.alpha, got, r.Statistic)
			}
		})
	}
	r, _ := arima.KPSS(selLH, arima.KPSSSpec{LagRule: arima.LagShort})
	if _, err := r.Reject(0.2); !errors.Is(err, almanac.ErrLevel) {
		t.Errorf("Reject(0.2): err = %v, want ErrLevel", err)
	}
}

// TestKPSSLagRules checks the lag each rule gives for the fixture series'
// lengths, from the rules' formulas: ⌊3√n/13⌋ (common practice), ⌊4 (n/100)^(1/4)⌋
// (Kwiatkowski et al. 1992) and ⌈12 (n/100)^(1/4)⌉ (the long rule; the
// fixtures' spec.nlags_legacy_value gives 10, 12 and 14).
func TestKPSSLagRules(t *testing.T) {
	tests := []struct {
		name string
		y    []float64
		rule arima.LagRule
		want int
	}{
		{"square root, n = 48", selLH, arima.LagSquareRoot, 1},
		{"square root, n = 100", selNile, arima.LagSquareRoot, 2},
		{"square root, n = 143", diffLog(selAirPassengers), arima.LagSquareRoot, 2},
		{"short, n = 48", selLH, arima.LagShort, 3},
		{"short, n = 100", selNile, arima.LagShort, 4},
		{"long, n = 48 (fixture kpss_lh)", selLH, arima.LagLong, 10},
		{"long, n = 100 (fixture kpss_nile)", selNile, arima.LagLong, 12},
		{"long, n = 143 (fixture kpss_airpassengers_difflog)", diffLog(selAirPassengers), arima.LagLong, 14},
		{"square root capped at n−1", []float64{1, 3, 2}, arima.LagSquareRoot, 0},
		{"long capped at n−1", []float64{1, 3, 2, 5}, arima.LagLong, 3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := arima.KPSS(tc.y, arima.KPSSSpec{LagRule: tc.rule})
			if err != nil {
				t.Fatal(err)
			}
			if r.Lags != tc.want {
				t.Errorf("lags %d, want %d", r.Lags, tc.want)
			}
		})
	}
}

func TestKPSSBadInput(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name string
		y    []float64
		spec arima.KPSSSpec
		want error
	}{
		{"too short", []float64{1, 2}, arima.KPSSSpec{}, almanac.ErrTooShort},
		{"missing", []float64{1, nan, 3, 4}, arima.KPSSSpec{}, almanac.ErrMissing},
		{"infinite", []float64{1, 2, math.Inf(-1), 4}, arima.KPSSSpec{}, almanac.ErrNonFinite},
		{"constant", []float64{3, 3, 3, 3, 3}, arima.KPSSSpec{}, almanac.ErrConstant},
		{"straight line, trend null", []float64{1, 2, 3, 4, 5}, arima.KPSSSpec{Null: arima.TrendStationary}, almanac.ErrConstant},
		{"fixed lag = n", []float64{1, 3, 2, 4}, arima.KPSSSpec{LagRule: arima.LagFixed, Lags: 4}, almanac.ErrInvalid},
		{"negative fixed lag", []float64{1, 3, 2, 4}, arima.KPSSSpec{LagRule: arima.LagFixed, Lags: -1}, almanac.ErrInvalid},
		{"unknown rule", []float64{1, 3, 2, 4}, arima.KPSSSpec{LagRule: 9}, almanac.ErrInvalid},
		{"unknown null", []float64{1, 3, 2, 4}, arima.KPSSSpec{Null: 7}, almanac.ErrInvalid},
		{"overflowing values", []float64{1e300, -1e300, 1e300, -1e300, 5}, arima.KPSSSpec{}, almanac.ErrNonFinite},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := arima.KPSS(tc.y, tc.spec); !errors.Is(err, tc.want) {
				t.Errorf("err = %v, want %v", err, tc.want)
			}
		})
	}
}

func TestKPSSEnumStrings(t *testing.T) {
	tests := []struct {
		name string
		got  string
		want string
	}{
		{"level", arima.LevelStationary.String(), "level"},
		{"trend", arima.TrendStationary.String(), "trend"},
		{"unknown null", arima.KPSSNull(5).String(), "KPSSNull(5)"},
		{"square root", arima.LagSquareRoot.String(), "square-root"},
		{"short", arima.LagShort.String(), "short"},
		{"long", arima.LagLong.String(), "long"},
		{"unknown rule", arima.LagRule(-1).String(), "LagRule(-1)"},
		{"unknown clip", arima.PValueClip(3).String(), "PValueClip(3)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.got != tc.want {
				t.Errorf("got %q, want %q", tc.got, tc.want)
			}
		})
	}
}

// TestDifferences checks the number of differences chosen by repeated
// KPSS tests at 5%.
func TestDifferences(t *testing.T) {
	src := rand.New(rand.NewPCG(1, 2))
	walk := make([]float64, 400)
	for i := 1; i < len(walk); i++ {
		walk[i] = walk[i-1] + src.NormFloat64()
	}
	walk2 := make([]float64, len(walk))
	for i := 1; i < len(walk); i++ {
		walk2[i] = walk2[i-1] + walk[i]
	}
	withGap := append([]float64(nil), selLH...)
	withGap[5], withGap[20] = math.NaN(), math.NaN()
	tests := []struct {
		name   string
		y      []float64
		spec   arima.DifferencesSpec
		want   int
		reason string
	}{
		{"lh", selLH, arima.DifferencesSpec{Test: arima.KPSSSpec{LagRule: arima.LagShort}}, 0,
			"statsmodels kpss(lh, 'c', 'auto'), 3 lags as the short rule = 0.294 < 0.463 (fixture kpss_lh): not rejected at 5%"},
		{"lh with two gaps", withGap, arima.DifferencesSpec{Test: arima.KPSSSpec{LagRule: arima.LagShort}}, 0,
			"same series with two values dropped; still far from the 5% value (property)"},
		{"diff log AirPassengers", diffLog(selAirPassengers), arima.DifferencesSpec{Test: arima.KPSSSpec{LagRule: arima.LagShort}}, 0,
			"statsmodels kpss(diff(log(AirPassengers)), 'c', nlags=4) = 0.028 < 0.463 (fixture kpss_airpassengers_difflog)"},
		{"log AirPassengers", logOf(selAirPassengers), arima.DifferencesSpec{}, 1,
			"log AirPassengers trends (Box & Jenkins difference it once, published.md), and its first difference is not rejected (fixture kpss_airpassengers_difflog)"},
		{"random walk", walk, arima.DifferencesSpec{}, 1,
			"a simulated random walk is I(1) (invented data, fixed seed; a property of the test, not a reference value)"},
		{"integrated twice", walk2, arima.DifferencesSpec{}, 2,
			"the cumulated random walk is I(2) (invented data, fixed seed)"},
		{"integrated twice, MaxD 1", walk2, arima.DifferencesSpec{MaxD: 1}, 1,
			"MaxD caps the order"},
		{"constant", []float64{4, 4, 4, 4, 4, 4}, arima.DifferencesSpec{}, 0,
			"a constant needs no differencing"},
		{"straight line", []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20}, arima.DifferencesSpec{}, 1,
			"a line rejects level stationarity (statistic near its maximum, far above 0.463); its difference is constant"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := arima.Differences(tc.y, tc.spec)
			if err != nil {
				t.Fatal(err)
			}
			if got != tc.want {
				t.Errorf("d = %d, want %d (%s)", got, tc.want, tc.reason)
			}
		})
	}
}

func TestDifferencesBadInput(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name string
		y    []float64
		spec arima.DifferencesSpec
		want error
	}{
		{"empty", nil, arima.DifferencesSpec{}, almanac.ErrEmpty},
		{"all missing", []float64{nan, nan, nan, nan}, arima.DifferencesSpec{}, almanac.ErrAllMissing},
		{"too short", []float64{1, nan, 2}, arima.DifferencesSpec{}, almanac.ErrTooShort},
		{"infinite", []float64{1, 2, math.Inf(1), 3}, arima.DifferencesSpec{}, almanac.ErrNonFinite},
		{"negative MaxD", selLH, arima.DifferencesSpec{MaxD: -1}, almanac.ErrInvalid},
		{"alpha off the table", selLH, arima.DifferencesSpec{Alpha: 0.2}, almanac.ErrLevel},
		{"bad test", selLH, arima.DifferencesSpec{Test: arima.KPSSSpec{Null: 4}}, almanac.ErrInvalid},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := arima.Differences(tc.y, tc.spec); !errors.Is(err, tc.want) {
				t.Errorf("err = %v, want %v", err, tc.want)
			}
		})
	}
}
