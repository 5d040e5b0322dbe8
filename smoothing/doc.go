// Package smoothing implements exponential smoothing: the ETS
// error/trend/season state-space family estimated by maximum likelihood
// (Spec), automatic model selection (Select), and classical Holt-Winters
// as R's stats::HoltWinters computes it (HoltWinters).
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
// package decompose.
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
// The series is divided by its mean absolute value before estimation (the
// results are mapped back), so forecasts scale with the data. Bounded
// smoothing parameters are searched through the periodic map
// ½(1 + sin u) of their box (Bounds); the admissible region is checked by
// the Schur–Cohn test on the characteristic polynomial of the discount
// matrix. Parameters and initial states are estimated jointly, from
// start values given by a classical decomposition of the first seasons
// and a line through the first ten adjusted values. The optimiser is
// BFGS with the exact gradient of the likelihood obtained by reverse-mode
// (adjoint) differentiation of the recursion, restarted once from its end
// point, with a restarted Nelder–Mead simplex as the fallback when it does
// not converge. Both are our own, deterministic and single-goroutine (see
// neldermead.go for why not gonum/optimize). Neither the likelihood nor
// its gradient allocates.
//
// # Performance
//
// Measured with go test -bench on a 2-core AMD EPYC box shared with
// other jobs, so the figures are indicative: one likelihood evaluation of
// ETS(M,Ad,M) on 144 monthly values 2.4–3.4 µs, its gradient 5–13 µs, 0
// allocations; fitting ETS(M,Ad,M) to AirPassengers (n = 144, m = 12)
// 0.8–1.5 ms; ETS(A,A,A) 0.2–0.4 ms; ETS(A,N,N) 0.03–0.05 ms; Select on
// the same series (15 candidates) 5–8 ms on one worker, 3–4.5 ms on two; a
// 24-step forecast with two analytic interval levels about 4 µs (5000
// simulated paths for the models without analytic intervals take several
// milliseconds). Targets: a single fit under 1.5 ms, Select under 15 ms.
//
// # Concurrency
//
// Spec, Select and HoltWinters values are immutable and safe to share.
// A single fit runs in one goroutine; Select fits its candidates
// concurrently (Select.Workers) and writes results by candidate index, so
// its choice is the same whatever the number of workers. Fitted values are
// read-only.
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
//   - Schur, I. (1917), Cohn, A. (1922): the step-down test for roots
//     inside the unit circle.
//   - Nelder, J.A. & Mead, R. (1965). A simplex method for function
//     minimization. Computer Journal 7:308–313; Gao, F. & Han, L. (2012).
//     Implementing the Nelder-Mead simplex algorithm with adaptive
//     parameters. Computational Optimization and Applications 51:259–277.
package smoothing
