// Package accuracy measures forecasts against what happened: point error
// measures, interval and quantile scores, residual diagnostics of fitted
// models, rolling-origin backtests of any almanac.Model against the
// benchmark methods, and bands calibrated from out-of-sample errors.
//
// Point measures (error = actual − forecast): ME, MAE, MSE, RMSE, MAPE,
// SMAPE (the M3 definition, in percent), MdAE, MASE and RMSSE (scaled by
// the in-sample naive or seasonal naive errors, NaiveScale),
// TrackingSignal, and Relative for any of them against a benchmark
// forecast. Interval and probabilistic scores: Coverage, IntervalScore
// (Winkler), MSIS, Pinball, CRPSNormal and CRPSSample. Residual
// diagnostics: ACF, PACF, Autocovariances, LjungBox, BoxPierce and
// Residuals.Diagnose for any almanac.Fitted.
//
// Backtest evaluates any almanac.Model by rolling origin (expanding or
// sliding window, first origin, step, horizon, interval levels) side by
// side with benchmarks — by default the naive and seasonal naive methods,
// optionally Naive2, the M4 competition's seasonally adjusted naive, with
// OWA — and reports per-origin forecasts, errors per horizon step, Scores
// per step and overall, scores of the horizon totals, and Ratios to a
// baseline. RunBatch does the same for many series and averages the
// scores, each measure over the series where it is defined
// (BatchComparison.Counts says over how many). Comparison.WriteText prints a
// table for the terminal and WriteCSV a long CSV; these printed layouts
// are our own and are not a stable API (read the fields instead).
//
// Pilot is the automatic forecaster: an almanac.Model for any series of a
// catalogue. It chooses a route from the frequency and the data —
// intermittent demand (classified as Syntetos, Boylan & Croston 2005 do:
// ClassifyDemand, DemandClass), the combination of ETS, ARIMA and Theta
// for yearly to monthly data, decomposition-based combinations for weekly
// and for daily and hourly data with two cycles — repairs gaps, falls
// back to simpler methods down to the benchmarks when a route cannot be
// fitted, censors forecasts of non-negative data at zero, and reports
// what it did per series (PilotFit.Report).
//
// A failure never aborts the other fits. A candidate that fails to fit or
// forecast at an origin (or panics) is scored over the origins it
// completed; the failure is listed in its Run (Run.Done, Run.Failures)
// and, for a batch, in BatchComparison.FitFailures. The batch summaries
// cover the series on which every candidate completed at least one
// origin, so the candidates are compared on the same series; a series
// left out (its data cannot hold the origins, or a candidate completed
// none) is listed in BatchComparison.Failed with the reason, and its
// per-series results are kept. OWA compares a candidate with Naive2 over
// the origins both completed, so a failure never makes one look better
// on cells the other forecast. Backtest.Progress reports each fit as it
// finishes. A cancelled context (a deadline) stops the pool and returns
// what was done, marked Partial, beside the context's error.
//
// Beside the per-step scores, each run scores the forecast of the total
// over the horizon at each origin (Run.Totals, Run.Total): its error and,
// per level, the coverage and interval score of the total's band — from
// the quantiles of the totals of sample paths (those the forecast holds,
// or Backtest.Paths drawn by the fitted model's Simulate), or, for a
// model that gives no paths, from the sum of the steps' bounds, which
// assumes perfectly correlated step errors and overstates coverage
// (TotalSource says which).
//
// WriteReview writes a review page: one static HTML file, for a planner
// to open in a browser, about a batch run described by a Review — a
// plain structure of one ReviewSeries per series (history, fitted values,
// forecast, how the model was chosen, filled values, the backtest, or why
// the series failed) that any batch can fill; NewReviewSeries and
// ReviewFromBatch fill the common parts. The page holds a summary table
// of every series, sortable and filterable (a few lines of inline
// script), with flags for failures, fallbacks, bias, a model behind its
// baseline, narrow bands, filled values and a missing backtest, explained
// on the page; and for each series a chart (inline SVG: history, one-step
// fit, forecast with its bands) and its details. The page loads nothing
// from elsewhere, depends only on the Review (no clock), and is
// well-formed XML too. It lives here, beside the text and CSV reports,
// because it needs only the standard library (html/template and SVG
// written by hand) and serves any program that forecasts with almanac;
// richer pictures (PNG, gonum's plot package) are left to applications —
// see the examples module. Like the text reports, its look and wording
// are not a stable API; the fields of Review are.
//
// TriggSignal is Trigg's (1964) smoothed tracking signal of a sequence of
// one-step errors, with TriggLimit its usual 95% bound; the review page
// flags bias with it.
//
// # The automatic forecaster
//
// Pilot's routes and fallback chain are listed on its type. Its bands
// are quantiles of sample paths of the fitted route, so the bands of one
// step and of sums over several steps come from one joint distribution.
// A combination's paths are those of almanac.Combination (the members'
// quantiles averaged step by step, the paths keeping the dependence
// across steps). Which route and which models serve which kind of series
// was decided by measuring on whole data sets with the evaluation program
// (internal/cmd/evaluate): the M3 competition data and invented weekly,
// daily and hourly series (internal/synth); the README gives the figures.
//
// # Calibrated bands
//
// Calibrated wraps any almanac.Model and sets its bands and sample paths
// from the model's scale-free out-of-sample errors at rolling origins, per
// horizon step, resampling whole error trajectories so that sums over the
// horizon are calibrated too; PoolCalibration lets the fits of a batch
// share the errors of their group, which short series need. See
// Calibrated for the method, its assumptions (exchangeable scaled errors;
// within a pool, across series) and its finite-sample behaviour. Measured
// on all 3,003 M3 series with errors pooled by category (the defaults;
// out-of-sample bands scored on the held-out test parts):
//
//	                        80% band          95% band        total over h
//	                   coverage   MSIS   coverage   MSIS     80%     95%
//	smoothing.Select       74.4   5.83       89.6  10.01    66.0    81.2
//	  calibrated           81.9   5.99       96.4   9.72    82.9    96.3
//	damped trend           73.6   7.54       87.4  14.26    62.6    75.3
//	  calibrated           81.0   7.55       95.5  12.36    81.8    95.1
//
// ("damped trend" is smoothing.Spec ETS(A,Ad,N) without seasonal
// adjustment; coverage in percent of the test values, MSIS as the M4
// competition defines it, totals' coverage in percent of the series.) By
// category the 80% coverage of the calibrated Select is 85.6 yearly,
// 79.2 quarterly, 81.9 monthly and 84.8 other; by step it stays within
// 76–88 (yearly series are over-covered at the first steps, 87%). Errors
// from a series' own recent origins alone did worse than the model's
// bands (M3 monthly, damped trend, 20 origins one step apart: 56%
// coverage of the 80% bands against the model's 77%): consecutive
// origins share most of their errors, so one series rarely has enough
// independent ones. Calibrate catalogues with pooling.
//
// # Missing values
//
// NaN marks a missing value everywhere. A measure leaves out every index
// at which one of its inputs (actual, forecast, bound, quantile) is NaN,
// and averages over the rest; when nothing is left it returns an error
// wrapping almanac.ErrAllMissing. The in-sample scale of MASE, RMSSE and
// MSIS leaves out the differences that involve a NaN. ACF, PACF and the
// portmanteau tests pass over NaN as R's acf does with na.pass (n counts
// the observed values). TriggSignal passes over a NaN error, leaving its
// smoothed values unchanged. The review page draws missing values as
// gaps in the history line. Pilot leaves out leading missing values and
// fills the others with decompose.Repair, listing each in its report.
// ±Inf is never data: it is an error wrapping
// almanac.ErrNonFinite.
//
// # Undefined values
//
// A measure never returns a silent number for an undefined quantity. The
// functions return an error wrapping ErrUndefined (with NaN) when they
// would divide by zero: MAPE with an actual value of 0, SMAPE with an
// actual value and forecast both 0, MASE, RMSSE and MSIS with a constant
// in-sample part, TrackingSignal with all errors 0, Relative with a
// perfect benchmark. A result that does not fit in a float64 at all (the
// MAE of {1e308, −1e308} against {−1e308, 1e308} is 2e308) gives an error
// wrapping almanac.ErrNonFinite, never ±Inf. Summary tables (Scores) hold
// NaN for an undefined or unrepresentable measure and keep the others.
// Batch averages take each measure over the series where it is defined,
// so one series with a zero does not make MAPE undefined for a whole
// catalogue; BatchComparison.Counts and the renderings say over how many
// series each average was taken. The tracking signal is shown per
// series, with its meaning, and never averaged across series.
//
// # Numerical notes
//
// Sums are accumulated left to right in float64, on the values multiplied
// by a power of two that brings the largest magnitude near 2^256, and the
// result is scaled back. The multiplication is exact, so the results are
// bit for bit those of the plain sums on ordinary data, while values near
// the float64 limit give every representable answer: the ME and MAPE of
// the example above are 0 and 200, the RMSE of errors of 3e200 and 4e200
// is 3.5e200 although their MSE is beyond the range, and MASE, RMSSE and
// MSIS divide numerator and scale in the same scaled units. sMAPE terms
// are formed without overflowing; Naive2 computes on rescaled data too.
// The autocorrelations, partial autocorrelations and portmanteau tests do
// not depend on the scale and are computed on rescaled data, so data like
// ±1e308 give their values; Autocovariances maps the covariances back and
// returns an error wrapping almanac.ErrNonFinite for one beyond the
// float64 range (the variance of ±1e300). The batch averages
// (BatchComparison.Mean and Total) sum the series' scores rescaled the
// same way, so MAEs of 1.5e308 on several series average to 1.5e308, not
// +Inf; an infinite score (which the scores never hold) makes its average
// NaN.
// The in-sample MASE of
// the naive method's own one-step fitted values is exactly 1 (numerator
// and scale are the same sum). CRPSNormal uses the closed form of
// Gneiting et al. (2005); CRPSSample the energy form over the empirical
// distribution of the draws, computed from the sorted draws in
// O(n log n). Portmanteau p-values are chi-square upper tails from
// gonum's distuv.
//
// # Persistence
//
// A Naive2Fit is an almanac.Storable of kind "accuracy.naive2" (the
// period and the data; fitting again is exact). A CalibratedFit is one of
// kind "accuracy.calibrated": the inner model as a nested document, its
// own scaled error trajectories, the pooled trajectories its bands are
// drawn from when they come from a pool (at most Paths of them, not the
// whole pool), the counts of its status and the options that shape its
// forecasts; it loads bit-identically (points, bands, Simulate) and
// measures nothing again. It refreshes through its inner model
// (almanac.Refresh) and keeps the calibration as measured at the fit:
// new observations add no errors until it is calibrated again.
//
// # Concurrency
//
// Every function is safe for concurrent use. A Backtest value is a
// specification, safe to share; Run fits the (model, origin) pairs on a
// pool of Workers goroutines and writes each result by index, so the
// output is bit-identical for any number of workers, including which fits
// fail and with which error (every fit runs whatever the others gave; the
// sample paths of the horizon totals are seeded by candidate and origin).
// Only a cancellation makes the result depend on timing: which fits were
// done by then. Nothing else in the package starts goroutines: a Pilot
// fit runs its models one after another on the calling goroutine
// (BatchFit spreads series over cores), and its sample paths come from a
// generator seeded by Pilot.Seed, so a series gets bit-identical
// forecasts however a batch is scheduled.
//
// # Performance
//
// Measured with the package benchmarks on a 2-core box shared with other
// jobs, so the figures are indicative: MASE over 1000 pairs ≈ 10 µs and
// CRPSNormal ≈ 80 ns per pair, both without allocation (a test asserts
// it); CRPSSample ≈ 60 µs per step with 1000 draws. A backtest of the
// seasonal naive method over 24 origins of the 144-point monthly
// AirPassengers series, 12 steps ahead with two interval levels, takes
// ≈ 0.3 ms on one worker (≈ 0.2 ms on two); the same with
// smoothing.Select (automatic ETS) takes ≈ 2.4 s on one worker and
// ≈ 2.2 s on two (Select fitting its candidates on one goroutine); the
// cost is the model fits, the scoring is negligible. RunBatch over 100
// windows of the same series (drift beside the two default benchmarks,
// 6 origins, 12 steps, an 80% band, one series in ten left out) takes
// ≈ 10 ms, ≈ 0.1 ms a series, on one worker or two (fits this cheap
// leave little to share). WriteReview takes about 0.3 ms of CPU a series
// (72 monthly observations, a 12-step forecast with two bands, a backtest
// of four candidates; user CPU time of BenchmarkWriteReview over 200
// series on one core, as wall times on the shared machine were several
// times higher), and the page grows by about 7 KB a series.
//
// Calibrated on the same AirPassengers series (damped-trend ETS, 18
// steps, 20 origins), counted in instructions (valgrind --tool=callgrind
// on the benchmarks, because timings on the shared machine varied by a
// factor of five): the model's own fit 10.7 million, calibrated with the
// fit rolled forward (RollForward) 22.7 million (×2.1), re-estimated at
// every origin (RefitEach) 189 million (×17.6); a forecast of 18 steps
// with two bands from a pool of 2000 trajectories 6.4 million (sorting
// the paths). On all of M3 (2 workers, loaded machine) the calibrated
// Select took 592 s against 303 s for Select alone, and the calibrated
// mean of Select, arima.Search and Theta 1.8 times that combination's
// CPU time (37 s against 21 s for every twentieth series, user time).
// Re-estimating at every origin instead of rolling forward improved the
// calibrated damped trend's 80% MSIS from 7.90 to 7.54 (measured with an
// earlier 8-observation minimum training window) at ten times the cost.
// A saved calibrated fit drawing from a pool above Paths holds the 2000
// trajectories drawn: 693 kB for 18 steps, about 30 ms to save and 40 to
// 120 ms to load (BenchmarkSavedCalibrated, wall time on the loaded
// machine; most of it the JSON numbers).
//
// # References
//
//   - Makridakis, S. & Hibon, M. (2000). The M3-Competition: results,
//     conclusions and implications. IJF 16, 451–476 (sMAPE).
//   - Hyndman, R. J. & Koehler, A. B. (2006). Another look at measures of
//     forecast accuracy. IJF 22, 679–688 (MASE).
//   - Makridakis, S., Spiliotis, E. & Assimakopoulos, V. (2020). The M4
//     Competition. IJF 36, 54–74 (MSIS, OWA); and the M5 competition
//     guidelines (RMSSE).
//   - Gneiting, T. & Raftery, A. E. (2007). Strictly proper scoring rules,
//     prediction, and estimation. JASA 102, 359–378 (interval score).
//   - Gneiting, T., Raftery, A. E., Westveld, A. H. & Goldman, T. (2005).
//     Calibrated probabilistic forecasting using ensemble model output
//     statistics. Monthly Weather Review 133, 1098–1118 (CRPS of a normal).
//   - Ljung, G. M. & Box, G. E. P. (1978). On a measure of lack of fit in
//     time series models. Biometrika 65, 297–303; Box, G. E. P. & Pierce,
//     D. A. (1970). JASA 65, 1509–1526.
//   - Matheson, J. E. & Winkler, R. L. (1976). Scoring rules for
//     continuous probability distributions. Management Science 22,
//     1087–1096 (CRPS); Winkler, R. L. (1972). A decision-theoretic
//     approach to interval estimation. JASA 67, 187–191.
//   - Trigg, D. W. (1964). Monitoring a forecasting system. Operational
//     Research Quarterly 15, 271–274 (the smoothed tracking signal and
//     its limits; details recalled from memory).
//   - Syntetos, A. A., Boylan, J. E. & Croston, J. D. (2005). On the
//     categorization of demand patterns. Journal of the Operational
//     Research Society 56, 495–503 (ADI and CV² cut-offs 1.32 and 0.49).
//   - Tashman, L. J. (2000). Out-of-sample tests of forecasting accuracy:
//     an analysis and review. IJF 16, 437–450 (rolling origins).
//   - Williams, W. H. & Goodman, M. L. (1971). A simple method for the
//     construction of empirical confidence limits for economic forecasts.
//     JASA 66, 752–754 (bands from out-of-sample errors).
//   - Vovk, V., Gammerman, A. & Shafer, G. (2005). Algorithmic Learning in
//     a Random World. Springer (conformal prediction).
//   - Papadopoulos, H., Vovk, V. & Gammerman, A. (2011). Regression
//     conformal prediction with nearest neighbours. JAIR 40, 815–840
//     (normalised nonconformity scores; recalled from memory).
//   - Stankeviciute, K., Alaa, A. M. & van der Schaar, M. (2021).
//     Conformal time-series forecasting. NeurIPS 34 (multi-step horizons).
//   - Hyndman, R. J. & Fan, Y. (1996). Sample quantiles in statistical
//     packages. The American Statistician 50, 361–365 (type 7).
//   - Brown, R. G. (1959). Statistical Forecasting for Inventory Control.
//     McGraw-Hill; Trigg, D. W. (1964). Monitoring a forecasting system.
//     Operational Research Quarterly 15, 271–274 (tracking signals).
package accuracy
