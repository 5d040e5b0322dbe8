package accuracy

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/trigg"
)

// TriggAlpha is the smoothing constant of Trigg's tracking signal that
// the review page uses, and the one Trigg (1964) tabulated first.
const TriggAlpha = 0.1

// TriggLimit is the bound on |TriggSignal| with smoothing constant
// TriggAlpha beyond which the forecasts are taken to be biased: with
// unbiased, independent normal errors the signal exceeds it in about one
// period in twenty. The value 0.54 is Trigg's (1964) 95% limit for a
// smoothing constant of 0.1, recalled from memory; trigg_test.go checks it
// by simulating the signal (the same simulation gives 0.74 for 0.2, also
// his value).
const TriggLimit = 0.54

// TriggSignal returns Trigg's (1964) tracking signal at the end of a
// sequence of one-step forecast errors (actual − forecast, oldest first):
// the exponentially smoothed error divided by the exponentially smoothed
// absolute error,
//
//	E_t = α·e_t + (1 − α)·E_{t−1},  M_t = α·|e_t| + (1 − α)·M_{t−1},  T = E_n / M_n,
//
// started from E_0 = 0 and M_0 = the mean absolute error of the first
// min(n, ⌈1/α⌉) errors (common practice: a start for M that a few
// periods would otherwise have to build up). T lies in [−1, 1]; near +1
// the recent forecasts were persistently too low, near −1 persistently
// too high. Compare |T| with TriggLimit when alpha is TriggAlpha. A NaN
// error (a missing observation) is passed over: the smoothed values
// carry on unchanged. almanac.RefreshPolicy computes the same signal for
// its refit rule (one implementation serves both).
//
// Special cases: alpha outside (0, 1) or NaN wraps almanac.ErrInvalid; no
// errors almanac.ErrEmpty; ±Inf almanac.ErrNonFinite; every error NaN
// almanac.ErrAllMissing; every error 0 ErrUndefined (0/0).
func TriggSignal(errs []float64, alpha float64) (float64, error) {
	s, r := trigg.Signal(errs, alpha)
	switch r.Problem {
	case trigg.BadAlpha:
		return math.NaN(), fmt.Errorf("accuracy: Trigg signal: %w: smoothing constant %v outside (0, 1)", almanac.ErrInvalid, alpha)
	case trigg.Empty:
		return math.NaN(), fmt.Errorf("accuracy: Trigg signal: %w: no errors", almanac.ErrEmpty)
	case trigg.NonFinite:
		return math.NaN(), fmt.Errorf("accuracy: Trigg signal: %w: error %v at index %d", almanac.ErrNonFinite, errs[r.Index], r.Index)
	case trigg.AllMissing:
		return math.NaN(), fmt.Errorf("accuracy: Trigg signal: %w: every error is missing", almanac.ErrAllMissing)
	case trigg.AllZero:
		return math.NaN(), fmt.Errorf("accuracy: Trigg signal: %w: every error is 0", ErrUndefined)
	}
	return s, nil
}
