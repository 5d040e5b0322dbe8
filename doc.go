// Package almanac is the root of a pure-Go forecasting library: the
// shared Series and Forecast types, the Model and Fitted interfaces that
// every method implements, the benchmark methods every forecast should
// beat, the Box-Cox transform, fitting many series at once, and CSV
// input and output in long format.
//
// The model families live in sub-packages: smoothing (exponential
// smoothing state-space models, Theta, intermittent demand), arima
// (seasonal ARIMA with regressors), decompose (STL and decomposition-based
// forecasting), accuracy (error measures and backtests), reconcile
// (coherent forecasts for hierarchies) and calendar (frequencies and
// calendar arithmetic).
//
// # Missing values
//
// NaN in Series.Values marks a missing observation. ±Inf is always an
// error. Each model documents whether it accepts missing values; those
// that do not return an error wrapping ErrMissing.
//
// # Levels
//
// Prediction-interval levels are percentages in (0, 100) everywhere in
// the module (80, 95); probabilities passed to Forecast.Quantile are
// fractions in (0, 1).
//
// # Concurrency
//
// Model values are specifications and safe to share between goroutines;
// Fitted values and Forecasts are read-only after they are returned.
// Nothing in a single fit starts goroutines; BatchFit fits many series in
// parallel with results in input order, bit-identical for any pool size.
package almanac
