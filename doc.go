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
// # Series and forecasts
//
// A Series is regularly spaced: Values[i] is observed at
// Freq.Add(Start, i). A Model is a specification (options only); its Fit
// returns a Fitted, whose Forecast gives point forecasts, central
// prediction intervals and, through the forecast distribution (Normal,
// Sample or Mapped), any quantile. The forecast starts at y.Time(y.Len()).
// Writing a model of one's own takes a Fit method and the four Fitted
// methods; see Model and the custom-model example. Optional capabilities
// are separate interfaces found by type assertion: Simulator (sample
// paths), ParamCounter (parameters estimated, for residual tests) and
// ResponseResidualer (errors on the data's scale when Residuals are on
// another, as for multiplicative-error or transformed models; the
// ResponseResiduals function falls back to Residuals).
//
// # Combinations
//
// Combination fits several models to one series and combines their
// forecasts: the mean (default), the median, a weighted mean with weights
// given, or weights inverse to each member's mean squared error in a
// small rolling-origin evaluation run inside Fit. A member that fails is
// left out and reported (CombinationFit.Failures); only when every member
// fails is the fit an error. Bands come from combined sample paths when
// the members simulate — members drawn with common random numbers,
// combined draw by draw, and shuffled onto comonotone margins so that
// each step's quantile is the rule applied to the members' quantiles —
// and from the members' quantiles combined the same way otherwise
// (ForecastQuantiles asks for that cheaper form). See Combination for the
// assumptions. CombinationFit.Update brings a fitted combination forward
// to a longer series without re-estimating what its members allow, for
// rolling-origin evaluations.
//
// # Persistence
//
// A fitted model is saved as a versioned JSON document (SaveModel,
// MarshalModel) and loaded back (LoadModel, UnmarshalModel) as a model
// that forecasts bit-identically: point forecasts, bands, quantiles, and
// Simulate with the same source. The document names its kind (e.g.
// "smoothing.ets") and the version of its body; the body holds the
// specification, the estimated parameters and initial states, and the
// data, and the loader re-runs the model's own deterministic filter at
// the stored parameters rather than copying internal arrays. Wrappers
// (BoxCox, Combination, decompose.Forecaster) nest their inner models as
// documents. JSON has no NaN: a missing observation is written as null.
//
// The root does not import the model packages: each package registers
// the kinds it can load in an init function (Register, the pattern of
// image.RegisterFormat and database/sql.Register), so a program loads
// every kind of the packages it imports. A user's own fitted model takes
// part by implementing Storable and registering its kind (see the
// Register example).
//
// Compatibility: a program reads every document of its kind with a body
// version from 1 up to the version it registered; documents written by
// later versions of a kind are refused with an error wrapping ErrDecode
// ("upgrade almanac"), never misread. A new body layout gets a new
// version, and loaders keep reading the older ones. Anything else that
// cannot be loaded — not JSON, truncated, an unknown kind, values
// outside their valid region (a smoothing parameter beyond its bounds, a
// negative variance, lengths that disagree, a number written as a
// string, non-positive data for a multiplicative model) — also gives an
// error wrapping ErrDecode, never a panic.
//
// # Refreshing without refitting
//
// Refresher is the optional interface of fitted models that take new
// observations without estimating again (Refresh, or the function of
// that name, which needs no type switch): ETS, ARIMA, BoxCox and
// Combination (through their members) implement it. The result equals a
// fit of the whole series with the parameters fixed at their estimates;
// missing values (NaN) are allowed, the prediction standing in for the
// state. RefreshPolicy decides when a refresh is no longer enough —
// after a number of new observations, or when Trigg's tracking signal
// says the forecasts have drifted from the data — and says why.
//
// # Benchmarks
//
// Naive, SeasonalNaive, Drift and Mean forecast with normal intervals
// from the closed-form variances of Hyndman & Athanasopoulos, Forecasting:
// Principles and Practice, 3rd ed., §5.5, with σ̂² = Σe²/(R − K) (R
// residuals, K estimated parameters). String() gives "Naive",
// "SeasonalNaive(12)", "Drift" and "Mean".
//
// # Box-Cox
//
// BoxCoxTransform and BoxCoxInverse apply the transform of Box & Cox
// (1964); BoxCoxLLF is the profile log-likelihood as scipy defines it;
// LambdaML maximises it and LambdaGuerrero chooses λ by Guerrero's (1993)
// coefficient-of-variation criterion, both searching [0, 2] by default
// (negative powers only when asked for: their back-transform has no value
// beyond −1/λ). The BoxCox model wrapper fits any Model on the
// transformed scale and transforms forecasts back (median, or mean with
// BiasAdjust); for λ < 0 the bands are those of the forecast distribution
// conditioned on the range of the transform (the power-normal
// distribution), so they stay finite.
//
// # Batches and CSV
//
// BatchFit fits one Model to many series on a bounded pool of goroutines
// and returns one result per series (a panicking model gives a
// *PanicError with its stack); ForecastAll forecasts the results. ReadCSV
// reads series in long format (one row per series and time, columns
// "series", "period" and "value" unless configured, rows in any order),
// WriteSeriesCSV writes them back in the form ReadCSV reads ("2026-01" for
// monthly data), and WriteForecastCSV writes forecasts with columns
// "point", "band80_low"/"band80_high" per level, "status" and "reason":
// every series of the batch has rows, a failed one a single row with
// status "failed" and its error as the reason. Missing values are written
// as NaN (MissingValueText) by every writer.
//
// # Missing values
//
// NaN in Series.Values marks a missing observation. ±Inf is always an
// error. Each model documents whether it accepts missing values; those
// that do not return an error wrapping ErrMissing. The benchmarks accept
// NaN (Naive and Drift forecast from the last observed value,
// SeasonalNaive from the last observed value of each season, Mean
// averages the observed values); the Box-Cox functions pass NaN through
// and ignore it when choosing λ; ReadCSV reads empty cells and NA, N/A,
// NaN and null as NaN, and the writers write NaN.
//
// # Levels
//
// Prediction-interval levels are percentages in (0, 100) everywhere in
// the module (80, 95); probabilities passed to Forecast.Quantile are
// fractions in (0, 1).
//
// # Errors
//
// Bad input gives an error wrapping one of the sentinels in errors.go
// (ErrEmpty, ErrTooShort, ErrAllMissing, ErrMissing, ErrNonFinite,
// ErrConstant, ErrNonPositive, ErrLength, ErrFrequency, ErrLevel,
// ErrHorizon, ErrNoDistribution, ErrInvalid, ErrNotFitted, and ErrCSV…
// for CSV input), testable with errors.Is; *SeriesError and *CSVError
// say where. Nothing reachable from input data panics, and no result is
// NaN or ±Inf with a nil error: a forecast, bound or quantile that does
// not fit in a float64 is an error wrapping ErrNonFinite (NewForecast
// checks every forecast it assembles).
//
// # Numerical notes
//
// The benchmarks compute on the data multiplied by a power of two that
// brings the largest magnitude near 2^256 and map their results back.
// The multiplication is exact, so results are bit for bit those of the
// plain computation on ordinary data, scaling the data by a power of two
// scales every forecast exactly, and data near the float64 limit give
// their representable mean, drift and σ̂ (the mean of three values of
// 9e307 is 9e307, not +Inf). Normal quantiles and sample quantiles avoid
// intermediate overflow the same way. Guerrero's criterion and the
// Box-Cox likelihood's maximiser do not depend on a common scale of the
// data and are computed on rescaled data (centred logs for the
// likelihood).
//
// The Box-Cox transform is computed as expm1(λ log y)/λ, exact near
// λ = 0. λ is searched by Brent's bounded minimisation (tolerance 1e-10
// plus a relative √ε) in [0, 2] unless bounds are given; the likelihood
// and Guerrero's criterion do not allocate per evaluation. The transform,
// the log-likelihood and the maximum-likelihood λ are checked against
// scipy (testdata/reference), and the Naive and SeasonalNaive forecasts,
// standard deviations, bounds and quantiles against numpy computations
// on M3 series.
//
// # Concurrency
//
// Model values are specifications and safe to share between goroutines;
// Fitted values and Forecasts are read-only after they are returned.
// Nothing in a single fit starts goroutines; BatchFit fits many series in
// parallel with results in input order, bit-identical for any pool size.
// Randomness (Simulator) comes only from the rand.Source the caller
// passes.
//
// # Performance
//
// Measured with go test -bench on a 2-core machine shared with other
// jobs, so the figures are indicative: fitting a benchmark model and
// forecasting 12 steps with two levels takes about 3–9 µs for 100
// observations and 0.12–0.24 ms for 10,000 (13–15 allocations whatever
// the length); BoxCoxLLF about 8 µs per 100 values with no allocation;
// LambdaML about 0.03 ms for 100 values and 3.3 ms for 10,000;
// LambdaGuerrero about 7 µs for 100 values; BatchFit of BoxCox{Model:
// Drift{}} over 1,000 series of 20–26 values about 10–12 ms; ReadCSV
// about 60–80 MB/s. For 120 months (accuracy's BenchmarkRefresh, CPU
// time from the difference of two runs, so only to about 10 ms of
// resolution per run): refreshing an ETS(A,Ad,A) or seasonal ARIMA model
// with one month takes about 10–20 µs, loading its saved document
// 0.2–0.4 ms, and fitting it again 2–4 ms.
//
// A Combination of the three benchmark methods Naive, Drift and
// SeasonalNaive, fitted to 48 monthly values and forecasting 12 steps
// with two bands from 1000 combined paths, costs about 26 million
// instructions (valgrind --tool=callgrind; about 4.7 million with 200
// paths): most of it is sorting the members' draws step by step for the
// coupling, against about 60 thousand for one benchmark fit and
// forecast. ForecastQuantiles, which draws no paths, avoids it.
//
// # References
//
// G. E. P. Box and D. R. Cox (1964), An analysis of transformations,
// Journal of the Royal Statistical Society B 26, 211–252.
//
// V. M. Guerrero (1993), Time-series analysis supported by power
// transformations, Journal of Forecasting 12, 37–48.
//
// R. P. Brent (1973), Algorithms for Minimization without Derivatives,
// Prentice-Hall, chapter 5.
//
// R. J. Hyndman and G. Athanasopoulos (2021), Forecasting: Principles and
// Practice, 3rd ed., OTexts, §5.5 (prediction intervals of the benchmark
// methods) and §5.6 (bias-adjusted back-transformation).
//
// J. M. Bates and C. W. J. Granger (1969), The combination of forecasts,
// Operational Research Quarterly 20, 451–468 (inverse-error weights).
//
// R. T. Clemen (1989), Combining forecasts: a review and annotated
// bibliography, International Journal of Forecasting 5, 559–583.
//
// J. Smith and K. F. Wallis (2009), A simple explanation of the forecast
// combination puzzle, Oxford Bulletin of Economics and Statistics 71,
// 331–355 (why equal weights are hard to beat).
//
// K. C. Lichtendahl, Y. Grushka-Cockayne and R. L. Winkler (2013), Is it
// better to average probabilities or quantiles?, Management Science 59,
// 1594–1611 (quantile averaging).
//
// M. Clark, S. Gangopadhyay, L. Hay, B. Rajagopalan and R. Wilby (2004),
// The Schaake shuffle: a method for reconstructing space–time variability
// in forecasted precipitation and temperature fields, Journal of
// Hydrometeorology 5, 243–262; R. Schefzik, T. L. Thorarinsdottir and
// T. Gneiting (2013), Uncertainty quantification in complex simulation
// models using ensemble copula coupling, Statistical Science 28, 616–640
// (reordering draws onto a dependence template).
//
// S. Makridakis and M. Hibon (2000), The M3-Competition: results,
// conclusions and implications, International Journal of Forecasting 16,
// 451–476; S. Makridakis, E. Spiliotis and V. Assimakopoulos (2020), The
// M4 Competition: 100,000 time series and 61 forecasting methods,
// International Journal of Forecasting 36, 54–74 (combinations among the
// most accurate methods).
//
// R. J. Hyndman and Y. Fan (1996), Sample quantiles in statistical
// packages, The American Statistician 50, 361–365 (type 7 quantiles of
// sample paths).
package almanac
