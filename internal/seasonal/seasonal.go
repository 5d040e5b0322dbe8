package seasonal

import (
	"errors"
	"math"

	"github.com/almanac-go/almanac/internal/scaling"
	"github.com/almanac-go/almanac/internal/tsstat"
)

var (
	// ErrShort reports a series with fewer than two full periods, or a
	// period below 2.
	ErrShort = errors.New("seasonal: need period ≥ 2 and at least two full periods")
	// ErrOverflow reports finite data whose decomposition has a
	// component beyond the float64 range (for example a remainder of
	// 2e308).
	ErrOverflow = errors.New("seasonal: a component overflows float64")
)

// Result is a classical decomposition. Trend and Remainder are NaN for the
// first and last floor(m/2) observations (and wherever a missing value
// enters the moving average).
type Result struct {
	Trend     []float64
	Seasonal  []float64
	Remainder []float64
	// Figure[i] is the seasonal effect of position i (counted from the
	// first observation), i = 0..m-1.
	Figure []float64
}

// Filter returns the weights of the centred moving average of order m:
// (0.5, 1, ..., 1, 0.5)/m (length m+1) for even m, (1, ..., 1)/m for odd m.
func Filter(m int) []float64 {
	if m%2 == 0 {
		w := make([]float64, m+1)
		for i := range w {
			w[i] = 1 / float64(m)
		}
		w[0] = 0.5 / float64(m)
		w[m] = 0.5 / float64(m)
		return w
	}
	w := make([]float64, m)
	for i := range w {
		w[i] = 1 / float64(m)
	}
	return w
}

// MovingAverage returns the centred moving average of order m of y: NaN
// where the window runs off either end or holds a missing value.
func MovingAverage(y []float64, m int) []float64 {
	w := Filter(m)
	half := len(w) / 2
	out := make([]float64, len(y))
	for i := range y {
		if i-half < 0 || i-half+len(w) > len(y) {
			out[i] = math.NaN()
			continue
		}
		s := 0.0
		for j, wj := range w {
			s += wj * y[i-half+j]
		}
		out[i] = s // NaN propagates from any missing value
	}
	return out
}

// Classical decomposes y with period m. Multiplicative decomposition
// divides instead of subtracting and needs a trend that is never zero.
// Missing values in y propagate to the trend windows that contain them and
// are ignored in the seasonal means.
//
// The work is done on y·2^k with the largest |y| near 2^256
// (internal/scaling), and the components in the units of y are scaled
// back: the results are bit for bit those of the unscaled computation
// when that neither overflows nor underflows, and data near the float64
// limit do not overflow. A component that does not fit in a float64
// gives ErrOverflow.
func Classical(y []float64, m int, multiplicative bool) (Result, error) {
	if m < 2 || len(y) < 2*m {
		return Result{}, ErrShort
	}
	k := scaling.Exponent(y)
	r := classical(scaling.Scale(nil, y, k), m, multiplicative)
	units := [][]float64{r.Trend}
	if !multiplicative {
		units = append(units, r.Seasonal, r.Remainder, r.Figure)
	}
	for _, c := range units {
		scaling.Scale(c, c, -k)
	}
	for _, c := range [][]float64{r.Trend, r.Seasonal, r.Remainder, r.Figure} {
		if !scaling.NoInf(c) {
			return Result{}, ErrOverflow
		}
	}
	return r, nil
}

func classical(y []float64, m int, multiplicative bool) Result {
	n := len(y)
	trend := MovingAverage(y, m)
	sums := make([]float64, m)
	counts := make([]int, m)
	for i := range n {
		var d float64
		if multiplicative {
			d = y[i] / trend[i]
		} else {
			d = y[i] - trend[i]
		}
		if math.IsNaN(d) {
			continue
		}
		sums[i%m] += d
		counts[i%m]++
	}
	figure := make([]float64, m)
	mean := 0.0
	for i := range m {
		figure[i] = sums[i] / float64(counts[i]) // NaN when a position has no value
		mean += figure[i]
	}
	mean /= float64(m)
	for i := range figure {
		if multiplicative {
			figure[i] /= mean
		} else {
			figure[i] -= mean
		}
	}
	seas := make([]float64, n)
	rem := make([]float64, n)
	for i := range n {
		seas[i] = figure[i%m]
		if multiplicative {
			rem[i] = y[i] / seas[i] / trend[i]
		} else {
			rem[i] = y[i] - seas[i] - trend[i]
		}
	}
	return Result{Trend: trend, Seasonal: seas, Remainder: rem, Figure: figure}
}

// IsSeasonal is the autocorrelation test for seasonality used with the
// Naive2 benchmark of the M4 competition and with the Theta method: with
// r the sample autocorrelations of y, y is seasonal with period m iff
// m > 1, n ≥ 3m and |r_m| > z·√((1 + 2 Σ_{i=1}^{m−1} r_i²)/n), where
// z = 1.645 gives the usual 90% level (two-sided; common practice).
// y must be complete. The autocorrelations are computed on y rescaled by
// a power of two (they do not depend on the scale), so data near the
// float64 limit are tested like any other.
func IsSeasonal(y []float64, m int, z float64) bool {
	n := len(y)
	if m <= 1 || n < 3*m {
		return false
	}
	r := tsstat.ACF(scaling.Scale(nil, y, scaling.Exponent(y)), m)
	if math.IsNaN(r[m]) {
		return false
	}
	s := 1.0
	for i := 1; i < m; i++ {
		s += 2 * r[i] * r[i]
	}
	return math.Abs(r[m]) > z*math.Sqrt(s/float64(n))
}
