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
// values at the ends. (The sample ACF and PACF are in package accuracy,
// accuracy.ACF and accuracy.PACF.)
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
// Likelihood evaluations during estimation, when the ARMA filter starts
// from its stationary covariance Q0 — no differencing, or differencing
// under DiffusePrior — and the data are complete, run the Chandrasekhar
// recursions (Morf, Sidhu & Kailath 1974): from that start the change of
// the predicted covariance from one step to the next has rank one, so
// gain and innovation variance follow in O(r) a step instead of the
// O(r²) of the covariance recursion, and only the first column of Q0 is
// computed (TestChandrasekhar: the same sums to 1e-10). Under
// FinitePrior the first d + sD observations perturb Q0 in d + sD
// directions, so the differenced models of R's scheme keep the
// covariance recursion; it switches to the fixed gain once the first
// column of the predicted covariance has stood still (to 7e-15
// relative) for r + 1 steps, which implies that the whole matrix has:
// the transition shifts a change anywhere in it into that column within
// r steps (TestSteadyState). On short monthly series the gain rarely
// converges (a seasonal MA coefficient of −0.6 takes about 300 steps).
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
// strength (Wang, Smith & Hyndman 2006; SeasonalStrength) above
// DefaultSearchStrength (0.8) chooses D (SeasonalDifferences, at most
// once). Then KPSS tests (Kwiatkowski et al. 1992) at the 5% level on
// the seasonally differenced series choose d (Differences: difference
// while stationarity is rejected), at most DefaultSearchMaxD (1) times.
// Last, Search runs the stepwise algorithm of Hyndman & Khandakar (2008,
// Journal of Statistical Software 27(3)) — four starting models (and
// white noise without the constant when a constant is considered), then
// moves of p, q, P, Q by ±1, of p and q or P and Q together, and the
// constant toggled, while the criterion improves — or, with Exhaustive,
// fits every model of a bounded grid, and ranks by AICc (or AIC, BIC).
// Candidates are fitted and ranked on the exact likelihood of the
// differenced series (DiffusePrior, whose evaluations cost O(r); CSS for
// series with n·s above 50 000); candidates with an AR or MA root within
// 1.001 of the unit circle are rejected (ErrNearUnitRoot); the chosen
// model is refitted exactly as Spec.Fit would fit it.
//
// The KPSS truncation lag. The default ⌊3√n/13⌋ (LagSquareRoot) is not
// the rule of the published sources: Kwiatkowski et al. (1992) report
// the test with the lags l0 = 0, l4 = ⌊4(n/100)^¼⌋ and l12 =
// ⌊12(n/100)^¼⌋ of Schwert (1989) (recalled from memory; statsmodels
// 0.13.5's kpss documents its "legacy" lag ⌈12(n/100)^¼⌉ as Schwert's),
// and Hobijn, Franses & Ooms (2004) give the data-dependent bandwidth
// (LagDataDependent; statsmodels' "auto", which the reference test
// checks). The square-root rule is kept because it forecasts best on the
// M3 data (sMAPE of Search on the held-out parts, the search otherwise
// as before this choice, at most two differences): yearly 17.30 (l4
// 17.00 but 16.99 against 16.50 with at most one difference; Hobijn
// 17.22; l12 25.59), quarterly 9.91 (Hobijn 10.18), monthly (every third
// series) 14.71 (l4 14.74, Hobijn 15.38), other 4.46 (l4 and Hobijn
// 4.35). Longer lags make the test reject less often, so more series
// stay undifferenced with a mean, whose forecasts revert to it: l12 on
// short yearly series is the extreme case.
//
// The differencing defaults of Search were chosen on the same data (a
// choice fitted to M3, so the figures below flatter it somewhat): two
// differences were the search's worst forecasts on yearly series (132
// of 645 series), and more seasonal differencing (strength above 0.5,
// or whenever the autocorrelation test of classical decomposition calls
// a series seasonal) made monthly forecasts worse, less made them
// better. sMAPE of Search on all of M3, before and after (one search per
// training part, forecasts of the competition's horizons, sMAPE as in
// Makridakis & Hibon 2000): yearly 17.30 → 16.51, quarterly 9.91 →
// 9.76, monthly 14.82 → 14.41, other 4.46 → 4.60, all 3,003 series
// 13.89 → 13.50 (published: Theta 13.08, damped trend 13.65, see
// ../shared/data/README.md).
//
// Measured (one core, see Performance): the default stepwise search on
// log air passengers (144 monthly values) chooses the airline model
// ARIMA(0,1,1)×(0,1,1)_12 in 13–15 ms; on Box, Jenkins & Reinsel's
// Series F it chooses AR(2) with a mean, the NIST/SEMATECH e-Handbook's
// identification (the tests check both).
//
// # Persistence and refresh
//
// Fitted (from Spec or Search), HarmonicFit and DetectionResult are
// almanac.Storable; the package registers "arima.model",
// "arima.harmonic" and "arima.detection". A document holds the
// specification (the caller's regressors over the whole series, the
// calendar rules of Spec.Calendar — every built-in effect and holiday
// rule; a user's own calendar.Effect or calendar.Rule type cannot be
// saved), every coefficient and whether it was estimated, the
// coefficient covariance, the number of observations the coefficients
// were estimated on and the data. The loader runs the likelihood filter
// with every coefficient fixed over the estimation sample and Update over
// later observations, so the loaded model is bit-identical. The record of
// a Search (SearchResult) is not kept.
//
// Update, UpdateWith (regressors of the caller's own need their new
// values) and Refresh run the Kalman filter on from the state after the
// last observation with the coefficients fixed; missing values are
// skipped by the filter as in a fit. σ², the log-likelihood and the
// criteria become those of the whole series, so the result equals a
// fixed-coefficient refit to rounding (1e-12 in the tests). A fit by
// Method CSS cannot be refreshed (its σ² is not the filter's).
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
// How measured: the package benchmarks run as a compiled test binary,
// CPU time (user + system, /usr/bin/time) of N iterations minus that of
// one, divided by N − 1, on one core (-test.cpu 1) of a 2-core machine
// shared with other jobs (load average 13 to 19 during these runs, which
// inflates CPU time too); ranges are over three to five runs, "was" is
// the package before these changes measured the same way, interleaved.
// Comparisons that had to be exact used instruction counts (valgrind
// --tool=callgrind, GODEBUG=asyncpreemptoff=1).
//
//   - Search, default stepwise, log air passengers (144 monthly values):
//     13–15 ms (was 53–59 ms).
//   - Search on invented hourly series of 960 values with a drifting
//     daily profile (period 24, BenchmarkSearchHourly, three series per
//     op): 0.80–1.2 s per op, 0.27–0.40 s a series. Before, such series
//     were ranked by CSS and the chosen candidates refitted one after
//     another by the full prior's O(r²) recursion, crawling towards the
//     unit circle: 31 s for one of them.
//   - Search on all 1,428 M3 monthly training series, one after another
//     (internal/cmd/speed -workloads search-m3-monthly, CPU time per
//     series, three runs at load average 21, 27 and 6): mean 39, 49 and
//     45 ms, median 23, 30 and 29 ms, slowest 0.36 s (N2449), 0.56 s
//     (N2497) and 0.48 s (N2023): which series is slowest varies from
//     run to run.
//     Measured the same way by a throwaway program before the stepwise
//     confirmation continued its run instead of refitting and before the
//     sparse Chandrasekhar steps: mean 80 ms, largest 1.02 s (N2449,
//     ARIMA(4,1,1)×(1,0,2)_12) under load average 15; before the
//     Chandrasekhar recursions: mean 185 ms, largest 2.04 s (N1770).
//     Callgrind on every 100th series: 10.0·10⁹ instructions against
//     37.8·10⁹ before the recursions. BenchmarkSearchM3Monthly runs every
//     50th series (29 per op): 15.3·10⁹ instructions, 15.9·10⁹ before the
//     Chandrasekhar steps skipped zero AR coefficients (hourly:
//     BenchmarkSearchHourly 8.8·10⁹ against 9.5·10⁹). On all 3,003 M3
//     series (internal/cmd/evaluate -models arima) the sMAPE is 16.51 /
//     9.76 / 14.39 / 4.60, all 13.49 (yearly / quarterly / monthly /
//     other).
//   - airline model (0,1,1)×(0,1,1)_12 on log air passengers, CSS then
//     ML (the default, finite prior): 0.80–0.90 ms per fit, against
//     23.0–27.0 ms CPU for R 4.2's arima (same call, Rscript, 50 fits
//     timed by system.time, five rounds interleaved: median 24.0 ms, 28
//     times ours); at a busier moment 1.83–2.03 ms against 37.7–39.7 ms
//     (20 times). Unchanged by the work above (604·10⁶ instructions for
//     51 fits before and after); about 76 kB and 270 allocations per
//     fit.
//   - one exact likelihood evaluation: airline model (finite prior,
//     covariance recursion) 39 µs at n = 144 (was 42 µs);
//     ARIMA(2,0,1)×(1,0,0)_12 (Chandrasekhar recursions) 5 µs at n = 144
//     and 14 µs at n = 576 (was 52 and 223 µs); 0 allocations
//     (TestNoAllocPerLikelihood asserts it for both recursions, with
//     missing values, and on a 960-value series that reaches the fixed
//     gain).
//   - Detection (BenchmarkDetection, -cpu 1, five runs each; wall time,
//     measured before the Search changes above): invented
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
// Newey & West, Mélard, Morf et al., Schwert, Chen & Liu, de Jong &
// Penzer and Young, Pedregal & Tych recalled from memory.)
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
//   - Makridakis, S., Hibon, M. (2000). The M3-Competition: results,
//     conclusions and implications. International Journal of
//     Forecasting 16, 451–476.
//   - Mélard, G. (1984). Algorithm AS 197: a fast algorithm for the
//     exact likelihood of autoregressive-moving average models. Applied
//     Statistics 33, 104–114.
//   - Monahan, J.F. (1984). A note on enforcing stationarity in
//     autoregressive-moving average models. Biometrika 71, 403–404.
//   - Newey, W.K., West, K.D. (1987). A simple, positive semi-definite,
//     heteroskedasticity and autocorrelation consistent covariance
//     matrix. Econometrica 55, 703–708.
//   - Morf, M., Sidhu, G.S., Kailath, T. (1974). Some new algorithms for
//     recursive estimation in constant, linear, discrete-time systems.
//     IEEE Transactions on Automatic Control 19, 315–323.
//   - Nash, J.C. (1990). Compact Numerical Methods for Computers, 2nd ed.
//     Adam Hilger (the variable-metric algorithm).
//   - Schwert, G.W. (1989). Tests for unit roots: a Monte Carlo
//     investigation. Journal of Business and Economic Statistics 7,
//     147–159.
//   - Young, P.C., Pedregal, D.J., Tych, W. (1999). Dynamic harmonic
//     regression. Journal of Forecasting 18, 369–394.
//   - Wang, X., Smith, K.A., Hyndman, R.J. (2006). Characteristic-based
//     clustering for time series data. Data Mining and Knowledge
//     Discovery 13, 335–364.
package arima
