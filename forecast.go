package almanac

import (
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/almanac-go/almanac/calendar"
	"gonum.org/v1/gonum/stat/distuv"
)

// Forecast holds forecasts for steps 1..H after the end of a series.
//
// Levels of prediction intervals are percentages in the open interval
// (0, 100): 80 means the central 80% interval, bounded by the 10% and 90%
// quantiles. Probabilities given to Quantile are fractions in (0, 1).
//
// A Forecast is read-only once returned; concurrent reads are safe.
type Forecast struct {
	Start time.Time          // time of the first forecast step
	Freq  calendar.Frequency // spacing of the steps
	// Mean holds the point forecasts. For most models it is the mean of
	// the forecast distribution; a back-transformed forecast documents
	// whether it is the median or the bias-adjusted mean.
	Mean []float64
	// Intervals holds one central prediction interval per requested
	// level, in the order the levels were requested.
	Intervals []Interval
	// Dist is the forecast distribution, step by step, or nil when the
	// model produced only point forecasts.
	Dist Distribution
}

// Interval is a central prediction interval at one level.
type Interval struct {
	Level float64   // percentage in (0, 100)
	Lower []float64 // (100−Level)/2 % quantile per step
	Upper []float64 // (100+Level)/2 % quantile per step
}

// Horizon returns the number of forecast steps.
func (f Forecast) Horizon() int { return len(f.Mean) }

// Time returns the time of forecast step h (0-based: h = 0 is Start).
func (f Forecast) Time(h int) time.Time { return f.Freq.Add(f.Start, h) }

// Quantile returns the p-quantile of the forecast distribution at every
// step. p is a probability in (0, 1).
//
// Special cases: p outside (0, 1) or NaN gives an error wrapping
// ErrLevel; a forecast without a distribution gives one wrapping
// ErrNoDistribution; a distribution shorter than Mean or incomplete gives
// the errors of NewForecast (ErrLength, ErrInvalid); a quantile that is
// NaN or ±Inf (beyond the float64 range far in a tail) one wrapping
// ErrNonFinite.
func (f Forecast) Quantile(p float64) ([]float64, error) {
	if !(p > 0 && p < 1) {
		return nil, fmt.Errorf("almanac: %w: probability %v outside (0, 1)", ErrLevel, p)
	}
	if f.Dist == nil {
		return nil, fmt.Errorf("almanac: %w", ErrNoDistribution)
	}
	if err := checkDistribution(f.Dist, len(f.Mean)); err != nil {
		return nil, err
	}
	out := make([]float64, len(f.Mean))
	for h := range out {
		out[h] = f.Dist.Quantile(h, p)
	}
	if err := checkFiniteValues(fmt.Sprintf("the %v quantile", p), out); err != nil {
		return nil, err
	}
	return out, nil
}

// Bounds returns the central prediction interval at level (a percentage
// in (0, 100)), from Intervals when that level was requested and from
// the distribution otherwise.
func (f Forecast) Bounds(level float64) (lower, upper []float64, err error) {
	if err := CheckLevels(level); err != nil {
		return nil, nil, err
	}
	for _, iv := range f.Intervals {
		if iv.Level == level {
			return slices.Clone(iv.Lower), slices.Clone(iv.Upper), nil
		}
	}
	if lower, err = f.Quantile((1 - level/100) / 2); err != nil {
		return nil, nil, err
	}
	upper, err = f.Quantile((1 + level/100) / 2)
	return lower, upper, err
}

// SamplePaths returns the simulated sample paths behind the forecast
// (paths[i][h] is path i at step h), or nil when the distribution is not
// a *Sample.
func (f Forecast) SamplePaths() [][]float64 {
	if s, ok := f.Dist.(*Sample); ok {
		return s.Paths
	}
	return nil
}

// CheckLevels returns an error wrapping ErrLevel unless every level is a
// percentage strictly between 0 and 100.
func CheckLevels(levels ...float64) error {
	for _, l := range levels {
		if !(l > 0 && l < 100) {
			return fmt.Errorf("almanac: %w: level %v outside (0, 100); levels are percentages", ErrLevel, l)
		}
	}
	return nil
}

// MaxHorizon is the largest forecast horizon the models accept: about a
// million steps, far beyond any useful forecast, and small enough that
// the forecast arrays can always be allocated.
const MaxHorizon = 1 << 20

// CheckHorizon returns an error wrapping ErrHorizon when h < 1 or
// h > MaxHorizon.
func CheckHorizon(h int) error {
	if h < 1 {
		return fmt.Errorf("almanac: %w: horizon %d, need at least 1", ErrHorizon, h)
	}
	if h > MaxHorizon {
		return fmt.Errorf("almanac: %w: horizon %d, at most %d", ErrHorizon, h, MaxHorizon)
	}
	return nil
}

// NewForecast assembles a Forecast starting at start with the given point
// forecasts and distribution, and fills Intervals from the distribution's
// quantiles at each level. dist may be nil only when no levels are asked.
// The slices are used as given (not copied).
//
// Special cases: a level outside (0, 100) gives an error wrapping
// ErrLevel; levels with a nil dist one wrapping ErrNoDistribution; a
// Normal, Sample or Mapped dist that covers fewer steps than mean (a
// shorter Mean or SD, a shorter path) one wrapping ErrLength, and a nil
// *Normal or *Sample, a negative standard deviation, a Sample without
// paths, or a Mapped without Base or Map, one wrapping ErrInvalid; a
// point forecast or an interval bound that is NaN or ±Inf (a bound beyond
// the float64 range, a step without any finite sample draw) one wrapping
// ErrNonFinite, so that no model can hand out a non-finite forecast
// without an error.
func NewForecast(start time.Time, freq calendar.Frequency, mean []float64, dist Distribution, levels ...float64) (Forecast, error) {
	if err := CheckLevels(levels...); err != nil {
		return Forecast{}, err
	}
	if err := checkFiniteValues("point forecast", mean); err != nil {
		return Forecast{}, err
	}
	if dist == nil && len(levels) > 0 {
		return Forecast{}, fmt.Errorf("almanac: %w: cannot give intervals", ErrNoDistribution)
	}
	if err := checkDistribution(dist, len(mean)); err != nil {
		return Forecast{}, err
	}
	f := Forecast{Start: start, Freq: freq, Mean: mean, Dist: dist}
	if len(levels) == 0 {
		return f, nil
	}
	// Probabilities of every bound: lower and upper for each level.
	ps := make([]float64, 2*len(levels))
	for i, l := range levels {
		ps[2*i], ps[2*i+1] = (1-l/100)/2, (1+l/100)/2
	}
	f.Intervals = make([]Interval, len(levels))
	for i, l := range levels {
		f.Intervals[i] = Interval{Level: l, Lower: make([]float64, len(mean)), Upper: make([]float64, len(mean))}
	}
	q := make([]float64, len(ps))
	s, isSample := dist.(*Sample)
	var col []float64
	for h := range mean {
		if isSample {
			// One sort per step serves every bound.
			col = s.sortedColumn(col[:0], h)
			for j, p := range ps {
				q[j] = quantileSorted(col, p)
			}
		} else {
			for j, p := range ps {
				q[j] = dist.Quantile(h, p)
			}
		}
		for i := range levels {
			f.Intervals[i].Lower[h], f.Intervals[i].Upper[h] = q[2*i], q[2*i+1]
		}
	}
	for _, iv := range f.Intervals {
		if err := checkFiniteValues(fmt.Sprintf("lower bound of the %v%% interval", iv.Level), iv.Lower); err != nil {
			return Forecast{}, err
		}
		if err := checkFiniteValues(fmt.Sprintf("upper bound of the %v%% interval", iv.Level), iv.Upper); err != nil {
			return Forecast{}, err
		}
	}
	return f, nil
}

// checkFiniteValues returns an error wrapping ErrNonFinite naming what
// and the first step (1-based) of x that is NaN or ±Inf.
func checkFiniteValues(what string, x []float64) error {
	for h, v := range x {
		switch {
		case math.IsNaN(v):
			return fmt.Errorf("almanac: %w: %s at step %d is undefined (NaN)", ErrNonFinite, what, h+1)
		case math.IsInf(v, 0):
			return fmt.Errorf("almanac: %w: %s at step %d is %v, beyond the float64 range", ErrNonFinite, what, h+1, v)
		}
	}
	return nil
}

// checkDistribution returns an error when dist, one of this package's
// distributions, cannot give quantiles for steps 0..h−1 (other
// implementations are trusted).
func checkDistribution(dist Distribution, h int) error {
	switch d := dist.(type) {
	case *Normal:
		if d == nil {
			return fmt.Errorf("almanac: %w: nil *Normal distribution", ErrInvalid)
		}
		if len(d.Mean) < h || len(d.SD) < h {
			return fmt.Errorf("almanac: %w: normal distribution with %d means and %d standard deviations for %d steps", ErrLength, len(d.Mean), len(d.SD), h)
		}
		for i, sd := range d.SD[:h] {
			if sd < 0 {
				return fmt.Errorf("almanac: %w: negative standard deviation %v at step %d", ErrInvalid, sd, i+1)
			}
		}
	case *Sample:
		if d == nil {
			return fmt.Errorf("almanac: %w: nil *Sample distribution", ErrInvalid)
		}
		if len(d.Paths) == 0 && h > 0 {
			return fmt.Errorf("almanac: %w: sample distribution without paths", ErrInvalid)
		}
		for i, p := range d.Paths {
			if len(p) < h {
				return fmt.Errorf("almanac: %w: sample path %d has %d steps, need %d", ErrLength, i, len(p), h)
			}
		}
	case *Mapped:
		if d == nil || d.Base == nil || d.Map == nil {
			return fmt.Errorf("almanac: %w: mapped distribution without a base or a map", ErrInvalid)
		}
		return checkDistribution(d.Base, h)
	}
	return nil
}

// Distribution is a forecast distribution given step by step.
// Implementations must be safe for concurrent reads.
type Distribution interface {
	// Quantile returns the p-quantile (0 < p < 1) at step h (0-based).
	Quantile(h int, p float64) float64
}

// Normal is a Gaussian forecast distribution: Mean[h] and standard
// deviation SD[h] at each step.
type Normal struct {
	Mean, SD []float64
}

// Quantile returns Mean[h] + SD[h]·Φ⁻¹(p). When SD[h]·Φ⁻¹(p) overflows
// although the sum does not (a mean near −1e308 and a standard deviation
// near 1e308), the sum is formed at 1/1024 of the scale and scaled back
// (exact for powers of two), so a representable quantile comes out.
func (d *Normal) Quantile(h int, p float64) float64 {
	m, sd := d.Mean[h], d.SD[h]
	if sd == 0 {
		return m
	}
	z := distuv.UnitNormal.Quantile(p)
	q := m + sd*z
	if math.IsInf(q, 0) && !math.IsInf(m, 0) && !math.IsInf(sd, 0) {
		q = math.Ldexp(math.Ldexp(m, -10)+math.Ldexp(sd, -10)*z, 10)
	}
	return q
}

// Sample is an empirical forecast distribution from simulated sample
// paths: Paths[i][h] is path i at step h. Quantiles interpolate linearly
// between order statistics (the "type 7" definition of Hyndman & Fan
// 1996, common practice in statistical software).
type Sample struct {
	Paths [][]float64
}

// Quantile returns the p-quantile of the paths at step h, ignoring NaN.
func (d *Sample) Quantile(h int, p float64) float64 {
	return quantileSorted(d.sortedColumn(make([]float64, 0, len(d.Paths)), h), p)
}

// sortedColumn appends the non-NaN values of step h to dst, sorted.
func (d *Sample) sortedColumn(dst []float64, h int) []float64 {
	for _, path := range d.Paths {
		if v := path[h]; !math.IsNaN(v) {
			dst = append(dst, v)
		}
	}
	slices.Sort(dst)
	return dst
}

// quantileSorted returns the p-quantile of sorted xs by linear
// interpolation between order statistics (NaN when xs is empty).
func quantileSorted(xs []float64, p float64) float64 {
	if len(xs) == 0 {
		return math.NaN()
	}
	pos := p * float64(len(xs)-1)
	i := int(math.Floor(pos))
	if i >= len(xs)-1 {
		return xs[len(xs)-1]
	}
	frac := pos - float64(i)
	d := xs[i+1] - xs[i]
	if math.IsInf(d, 0) {
		// Draws of opposite sign near the float64 limit: interpolate
		// without forming their difference.
		return xs[i]*(1-frac) + xs[i+1]*frac
	}
	return xs[i] + frac*d
}

// Mapped is a forecast distribution transformed by a strictly increasing
// function, such as the inverse of a Box-Cox transform: its quantiles are
// Map applied to the quantiles of Base.
type Mapped struct {
	Base Distribution
	Map  func(float64) float64
}

// Quantile returns Map(Base.Quantile(h, p)).
func (d *Mapped) Quantile(h int, p float64) float64 { return d.Map(d.Base.Quantile(h, p)) }
