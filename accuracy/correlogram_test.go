package accuracy_test

import (
	"errors"
	"math"
	"testing"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/accuracy"
	"github.com/almanac-go/almanac/internal/numtest"
	"github.com/almanac-go/almanac/internal/proptest"
)

// seriesF is Box, Jenkins & Reinsel's Series F (70 yields of a batch
// chemical process) as printed in the NIST/SEMATECH e-Handbook of
// Statistical Methods, section 6.4.4.9 (copied in
// ../shared/reference/published.md).
var seriesF = []float64{47, 64, 23, 71, 38, 64, 55, 41, 59, 48, 71, 35, 57, 40, 58, 44, 80, 55, 37, 74, 51, 57, 50, 60, 45, 57, 50, 45,
	25, 59, 50, 71, 56, 74, 50, 58, 45, 54, 36, 54, 48, 55, 45, 57, 50, 62, 44, 64, 43, 52, 38, 59, 55, 41, 53, 49, 34, 35, 54, 45, 68,
	38, 50, 60, 39, 59, 40, 57, 54, 23}

// seriesFACF is the sample ACF of Series F at lags 1..16 printed in the
// NIST/SEMATECH e-Handbook, section 6.4.4.9 (published.md), to 9
// decimals.
var seriesFACF = []float64{-0.389878319, 0.304394082, -0.165554717, 0.070719321, -0.097039288, -0.047057692, 0.035373112,
	-0.043458199, -0.004796162, 0.014393137, 0.109917200, -0.068778492, 0.148034489, 0.035768581, -0.006677806, 0.173004275}

// TestACFSeriesF checks ACF against the sample ACF of Series F printed in
// the NIST/SEMATECH e-Handbook, section 6.4.4.9, lags 1..16 (tolerance:
// half a unit in the last printed digit), and the PACF's first value and
// significance against the handbook's identification of the series as
// AR(2).
func TestACFSeriesF(t *testing.T) {
	c, err := accuracy.ACF(seriesF, 16)
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Values) != 17 || c.Lags[0] != 0 || c.Lags[16] != 16 || c.Values[0] != 1 || c.N != 70 {
		t.Fatalf("ACF lags %v, r_0 %v, N %d: want lags 0..16 with r_0 = 1 and N = 70", c.Lags, c.Values[0], c.N)
	}
	numtest.Slice(t, "acf", c.Values[1:], seriesFACF, 5e-10, 0)
	// The white-noise bound Φ⁻¹(0.975)/√n (common practice; R's
	// qnorm(0.975) = 1.959963984540054) with n = 70.
	numtest.Scalar(t, "bound", c.Bound, 1.959963984540054/math.Sqrt(70), 0, 1e-15)
	p, err := accuracy.PACF(seriesF, 16)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Values) != 16 || p.Lags[0] != 1 || p.N != 70 {
		t.Fatalf("PACF lags %v, N %d: want 1..16 and 70", p.Lags, p.N)
	}
	// The partial autocorrelation at lag 1 is the autocorrelation at lag
	// 1 (Durbin–Levinson, common practice); lag 2 is (r₂ − r₁²)/(1 − r₁²)
	// (textbook identity, common practice).
	numtest.Scalar(t, "pacf[1]", p.Values[0], seriesFACF[0], 5e-10, 0)
	r1, r2 := c.Values[1], c.Values[2]
	numtest.Scalar(t, "pacf[2]", p.Values[1], (r2-r1*r1)/(1-r1*r1), 1e-14, 0)
	// The handbook identifies Series F as AR(2): lag 1 of the PACF stands
	// out (−0.39 against a bound of 0.234).
	if sig := p.Significant(); len(sig) == 0 || sig[0] != 1 {
		t.Errorf("significant PACF lags %v, want lag 1 first", sig)
	}
}

// TestCorrelogramDefaults: maxLag 0 takes R's default lag.max for one
// series, ⌊10·log10(n)⌋ at most n − 1 (stats::acf help page, common
// practice), and N counts the observed values.
func TestCorrelogramDefaults(t *testing.T) {
	for _, c := range []struct{ n, want int }{{0, 0}, {1, 0}, {2, 1}, {5, 4}, {10, 9}, {11, 10}, {70, 18}, {144, 21}, {1000, 30}} {
		if got := accuracy.DefaultMaxLag(c.n); got != c.want {
			t.Errorf("DefaultMaxLag(%d) = %d, want %d", c.n, got, c.want)
		}
	}
	a, err := accuracy.ACF(seriesF, 0)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(a.Values) - 1; got != 18 { // ⌊10·log10(70)⌋ = 18
		t.Errorf("default max lag %d, want 18", got)
	}
	p, err := accuracy.PACF(seriesF[:5], 0)
	if err != nil {
		t.Fatal(err)
	}
	if got := len(p.Values); got != 4 {
		t.Errorf("PACF of 5 values to %d lags, want 4 (n − 1)", got)
	}
	cov, err := accuracy.Autocovariances(seriesF, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(cov) != 19 {
		t.Errorf("%d autocovariances, want lags 0..18", len(cov))
	}
	// The handbook prints the variance 141.8238 with divisor n − 1; the
	// autocovariance at lag 0 uses n: 141.8238·69/70 (published.md,
	// rounded to 4 decimals).
	numtest.Scalar(t, "c0", cov[0], 141.8238*69/70, 0.5e-4*69/70+1e-12, 0)
	// With missing values the default lag follows the length (R counts
	// the rows, NaN included) and N the observed values.
	y := append([]float64(nil), seriesF...)
	y[10], y[40] = math.NaN(), math.NaN()
	a, err = accuracy.ACF(y, 0)
	if err != nil {
		t.Fatal(err)
	}
	if a.N != 68 || len(a.Values) != 19 {
		t.Errorf("N = %d, %d lags with two NaN; want 68 and 0..18", a.N, len(a.Values)-1)
	}
}

// TestCorrelogramExtremes is the reproducer of the non-finite results:
// ACF, PACF and LjungBox of data like ±1e300 and ±1e308 gave NaN with a
// nil error, because the squared deviations overflowed. The
// autocorrelations do not depend on the scale (common practice), so they
// must equal those of the same data divided by the scale; the
// autocovariances are representable down to 1e154-sized deviations and
// an error wrapping almanac.ErrNonFinite beyond.
func TestCorrelogramExtremes(t *testing.T) {
	base := []float64{1, -1, 0.5, -0.25, 1, 0.75, -1, 0.125, -0.5, 1, 0.25, -0.75}
	want, err := accuracy.ACF(base, 4)
	if err != nil {
		t.Fatal(err)
	}
	wantP, _ := accuracy.PACF(base, 4)
	wantQ, _ := accuracy.LjungBox(base, 4, 1)
	for _, c := range []struct {
		name   string
		factor float64
		covErr error // nil: the autocovariances are representable
	}{
		{"1e300", 1e300, almanac.ErrNonFinite},
		{"1e308", 1e308, almanac.ErrNonFinite},
		{"1e150", 1e150, nil},
		{"1e-150", 1e-150, nil},
		{"1e-300", 1e-300, nil}, // covariances of 1e-600 underflow to 0 (documented)
	} {
		t.Run(c.name, func(t *testing.T) {
			x := make([]float64, len(base))
			for i, v := range base {
				x[i] = v * c.factor
			}
			a, err := accuracy.ACF(x, 4)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Slice(t, "acf", a.Values, want.Values, 1e-14, 0)
			p, err := accuracy.PACF(x, 4)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Slice(t, "pacf", p.Values, wantP.Values, 1e-14, 0)
			q, err := accuracy.LjungBox(x, 4, 1)
			if err != nil {
				t.Fatal(err)
			}
			numtest.Scalar(t, "Q", q.Statistic, wantQ.Statistic, 0, 1e-13)
			numtest.Scalar(t, "p-value", q.PValue, wantQ.PValue, 0, 1e-12)
			d, err := accuracy.Residuals{Lag: 4}.DiagnoseValues(x)
			if err != nil {
				t.Fatal(err)
			}
			if math.IsNaN(d.Mean) || math.IsInf(d.Mean, 0) {
				t.Errorf("diagnosis mean %v", d.Mean)
			}
			cov, err := accuracy.Autocovariances(x, 4)
			switch {
			case c.covErr != nil:
				if !errors.Is(err, c.covErr) || cov != nil {
					t.Errorf("autocovariances %v, error %v; want an error wrapping %v", cov, err, c.covErr)
				}
			case err != nil:
				t.Fatal(err)
			default:
				for k, v := range cov {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("autocovariance %v at lag %d", v, k)
					}
				}
				if cov[0] > 0 {
					numtest.Scalar(t, "c1/c0", cov[1]/cov[0], want.Values[1], 1e-14, 0)
				} else if c.factor > 1e-200 {
					t.Errorf("variance %v", cov[0])
				}
			}
		})
	}
	// Powers of two scale exactly: bit-identical autocorrelations.
	x := make([]float64, len(base))
	for i, v := range base {
		x[i] = math.Ldexp(v, 1000)
	}
	a, _ := accuracy.ACF(x, 4)
	for k := range a.Values {
		if a.Values[k] != want.Values[k] {
			t.Errorf("lag %d: %v on data times 2^1000, want %v bit for bit", k, a.Values[k], want.Values[k])
		}
	}
}

// TestCorrelogramExtremeCases runs the correlation statistics over the
// shared extreme-scale cases (internal/proptest: 1e−300 to 1e300, ±1e308,
// a single spike, tiny and huge values mixed): each gives finite values
// or an error wrapping a sentinel, never NaN or ±Inf with a nil error.
func TestCorrelogramExtremeCases(t *testing.T) {
	for _, c := range proptest.Cases(36, 4) {
		t.Run(c.Name, func(t *testing.T) {
			proptest.Safely(t, "correlogram", func() {
				a, err := accuracy.ACF(c.Values, 0)
				if err != nil {
					proptest.CheckErr(t, "ACF", err)
				} else {
					proptest.Finite(t, "ACF", a.Values)
				}
				p, err := accuracy.PACF(c.Values, 8)
				if err != nil {
					proptest.CheckErr(t, "PACF", err)
				} else {
					proptest.Finite(t, "PACF", p.Values)
				}
				cov, err := accuracy.Autocovariances(c.Values, 8)
				if err != nil {
					proptest.CheckErr(t, "autocovariances", err)
				} else {
					proptest.Finite(t, "autocovariances", cov)
				}
				for _, q := range []func([]float64, int, int) (accuracy.Portmanteau, error){accuracy.LjungBox, accuracy.BoxPierce} {
					r, err := q(c.Values, 8, 1)
					if err != nil {
						proptest.CheckErr(t, "portmanteau", err)
					} else {
						proptest.Finite(t, "portmanteau", []float64{r.Statistic, r.PValue})
					}
				}
				d, err := accuracy.Residuals{Period: 4}.DiagnoseValues(c.Values)
				if err != nil {
					proptest.CheckErr(t, "diagnose", err)
				} else {
					proptest.Finite(t, "diagnose", []float64{d.Mean, d.LjungBox.Statistic, d.BoxPierce.PValue})
				}
			})
		})
	}
}
