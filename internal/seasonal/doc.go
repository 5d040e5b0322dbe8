// Package seasonal holds classical (moving-average) decomposition and the
// autocorrelation seasonality test, shared by the model packages.
//
// Classical decomposition follows the conventions of R's
// stats::decompose (checked against R in package decompose's reference
// test): a centred moving average of order m (a 2×m average when m is
// even) estimates the trend; the seasonal figure is the mean of the
// detrended values at each position counted from the first observation,
// centred to sum to zero (additive) or average one (multiplicative).
//
// # Missing values
//
// Classical: a missing value makes NaN every trend value whose window
// holds it, and is left out of the seasonal means; a position with no
// detrended value at all gets a NaN figure. IsSeasonal needs complete
// data.
//
// # Numerical notes
//
// The moving average is a direct weighted sum per point (no running
// sums, so no drift). Classical and IsSeasonal work on the data
// multiplied by a power of two that brings the largest magnitude near
// 2^256 (internal/scaling): bit-identical results on ordinary data, no
// overflow near 1e308, and ErrOverflow for a component beyond the float64
// range. Multiplicative decomposition divides by the trend
// and needs a trend that is never zero. IsSeasonal's bound uses Bartlett's
// approximation to the variance of r_m under the hypothesis that the
// autocorrelations beyond lag m−1 are zero (common practice).
//
// # Concurrency
//
// Every function is pure and safe for concurrent use; none starts a
// goroutine.
//
// # Performance
//
// Measured with go test -bench on a 2-core machine shared with other
// jobs, so indicative: Classical with period 12 takes about 5 µs for 120
// values and 37 µs for 1,200 (7 allocations); IsSeasonal about 3 µs and
// 36 µs.
//
// # References
//
// R Core Team, R: A Language and Environment for Statistical Computing,
// help page of stats::decompose.
//
// S. Makridakis, E. Spiliotis and V. Assimakopoulos (2020), The M4
// Competition: 100,000 time series and 61 forecasting methods,
// International Journal of Forecasting 36, 54–74 (the seasonality test of
// the Naive2 benchmark; recalled from memory).
//
// V. Assimakopoulos and K. Nikolopoulos (2000), The theta model: a
// decomposition approach to forecasting, International Journal of
// Forecasting 16, 521–530 (recalled from memory).
package seasonal
