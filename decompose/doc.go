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
// periods: periods ascending, STL seasonal spans 7 + 4·i, two sweeps
// (the paper's defaults, common practice). A non-integer period such as
// 365.25/7 for weekly data is rounded to the nearest whole number of
// observations; the alternative for such cycles is regression on Fourier
// terms of the exact period (calendar.Fourier) inside a model that takes
// regressors. Classical reproduces R's stats::decompose.
//
// Decomposition.Strength gives the strength of trend and of each
// seasonal component (Wang, Smith & Hyndman 2006) and
// Decomposition.Adjusted the seasonally adjusted series.
//
// # Repairing data
//
// Repair.Fill replaces missing values and values the caller marks as
// disrupted: a linear fill first, then (Passes times) a robust STL of the
// filled series, a linear interpolation of the seasonally adjusted
// series across the gaps and the seasonal component added back. Screen
// flags points whose robust-STL remainder lies beyond K interquartile
// ranges outside the quartiles (Tukey's fences, default K = 3) and
// replaces them the same way. Both return a Change (index, time, old and
// new value, reason) for every value replaced and never alter observed
// values otherwise.
//
// # Forecasting
//
// Forecaster is an almanac.Model: it decomposes (STL unless another
// Method is given), forecasts the adjusted series with any
// almanac.Model, and adds the last cycle of each seasonal component
// (seasonal naive of the seasonal part), moving the inner model's
// intervals, quantiles and sample paths by the same amounts. Its String
// is the method and the inner model, e.g. "STL+Drift".
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
// and stats::decompose) on every fixture in testdata/reference, within
// each fixture's own tolerance (the largest differences are about 1e-11).
// R's robust STL computes its
// robustness scale with a partial sort that, for an even number of
// observations, does not always return the exact median (about one
// sample in ten, sometimes by far); internal/stl reproduces that routine,
// which is why the robust fixtures match. STL.ExactMedian uses the exact
// median instead, as the paper defines the weights.
//
// Every method, Repair and Screen compute on the data multiplied by a
// power of two that brings the largest magnitude near 2^256, and scale
// the results back. The methods are equivariant under scaling and the
// multiplication is exact, so results are bit for bit those of the plain
// computation whenever that neither overflows nor underflows, scaling the
// data by a power of two scales the components exactly, and data near the
// float64 limit (1e308) are decomposed instead of overflowing to NaN (or,
// in robust STL, panicking). A component, adjusted value, forecast or
// bound that does not fit in a float64 is an error wrapping
// almanac.ErrNonFinite, never ±Inf or NaN with a nil error. Screen judges
// "no spread in the remainder" against the median |value|, so a single
// huge outlier cannot hide itself.
//
// # Performance
//
// Measured on a 2-core box shared with seven other jobs (load average
// 8–10 during the runs), so the figures are indicative. Process CPU time
// per call, public API (allocation of the result included):
//
//	STL, monthly CO2, 468 points, period 12      0.12 ms   robust 0.79 ms
//	STL, weekly CO2, 2,284 points, period 52     0.54 ms   robust 4.3 ms
//	MSTL, weekly CO2, periods 13 and 52          2.2 ms
//	Repair.Fill, weekly CO2, 59 gaps             13 ms (3 robust STL passes)
//	Forecaster STL+Drift, 468 points, fit + 24   0.13 ms
//
// R 4.2.2's compiled stl took 0.27–0.44 ms (non-robust) and 1.3–1.5 ms
// (robust) of user CPU time per call for the 468-point series (2,000 calls
// of stl(co2, s.window = 7) timed with system.time, two runs on the same
// loaded machine). The wall-clock benchmark figures (go test -bench) were
// 2–4 times the CPU times under that load. The STL kernel itself
// (internal/stl with a reused Workspace) does not allocate; rescaling by
// a power of two costs 2.7% more instructions non-robust and 0.5% robust
// (callgrind, 200 calls on the same series).
//
// Instruction counts (valgrind --tool=callgrind on BenchmarkSTL, one
// core; (100 calls − 1 call)/99), which the machine's load does not
// change: robust STL of the 468 monthly values 6.0 million instructions
// a call (10.7 million before the tricube tables were kept per bandwidth
// with their window sums), of the 2,284 weekly values at period 52 26.3
// million (51.3 million); the results are bit-identical to those of the
// earlier code. The CPU times in the table above predate that change;
// afterwards the speed program measured 0.48 ms (468 values) and 2.4 ms
// (2,284 values) for the robust calls, medians of 5 rounds at load
// average 4–6, against 1.22 ms and 6.58 ms for R's stl in the same
// rounds (2.6 and 2.8 times ours; at load 25–28, 0.76 and 3.2 ms against
// 1.68 and 7.73 ms). The README's Speed table compares the robust calls with
// R's stl on the same data (internal/cmd/speed and its reference
// scripts).
//
// # Persistence
//
// A ForecasterFit is an almanac.Storable of kind "decompose.forecaster":
// the document holds the decomposition as computed (every component,
// so the method is not run again and a user's own Method takes part) and
// the model of the adjusted series as a nested document, which must be
// storable itself.
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
