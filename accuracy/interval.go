package accuracy

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
	"gonum.org/v1/gonum/stat/distuv"
)

// checkTriples validates actual with two companion slices (bounds, or mean
// and sd) of the same length and returns the number of indices where all
// three are observed.
func checkTriples(fn, nameB, nameC string, actual, b, c []float64) (int, error) {
	if len(b) != len(actual) || len(c) != len(actual) {
		return 0, fmt.Errorf("accuracy: %s: %w: %d actual values, %d %s, %d %s", fn, almanac.ErrLength, len(actual), len(b), nameB, len(c), nameC)
	}
	if len(actual) == 0 {
		return 0, fmt.Errorf("accuracy: %s: %w: no actual values", fn, almanac.ErrEmpty)
	}
	n := 0
	for i, a := range actual {
		for _, v := range [3]float64{a, b[i], c[i]} {
			if math.IsInf(v, 0) {
				return 0, fmt.Errorf("accuracy: %s: %w: %v at index %d", fn, almanac.ErrNonFinite, v, i)
			}
		}
		if !math.IsNaN(a) && !math.IsNaN(b[i]) && !math.IsNaN(c[i]) {
			n++
		}
	}
	if n == 0 {
		return 0, fmt.Errorf("accuracy: %s: %w: no index has all of actual, %s and %s observed", fn, almanac.ErrAllMissing, nameB, nameC)
	}
	return n, nil
}

func checkBounds(fn string, lower, upper []float64) error {
	for i := range lower {
		if lower[i] > upper[i] {
			return fmt.Errorf("accuracy: %s: %w: lower bound %v above upper bound %v at index %d", fn, almanac.ErrInvalid, lower[i], upper[i], i)
		}
	}
	return nil
}

// Coverage returns the fraction (0 to 1) of actual values inside their
// prediction interval, lower ≤ actual ≤ upper (bounds included). An index
// is left out when the actual value or a bound is NaN.
//
// Special cases: mismatched lengths wrap almanac.ErrLength, ±Inf
// almanac.ErrNonFinite, a lower bound above its upper bound
// almanac.ErrInvalid, nothing observed almanac.ErrAllMissing.
func Coverage(actual, lower, upper []float64) (float64, error) {
	n, err := checkTriples("coverage", "lower bounds", "upper bounds", actual, lower, upper)
	if err != nil {
		return math.NaN(), err
	}
	if err := checkBounds("coverage", lower, upper); err != nil {
		return math.NaN(), err
	}
	in := 0
	for i, a := range actual {
		if a >= lower[i] && a <= upper[i] { // false when any is NaN
			in++
		}
	}
	return float64(in) / float64(n), nil
}

// winkler is the interval score of one observation with alpha = 1 − level/100.
func winkler(y, l, u, alpha float64) float64 {
	s := u - l
	if y < l {
		s += 2 / alpha * (l - y)
	} else if y > u {
		s += 2 / alpha * (y - u)
	}
	return s
}

// IntervalScore returns the mean interval score of central prediction
// intervals at level (a percentage in (0, 100)), the Winkler (1972) score
// in the form of Gneiting & Raftery (2007, eq. 43):
// mean[(U − L) + (2/α)(L − y)·1{y < L} + (2/α)(y − U)·1{y > U}] with
// α = 1 − level/100. Lower is better; it is in the units of the data.
// Missing values and special cases as for Coverage; a level outside
// (0, 100) wraps almanac.ErrLevel.
func IntervalScore(actual, lower, upper []float64, level float64) (float64, error) {
	if err := almanac.CheckLevels(level); err != nil {
		return math.NaN(), fmt.Errorf("accuracy: interval score: %w", err)
	}
	n, err := checkTriples("interval score", "lower bounds", "upper bounds", actual, lower, upper)
	if err != nil {
		return math.NaN(), err
	}
	if err := checkBounds("interval score", lower, upper); err != nil {
		return math.NaN(), err
	}
	k := scaling.Exponent(actual, lower, upper)
	return unscale("interval score", intervalScoreSum(actual, lower, upper, level, k)/float64(n), k, 1)
}

// intervalScoreSum is the sum of the interval scores of the observed
// triples, on the values times 2^k.
func intervalScoreSum(actual, lower, upper []float64, level float64, k int) float64 {
	alpha := 1 - level/100
	s := 0.0
	for i, a := range actual {
		if !math.IsNaN(a) && !math.IsNaN(lower[i]) && !math.IsNaN(upper[i]) {
			s += winkler(math.Ldexp(a, k), math.Ldexp(lower[i], k), math.Ldexp(upper[i], k), alpha)
		}
	}
	return s
}

// MSIS returns the mean scaled interval score of the M4 competition: the
// IntervalScore divided by the MASE scale of the in-sample part with
// period m (NaiveScale). M4 scores 95% intervals.
//
// Special cases: as for IntervalScore and MASE. The score and the scale
// are taken in the same rescaled units, so neither needs to fit in a
// float64 on its own.
func MSIS(actual, lower, upper []float64, level float64, insample []float64, m int) (float64, error) {
	if err := almanac.CheckLevels(level); err != nil {
		return math.NaN(), fmt.Errorf("accuracy: MSIS: %w", err)
	}
	n, err := checkTriples("MSIS", "lower bounds", "upper bounds", actual, lower, upper)
	if err != nil {
		return math.NaN(), err
	}
	if err := checkBounds("MSIS", lower, upper); err != nil {
		return math.NaN(), err
	}
	k := scaling.Exponent(actual, lower, upper, insample)
	scale, _, err := naiveScale(insample, m, k)
	if err != nil {
		return math.NaN(), fmt.Errorf("accuracy: MSIS: %w", err)
	}
	if scale == 0 {
		return math.NaN(), fmt.Errorf("accuracy: MSIS: %w: the in-sample lag-%d differences are all 0", ErrUndefined, m)
	}
	return defined("MSIS", intervalScoreSum(actual, lower, upper, level, k)/float64(n)/scale)
}

// pinball is the quantile loss of one observation at probability tau.
func pinball(y, q, tau float64) float64 {
	if y >= q {
		return tau * (y - q)
	}
	return (1 - tau) * (q - y)
}

// Pinball returns the mean pinball (quantile) loss of forecasts quantile
// of the tau-quantile, tau a probability in (0, 1):
// mean of tau·(y − q) when y ≥ q and (1 − tau)·(q − y) otherwise (no
// factor 2; at tau = 0.5 it is half the MAE of the median). Pairs with a
// NaN are left out.
//
// Special cases: tau outside (0, 1) wraps almanac.ErrLevel; otherwise as
// for MAE.
func Pinball(actual, quantile []float64, tau float64) (float64, error) {
	if !(tau > 0 && tau < 1) {
		return math.NaN(), fmt.Errorf("accuracy: pinball: %w: probability %v outside (0, 1)", almanac.ErrLevel, tau)
	}
	n, err := checkPairs("pinball", actual, quantile)
	if err != nil {
		return math.NaN(), err
	}
	k := pairExp(actual, quantile)
	s := 0.0
	for i, a := range actual {
		if q := quantile[i]; observed(a, q) {
			s += pinball(math.Ldexp(a, k), math.Ldexp(q, k), tau)
		}
	}
	return unscale("pinball", s/float64(n), k, 1)
}

var invSqrtPi = 1 / math.Sqrt(math.Pi)

// crpsNormal is the CRPS of N(mu, sd²) at y; sd = 0 gives |y − mu|.
// Values near the float64 limit are handled at a reduced scale; a CRPS
// beyond the range is +Inf.
func crpsNormal(y, mu, sd float64) float64 {
	if d := math.Abs(y - mu); math.IsInf(d, 0) || math.IsInf(sd*4, 0) {
		const k = -64
		return math.Ldexp(crpsNormal(math.Ldexp(y, k), math.Ldexp(mu, k), math.Ldexp(sd, k)), -k)
	}
	if sd == 0 {
		return math.Abs(y - mu)
	}
	z := (y - mu) / sd
	if math.IsInf(z, 0) {
		// sd so small against y − mu that z overflows: the CRPS is
		// |y − mu| − sd/√π·(1 − o(1)), which rounds to |y − mu| (and
		// sd·Inf would give Inf).
		return math.Abs(y - mu)
	}
	return sd * (z*(2*distuv.UnitNormal.CDF(z)-1) + 2*distuv.UnitNormal.Prob(z) - invSqrtPi)
}

// CRPSNormal returns the mean continuous ranked probability score of
// normal forecast distributions N(mean, sd²) at the actual values, by the
// closed form of Gneiting, Raftery, Westveld & Goldman (2005):
// sd·[z(2Φ(z) − 1) + 2φ(z) − 1/√π] with z = (y − mean)/sd. Lower is
// better; it is in the units of the data and equals the absolute error
// when sd = 0. An index is left out when any of its three values is NaN.
//
// Special cases: a negative sd wraps almanac.ErrInvalid; otherwise as for
// Coverage.
func CRPSNormal(actual, mean, sd []float64) (float64, error) {
	n, err := checkTriples("CRPS", "means", "standard deviations", actual, mean, sd)
	if err != nil {
		return math.NaN(), err
	}
	k := scaling.Exponent(actual, mean, sd)
	s := 0.0
	for i, a := range actual {
		if sd[i] < 0 {
			return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: negative standard deviation %v at index %d", almanac.ErrInvalid, sd[i], i)
		}
		if !math.IsNaN(a) && !math.IsNaN(mean[i]) && !math.IsNaN(sd[i]) {
			s += crpsNormal(math.Ldexp(a, k), math.Ldexp(mean[i], k), math.Ldexp(sd[i], k))
		}
	}
	return unscale("CRPS", s/float64(n), k, 1)
}

// crpsSorted is the CRPS of the empirical distribution of the sorted,
// NaN-free, non-empty sample xs at y (see crpsSortedRaw). When the values
// are near the float64 limit it is computed on them times 2^−200 (exact)
// and scaled back, so the result is +Inf only when the CRPS itself is
// beyond the float64 range. xs is not modified.
func crpsSorted(y float64, xs []float64) float64 {
	m := math.Max(math.Abs(y), math.Max(math.Abs(xs[0]), math.Abs(xs[len(xs)-1])))
	if m < 0x1p900 { // the sums below stay finite for up to 2^120 draws
		return crpsSortedRaw(y, xs)
	}
	const k = -200
	sc := make([]float64, len(xs))
	for i, x := range xs {
		sc[i] = math.Ldexp(x, k)
	}
	return math.Ldexp(crpsSortedRaw(math.Ldexp(y, k), sc), -k)
}

// crpsSortedRaw is the CRPS of the empirical distribution of the sorted,
// NaN-free sample xs at y, in the energy form E|X − y| − ½E|X − X'|
// with E|X − X'| = (2/n²) Σ_i (2i − n − 1) x_(i) (i = 1..n).
func crpsSortedRaw(y float64, xs []float64) float64 {
	n := float64(len(xs))
	var d, g float64
	for i, x := range xs {
		d += math.Abs(x - y)
		g += (2*float64(i+1) - n - 1) * x
	}
	return d/n - g/(n*n)
}

// CRPSSample returns the mean CRPS of forecast distributions given by
// sample paths (paths[i][h] is path i at step h, as in almanac.Sample) at
// the actual values actual[h]. Each step is scored by the energy form
// E|X − y| − ½E|X − X'| over the empirical distribution of the sample
// (common practice; with n draws the expectations are exact averages over
// the draws and all n² pairs, so the result is the CRPS of the empirical
// distribution function). NaN draws are ignored; a step whose actual
// value is NaN is left out.
//
// Special cases: no paths or a path shorter than actual wraps
// almanac.ErrLength; ±Inf wraps almanac.ErrNonFinite; a step with an
// actual value but no finite draw wraps almanac.ErrAllMissing, as does an
// all-NaN actual.
func CRPSSample(actual []float64, paths [][]float64) (float64, error) {
	if len(actual) == 0 {
		return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: no actual values", almanac.ErrEmpty)
	}
	if len(paths) == 0 {
		return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: no sample paths", almanac.ErrLength)
	}
	for i, p := range paths {
		if len(p) < len(actual) {
			return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: path %d has %d steps, need %d", almanac.ErrLength, i, len(p), len(actual))
		}
	}
	// Scores are summed on the values times 2^k (largest magnitude near
	// 2^256, exact), so draws near the float64 limit do not overflow.
	k := scaling.Exponent(append([][]float64{actual}, paths...)...)
	xs := make([]float64, 0, len(paths))
	s, n := 0.0, 0
	for h, a := range actual {
		if math.IsInf(a, 0) {
			return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: actual value %v at index %d", almanac.ErrNonFinite, a, h)
		}
		if math.IsNaN(a) {
			continue
		}
		xs = xs[:0]
		for i, p := range paths {
			v := p[h]
			if math.IsInf(v, 0) {
				return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: path %d step %d is %v", almanac.ErrNonFinite, i, h, v)
			}
			if !math.IsNaN(v) {
				xs = append(xs, v)
			}
		}
		if len(xs) == 0 {
			return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: no draw at step %d", almanac.ErrAllMissing, h)
		}
		slices.Sort(xs)
		for i := range xs {
			xs[i] = math.Ldexp(xs[i], k)
		}
		s += crpsSortedRaw(math.Ldexp(a, k), xs)
		n++
	}
	if n == 0 {
		return math.NaN(), fmt.Errorf("accuracy: CRPS: %w: every actual value is missing", almanac.ErrAllMissing)
	}
	return unscale("CRPS", s/float64(n), k, 1)
}
