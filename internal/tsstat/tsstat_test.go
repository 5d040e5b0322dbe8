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
