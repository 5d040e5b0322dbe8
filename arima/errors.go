package arima

import "errors"

// Sentinel errors of package arima. Errors about the data or the
// specification wrap these or the root package's sentinels
// (almanac.ErrTooShort, almanac.ErrInvalid, ...); test with errors.Is.
var (
	// ErrCollinear: regressor columns (after the model's differencing)
	// are linearly dependent; the message names the columns.
	ErrCollinear = errors.New("collinear regressors")
	// ErrNeedRegressors: a model fitted with regressors was asked for a
	// forecast without future regressor values (use ForecastWith), or the
	// future values have the wrong shape or are not finite.
	ErrNeedRegressors = errors.New("future regressor values needed")
	// ErrNonStationary: an autoregressive part that is not stationary
	// (fixed coefficients, or a CSS estimate asked for a forecast), so no
	// stationary initial state covariance exists.
	ErrNonStationary = errors.New("non-stationary autoregressive part")
	// ErrNearUnitRoot marks a candidate rejected by a Search because a
	// root of its fitted AR or MA polynomial lies within 1.001 of the unit
	// circle (Hyndman & Khandakar 2008 exclude such nearly non-stationary
	// or non-invertible models).
	ErrNearUnitRoot = errors.New("root near the unit circle")
)
