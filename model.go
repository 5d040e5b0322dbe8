package almanac

import (
	"context"
	"math/rand/v2"
)

// Model is a forecasting method with its options: a specification, not a
// fitted model. Fit estimates it on one series.
//
// Implementations must be safe for concurrent use: BatchFit and
// backtests call Fit from many goroutines on one Model value, so Fit must
// not modify the receiver. Fit should honour ctx (return ctx.Err(),
// possibly wrapped, soon after it is cancelled) and must return an error
// wrapping one of this package's sentinels (ErrTooShort, ErrMissing,
// ErrNonPositive, ...) for data it cannot handle, never panic.
//
// To write your own model, define a specification type with a Fit method
// that validates the series (Series.Validate, plus CheckComplete or
// CheckPositive as needed), estimates what it needs, and returns a value
// implementing Fitted. NewForecast with a Normal or Sample distribution
// builds the Forecast, so intervals and quantiles come for free. The
// model then works with BatchFit, decomposition-based forecasting,
// backtests and reconciliation.
type Model interface {
	Fit(ctx context.Context, y Series) (Fitted, error)
}

// Fitted is a model estimated on one series. It is read-only after Fit
// returns and safe for concurrent use.
type Fitted interface {
	// Forecast returns forecasts for h steps after the end of the series,
	// with a central prediction interval for each level (percentages in
	// (0, 100)). h < 1 gives an error wrapping ErrHorizon and a bad level
	// one wrapping ErrLevel.
	Forecast(h int, levels ...float64) (Forecast, error)
	// FittedValues returns the in-sample one-step-ahead forecasts, one per
	// observation (NaN where none exists, e.g. the first observation of a
	// naive model or a missing value).
	FittedValues() []float64
	// Residuals returns the in-sample one-step errors on the scale the
	// model documents (normally y − fitted), NaN where undefined.
	Residuals() []float64
	// String returns the model in its published notation, e.g.
	// "ETS(M,Ad,M)" or "ARIMA(0,1,1)×(0,1,1)_12". This text is stable.
	String() string
}

// Simulator is implemented by fitted models that can draw future sample
// paths. Simulate returns n paths of h steps (paths[i][step]) drawn with
// src, so the same src state gives the same paths.
type Simulator interface {
	Simulate(h, n int, src rand.Source) ([][]float64, error)
}

// ParamCounter is implemented by fitted models that know how many
// parameters they estimated; residual tests use it for their degrees of
// freedom.
type ParamCounter interface {
	NumParams() int
}

// ResponseResidualer is implemented by fitted models whose Residuals are
// not on the scale of the data — multiplicative-error models give relative
// errors, transformed models errors on the transformed scale.
// ResponseResiduals returns y − fitted on the data's scale (NaN where
// undefined). Methods that combine errors of several series, such as
// forecast reconciliation, need that scale; use the ResponseResiduals
// function, which falls back to Residuals.
type ResponseResidualer interface {
	ResponseResiduals() []float64
}

// ResponseResiduals returns f's in-sample errors y − fitted on the scale
// of the data: f.ResponseResiduals() when f implements
// ResponseResidualer, f.Residuals() otherwise.
func ResponseResiduals(f Fitted) []float64 {
	if r, ok := f.(ResponseResidualer); ok {
		return r.ResponseResiduals()
	}
	return f.Residuals()
}
