package tsstat

import (
	"math"
	"testing"

	"github.com/almanac-go/almanac/internal/numtest"
)

// TestACFByHand: x = 1, 2, 3, 4, 5 has mean 3 and deviations −2, −1, 0,
// 1, 2 (worked by hand). With denominator n = 5 (R's acf convention):
// c0 = 10/5 = 2, c1 = ((−2)(−1) + (−1)(0) + (0)(1) + (1)(2))/5 = 0.8,
// c2 = ((−2)(0) + (−1)(1) + (0)(2))/5 = −0.2, so r1 = 0.4, r2 = −0.1.
// PACF at lag 2 by Durbin–Levinson: (r2 − r1²)/(1 − r1²) = (−0.1 − 0.16)/0.84.
func TestACFByHand(t *testing.T) {
	x := []float64{1, 2, 3, 4, 5}
	numtest.Slice(t, "autocov", Autocov(make([]float64, 3), x, 2), []float64{2, 0.8, -0.2}, 1e-15, 0)
	numtest.Slice(t, "acf", ACF(x, 2), []float64{1, 0.4, -0.1}, 1e-15, 0)
	numtest.Slice(t, "pacf", PACF(x, 2), []float64{0.4, (-0.1 - 0.16) / 0.84}, 1e-15, 0)
}

// TestAutocovMissing: a missing value drops the pairs it is part of but the
// mean and denominator use the observed values (R's acf with
// na.action = na.pass). x = 1, NaN, 3: mean 2, n = 2; c0 = (1 + 1)/2 = 1;
// c1 has no complete pair, so 0; c2 = (−1)(1)/2 = −0.5.
func TestAutocovMissing(t *testing.T) {
	got := Autocov(make([]float64, 3), []float64{1, math.NaN(), 3}, 2)
	numtest.Slice(t, "autocov", got, []float64{1, 0, -0.5}, 1e-15, 0)
}

// TestPACFOfAR1: the autocorrelations of an AR(1) with φ = 0.6 are 0.6^k;
// its partial autocorrelations are φ at lag 1 and 0 after (a textbook
// fact, common practice).
func TestPACFOfAR1(t *testing.T) {
	r := []float64{1, 0.6, 0.36, 0.216, 0.1296}
	numtest.Slice(t, "pacf", PACFFromACF(r), []float64{0.6, 0, 0, 0}, 1e-15, 0)
}

// TestACFScaleFree: the autocorrelations of ±1e300 and ±1e308 are those
// of ±1 (scale-free by definition, common practice); before the data
// were rescaled the squared deviations overflowed and every lag but 0
// came out NaN. Scaling by a power of two is exact, so ordinary data give
// bit-identical values.
func TestACFScaleFree(t *testing.T) {
	base := []float64{1, -1, 0.5, -0.25, 1, 0.75, -1, 0.125}
	want := ACF(base, 4)
	wantP := PACF(base, 4)
	for _, c := range []struct {
		name   string
		factor float64
	}{{"1e300", 1e300}, {"1e308", 1e308 / 1.0}, {"1e-300", 1e-300}, {"2^900", math.Ldexp(1, 900)}} {
		t.Run(c.name, func(t *testing.T) {
			x := make([]float64, len(base))
			for i, v := range base {
				x[i] = v * c.factor
			}
			got := ACF(x, 4)
			for k, v := range got {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("lag %d: %v", k, v)
				}
			}
			numtest.Slice(t, "acf", got, want, 1e-14, 0)
			numtest.Slice(t, "pacf", PACF(x, 4), wantP, 1e-14, 0)
		})
	}
	two := make([]float64, len(base))
	for i, v := range base {
		two[i] = math.Ldexp(v, 700)
	}
	for k, v := range ACF(two, 4) {
		if v != want[k] {
			t.Errorf("lag %d: %v after scaling by 2^700, want %v bit for bit", k, v, want[k])
		}
	}
}
