// Package trigg computes Trigg's (1964) tracking signal, the one
// definition behind accuracy.TriggSignal and the refresh policy of the
// root package (almanac.RefreshPolicy), so that the review page's bias
// flag and the refit rule read the same number from the same errors.
//
// The signal at the end of a sequence of one-step forecast errors e_t
// (actual − forecast, oldest first) with smoothing constant α in (0, 1)
// is the exponentially smoothed error over the exponentially smoothed
// absolute error,
//
//	E_t = α·e_t + (1 − α)·E_{t−1},  M_t = α·|e_t| + (1 − α)·M_{t−1},  T = E_n / M_n,
//
// from E_0 = 0 and M_0 = the mean absolute error of the first
// min(n, ⌈1/α⌉) observed errors (common practice: a start for M that a
// few periods would otherwise have to build up). A NaN error (a missing
// observation) is passed over. T lies in [−1, 1].
//
// # Missing values
//
// NaN errors are skipped: E and M carry on unchanged, and they do not
// count towards the start of M. Every error NaN is reported as
// AllMissing.
//
// # Numerical notes
//
// Both recursions are convex combinations, so neither overflows for
// finite errors, even near the float64 limit; the start of M divides each
// term before adding it. |E| ≤ M holds up to rounding, and the result is
// clamped to [−1, 1]. An infinite error is reported (NonFinite), not
// skipped.
//
// # Concurrency
//
// Signal is a pure function, safe for concurrent use.
//
// # References
//
// D. W. Trigg (1964), "Monitoring a forecasting system", Operational
// Research Quarterly 15, 271–274.
//
// # Performance
//
// Two passes over the errors, no allocation.
package trigg
