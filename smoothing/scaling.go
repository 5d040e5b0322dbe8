package smoothing

import (
	"math"
	"slices"
)

// scaling is the affine map between the data y and the internal series z
// on which every ETS model is estimated and run: y = s0·(c + d·z). s0 is
// the largest |y| (so y/s0 cannot overflow), c a robust location and d a
// robust scale of y/s0. Models whose components are all additive are
// centred (c = median, d = median absolute deviation from it), which makes
// the estimate invariant to a shift of the data; models with a
// multiplicative component are only scaled (c = 0, d = median). Every
// state and forecast is computed on z, where values are of order one,
// and mapped back through level (for values of the series) or diff (for
// differences: trends, additive seasonal states, standard deviations), so
// results that are representable come out finite even for data near the
// float64 limits, and scale invariance is exact up to rounding.
type scaling struct{ s0, c, d float64 }

// newScaling returns the map for y (finite values); centre selects the
// centred form.
func newScaling(y []float64, centre bool) scaling {
	s0 := 0.0
	for _, v := range y {
		s0 = math.Max(s0, math.Abs(v))
	}
	if !(s0 > 0) || math.IsInf(s0, 0) {
		s0 = 1
	}
	u := make([]float64, len(y))
	for i, v := range y {
		u[i] = v / s0
	}
	slices.Sort(u)
	med := median(u)
	if !centre {
		d := med
		if !(d > 0) {
			d = 1
		}
		return scaling{s0: s0, d: d}
	}
	for i := range u {
		u[i] = math.Abs(u[i] - med)
	}
	slices.Sort(u)
	d := median(u)
	if !(d > 0) {
		// More than half the values equal the median: use the mean
		// absolute deviation, and 1 for a constant series.
		for _, v := range u {
			d += v
		}
		d /= float64(len(u))
		if !(d > 0) {
			d = 1
		}
	}
	return scaling{s0: s0, c: med, d: d}
}

// median of sorted values.
func median(s []float64) float64 {
	n := len(s)
	if n == 0 {
		return 0
	}
	if n%2 == 1 {
		return s[n/2]
	}
	return s[n/2-1] + (s[n/2]-s[n/2-1])/2
}

// level maps an internal value of the series to the data's units.
func (t scaling) level(q float64) float64 { return t.s0 * (t.c + t.d*q) }

// diff maps an internal difference (or standard deviation) to the data's
// units.
func (t scaling) diff(q float64) float64 { return t.s0 * (t.d * q) }

// toZ maps a value of the series to internal units; diffToZ a difference.
func (t scaling) toZ(y float64) float64     { return (y/t.s0 - t.c) / t.d }
func (t scaling) diffToZ(v float64) float64 { return v / t.s0 / t.d }

// logScale is log(s0·d): the log-likelihood of y is that of z minus
// n·logScale.
func (t scaling) logScale() float64 { return math.Log(t.s0) + math.Log(t.d) }
