package accuracy

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/almanac-go/almanac"
)

// DefaultTotalPaths is the number of sample paths a backtest draws for
// the band of a horizon total when Backtest.Paths is 0.
const DefaultTotalPaths = 1000

// TotalSource says how the band of a horizon total was made.
// Programs should not rely on the numeric values.
type TotalSource int

const (
	// TotalNoBand: no band — no levels were asked, the origin was not
	// done, or the forecast has no distribution.
	TotalNoBand TotalSource = iota
	// TotalFromPaths: quantiles of the totals of the sample paths the
	// forecast holds (Forecast.SamplePaths).
	TotalFromPaths
	// TotalFromSimulation: quantiles of the totals of Backtest.Paths
	// paths drawn by the fitted model's Simulate (almanac.Simulator).
	TotalFromSimulation
	// TotalFromStepBands: the sum of the steps' bounds at the same level,
	// used when the model gives no paths. It is the band of the total
	// when the forecast errors of the steps are perfectly correlated
	// (comonotone); for normal errors it is the widest band the steps'
	// own bands allow, so its coverage overstates what paths would give.
	TotalFromStepBands
)

// String returns "none", "forecast paths", "simulated paths" or "sum of
// step bounds", and TotalSource(n) otherwise.
func (s TotalSource) String() string {
	switch s {
	case TotalNoBand:
		return "none"
	case TotalFromPaths:
		return "forecast paths"
	case TotalFromSimulation:
		return "simulated paths"
	case TotalFromStepBands:
		return "sum of step bounds"
	}
	return fmt.Sprintf("TotalSource(%d)", int(s))
}

// HorizonTotal is the forecast, made at one origin, of the total over the
// horizon — the sum of the Horizon values after the origin, such as the
// year's total of a monthly plan.
type HorizonTotal struct {
	// Actual is the sum of the Horizon actual values; NaN when one is
	// missing.
	Actual float64
	// Point is the sum of the point forecasts; NaN when the origin was
	// not done.
	Point float64
	// Lower and Upper hold the band of the total at each level of the
	// backtest, in order; NaN where there is none.
	Lower, Upper []float64
	// Source says how the band was made.
	Source TotalSource
}

// TotalScores scores the forecasts of the horizon totals of one
// candidate over the origins it completed whose actual values are all
// observed.
type TotalScores struct {
	// N is the number of origins scored.
	N int
	// ME and MAE are the mean error and mean absolute error of the total
	// (actual − point), in data units.
	ME, MAE float64
	// MASE is the mean of |error| divided by Horizon times the origin's
	// naive in-sample scale (Origin.Scale): the total's error per step,
	// scaled as MASE scales one step's (NaN when an origin has no scale).
	MASE float64
	// Intervals holds, per level, the coverage of the totals' bands, the
	// mean interval (Winkler) score in data units, and MSIS scaled by
	// Horizon times the origin's naive scale, as MASE is. Coverage is NaN
	// when no origin has a band at that level.
	Intervals []IntervalScores
}

// Interval returns the scores at level and whether it was requested.
func (s TotalScores) Interval(level float64) (IntervalScores, bool) {
	for _, iv := range s.Intervals {
		if iv.Level == level {
			return iv, true
		}
	}
	return IntervalScores{}, false
}

// totalBand is the band of the total computed by a worker.
type totalBand struct {
	lower, upper []float64
	source       TotalSource
}

// pathSeed is the seed of the paths simulated for candidate ci at origin
// oi: it depends on neither the series' place in a batch nor the worker,
// so Run and RunBatch agree and results do not depend on scheduling.
func pathSeed(ci, oi int) (uint64, uint64) {
	return uint64(ci)<<32 | uint64(uint32(oi)), 0x2545f4914f6cdd1d
}

// bandOfTotal makes the band of the total over the forecast's steps at
// each level: from the forecast's own paths, else from paths simulated by
// fit, else from the sum of the step bounds.
func bandOfTotal(fit almanac.Fitted, fc almanac.Forecast, levels []float64, n, ci, oi int) totalBand {
	if len(levels) == 0 {
		return totalBand{}
	}
	h := len(fc.Mean)
	if paths := fc.SamplePaths(); paths != nil {
		if tb, ok := pathBand(paths, h, levels); ok {
			tb.source = TotalFromPaths
			return tb
		}
	}
	if sim, ok := fit.(almanac.Simulator); ok {
		s1, s2 := pathSeed(ci, oi)
		if paths, err := simulate(sim, h, n, rand.NewPCG(s1, s2)); err == nil {
			if tb, ok := pathBand(paths, h, levels); ok {
				tb.source = TotalFromSimulation
				return tb
			}
		}
	}
	tb := totalBand{lower: make([]float64, len(levels)), upper: make([]float64, len(levels)), source: TotalFromStepBands}
	for k, level := range levels {
		for s := range h {
			lo, hi := boundsAt(fc, level, s)
			tb.lower[k] += lo
			tb.upper[k] += hi
		}
		if math.IsNaN(tb.lower[k]) || math.IsNaN(tb.upper[k]) || math.IsInf(tb.lower[k], 0) || math.IsInf(tb.upper[k], 0) {
			return totalBand{}
		}
	}
	return tb
}

// simulate calls sim.Simulate, turning a panic into an error.
func simulate(sim almanac.Simulator, h, n int, src rand.Source) (paths [][]float64, err error) {
	defer func() {
		if v := recover(); v != nil {
			paths, err = nil, fmt.Errorf("%w: simulation panicked: %v", almanac.ErrNotFitted, v)
		}
	}()
	return sim.Simulate(h, n, src)
}

// pathBand returns the central bands of the totals of the first h steps
// of paths (type 7 quantiles, as almanac.Sample uses), leaving out paths
// with a NaN or infinite value; false when fewer than two are left.
func pathBand(paths [][]float64, h int, levels []float64) (totalBand, bool) {
	tots := make([]float64, 0, len(paths))
	for _, p := range paths {
		if len(p) < h {
			return totalBand{}, false
		}
		t := 0.0
		for _, v := range p[:h] {
			t += v
		}
		if !math.IsNaN(t) && !math.IsInf(t, 0) {
			tots = append(tots, t)
		}
	}
	if len(tots) < 2 {
		return totalBand{}, false
	}
	slices.Sort(tots)
	tb := totalBand{lower: make([]float64, len(levels)), upper: make([]float64, len(levels))}
	for k, l := range levels {
		tb.lower[k] = quantile7(tots, (1-l/100)/2)
		tb.upper[k] = quantile7(tots, (1+l/100)/2)
	}
	return tb, true
}

// quantile7 is the p-quantile of sorted xs by linear interpolation
// between order statistics (type 7 of Hyndman & Fan 1996).
func quantile7(xs []float64, p float64) float64 {
	pos := p * float64(len(xs)-1)
	i := int(math.Floor(pos))
	if i >= len(xs)-1 {
		return xs[len(xs)-1]
	}
	return xs[i] + (pos-float64(i))*(xs[i+1]-xs[i])
}

// horizonTotal assembles the HorizonTotal of one origin from its actual
// values, point forecasts (nil when not done) and band.
func (tb totalBand) horizonTotal(actual, mean []float64, levels []float64) HorizonTotal {
	t := HorizonTotal{Actual: 0, Point: math.NaN(), Lower: make([]float64, len(levels)), Upper: make([]float64, len(levels)), Source: tb.source}
	for _, a := range actual {
		t.Actual += a
	}
	if mean != nil {
		t.Point = 0
		for _, f := range mean {
			t.Point += f
		}
	}
	for k := range levels {
		t.Lower[k], t.Upper[k] = math.NaN(), math.NaN()
		if tb.source != TotalNoBand {
			t.Lower[k], t.Upper[k] = tb.lower[k], tb.upper[k]
		}
	}
	return t
}

// scoreTotals scores the totals of the origins with a point forecast and
// every actual value observed.
func scoreTotals(totals []HorizonTotal, origins []Origin, h int, levels []float64) TotalScores {
	nan := math.NaN()
	s := TotalScores{ME: nan, MAE: nan, MASE: nan}
	var sumE, sumAbs, sumScaled float64
	scaleOK := true
	for o, t := range totals {
		if math.IsNaN(t.Actual) || math.IsNaN(t.Point) {
			continue
		}
		s.N++
		e := t.Actual - t.Point
		sumE += e
		sumAbs += math.Abs(e)
		if sc := origins[o].Scale; sc > 0 {
			sumScaled += math.Abs(e) / (float64(h) * sc)
		} else {
			scaleOK = false
		}
	}
	if s.N > 0 {
		n := float64(s.N)
		s.ME, s.MAE = sumE/n, sumAbs/n
		if scaleOK {
			s.MASE = sumScaled / n
		}
	}
	for k, level := range levels {
		iv := IntervalScores{Level: level, Coverage: nan, Score: nan, MSIS: nan}
		alpha := 1 - level/100
		var in, m int
		var sum, sumSc float64
		ok := true
		for o, t := range totals {
			if math.IsNaN(t.Actual) || math.IsNaN(t.Point) {
				continue
			}
			l, u := t.Lower[k], t.Upper[k]
			if math.IsNaN(l) || math.IsNaN(u) {
				ok = false
				continue
			}
			m++
			if t.Actual >= l && t.Actual <= u {
				in++
			}
			w := winkler(t.Actual, l, u, alpha)
			sum += w
			if sc := origins[o].Scale; sc > 0 {
				sumSc += w / (float64(h) * sc)
			} else {
				ok = false
			}
		}
		if m > 0 {
			iv.Coverage = float64(in) / float64(m)
			iv.Score = sum / float64(m)
			if ok {
				iv.MSIS = sumSc / float64(m)
			}
		}
		s.Intervals = append(s.Intervals, iv)
	}
	return s
}
