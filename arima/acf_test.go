package arima_test

import (
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/arima"
	"github.com/almanac-go/almanac/internal/numtest"
)

// selSeriesF is Box, Jenkins & Reinsel's Series F (70 yields of a batch
// chemical process) as printed in the NIST/SEMATECH e-Handbook of
// Statistical Methods, section 6.4.4.9 (copied in
// ../shared/reference/published.md).
var selSeriesF = []float64{47, 64, 23, 71, 38, 64, 55, 41, 59, 48, 71, 35, 57, 40, 58, 44, 80, 55, 37, 74, 51, 57, 50, 60, 45, 57, 50, 45,
	25, 59, 50, 71, 56, 74, 50, 58, 45, 54, 36, 54, 48, 55, 45, 57, 50, 62, 44, 64, 43, 52, 38, 59, 55, 41, 53, 49, 34, 35, 54, 45, 68,
	38, 50, 60, 39, 59, 40, 57, 54, 23}

// TestACFSeriesF checks ACF against the sample ACF of Series F printed in
// the NIST/SEMATECH e-Handbook, section 6.4.4.9 (published.md), lags
// 1..16, printed to 9 decimals (tolerance: half a unit in the last
// printed digit).
func TestACFSeriesF(t *testing.T) {
	printed := []float64{-0.389878319, 0.304394082, -0.165554717, 0.070719321, -0.097039288, -0.047057692, 0.035373112,
		-0.043458199, -0.004796162, 0.014393137, 0.109917200, -0.068778492, 0.148034489, 0.035768581, -0.006677806, 0.173004275}
	c, err := arima.ACF(selSeriesF, 16)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Values) != 17 || c.Lags[0] != 0 || c.Lags[16] != 16 || c.Values[0] != 1 {
		t.Fatalf("ACF lags %v values[0] %v: want lags 0..16 with r_0 = 1", c.Lags, c.Values[0])
	}
	numtest.Slice(t, "acf", c.Values[1:], printed, 5e-10, 0)
	// The white-noise bound 1.96/√n (common practice) with n = 70.
	numtest.Scalar(t, "bound", c.Bound, 1.96/math.Sqrt(70), 0, 1e-15)
	// The handbook identifies Series F as AR(2) (published.md): the first
	// two partial autocorrelations stand out and lag 1 is outside the bound.
	p, err := arima.PACF(selSeriesF, 16)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Values) != 16 || p.Lags[0] != 1 {
		t.Fatalf("PACF lags %v: want 1..16", p.Lags)
	}
	// PACF at lag 1 equals the ACF at lag 1 by definition (Durbin–Levinson).
	numtest.Scalar(t, "pacf[1]", p.Values[0], printed[0], 5e-10, 0)
	if sig := p.Significant(); len(sig) == 0 || sig[0] != 1 {
		t.Errorf("significant PACF lags %v, want lag 1 among them (printed r_1 = -0.39 vs bound 0.234)", sig)
	}
}

// TestPACFLag2Identity checks the Durbin–Levinson step against the
// closed form of the lag-2 partial autocorrelation,
// φ₂₂ = (r₂ − r₁²)/(1 − r₁²) (textbook identity, common practice).
func TestPACFLag2Identity(t *testing.T) {
	a, err := arima.ACF(selSeriesF, 2)
	if err != nil {
		t.Fatal(err)
	}
	p, err := arima.PACF(selSeriesF, 2)
	if err != nil {
		t.Fatal(err)
	}
	r1, r2 := a.Values[1], a.Values[2]
	numtest.Scalar(t, "pacf[2]", p.Values[1], (r2-r1*r1)/(1-r1*r1), 1e-14, 0)
}

func TestACFDefaultsAndMissing(t *testing.T) {
	c, err := arima.ACF(selSeriesF, 0)
	if err != nil {
		t.Fatal(err)
	}
	// ⌊10 log10(70)⌋ = 18, R's default lag.max for a frequency-1 series.
	if got := len(c.Values) - 1; got != 18 {
		t.Errorf("default max lag %d, want 18", got)
	}
	c, err = arima.ACF(selSeriesF[:5], 100)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(c.Values) - 1; got != 4 {
		t.Errorf("max lag of 5 values %d, want 4 (n−1)", got)
	}
	y := append([]float64(nil), selSeriesF...)
	y[10] = math.NaN()
	c, err = arima.ACF(y, 5)
	if err != nil {
		t.Fatal(err)
	}
	if c.N != 69 {
		t.Errorf("N = %d with one NaN, want 69", c.N)
	}
	for _, v := range c.Values {
		if math.IsNaN(v) {
			t.Fatalf("NaN in ACF with one missing value: %v", c.Values)
		}
	}
}

func TestACFBadInput(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name   string
		y      []float64
		maxLag int
		want   error
	}{
		{"empty", nil, 5, almanac.ErrEmpty},
		{"all missing", []float64{nan, nan, nan}, 1, almanac.ErrAllMissing},
		{"one value", []float64{1, nan}, 1, almanac.ErrTooShort},
		{"constant", []float64{2, 2, 2, 2}, 1, almanac.ErrConstant},
		{"infinite", []float64{1, math.Inf(1), 3}, 1, almanac.ErrNonFinite},
		{"negative lag", []float64{1, 2, 3}, -1, almanac.ErrInvalid},
		{"overflowing values", []float64{1e300, -1e300, 1e300, -1e300}, 2, almanac.ErrNonFinite},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := arima.ACF(tc.y, tc.maxLag); !errors.Is(err, tc.want) {
				t.Errorf("ACF: err = %v, want %v", err, tc.want)
			}
			if _, err := arima.PACF(tc.y, tc.maxLag); !errors.Is(err, tc.want) {
				t.Errorf("PACF: err = %v, want %v", err, tc.want)
			}
		})
	}
}
