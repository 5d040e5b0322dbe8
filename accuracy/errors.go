package accuracy

import "errors"

// Sentinel errors of this package. Errors about the input data wrap the
// root sentinels (almanac.ErrLength, almanac.ErrEmpty, almanac.ErrNonFinite,
// almanac.ErrAllMissing, almanac.ErrTooShort, almanac.ErrLevel,
// almanac.ErrInvalid, almanac.ErrConstant); the ones below cover what is
// particular to scoring. Test with errors.Is.
var (
	// ErrUndefined: the measure is undefined on this data, typically a
	// division by zero — MAPE with an actual value of 0, sMAPE with an
	// actual and a forecast both 0, MASE or RMSSE with a zero in-sample
	// scale, a relative measure whose benchmark is perfect.
	ErrUndefined = errors.New("measure undefined for this data")
	// ErrBacktest: a model could not be fitted or forecast at some origin
	// of a backtest (FitFailure; Run's error when a candidate completed
	// no origin; in a batch, the series' SeriesFailure), or no series of a
	// batch could be compared. The wrapped chain also
	// holds the model's own error (for a batch, the first series').
	ErrBacktest = errors.New("backtest failed")
	// ErrUncalibrated: a calibrated model has too few out-of-sample
	// errors to set its bands (Calibrated with Strict set).
	ErrUncalibrated = errors.New("too few out-of-sample errors to calibrate")
)
