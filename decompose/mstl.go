package decompose

import (
	"fmt"
	"math"
	"slices"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
	"github.com/almanac-go/almanac/internal/stl"
)

// DefaultIterations is the number of MSTL sweeps over the periods when
// MSTL.Iterations is zero (Bandara, Hyndman & Bergmeir 2021).
const DefaultIterations = 2

// MSTL decomposes a series with several seasonal periods (e.g. 24 and 168
// for hourly data, 7 and 365 for daily data) by the algorithm of Bandara,
// Hyndman & Bergmeir (2021): the periods are sorted ascending; starting
// from the data, each sweep takes each period in turn, adds its current
// seasonal component back to the deseasonalised series, runs STL with
// that period and subtracts the new seasonal component. After Iterations
// sweeps the trend is that of the last STL fit and the remainder is the
// deseasonalised series minus that trend.
//
// Non-integer periods (weekly data: 365.25/7 ≈ 52.18) are rounded to the
// nearest whole number of observations; periods that coincide after
// rounding are merged. A period with no more than two full cycles in the
// data cannot be estimated and is left out, as in the paper; the periods
// used are in Decomposition.Periods. For a long non-integer cycle the
// alternative is regression on Fourier terms of the exact period
// (calendar.Fourier) within a model that takes regressors.
//
// The zero value uses the periods of the series frequency
// (Series.Freq.SeasonalPeriods) and seasonal spans 7 + 4·i for the i-th
// period (i = 1, 2, ...: 11, 15, ...), the defaults of the paper.
//
// Example:
//
//	d, err := decompose.MSTL{Periods: []float64{24, 168}}.Decompose(y)
//
// An MSTL value is a specification, safe for concurrent use.
type MSTL struct {
	// Periods in observations (need not be whole numbers); nil means the
	// seasonal periods of the series frequency.
	Periods []float64
	// SeasonalWindows gives the STL seasonal span for each period in
	// ascending order of period; nil means 7 + 4·i for the i-th.
	SeasonalWindows []int
	// Iterations is the number of sweeps over the periods; 0 means
	// DefaultIterations.
	Iterations int
	// Robust runs each STL with robustness passes.
	Robust bool
}

var _ Method = MSTL{}

// Decompose splits y into a trend, one seasonal component per period and
// a remainder, with y = trend + Σ seasonals + remainder.
//
// Special cases: missing values give an error wrapping almanac.ErrMissing
// (fill gaps with Repair.Fill first); no period (an explicit empty list,
// or a frequency without a seasonal cycle), a period below 2 or a
// non-finite period give one wrapping ErrPeriod; when no period has more
// than two full cycles of data, one wrapping almanac.ErrTooShort;
// SeasonalWindows of the wrong length or a negative Iterations one
// wrapping ErrWindow.
func (m MSTL) Decompose(y almanac.Series) (*Decomposition, error) {
	if err := checkComplete(y, "MSTL"); err != nil {
		return nil, err
	}
	if m.Iterations < 0 {
		return nil, fmt.Errorf("decompose: mstl: %w: iterations %d", ErrWindow, m.Iterations)
	}
	raw := m.Periods
	if raw == nil {
		raw = y.Freq.SeasonalPeriods()
	}
	if len(raw) == 0 {
		return nil, fmt.Errorf("decompose: mstl: %w: no seasonal period (frequency %v)", ErrPeriod, y.Freq)
	}
	var periods []int
	for _, p := range raw {
		if math.IsNaN(p) || math.IsInf(p, 0) || math.Round(p) < 2 {
			return nil, fmt.Errorf("decompose: mstl: %w: period %v", ErrPeriod, p)
		}
		// A period beyond maxParam has no two full cycles in any series
		// and is left out below; bounding it keeps the conversion to int
		// (and 2·period) from wrapping around.
		periods = append(periods, int(math.Min(math.Round(p), maxParam)))
	}
	slices.Sort(periods)
	periods = slices.Compact(periods)
	if m.SeasonalWindows != nil && len(m.SeasonalWindows) != len(periods) {
		return nil, fmt.Errorf("decompose: mstl: %w: %d seasonal windows for %d distinct periods %v", ErrWindow, len(m.SeasonalWindows), len(periods), periods)
	}
	n := y.Len()
	var specs []STL
	var used []int
	for i, p := range periods {
		if n <= 2*p {
			continue
		}
		sw := 7 + 4*(i+1)
		if m.SeasonalWindows != nil {
			sw = m.SeasonalWindows[i]
		}
		specs = append(specs, STL{Period: p, SeasonalWindow: sw, Robust: m.Robust})
		used = append(used, p)
	}
	if len(used) == 0 {
		return nil, fmt.Errorf("decompose: mstl: %w: %d observations, no period in %v has more than two full cycles", almanac.ErrTooShort, n, raw)
	}
	iters := m.Iterations
	if iters == 0 {
		iters = DefaultIterations
	}
	params := make([]stl.Params, len(specs))
	settings := make([]STL, len(specs))
	for i, s := range specs {
		p, u, err := s.params(n, y.Period())
		if err != nil {
			return nil, err
		}
		params[i], settings[i] = p, u
	}
	// The sweeps run on the data times 2^k (largest magnitude near
	// 2^256), so the additions between the STL runs cannot overflow; the
	// components are scaled back at the end (exact for powers of two).
	k := scaling.Exponent(y.Values)
	deseas := scaling.Scale(nil, y.Values, k)
	seas := make([][]float64, len(used))
	for i := range seas {
		seas[i] = make([]float64, n)
	}
	trend := make([]float64, n)
	weights := make([]float64, n)
	rem := make([]float64, n)
	var ws stl.Workspace
	for range iters {
		for i := range used {
			for t := range deseas {
				deseas[t] += seas[i][t]
			}
			if err := ws.DecomposeTo(seas[i], trend, rem, weights, deseas, params[i]); err != nil {
				return nil, stlError(err)
			}
			for t := range deseas {
				deseas[t] -= seas[i][t]
			}
		}
	}
	total := make([]float64, n)
	for t := range total {
		for i := range seas {
			total[t] += seas[i][t]
		}
		rem[t] = deseas[t] - trend[t]
	}
	for _, c := range append([][]float64{total, trend, rem}, seas...) {
		scaling.Scale(c, c, -k)
	}
	return finish(&Decomposition{
		Series:    y.Clone(),
		Method:    "MSTL",
		Periods:   used,
		Trend:     trend,
		Seasonal:  total,
		Seasonals: seas,
		Remainder: rem,
		Weights:   weights,
		Settings:  settings,
	})
}
