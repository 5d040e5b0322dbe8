package smoothing

import (
	"math"

	"github.com/almanac-go/almanac/internal/brent"
)

// This file holds the small numerical kernels shared by the Theta method
// and the intermittent-demand methods: simple exponential smoothing (SES)
// with the initial level profiled out, ordinary least squares on time, and
// the search over α built on internal/brent. None of them allocates.

// Bounds on the SES smoothing parameter when it is estimated: the usual
// bounds of the innovations state-space literature (Hyndman, Koehler, Ord
// & Snyder 2008, ch. 5, common practice), which keep the 1/α of the
// Theta drift term finite.
const (
	sesAlphaLower = 1e-4
	sesAlphaUpper = 0.9999
)

// sesProfile returns, for smoothing parameter alpha, the initial level ℓ0
// that minimises the sum of squared one-step errors of simple exponential
// smoothing on y, and that minimal sum.
//
// With ℓ_t = ℓ_{t−1} + α(y_t − ℓ_{t−1}) the one-step error
// e_t = y_t − ℓ_{t−1} (t = 1..n) is affine in ℓ0:
// e_t = a_t − (1−α)^{t−1} ℓ0, where a_t are the errors of the same
// recursion started at ℓ0 = 0. The sum of squares is therefore a quadratic
// in ℓ0 with the closed-form minimiser ℓ0 = Σ a_t c_t / Σ c_t²,
// c_t = (1−α)^{t−1}. Minimising over ℓ0 in closed form leaves a
// one-dimensional problem in α; at the joint minimum this is the
// least-squares (equivalently, Gaussian maximum-likelihood) estimate of
// the ETS(A,N,N) model.
//
// To keep the sums well conditioned the recursion runs on y − y[0] (SES
// is translation equivariant) and the final sum of squares is recomputed
// by a second pass with the optimal ℓ0 rather than by expanding the
// quadratic. y must be complete and non-empty.
func sesProfile(y []float64, alpha float64) (l0, sse float64) {
	shift := y[0]
	beta := 1 - alpha
	level, c := 0.0, 1.0
	sac, scc := 0.0, 0.0
	for _, v := range y {
		a := (v - shift) - level
		sac += a * c
		scc += c * c
		level += alpha * a
		c *= beta
	}
	l0 = 0
	if scc > 0 {
		l0 = sac / scc
	}
	level = l0
	for _, v := range y {
		e := (v - shift) - level
		sse += e * e
		level += alpha * e
	}
	return l0 + shift, sse
}

// sesFilterTo runs SES on y from level l0 and writes the level before
// each observation into dst (dst[t] = ℓ_t, the one-step forecast of
// y[t], for t = 0..n−1) and returns the final level ℓ_n. dst must have
// length len(y).
func sesFilterTo(dst, y []float64, alpha, l0 float64) float64 {
	level := l0
	for t, v := range y {
		dst[t] = level
		level += alpha * (v - level)
	}
	return level
}

// olsTimeSlope returns the intercept and slope of the least-squares line
// of y on t = 1..n, computed with centred sums. n must be at least 2.
func olsTimeSlope(y []float64) (intercept, slope float64) {
	n := float64(len(y))
	tbar := (n + 1) / 2
	ybar := 0.0
	for _, v := range y {
		ybar += v
	}
	ybar /= n
	sxy, sxx := 0.0, 0.0
	for i, v := range y {
		dt := float64(i+1) - tbar
		sxy += dt * (v - ybar)
		sxx += dt * dt
	}
	slope = sxy / sxx
	return ybar - slope*tbar, slope
}

// minimize1D returns a minimiser of f over the closed interval [lo, hi]:
// f is first evaluated on a grid of gridN+1 equally spaced points
// (endpoints included) so that a poor local minimum is unlikely, then
// Brent's method (golden section with parabolic interpolation; Brent
// 1973, "Algorithms for Minimization without Derivatives", ch. 5) refines
// the best grid point within its two neighbouring cells. The best point
// seen, grid endpoints included, is returned. The search is deterministic
// and allocates nothing.
func minimize1D(f func(float64) float64, lo, hi float64, gridN int) (xbest, fbest float64) {
	step := (hi - lo) / float64(gridN)
	xbest, fbest = lo, f(lo)
	if math.IsNaN(fbest) {
		fbest = math.Inf(1)
	}
	ibest := 0
	for i := 1; i <= gridN; i++ {
		x := lo + float64(i)*step
		if i == gridN {
			x = hi
		}
		if fx := f(x); fx < fbest {
			xbest, fbest, ibest = x, fx, i
		}
	}
	a := lo + float64(max(ibest-1, 0))*step
	b := lo + float64(min(ibest+1, gridN))*step
	if ibest+1 >= gridN {
		b = hi
	}
	x, fx := brent.Minimize(f, a, b, 1e-10, 200)
	if fx < fbest {
		xbest, fbest = x, fx
	}
	return xbest, fbest
}
