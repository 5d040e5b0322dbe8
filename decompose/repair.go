package decompose

import (
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/scaling"
)

// Reason says why a value was replaced. The zero value is ReasonUnknown.
// Programs should not rely on the numeric values.
type Reason int

// Reasons for a Change.
const (
	ReasonUnknown Reason = iota
	Missing              // the value was NaN
	Disrupted            // the caller marked the value as disrupted
	Outlier              // Screen flagged the value
)

// String returns "missing", "disrupted" or "outlier", or "Reason(n)".
func (r Reason) String() string {
	switch r {
	case ReasonUnknown:
		return "unknown"
	case Missing:
		return "missing"
	case Disrupted:
		return "disrupted"
	case Outlier:
		return "outlier"
	}
	return fmt.Sprintf("Reason(%d)", int(r))
}

// Change records one replaced value.
type Change struct {
	Index  int       // 0-based observation index
	Time   time.Time // time of the observation
	Old    float64   // the value before (NaN when missing)
	New    float64   // the value after
	Reason Reason
}

// DefaultPasses is the number of decomposition passes of Repair when
// Repair.Passes is zero.
const DefaultPasses = 3

// Repair fills missing values, and values the caller marks as disrupted
// (a shutdown, a stock-out, a system failure), by a seasonal-aware
// interpolation built on a robust STL decomposition:
//
//  1. every value to fill is set aside and filled by linear interpolation
//     between its observed neighbours (the nearest observed value before
//     the first or after the last observation);
//  2. robust STL (15 robustness passes, so the provisional values carry
//     little weight) decomposes the filled series;
//  3. the seasonally adjusted series y − seasonal is interpolated linearly
//     across each gap from the observed adjusted values on either side
//     (held at the nearest observed adjusted value before the first and
//     after the last observation) and the seasonal component is added
//     back at the filled positions;
//  4. steps 2–3 are repeated Passes times.
//
// Observed values are never altered. With Period 1 (or a frequency
// without a seasonal cycle, such as yearly) the fill is the linear
// interpolation of step 1 alone.
//
// The zero value fills NaN with the period of the series frequency.
//
// Example:
//
//	filled, changes, err := decompose.Repair{Disrupted: []int{40, 41, 42}}.Fill(y)
//
// A Repair value is a specification, safe for concurrent use.
type Repair struct {
	// Period is the seasonal period in observations; 0 means y.Period(),
	// 1 means no seasonal component (linear interpolation).
	Period int
	// Disrupted are 0-based indices of observed values to replace as
	// if they were missing.
	Disrupted []int
	// SeasonalWindow is the STL seasonal span; 0 means
	// DefaultSeasonalWindow.
	SeasonalWindow int
	// Passes is the number of decomposition passes; 0 means
	// DefaultPasses.
	Passes int
}

// Fill returns a copy of y with every missing and disrupted value
// replaced, and one Change per replaced value in index order. A series
// with nothing to fill is returned as a copy with no changes.
//
// The fill is computed on the data times a power of two that brings the
// largest magnitude near 2^256, and scaled back (exact for powers of two):
// data near the float64 limit are filled like any other.
//
// Special cases: a Disrupted index outside [0, n) gives an error wrapping
// almanac.ErrInvalid; every value missing or disrupted one wrapping
// almanac.ErrAllMissing; a negative Period, SeasonalWindow or Passes one
// wrapping ErrPeriod or ErrWindow; with a seasonal period, n ≤ 2·period
// one wrapping almanac.ErrTooShort (use Period: 1 for a linear fill); a
// filled value beyond the float64 range one wrapping almanac.ErrNonFinite.
func (r Repair) Fill(y almanac.Series) (almanac.Series, []Change, error) {
	if err := y.Validate(); err != nil {
		return almanac.Series{}, nil, fmt.Errorf("decompose: repair: %w", err)
	}
	n := y.Len()
	gap := make([]bool, n)
	reason := make([]Reason, n)
	for i, v := range y.Values {
		if math.IsNaN(v) {
			gap[i], reason[i] = true, Missing
		}
	}
	for _, i := range r.Disrupted {
		if i < 0 || i >= n {
			return almanac.Series{}, nil, fmt.Errorf("decompose: repair: %w: disrupted index %d outside [0, %d)", almanac.ErrInvalid, i, n)
		}
		if !gap[i] {
			gap[i], reason[i] = true, Disrupted
		}
	}
	out, err := r.fillScaled(y, gap)
	if err != nil {
		return almanac.Series{}, nil, err
	}
	var changes []Change
	for i := range gap {
		if gap[i] {
			changes = append(changes, Change{Index: i, Time: y.Time(i), Old: y.Values[i], New: out.Values[i], Reason: reason[i]})
		}
	}
	return out, changes, nil
}

// fillScaled is fill on y times 2^k (largest magnitude near 2^256), with
// the result scaled back and checked.
func (r Repair) fillScaled(y almanac.Series, gap []bool) (almanac.Series, error) {
	k := scaling.Exponent(y.Values)
	ys := y.Clone()
	scaling.Scale(ys.Values, ys.Values, k)
	out, err := r.fill(ys, gap)
	if err != nil {
		return almanac.Series{}, err
	}
	scaling.Scale(out.Values, out.Values, -k)
	for i, v := range out.Values {
		if math.IsInf(v, 0) {
			return almanac.Series{}, fmt.Errorf("decompose: repair: %w: the filled value at index %d exceeds the float64 range", almanac.ErrNonFinite, i)
		}
	}
	return out, nil
}

// fill replaces the values where gap is true.
func (r Repair) fill(y almanac.Series, gap []bool) (almanac.Series, error) {
	if r.Period < 0 || r.SeasonalWindow < 0 || r.Passes < 0 {
		if r.Period < 0 {
			return almanac.Series{}, fmt.Errorf("decompose: repair: %w: period %d", ErrPeriod, r.Period)
		}
		return almanac.Series{}, fmt.Errorf("decompose: repair: %w: seasonal window %d, passes %d", ErrWindow, r.SeasonalWindow, r.Passes)
	}
	out := y.Clone()
	n := y.Len()
	if !slices.Contains(gap, true) {
		return out, nil
	}
	if !slices.Contains(gap, false) {
		return almanac.Series{}, fmt.Errorf("decompose: repair: %w: every value is missing or disrupted", almanac.ErrAllMissing)
	}
	period := r.Period
	if period == 0 {
		period = y.Period()
	}
	interpolate(out.Values, gap)
	if period < 2 {
		return out, nil
	}
	if period >= n-period { // n ≤ 2·period, written so that it cannot overflow
		return almanac.Series{}, fmt.Errorf("decompose: repair: %w: %d observations, a seasonal fill with period %d needs more than two full cycles (Period: 1 fills linearly)", almanac.ErrTooShort, n, period)
	}
	passes := r.Passes
	if passes == 0 {
		passes = DefaultPasses
	}
	spec := STL{Period: period, SeasonalWindow: r.SeasonalWindow, Robust: true}
	adj := make([]float64, n)
	for range passes {
		d, err := spec.Decompose(out)
		if err != nil {
			return almanac.Series{}, err
		}
		for i := range adj {
			adj[i] = out.Values[i] - d.Seasonal[i]
		}
		interpolate(adj, gap)
		for i := range gap {
			if gap[i] {
				out.Values[i] = adj[i] + d.Seasonal[i]
			}
		}
	}
	return out, nil
}

// interpolate overwrites x[i] where gap[i] by linear interpolation between
// the nearest non-gap values on either side, or by the nearest non-gap
// value beyond the ends. At least one value must not be a gap.
func interpolate(x []float64, gap []bool) {
	n := len(x)
	prev := -1
	for i := 0; i < n; i++ {
		if gap[i] {
			continue
		}
		if prev == -1 {
			for j := 0; j < i; j++ {
				x[j] = x[i]
			}
		} else if i-prev > 1 {
			a, b := x[prev], x[i]
			span := float64(i - prev)
			for j := prev + 1; j < i; j++ {
				x[j] = a + (b-a)*float64(j-prev)/span
			}
		}
		prev = i
	}
	for j := prev + 1; j < n; j++ {
		x[j] = x[prev]
	}
}

// DefaultFence is the outlier fence of Screen in interquartile ranges
// when Screen.K is zero.
const DefaultFence = 3

// Screen flags outliers: points whose STL remainder lies beyond K
// interquartile ranges outside the quartiles of the remainder (Tukey's
// fences, common practice; K = 3 marks "far out" values), and replaces
// them by the seasonal-aware interpolation of Repair. The decomposition
// is robust STL, so the outliers themselves barely move it. Missing
// values are filled first (and reported) so the screen can run.
// Quartiles are the type-7 sample quantiles (linear interpolation between
// order statistics, common practice). When the interquartile range of the
// remainder is zero to rounding (1e-9 of the median |value|), as for a
// constant or exactly periodic series, there is no scale to judge by and
// nothing is flagged.
//
// Example:
//
//	cleaned, changes, err := decompose.Screen{K: 3}.Apply(y)
//
// A Screen value is a specification, safe for concurrent use.
type Screen struct {
	// Period is the seasonal period in observations, ≥ 2; 0 means
	// y.Period().
	Period int
	// K is the width of the fences in interquartile ranges; 0 means
	// DefaultFence. Negative or NaN is invalid.
	K float64
	// SeasonalWindow is the STL seasonal span; 0 means
	// DefaultSeasonalWindow.
	SeasonalWindow int
}

// Apply returns a copy of y with missing values filled and outliers
// replaced, and one Change per replaced value in index order (Reason
// Missing or Outlier; Old is the flagged value, New its replacement).
//
// Like Repair, the screen is computed on the data times a power of two
// and scaled back, so data near the float64 limit are screened like any
// other.
//
// Special cases: K < 0 or NaN gives an error wrapping ErrWindow; a period
// below 2 one wrapping ErrPeriod; n ≤ 2·period one wrapping
// almanac.ErrTooShort; a replacement beyond the float64 range one
// wrapping almanac.ErrNonFinite.
func (s Screen) Apply(y almanac.Series) (almanac.Series, []Change, error) {
	if !(s.K >= 0) || math.IsInf(s.K, 0) {
		return almanac.Series{}, nil, fmt.Errorf("decompose: screen: %w: fence %v", ErrWindow, s.K)
	}
	k := s.K
	if k == 0 {
		k = DefaultFence
	}
	if err := y.Validate(); err != nil {
		return almanac.Series{}, nil, fmt.Errorf("decompose: screen: %w", err)
	}
	period := s.Period
	if period == 0 {
		period = y.Period()
	}
	if period < 2 {
		return almanac.Series{}, nil, fmt.Errorf("decompose: screen: %w: period %d", ErrPeriod, period)
	}
	e := scaling.Exponent(y.Values)
	orig := y
	y = y.Clone()
	scaling.Scale(y.Values, y.Values, e)
	out, changes, err := s.apply(y, period, k)
	if err != nil {
		return almanac.Series{}, nil, err
	}
	scaling.Scale(out.Values, out.Values, -e)
	for i := range changes {
		c := &changes[i]
		c.Old, c.New = orig.Values[c.Index], out.Values[c.Index]
		if math.IsInf(c.New, 0) {
			return almanac.Series{}, nil, fmt.Errorf("decompose: screen: %w: the replacement at index %d exceeds the float64 range", almanac.ErrNonFinite, c.Index)
		}
	}
	return out, changes, nil
}

// apply is Apply on data already scaled by a power of two, with fence
// width k.
func (s Screen) apply(y almanac.Series, period int, k float64) (almanac.Series, []Change, error) {
	rep := Repair{Period: period, SeasonalWindow: s.SeasonalWindow}
	filled, changes, err := rep.Fill(y)
	if err != nil {
		return almanac.Series{}, nil, err
	}
	d, err := STL{Period: period, SeasonalWindow: s.SeasonalWindow, Robust: true}.Decompose(filled)
	if err != nil {
		return almanac.Series{}, nil, err
	}
	sorted := slices.Clone(d.Remainder)
	slices.Sort(sorted)
	q1, q3 := quantile7(sorted, 0.25), quantile7(sorted, 0.75)
	// The level the rounding is judged against is the median |value|, not
	// the largest: one huge outlier (1e308) must not make the ordinary
	// spread of the remainder look like rounding.
	abs := make([]float64, len(filled.Values))
	for i, v := range filled.Values {
		abs[i] = math.Abs(v)
	}
	slices.Sort(abs)
	scale := quantile7(abs, 0.5)
	if q3-q1 <= 1e-9*scale {
		// No spread in the remainder (a constant or exactly seasonal
		// series, or one dominated by repeated values): no scale to
		// judge outliers by, so nothing is flagged.
		return filled, changes, nil
	}
	lo, hi := q1-k*(q3-q1), q3+k*(q3-q1)
	n := y.Len()
	gap := make([]bool, n)
	flagged := false
	for i, e := range d.Remainder {
		if !math.IsNaN(y.Values[i]) && (e < lo || e > hi) {
			gap[i], flagged = true, true
		}
	}
	if !flagged {
		return filled, changes, nil
	}
	// Fill the outliers and the missing values together from the
	// observed values that remain.
	changes = changes[:0]
	for i, v := range y.Values {
		if math.IsNaN(v) {
			gap[i] = true
		}
	}
	out, err := rep.fill(y, gap)
	if err != nil {
		return almanac.Series{}, nil, err
	}
	for i := range gap {
		if !gap[i] {
			continue
		}
		reason := Outlier
		if math.IsNaN(y.Values[i]) {
			reason = Missing
		}
		changes = append(changes, Change{Index: i, Time: y.Time(i), Old: y.Values[i], New: out.Values[i], Reason: reason})
	}
	return out, changes, nil
}

// quantile7 is the type-7 quantile of sorted data (Hyndman & Fan 1996).
func quantile7(sorted []float64, p float64) float64 {
	pos := p * float64(len(sorted)-1)
	i := int(math.Floor(pos))
	if i >= len(sorted)-1 {
		return sorted[len(sorted)-1]
	}
	return sorted[i] + (pos-float64(i))*(sorted[i+1]-sorted[i])
}
