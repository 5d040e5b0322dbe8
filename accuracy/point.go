package accuracy

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
)

// The point measures below share these rules (see also the package
// documentation, "Missing values"):
//
//   - the error is actual − forecast, so a positive ME means the forecasts
//     were too low;
//   - actual and forecast must have the same, non-zero length (otherwise
//     errors wrapping almanac.ErrLength or almanac.ErrEmpty);
//   - ±Inf anywhere is an error wrapping almanac.ErrNonFinite;
//   - a pair in which either value is NaN (missing) is left out; when no
//     pair is left the error wraps almanac.ErrAllMissing;
//   - a measure that would divide by zero returns an error wrapping
//     ErrUndefined, never a number;
//   - the sums are taken on the values multiplied by a power of two that
//     brings the largest magnitude near 2^256 (exact), so values near the
//     float64 limit give their representable answer (the MAPE of
//     {1e308, −1e308} against {−1e308, 1e308} is 200); a result that does
//     not fit in a float64 (that MAE is 2e308) returns an error wrapping
//     almanac.ErrNonFinite, never ±Inf.

// checkPairs validates actual and forecast and returns the number of
// pairs with both values observed.
func checkPairs(fn string, actual, forecast []float64) (int, error) {
	if len(actual) != len(forecast) {
		return 0, fmt.Errorf("accuracy: %s: %w: %d actual values but %d forecasts", fn, almanac.ErrLength, len(actual), len(forecast))
	}
	if len(actual) == 0 {
		return 0, fmt.Errorf("accuracy: %s: %w: no actual values", fn, almanac.ErrEmpty)
	}
	n := 0
	for i, a := range actual {
		f := forecast[i]
		if math.IsInf(a, 0) {
			return 0, fmt.Errorf("accuracy: %s: %w: actual value %v at index %d", fn, almanac.ErrNonFinite, a, i)
		}
		if math.IsInf(f, 0) {
			return 0, fmt.Errorf("accuracy: %s: %w: forecast %v at index %d", fn, almanac.ErrNonFinite, f, i)
		}
		if !math.IsNaN(a) && !math.IsNaN(f) {
			n++
		}
	}
	if n == 0 {
		return 0, fmt.Errorf("accuracy: %s: %w: no index has both an actual value and a forecast", fn, almanac.ErrAllMissing)
	}
	return n, nil
}

func observed(a, f float64) bool { return !math.IsNaN(a) && !math.IsNaN(f) }

// pairExp returns the power-of-two exponent that brings the largest
// finite magnitude of actual and forecast near 2^256 (internal/scaling).
func pairExp(actual, forecast []float64) int { return scaling.Exponent(actual, forecast) }

// unscale maps a result computed on values times 2^k back (power = the
// power of the data's unit in the result: 1 for an error, 2 for a squared
// error) and reports one beyond the float64 range.
func unscale(fn string, v float64, k, power int) (float64, error) {
	if math.IsNaN(v) {
		return defined(fn, v)
	}
	u := math.Ldexp(v, -power*k)
	if math.IsInf(u, 0) {
		return math.NaN(), fmt.Errorf("accuracy: %s: %w: the result exceeds the float64 range (%v·2^%d)", fn, almanac.ErrNonFinite, v, -power*k)
	}
	return u, nil
}

// ME returns the mean error, mean(actual − forecast): the bias of the
// forecasts in the units of the data. Pairs with a NaN are left out.
func ME(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("ME", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, forecast)
	s := 0.0
	for i, a := range actual {
		if f := forecast[i]; observed(a, f) {
			s += math.Ldexp(a, k) - math.Ldexp(f, k)
		}
	}
	return unscale("ME", s/float64(n), k, 1)
}

// defined passes v on, or, when finite inputs overflowed to a NaN or
// infinite result, returns an error wrapping almanac.ErrNonFinite instead
// of a silent NaN or ±Inf.
func defined(fn string, v float64) (float64, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return math.NaN(), fmt.Errorf("accuracy: %s: %w: the result is not representable in float64 (values near ±1.8e308)", fn, almanac.ErrNonFinite)
	}
	return v, nil
}

// MAE returns the mean absolute error, mean|actual − forecast|. Pairs with
// a NaN are left out.
func MAE(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("MAE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, forecast)
	return unscale("MAE", sumAbs(actual, forecast, k)/float64(n), k, 1)
}

// sumAbs returns Σ|a − f|·2^k over the observed pairs.
func sumAbs(actual, forecast []float64, k int) float64 {
	s := 0.0
	for i, a := range actual {
		if f := forecast[i]; observed(a, f) {
			s += math.Abs(math.Ldexp(a, k) - math.Ldexp(f, k))
		}
	}
	return s
}

// MSE returns the mean squared error, mean (actual − forecast)². Pairs
// with a NaN are left out.
func MSE(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("MSE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, forecast)
	return unscale("MSE", sumSq(actual, forecast, k)/float64(n), k, 2)
}

// sumSq returns Σ(a − f)²·2^(2k) over the observed pairs.
func sumSq(actual, forecast []float64, k int) float64 {
	s := 0.0
	for i, a := range actual {
		if f := forecast[i]; observed(a, f) {
			e := math.Ldexp(a, k) - math.Ldexp(f, k)
			s += e * e
		}
	}
	return s
}

// RMSE returns the root mean squared error, √MSE. Pairs with a NaN are
// left out. It is computed on its own, so it is returned when it fits in
// a float64 even where the MSE does not.
func RMSE(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("RMSE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, forecast)
	return unscale("RMSE", math.Sqrt(sumSq(actual, forecast, k)/float64(n)), k, 1)
}

// MAPE returns the mean absolute percentage error in percent,
// 100·mean(|actual − forecast| / |actual|). Pairs with a NaN are left out.
//
// Special cases: an observed actual value of exactly 0 makes MAPE
// undefined; the error wraps ErrUndefined (use MASE for data with zeros).
func MAPE(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("MAPE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	s := 0.0
	for i, a := range actual {
		f := forecast[i]
		if !observed(a, f) {
			continue
		}
		if a == 0 {
			return math.NaN(), fmt.Errorf("accuracy: MAPE: %w: actual value 0 at index %d", ErrUndefined, i)
		}
		v := pctTerm(a, f)
		if math.IsInf(v, 0) {
			return math.NaN(), fmt.Errorf("accuracy: MAPE: %w: the percentage error at index %d (actual %v, forecast %v) exceeds the float64 range", almanac.ErrNonFinite, i, a, f)
		}
		s += v
	}
	if math.IsInf(s, 0) {
		// Terms near the float64 limit: average them at a smaller scale.
		s = 0
		for i, a := range actual {
			if f := forecast[i]; observed(a, f) {
				s += math.Ldexp(pctTerm(a, f), -64)
			}
		}
		return unscale("MAPE", 100*s/float64(n), 64, 1)
	}
	return defined("MAPE", 100*s/float64(n))
}

// pctTerm is |a − f| / |a| for a ≠ 0, computed without forming a − f when
// that would overflow (a term beyond the float64 range is +Inf).
func pctTerm(a, f float64) float64 {
	e := math.Abs(a - f)
	if math.IsInf(e, 0) {
		return math.Abs(a/2-f/2) / (math.Abs(a) / 2)
	}
	return e / math.Abs(a)
}

// SMAPE returns the symmetric mean absolute percentage error of the M3
// competition (Makridakis & Hibon 2000, also used in M4), in percent:
// 100·mean(2|actual − forecast| / (|actual| + |forecast|)). It lies in
// [0, 200]. Pairs with a NaN are left out.
//
// Special cases: a pair with actual and forecast both 0 is 0/0; the error
// wraps ErrUndefined. One zero alone is fine (that term is 200).
func SMAPE(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("sMAPE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	s := 0.0
	for i, a := range actual {
		f := forecast[i]
		if !observed(a, f) {
			continue
		}
		v, ok := symTerm(a, f)
		if !ok {
			return math.NaN(), fmt.Errorf("accuracy: sMAPE: %w: actual and forecast both 0 at index %d", ErrUndefined, i)
		}
		s += v
	}
	return 100 * s / float64(n), nil
}

// symTerm is one sMAPE term, 2|a − f| / (|a| + |f|) in [0, 2], and false
// when a and f are both 0. Finite values near the float64 limit, whose
// difference or sum would overflow to Inf (and the ratio to NaN), are
// first divided by max(|a|, |f|).
func symTerm(a, f float64) (float64, bool) {
	d := math.Abs(a) + math.Abs(f)
	if d == 0 {
		return 0, false
	}
	e := math.Abs(a - f)
	if math.IsInf(d, 0) || math.IsInf(e, 0) {
		sc := math.Max(math.Abs(a), math.Abs(f))
		a, f = a/sc, f/sc
		d, e = math.Abs(a)+math.Abs(f), math.Abs(a-f)
	}
	return 2 * (e / d), true // 2·e could overflow; doubling is exact, so the bits are those of 2e/d
}

// MdAE returns the median absolute error. With an even number of pairs it
// is the mean of the two middle absolute errors. Pairs with a NaN are left
// out.
func MdAE(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("MdAE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, forecast)
	abs := make([]float64, 0, n)
	for i, a := range actual {
		if f := forecast[i]; observed(a, f) {
			abs = append(abs, math.Abs(math.Ldexp(a, k)-math.Ldexp(f, k)))
		}
	}
	return unscale("MdAE", median(abs), k, 1)
}

// median sorts xs in place and returns its median (mean of the two middle
// values for an even count). xs must not be empty or hold NaN.
func median(xs []float64) float64 {
	slices.Sort(xs)
	k := len(xs) / 2
	if len(xs)%2 == 1 {
		return xs[k]
	}
	return (xs[k-1] + xs[k]) / 2
}

// NaiveScale returns the in-sample scales of the (seasonal) naive method
// with period m: the mean absolute difference mean_{t>m}|x_t − x_{t−m}|
// (the MASE denominator of Hyndman & Koehler 2006) and the mean squared
// difference mean_{t>m}(x_t − x_{t−m})² (the RMSSE denominator of the M5
// competition). Differences involving a NaN are left out.
//
// Special cases: m < 1 wraps almanac.ErrInvalid; ±Inf wraps
// almanac.ErrNonFinite; no observed difference (for example
// len(insample) ≤ m) wraps almanac.ErrTooShort. A constant in-sample
// part gives scales of 0, which is returned as is; MASE and RMSSE then
// report ErrUndefined. A scale beyond the float64 range (the squared
// scale of differences above about 1e154) wraps almanac.ErrNonFinite; MASE
// and RMSSE do not need it in data units and are not affected.
func NaiveScale(insample []float64, m int) (abs, sq float64, err error) {
	k := scaling.Exponent(insample)
	abs, sq, err = naiveScale(insample, m, k)
	if err != nil {
		return math.NaN(), math.NaN(), err
	}
	if abs, err = unscale("naive scale", abs, k, 1); err != nil {
		return math.NaN(), math.NaN(), err
	}
	if sq, err = unscale("naive scale", sq, k, 2); err != nil {
		return math.NaN(), math.NaN(), err
	}
	return abs, sq, nil
}

// naiveScale is NaiveScale on insample·2^k, in those units (sq in units
// of 2^(2k)).
func naiveScale(insample []float64, m, k int) (abs, sq float64, err error) {
	if m < 1 {
		return math.NaN(), math.NaN(), fmt.Errorf("accuracy: naive scale: %w: period %d, need at least 1", almanac.ErrInvalid, m)
	}
	for i, v := range insample {
		if math.IsInf(v, 0) {
			return math.NaN(), math.NaN(), fmt.Errorf("accuracy: naive scale: %w: in-sample value %v at index %d", almanac.ErrNonFinite, v, i)
		}
	}
	n := 0
	for t := m; t < len(insample); t++ {
		d := math.Ldexp(insample[t], k) - math.Ldexp(insample[t-m], k)
		if math.IsNaN(d) {
			continue
		}
		abs += math.Abs(d)
		sq += d * d
		n++
	}
	if n == 0 {
		return math.NaN(), math.NaN(), fmt.Errorf("accuracy: naive scale: %w: %d in-sample values give no observed lag-%d difference", almanac.ErrTooShort, len(insample), m)
	}
	return abs / float64(n), sq / float64(n), nil
}

// MASE returns the mean absolute scaled error of Hyndman & Koehler (2006):
// MAE divided by the in-sample mean absolute error of the seasonal naive
// method with period m (m = 1: the naive method), as computed by
// NaiveScale. The M4 competition uses m = 12 for monthly, 4 for quarterly,
// 24 for hourly and 1 for other data.
//
// Special cases: as for MAE and NaiveScale; a zero scale (a constant
// in-sample part) wraps ErrUndefined. The MAE and the scale are taken in
// the same rescaled units, so neither needs to fit in a float64 on its own.
func MASE(actual, forecast, insample []float64, m int) (float64, error) {
	n, err := checkPairs("MASE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := scaling.Exponent(actual, forecast, insample)
	scale, _, err := naiveScale(insample, m, k)
	if err != nil {
		return math.NaN(), fmt.Errorf("accuracy: MASE: %w", err)
	}
	if scale == 0 {
		return math.NaN(), fmt.Errorf("accuracy: MASE: %w: the in-sample lag-%d differences are all 0", ErrUndefined, m)
	}
	return defined("MASE", sumAbs(actual, forecast, k)/float64(n)/scale)
}

// RMSSE returns the root mean squared scaled error of the M5 competition:
// √(MSE / mean_{t>m}(x_t − x_{t−m})²). M5 uses m = 1; any period may be
// given.
//
// Special cases: as for MASE.
func RMSSE(actual, forecast, insample []float64, m int) (float64, error) {
	n, err := checkPairs("RMSSE", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := scaling.Exponent(actual, forecast, insample)
	_, scale, err := naiveScale(insample, m, k)
	if err != nil {
		return math.NaN(), fmt.Errorf("accuracy: RMSSE: %w", err)
	}
	if scale == 0 {
		return math.NaN(), fmt.Errorf("accuracy: RMSSE: %w: the in-sample lag-%d differences are all 0", ErrUndefined, m)
	}
	return defined("RMSSE", math.Sqrt(sumSq(actual, forecast, k)/float64(n)/scale))
}

// TrackingSignal returns the cumulative error divided by the mean absolute
// error, Σ(actual − forecast) / MAE (common practice: the tracking signal
// used to monitor forecast bias, Brown 1959). It lies in [−n, n] for n
// pairs; values far from 0 (a usual alarm is |TS| > 4) mean the forecasts
// are persistently too low (positive) or too high (negative). Pairs with
// a NaN are left out.
//
// Special cases: all errors 0 wraps ErrUndefined.
func TrackingSignal(actual, forecast []float64) (float64, error) {
	n, err := checkPairs("tracking signal", actual, forecast)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, forecast)
	sum := 0.0
	for i, a := range actual {
		if f := forecast[i]; observed(a, f) {
			sum += math.Ldexp(a, k) - math.Ldexp(f, k)
		}
	}
	mad := sumAbs(actual, forecast, k) / float64(n)
	if mad == 0 {
		return math.NaN(), fmt.Errorf("accuracy: tracking signal: %w: every error is 0", ErrUndefined)
	}
	return defined("tracking signal", sum/mad)
}

// PointMeasure is the shape of the two-argument point measures (ME, MAE,
// MSE, RMSE, MAPE, SMAPE, MdAE), for Relative.
type PointMeasure func(actual, forecast []float64) (float64, error)

// Relative returns measure(actual, forecast) / measure(actual, benchmark),
// the relative error of a forecast against a benchmark forecast of the
// same actual values (for example Relative(MAE, ...) is the relative MAE;
// values below 1 mean the forecast beat the benchmark). Both measures are
// evaluated on the same pairs: an index is left out when the actual
// value, the forecast or the benchmark is NaN.
//
// Special cases: the lengths must agree (almanac.ErrLength); a benchmark
// measure of 0 wraps ErrUndefined; errors of the measure are passed on.
func Relative(measure PointMeasure, actual, forecast, benchmark []float64) (float64, error) {
	if measure == nil {
		return math.NaN(), fmt.Errorf("accuracy: relative: %w: nil measure", almanac.ErrInvalid)
	}
	if len(forecast) != len(actual) || len(benchmark) != len(actual) {
		return math.NaN(), fmt.Errorf("accuracy: relative: %w: %d actual values, %d forecasts, %d benchmark forecasts", almanac.ErrLength, len(actual), len(forecast), len(benchmark))
	}
	a, cloned := actual, false
	for i := range actual {
		if (math.IsNaN(forecast[i]) || math.IsNaN(benchmark[i])) && !math.IsNaN(actual[i]) {
			if !cloned {
				a, cloned = slices.Clone(actual), true // never write into the caller's slice
			}
			a[i] = math.NaN()
		}
	}
	num, err := measure(a, forecast)
	if err != nil {
		return math.NaN(), fmt.Errorf("accuracy: relative: forecast: %w", err)
	}
	den, err := measure(a, benchmark)
	if err != nil {
		return math.NaN(), fmt.Errorf("accuracy: relative: benchmark: %w", err)
	}
	if den == 0 {
		return math.NaN(), fmt.Errorf("accuracy: relative: %w: the benchmark's measure is 0", ErrUndefined)
	}
	return defined("relative", num/den)
}
