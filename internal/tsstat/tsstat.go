package tsstat

import (
	"math"

	"github.com/almanac-go/almanac/internal/scaling"
)

// Autocov writes into dst[k], k = 0..maxLag, the sample autocovariance
// (1/n) Σ_{t} (x_t − x̄)(x_{t+k} − x̄), over the pairs where both values
// are observed, with n the number of observed values and x̄ their mean
// (the definition of R's acf with na.action = na.pass; with no missing
// values it is the textbook estimator). dst must have length maxLag+1.
func Autocov(dst, x []float64, maxLag int) []float64 {
	n, sum := 0, 0.0
	for _, v := range x {
		if !math.IsNaN(v) {
			n++
			sum += v
		}
	}
	mean := sum / float64(n)
	for k := 0; k <= maxLag; k++ {
		s := 0.0
		for t := 0; t+k < len(x); t++ {
			a, b := x[t], x[t+k]
			if math.IsNaN(a) || math.IsNaN(b) {
				continue
			}
			s += (a - mean) * (b - mean)
		}
		dst[k] = s / float64(n)
	}
	return dst
}

// ACF returns the sample autocorrelations r_0..r_maxLag (r_0 = 1). They
// do not depend on the scale of x, so they are computed on x·2^k with k
// from scaling.Exponent (exact): bit for bit the plain results on
// ordinary data, and finite autocorrelations for data near the float64
// limit, whose squared deviations would overflow (±1e300 gave NaN).
func ACF(x []float64, maxLag int) []float64 {
	if k := scaling.Exponent(x); k != 0 {
		x = scaling.Scale(nil, x, k)
	}
	r := Autocov(make([]float64, maxLag+1), x, maxLag)
	c0 := r[0]
	for k := range r {
		r[k] /= c0
	}
	return r
}

// PACFFromACF returns the partial autocorrelations at lags 1..len(r)-1
// from autocorrelations r (r[0] = 1) by the Durbin–Levinson recursion.
func PACFFromACF(r []float64) []float64 {
	m := len(r) - 1
	if m < 1 {
		return nil
	}
	pacf := make([]float64, m)
	phi := make([]float64, m+1)
	prev := make([]float64, m+1)
	phi[1] = r[1]
	pacf[0] = r[1]
	v := 1 - r[1]*r[1]
	for k := 2; k <= m; k++ {
		num := r[k]
		for j := 1; j < k; j++ {
			num -= phi[j] * r[k-j]
		}
		a := num / v
		copy(prev, phi)
		for j := 1; j < k; j++ {
			phi[j] = prev[j] - a*prev[k-j]
		}
		phi[k] = a
		pacf[k-1] = a
		v *= 1 - a*a
	}
	return pacf
}

// PACF returns the sample partial autocorrelations at lags 1..maxLag.
func PACF(x []float64, maxLag int) []float64 { return PACFFromACF(ACF(x, maxLag)) }
