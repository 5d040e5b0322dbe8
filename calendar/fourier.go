package calendar

import (
	"fmt"
	"math"
)

// Fourier returns the first k pairs of Fourier regressors of a cycle of
// period observations, for time steps 1..n: the columns
//
//	sin(2π j t / period), cos(2π j t / period),   j = 1..k,
//
// in that order (sin then cos for each j). When 2k equals an integer
// period the last sine is zero at every integer t and is left out, so the
// result has 2k − 1 columns then and 2k otherwise. Each column has n
// values. Regression on these terms models a smooth seasonal pattern with
// 2k parameters (Harvey 1989, Forecasting, Structural Time Series Models
// and the Kalman Filter, §2.3; common practice); non-integer periods such
// as 365.25/7 are allowed.
//
// Special cases: n < 0, k < 1, period ≤ 1 or non-finite, or k > period/2
// give an error wrapping ErrFourier.
func Fourier(n int, period float64, k int) ([][]float64, error) {
	return FourierFrom(1, n, period, k)
}

// FourierFrom is Fourier for time steps t0..t0+n−1, e.g. t0 = len(y)+1
// for the regressors of the forecast period of a series whose terms were
// built by Fourier(len(y), period, k).
func FourierFrom(t0, n int, period float64, k int) ([][]float64, error) {
	if n < 0 || k < 1 || !(period > 1) || math.IsInf(period, 0) || float64(2*k) > period {
		return nil, fmt.Errorf("calendar: %w: n %d, period %v, k %d (need n ≥ 0, period > 1, 1 ≤ k ≤ period/2)", ErrFourier, n, period, k)
	}
	dropLastSin := float64(2*k) == period
	cols := 2 * k
	if dropLastSin {
		cols--
	}
	out := make([][]float64, cols)
	for c := range out {
		out[c] = make([]float64, n)
	}
	for i := range n {
		t := float64(t0 + i)
		for j := 1; j <= k; j++ {
			// Reduce the angle to one cycle first so that large t keeps
			// full precision.
			x := 2 * math.Pi * math.Mod(float64(j)*t, period) / period
			s, c := math.Sincos(x)
			if dropLastSin && j == k {
				out[2*j-2][i] = c
				continue
			}
			out[2*j-2][i] = s
			out[2*j-1][i] = c
		}
	}
	return out, nil
}
