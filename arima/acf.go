package arima

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/tsstat"
)

// Correlogram holds sample autocorrelations or partial autocorrelations
// with the approximate 95% bounds ±1.96/√n for white noise (Bartlett
// 1946; the bound drawn in the usual correlogram plot, common practice).
type Correlogram struct {
	// Lags[i] is the lag of Values[i]: 0..MaxLag for an ACF (lag 0 has
	// value 1), 1..MaxLag for a PACF.
	Lags   []int
	Values []float64
	// N is the number of observed (non-NaN) values.
	N int
	// Bound is 1.96/√N: values outside ±Bound differ from zero at about
	// the 5% level under a white-noise null.
	Bound float64
}

// Significant returns the lags whose value lies outside ±Bound (lag 0 of
// an ACF excluded).
func (c Correlogram) Significant() []int {
	var out []int
	for i, v := range c.Values {
		if c.Lags[i] > 0 && math.Abs(v) > c.Bound {
			out = append(out, c.Lags[i])
		}
	}
	return out
}

// DefaultMaxLag is the number of lags used when ACF or PACF is given
// maxLag 0: ⌊10 log10(n)⌋, at most n−1 (the default of R's stats::acf for
// a series of frequency 1, common practice).
func DefaultMaxLag(n int) int {
	if n < 2 {
		return 0
	}
	return min(int(math.Floor(10*math.Log10(float64(n)))), n-1)
}

// ACF returns the sample autocorrelations of y at lags 0..maxLag with the
// definition of R's stats::acf: autocovariances (1/n) Σ (y_t − ȳ)(y_{t+k} − ȳ)
// over the pairs where both values are observed, divided by the lag-0
// value. maxLag 0 means DefaultMaxLag; a maxLag ≥ n is reduced to n−1.
//
// Special cases:
//   - fewer than 2 observed values: an error wrapping almanac.ErrTooShort
//     (almanac.ErrEmpty for no values, almanac.ErrAllMissing when all are NaN);
//   - ±Inf, or values so large that their sums of squares overflow:
//     almanac.ErrNonFinite;
//   - constant observed values: almanac.ErrConstant;
//   - maxLag < 0: almanac.ErrInvalid.
func ACF(y []float64, maxLag int) (Correlogram, error) {
	n, maxLag, err := correlogramInput(y, maxLag)
	if err != nil {
		return Correlogram{}, err
	}
	c := Correlogram{Lags: make([]int, maxLag+1), Values: tsstat.ACF(y, maxLag), N: n, Bound: 1.96 / math.Sqrt(float64(n))}
	if err := checkCorrelogram(c.Values); err != nil {
		return Correlogram{}, err
	}
	for k := range c.Lags {
		c.Lags[k] = k
	}
	return c, nil
}

// PACF returns the sample partial autocorrelations of y at lags
// 1..maxLag, from the autocorrelations of ACF by the Durbin–Levinson
// recursion (as R's stats::pacf). maxLag and the special cases are as for
// ACF.
func PACF(y []float64, maxLag int) (Correlogram, error) {
	n, maxLag, err := correlogramInput(y, maxLag)
	if err != nil {
		return Correlogram{}, err
	}
	c := Correlogram{Lags: make([]int, maxLag), Values: tsstat.PACF(y, maxLag), N: n, Bound: 1.96 / math.Sqrt(float64(n))}
	if err := checkCorrelogram(c.Values); err != nil {
		return Correlogram{}, err
	}
	for k := range c.Lags {
		c.Lags[k] = k + 1
	}
	return c, nil
}

// checkCorrelogram reports values that overflowed (data so large that
// the sums of squares are infinite).
func checkCorrelogram(v []float64) error {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("arima: %w: correlogram values are not finite (values too large for their sums of squares, or a degenerate series)", almanac.ErrNonFinite)
		}
	}
	return nil
}

func correlogramInput(y []float64, maxLag int) (n, lag int, err error) {
	if len(y) == 0 {
		return 0, 0, fmt.Errorf("arima: %w: correlogram of no values", almanac.ErrEmpty)
	}
	if maxLag < 0 {
		return 0, 0, fmt.Errorf("arima: %w: negative maximum lag %d", almanac.ErrInvalid, maxLag)
	}
	first, constant := math.NaN(), true
	for i, v := range y {
		if math.IsInf(v, 0) {
			return 0, 0, fmt.Errorf("arima: %w: value %g at index %d", almanac.ErrNonFinite, v, i)
		}
		if math.IsNaN(v) {
			continue
		}
		if n == 0 {
			first = v
		} else if v != first {
			constant = false
		}
		n++
	}
	switch {
	case n == 0:
		return 0, 0, fmt.Errorf("arima: %w: correlogram of %d missing values", almanac.ErrAllMissing, len(y))
	case n < 2:
		return 0, 0, fmt.Errorf("arima: %w: correlogram needs at least 2 observed values, have %d", almanac.ErrTooShort, n)
	case constant:
		return 0, 0, fmt.Errorf("arima: %w: correlogram of a constant series is undefined", almanac.ErrConstant)
	}
	if maxLag == 0 {
		maxLag = DefaultMaxLag(len(y))
	}
	return n, min(maxLag, len(y)-1), nil
}
