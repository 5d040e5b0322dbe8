// Package scaling rescales data by powers of two so that the model
// packages can compute on values of a safe magnitude and map the results
// back.
//
// A value near the float64 limit (about 1.8e308) overflows as soon as two
// of them are added or one is squared, although the mean, the trend or a
// standard deviation of such data is usually representable. A method that
// is equivariant under scaling (a moving average, a loess smoother, a
// naive forecast, a mean absolute error) therefore runs on y·2^k, with k
// chosen by Exponent so that the largest magnitude lands near 2^Target,
// and maps its results back by 2^−k. A result that does not fit in a
// float64 after mapping back is not representable at all, and the caller
// reports it as an error (almanac.ErrNonFinite) instead of returning ±Inf.
//
// # Numerical notes
//
// Multiplying by a power of two is exact unless the result overflows or
// falls below the normal range (2.2e−308), and it commutes with every
// correctly rounded operation. A method run on the rescaled data therefore
// gives bit for bit 2^k times its unscaled results whenever the unscaled
// computation neither overflows nor underflows: reference fixtures keep
// matching exactly, and scaling the data by a power of two scales the
// results exactly. Target = 256 leaves room for squares and for sums of
// up to 2^400 terms, and keeps values down to 2^−1278 times the largest
// one in the normal range, so a single huge spike does not push ordinary
// values into subnormal numbers.
//
// # Missing values
//
// NaN is ignored when choosing the exponent and stays NaN when scaled.
//
// # Concurrency
//
// Every function is pure; none starts a goroutine.
//
// # Performance
//
// One pass over the data for Exponent and one math.Ldexp per value for
// Scale; no allocation when dst is given.
//
// # References
//
// IEEE 754-2008, §5.3.3 (scaleB is exact when the result is normal),
// common practice in numerical software.
package scaling
