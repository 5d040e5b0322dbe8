package reconcile

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// Every method of this package is positively homogeneous: reconciling
// c·ŷ (with residuals c·E and history c·Y) gives c times the result, and
// the weights W matter only up to a common factor. So the arithmetic is
// done on values divided by a power of two 2^e chosen from the largest
// magnitude at hand, and the results are multiplied back by 2^e.
// Multiplying by a power of two is exact unless the result leaves the
// normal float64 range, so for ordinary data this changes no bit of any
// result; near the limits of float64 (values about 1e308, or about
// 1e-308) it keeps intermediate sums and products from overflowing or
// underflowing, and only a final value that is itself beyond ±MaxFloat64
// is reported, as an error wrapping almanac.ErrNonFinite.

// expOf returns the binary exponent e of the largest magnitude in xs
// (max |x| = f·2^e with f in [0.5, 1)), or 0 when every value is zero.
// NaN values are skipped.
func expOf(xs []float64) int {
	var m float64
	for _, v := range xs {
		if a := math.Abs(v); a > m {
			m = a
		}
	}
	return expOfMax(m)
}

// expOfMax returns the binary exponent of m ≥ 0 (0 for m = 0 or a
// non-finite m).
func expOfMax(m float64) int {
	if m == 0 || math.IsInf(m, 0) || math.IsNaN(m) {
		return 0
	}
	_, e := math.Frexp(m)
	return e
}

// scaleInto writes src·2^(−e) into dst.
func scaleInto(dst, src []float64, e int) {
	for i, v := range src {
		dst[i] = math.Ldexp(v, -e)
	}
}

// unscale multiplies every value of xs by 2^e in place and reports the
// first index whose result is beyond the float64 range (−1 when none).
func unscale(xs []float64, e int) int {
	bad := -1
	for i, v := range xs {
		r := math.Ldexp(v, e)
		if bad < 0 && (math.IsInf(r, 0) || math.IsNaN(r)) {
			bad = i
		}
		xs[i] = r
	}
	return bad
}

// notRepresentable is the error for a result beyond ±MaxFloat64.
func notRepresentable(what string, node string, row int) error {
	return fmt.Errorf("reconcile: %w: the %s of node %q at row %d is beyond the float64 range (about ±1.8e308)", almanac.ErrNonFinite, what, node, row)
}

// scaleRows divides every row by the power of two 2^e of the largest
// magnitude in all of them (exact for ordinary data) and returns e. NaN
// entries stay NaN.
func scaleRows(rows [][]float64) int {
	var m float64
	for _, r := range rows {
		for _, v := range r {
			if a := math.Abs(v); a > m {
				m = a
			}
		}
	}
	e := expOfMax(m)
	for _, r := range rows {
		scaleInto(r, r, e)
	}
	return e
}
