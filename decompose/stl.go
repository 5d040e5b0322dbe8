package decompose

import (
	"fmt"
	"math"

	"github.com/almanac-go/almanac"
	"github.com/almanac-go/almanac/internal/stl"
)

// Degree is the degree of a local (loess) polynomial. The zero value is
// DegreeAuto, the default of the smoother it is used for. Programs
// should not rely on the numeric values.
type Degree int

// Loess degrees.
const (
	DegreeAuto Degree = iota // the smoother's default
	Constant                 // local constant (degree 0)
	Linear                   // local linear (degree 1)
)

// String returns "auto", "constant" or "linear", or "Degree(n)".
func (d Degree) String() string {
	switch d {
	case DegreeAuto:
		return "auto"
	case Constant:
		return "constant"
	case Linear:
		return "linear"
	}
	return fmt.Sprintf("Degree(%d)", int(d))
}

// value returns the polynomial degree, def when auto.
func (d Degree) value(def int) (int, error) {
	switch d {
	case DegreeAuto:
		return def, nil
	case Constant:
		return 0, nil
	case Linear:
		return 1, nil
	}
	return 0, fmt.Errorf("decompose: %w: loess degree %v", ErrWindow, d)
}

// DefaultSeasonalWindow is the seasonal span used when STL.SeasonalWindow
// is zero: 11, which is 7 + 4·1, the MSTL default for a single period
// (Bandara, Hyndman & Bergmeir 2021), so STL and a one-period MSTL start
// from the same smoother. Cleveland et al. (1990) advise at least 7.
const DefaultSeasonalWindow = 11

// STL is the seasonal-trend decomposition by loess of Cleveland,
// Cleveland, McRae & Terpenning (1990). The zero value decomposes with
// the period of the series frequency, seasonal span 11 and R's default
// rules for everything else, without robustness.
//
// Spans (windows) are in observations (trend, low-pass) or in cycles
// (seasonal). A span below 3 is raised to 3 and an even span to the next
// odd number, as the authors' Fortran does; the spans actually used are
// reported in Decomposition.Settings. Negative values, and spans, jumps
// and iteration counts above math.MaxInt32 (R's stl takes 32-bit
// integers), are rejected.
//
// Example:
//
//	d, err := decompose.STL{SeasonalWindow: 13, Robust: true}.Decompose(y)
//
// An STL value is a specification, safe for concurrent use.
type STL struct {
	// Period is the seasonal period in observations, ≥ 2; 0 means
	// y.Period() (12 for monthly data, 4 quarterly, 52 weekly, ...).
	Period int
	// SeasonalWindow is the loess span of the cycle-subseries smoother,
	// in cycles; 0 means DefaultSeasonalWindow. Ignored when Periodic.
	SeasonalWindow int
	// Periodic makes the seasonal component strictly periodic (R's
	// s.window = "periodic"): the span becomes 10n+1 with degree 0 and the
	// result is averaged over each position in the cycle. Positions are
	// taken by observation index modulo Period; R groups by calendar
	// position (cycle(x)), which forms the same groups whatever month the
	// series starts in, so the results agree.
	Periodic bool
	// SeasonalDegree: DegreeAuto means Constant.
	SeasonalDegree Degree
	// TrendWindow is the trend loess span; 0 means R's rule
	// nextodd(ceiling(1.5·period / (1 − 1.5/SeasonalWindow))).
	TrendWindow int
	// TrendDegree: DegreeAuto means Linear.
	TrendDegree Degree
	// LowPassWindow is the span of the low-pass loess; 0 means the
	// smallest odd number ≥ Period.
	LowPassWindow int
	// LowPassDegree: DegreeAuto means the trend degree.
	LowPassDegree Degree
	// SeasonalJump, TrendJump and LowPassJump: each smoother is evaluated
	// every Jump points and interpolated linearly in between; 0 means
	// ceiling(window/10) (R's default), 1 evaluates at every point.
	SeasonalJump, TrendJump, LowPassJump int
	// Robust turns on the robustness passes: Inner defaults to 1 and
	// Outer to 15 (otherwise 2 and 0).
	Robust bool
	// Inner is the number of inner iterations per pass; 0 = default.
	Inner int
	// Outer is the number of robustness passes; 0 = default (a positive
	// value makes the fit robust even when Robust is false).
	Outer int
	// ExactMedian scales the robustness weights by six times the exact
	// median absolute remainder, as the paper defines them. By default
	// the scale is computed as R's stl computes it, with a partial sort
	// that for an even number of observations returns a value other than
	// the median about one time in ten (sometimes a much larger one,
	// which makes the weights too lenient for that pass); the default
	// keeps results identical to R's.
	ExactMedian bool
}

var _ Method = STL{}

// maxParam bounds the integer options of STL (spans, jumps, iteration
// counts; a larger period is simply too long for any series): R's stl hands them to the authors' Fortran as 32-bit
// integers, so nothing larger has a reference meaning, and bounding them
// keeps the span arithmetic of the kernel (nextodd, ceiling(w/10), w+1)
// far from int overflow.
const maxParam = math.MaxInt32

// params resolves the specification for n observations of a series whose
// frequency gives period fp.
func (s STL) params(n, fp int) (stl.Params, STL, error) {
	for _, v := range []struct {
		name string
		v    int
	}{
		{"period", s.Period}, {"seasonal window", s.SeasonalWindow}, {"trend window", s.TrendWindow},
		{"low-pass window", s.LowPassWindow}, {"seasonal jump", s.SeasonalJump}, {"trend jump", s.TrendJump},
		{"low-pass jump", s.LowPassJump}, {"inner iterations", s.Inner}, {"outer iterations", s.Outer},
	} {
		if v.v < 0 {
			return stl.Params{}, s, fmt.Errorf("decompose: stl: %w: negative %s %d", ErrWindow, v.name, v.v)
		}
		if v.v > maxParam && v.name != "period" {
			return stl.Params{}, s, fmt.Errorf("decompose: stl: %w: %s %d above %d", ErrWindow, v.name, v.v, maxParam)
		}
	}
	period := s.Period
	if period == 0 {
		period = fp
	}
	if period < 2 {
		return stl.Params{}, s, fmt.Errorf("decompose: stl: %w: period %d (set STL.Period for a series without a seasonal frequency)", ErrPeriod, period)
	}
	if period >= n-period { // n ≤ 2·period, written so that it cannot overflow
		return stl.Params{}, s, fmt.Errorf("decompose: stl: %w: %d observations, period %d needs more than two full cycles", almanac.ErrTooShort, n, period)
	}
	sw := s.SeasonalWindow
	if sw == 0 {
		sw = DefaultSeasonalWindow
	}
	robust := s.Robust || s.Outer > 0
	p := stl.Defaults(n, period, sw, s.Periodic, robust)
	var err error
	if !s.Periodic {
		if p.SDegree, err = s.SeasonalDegree.value(0); err != nil {
			return p, s, err
		}
	} else if _, err = s.SeasonalDegree.value(0); err != nil {
		return p, s, err
	}
	if p.TDegree, err = s.TrendDegree.value(1); err != nil {
		return p, s, err
	}
	if p.LDegree, err = s.LowPassDegree.value(p.TDegree); err != nil {
		return p, s, err
	}
	if s.TrendWindow > 0 {
		p.TWindow = s.TrendWindow
		p.TJump = ceilTenth(p.TWindow)
	}
	if s.LowPassWindow > 0 {
		p.LWindow = s.LowPassWindow
		p.LJump = ceilTenth(p.LWindow)
	}
	if s.SeasonalJump > 0 {
		p.SJump = s.SeasonalJump
	}
	if s.TrendJump > 0 {
		p.TJump = s.TrendJump
	}
	if s.LowPassJump > 0 {
		p.LJump = s.LowPassJump
	}
	if s.Inner > 0 {
		p.Inner = s.Inner
	}
	if s.Outer > 0 {
		p.Outer = s.Outer
	}
	p.ExactMedian = s.ExactMedian
	if err := p.Validate(n); err != nil {
		return p, s, stlError(err)
	}
	e := p.Effective()
	used := STL{
		Period: e.Period, SeasonalWindow: e.SWindow, Periodic: s.Periodic,
		SeasonalDegree: degreeOf(e.SDegree), TrendWindow: e.TWindow, TrendDegree: degreeOf(e.TDegree),
		LowPassWindow: e.LWindow, LowPassDegree: degreeOf(e.LDegree),
		SeasonalJump: e.SJump, TrendJump: e.TJump, LowPassJump: e.LJump,
		Robust: e.Outer > 0, Inner: e.Inner, Outer: e.Outer, ExactMedian: s.ExactMedian,
	}
	return p, used, nil
}

func ceilTenth(w int) int { return (w + 9) / 10 }

func degreeOf(d int) Degree {
	if d == 0 {
		return Constant
	}
	return Linear
}

// Decompose splits y into trend, seasonal and remainder components, with
// y = trend + seasonal + remainder exactly up to rounding. The result's
// Weights are the robustness weights used in the last pass (all 1 when
// not robust), as R's stl returns them.
//
// Special cases: a missing value gives an error wrapping
// almanac.ErrMissing (fill gaps with Repair.Fill first); a period below 2
// one wrapping ErrPeriod; n ≤ 2·period one wrapping almanac.ErrTooShort;
// a negative window, jump or iteration count, a window, jump or count
// above math.MaxInt32, or an unknown Degree one wrapping ErrWindow.
func (s STL) Decompose(y almanac.Series) (*Decomposition, error) {
	if err := checkComplete(y, "STL"); err != nil {
		return nil, err
	}
	p, used, err := s.params(y.Len(), y.Period())
	if err != nil {
		return nil, err
	}
	seas, trend, rem, w, err := stl.Decompose(y.Values, p)
	if err != nil {
		return nil, stlError(err)
	}
	return finish(&Decomposition{
		Series:    y.Clone(),
		Method:    "STL",
		Periods:   []int{p.Period},
		Trend:     trend,
		Seasonal:  seas,
		Seasonals: [][]float64{seas},
		Remainder: rem,
		Weights:   w,
		Settings:  []STL{used},
	})
}
