package smoothing

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
)

var _ almanac.Refresher = (*Fitted)(nil)

// Refresh implements almanac.Refresher: it is Update, returned as an
// almanac.Fitted.
func (m *Fitted) Refresh(newValues []float64) (almanac.Fitted, error) {
	g, err := m.Update(newValues)
	if err != nil {
		return nil, err
	}
	return g, nil
}

// observed counts the values of z that are not NaN.
func observed(z []float64) int {
	n := 0
	for _, v := range z {
		if !math.IsNaN(v) {
			n++
		}
	}
	return n
}

// extend is Update: m with newY appended, the filter run on from the
// final states (runGaps), and the statistics recomputed over the whole
// series in observation order, so that one Update of k values and k
// Updates of one value give the same model.
func (m *Fitted) extend(newY []float64) (*Fitted, error) {
	if err := m.usable(); err != nil {
		return nil, err
	}
	all := almanac.Series{Key: m.series.Key, Start: m.series.Start, Freq: m.series.Freq,
		Values: append(slices.Clone(m.series.Values), newY...)}
	if err := all.Validate(); err != nil {
		return nil, fmt.Errorf("smoothing: %v: %w", m, err)
	}
	if m.spec.multiplicativeParts() {
		for i, v := range newY {
			if v <= 0 {
				return nil, fmt.Errorf("smoothing: %v has multiplicative components and needs positive data: %w", m,
					&almanac.SeriesError{Key: all.Key, Index: m.series.Len() + i, Err: almanac.ErrNonPositive})
			}
		}
	}
	n0, k := m.series.Len(), len(newY)
	newZ := make([]float64, k)
	for i, v := range newY {
		newZ[i] = m.tf.toZ(v) // NaN stays NaN
	}
	out := &Fitted{
		Params: m.Params, InitLevel: m.InitLevel, InitTrend: m.InitTrend, InitSeason: slices.Clone(m.InitSeason),
		DF: m.DF, Converged: m.Converged, spec: m.spec, f: m.f, series: all, free: m.free, nfit: m.nfit,
		tf: m.tf, z: append(slices.Clone(m.z), newZ...),
		fitted: append(slices.Clone(m.fitted), make([]float64, k)...),
		resid:  append(slices.Clone(m.resid), make([]float64, k)...),
		level:  append(slices.Clone(m.level), make([]float64, k)...),
		ring:   slices.Clone(m.ring),
	}
	tr := &trace{fitted: out.fitted[n0:], resid: out.resid[n0:], level: out.level[n0+1:]}
	if m.trend != nil {
		out.trend = append(slices.Clone(m.trend), make([]float64, k)...)
		tr.trend = out.trend[n0+1:]
	}
	if m.seas != nil {
		out.seas = append(slices.Clone(m.seas), make([]float64, k)...)
		tr.season = out.seas[n0+m.f.m:]
	}
	lEnd, bEnd, ok := m.f.runGaps(newZ, m.Params, m.lEnd, m.bEnd, out.ring, n0%m.f.m, tr)
	if !ok {
		return nil, fmt.Errorf("smoothing: %v: %w: the recursion leaves the model's domain on the new data", m, almanac.ErrNotFitted)
	}
	out.lEnd, out.bEnd = lEnd, bEnd
	if observed(out.z) == 0 {
		return nil, fmt.Errorf("smoothing: %v: %w", m, almanac.ErrAllMissing)
	}
	sse := 0.0
	var logs logSum
	for i, e := range out.resid {
		if math.IsNaN(e) {
			continue
		}
		sse += float64(e * e)
		if m.f.err == MultiplicativeError {
			logs.push(out.fitted[i])
		}
	}
	if err := out.setStats(sse, logs.value()); err != nil {
		return nil, err
	}
	out.setCriteria()
	return out, nil
}

// runGaps is filter for a series with missing values (NaN): runs of
// observed values go through filter, and at a missing value the state
// takes its one-step prediction — the recursion with a zero innovation,
// the state-space convention for a missing observation (Hyndman, Koehler,
// Ord & Snyder 2008, common practice) — with the prediction as fitted
// value and NaN as residual. tr's slices, when not nil, have len(y)
// elements (trend and season as in filter). It returns the final level
// and trend, and ok = false when the states leave the model's domain.
func (f form) runGaps(y []float64, p Params, l, b float64, s []float64, start int, tr *trace) (lEnd, bEnd float64, ok bool) {
	sub := func(v []float64, i, j int) []float64 {
		if v == nil {
			return nil
		}
		return v[i:j]
	}
	j := start
	for i := 0; i < len(y); {
		if !math.IsNaN(y[i]) {
			e := i
			for e < len(y) && !math.IsNaN(y[e]) {
				e++
			}
			var part *trace
			if tr != nil {
				part = &trace{fitted: sub(tr.fitted, i, e), resid: sub(tr.resid, i, e), level: sub(tr.level, i, e),
					trend: sub(tr.trend, i, e), season: sub(tr.season, i, e)}
			}
			if _, _, l, b, ok = f.filter(y[i:e], p, l, b, s, j, part); !ok {
				return l, b, false
			}
			j = (j + e - i) % f.m
			i = e
			continue
		}
		// A missing value: the prediction becomes the state.
		var L float64
		switch f.trend {
		case NoTrend:
			L = l
		case AdditiveTrend:
			L = l + b
		case DampedTrend:
			L = l + p.Phi*b
			b = p.Phi * b
		case MultiplicativeTrend:
			L = l * b
		case DampedMultiplicativeTrend:
			b = math.Pow(b, p.Phi)
			L = l * b
		}
		yhat := L
		switch f.season {
		case AdditiveSeason:
			yhat = L + s[j]
		case MultiplicativeSeason:
			yhat = L * s[j]
		}
		l = L
		if math.IsNaN(l) || math.IsInf(l, 0) || math.IsNaN(b) || math.IsInf(b, 0) || (f.err == MultiplicativeError && !(yhat > 0)) {
			return l, b, false
		}
		if tr != nil {
			if tr.fitted != nil {
				tr.fitted[i] = yhat
			}
			if tr.resid != nil {
				tr.resid[i] = math.NaN()
			}
			if tr.level != nil {
				tr.level[i] = l
			}
			if tr.trend != nil {
				tr.trend[i] = b
			}
			if tr.season != nil {
				tr.season[i] = s[j]
			}
		}
		if j++; j == f.m {
			j = 0
		}
		i++
	}
	return l, b, true
}
