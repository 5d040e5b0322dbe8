package accuracy

import (
	"math"

	"github.com/almanac-go/almanac/internal/scaling"
)

// Scores summarises the forecasts of one model over a set of (origin,
// step) cells of a backtest: all cells, or those of one horizon step.
// Each field follows the function of the same name; a measure that is
// undefined on the cells (see the package documentation, "Undefined
// values") is NaN, never a silent number, and the other measures are kept.
// The sums are taken on the values times a power of two (exact), so data
// near the float64 limit give their representable scores; a score that
// does not fit in a float64 at all (an MSE of errors above 1e154) is NaN
// too, never ±Inf.
//
// MASE, RMSSE and MSIS scale each cell's error by the naive (or seasonal
// naive) in-sample scale of its own origin's training window, then
// average: MASE = mean(|e| / MAE-scale), RMSSE = √mean(e² / MSE-scale),
// MSIS = mean(interval score / MAE-scale), the usual rolling-origin form
// of Hyndman & Koehler (2006). When an origin's training window has no
// defined scale (too short, or constant) these three are NaN.
type Scores struct {
	// N is the number of cells with both an actual value and a forecast.
	N int

	ME, MAE, MSE, RMSE, MAPE, SMAPE, MdAE float64
	MASE, RMSSE                           float64
	TrackingSignal                        float64
	// CRPS is the mean continuous ranked probability score: exact for a
	// normal (almanac.Normal) or sample-path (almanac.Sample) forecast
	// distribution, NaN when a forecast carries another distribution or
	// none.
	CRPS float64
	// Intervals holds one entry per requested level, in order.
	Intervals []IntervalScores
}

// IntervalScores scores the central prediction intervals at one level.
type IntervalScores struct {
	Level    float64 // percentage in (0, 100)
	Coverage float64 // fraction of actual values inside the interval
	Score    float64 // mean interval (Winkler) score, data units
	MSIS     float64 // mean scaled interval score
}

// Interval returns the scores at level and whether it was requested.
func (s Scores) Interval(level float64) (IntervalScores, bool) {
	for _, iv := range s.Intervals {
		if iv.Level == level {
			return iv, true
		}
	}
	return IntervalScores{}, false
}

// Ratios are a model's scores divided by the baseline model's scores on
// the same cells: below 1 the model did better than the baseline. A ratio
// whose denominator is 0 or NaN is NaN.
type Ratios struct {
	MAE, RMSE, MdAE, SMAPE, MASE, RMSSE, CRPS float64
}

func ratio(a, b float64) float64 {
	if b == 0 || math.IsNaN(b) || math.IsNaN(a) {
		return math.NaN()
	}
	return a / b
}

// RelativeTo returns s divided by base, measure by measure.
func (s Scores) RelativeTo(base Scores) Ratios {
	return Ratios{
		MAE:   ratio(s.MAE, base.MAE),
		RMSE:  ratio(s.RMSE, base.RMSE),
		MdAE:  ratio(s.MdAE, base.MdAE),
		SMAPE: ratio(s.SMAPE, base.SMAPE),
		MASE:  ratio(s.MASE, base.MASE),
		RMSSE: ratio(s.RMSSE, base.RMSSE),
		CRPS:  ratio(s.CRPS, base.CRPS),
	}
}

// cells holds a model's per-(origin, step) inputs to the scores, each
// slice indexed origin*H + step.
type cells struct {
	h        int
	actual   []float64
	mean     []float64
	scale    []float64 // naive in-sample MAE scale of the cell's origin
	scaleSq  []float64 // naive in-sample MSE scale of the cell's origin
	crps     []float64
	lower    [][]float64 // [level][cell]
	upper    [][]float64
	levels   []float64
	absWork  []float64
	selected []int
}

// summarize computes the Scores of the cells whose index is in idx.
func (c *cells) summarize(idx []int) Scores {
	s := Scores{N: 0}
	// The sums run on the values times 2^k, with k chosen from the
	// largest magnitude among the cells (internal/scaling): exact, so the
	// scores are those of the plain sums on ordinary data, and values near
	// the float64 limit do not overflow.
	big := 0.0
	for _, i := range idx {
		for _, v := range [2]float64{c.actual[i], c.mean[i]} {
			if a := math.Abs(v); a > big && !math.IsInf(a, 0) {
				big = a
			}
		}
		for k := range c.levels {
			for _, v := range [2]float64{c.lower[k][i], c.upper[k][i]} {
				if a := math.Abs(v); a > big && !math.IsInf(a, 0) {
					big = a
				}
			}
		}
	}
	k := scaling.ExponentOfMax(big)
	var sumE, sumAbs, sumSq, sumPct, sumSym, sumScaled, sumScaledSq, sumCRPS float64
	mapeOK, smapeOK, scaleOK, crpsOK := true, true, true, true
	abs := c.absWork[:0]
	for _, i := range idx {
		a, f := c.actual[i], c.mean[i]
		if !observed(a, f) {
			continue
		}
		s.N++
		e := math.Ldexp(a, k) - math.Ldexp(f, k)
		ae := math.Abs(e)
		sumE += e
		sumAbs += ae
		sumSq += e * e
		abs = append(abs, ae)
		if a == 0 {
			mapeOK = false
		} else {
			sumPct += pctTerm(a, f)
		}
		if v, ok := symTerm(a, f); ok {
			sumSym += v
		} else {
			smapeOK = false
		}
		if sc, sq := c.scale[i], c.scaleSq[i]; sc > 0 && sq > 0 {
			sumScaled += scaledRatio(ae, k, sc)
			if u := math.Ldexp(ae, -k); !math.IsInf(u*u, 0) {
				sumScaledSq += u * u / sq
			} else {
				q := scaledRatio(ae, k, math.Sqrt(sq))
				sumScaledSq += q * q
			}
		} else {
			scaleOK = false
		}
		if v := c.crps[i]; math.IsNaN(v) {
			crpsOK = false
		} else {
			sumCRPS += v
		}
	}
	c.absWork = abs
	nan := math.NaN()
	s.ME, s.MAE, s.MSE, s.RMSE, s.MAPE, s.SMAPE, s.MdAE = nan, nan, nan, nan, nan, nan, nan
	s.MASE, s.RMSSE, s.TrackingSignal, s.CRPS = nan, nan, nan, nan
	if s.N > 0 {
		n := float64(s.N)
		s.ME = math.Ldexp(sumE/n, -k)
		s.MAE = math.Ldexp(sumAbs/n, -k)
		s.MSE = math.Ldexp(sumSq/n, -2*k)
		s.RMSE = math.Ldexp(math.Sqrt(sumSq/n), -k)
		s.MdAE = math.Ldexp(median(abs), -k)
		if mapeOK {
			s.MAPE = 100 * sumPct / n
		}
		if smapeOK {
			s.SMAPE = 100 * sumSym / n
		}
		if scaleOK {
			s.MASE = sumScaled / n
			s.RMSSE = math.Sqrt(sumScaledSq / n)
		}
		if sumAbs > 0 {
			s.TrackingSignal = sumE / (sumAbs / n)
		}
		if crpsOK {
			s.CRPS = sumCRPS / n
		}
	}
	for k2, level := range c.levels {
		iv := IntervalScores{Level: level, Coverage: nan, Score: nan, MSIS: nan}
		alpha := 1 - level/100
		var in, m int
		var sum, sumScaled float64
		ok := true
		for _, i := range idx {
			a, l, u := c.actual[i], c.lower[k2][i], c.upper[k2][i]
			if math.IsNaN(a) || math.IsNaN(c.mean[i]) {
				continue
			}
			if math.IsNaN(l) || math.IsNaN(u) {
				ok = false
				continue
			}
			m++
			if a >= l && a <= u {
				in++
			}
			w := winkler(math.Ldexp(a, k), math.Ldexp(l, k), math.Ldexp(u, k), alpha)
			sum += w
			if sc := c.scale[i]; sc > 0 {
				sumScaled += scaledRatio(w, k, sc)
			} else {
				ok = false
			}
		}
		if m > 0 {
			iv.Coverage = float64(in) / float64(m)
			iv.Score = math.Ldexp(sum/float64(m), -k)
			if ok {
				iv.MSIS = sumScaled / float64(m)
			}
		}
		iv.Score, iv.MSIS = finiteOrNaN(iv.Score), finiteOrNaN(iv.MSIS)
		s.Intervals = append(s.Intervals, iv)
	}
	for _, p := range []*float64{&s.ME, &s.MAE, &s.MSE, &s.RMSE, &s.MAPE, &s.SMAPE, &s.MdAE, &s.MASE, &s.RMSSE, &s.TrackingSignal, &s.CRPS} {
		*p = finiteOrNaN(*p)
	}
	return s
}

// scaledRatio returns (x·2^−k)/d for x given on the scale 2^k, without
// overflowing in between when x·2^−k alone is beyond the float64 range.
func scaledRatio(x float64, k int, d float64) float64 {
	if u := math.Ldexp(x, -k); !math.IsInf(u, 0) {
		return u / d
	}
	return math.Ldexp(x/d, -k)
}

// finiteOrNaN maps ±Inf (a score beyond the float64 range) to NaN.
func finiteOrNaN(v float64) float64 {
	if math.IsInf(v, 0) {
		return math.NaN()
	}
	return v
}

// byStep returns the scores of each horizon step and of all cells.
func (c *cells) byStep(origins int) (steps []Scores, all Scores) {
	idx := c.selected[:0]
	steps = make([]Scores, c.h)
	for h := range c.h {
		idx = idx[:0]
		for o := range origins {
			idx = append(idx, o*c.h+h)
		}
		steps[h] = c.summarize(idx)
	}
	idx = idx[:0]
	for i := range origins * c.h {
		idx = append(idx, i)
	}
	all = c.summarize(idx)
	c.selected = idx
	return steps, all
}
