package accuracy

import (
	"math"

	"github.com/almanac-go/almanac/internal/scaling"
)

// SeriesCounts says over how many series each average of a
// BatchComparison was taken. A measure undefined on some series (MAPE on
// a series with a zero, MASE on a constant training window) is averaged
// over the others, and its count is smaller than Series.
type SeriesCounts struct {
	// Series is the number of series compared.
	Series int
	// One count per measure of Scores (TrackingSignal is not averaged).
	ME, MAE, MSE, RMSE, MAPE, SMAPE, MdAE, MASE, RMSSE, CRPS int
	// Intervals holds the counts of the interval scores, one per level.
	Intervals []IntervalCounts
	// AvgRelMAE is the number of series in the geometric mean of the
	// relative MAE.
	AvgRelMAE int
	// Total holds the counts of the horizon-total scores.
	Total TotalCounts
}

// IntervalCounts are the counts of the interval scores at one level.
type IntervalCounts struct {
	Level                 float64
	Coverage, Score, MSIS int
}

// TotalCounts are the counts of the averages of TotalScores.
type TotalCounts struct {
	ME, MAE, MASE int
	Intervals     []IntervalCounts
}

// meanOf accumulates an average over the values that are not NaN. The
// values are kept and summed, when the average is taken, on the values
// times a power of two that brings the largest magnitude near 2^256
// (internal/scaling): exact, so the average is bit for bit that of the
// plain sum on ordinary data, while scores near the float64 limit (MAEs
// of 1.5e308 on several series) give their average instead of +Inf. The
// average of finite values always fits in a float64; an infinite value
// (which the scores never hold) makes the average NaN, still counted.
type meanOf struct {
	vals []float64
	n    int
}

func (m *meanOf) add(v float64) {
	if !math.IsNaN(v) {
		m.vals = append(m.vals, v)
		m.n++
	}
}

func (m meanOf) value() float64 {
	if m.n == 0 || !scaling.Finite(m.vals) {
		return math.NaN()
	}
	k := scaling.Exponent(m.vals)
	f := scaling.Scale(nil, m.vals, k)
	sum := 0.0
	for _, v := range f {
		sum += v
	}
	// |sum/n| ≤ max |v| · 2^k ≤ 2^256: mapping back cannot overflow.
	return math.Ldexp(sum/float64(m.n), -k)
}

// averageScores averages scores over series, each measure over the series
// where it is defined; N is the total. TrackingSignal is NaN.
func averageScores(list []Scores) (Scores, SeriesCounts) {
	out := Scores{TrackingSignal: math.NaN()}
	cnt := SeriesCounts{Series: len(list)}
	var me, mae, mse, rmse, mape, smape, mdae, mase, rmsse, crps meanOf
	for _, s := range list {
		out.N += s.N
		me.add(s.ME)
		mae.add(s.MAE)
		mse.add(s.MSE)
		rmse.add(s.RMSE)
		mape.add(s.MAPE)
		smape.add(s.SMAPE)
		mdae.add(s.MdAE)
		mase.add(s.MASE)
		rmsse.add(s.RMSSE)
		crps.add(s.CRPS)
	}
	out.ME, cnt.ME = me.value(), me.n
	out.MAE, cnt.MAE = mae.value(), mae.n
	out.MSE, cnt.MSE = mse.value(), mse.n
	out.RMSE, cnt.RMSE = rmse.value(), rmse.n
	out.MAPE, cnt.MAPE = mape.value(), mape.n
	out.SMAPE, cnt.SMAPE = smape.value(), smape.n
	out.MdAE, cnt.MdAE = mdae.value(), mdae.n
	out.MASE, cnt.MASE = mase.value(), mase.n
	out.RMSSE, cnt.RMSSE = rmsse.value(), rmsse.n
	out.CRPS, cnt.CRPS = crps.value(), crps.n
	if len(list) > 0 {
		out.Intervals, cnt.Intervals = averageIntervals(len(list[0].Intervals), func(i int) []IntervalScores { return list[i].Intervals }, len(list))
	}
	return out, cnt
}

// averageIntervals averages k levels of interval scores over n series,
// each score over the series where it is defined.
func averageIntervals(k int, get func(i int) []IntervalScores, n int) ([]IntervalScores, []IntervalCounts) {
	out := make([]IntervalScores, k)
	cnt := make([]IntervalCounts, k)
	for j := range k {
		var cov, score, msis meanOf
		level := math.NaN()
		for i := range n {
			ivs := get(i)
			if j >= len(ivs) {
				continue
			}
			level = ivs[j].Level
			cov.add(ivs[j].Coverage)
			score.add(ivs[j].Score)
			msis.add(ivs[j].MSIS)
		}
		out[j] = IntervalScores{Level: level, Coverage: cov.value(), Score: score.value(), MSIS: msis.value()}
		cnt[j] = IntervalCounts{Level: level, Coverage: cov.n, Score: score.n, MSIS: msis.n}
	}
	return out, cnt
}

// averageTotals averages horizon-total scores over series as
// averageScores does.
func averageTotals(list []TotalScores) (TotalScores, TotalCounts) {
	var out TotalScores
	var cnt TotalCounts
	var me, mae, mase meanOf
	for _, s := range list {
		out.N += s.N
		me.add(s.ME)
		mae.add(s.MAE)
		mase.add(s.MASE)
	}
	out.ME, cnt.ME = me.value(), me.n
	out.MAE, cnt.MAE = mae.value(), mae.n
	out.MASE, cnt.MASE = mase.value(), mase.n
	if len(list) > 0 {
		out.Intervals, cnt.Intervals = averageIntervals(len(list[0].Intervals), func(i int) []IntervalScores { return list[i].Intervals }, len(list))
	}
	return out, cnt
}
