// Package decompose splits a series into trend, seasonal and remainder
// components — STL, multiple-seasonal STL (MSTL) and classical
// moving-average decomposition — measures the strength of trend and
// seasonality, repairs gaps and disruptions with a seasonal-aware
// interpolation, screens for outliers, and forecasts by decomposition:
// any almanac.Model forecasts the seasonally adjusted series and the
// seasonal part is added back.
//
// # Methods
//
// STL follows Cleveland, Cleveland, McRae & Terpenning (1990) as R's
// stats::stl computes it (internal/stl holds the algorithm): inner and
// outer (robustness) loops, loess of degree 0 or 1 for each of the three
// smoothers, the jump parameters, the periodic option and R's default
// windows. Spans below 3 are raised to 3 and even spans to the next odd
// number, as the authors' Fortran does; the spans actually used are in
// Decomposition.Settings.
//
// MSTL (Bandara, Hyndman & Bergmeir 2021) handles several seasonal
// periods. Classical reproduces R's stats::decompose.
//
// # Missing values
//
// STL, MSTL and Forecaster need complete data and return an error
// wrapping almanac.ErrMissing otherwise; Repair.Fill fills the gaps
// first and reports every value it filled. Classical accepts missing
// values (R's conventions). Nothing in this package changes a value
// without reporting it: Repair.Fill and Screen.Apply return a Change for
// every value they replace.
//
// # Numerical notes
//
// The reference test checks STL and Classical against R 4.2.2 (stats::stl
// and stats::decompose) on ten fixtures: every component agrees within
// 1e-8 absolute (in fact within about 1e-11). R's robust STL computes its
// robustness scale with a partial sort that, for an even number of
// observations, does not always return the exact median; internal/stl
// reproduces that routine, which is why the robust fixtures match.
//
// # Concurrency
//
// STL, MSTL, Classical, Repair, Screen and Forecaster values are
// specifications, safe to share between goroutines. Decompositions and
// fitted forecasters are read-only. No goroutines are started.
//
// # References
//
//   - Cleveland, R. B., Cleveland, W. S., McRae, J. E. & Terpenning, I.
//     (1990). STL: A seasonal-trend decomposition procedure based on
//     loess. Journal of Official Statistics 6(1), 3–73.
//   - Bandara, K., Hyndman, R. J. & Bergmeir, C. (2021). MSTL: A
//     seasonal-trend decomposition algorithm for time series with
//     multiple seasonal patterns. arXiv:2107.13462.
//   - Wang, X., Smith, K. A. & Hyndman, R. J. (2006). Characteristic-based
//     clustering for time series data. Data Mining and Knowledge
//     Discovery 13, 335–364.
//   - Tukey, J. W. (1977). Exploratory Data Analysis. Addison-Wesley
//     (fences at k interquartile ranges).
package decompose
