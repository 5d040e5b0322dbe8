package arima

import (
	"errors"
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
)

// DifferencesSpec configures Differences. The zero value differences at
// most twice, testing at the 5% level with the zero KPSSSpec (level
// stationarity, square-root lag rule):
//
//	arima.DifferencesSpec{MaxD: 1, Alpha: 0.01}
type DifferencesSpec struct {
	// MaxD is the largest order returned; 0 means 2, negative is invalid.
	MaxD int
	// Alpha is the significance level of each KPSS test: one of 0.10,
	// 0.05, 0.025, 0.01; 0 means 0.05.
	Alpha float64
	// Test configures the KPSS test run at each step.
	Test KPSSSpec
}

// Differences chooses the order of ordinary differencing d for an ARIMA
// model by repeated KPSS tests (common practice, the rule of the stepwise
// algorithm of Hyndman & Khandakar 2008): while the KPSS test rejects
// stationarity at level Alpha and d < MaxD, difference once more.
//
// Missing values are allowed: the series is differenced with NaN
// propagating, and each test uses the observed values of the differenced
// series in order. Differencing stops early (returning the current d)
// when the differenced series is constant or has fewer than 3 observed
// values, since nothing more can be learnt from it.
//
// Special cases:
//   - no values, all missing, or ±Inf: errors wrapping almanac.ErrEmpty,
//     almanac.ErrAllMissing, almanac.ErrNonFinite;
//   - fewer than 3 observed values: almanac.ErrTooShort;
//   - a constant series: d = 0 and no error (a constant needs no
//     differencing);
//   - negative MaxD, an Alpha not in the table, or an invalid Test:
//     almanac.ErrInvalid (almanac.ErrLevel for Alpha).
func Differences(y []float64, spec DifferencesSpec) (int, error) {
	maxD, alpha, err := spec.resolve()
	if err != nil {
		return 0, err
	}
	if err := selCheckFinite(y); err != nil {
		return 0, err
	}
	x := selObserved(nil, y)
	if len(x) < 3 {
		return 0, fmt.Errorf("arima: %w: choosing d needs at least 3 observed values, have %d", almanac.ErrTooShort, len(x))
	}
	w := append([]float64(nil), y...)
	for d := 0; ; d++ {
		if d == maxD || len(x) < 3 || selIsConstant(x) {
			return d, nil
		}
		r, err := KPSS(x, spec.Test)
		if errors.Is(err, almanac.ErrConstant) {
			return d, nil // nothing left to detrend
		}
		if err != nil {
			return 0, err
		}
		reject, err := r.Reject(alpha)
		if err != nil {
			return 0, err
		}
		if !reject {
			return d, nil
		}
		w = selDiff(w, 1)
		x = selObserved(x[:0], w)
	}
}

func (s DifferencesSpec) resolve() (maxD int, alpha float64, err error) {
	maxD, alpha = s.MaxD, s.Alpha
	if maxD < 0 {
		return 0, 0, fmt.Errorf("arima: %w: MaxD %d is negative", almanac.ErrInvalid, maxD)
	}
	if maxD == 0 {
		maxD = 2
	}
	if alpha == 0 {
		alpha = 0.05
	}
	if _, err := (KPSSResult{Critical: kpssTable[LevelStationary]}).Reject(alpha); err != nil {
		return 0, 0, err
	}
	if s.Test.Null != LevelStationary && s.Test.Null != TrendStationary {
		return 0, 0, fmt.Errorf("arima: %w: KPSS null %v", almanac.ErrInvalid, s.Test.Null)
	}
	return maxD, alpha, nil
}

// selCheckFinite rejects empty, all-NaN and ±Inf input.
func selCheckFinite(y []float64) error {
	if len(y) == 0 {
		return fmt.Errorf("arima: %w", almanac.ErrEmpty)
	}
	seen := false
	for i, v := range y {
		if math.IsInf(v, 0) {
			return fmt.Errorf("arima: %w: value %g at index %d", almanac.ErrNonFinite, v, i)
		}
		if !math.IsNaN(v) {
			seen = true
		}
	}
	if !seen {
		return fmt.Errorf("arima: %w: %d values, none observed", almanac.ErrAllMissing, len(y))
	}
	return nil
}

// selObserved appends the non-NaN values of y to dst.
func selObserved(dst, y []float64) []float64 {
	for _, v := range y {
		if !math.IsNaN(v) {
			dst = append(dst, v)
		}
	}
	return dst
}

// selIsConstant reports whether all values of x (no NaN) are equal.
func selIsConstant(x []float64) bool {
	for _, v := range x[1:] {
		if v != x[0] {
			return false
		}
	}
	return true
}

// selDiff replaces w by its lag-`lag` difference w_t − w_{t−lag}
// (length len(w) − lag), NaN propagating, and returns the shortened slice.
func selDiff(w []float64, lag int) []float64 {
	if lag >= len(w) {
		return w[:0]
	}
	for t := 0; t+lag < len(w); t++ {
		w[t] = w[t+lag] - w[t]
	}
	return w[:len(w)-lag]
}
