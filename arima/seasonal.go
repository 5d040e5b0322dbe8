package arima

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/stl"
)

// DefaultStrengthThreshold is the seasonal strength above which
// SeasonalDifferences takes a seasonal difference: 0.64 (common
// practice in automatic ARIMA order selection; the threshold used with
// the strength measure of Wang, Smith & Hyndman 2006).
const DefaultStrengthThreshold = 0.64

// DefaultStrengthSpan is the seasonal loess span of the STL fit behind
// SeasonalStrength when none is given: 13 cycles (Cleveland et al. 1990
// ask for an odd span of at least 7; 13 is a common choice, common
// practice).
const DefaultStrengthSpan = 13

// maxStrengthSpan bounds the STL seasonal span: larger spans are used as
// this one. At 2^60 the loess weights of any series shorter than 2^40
// are already all exactly 1 (the tricube of distance/span rounds to 1),
// so the bound changes no result, and spans near the largest int would
// overflow the STL window arithmetic.
const maxStrengthSpan = 1 << 60

// tooFewPeriods reports whether n values hold no more than two full
// periods (n ≤ 2·period, written so that a huge period cannot overflow).
func tooFewPeriods(n, period int) bool { return period > (n-1)/2 }

// SeasonalDifferencesSpec configures SeasonalDifferences. The zero value
// takes at most one seasonal difference, when the STL seasonal strength
// exceeds 0.64:
//
//	arima.SeasonalDifferencesSpec{MaxD: 2, Threshold: 0.5, Span: 7}
type SeasonalDifferencesSpec struct {
	// MaxD is the largest seasonal order returned; 0 means 1, negative
	// is invalid.
	MaxD int
	// Threshold is the strength above which a seasonal difference is
	// taken, in (0, 1); 0 means DefaultStrengthThreshold.
	Threshold float64
	// Span is the STL seasonal loess span (odd, ≥ 7 advised); 0 means
	// DefaultStrengthSpan; spans above 2^60 are used as 2^60 (the same
	// fit for any series shorter than 2^40).
	Span int
}

// SeasonalStrength returns the strength of seasonality of y with the
// given period, F_s = max(0, 1 − Var(R)/Var(S + R)), from an STL
// decomposition y = T + S + R (Wang, Smith & Hyndman 2006; STL of
// Cleveland et al. 1990, non-robust, seasonal span `span`, the other
// settings those of R's stats::stl). F_s is near 0 for no seasonality and
// near 1 for a seasonal pattern that dominates the remainder. span 0
// means DefaultStrengthSpan; a span above 2^60 is used as 2^60 (the same
// fit for any series shorter than 2^40).
//
// Missing values inside the series are filled by linear interpolation
// between their observed neighbours before the decomposition; missing
// values at either end are dropped.
//
// Special cases:
//   - period < 2 or span < 0: an error wrapping almanac.ErrInvalid;
//   - no more than two full periods of observed data: almanac.ErrTooShort;
//   - no values, all missing, ±Inf: almanac.ErrEmpty,
//     almanac.ErrAllMissing, almanac.ErrNonFinite (also for values so
//     large that the decomposition or the variances overflow);
//   - a constant series, or S + R constant: 0 (no seasonality), no error.
func SeasonalStrength(y []float64, period, span int) (float64, error) {
	if period < 2 {
		return 0, fmt.Errorf("arima: %w: seasonal period %d, must be at least 2", almanac.ErrInvalid, period)
	}
	if span < 0 {
		return 0, fmt.Errorf("arima: %w: STL seasonal span %d is negative", almanac.ErrInvalid, span)
	}
	if span == 0 {
		span = DefaultStrengthSpan
	}
	span = min(span, maxStrengthSpan)
	if err := selCheckFinite(y); err != nil {
		return 0, err
	}
	x := selInterpolate(y)
	if tooFewPeriods(len(x), period) {
		return 0, fmt.Errorf("arima: %w: seasonal strength with period %d needs more than %d observations, have %d", almanac.ErrTooShort, period, 2*period, len(x))
	}
	return selStrength(x, period, span)
}

// selStrength computes F_s for complete data x with len(x) > 2·period.
func selStrength(x []float64, period, span int) (float64, error) {
	return strengthWith(x, stl.Defaults(len(x), period, span, false, false))
}

// strengthWith computes F_s for complete data x from the STL
// decomposition with parameters p.
func strengthWith(x []float64, p stl.Params) (float64, error) {
	if selIsConstant(x) {
		return 0, nil
	}
	s, _, r, _, err := stl.Decompose(x, p)
	if err != nil {
		return 0, fmt.Errorf("arima: %w: seasonal strength: %v", almanac.ErrInvalid, err)
	}
	return strengthOf(s, r)
}

// strengthOf returns max(0, 1 − Var(r)/Var(s + r)) (s is overwritten by
// s + r).
func strengthOf(s, r []float64) (float64, error) {
	for i := range s {
		s[i] += r[i]
	}
	vsr, vr := selVariance(s), selVariance(r)
	if math.IsNaN(vsr) || math.IsInf(vsr, 0) || math.IsNaN(vr) || math.IsInf(vr, 0) {
		return 0, fmt.Errorf("arima: %w: seasonal strength: variances overflow; the values are too large (rescale the series)", almanac.ErrNonFinite)
	}
	if !(vsr > 0) {
		return 0, nil
	}
	return max(0, 1-vr/vsr), nil
}

// SeasonalDifferences chooses the order of seasonal differencing D for
// an ARIMA model with the given period: while the seasonal strength of
// the (seasonally differenced) series exceeds the threshold (default
// 0.64) and D < MaxD (default 1), take one more seasonal difference.
// This is the strength rule of Wang, Smith & Hyndman (2006) as used in
// automatic order selection (common practice); no seasonal unit-root test
// is run.
//
// Differencing stops early (returning the current D) when the
// differenced series has no more than two full periods of data left or
// is constant. Missing values are handled as in SeasonalStrength.
//
// Special cases: as SeasonalStrength for the series and period
// (almanac.ErrTooShort when even D = 0 cannot be assessed), plus
// almanac.ErrInvalid for a negative MaxD or a Threshold outside [0, 1).
func SeasonalDifferences(y []float64, period int, spec SeasonalDifferencesSpec) (int, error) {
	maxD, thr, span := spec.MaxD, spec.Threshold, spec.Span
	switch {
	case maxD < 0:
		return 0, fmt.Errorf("arima: %w: MaxD %d is negative", almanac.ErrInvalid, maxD)
	case thr < 0 || thr >= 1 || math.IsNaN(thr):
		return 0, fmt.Errorf("arima: %w: strength threshold %g outside [0, 1)", almanac.ErrInvalid, thr)
	}
	if maxD == 0 {
		maxD = 1
	}
	if thr == 0 {
		thr = DefaultStrengthThreshold
	}
	if _, err := SeasonalStrength(y, period, span); err != nil {
		return 0, err
	}
	if span == 0 {
		span = DefaultStrengthSpan
	}
	span = min(span, maxStrengthSpan)
	w := append([]float64(nil), y...)
	for d := 0; ; d++ {
		x := selInterpolate(w)
		if d == maxD || tooFewPeriods(len(x), period) || selIsConstant(x) {
			return d, nil
		}
		f, err := selStrength(x, period, span)
		if err != nil {
			return 0, err
		}
		if f <= thr {
			return d, nil
		}
		w = selDiff(w, period)
	}
}

// selInterpolate returns the values of y from its first to its last
// selObserved value, with interior NaN filled linearly from the neighbours.
func selInterpolate(y []float64) []float64 {
	lo, hi := 0, len(y)-1
	for lo <= hi && math.IsNaN(y[lo]) {
		lo++
	}
	for hi >= lo && math.IsNaN(y[hi]) {
		hi--
	}
	if lo > hi {
		return nil
	}
	x := append([]float64(nil), y[lo:hi+1]...)
	prev := 0
	for i := 1; i < len(x); i++ {
		if math.IsNaN(x[i]) {
			continue
		}
		if i-prev > 1 {
			step := (x[i] - x[prev]) / float64(i-prev)
			for j := prev + 1; j < i; j++ {
				x[j] = x[prev] + step*float64(j-prev)
			}
		}
		prev = i
	}
	return x
}

// selVariance is the sample variance (denominator n − 1) by two passes.
func selVariance(x []float64) float64 {
	m := 0.0
	for _, v := range x {
		m += v
	}
	m /= float64(len(x))
	s := 0.0
	for _, v := range x {
		s += (v - m) * (v - m)
	}
	return s / float64(len(x)-1)
}
