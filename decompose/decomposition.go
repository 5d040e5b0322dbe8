package decompose

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
)

// Method is a decomposition method: STL, MSTL or Classical, or a
// caller's own. Forecaster uses one to split off the seasonal part.
type Method interface {
	Decompose(y almanac.Series) (*Decomposition, error)
}

// Decomposition is a series split into trend, seasonal and remainder:
// y = Trend + Seasonal + Remainder, or y = Trend · Seasonal · Remainder
// when Multiplicative. It is read-only once returned.
type Decomposition struct {
	// Series is a copy of the data that was decomposed.
	Series almanac.Series
	// Method names the method: "STL", "MSTL" or "Classical".
	Method string
	// Multiplicative is true for a multiplicative classical
	// decomposition.
	Multiplicative bool
	// Periods are the seasonal periods, ascending, one per entry of
	// Seasonals.
	Periods []int
	// Trend is the trend-cycle component. A classical decomposition has
	// NaN for the first and last floor(period/2) observations.
	Trend []float64
	// Seasonal is the whole seasonal component: the sum (product when
	// Multiplicative) of Seasonals.
	Seasonal []float64
	// Seasonals holds one seasonal component per period.
	Seasonals [][]float64
	// Remainder is what is left: y − Trend − Seasonal (y / Trend /
	// Seasonal when Multiplicative); NaN where Trend is.
	Remainder []float64
	// Weights are STL's robustness weights in [0, 1] (all 1 for a
	// non-robust fit; from the last STL run in MSTL); nil for Classical.
	Weights []float64
	// Figure is the classical seasonal figure (one value per position in
	// the cycle, counted from the first observation); nil otherwise.
	Figure []float64
	// Settings are the STL settings actually used, all fields resolved,
	// one per period (STL and MSTL); nil for Classical.
	Settings []STL
}

// Adjusted returns the seasonally adjusted series, y − Seasonal (y /
// Seasonal when Multiplicative), as a new Series with the same key,
// start and frequency.
func (d *Decomposition) Adjusted() almanac.Series {
	out := d.Series.Clone()
	for i := range out.Values {
		if d.Multiplicative {
			out.Values[i] /= d.Seasonal[i]
		} else {
			out.Values[i] -= d.Seasonal[i]
		}
	}
	return out
}

// Strength holds the strength of trend and seasonality of a
// decomposition, each in [0, 1] (Wang, Smith & Hyndman 2006):
//
//	F_T = max(0, 1 − Var(R) / Var(T + R)),
//	F_S = max(0, 1 − Var(R) / Var(S + R)),
//
// with sample variances over the observations where every component is
// defined. For a multiplicative decomposition the formulas are applied to
// the logarithms of the components (log y = log T + log S + log R).
type Strength struct {
	Trend float64
	// Seasonal has one entry per period of the decomposition, in the
	// order of Decomposition.Periods.
	Seasonal []float64
}

// Strength returns the strength of trend and of each seasonal
// component. It returns an error wrapping almanac.ErrTooShort when fewer
// than two observations have every component defined, and one wrapping
// almanac.ErrNonPositive when a multiplicative decomposition has a
// component ≤ 0.
func (d *Decomposition) Strength() (Strength, error) {
	n := len(d.Remainder)
	tr := make([]float64, n)
	rem := make([]float64, n)
	seas := make([][]float64, len(d.Seasonals))
	for k := range seas {
		seas[k] = make([]float64, n)
	}
	idx := make([]int, 0, n)
	for i := 0; i < n; i++ {
		t, r := d.Trend[i], d.Remainder[i]
		if math.IsNaN(t) || math.IsNaN(r) {
			continue
		}
		if d.Multiplicative {
			if t <= 0 || r <= 0 {
				return Strength{}, fmt.Errorf("decompose: strength: %w: multiplicative component at index %d", almanac.ErrNonPositive, i)
			}
			t, r = math.Log(t), math.Log(r)
		}
		for k, s := range d.Seasonals {
			v := s[i]
			if d.Multiplicative {
				if v <= 0 {
					return Strength{}, fmt.Errorf("decompose: strength: %w: seasonal factor at index %d", almanac.ErrNonPositive, i)
				}
				v = math.Log(v)
			}
			seas[k][len(idx)] = v
		}
		tr[len(idx)], rem[len(idx)] = t, r
		idx = append(idx, i)
	}
	m := len(idx)
	if m < 2 {
		return Strength{}, fmt.Errorf("decompose: strength: %w: %d observations with all components defined", almanac.ErrTooShort, m)
	}
	tr, rem = tr[:m], rem[:m]
	// Variances of components near the float64 limit would overflow; the
	// ratios do not depend on a common scale, so take them on the
	// components times a power of two (exact).
	k := scaling.Exponent(append([][]float64{tr, rem}, seas...)...)
	for _, c := range append([][]float64{tr, rem}, seas...) {
		scaling.Scale(c, c, k)
	}
	vr := variance(rem, nil)
	out := Strength{Trend: strength(vr, variance(tr, rem)), Seasonal: make([]float64, len(seas))}
	for k := range seas {
		out.Seasonal[k] = strength(vr, variance(seas[k][:m], rem))
	}
	return out, nil
}

func strength(vr, vx float64) float64 {
	if vx == 0 {
		return 0
	}
	return math.Max(0, 1-vr/vx)
}

// variance returns the sample variance (denominator m − 1) of a + b
// (of a alone when b is nil), by the two-pass formula.
func variance(a, b []float64) float64 {
	at := func(i int) float64 {
		if b == nil {
			return a[i]
		}
		return a[i] + b[i]
	}
	mean := 0.0
	for i := range a {
		mean += at(i)
	}
	mean /= float64(len(a))
	ss := 0.0
	for i := range a {
		d := at(i) - mean
		ss += d * d
	}
	return ss / float64(len(a)-1)
}
