package smoothing

import (
	"fmt"
	"math"
)

// ErrorType is the error form of an ETS model: how the one-step
// innovation enters the observation equation. The zero value is
// AdditiveError. Programs should not rely on the numeric values.
type ErrorType int

// Error forms.
const (
	AdditiveError       ErrorType = iota // y = ŷ + ε
	MultiplicativeError                  // y = ŷ·(1 + ε)
)

// String returns "A" or "M" (the taxonomy letter), or "ErrorType(n)".
func (e ErrorType) String() string {
	switch e {
	case AdditiveError:
		return "A"
	case MultiplicativeError:
		return "M"
	}
	return fmt.Sprintf("ErrorType(%d)", int(e))
}

// TrendType is the trend form of an ETS model. The zero value is NoTrend.
type TrendType int

// Trend forms.
const (
	NoTrend                   TrendType = iota // N
	AdditiveTrend                              // A: level + slope
	DampedTrend                                // Ad: level + damped slope
	MultiplicativeTrend                        // M: level × growth rate
	DampedMultiplicativeTrend                  // Md: level × damped growth rate
)

// String returns "N", "A", "Ad", "M", "Md", or "TrendType(n)".
func (t TrendType) String() string {
	switch t {
	case NoTrend:
		return "N"
	case AdditiveTrend:
		return "A"
	case DampedTrend:
		return "Ad"
	case MultiplicativeTrend:
		return "M"
	case DampedMultiplicativeTrend:
		return "Md"
	}
	return fmt.Sprintf("TrendType(%d)", int(t))
}

func (t TrendType) damped() bool { return t == DampedTrend || t == DampedMultiplicativeTrend }
func (t TrendType) multiplicative() bool {
	return t == MultiplicativeTrend || t == DampedMultiplicativeTrend
}
func (t TrendType) valid() bool { return t >= NoTrend && t <= DampedMultiplicativeTrend }

// SeasonType is the seasonal form of an ETS model. The zero value is
// NoSeason.
type SeasonType int

// Seasonal forms.
const (
	NoSeason             SeasonType = iota // N
	AdditiveSeason                         // A: level + seasonal effect
	MultiplicativeSeason                   // M: level × seasonal factor
)

// String returns "N", "A", "M", or "SeasonType(n)".
func (s SeasonType) String() string {
	switch s {
	case NoSeason:
		return "N"
	case AdditiveSeason:
		return "A"
	case MultiplicativeSeason:
		return "M"
	}
	return fmt.Sprintf("SeasonType(%d)", int(s))
}

// Bounds selects the region in which smoothing parameters are estimated.
// The zero value is UsualBounds.
type Bounds int

// Parameter regions.
const (
	// UsualBounds: 1e-4 ≤ α ≤ 1−1e-4, β = α·b with 1e-4 ≤ b ≤ 1−1e-4,
	// γ = (1−α)·g with 1e-4 ≤ g ≤ 1−1e-4, 0.8 ≤ φ ≤ 0.98 (the region of
	// the classical smoothing form, common practice; the same box as
	// statsmodels' ETSModel).
	UsualBounds Bounds = iota
	// AdmissibleBounds: the forecastability region of the state-space
	// form (Hyndman, Koehler, Ord & Snyder 2008, ch. 10): the discount
	// matrix has all eigenvalues inside the unit circle. The search box
	// is 1e-4 ≤ α, β, γ ≤ 2−1e-4 (β ≤ 4−1e-4) and 0.8 ≤ φ ≤ 0.98.
	AdmissibleBounds
	// UsualAdmissibleBounds: the usual bounds intersected with the
	// admissible region.
	UsualAdmissibleBounds
)

// String returns "usual", "admissible", "usual+admissible", or
// "Bounds(n)". (The names of the two regions are those of Hyndman,
// Koehler, Ord & Snyder 2008, ch. 10.)
func (b Bounds) String() string {
	switch b {
	case UsualBounds:
		return "usual"
	case AdmissibleBounds:
		return "admissible"
	case UsualAdmissibleBounds:
		return "usual+admissible"
	}
	return fmt.Sprintf("Bounds(%d)", int(b))
}

// Spec is one exponential smoothing model of the error/trend/season
// taxonomy in its innovations state-space form. It implements
// almanac.Model. The zero Spec is ETS(A,N,N), simple exponential
// smoothing, with everything estimated.
//
// Any subset of the smoothing parameters and initial states may be fixed
// by setting the pointer (or slice) field; nil means "estimate". Fixed
// values are used as given: the bounds restrict only the estimated
// parameters (an estimated β under UsualBounds is bounded by α, fixed or
// not). Use Value to take the address of a literal:
//
//	smoothing.Spec{Error: smoothing.MultiplicativeError, Trend: smoothing.DampedTrend,
//		Season: smoothing.MultiplicativeSeason, Phi: smoothing.Value(0.95)}
//
// A Spec is immutable and safe to share between goroutines.
type Spec struct {
	Error  ErrorType
	Trend  TrendType
	Season SeasonType
	// Period is the seasonal period m; 0 takes it from the series'
	// frequency (monthly 12, quarterly 4, ...). Ignored without a season.
	// At most MaxPeriod.
	Period int

	// Alpha, Beta, Gamma, Phi fix the level, trend and seasonal
	// smoothing parameters and the damping parameter (innovations form:
	// β = α·β*, γ = (1−α)·γ* in terms of the classical constants β*, γ*).
	// nil = estimate. Ignored when the model lacks the component.
	Alpha, Beta, Gamma, Phi *float64
	// InitLevel and InitTrend fix the states before the first observation
	// (ℓ₀ and b₀; b₀ is a growth ratio for multiplicative trends).
	InitLevel, InitTrend *float64
	// InitSeason fixes the m seasonal states before the first
	// observation, in chronological order: InitSeason[k] is the seasonal
	// state used for observation k. No normalisation is applied to fixed
	// seasonal states. nil = estimate (then normalised to sum 0 for
	// additive and mean 1 for multiplicative seasonality).
	InitSeason []float64

	// Bounds is the region for estimated smoothing parameters.
	Bounds Bounds

	// Seed seeds the generator (math/rand/v2 PCG) for simulated
	// prediction intervals and sample paths of models without analytic
	// intervals. The same Seed gives the same intervals.
	Seed uint64
	// Paths is the number of sample paths for simulated intervals; 0
	// means 5000.
	Paths int
}

// Value returns a pointer to v, for fixing a parameter in a Spec literal.
func Value(v float64) *float64 { return &v }

// String returns the model in taxonomy notation, e.g. "ETS(M,Ad,M)".
func (s Spec) String() string {
	return fmt.Sprintf("ETS(%v,%v,%v)", s.Error, s.Trend, s.Season)
}

// multiplicativeParts reports whether any component needs positive data.
func (s Spec) multiplicativeParts() bool {
	return s.Error == MultiplicativeError || s.Trend.multiplicative() || s.Season == MultiplicativeSeason
}

// check validates the specification (not the data).
func (s Spec) check() error {
	if s.Error != AdditiveError && s.Error != MultiplicativeError {
		return fmt.Errorf("smoothing: %w: error type %v", errInvalid, s.Error)
	}
	if !s.Trend.valid() {
		return fmt.Errorf("smoothing: %w: trend type %v", errInvalid, s.Trend)
	}
	if s.Season < NoSeason || s.Season > MultiplicativeSeason {
		return fmt.Errorf("smoothing: %w: season type %v", errInvalid, s.Season)
	}
	if s.Bounds < UsualBounds || s.Bounds > UsualAdmissibleBounds {
		return fmt.Errorf("smoothing: %w: bounds %v", errInvalid, s.Bounds)
	}
	if s.Period < 0 {
		return fmt.Errorf("smoothing: %w: negative period %d", errInvalid, s.Period)
	}
	if s.Paths < 0 {
		return fmt.Errorf("smoothing: %w: negative number of paths %d", errInvalid, s.Paths)
	}
	for _, p := range []struct {
		name string
		v    *float64
	}{{"alpha", s.Alpha}, {"beta", s.Beta}, {"gamma", s.Gamma}, {"phi", s.Phi}, {"initial level", s.InitLevel}, {"initial trend", s.InitTrend}} {
		if p.v != nil && (math.IsNaN(*p.v) || math.IsInf(*p.v, 0)) {
			return fmt.Errorf("smoothing: %w: fixed %s is %v", errInvalid, p.name, *p.v)
		}
	}
	if s.Phi != nil && !(*s.Phi > 0 && *s.Phi <= 1) {
		return fmt.Errorf("smoothing: %w: fixed phi %v outside (0, 1]", ErrNotAdmissible, *s.Phi)
	}
	for i, v := range s.InitSeason {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("smoothing: %w: fixed initial seasonal state %d is %v", errInvalid, i, v)
		}
	}
	return nil
}
