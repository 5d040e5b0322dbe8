// Package smoothing implements exponential smoothing: the ETS
// error/trend/season state-space family estimated by maximum likelihood
// (Spec), automatic model selection (Select), classical Holt-Winters as
// R's stats::HoltWinters computes it (HoltWinters), the Theta method
// (Theta), and Croston's method, its Syntetos–Boylan approximation and
// the Teunter–Syntetos–Babai method for intermittent demand (Croston,
// TSB).
//
// A Spec names one model of the taxonomy — error additive (A) or
// multiplicative (M); trend none (N), additive (A), additive damped (Ad),
// multiplicative (M) or multiplicative damped (Md); season none (N),
// additive (A) or multiplicative (M) — in the innovations state-space form
// of Hyndman, Koehler, Snyder & Grose (2002) and Hyndman, Koehler, Ord &
// Snyder (2008). Its String is the taxonomy notation, e.g. "ETS(M,Ad,M)".
//
// # Missing values
//
// ETS here needs complete data: a NaN gives an error wrapping
// almanac.ErrMissing. Fill gaps first, e.g. with the interpolation of
// package decompose. The same holds for HoltWinters and Theta, and for
// Croston and TSB, where a period without demand is recorded as 0.
//
// # Likelihood
//
// Fitted.LogLik is the concentrated Gaussian log-likelihood of the
// innovations form, on the definition statsmodels' ETSModel reports as
// llf:
//
//	LogLik = −(n/2)·(log(2π·Σe²/n) + 1) − Σ log ŷ_t
//
// where e_t = y_t − ŷ_t for additive error and (y_t − ŷ_t)/ŷ_t for
// multiplicative error, and the last sum is present for multiplicative
// error only. This equals the likelihood of Hyndman et al. (2008, ch. 5)
// with σ² concentrated out as Σe²/n. The estimator minimises
// n·log Σe² + 2·Σ log ŷ_t, which differs from −2·LogLik by a constant.
// AIC = −2·LogLik + 2k, AICc = AIC + 2k(k+1)/(n−k−1), BIC = −2·LogLik +
// k·log n with k = Fitted.DF: estimated smoothing parameters, estimated
// initial level and trend, all m initial seasonal states when estimated,
// and σ² — statsmodels' count, so the criteria compare directly.
//
// Initial seasonal states are normalised (sum 0 additive, mean 1
// multiplicative) by determining the last from the others; statsmodels
// instead fixes the first. Both give the same set of fitted values and the
// same maximum.
//
// # Residuals and forecasts
//
// Fitted.Residuals are the innovations e_t (relative errors for
// multiplicative error, the convention of the reference fixtures);
// Fitted.ResponseResiduals gives y − ŷ for every model. Sigma2 is Σe²/n.
// Forecast means are the recursion run with zero future errors (the mean
// for the linear models and classes 2–3; for multiplicative trends it is
// the usual point forecast, not the mean of the simulated paths).
// Prediction intervals: classes 1–3 of Hyndman, Koehler, Ord & Snyder
// (2005) analytically (see IntervalMethod and Fitted.Variance), all other
// models by simulation with a generator seeded by Spec.Seed
// (Fitted.Simulate, almanac.Simulator, gives the sample paths on request).
// Fitted.Update appends observations without re-estimation.
//
// # Numerical notes
//
// Every ETS model is estimated and run on an internal series
// z = (y/s0 − c)/d: s0 is the largest |y| (so y/s0 cannot overflow); for
// models whose components are all additive c is the median and d the
// median absolute deviation of y/s0, otherwise c = 0 and d the median.
// States, forecasts, standard deviations and sample paths are mapped
// back, so an additive model fitted to y + c reaches the same likelihood
// as on y (TestShiftInvariance, relative 1e-6), scaling the data scales
// the forecasts exactly, and data near the float64 limits give finite
// answers wherever the answer is representable; where it is not (an
// additive-error innovation variance above the float64 range, a forecast
// or bound that overflows) the error wraps almanac.ErrNonFinite. Theta
// likewise estimates on the series divided by its largest value.
//
// Bounded smoothing parameters are searched through the periodic map
// ½(1 + sin u) of their box (Bounds); the admissible region is checked by
// the Schur–Cohn test on the characteristic polynomial of the discount
// matrix. Parameters and initial states are estimated jointly. The
// initial states start from the heuristic of Hyndman, Koehler, Ord &
// Snyder (2008, §2.6.1): seasonal states from a classical decomposition
// of the first (up to four) seasons, level and trend from a least-squares
// line through the first ten seasonally adjusted values. The search runs
// from four deterministic parameter starts (α, β/α, γ/(1−α), φ) =
// (0.1, 0.01, 0.01, 0.98), (0.2, 0.1, 0.3, 0.95), (0.9, 0.05, 0.05, 0.8)
// and (0.1, 0.9, 0.01, 0.82), each combined with those initial states, and
// keeps the best end point. A single start ended in worse local optima:
// on the airline passengers series the additive-season models stopped at
// α ≈ 1, γ ≈ 0, 26 to 46 log-likelihood units below statsmodels. With
// the four starts every one of the 390 ets_estimated fixtures (all 18
// models on AirPassengers and 20 M3 series, six on weekly CO2;
// statsmodels 0.13.5) is
// reached: our log-likelihood is at least statsmodels' − 1e-3, and for
// multiplicative seasonality (a different recursion in statsmodels) at
// least the innovations-form likelihood at statsmodels' estimates.
//
// The searches use gonum.org/v1/gonum/optimize: BFGS directions with
// optimize.Bisection, optimize.BFGS's default line search, composed by
// optimize.LinesearchMethod, on the exact gradient of the likelihood,
// obtained by reverse-mode (adjoint) differentiation of the recursion
// (the value pass records what the gradient pass needs, so a gradient
// requested at the point just evaluated costs only the backward pass),
// converged when two successive iterations improve −2·loglik by less than
// 1e-10 relative (optimize.FunctionConverge) or the gradient vanishes.
// The line-search method is driven in the calling goroutine with the same
// evaluations and stopping rules, in the same order, as optimize.Minimize
// applies (with optimize.BFGS's directions it ends where Minimize ends,
// bit for bit), but without the three goroutines and channel hand-offs
// Minimize sets up per search, which cost about a third as much as the
// likelihood evaluations themselves. The directions are optimize.BFGS's
// update (Nocedal & Wright 2006, eqs. 6.17 and 6.20) computed on a plain
// matrix (bfgsDirection): through mat and BLAS, with their argument
// checks and strides, it cost about as much as a likelihood evaluation at
// the 2 to 17 coordinates of an ETS model. The initial inverse Hessian
// is diagonal: the reciprocal curvatures of the coordinates, estimated
// once per fit at the first start by forward differences of the adjoint
// gradient (d + 1 gradient evaluations), instead of optimize.BFGS's
// identity rescaled by one number after the first step (a diagonal start
// matrix is common practice). The coordinates' curvatures differ by
// orders of magnitude (for ETS(M,Ad,M) on AirPassengers at the first
// start from about 10² for γ and φ to 10⁴ for the level and seasonal
// states and 8·10⁵ for the trend); starting from them cut that fit's
// likelihood evaluations from 543 to 340 and its gradients from 486 to
// 305, the estimate's included. The search is restarted once
// from its end point when it stops without converging; if it still has
// not converged (a search stalled along the edge of the model's domain),
// optimize.NelderMead runs from the BFGS end point, restarted with a
// halved simplex while that helps, followed by one more BFGS run from the
// simplex's end point (the simplex alone does not reliably reach the
// optimum in 10 to 17 dimensions; TestSimplexFallback cuts every BFGS
// search off and checks the completed fit, with five known gaps listed
// there). HoltWinters.Estimate uses the same restarted NelderMead on R's
// sum of squares. For the simplex, Settings.Concurrent is left at 0 and
// no Runtime limit is set, so a fit is deterministic; the context is
// checked after every evaluation. Neither the likelihood nor its gradient
// allocates (TestObjectiveAllocs), nor does a BFGS search once its
// buffers exist (TestSearchAllocs). The Theta method, Croston and TSB
// estimate their constants with a grid refined by a bounded
// one-dimensional Brent search (minimize1D in theta_ses.go on the
// project's internal/brent; nested for TSB's two constants), because
// gonum has no bounded 1-D minimiser.
//
// Both searches are local. Measured once before the former hand-written
// BFGS/simplex pair was removed, on 14,953 ETS fits to M3 series (all
// yearly and quarterly, every fourth monthly; 6–10 models each): the two
// reached the same maximum (1e-6 relative) in 14,827 fits, gonum's a
// higher one in 73 (by up to 15.3 in log-likelihood) and a lower one in
// 53 (by up to 14.2). Select's M3 sMAPE moved from 9.61 to 9.57
// (quarterly) and stayed 17.58 (yearly).
//
// # Performance
//
// The development machine (2 cores) is shared with other jobs at load
// averages of 10 to 22, which inflates wall-clock benchmark times by a
// factor of two to five and makes them vary tenfold, so estimation is
// measured by instruction counts (valgrind --tool=callgrind on the
// benchmarks with -cpu 1: the difference between 11 and 1 benchmark
// iterations, divided by 10) and by the CPU time of a process running
// GOMAXPROCS 1 (getrusage; 25 rounds of 20 fits, minimum and median
// given). Figures for ETS(M,Ad,M) and Select are on AirPassengers (n =
// 144, m = 12), four parameter starts per model.
//
//   - One ETS(M,Ad,M) fit: 12.9 million instructions; 1.1–1.9 ms CPU
//     (minimum of each run; medians 1.2–2.0 ms as the load varied from
//     11 to 22).
//     Before the work described under Numerical notes
//     (optimize.Minimize's goroutines, gonum's BFGS matrix calls,
//     switches in every step of the recursion, the identity start):
//     54.6 million instructions, 4–6 ms on a quiet core (estimated from
//     the instruction count), 10–18 ms CPU in the same loaded runs.
//   - Select with one worker (10 candidates): 69 million instructions,
//     6.3–10.6 ms CPU (medians 6.8–10.9 ms; before: 227 million, 20–26
//     ms on a quiet core, 20–40 ms CPU in the same runs).
//   - ETS(A,A,A): 6.7 million instructions (before 27.7); ETS(A,N,N):
//     1.2 million (before 3.2).
//   - One likelihood evaluation of ETS(M,Ad,M) (the value pass, which
//     records the forward pass): 15,500 instructions; with its gradient
//     30,600 instructions, about 3 µs wall-clock at the lower loads; 0
//     allocations. A fit makes 340 value and 305 gradient evaluations
//     (543 and 486 before the curvature start).
//   - Allocations: 41 per ETS(M,Ad,M) fit (34 kB; 1,611 before, mostly
//     Minimize's), 362 per Select.
//   - Select on all 3,003 M3 training series, one worker: 24 s CPU (74 s
//     before). About 40% of its likelihood evaluations go to simplex
//     fallbacks, most of them from parameter starts whose recursion
//     leaves the model's domain (ŷ ≤ 0 with multiplicative error).
//
// Screening the starts by a few iterations (missed optima on 6 to 12
// fixtures) and a looser tolerance for the non-final searches (missed 5,
// saved 12%) were tried and rejected before; stopping a start once it
// comes near an earlier start's end point saved 4 to 11% of the
// evaluations on the fixtures but changed the best end point on 3 to 32
// of them, and was left out.
//
// Forecasts cost O(h) (O(h·m) for the class 2 variances and
// HoltWinters' multiplicative variance): HoltWinters, ETS(M,N,N) and
// ETS(M,Ad,M) fitted to 60 monthly values forecast 10,000, 20,000 and
// 40,000 steps with an interval in 6–8, 7–15 and 13–39 ms on the loaded
// machine (BenchmarkForecastHorizon; previously 0.30, 1.24 and 5.1 s for
// HoltWinters), and almanac.MaxHorizon steps return at once
// (TestForecastMaxHorizon). A 24-step forecast with two analytic interval
// levels takes about 4 µs; 5000 simulated paths for the models without
// analytic intervals take several milliseconds.
//
// Theta on a 144-point monthly series takes about 35 µs; Croston on 1000
// points about 10 µs (60 µs with α estimated); TSB with both constants
// estimated about 4 ms.
//
// # Concurrency
//
// Spec, Select, HoltWinters, Theta, Croston and TSB values are immutable
// and safe to share. A single fit evaluates its likelihood one point at a
// time: the BFGS searches run in the calling goroutine; the simplex
// fallback's gonum Minimize runs the method and the evaluations in
// goroutines of its own, but with Concurrent 0 they hand work to each
// other in a fixed order, so the result does not depend on scheduling.
// Select fits its candidates concurrently (Select.Workers) and writes
// results by candidate index, so its choice is the same whatever the
// number of workers. Fitted values are read-only.
//
// # Theta method
//
// Theta is the method of Assimakopoulos & Nikolopoulos (2000) in the form
// of Hyndman & Billah (2003): simple exponential smoothing plus a drift of
// (1 − 1/θ) times the least-squares slope, with α and ℓ_0 estimated by
// least squares (the ETS(A,N,N) maximum-likelihood estimate; ℓ_0 in
// closed form, α by a grid refined with Brent's method). With AdjustAuto a
// classical multiplicative decomposition removes seasonality when the 90%
// autocorrelation test says so. Intervals use the ETS(A,N,N) variance
// σ²(1 + α²(h−1)) and ignore the uncertainty of the drift.
//
// Checked on the M3 competition data (theta_m3_test.go) against the
// published sMAPE of Theta: yearly 16.75 (published 16.87), quarterly
// 9.21 (8.96), monthly 13.87 (13.94). The "other" category is not
// reproduced: 4.92 against the published 4.41, although Naive (6.30) and
// SES (6.28) reproduce the published 6.30 and 6.29 on the same data, so
// data and scoring agree. No variant of the published method closes the
// gap (two-line combination with α on the θ = 2 line 4.92, ℓ_0 = y_1
// 4.92, α by least absolute error 4.93, α = 1 4.94, α ≤ 0.9 5.01,
// seasonal adjustment at period 4 4.87, θ = 0 line re-anchored at the
// last value 5.16); the loss sits in the 120 series of length 63 (3.67
// against 2.87 for our damped-trend ETS), smooth series that turn late,
// where the whole-sample slope points the wrong way (a larger θ, 2.5 to
// 4, still gives 4.77 to 4.80), so the competition entry probably
// treated these series in a way its published descriptions do not state.
//
// # Intermittent demand
//
// Croston (1972), the Syntetos–Boylan approximation (2005) and
// Teunter–Syntetos–Babai (2011) forecast a demand rate per period. The
// states start at the first demand; the constants default to 0.1 or are
// estimated by minimum in-sample mean squared error. Their bands and
// sample paths (IntermittentFit.Simulate) come from the fitted process:
// each path draws its own demand probability and size multiplier around
// the final smoothed states (with the steady-state variance of an
// exponentially smoothed estimate), then demands occur independently with
// that probability and their sizes are bootstrapped from the observed
// demands, rescaled so every step's mean is the point forecast; paths and
// bands are never below zero. On simulated series of known distribution
// the upper bounds are exceeded close to the nominal rate (10.8–12.9% at
// 80%, 2.8–3.7% at 95%; TestIntermittentIntervalCoverage); TSB, whose
// probability is smoothed every period, is the least well covered. A series
// without any demand is forecast as 0 with zero-width bands.
//
// # Persistence and refresh
//
// Every fitted model of this package — ETS (Spec and Select fits),
// Holt-Winters, Theta, Croston, SBA and TSB — is an almanac.Storable; the
// package registers the kinds "smoothing.ets", "smoothing.holt-winters",
// "smoothing.theta" and "smoothing.intermittent" with almanac.Register,
// so importing it is enough for almanac.LoadModel. An ETS document holds
// the specification, the parameters, the internal frame in which the
// states live (y = s0·(c + d·z), see Numerical notes), the initial
// states in that frame, the number of observations the parameters were
// estimated on, and the data; the loader runs the filter over the
// estimation sample as Fit did and over later observations as Update
// did, so the loaded model is bit-identical. The other methods store
// their constants and the data and are fitted again with those
// constants fixed, which is exact.
//
// Fitted.Update (and Refresh, its almanac.Refresher form) advances an
// ETS model over new observations without estimating again. A missing
// observation (NaN) follows the state-space convention: the one-step
// prediction becomes the state (the recursion with a zero innovation),
// the fitted value is the prediction, the residual NaN, and σ² and the
// likelihood are taken over the observed values only. The result equals
// a fit with every parameter and initial state fixed, to rounding.
//
// # References
//
//   - Hyndman, R.J., Koehler, A.B., Snyder, R.D. & Grose, S. (2002). A state
//     space framework for automatic forecasting using exponential smoothing
//     methods. International Journal of Forecasting 18:439–454.
//   - Hyndman, R.J., Koehler, A.B., Ord, J.K. & Snyder, R.D. (2005).
//     Prediction intervals for exponential smoothing using two new classes
//     of state space models. Journal of Forecasting 24:17–37.
//   - Hyndman, R.J., Koehler, A.B., Ord, J.K. & Snyder, R.D. (2008).
//     Forecasting with Exponential Smoothing: The State Space Approach.
//     Springer.
//   - Holt, C.C. (1957, reprinted 2004). Forecasting seasonals and trends
//     by exponentially weighted moving averages. IJF 20:5–10; Winters, P.R.
//     (1960). Forecasting sales by exponentially weighted moving averages.
//     Management Science 6:324–342.
//   - Nocedal, J. & Wright, S.J. (2006). Numerical Optimization, 2nd ed.
//     Springer (BFGS, ch. 6; automatic differentiation, ch. 8).
//   - Brent, R.P. (1973). Algorithms for Minimization without Derivatives.
//     Prentice-Hall, ch. 5.
//   - Schur, I. (1917), Cohn, A. (1922): the step-down test for roots
//     inside the unit circle.
//   - Nelder, J.A. & Mead, R. (1965). A simplex method for function
//     minimization. Computer Journal 7:308–313; Gao, F. & Han, L. (2012).
//     Implementing the Nelder-Mead simplex algorithm with adaptive
//     parameters. Computational Optimization and Applications 51:259–277.
//   - Assimakopoulos, V. & Nikolopoulos, K. (2000). The theta model: a
//     decomposition approach to forecasting. IJF 16:521–530; Hyndman, R.J.
//     & Billah, B. (2003). Unmasking the Theta method. IJF 19:287–290.
//   - Croston, J.D. (1972). Forecasting and stock control for intermittent
//     demands. Operational Research Quarterly 23:289–303; Syntetos, A.A. &
//     Boylan, J.E. (2005). The accuracy of intermittent demand estimates.
//     IJF 21:303–314; Teunter, R.H., Syntetos, A.A. & Babai, M.Z. (2011).
//     Intermittent demand: linking forecasting to inventory obsolescence.
//     European Journal of Operational Research 214:606–615.
package smoothing
