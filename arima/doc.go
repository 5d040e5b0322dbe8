// Package arima fits seasonal ARIMA models, with optional regressors
// (regression with ARIMA errors), by exact Gaussian maximum likelihood
// through a state-space Kalman filter or by conditional sum of squares,
// and forecasts them with exact mean-squared errors.
//
// A model is a Spec, itself an almanac.Model:
//
//	spec := arima.Spec{P: 0, D: 1, Q: 1, SP: 0, SD: 1, SQ: 1} // airline model
//	fit, err := spec.Fit(ctx, y)
//	fc, err := fit.Forecast(24, 80, 95)
//
// The model is φ(B)Φ(B^s)(1−B)^d(1−B^s)^D (y_t − x_t'β) = θ(B)Θ(B^s) e_t
// with AR polynomials 1 − φ₁B − … and MA polynomials 1 + θ₁B + … (the sign
// conventions of R's stats::arima). Coefficients are named ar1.., ma1..,
// sar1.., sma1.., mean (the process mean when d + D = 0), drift (the slope
// of a linear trend when d + D = 1) and the regressor names.
//
// A *Fitted gives forecasts with exact mean-squared errors (Forecast, or
// ForecastWith when there are regressors) and sample paths
// (Simulate/SimulateWith, implementing almanac.Simulator).
//
// Defaults: Constant's zero value includes a mean in undifferenced models
// only (no drift unless asked for with ConstantInclude, because a drift is
// a trend assumption the caller should make knowingly); Method's zero
// value is CSS then ML; Period 0 takes the period from the series'
// frequency.
//
// # Missing values
//
// NaN observations are allowed with the ML methods: the Kalman filter
// skips them (the state is propagated without an update), wherever they
// are, because the differencing is part of the state vector rather than
// applied to the data. The residual at a missing time is NaN. CSSThenML
// goes straight to ML when values are missing; CSS alone needs complete
// data (almanac.ErrMissing). Regressor values must all be finite.
//
// The order-selection helpers: Search ranks by exact likelihood when
// values are missing; KPSS rejects NaN (almanac.ErrMissing); Differences
// tests the observed values of each differenced series; SeasonalStrength
// and SeasonalDifferences fill interior gaps linearly and drop missing
// values at the ends; ACF and PACF use the pairs where both values are
// observed.
//
// # Numerical notes
//
// Likelihood. The state space is Harvey's (1989) form with
// r = max(p + sP, q + sQ + 1) ARMA states followed by d + sD states for
// the differencing (Durbin & Koopman 2012, §3.4). The ARMA block starts
// from its exact stationary covariance, the solution of
// Q0 = T Q0 T' + R R' (found from the process autocovariances, Brockwell &
// Davis 1991 §3.3, then element by element); it is the same matrix as the
// method of Gardner, Harvey & Phillips (1980). The differencing states get
// the finite prior variance κ = 10⁶·σ² and observations whose innovation
// variance F_t is 10⁴·σ² or more are left out of the likelihood. These are
// the choices of R's stats::arima: we reproduce its scheme deliberately so
// that log-likelihoods, AIC values and forecasts agree with R's (to 1e-9
// in the reference tests). This is not the exact diffuse likelihood: for
// differenced models it differs from the exact likelihood of the
// differenced series by a small amount that depends on the level of the
// series relative to σ (3·10⁻³ for the airline model on log air
// passengers, 1.2·10⁻⁶ for an ARIMA(1,1,1) on the Nile flows); κ is in
// units of σ², so the likelihood stays invariant to the scale of the data.
// Spec.Prior = DiffusePrior selects the exact diffuse initialisation
// instead (Durbin & Koopman 2012, ch. 5): the log-likelihood is then the
// exact likelihood of the differenced series (checked against the
// fixtures' dense-Cholesky values to 1e-9), computed by the exact diffuse
// filter when values are missing. FinitePrior stays the default so that
// fits and information criteria agree with R's.
//
// The reported log-likelihood is
// −½(n log(ssq/ν) + (n/ν) Σ log F_t + n + n log 2π), n the number of
// observed values minus d + sD, ν those in the likelihood; σ² = ssq/n.
// AIC = −2 log L + 2(k+1), AICc adds 2(k+1)(k+2)/(n−k−2), BIC =
// −2 log L + log(n)(k+1), k the number of estimated coefficients. For
// Method CSS the log-likelihood is the conditional one,
// −½ n (log 2π + 1 + log σ²) with σ² the mean squared conditional residual.
//
// Estimation. ML minimises ½(log(ssq/ν) + Σ log F_t/ν) (σ² concentrated
// out); CSS minimises ½ log of the mean squared conditional residual, with
// the first d + sD + p + sP residuals conditioned on. During ML the AR and
// seasonal AR blocks are kept stationary by the partial-autocorrelation
// reparameterisation (tanh, then the Durbin–Levinson recursion; Jones
// 1980, Monahan 1984) when every coefficient of the block is estimated;
// afterwards MA and seasonal MA polynomials with roots inside the unit
// circle are replaced by their invertible equivalents. With two or more
// regression columns (mean and drift included) and none fixed, the
// regression coefficients are optimised in the basis of the singular
// vectors of the regression matrix, scaled by ten least-squares standard
// errors. The minimiser is gonum's optimize.BFGS (optimize.Minimize with
// its default bisection line search), given forward-difference gradients
// (step 10⁻⁷ in those units), stopping after an iteration that improves
// the objective by no more than 10⁻¹⁰ of its value, at most 200
// iterations (Fitted.Converged reports a stop at the limit or a stalled
// line search); Settings.Concurrent is 0 and there is no Runtime limit,
// so results are deterministic, and ctx is checked at every evaluation
// through Problem.Status. It works in z = (x − x0)/|∇f(x0)|, so that its
// first step is −∇f(x0) (as in Nash's method) rather than a step of unit
// length, which from the CSS start overshot the optimum: an ML fit of an
// ARIMA(1,1,1) with drift on 14 400 values then took 24 evaluations
// instead of 8, and twice the time. Until gonum/optimize could be built
// here the package used its own BFGS in the form of Nash (1990), the
// method of R's optim; it is kept as a cross-check (unexported switch),
// and the reference test runs every fixture with both: both reach R's
// log-likelihoods to the fixtures' tolerances. On the airline model
// gonum's needs 34 evaluations for CSS then ML, the other 52
// (BenchmarkOptimizer: 0.65–0.8 ms against 0.8–1.1 ms per fit; the same
// on the Search and the long fit).
// Standard errors come from inv(n·H), H the central-difference Hessian of
// the objective with step 10⁻³ in the same units, AR coefficients
// untransformed.
//
// The fit works on y divided by a power of two close to its largest
// absolute value (an exact operation in floating point) and scales the
// results back, so that data of any magnitude, 1e-200 or 1e250, fit and
// forecast alike (forecasts of c·y are c times those of y; the test covers
// c = 1e-200 and 3e250). Values of magnitude 2^1023 (about 9e307) or more
// are rejected (almanac.ErrNonFinite): sums of a few of them, as in the
// differencing, overflow. Each regressor column is likewise divided by a
// power of two near its largest |value|, so that the fit does not depend
// on the regressors' units (TestRegressorUnits: units from 1e-100 to
// 1e100 give the same log-likelihood, and coefficients in proportion).
//
// Regressors whose columns are linearly dependent after the model's
// differencing are rejected (ErrCollinear) with their names.
//
// # Regressors as calendar rules
//
// Spec.Calendar and Search.Calendar take a calendar.Design: holidays,
// events and Fourier cycles given as rules on the time axis. Fit builds
// their columns on the series' own periods (after Spec.Regressors in the
// regression) and the fitted model builds their future values, so
// Forecast and Simulate need no future regressors and the model works in
// almanac.BatchFit, backtests and combinations like any other. A column
// constant over the observed values of the window (an event outside it,
// a holiday that never falls in it) cannot be estimated there: it is left
// out, Fitted.LeftOut names it and String appends "(not estimable here:
// …)". Coef reports every column's coefficient and standard error by
// name. A Spec with calendar rules fits exactly as the same columns given
// as Regressors (TestCalendarEqualsRegressors, bit-identical forecasts),
// so the R checks of regression with ARIMA errors (fixture
// lakehuron_ar2_trend) cover it.
//
// # Interventions
//
// Detection finds additive outliers (AO), level shifts (LS) and
// temporary changes (TC, decaying at 0.7 per period by default) by the
// iterative procedure of Chen & Liu (1993): from the residuals e_t of
// the fitted model and the π weights of its ARMA and differencing filter,
// the effect of each type at each time t is estimated by least squares,
// ω̂ = Σ e_s x_{s−t} / Σ x²_{s−t} (x the type's pattern passed through
// π(B)), with τ = ω̂ √Σx² / σ̂, σ̂ the median absolute deviation of the
// residuals scaled by 1.4826; the largest |τ| above the critical value is
// added and its effect removed from the residuals, until none is left;
// then the model is re-estimated by exact ML with all found effects as
// calendar events and the least significant one with |t| below the
// critical value removed, one at a time; rounds repeat until nothing new
// is found. When the orders were searched, they are searched again with
// the effects as regressors and, if they change, the effects are
// re-estimated, pruned and looked for again. The default critical value
// is DefaultCritical(n): 3.5 up to 100 observations, 4 from 500, linear
// in between (see its documentation for the published basis and the
// measured false-positive rates). Shifts are not tested at the first and
// the last observation, nor anything within the first d + s·D. The found
// effects are Interventions (name "LS 2024-03-04", kind, time, size,
// standard error) and Intervention.Event turns one into a rule a later
// Spec can keep (with Spec.Fixed to keep its size).
//
// Checked on invented weekly series with planted effects of 4–6
// innovation standard deviations (TestDetectionFindsPlanted: 14 of 18
// found at the right week and type, all within two standard errors, 3
// others in 6 series; over 40 replications per length, 84% found at
// n = 104 and 94–97% at n = 260), on clean series (0.2 false
// interventions per series at n = 104, 0–0.08 at n = 260), and on a
// published example: the annual Nile flows, in which Durbin & Koopman
// (2012, §2.12) find a level break in 1899 and an outlier in 1913 with
// the local level model; Detection with its reduced form ARIMA(0,1,1)
// finds the LS in 1899 (and, at the critical value 3.0, the AO in 1913).
// No published example of Chen & Liu's own series, with its data, was
// at hand.
//
// # Dynamic harmonic regression
//
// HarmonicRegression regresses on Fourier terms (calendar.Cycle) of exact
// seasonal periods — the frequency's natural ones by default: 365.25/7
// for weekly data, 7 and 365.25 for daily, 24 and 168 for hourly — with
// ARIMA errors and no seasonal ARIMA part. It keeps the periods the
// series covers more than once, bounds the harmonics per period by
// ⌊period/2⌋, DefaultMaxHarmonics (12), a third of the observations and
// the first harmonic a longer period shares with a shorter one (the 7th
// of 168 hours is the 1st of 24); chooses d by KPSS on the regression
// residuals; chooses the harmonics per period by AICc on a screen (the
// regression with AR(2) errors at φ estimated once, β by least squares on
// the filtered data, conditional likelihood), period by period in two
// passes, adding harmonics while one of the next two improves; chooses
// the ARMA orders by Search on the residual series; and fits the final
// model by exact ML. A series too short for any harmonic gives an error
// wrapping almanac.ErrTooShort (the caller's fallback). On eight invented
// weekly series (three years to fit, 26 weeks held out) its mean absolute
// error was 26.6 against 36.3 for the seasonal naive and 134 for Theta
// with period 52 (TestHarmonicWeekly).
//
// # Order selection
//
// Search chooses the model in three steps. First the STL seasonal
// strength (Wang, Smith & Hyndman 2006; SeasonalStrength) above 0.64
// chooses D (SeasonalDifferences, at most once). Then KPSS tests
// (Kwiatkowski et al. 1992), with the Bartlett truncation lag ⌊3√n/13⌋
// by default — recalled from memory as the rule of the usual automatic
// algorithm — or ⌊4(n/100)^¼⌋, the data-dependent bandwidth of Hobijn,
// Franses & Ooms (2004), ⌈12(n/100)^¼⌉, or a fixed lag, choose d at the
// 5% level on the seasonally differenced series (Differences: difference
// while stationarity is rejected, at most twice). Last, Search runs the
// stepwise algorithm of Hyndman & Khandakar (2008, Journal of
// Statistical Software 27(3)) — four starting models (and white noise
// without the constant when a constant is considered), then moves of p,
// q, P, Q by ±1, of p and q or P and Q together, and the constant
// toggled, while the criterion improves —
// or, with Exhaustive, fits every model of a bounded grid, and ranks by
// AICc (or AIC, BIC). Candidates with an AR or MA root within 1.001 of
// the unit circle are rejected (ErrNearUnitRoot); the chosen model is
// refitted exactly as Spec.Fit would fit it.
//
// Measured (one core, indicative, see Performance): the default stepwise
// search on log air passengers (144 monthly values) tries 14 models and
// chooses the airline model ARIMA(0,1,1)(0,1,1)[12] in 44–60 ms;
// on Box, Jenkins & Reinsel's Series F it chooses AR(2) with a mean, the
// NIST/SEMATECH e-Handbook's identification (the tests check both).
//
// # Concurrency
//
// A Spec is a plain value, safe to share; Fit can be called concurrently.
// Within one fit nothing runs in parallel: gonum's optimize.Minimize runs
// its method on a helper goroutine of its own, but hands it one
// evaluation at a time (Settings.Concurrent is 0), and the package starts
// no goroutine itself. A *Fitted is read-only after Fit and safe for
// concurrent use (each forecast works on its own copy of the filter
// state). Results are deterministic: the same input gives bit-identical
// output, whatever else runs.
//
// # Performance
//
// Measured with the package benchmarks (go test -bench . -cpu 1
// -count 5) on a 2-core machine shared with other jobs, so the figures
// are indicative: ranges are over the five runs, and the same benchmark
// varied by up to 1.5× between moments of different load. "Was" figures
// are the package before the changes described here, measured side by
// side with the same benchmarks.
//
//   - Search, default stepwise, log air passengers (144 monthly values,
//     14 candidates): 46–50 ms (was 120–131 ms; 44–64 ms at busier
//     moments); with CSS ranking 109–133 ms (was 178–200); exhaustive
//     grid p, q ≤ 2, P, Q ≤ 1 on one core: 75–104 ms (was 123–149); the
//     first 72 values: 36–40 ms (was 85–109). Non-seasonal invented
//     ARMA(1,1) series: n = 100 28–40 ms (was 39–43), n = 400 7–10 ms
//     (was 5.3–5.5), n = 1600 42–45 ms (was 50–53).
//     Where the time went: two candidates whose optimum lies on the unit
//     circle (the optimiser crawls along a ridge towards it) took 20–80
//     ms each; the search now fits candidates with looser stopping rules
//     and refits the competitive ones (see Search), and the root screen
//     no longer computes standard errors (a Hessian per candidate).
//   - airline model (0,1,1)(0,1,1)[12] on log air passengers: CSS then
//     ML (the default) 0.67–0.75 ms per fit, 0.93–0.99 ms including the
//     standard errors (their Hessian is computed on the first call of
//     Coef or CoefCov); ML from zero coefficients 0.94–0.99 ms; CSS alone
//     0.10–0.11 ms; about 76 kB and 270 allocations per fit.
//   - one exact likelihood evaluation of that model: 30–34 µs at
//     n = 144, 111–122 µs at n = 576; ARIMA(2,0,1)(1,0,0)[12]: 41–51 µs
//     and 160–192 µs; 0 allocations (TestNoAllocPerLikelihood asserts
//     it, with and without missing values). The Kalman update and the
//     next prediction run in one pass (updatePredictARMA, bit-identical
//     to the two-pass form, TestFusedUpdateBitIdentical), with the rank-one
//     update unrolled (about 7% faster).
//   - ARIMA(1,1,1) with drift, CSS then ML: 0.71–0.76 ms at n = 144,
//     5.7–9 ms at n = 1440, 17–24 ms at n = 14 400. With the package's
//     own BFGS (useGonum = false) the short fit takes 0.40–0.46 ms (was
//     0.35–0.6): gonum's Minimize runs the method in a goroutine of its
//     own and hands every evaluation over a channel, an overhead that
//     shows when one evaluation costs a few microseconds; the longer
//     fits, the airline fit and the Search take the same time either way.
//   - Detection (BenchmarkDetection, -cpu 1, five runs each): invented
//     weekly series with three planted effects, 100–110 ms at 104 weeks,
//     65–80 ms at 260 weeks (a search, two to four joint fits with
//     standard errors).
//   - HarmonicRegression (BenchmarkHarmonic): weekly with a holiday count,
//     10–12 ms at 156 weeks, 15–17 ms at 260, 95–106 ms at 104 (d = 1
//     chosen there, and a longer order search); hourly with periods 24
//     and 168, 70–77 ms at 700 values, 340–390 ms at 960.
//
// The likelihood is cheap because only the first d + sD observations go
// through the full state (in closed form, see below); after them the
// differencing states are observed values and the filter runs on the r
// ARMA states alone, on one triangle of the covariance matrix, with the
// sparsity of the seasonal polynomials exploited. With missing values in
// a differenced model the full filter runs throughout (a few times
// slower).
//
// The closed form: the first d + sD observations z = W + Bψ only fix the
// pre-sample values ψ (prior N(0, κI)), so the filtered ARMA state after
// them is N(C S⁻¹z, Q0 − C S⁻¹C') with S = Γ_W + κBB' — the value R's
// sequential filter reaches, at a fraction of the cost (the reference
// test checks it against R's log-likelihoods to 1e-9).
//
// # References
//
// (Bibliographic details of Bartlett, Cleveland et al., Hurvich & Tsai,
// Newey & West, Chen & Liu, de Jong & Penzer and Young, Pedregal & Tych
// recalled from memory.)
//
//   - Bartlett, M.S. (1946). On the theoretical specification and sampling
//     properties of autocorrelated time-series. Supplement to the Journal
//     of the Royal Statistical Society 8, 27–41.
//   - Box, G.E.P., Jenkins, G.M., Reinsel, G.C. (1994). Time Series
//     Analysis: Forecasting and Control, 3rd ed. Prentice Hall.
//   - Brockwell, P.J., Davis, R.A. (1991). Time Series: Theory and
//     Methods, 2nd ed. Springer.
//   - Chen, C., Liu, L.-M. (1993). Joint estimation of model parameters
//     and outlier effects in time series. Journal of the American
//     Statistical Association 88, 284–297.
//   - Cleveland, R.B., Cleveland, W.S., McRae, J.E., Terpenning, I.
//     (1990). STL: a seasonal-trend decomposition procedure based on
//     loess. Journal of Official Statistics 6, 3–73.
//   - Durbin, J., Koopman, S.J. (2012). Time Series Analysis by State Space
//     Methods, 2nd ed. Oxford University Press.
//   - Gardner, G., Harvey, A.C., Phillips, G.D.A. (1980). Algorithm AS 154.
//     Applied Statistics 29, 311–322.
//   - Harvey, A.C. (1989). Forecasting, Structural Time Series Models and
//     the Kalman Filter. Cambridge University Press.
//   - de Jong, P., Penzer, J. (1998). Diagnosing shocks in time series.
//     Journal of the American Statistical Association 93, 796–806.
//   - Hobijn, B., Franses, P.H., Ooms, M. (2004). Generalizations of the
//     KPSS-test for stationarity. Statistica Neerlandica 58, 483–502.
//   - Hurvich, C.M., Tsai, C.-L. (1989). Regression and time series model
//     selection in small samples. Biometrika 76, 297–307.
//   - Hyndman, R.J., Khandakar, Y. (2008). Automatic time series
//     forecasting. Journal of Statistical Software 27(3).
//   - Jones, R.H. (1980). Maximum likelihood fitting of ARMA models to time
//     series with missing observations. Technometrics 22, 389–395.
//   - Kwiatkowski, D., Phillips, P.C.B., Schmidt, P., Shin, Y. (1992).
//     Testing the null hypothesis of stationarity against the alternative
//     of a unit root. Journal of Econometrics 54, 159–178.
//   - Monahan, J.F. (1984). A note on enforcing stationarity in
//     autoregressive-moving average models. Biometrika 71, 403–404.
//   - Newey, W.K., West, K.D. (1987). A simple, positive semi-definite,
//     heteroskedasticity and autocorrelation consistent covariance
//     matrix. Econometrica 55, 703–708.
//   - Nash, J.C. (1990). Compact Numerical Methods for Computers, 2nd ed.
//     Adam Hilger (the variable-metric algorithm).
//   - Young, P.C., Pedregal, D.J., Tych, W. (1999). Dynamic harmonic
//     regression. Journal of Forecasting 18, 369–394.
//   - Wang, X., Smith, K.A., Hyndman, R.J. (2006). Characteristic-based
//     clustering for time series data. Data Mining and Knowledge
//     Discovery 13, 335–364.
package arima
