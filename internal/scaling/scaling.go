package scaling

import "math"

// Target is the binary exponent the largest magnitude is moved to: after
// scaling by Exponent's k, max|x| lies in [2^(Target−1), 2^Target).
const Target = 256

// Exponent returns k such that the largest finite magnitude in xs, times
// 2^k, lies in [2^(Target−1), 2^Target). NaN and ±Inf are ignored; when
// no value is finite and non-zero it returns 0.
func Exponent(xs ...[]float64) int {
	m := 0.0
	for _, x := range xs {
		for _, v := range x {
			if a := math.Abs(v); a > m && !math.IsInf(a, 0) {
				m = a
			}
		}
	}
	return ExponentOfMax(m)
}

// ExponentOfMax returns Exponent's k for a largest magnitude m already
// known (0 when m is 0, NaN or ±Inf).
func ExponentOfMax(m float64) int {
	if m == 0 || math.IsNaN(m) || math.IsInf(m, 0) {
		return 0
	}
	_, e := math.Frexp(math.Abs(m))
	return Target - e
}

// Scale writes x·2^k into dst and returns it; dst may be x itself or nil
// (a new slice is allocated). It panics when dst is given with a length
// other than len(x) (a broken internal invariant).
func Scale(dst, x []float64, k int) []float64 {
	if dst == nil {
		dst = make([]float64, len(x))
	}
	if len(dst) != len(x) {
		panic("scaling: Scale: dst and x differ in length")
	}
	// Multiplying by a normal power of two is exact unless the product
	// leaves the normal range, where it is rounded once, as math.Ldexp
	// would; it is several times faster than Ldexp. Factors outside the
	// normal range are applied in two exact steps (the intermediate lies
	// between x and the result, so it cannot round when the result is
	// normal).
	if k == 0 {
		copy(dst, x)
		return dst
	}
	if k >= -1022 && k <= 1023 {
		f := math.Ldexp(1, k)
		for i, v := range x {
			dst[i] = v * f
		}
		return dst
	}
	if k >= -2044 && k <= 2046 {
		f1, f2 := math.Ldexp(1, k/2), math.Ldexp(1, k-k/2)
		for i, v := range x {
			dst[i] = v * f1 * f2
		}
		return dst
	}
	for i, v := range x { // every finite non-zero value overflows or vanishes
		dst[i] = math.Ldexp(v, k)
	}
	return dst
}

// Finite reports whether every value of x is finite (no NaN, no ±Inf).
func Finite(x []float64) bool {
	for _, v := range x {
		if v-v != 0 { // NaN for NaN and ±Inf, 0 for every finite v
			return false
		}
	}
	return true
}

// NoInf reports whether no value of x is ±Inf (NaN is allowed: it marks
// a value that is missing or undefined by the method's own rules).
func NoInf(x []float64) bool {
	for _, v := range x {
		if math.IsInf(v, 0) {
			return false
		}
	}
	return true
}
